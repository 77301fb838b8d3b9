"""Build hook: ship the workflow (Snakefile, rules, scripts, schema, report captions, profiles) and
the invented sample inside the package, so that a wheel or ``pip install .`` runs without this
repository. Everything else about the package is in pyproject.toml.

The files stay where they are in the repository; a build copies them, with their relative paths
unchanged, into ``cinderclock/_bundle/`` of the build tree (``cinderclock.resources`` finds them
there, or in the checkout for an editable install). What is copied is listed in BUNDLE below and,
for source distributions, in MANIFEST.in.
"""

from pathlib import Path
import shutil

from setuptools import setup
from setuptools.command.build_py import build_py

HERE = Path(__file__).resolve().parent

#: Files copied into the package, as glob patterns relative to the repository root. Everything
#: under workflow/ except the package itself ships, so a new rule, script, caption or profile needs
#: no change here.
BUNDLE = [
    "Snakefile",
    "config/config.yaml",
    "sample_catalog/README.md",
    "sample_catalog/lanternfall_dr1.csv",
    "workflow/**/*",
]


def bundle_files(root=HERE):
    """Repository files that ship inside the package (relative paths, sorted)."""
    found = set()
    for pattern in BUNDLE:
        for path in root.glob(pattern):
            rel = path.relative_to(root)
            package_code = rel.parts[:2] == ("workflow", "cinderclock")
            build_debris = "__pycache__" in rel.parts or rel.suffix == ".pyc" or ".egg-info" in str(rel)
            if path.is_file() and not package_code and not build_debris:
                found.add(rel)
    return sorted(found)


class BuildWithWorkflow(build_py):
    """``build_py`` that also copies the workflow files into ``cinderclock/_bundle/``."""

    def run(self):
        super().run()
        if getattr(self, "editable_mode", False):
            return                       # editable: cinderclock.resources reads the checkout itself
        target = Path(self.build_lib) / "cinderclock" / "_bundle"
        for rel in bundle_files():
            dest = target / rel
            dest.parent.mkdir(parents=True, exist_ok=True)
            shutil.copy2(HERE / rel, dest)


setup(cmdclass={"build_py": BuildWithWorkflow})
