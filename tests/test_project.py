"""A project folder of one's own and a configuration that stands alone (internal behaviour checks).

The expected values come from the schema file itself (read here with yaml, independently of the
code under test) and from the invented sample's header line; nothing is a stored output of ours.
"""

import copy
import os
import subprocess
import sys

import pandas as pd
import pytest
import yaml

from cinderclock import cli, resources
from cinderclock.config import check_config, validate
from cinderclock.errors import ConfigError, InputError
from cinderclock.project import defaults_listing, init_project, starter_config

ROOT = resources.Path(__file__).resolve().parents[1]
SCHEMA = yaml.safe_load((ROOT / "workflow/schemas/config.schema.yaml").read_text())


def _schema_defaults(node, path=()):
    """(key path, default) of every key of the schema with a default, sections by their keys."""
    for name, sub in node.get("properties", {}).items():
        if "properties" in sub and sub.get("default", {}) is not None:
            yield from _schema_defaults(sub, path + (name,))
        elif "default" in sub:
            yield path + (name,), sub["default"]


def _get(mapping, path):
    for key in path:
        mapping = mapping[key]
    return mapping


def test_defaults_listing_holds_every_schema_default():
    """Uncommented, the listing is YAML holding every default of the schema (new keys included)."""
    listed = yaml.safe_load("\n".join(defaults_listing()))
    defaults = list(_schema_defaults(SCHEMA))
    assert len(defaults) > 90                       # the walk reached the nested sections
    for path, default in defaults:
        assert _get(listed, path) == default, ".".join(path)


def test_starter_config_is_complete_with_the_fill_ins_and_nothing_of_the_sample(tmp_path):
    written = init_project(tmp_path / "proj")
    names = sorted(str(p.relative_to(tmp_path / "proj")) for p in written)
    assert names == [".gitignore", "Snakefile", "config/config.yaml"]
    text = (tmp_path / "proj/config/config.yaml").read_text()
    assert text == starter_config()
    sample_header = (ROOT / "sample_catalog/lanternfall_dr1.csv").open().readline().strip().split(",")
    active = yaml.safe_load(text)                    # the keys actually set (comments dropped)
    assert not set(sample_header) & set(yaml.safe_dump(active).replace(":", " ").split())
    with pytest.raises(ConfigError, match=r"^config key 'catalogue.path' is not set \(null\); fill it in"):
        validate(copy.deepcopy(active))
    active["catalogue"]["path"] = "cat.csv"
    active["catalogue"]["columns"].update(star_id="id", parallax="p", parallax_error="pe")
    active["bands"]["BAND1"].update(passband="gaiadr3-G", system="vega", mag="m", error="me")
    active["population"]["survey"].update(band="BAND1", faint_mag_limit=19.0)
    cfg = validate(active)
    check_config(cfg)
    assert set(cfg["catalogue"]["columns"]) == {"star_id", "parallax", "parallax_error"}   # nulls dropped
    assert cfg["select"]["max_distance_pc"] is None and cfg["population"]["survey"]["max_distance_pc"] is None
    assert cfg["uncertainty"]["draws"] == SCHEMA["properties"]["uncertainty"]["properties"]["draws"]["default"]


def test_init_never_overwrites_and_copies_the_sample(tmp_path):
    proj = tmp_path / "proj"
    init_project(proj, with_sample=True)
    assert "config/sample.yaml" in (proj / "Snakefile").read_text()
    assert (proj / "sample_catalog/lanternfall_dr1.csv").read_bytes() == \
        (ROOT / "sample_catalog/lanternfall_dr1.csv").read_bytes()
    sample = yaml.safe_load((proj / "config/sample.yaml").read_text())
    assert sample == yaml.safe_load((ROOT / "config/config.yaml").read_text())
    (proj / "config/config.yaml").write_text("# mine\n")
    with pytest.raises(InputError, match="never overwrites"):
        init_project(proj)
    assert (proj / "config/config.yaml").read_text() == "# mine\n"


@pytest.mark.parametrize("edit,first", [
    (lambda c: c["catalogue"].__setitem__("colums", c["catalogue"].pop("columns")),
     "config key 'catalogue.colums' is not allowed (did you mean 'columns'?)"),
    (lambda c: c.__setitem__("catalouge", c.pop("catalogue")),
     "config key 'catalouge' is not allowed (did you mean 'catalogue'?)"),
    (lambda c: c["bands"]["G"].__setitem__("pasband", c["bands"]["G"].pop("passband")),
     "config key 'bands.G.pasband' is not allowed (did you mean 'passband'?)"),
])
def test_a_misspelt_required_key_is_reported_first_with_its_closest_name(config, edit, first):
    edit(config)
    with pytest.raises(ConfigError) as err:
        validate(config)
    assert str(err.value).startswith(first) and "required property" not in str(err.value)


def test_null_optional_columns_are_accepted_and_required_ones_are_not(config):
    cfg = copy.deepcopy(config)
    cfg["catalogue"]["columns"].update(teff_spec=None, teff_spec_error=None, logg_spec=None, pmra=None)
    validate(cfg)
    assert not {"teff_spec", "teff_spec_error", "logg_spec", "pmra"} & set(cfg["catalogue"]["columns"])
    config["catalogue"]["columns"]["parallax"] = None
    with pytest.raises(ConfigError, match="'catalogue.columns.parallax' is not set"):
        validate(config)


def test_the_survey_magnitude_limit_has_no_default(config, capsys):
    del config["population"]["survey"]["faint_mag_limit"]
    with pytest.raises(SystemExit):
        check_config(config)
    assert "'population.survey.faint_mag_limit' is not set" in capsys.readouterr().err


def test_a_missing_resource_is_one_line_naming_where_it_looked(tmp_path, monkeypatch, capsys):
    monkeypatch.setattr(resources, "candidates", lambda: [tmp_path / "a", tmp_path / "b"])
    with pytest.raises(resources.ResourceError) as err:
        resources.locate("schema")
    msg = str(err.value)
    assert "schema" in msg and str(tmp_path / "a/workflow/schemas") in msg and str(tmp_path / "b") in msg
    assert cli.main(["defaults"]) == 1
    out = capsys.readouterr().err
    assert out.count("\n") == 1 and out.startswith("cinderclock defaults: error: cannot find the workflow's schema")
    with pytest.raises(SystemExit):
        resources.workflow_snakefile()
    assert capsys.readouterr().err.startswith("cinderclock: error: cannot find the workflow's snakefile")


def test_an_own_configfile_does_not_inherit_the_sample(tmp_path):
    """`snakemake --configfile mine.yaml` next to the sample's config/config.yaml: nothing merges in.

    The catalogue has neither the sample's column names nor spectroscopic columns; inheriting the
    sample's mapping would make the ingest stop on the missing column 'teff_sp'.
    """
    (tmp_path / "config").mkdir()
    (tmp_path / "config/config.yaml").write_text((ROOT / "config/config.yaml").read_text())
    sample = pd.read_csv(ROOT / "sample_catalog/lanternfall_dr1.csv", nrows=40, dtype=str)
    cat = sample[["lf_source", "plx", "plx_e", "g_mag", "g_mag_e"]].rename(
        columns={"lf_source": "ident", "plx": "px", "plx_e": "px_unc", "g_mag": "w", "g_mag_e": "w_unc"})
    cat.to_csv(tmp_path / "mine.csv", index=False)
    mine = {"catalogue": {"path": "mine.csv", "columns": {"star_id": "ident", "parallax": "px",
                                                          "parallax_error": "px_unc", "teff_spec": None}},
            "bands": {"wide": {"passband": "gaiadr3-G", "system": "vega", "mag": "w", "error": "w_unc"}},
            "population": {"survey": {"band": "wide", "faint_mag_limit": 20.0}}}
    (tmp_path / "mine.yaml").write_text(yaml.safe_dump(mine))
    env = dict(os.environ, OMP_NUM_THREADS="1")
    out = subprocess.run([sys.executable, "-m", "snakemake", "-s", str(ROOT / "Snakefile"), "-d", str(tmp_path),
                          "--configfile", str(tmp_path / "mine.yaml"), "--cores", "1", "results/ingest/manifest.json"],
                         capture_output=True, text=True, timeout=300, env=env)
    assert out.returncode == 0, out.stderr[-3000:]
    shards = sorted((tmp_path / "results/ingest/shards").glob("*.parquet"))
    table = pd.concat([pd.read_parquet(p) for p in shards])
    assert 0 < len(table) <= 40 and set(table["star_id"].astype(str)) <= set(sample["lf_source"])
    assert "mag_wide" in table and "mag_G" not in table
    # the sample maps positions and spectroscopic Teff; mine does not, so neither may appear
    assert not {"ra_deg", "teff_spec_k", "logg_spec", "mag_BP"} & set(table.columns)
