"""The installed package: a built wheel carries the whole workflow, and a project folder made by
``cinderclock init`` runs it from outside the repository (internal behaviour checks).

The wheel is built from a copy of this checkout (``pip wheel``, as ``pip install .`` would).
What it must carry is read from the checkout itself (every file under workflow/ outside the
package, the Snakefile, the sample) and from the rule files' references to report captions, not
from the build script's list.
"""

import json
import os
import re
import shutil
import subprocess
import sys
import zipfile
from pathlib import Path

import pytest
import yaml

ROOT = Path(__file__).resolve().parents[1]
SOURCE = ["pyproject.toml", "setup.py", "MANIFEST.in", "README.md", "Snakefile", "config", "sample_catalog",
          "workflow"]
JUNK = shutil.ignore_patterns("__pycache__", "*.pyc", "*.egg-info", "results", ".snakemake")


def _clean_env(**extra):
    """Environment without this checkout on PYTHONPATH (conftest puts it there for other tests)."""
    env = {k: v for k, v in os.environ.items() if k not in ("PYTHONPATH", "PYTHONHOME", "VIRTUAL_ENV")}
    env.update(OMP_NUM_THREADS="1", **extra)
    return env


@pytest.fixture(scope="session")
def wheel(tmp_path_factory):
    """A wheel of this checkout, built from a copy (the checkout gets no build/ or egg-info)."""
    src = tmp_path_factory.mktemp("src")
    for name in SOURCE:
        path = ROOT / name
        if path.is_dir():
            shutil.copytree(path, src / name, ignore=JUNK)
        else:
            shutil.copy2(path, src / name)
    out = tmp_path_factory.mktemp("wheel")
    run = subprocess.run([sys.executable, "-m", "pip", "wheel", "--no-deps", "-q", "-w", str(out), str(src)],
                         capture_output=True, text=True, timeout=600, env=_clean_env())
    assert run.returncode == 0, run.stderr[-3000:]
    (whl,) = out.glob("cinderclock-*.whl")
    return whl


@pytest.fixture(scope="session")
def unpacked(wheel, tmp_path_factory):
    """The wheel's contents, as site-packages would hold them."""
    site = tmp_path_factory.mktemp("site")
    with zipfile.ZipFile(wheel) as zf:
        zf.extractall(site)
    return site


def _needed_files():
    """Files the workflow reads at run time, from the checkout."""
    files = {"Snakefile", "config/config.yaml", "sample_catalog/lanternfall_dr1.csv", "sample_catalog/README.md"}
    for path in (ROOT / "workflow").rglob("*"):
        rel = path.relative_to(ROOT)
        if path.is_file() and rel.parts[1] != "cinderclock" and "__pycache__" not in rel.parts \
                and ".egg-info" not in str(rel):
            files.add(rel.as_posix())
    return files


def test_the_wheel_carries_the_workflow_and_a_single_version(wheel):
    with zipfile.ZipFile(wheel) as zf:
        names = set(zf.namelist())
        metadata = zf.read(next(n for n in names if n.endswith(".dist-info/METADATA"))).decode()
    bundled = {n[len("cinderclock/_bundle/"):] for n in names if n.startswith("cinderclock/_bundle/")}
    needed = _needed_files()
    assert {"workflow/schemas/config.schema.yaml", "workflow/rules/ingest.smk", "workflow/scripts/ingest.py",
            "workflow/profiles/slurm/config.yaml"} <= needed
    assert needed <= bundled, sorted(needed - bundled)
    assert {"cinderclock/data/project/Snakefile", "cinderclock/data/project/config.yaml"} <= names
    assert not [n for n in names if n.startswith(("tests/", "results/")) or "__pycache__" in n]
    # one version: the package's __version__ is the wheel's (pyproject.toml declares it dynamic)
    init = (ROOT / "workflow/cinderclock/__init__.py").read_text()
    version = re.search(r'^__version__ = "([^"]+)"', init, re.M).group(1)
    assert f"\nVersion: {version}\n" in metadata
    import tomllib

    project = tomllib.loads((ROOT / "pyproject.toml").read_text())["project"]
    assert "version" not in project and "version" in project["dynamic"]


_PROBE = r"""
import json, os, sys
import cinderclock
from cinderclock.config import check_config, validate
from cinderclock.resources import locate
from cinderclock.project import starter_config
cfg = {"catalogue": {"path": "x.csv", "columns": {"star_id": "a", "parallax": "b", "parallax_error": "c"}},
       "bands": {"V": {"passband": "bessell-V", "system": "ab", "mag": "v", "error": "ve"}}}
validate(cfg)
print(json.dumps({"package": cinderclock.__file__, "schema": str(locate("schema")),
                  "snakefile": str(locate("snakefile")), "report": str(locate("report")),
                  "captions": sorted(os.listdir(locate("report"))), "config": cfg,
                  "starter": len(starter_config())}))
"""


def test_schema_defaults_and_templates_are_found_from_the_installed_package(unpacked, tmp_path):
    out = subprocess.run([sys.executable, "-c", _PROBE], cwd=tmp_path, capture_output=True, text=True, timeout=120,
                         env=_clean_env(PYTHONPATH=str(unpacked)))
    assert out.returncode == 0, out.stderr[-3000:]
    got = json.loads(out.stdout)
    for key in ("package", "schema", "snakefile", "report"):
        assert Path(got[key]).is_relative_to(unpacked / "cinderclock"), (key, got[key])
    schema = yaml.safe_load((ROOT / "workflow/schemas/config.schema.yaml").read_text())
    props = schema["properties"]
    assert got["config"]["results_dir"] == props["results_dir"]["default"]
    assert got["config"]["cooling"]["model"] == props["cooling"]["properties"]["model"]["default"]
    assert got["config"]["population"]["survey"]["faint_mag_limit"] is None       # no sample value
    # every caption the rules and the Snakefile name is in the installed report folder
    text = "\n".join(p.read_text() for p in [ROOT / "Snakefile", *(ROOT / "workflow/rules").glob("*.smk")])
    captions = set(re.findall(r"report/([\w.-]+\.rst)", text))
    assert captions and captions <= set(got["captions"]), captions - set(got["captions"])
    assert got["starter"] > 1000


def test_a_project_folder_dry_runs_from_the_unpacked_wheel_and_a_missing_file_is_one_line(unpacked, tmp_path):
    site = tmp_path / "site"
    shutil.copytree(unpacked, site)
    env = _clean_env(PYTHONPATH=str(site))
    proj = tmp_path / "proj"
    run = subprocess.run([sys.executable, "-m", "cinderclock.cli", "init", str(proj), "--with-sample"],
                         capture_output=True, text=True, timeout=120, env=env)
    assert run.returncode == 0, run.stderr
    dry = subprocess.run([sys.executable, "-m", "snakemake", "-n", "--cores", "1"], cwd=proj, capture_output=True,
                         text=True, timeout=300, env=env)
    assert dry.returncode == 0, dry.stderr[-3000:]
    assert "checkpoint ingest:" in dry.stdout and "rule run_summary:" in dry.stdout
    # the run above read the unpacked copy: take its schema away and the same run stops, in one line
    (site / "cinderclock/_bundle/workflow/schemas/config.schema.yaml").unlink()
    broken = subprocess.run([sys.executable, "-m", "snakemake", "-n", "--cores", "1"], cwd=proj,
                            capture_output=True, text=True, timeout=300, env=env)
    assert broken.returncode != 0
    lines = [ln for ln in broken.stderr.splitlines() if "cinderclock" in ln]
    assert lines and lines[0].startswith("cinderclock: error: cannot find the workflow's schema"), broken.stderr
    assert str(site / "cinderclock/_bundle/workflow/schemas/config.schema.yaml") in lines[0]
    assert "Traceback" not in broken.stderr
    cmd = subprocess.run([sys.executable, "-m", "cinderclock.cli", "path", "schema"], capture_output=True,
                         text=True, timeout=120, env=env)
    assert cmd.returncode == 1 and cmd.stderr.count("\n") == 1 and "Traceback" not in cmd.stderr


# Column names of our own for the copy of the sample: none of the sample's (checked below).
RENAMED = {"lf_source": "designation", "ra_icrs": "alpha", "dec_icrs": "delta", "plx": "varpi",
           "plx_e": "varpi_unc", "pm_ra": "mu_alpha", "pm_dec": "mu_delta", "g_mag": "wide", "g_mag_e": "wide_unc",
           "bp_mag": "blue", "bp_mag_e": "blue_unc", "rp_mag": "red", "rp_mag_e": "red_unc", "teff_sp": "t_spec",
           "teff_sp_e": "t_spec_unc", "logg_sp": "grav_spec", "logg_sp_e": "grav_spec_unc", "ruwe_lf": "fit_quality"}


@pytest.mark.slow
def test_a_fresh_venv_runs_a_project_folder_on_a_catalogue_of_its_own(wheel, tmp_path):
    """pip install <wheel> in a new virtual environment, cinderclock init, snakemake: the final table."""
    venv = tmp_path / "venv"
    # --system-site-packages reuses the heavy dependencies already installed; cinderclock itself is
    # installed from the wheel, non-editable, into the venv (and checked to be the one imported).
    subprocess.run([sys.executable, "-m", "venv", "--system-site-packages", str(venv)], check=True, timeout=300)
    py, bindir = venv / "bin" / "python", venv / "bin"
    env = _clean_env(PATH=f"{bindir}{os.pathsep}{os.environ['PATH']}", VIRTUAL_ENV=str(venv))
    inst = subprocess.run([str(py), "-m", "pip", "install", "-q", "--no-deps", "--force-reinstall", str(wheel)],
                          capture_output=True, text=True, timeout=600, env=env)
    assert inst.returncode == 0, inst.stderr[-3000:]
    proj = tmp_path / "survey_project"
    run = subprocess.run([str(bindir / "cinderclock"), "init", str(proj)], capture_output=True, text=True,
                         timeout=120, env=env, cwd=tmp_path)
    assert run.returncode == 0, run.stderr
    where = subprocess.run([str(py), "-c", "import cinderclock, cinderclock.resources as r; "
                            "print(cinderclock.__file__); print(r.locate('snakefile'))"],
                           capture_output=True, text=True, timeout=120, env=env, cwd=proj)
    site = venv / "lib" / f"python{sys.version_info[0]}.{sys.version_info[1]}" / "site-packages"
    for line in where.stdout.split():
        assert Path(line).is_relative_to(site), where.stdout

    # a copy of the invented sample under column names of our own (header renamed, rows as they are)
    lines = (ROOT / "sample_catalog/lanternfall_dr1.csv").read_text().splitlines(keepends=True)
    header = lines[0].strip().split(",")
    assert set(header) == set(RENAMED) and not set(header) & set(RENAMED.values())
    (proj / "data").mkdir()
    (proj / "data/survey.csv").write_text(",".join(RENAMED[h] for h in header) + "\n" + "".join(lines[1:]))

    # fill in the starter configuration's FILL IN keys; spectroscopic columns stay out (null)
    cfg = yaml.safe_load((proj / "config/config.yaml").read_text())
    cfg["catalogue"]["path"] = "data/survey.csv"
    cfg["catalogue"]["columns"].update(star_id="designation", ra="alpha", dec="delta", parallax="varpi",
                                       parallax_error="varpi_unc", pmra="mu_alpha", pmdec="mu_delta")
    assert cfg["catalogue"]["columns"]["teff_spec"] is None
    cfg["catalogue"]["units"] = {"parallax": "mas", "parallax_error": "mas"}
    cfg["bands"] = {"w": {"passband": "gaiadr3-G", "system": "vega", "mag": "wide", "error": "wide_unc"},
                    "b": {"passband": "gaiadr3-BP", "system": "vega", "mag": "blue", "error": "blue_unc"},
                    "r": {"passband": "gaiadr3-RP", "system": "vega", "mag": "red", "error": "red_unc"}}
    sample = yaml.safe_load((ROOT / "config/config.yaml").read_text())
    cfg["select"]["wd_region"] = {"colour": ["b", "r"], "magnitude": "w",
                                  "vertices": sample["select"]["wd_region"]["vertices"]}
    # the invented survey's limits (sample_catalog/README.md: G < 20.5, within 250 pc)
    cfg["population"]["survey"].update(band="w", faint_mag_limit=20.5, max_distance_pc=250.0)
    (proj / "config/config.yaml").write_text(yaml.safe_dump(cfg, sort_keys=False))

    smk = subprocess.run([str(py), "-m", "snakemake", "--cores", "2"], cwd=proj, capture_output=True, text=True,
                         timeout=1200, env=env)
    assert smk.returncode == 0, smk.stderr[-4000:]
    from cinderclock.tableio import read_table

    table, _, meta = read_table(proj / "results/final/white_dwarfs.parquet")
    rejects, _, _ = read_table(proj / "results/final/rejects.parquet")
    assert len(table) + len(rejects) == len(lines) - 1                       # every input row accounted for
    assert {"mag_w", "mag_b", "mag_r", "mass_msun", "total_age_gyr", "cool_age_gyr_p50"} <= set(table.columns)
    assert table["cool_age_gyr"].notna().sum() > 100
    # nothing of the sample's configuration: its band keys, kept column and spectroscopic mapping
    assert not {"mag_G", "mag_BP", "mag_RP", "ruwe_lf", "teff_spec_k", "logg_spec"} & set(table.columns)
    assert meta["provenance"]["catalogue"].endswith("data/survey.csv")
    assert (proj / "results/population/age_fit.json").exists()
    assert (proj / "results/report/run_summary.html").exists()
