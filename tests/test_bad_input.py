"""Bad input: every fault ends as one clear line (file, row, column) or as a reason-coded reject.

Each case of the project's bad-input list has a test here:

* file-level faults (missing column, text column, empty or header-only file, truncated Parquet,
  corrupt FITS, a mapping to a missing column, parallaxes in arcsec) raise ``InputError`` whose
  text is ONE line naming the file and, where it applies, the row and column;
* configuration faults (unknown passband, typo, band or column names used across sections) raise
  ``ConfigError`` naming the key and what is allowed;
* row-level faults (text in a numeric field, NaN/inf, zero or negative parallax, duplicated
  identifiers, sentinel magnitudes, Teff or log g outside every model) become rejects with a reason
  code or a flag, and no row is ever lost (rows in = accepted + rejected);
* the workflow reports a bad catalogue in one line, without a Python traceback.
"""

from __future__ import annotations

import copy
import os
import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest
import yaml

from cinderclock.catalogue import read_catalogue
from cinderclock.config import check_config, check_references, stage_settings, validate
from cinderclock.errors import ConfigError, InputError
from cinderclock.reasons import bit
from cinderclock.stages.ingest import load_and_ingest, wanted_columns
from cinderclock.stages.select import select
from helpers import frame, ingest_file

ROOT = Path(__file__).resolve().parents[1]


def one_line(exc, *needles):
    """The error text is a single line and contains every needle."""
    text = str(exc)
    assert "\n" not in text, text
    for needle in needles:
        assert needle in text, (needle, text)
    return text


def conserved(table, rejects, n):
    """No silent drop: every input row is either accepted or rejected, exactly once."""
    rows = list(table["input_row"]) + list(rejects["input_row"])
    assert sorted(rows) == list(range(n))


# ----------------------------------------------------------------------------- missing columns


def test_missing_required_column_names_file_and_column(tmp_path, config):
    with pytest.raises(InputError) as err:
        ingest_file(tmp_path, frame().drop(columns=["plx_e"]), config)
    one_line(err.value, str(tmp_path / "cat.csv"), "'plx_e'", "it has: lf_source")


def test_required_quantity_left_out_of_the_mapping_is_a_config_error(config):
    cfg = copy.deepcopy(config)
    del cfg["catalogue"]["columns"]["parallax_error"]
    with pytest.raises(ConfigError) as err:
        validate(cfg)
    one_line(err.value, "catalogue.columns", "parallax_error")


@pytest.mark.parametrize("edit,name", [
    (lambda c: c["catalogue"]["columns"].__setitem__("pmra", "pm_ra_typo"), "pm_ra_typo"),
    (lambda c: c["bands"]["G"].__setitem__("mag", "gmag"), "gmag"),
    (lambda c: c["catalogue"].__setitem__("keep_columns", ["ruwe"]), "ruwe"),
])
@pytest.mark.parametrize("fmt", ["csv", "parquet", "fits"])
def test_mapping_to_a_missing_column_names_it(tmp_path, config, edit, name, fmt):
    from astropy.table import Table

    path = tmp_path / f"cat.{fmt}"
    df = frame()
    if fmt == "csv":
        df.to_csv(path, index=False)
    elif fmt == "parquet":
        df.to_parquet(path, index=False)
    else:
        Table.from_pandas(df).write(path)
    edit(config)
    config["catalogue"]["path"] = str(path)
    with pytest.raises(InputError) as err:
        load_and_ingest(stage_settings(config, "ingest"))
    one_line(err.value, str(path), f"'{name}'", "named in the configuration")


# ----------------------------------------------------------------------------- text in numbers


def test_text_in_a_numeric_field_is_a_reject_naming_column_and_value(tmp_path, config):
    df = frame(5).astype({"plx": object})
    df.loc[2, "plx"] = "pending"
    table, rejects, _ = ingest_file(tmp_path, df, config)
    conserved(table, rejects, 5)
    r = rejects.set_index("input_row").loc[2]
    assert r["reason"] == "not_a_number" and "'plx'" in r["detail"] and "'pending'" in r["detail"]


def test_a_column_of_text_is_a_mapping_error_at_its_first_text_row(tmp_path, config):
    df = frame(6).astype({"ra_icrs": object})
    df["ra_icrs"] = ["1.0", "2.0", "J0012+34", "J0013+35", "J0014+36", "J0015+37"]
    with pytest.raises(InputError) as err:
        ingest_file(tmp_path, df, config)
    one_line(err.value, str(tmp_path / "cat.csv"), "row 2", "column 'ra_icrs'", "'J0012+34'", "expected numbers")


# ----------------------------------------------------------------------------- NaN and inf


def test_nan_and_inf_in_required_values_are_rejected(tmp_path, config):
    # written as text so the CSV reader sees the spellings a catalogue uses
    text = frame(7).to_csv(index=False).splitlines()
    header = text[0].split(",")
    rows = [line.split(",") for line in text[1:]]
    plx, plx_e = header.index("plx"), header.index("plx_e")
    rows[1][plx] = "nan"
    rows[2][plx] = "inf"
    rows[3][plx] = "-inf"
    rows[4][plx_e] = "NaN"
    rows[5][plx_e] = "inf"
    body = "\n".join([text[0]] + [",".join(r) for r in rows]) + "\n"
    table, rejects, _ = ingest_file(tmp_path, None, config, text=body)
    conserved(table, rejects, 7)
    got = dict(zip(rejects["input_row"], rejects["reason"]))
    assert got == {1: "nonfinite_required", 2: "nonfinite_required", 3: "nonfinite_required",
                   4: "nonfinite_required", 5: "nonfinite_required"}
    assert rejects.set_index("input_row").loc[4, "detail"].startswith("column 'plx_e'")


def test_nan_and_inf_in_optional_values(tmp_path, config, caplog):
    df = frame(6)
    df.loc[0, "g_mag"] = np.inf                      # one band unusable: flagged, row kept
    df.loc[1, ["g_mag", "bp_mag", "rp_mag"]] = np.nan   # no band at all: rejected
    df.loc[2, "teff_sp"] = np.inf                    # implausible spectroscopy: ignored, flagged
    df.loc[3, "pm_ra"] = -np.inf                     # other optional quantity: not measured
    df.to_parquet(tmp_path / "cat.parquet", index=False)
    with caplog.at_level("WARNING", logger="cinderclock"):
        table, rejects, _ = ingest_file(tmp_path, df, config, name="cat.parquet")
    conserved(table, rejects, 6)
    assert rejects["reason"].tolist() == ["no_photometry"] and rejects["input_row"].tolist() == [1]
    t = table.set_index("input_row")
    assert np.isnan(t.loc[0, "mag_G"]) and t.loc[0, "quality_bits"] & bit("band_missing")
    assert np.isnan(t.loc[2, "teff_spec_k"]) and t.loc[2, "quality_bits"] & bit("spec_out_of_range")
    assert np.isnan(t.loc[2, "teff_spec_err_k"])     # its uncertainty goes with it
    assert np.isnan(t.loc[3, "pmra_mas_yr"])
    assert not any(np.isinf(t[c]).any() for c in t.columns if t[c].dtype.kind == "f")   # no inf reaches the output
    assert any("'pm_ra'" in r.getMessage() and "infinite" in r.getMessage() for r in caplog.records)


# ----------------------------------------------------------------------------- parallaxes


def test_zero_and_negative_parallaxes_fail_the_signal_to_noise_cut(tmp_path, config):
    # Kept by ingest (a negative parallax is a legitimate measurement), rejected by the selection.
    df = frame(4)
    df.loc[1, "plx"] = 0.0
    df.loc[2, "plx"] = -0.8
    table, rejects, _ = ingest_file(tmp_path, df, config)
    assert len(rejects) == 0 and len(table) == 4
    kept, sel_rejects = select(table, stage_settings(config, "select"))
    conserved(kept, sel_rejects, 4)
    r = sel_rejects.set_index("input_row")
    assert r.loc[1, "reason"] == "parallax_snr" and r.loc[2, "reason"] == "parallax_snr"
    assert "= -8.00 <" in r.loc[2, "detail"]


def _arcsec_frame(n=200, seed=3):
    """Parallaxes of stars at 20-200 pc with Gaia-like uncertainties, written in arcsec.

    Uncertainties 0.02-1.3 mas span Gaia EDR3 from its bright end to G = 21 (Lindegren et al. 2021,
    A&A 649, A2; values from memory, used only as a plausible spread).
    """
    rng = np.random.default_rng(seed)
    df = frame(n)
    err_mas = rng.uniform(0.02, 1.3, n)
    df["plx"] = (1000.0 / rng.uniform(20, 200, n)) / 1000.0
    df["plx_e"] = err_mas / 1000.0
    return df


def test_parallaxes_in_arcsec_without_a_unit_are_a_clear_error(tmp_path, config):
    with pytest.raises(InputError) as err:
        ingest_file(tmp_path, _arcsec_frame(), config)       # config says mas
    one_line(err.value, str(tmp_path / "cat.csv"), "column 'plx_e'", "look like arcsec",
             "'mas' from catalogue.units", "catalogue.units.parallax")
    del config["catalogue"]["units"]["parallax_error"]
    with pytest.raises(InputError) as err:
        ingest_file(tmp_path, _arcsec_frame(), config)
    one_line(err.value, "not given, so mas was assumed")


def test_parallaxes_in_arcsec_with_the_unit_configured_are_converted(tmp_path, config):
    config["catalogue"]["units"] = {"parallax": "arcsec", "parallax_error": "arcsec"}
    df = _arcsec_frame()
    table, rejects, _ = ingest_file(tmp_path, df, config)
    assert len(rejects) == 0
    # 1 arcsec = 1000 mas (IAU/SI definition of the milliarcsecond)
    assert np.allclose(table["plx_mas"], df["plx"] * 1000.0, rtol=1e-12)


def test_an_unknown_unit_in_the_configuration_names_column_and_unit(tmp_path, config):
    config["catalogue"]["units"]["parallax"] = "milliarcsecs"
    with pytest.raises(InputError) as err:
        ingest_file(tmp_path, frame(), config)
    one_line(err.value, str(tmp_path / "cat.csv"), "column 'plx'", "unknown unit 'milliarcsecs'")


def test_file_declaring_mas_for_arcsec_values_is_caught(tmp_path, config):
    from astropy import units as u
    from astropy.table import Table

    t = Table.from_pandas(_arcsec_frame())
    t["plx"].unit = u.mas
    t["plx_e"].unit = u.mas
    t.write(tmp_path / "cat.fits")
    config["catalogue"]["path"] = str(tmp_path / "cat.fits")
    with pytest.raises(InputError) as err:
        load_and_ingest(stage_settings(config, "ingest"))
    one_line(err.value, "declared by the file as 'mas'")


def test_a_distant_sample_in_mas_is_not_mistaken_for_arcsec(tmp_path, config):
    # Halo-distance stars (10-50 kpc): every parallax below 0.1 mas, but uncertainties of
    # 0.02-1.3 mas as a real survey has them (Gaia EDR3, from memory) - legitimate, must pass.
    rng = np.random.default_rng(4)
    df = frame(200)
    df["plx"] = 1000.0 / rng.uniform(10000, 50000, 200) + rng.normal(0, 0.01, 200)
    df["plx_e"] = rng.uniform(0.02, 1.3, 200)
    table, rejects, _ = ingest_file(tmp_path, df, config)
    assert len(table) == 200 and len(rejects) == 0
    assert (table["plx_mas"] < 0.1).all()


# ----------------------------------------------------------------------------- identifiers, sentinels


@pytest.mark.parametrize("ids", [[7, 8, 7, 9, 8], ["LF-a", "LF-b", "LF-a", "LF-c", "LF-b"]])
def test_duplicated_identifiers_keep_the_first_and_reject_the_rest(tmp_path, config, ids):
    df = frame(5)
    df["lf_source"] = ids
    table, rejects, _ = ingest_file(tmp_path, df, config)
    conserved(table, rejects, 5)
    assert table["input_row"].tolist() == [0, 1, 3]
    assert rejects["reason"].tolist() == ["duplicate_id"] * 2 and rejects["input_row"].tolist() == [2, 4]
    assert f"{ids[0]!r}" in rejects["detail"].iloc[0] or f"'{ids[0]}'" in rejects["detail"].iloc[0]


def test_sentinel_magnitudes_mean_missing_bands(tmp_path, config):
    # 99, -99, 99.99 (and their use in the error column) are common-practice "not measured" values.
    df = frame(6)
    df.loc[0, "g_mag"] = 99.0
    df.loc[1, "bp_mag"] = -99.0
    df.loc[2, "rp_mag"] = 99.99
    df.loc[3, "g_mag_e"] = 99.0
    df.loc[4, "g_mag"] = 50.0                       # not in the list, but no star is that faint
    df.loc[5, ["g_mag", "bp_mag", "rp_mag"]] = -99.0    # nothing left: rejected
    table, rejects, _ = ingest_file(tmp_path, df, config)
    conserved(table, rejects, 6)
    assert rejects["reason"].tolist() == ["no_photometry"] and rejects["input_row"].tolist() == [5]
    t = table.set_index("input_row")
    for row, col in ((0, "mag_G"), (1, "mag_BP"), (2, "mag_RP"), (3, "mag_G"), (4, "mag_G")):
        assert np.isnan(t.loc[row, col]) and t.loc[row, "quality_bits"] & bit("band_missing"), (row, col)
    assert t.loc[0, "mag_BP"] == pytest.approx(15.1)        # the other bands are untouched


# ----------------------------------------------------------------------------- outside every model


@pytest.fixture(scope="module")
def chain_setup():
    from cinderclock.api import ModelSet, run_chain
    from cinderclock.config import load_config
    from cinderclock.simulate import make_catalogue

    config = load_config(ROOT / "config" / "config.yaml")
    models = ModelSet.build(config)
    cat, _ = make_catalogue(400, seed=7, malformed=False)
    base = run_chain(cat, config, models)
    return config, models, cat, base


def test_teff_or_logg_outside_every_model(chain_setup):
    from cinderclock.api import run_chain

    config, models, cat, base = chain_setup
    spec = base.table.loc[base.table["mass_route"] == "logg", "input_row"].to_numpy()
    a, b, c, d = spec[:4]
    cat = cat.copy()
    cat.loc[a, "teff_sp"] = 2000.0        # plausible for a star, below the model photometry (3000 K)
    cat.loc[b, "logg_sp"] = 6.0           # plausible, but below the lightest tabulated white dwarf
    cat.loc[c, "teff_sp"] = 1.0e7         # implausible: ignored, star continues on photometry
    cat.loc[d, "logg_sp"] = 12.0          # implausible: ignored, mass from the photometric radius
    res = run_chain(cat, config, models)
    assert len(res.table) + len(res.rejects) == len(cat)
    r = res.rejects.set_index("input_row")
    assert r.loc[a, "stage"] == "luminosity" and r.loc[a, "reason"] == "temperature_out_of_range"
    t = res.table.set_index("input_row")
    assert np.isnan(t.loc[b, "mass_msun"]) and t.loc[b, "quality_bits"] & bit("mass_off_table")
    assert np.isnan(t.loc[b, "cool_age_gyr"]) and t.loc[b, "quality_bits"] & bit("cooling_off_table")
    assert t.loc[c, "quality_bits"] & bit("spec_out_of_range") and t.loc[c, "teff_source"] == "sed"
    assert t.loc[d, "quality_bits"] & bit("spec_out_of_range") and t.loc[d, "mass_route"] == "radius"
    untouched = np.setdiff1d(base.table["input_row"], [a, b, c, d])
    assert not (t.loc[untouched, "quality_bits"] & bit("mass_off_table")).any()


def test_a_colour_outside_the_model_photometry_is_flagged(chain_setup):
    from cinderclock.api import run_chain

    config, models, cat, base = chain_setup
    config = copy.deepcopy(config)
    config["select"]["wd_region"] = None            # let the star reach the luminosity stage
    phot = base.table.loc[base.table["teff_source"] == "sed", "input_row"].to_numpy()
    row = phot[0]
    cat = cat.copy()
    # BP - RP = -3 is far bluer than the hottest blackbody of the photometry table (a blackbody's
    # BP - RP tends to about -0.5 to -0.6 as T grows; from memory), so no model Teff matches it.
    cat.loc[row, "rp_mag"] = cat.loc[row, "bp_mag"] + 3.0
    # The multi-band fit then runs to the hot end of the grid: the star is kept, its Teff marked as a
    # bound (teff_at_grid_edge) and its chi-square shows the misfit.
    res = run_chain(cat, config, models)
    assert len(res.table) + len(res.rejects) == len(cat)
    t = res.table.set_index("input_row")
    assert t.loc[row, "quality_bits"] & bit("teff_at_grid_edge")
    assert t.loc[row, "sed_chi2"] > 100


# ----------------------------------------------------------------------------- unreadable files


@pytest.mark.parametrize("text,needle", [
    ("", "empty (zero bytes)"),
    ("\n\n", "empty"),
    (",".join(frame().columns) + "\n", "header but no data rows"),
])
def test_empty_and_header_only_files(tmp_path, config, text, needle):
    with pytest.raises(InputError) as err:
        ingest_file(tmp_path, None, config, text=text)
    one_line(err.value, str(tmp_path / "cat.csv"), needle)


def test_parquet_without_rows(tmp_path, config):
    with pytest.raises(InputError) as err:
        ingest_file(tmp_path, frame(0), config, name="cat.parquet")
    one_line(err.value, "no data rows")


def _damaged(tmp_path, fmt, how):
    from astropy.table import Table

    path = tmp_path / f"cat.{fmt}"
    df = frame(3000)
    if fmt == "parquet":
        df.to_parquet(path, index=False)
    else:
        Table.from_pandas(df).write(path, format={"vot": "votable"}.get(fmt, fmt))
    data = bytearray(path.read_bytes())
    if how == "truncated":
        data = data[: len(data) // 2 + 123]
    elif how == "garbled_start":
        data[:100] = b"\x00" * 100
    elif how == "garbled_end":
        data[-60:] = b"\xff" * 60
    path.write_bytes(bytes(data))
    return path


@pytest.mark.parametrize("fmt,how", [
    ("parquet", "truncated"), ("parquet", "garbled_end"), ("parquet", "garbled_start"),
    ("fits", "truncated"), ("fits", "garbled_start"), ("vot", "truncated"),
])
def test_damaged_files_are_one_line_errors(tmp_path, config, fmt, how):
    path = _damaged(tmp_path, fmt, how)
    with pytest.raises(InputError) as err:
        read_catalogue(path, wanted_columns(stage_settings(config, "ingest")))
    kind = {"parquet": "Parquet", "fits": "FITS", "vot": "VOTable"}[fmt]
    one_line(err.value, str(path), f"not a readable {kind} file")


def test_a_truncated_fits_file_says_so(tmp_path, config):
    path = _damaged(tmp_path, "fits", "truncated")
    with pytest.raises(InputError) as err:
        read_catalogue(path, wanted_columns(stage_settings(config, "ingest")))
    one_line(err.value, "not a multiple of 2880")     # FITS files are whole 2880-byte blocks (FITS 4.0, sect. 3.1)


def test_missing_file(tmp_path, config):
    config["catalogue"]["path"] = str(tmp_path / "nowhere.csv")
    with pytest.raises(InputError) as err:
        load_and_ingest(stage_settings(config, "ingest"))
    one_line(err.value, "nowhere.csv", "does not exist")


# ----------------------------------------------------------------------------- configuration


def test_unknown_passband_names_the_key_and_similar_bands(config):
    config["bands"]["G"]["passband"] = "gaiadr3-g"          # wrong case
    with pytest.raises(ConfigError) as err:
        check_references(config)
    one_line(err.value, "bands.G.passband", "'gaiadr3-g'", "gaiadr3-G")


def test_vega_band_without_published_zero_points(config):
    config["bands"]["G"]["passband"] = "sdss2010-r"
    with pytest.raises(ConfigError) as err:
        check_references(config)
    one_line(err.value, "bands.G.system", "'ab'")
    config["bands"]["G"]["system"] = "ab"
    check_references(config)                               # AB needs no zero point


@pytest.mark.parametrize("edit,needles", [
    (lambda c: c["population"]["figures"].__setitem__("cmd", {"colour": ["B", "RP"], "magnitude": "G"}),
     ["population.figures.cmd.colour", "'B'", "G, BP, RP"]),
    (lambda c: c["population"]["figures"].__setitem__("cmd", {"colour": ["BP", "RP"], "magnitude": "V"}),
     ["population.figures.cmd.magnitude", "'V'"]),
    (lambda c: c["select"]["max_mag_error"].__setitem__("g", 0.1), ["select.max_mag_error", "'g'"]),
    (lambda c: c["select"]["wd_region"].__setitem__("magnitude", "Gmag"), ["select.wd_region.magnitude"]),
    (lambda c: c["select"]["quality_cuts"].append({"column": "ruwe", "max": 1.4}),
     ["select.quality_cuts", "'ruwe'", "keep_columns"]),
])
def test_names_used_across_sections_must_exist(config, edit, needles):
    edit(config)
    with pytest.raises(ConfigError) as err:
        check_references(config)
    one_line(err.value, *needles)


@pytest.mark.parametrize("edit,needles", [
    (lambda c: c.__setitem__("result_dir", "out"), ["'result_dir' is not allowed", "results_dir"]),
    (lambda c: c["catalogue"].__setitem__("colums", {}), ["'catalogue.colums'", "columns"]),
    (lambda c: c["bands"]["G"].__setitem__("pasband", "x"), ["'bands.G.pasband'", "passband"]),
    (lambda c: c["mass"].__setitem__("core", "C/O"), ["'mass.core'", "'He', 'CO', 'ONe'"]),
    (lambda c: c["bands"]["G"].__setitem__("system", "AB"), ["'bands.G.system'", "'ab', 'vega'"]),
    (lambda c: c["shards"].__setitem__("rows_per_shard", "many"), ["'shards.rows_per_shard'", "integer"]),
])
def test_config_typos_name_the_key_and_the_allowed_values(config, edit, needles):
    cfg = copy.deepcopy(config)
    edit(cfg)
    with pytest.raises(ConfigError) as err:
        validate(cfg)
    one_line(err.value, *needles)


def test_check_config_prints_one_line_and_exits(config, capsys):
    config["bands"]["BP"]["passband"] = "gaiadr3-Bp"
    with pytest.raises(SystemExit) as stop:
        check_config(config)
    assert stop.value.code == 1
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and err.startswith("cinderclock: configuration error: config key 'bands.BP.passband'")


# ----------------------------------------------------------------------------- through the workflow


def _snakemake(workdir, *args):
    env = dict(os.environ, PYTHONPATH=os.pathsep.join([str(ROOT / "workflow"), os.environ.get("PYTHONPATH", "")]),
               OMP_NUM_THREADS="1")
    cmd = [sys.executable, "-m", "snakemake", "-s", str(ROOT / "Snakefile"), "-d", str(workdir), "--cores", "1",
           *args]
    return subprocess.run(cmd, capture_output=True, text=True, timeout=300, env=env)


def _workdir(tmp_path, config, edit=None):
    cfg = yaml.safe_load((ROOT / "config" / "config.yaml").read_text())
    cfg["catalogue"]["path"] = "cat.csv"
    if edit:
        edit(cfg)
    (tmp_path / "config").mkdir()
    (tmp_path / "config" / "config.yaml").write_text(yaml.safe_dump(cfg))
    return tmp_path


def test_workflow_reports_a_bad_catalogue_in_one_line(tmp_path, config):
    wd = _workdir(tmp_path, config)
    df = frame(5).astype({"plx": object})
    df["plx"] = ["10.0", "twelve", "n/a", "?", "--"]
    df.to_csv(wd / "cat.csv", index=False)
    out = _snakemake(wd, "results/ingest/manifest.json")
    assert out.returncode != 0
    lines = [ln for ln in out.stderr.splitlines() if "expected numbers" in ln]
    assert len(lines) == 1, out.stderr[-3000:]
    assert "cat.csv, row 1, column 'plx': expected numbers, found text such as 'twelve'" in lines[0]
    assert "Traceback (most recent call last)" not in out.stderr + out.stdout
    log = (wd / "results/logs/ingest/manifest.log").read_text()
    assert "column 'plx'" in log                          # the same line is in the job's log
    assert not (wd / "results/ingest/manifest.json").exists()


def test_workflow_reports_an_unknown_passband_before_running(tmp_path, config):
    wd = _workdir(tmp_path, config, lambda c: c["bands"]["RP"].__setitem__("passband", "gaiadr3-R"))
    frame(5).to_csv(wd / "cat.csv", index=False)
    out = _snakemake(wd, "-n")
    assert out.returncode != 0
    assert ("cinderclock: configuration error: config key 'bands.RP.passband': unknown passband 'gaiadr3-R'"
            in out.stderr), out.stderr[-2000:]
    assert "Traceback" not in out.stderr
