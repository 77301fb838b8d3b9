"""Configuration: schema validation names the key and the allowed keys or values; defaults fill in."""

import copy
import subprocess
import sys

import pytest

from cinderclock.config import check_results_dir, validate
from cinderclock.errors import ConfigError


def test_typo_names_the_key_and_the_allowed_keys(config):
    cfg = copy.deepcopy(config)
    cfg["select"]["min_parallax_over_eror"] = 5
    with pytest.raises(ConfigError) as err:
        validate(cfg)
    msg = str(err.value)
    assert "select.min_parallax_over_eror" in msg and "min_parallax_over_error" in msg


def test_bad_choice_lists_the_allowed_values(config):
    cfg = copy.deepcopy(config)
    cfg["cooling"]["model"] = "mestle"
    with pytest.raises(ConfigError, match=r"cooling.model.*'mestle'.*'mestel'"):
        validate(cfg)


def test_defaults_are_filled(config):
    cfg = {"catalogue": {"path": "x.csv", "columns": {"star_id": "a", "parallax": "b", "parallax_error": "c"}},
           "bands": {"G": {"passband": "gaiadr3-G", "system": "vega", "mag": "g", "error": "ge"}}}
    validate(cfg)
    assert cfg["results_dir"] == "results"
    assert cfg["select"]["min_parallax_over_error"] == 5.0
    assert cfg["cooling"]["model"] == "numerical"
    assert cfg["luminosity"]["distance"]["min_parallax_over_error_inverse"] == 10.0


@pytest.mark.parametrize("path", ["/tmp/out", "../elsewhere", "results/../../x", "."])
def test_results_dir_stays_below_the_working_directory(path):
    with pytest.raises(ConfigError, match="results_dir"):
        check_results_dir({"results_dir": path})


def test_snakemake_reports_a_config_typo_in_one_line(tmp_path, root):
    import yaml

    cfg = yaml.safe_load((root / "config" / "config.yaml").read_text())
    cfg["mass"]["relaton"] = "nauenberg1972"
    (tmp_path / "config").mkdir()
    (tmp_path / "config" / "config.yaml").write_text(yaml.safe_dump(cfg))
    out = subprocess.run([sys.executable, "-m", "snakemake", "-s", str(root / "Snakefile"), "-d", str(tmp_path), "-n"],
                         capture_output=True, text=True, timeout=300)
    assert out.returncode != 0
    assert "configuration error: config key 'mass.relaton' is not allowed" in out.stderr
    assert "Traceback" not in out.stderr
