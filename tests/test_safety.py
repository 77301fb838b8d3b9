"""Safety: no code is evaluated from configuration or data, YAML is read safely, no pickle, and
every output stays below the configured results folder.

The source guard parses every Python file of the package, the rule scripts and the sample
generator (ast), and scans the Snakefile and rule files as text. It is checked against a snippet
holding each forbidden construct, so it cannot pass vacuously.
"""

from __future__ import annotations

import ast
import os
import re
import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest
import yaml

from cinderclock.config import check_references, check_results_dir, load_config
from cinderclock.errors import ConfigError

ROOT = Path(__file__).resolve().parents[1]
PYTHON_FILES = sorted([*(ROOT / "workflow" / "cinderclock").rglob("*.py"),
                       *(ROOT / "workflow" / "scripts").glob("*.py"),
                       *(ROOT / "sample_catalog").glob("*.py"), *(ROOT / "benchmarks").glob("*.py")])
RULE_FILES = sorted([ROOT / "Snakefile", *(ROOT / "workflow" / "rules").glob("*.smk")])

FORBIDDEN_CALLS = {"eval", "exec", "compile", "__import__"}
FORBIDDEN_MODULES = {"pickle", "cPickle", "_pickle", "dill", "shelve", "marshal", "cloudpickle", "joblib"}
FORBIDDEN_ATTRS = {"read_pickle", "to_pickle", "unsafe_load", "full_load", "load_all", "unsafe_load_all",
                   "UnsafeLoader", "FullLoader", "Loader", "system", "popen"}


def violations(source, name="<snippet>"):
    """Forbidden constructs in Python source: (line, what)."""
    found = []
    for node in ast.walk(ast.parse(source, name)):
        if isinstance(node, ast.Call):
            f = node.func
            if isinstance(f, ast.Name) and f.id in FORBIDDEN_CALLS:
                found.append((node.lineno, f"{f.id}()"))
            if isinstance(f, ast.Attribute) and f.attr == "load" and isinstance(f.value, ast.Name) \
                    and f.value.id == "yaml":
                found.append((node.lineno, "yaml.load() (use yaml.safe_load)"))
            for kw in node.keywords:
                if kw.arg == "allow_pickle" and not (isinstance(kw.value, ast.Constant) and kw.value.value is False):
                    found.append((node.lineno, "allow_pickle"))
                if kw.arg == "shell" and not (isinstance(kw.value, ast.Constant) and kw.value.value is False):
                    found.append((node.lineno, "shell=True"))
        elif isinstance(node, ast.Attribute) and node.attr in FORBIDDEN_ATTRS:
            if node.attr not in ("system", "popen") or (isinstance(node.value, ast.Name) and node.value.id == "os"):
                found.append((node.lineno, f".{node.attr}"))
        elif isinstance(node, ast.Import):
            found += [(node.lineno, f"import {a.name}") for a in node.names
                      if a.name.split(".")[0] in FORBIDDEN_MODULES]
        elif isinstance(node, ast.ImportFrom) and (node.module or "").split(".")[0] in FORBIDDEN_MODULES:
            found.append((node.lineno, f"from {node.module} import"))
    return found


_RULE_TEXT = re.compile(r"\b(eval|exec|compile|__import__)\s*\(|\bpickle\b|yaml\.(load|unsafe_load|full_load)\s*\(")


def test_the_guard_finds_every_forbidden_construct():
    snippet = "\n".join([
        "eval('1')", "exec('x = 1')", "compile('1', 'f', 'eval')", "__import__('os')",
        "import pickle", "from shelve import open", "import dill.settings",
        "yaml.load(text)", "yaml.load(text, Loader=yaml.FullLoader)", "yaml.unsafe_load(t)", "yaml.full_load(t)",
        "pd.read_pickle('f')", "df.to_pickle('f')", "np.load('f', allow_pickle=True)",
        "os.system('ls')", "subprocess.run('ls', shell=True)",
    ])
    found = violations(snippet)
    assert {line for line, _ in found} == set(range(1, 17)), found
    assert violations("yaml.safe_load(t)\nre.compile('x')\nnp.load('f')\nsubprocess.run(['ls'])\n") == []
    assert _RULE_TEXT.search("x = eval(config['a'])") and not _RULE_TEXT.search("yaml.safe_load(fh)")


@pytest.mark.parametrize("path", PYTHON_FILES, ids=lambda p: str(p.relative_to(ROOT)))
def test_no_eval_exec_pickle_or_unsafe_yaml_in_python(path):
    assert violations(path.read_text(), str(path)) == []


@pytest.mark.parametrize("path", RULE_FILES, ids=lambda p: str(p.relative_to(ROOT)))
def test_no_eval_exec_pickle_or_unsafe_yaml_in_rules(path):
    text = "\n".join(ln.split("#")[0] for ln in path.read_text().splitlines())
    assert not _RULE_TEXT.search(text)


def test_yaml_tags_that_would_run_code_are_refused(tmp_path):
    marker = tmp_path / "ran"
    cfg = tmp_path / "config.yaml"
    cfg.write_text(f"results_dir: !!python/object/apply:os.system ['touch {marker}']\n")
    with pytest.raises(ConfigError, match="not valid YAML"):
        load_config(cfg)
    assert not marker.exists()


def test_config_and_data_strings_are_names_never_code(tmp_path, config):
    marker = tmp_path / "ran"
    payload = f"__import__('os').system('touch {marker}')"
    # a selection cut naming a "column" that is really code: refused as an unknown column
    config["select"]["quality_cuts"].append({"column": payload, "max": 1.0})
    with pytest.raises(ConfigError, match="is not available"):
        check_references(config)
    # the same text inside the catalogue: a value that is not a number, rejected with its reason
    from cinderclock.config import stage_settings
    from cinderclock.stages.ingest import load_and_ingest

    config["select"]["quality_cuts"].pop()
    df = __import__("pandas").DataFrame({
        "lf_source": [1, 2, 3], "ra_icrs": [1.0, 2.0, 3.0], "dec_icrs": [0.0, 0.0, 0.0],
        "plx": ["10.0", payload, "9.0"], "plx_e": [0.1, 0.1, 0.1], "pm_ra": [0.0] * 3, "pm_dec": [0.0] * 3,
        "g_mag": [15.0] * 3, "g_mag_e": [0.01] * 3, "bp_mag": [15.1] * 3, "bp_mag_e": [0.02] * 3,
        "rp_mag": [14.9] * 3, "rp_mag_e": [0.02] * 3, "teff_sp": [np.nan] * 3, "teff_sp_e": [np.nan] * 3,
        "logg_sp": [np.nan] * 3, "logg_sp_e": [np.nan] * 3, "ruwe_lf": [1.0] * 3})
    df.to_csv(tmp_path / "cat.csv", index=False)
    config["catalogue"]["path"] = str(tmp_path / "cat.csv")
    table, rejects, _ = load_and_ingest(stage_settings(config, "ingest"))
    assert rejects["reason"].tolist() == ["not_a_number"] and len(table) == 2
    assert not marker.exists()


# ----------------------------------------------------------------------------- results folder


@pytest.mark.parametrize("path", ["/tmp/out", "../elsewhere", "results/../../x", "a/../..", ".", "", "/"])
def test_results_dir_escaping_is_refused(path):
    with pytest.raises(ConfigError) as err:
        check_results_dir({"results_dir": path})
    assert "results_dir" in str(err.value) and "\n" not in str(err.value)


@pytest.mark.parametrize("path", ["results", "runs/dr1", "results_v2"])
def test_results_dir_below_the_working_directory_is_accepted(path):
    check_results_dir({"results_dir": path})


def test_every_rule_output_and_log_is_below_the_results_folder():
    # Each rule's output:/log: entries must be f-strings rooted at {R} (the configured results_dir).
    entries = []
    for path in RULE_FILES:
        section = None
        for line in path.read_text().splitlines():
            stripped = line.strip()
            if re.match(r"^(input|output|log|params|threads|script|shell|run|benchmark|message|resources):", stripped):
                section = stripped.split(":")[0]
                rest = stripped.split(":", 1)[1].strip()
                if section in ("output", "log") and rest:
                    entries.append((path.name, rest))
                continue
            if re.match(r"^(rule|checkpoint)\s", stripped):
                section = None
            elif section in ("output", "log") and stripped and not stripped.startswith("#"):
                entries.append((path.name, stripped))
    assert len(entries) >= 10
    for name, entry in entries:
        value = entry.split("=", 1)[1] if re.match(r"^\w+=", entry) else entry
        value = value.removeprefix("report(")          # outputs shown in the HTML report
        assert value.startswith('f"{R}/'), (name, entry)


def test_the_workflow_refuses_a_results_dir_outside(tmp_path):
    cfg = yaml.safe_load((ROOT / "config" / "config.yaml").read_text())
    cfg["results_dir"] = "../outside"
    (tmp_path / "config").mkdir()
    (tmp_path / "config" / "config.yaml").write_text(yaml.safe_dump(cfg))
    env = dict(os.environ, PYTHONPATH=os.pathsep.join([str(ROOT / "workflow"), os.environ.get("PYTHONPATH", "")]))
    out = subprocess.run([sys.executable, "-m", "snakemake", "-s", str(ROOT / "Snakefile"), "-d", str(tmp_path), "-n"],
                         capture_output=True, text=True, timeout=300, env=env)
    assert out.returncode != 0
    assert "configuration error: config key 'results_dir': '../outside' must be a relative folder" in out.stderr
    assert "Traceback" not in out.stderr
    assert not (tmp_path.parent / "outside").exists()
