"""Where the workflow's files are: in this checkout, or inside the installed package.

The Snakefile, the rule files, the rule scripts, the configuration schema, the report captions,
the Snakemake profiles and the invented sample live in the repository at the paths below. A wheel
(or ``pip install .``) carries copies of them, with the same relative paths, in
``cinderclock/_bundle/`` (setup.py copies them at build time). An editable install or a checkout on
``PYTHONPATH`` reads the repository directly. Either way every file is found through
:func:`locate`, which reports a missing one in one line that says where it looked.

::

    >>> from cinderclock.resources import locate
    >>> locate("schema")                       # doctest: +SKIP
    PosixPath('.../cinderclock/_bundle/workflow/schemas/config.schema.yaml')
"""

from __future__ import annotations

import sys
from pathlib import Path

from .errors import CinderclockError

#: Run-time resources by name -> path relative to the bundle (= the repository root).
RESOURCES = {
    "snakefile": "Snakefile",
    "workflow": "workflow",
    "rules": "workflow/rules",
    "scripts": "workflow/scripts",
    "schema": "workflow/schemas/config.schema.yaml",
    "report": "workflow/report",
    "profiles": "workflow/profiles",
    "sample-config": "config/config.yaml",
    "sample-catalogue": "sample_catalog/lanternfall_dr1.csv",
    "sample-readme": "sample_catalog/README.md",
}

#: Where a built package keeps its copy of the workflow (next to this module).
BUNDLE_DIR = Path(__file__).resolve().parent / "_bundle"


class ResourceError(CinderclockError):
    """A file the workflow needs at run time is missing from the installation."""


def _checkout_root():
    """The repository root when this module is imported from a checkout (workflow/cinderclock/)."""
    here = Path(__file__).resolve().parent
    if here.parent.name == "workflow" and (here.parent / "rules").is_dir():
        return here.parent.parent
    return None


def candidates():
    """Folders searched for the workflow's files, in order: the checkout, then the package's copy."""
    roots = [BUNDLE_DIR]
    checkout = _checkout_root()
    if checkout is not None:
        roots.insert(0, checkout)
    return roots


def locate(name):
    """Path of a run-time resource (a key of :data:`RESOURCES`).

    Raises
    ------
    ResourceError
        One line naming the resource and every place it was looked for.
    """
    if name not in RESOURCES:
        raise ResourceError(f"unknown resource {name!r}; known: {', '.join(RESOURCES)}")
    rel = RESOURCES[name]
    tried = []
    for root in candidates():
        path = root / rel
        if path.exists():
            return path
        tried.append(str(path))
    raise ResourceError(f"cannot find the workflow's {name} ({rel}); looked in: {'; '.join(tried)}. The "
                        "installation is incomplete: reinstall cinderclock (pip install --force-reinstall ...)")


def workflow_snakefile():
    """The workflow's main Snakefile, as a string for a Snakemake ``module`` (``snakefile:``).

    Meant for Snakefiles: when the file cannot be found it prints one line and stops (a traceback
    would bury the message).
    """
    try:
        return str(locate("snakefile"))
    except ResourceError as exc:
        sys.stderr.write(f"cinderclock: error: {exc}\n")
        raise SystemExit(1) from None
