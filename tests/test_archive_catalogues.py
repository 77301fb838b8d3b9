"""Survey catalogues as they come: Gaia-archive exports in every format, split releases, ECSV, errors
given as flux signal-to-noise, one star_id type, and the messages for mapping mistakes.

All catalogues here are INVENTED values laid out as the archives lay them out (tests/archive_layouts.py).
"""

import copy
import gzip
import os

import numpy as np
import pandas as pd
import pytest

from archive_layouts import POGSON, gaia_config, gaia_export, write, write_split
from cinderclock.catalogue import iter_catalogue, resolve_parts
from cinderclock.config import stage_settings, validate
from cinderclock.errors import ConfigError, InputError
from cinderclock.sharding import ingest_to_shards
from cinderclock.stages.ingest import load_and_ingest
from cinderclock.stages.select import select
from cinderclock.tableio import read_table

FORMATS = ["csv", "csv.gz", "ecsv", "ecsv.gz", "parquet", "fits", "votable"]


@pytest.fixture(scope="module")
def gaia():
    return gaia_export()


def _shards(settings, tmp_path, name):
    manifest, n = ingest_to_shards(settings, tmp_path / name, tmp_path / f"{name}.rej.parquet", batch_rows=64)
    frames = [read_table(tmp_path / name / f"{s}.parquet")[0] for s in sorted(manifest)]
    table = pd.concat(frames, ignore_index=True).sort_values("input_row").reset_index(drop=True)
    rejects = read_table(tmp_path / f"{name}.rej.parquet")[0]
    return table, rejects, manifest, n


def _selected(table, config):
    kept, rejects = select(table, stage_settings(config, "select"))
    return kept, rejects


@pytest.mark.parametrize("fmt", FORMATS)
def test_gaia_export_as_one_file_and_as_three_parts_gives_identical_results(tmp_path, config, gaia, fmt):
    single = write(gaia, tmp_path / f"GaiaSource_all{'.csv.gz' if fmt == 'ecsv.gz' else '.' + fmt.replace('votable', 'vot')}",
                   fmt)
    cfg1 = gaia_config(config, str(single))
    cfg1["shards"]["rows_per_shard"] = 100
    t1, r1, m1, n1 = _shards(stage_settings(cfg1, "ingest"), tmp_path, "one")
    folder = tmp_path / "release"
    write_split(gaia, folder, fmt)
    cfg3 = copy.deepcopy(cfg1)
    cfg3["catalogue"]["path"] = str(folder)                 # a directory of parts
    t3, r3, m3, n3 = _shards(stage_settings(cfg3, "ingest"), tmp_path, "three")
    assert n1 == n3 == len(gaia)
    pd.testing.assert_frame_equal(t1, t3)
    pd.testing.assert_frame_equal(r1.drop(columns="detail"), r3.drop(columns="detail"))
    assert {s: v["content_sha256"] for s, v in m1.items()} == {s: v["content_sha256"] for s, v in m3.items()}
    # the catalogue's own identifier type, 19-digit Gaia source_id kept exactly
    assert t1["star_id"].dtype == np.int64 and set(t1["star_id"]) <= set(gaia["source_id"])
    # flux_over_error converted once: sigma_m = 2.5/ln10 / (F/sigma_F) (first-order propagation, common practice)
    src = gaia.set_index("source_id").loc[t1["star_id"]]
    assert np.allclose(t1["mag_err_G"], POGSON / src["phot_g_mean_flux_over_error"].to_numpy(), rtol=1e-6)
    # the missing BP of row 3 (null in the file) is a missing band, not a rejection
    row3 = t1.loc[t1["input_row"] == 3]
    assert len(row3) == 1 and np.isnan(row3["mag_BP"].iloc[0])
    # and the selection runs on it as on any catalogue: the same stars either way
    k1, _ = _selected(t1, cfg1)
    k3, _ = _selected(t3, cfg3)
    assert len(k1) > 0
    pd.testing.assert_frame_equal(k1, k3)


@pytest.mark.parametrize("how", ["glob", "list"])
def test_a_split_release_by_glob_or_list(tmp_path, config, gaia, how):
    paths = write_split(gaia, tmp_path / "rel", "csv.gz")
    spec = str(tmp_path / "rel" / "GaiaSource_*.csv.gz") if how == "glob" else [str(p) for p in paths]
    assert resolve_parts(spec) == [str(p) for p in paths]
    cfg = gaia_config(config, spec)
    validate(cfg)                                            # the schema takes a list
    table, rejects, _ = load_and_ingest(stage_settings(cfg, "ingest"))
    assert len(table) + len(rejects) == len(gaia)


def test_parts_are_ordered_by_their_numbers_and_the_folder_skips_checksum_files(tmp_path):
    for name in ("part_10.csv", "part_2.csv", "part_1.csv", "_MD5SUM.txt", "README.txt"):
        (tmp_path / name).write_text("a\n1\n")
    assert [os.path.basename(p) for p in resolve_parts(str(tmp_path))] == ["part_1.csv", "part_2.csv", "part_10.csv"]


def test_row_numbers_are_reported_as_file_and_row(tmp_path, config, gaia):
    paths = write_split(gaia, tmp_path / "rel", "csv")
    lines = paths[1].read_text().splitlines()
    lines[5] = lines[5] + ",surplus"                          # data row 4 of the second part has a field too many
    paths[1].write_text("\n".join(lines) + "\n")
    cfg = gaia_config(config, str(tmp_path / "rel"))
    raws = list(iter_catalogue(cfg["catalogue"]["path"], ["source_id"], batch_rows=1000))
    second = [r for r in raws if r.path == str(paths[1])]
    bad = [m for r in second for m in r.malformed]
    first_rows = len(pd.read_csv(paths[0]))
    assert [b[0] for b in bad] == [first_rows + 4]            # global position: the single-file position
    _, rejects, _, _ = _shards(stage_settings(cfg, "ingest"), tmp_path, "sh")
    assert rejects.loc[rejects.reason == "malformed_row", "input_row"].tolist() == [first_rows + 4]


def test_a_repeated_identifier_across_parts_is_found(tmp_path, config, gaia):
    df = gaia.copy()
    df.loc[len(df) - 1, "source_id"] = df.loc[0, "source_id"]  # the last row of part 3 repeats row 0 of part 1
    write_split(df, tmp_path / "rel", "parquet")
    cfg = gaia_config(config, str(tmp_path / "rel"))
    _, rejects, _, _ = _shards(stage_settings(cfg, "ingest"), tmp_path, "sh")
    dup = rejects.loc[rejects.reason == "duplicate_id"]
    assert dup["input_row"].tolist() == [len(df) - 1]
    assert "GaiaSource_000160-000239.parquet, row 79" in dup["detail"].iloc[0]


def test_every_malformed_part_gets_its_own_line(tmp_path, config, gaia):
    paths = write_split(gaia, tmp_path / "rel", "fits")
    for p in (paths[0], paths[2]):
        p.write_bytes(p.read_bytes()[:3000])                  # two truncated parts
    cfg = gaia_config(config, str(tmp_path / "rel"))
    with pytest.raises(InputError) as err:
        _shards(stage_settings(cfg, "ingest"), tmp_path, "sh")
    lines = str(err.value).splitlines()
    assert len(lines) == 3 and "2 catalogue parts" in lines[0]
    assert str(paths[0]) in lines[1] and str(paths[2]) in lines[2] and str(paths[1]) not in str(err.value)
    assert all("not a readable FITS file" in line for line in lines[1:])


def test_a_part_declaring_another_unit_is_an_error_naming_both_parts(tmp_path, config, gaia):
    from archive_layouts import GAIA_UNITS

    paths = write_split(gaia, tmp_path / "rel", "fits")
    part = gaia.iloc[160:].reset_index(drop=True)
    write(part.assign(parallax=part["parallax"] / 1000.0), paths[2], "fits", units={**GAIA_UNITS, "parallax": "arcsec"})
    cfg = gaia_config(config, str(tmp_path / "rel"))
    with pytest.raises(InputError) as err:
        _shards(stage_settings(cfg, "ingest"), tmp_path, "sh")
    assert "'arcsec'" in str(err.value) and "'mas'" in str(err.value) and paths[0].name in str(err.value)


def test_changing_one_part_rewrites_only_the_shards_of_its_rows(tmp_path, config, gaia):
    paths = write_split(gaia, tmp_path / "rel", "parquet")
    cfg = gaia_config(config, str(tmp_path / "rel"))
    cfg["shards"]["rows_per_shard"] = 80                      # shards s0000..s0002, one per part
    s = stage_settings(cfg, "ingest")
    _shards(s, tmp_path, "sh")
    before = {p.name: p.stat().st_mtime_ns for p in (tmp_path / "sh").glob("*.parquet")}
    part = pd.read_parquet(paths[1])
    part.loc[5, "phot_g_mean_mag"] += 0.01                    # an edit in the second part
    part.to_parquet(paths[1], index=False)
    os.utime(paths[1])
    _shards(s, tmp_path, "sh")
    after = {p.name: p.stat().st_mtime_ns for p in (tmp_path / "sh").glob("*.parquet")}
    assert [n for n in sorted(after) if after[n] != before[n]] == ["s0001.parquet"]


def test_ecsv_units_and_null_markers_are_honoured(tmp_path, config, gaia):
    df = gaia.head(20).copy()
    df["parallax"] = df["parallax"] / 1000.0
    df["parallax_error"] = df["parallax_error"] / 1000.0
    from archive_layouts import GAIA_UNITS

    path = write(df, tmp_path / "bulk.csv.gz", "ecsv.gz", units={**GAIA_UNITS, "parallax": "arcsec",
                                                                   "parallax_error": "arcsec"})
    with gzip.open(path, "rt") as fh:
        assert fh.readline().startswith("# %ECSV") and "null" in fh.read()
    cfg = gaia_config(config, str(path))
    table, rejects, _ = load_and_ingest(stage_settings(cfg, "ingest"))
    # ECSV declares arcsec: converted to mas (astropy units: 1 arcsec = 1000 mas)
    src = gaia.set_index("source_id").loc[table["star_id"]]
    assert np.allclose(table["plx_mas"], src["parallax"].to_numpy(), rtol=1e-9)
    assert np.isnan(table.loc[table.input_row == 3, "mag_BP"]).all()   # 'null' read as not measured


@pytest.mark.parametrize("fmt", ["csv", "parquet", "fits", "votable"])
def test_one_star_id_type_in_results_and_rejects(tmp_path, config, gaia, fmt):
    df = gaia.copy()
    df.loc[7, "parallax"] = np.nan                           # a rejected row
    df.loc[9, "source_id"] = df.loc[8, "source_id"]          # a repeated identifier
    path = write(df, tmp_path / f"cat.{fmt.replace('votable', 'vot')}", fmt)
    cfg = gaia_config(config, str(path))
    table, rejects, _, _ = _shards(stage_settings(cfg, "ingest"), tmp_path, "sh")
    assert table["star_id"].dtype == np.int64 and rejects["star_id"].dtype == np.int64
    joined = pd.concat([table[["star_id", "input_row"]], rejects[["star_id", "input_row"]]]).merge(
        df.reset_index()[["index", "source_id"]], left_on="input_row", right_on="index")
    assert (joined["star_id"] == joined["source_id"]).all() and len(joined) == len(df)


def test_text_identifiers_stay_text_in_results_and_rejects(tmp_path, config, gaia):
    df = gaia.copy()
    df["source_id"] = "Gaia DR3 " + df["source_id"].astype(str)
    df.loc[7, "parallax"] = np.nan
    path = write(df, tmp_path / "cat.csv", "csv")
    cfg = gaia_config(config, str(path))
    table, rejects, _, _ = _shards(stage_settings(cfg, "ingest"), tmp_path, "sh")
    assert table["star_id"].dtype.kind in "OU" or str(table["star_id"].dtype) == "str"
    assert rejects["star_id"].iloc[0] == df.loc[7, "source_id"]


@pytest.mark.parametrize("kind,column,needle", [
    ("mag", "phot_g_mean_flux_over_error", "error_kind: flux_over_error"),   # flux S/N mapped as a mag error
    ("flux_over_error", "g_err_mag", "error_kind: mag"),                     # a mag error mapped as S/N
])
def test_an_error_column_that_cannot_be_what_it_is_said_to_be_stops_with_one_line(tmp_path, config, gaia, kind,
                                                                                   column, needle):
    df = gaia.assign(g_err_mag=POGSON / gaia["phot_g_mean_flux_over_error"])
    path = write(df, tmp_path / "cat.parquet", "parquet")
    cfg = gaia_config(config, str(path))
    cfg["bands"]["G"].update(error=column, error_kind=kind)
    with pytest.raises(InputError) as err:
        load_and_ingest(stage_settings(cfg, "ingest"))
    text = str(err.value)
    assert f"column '{column}'" in text and needle in text and "\n" not in text


def test_flux_errors_are_converted_with_the_flux(tmp_path, config, gaia):
    flux = 10 ** (-0.4 * (gaia["phot_g_mean_mag"] - 25.6874))    # e-/s with the Riello et al. 2021 G zero point
    df = gaia.assign(phot_g_mean_flux=flux, phot_g_mean_flux_error=flux / gaia["phot_g_mean_flux_over_error"])
    cfg = gaia_config(config, str(write(df, tmp_path / "cat.parquet", "parquet")))
    cfg["bands"]["G"].update(error="phot_g_mean_flux_error", error_kind="flux", flux="phot_g_mean_flux")
    table, _, _ = load_and_ingest(stage_settings(cfg, "ingest"))
    src = gaia.set_index("source_id").loc[table["star_id"]]
    assert np.allclose(table["mag_err_G"], POGSON / src["phot_g_mean_flux_over_error"].to_numpy(), rtol=1e-9)


def test_the_conversion_is_recorded_in_the_provenance(tmp_path, config, gaia):
    cfg = gaia_config(config, str(write(gaia, tmp_path / "cat.fits", "fits")))
    _shards(stage_settings(cfg, "ingest"), tmp_path, "sh")
    from cinderclock.tableio import read_metadata

    meta = read_metadata(next((tmp_path / "sh").glob("*.parquet")))
    conv = meta["provenance"]["stages"]["ingest"]["photometry_conversions"]
    assert conv["G"]["error_kind"] == "flux_over_error" and "2.5 / ln(10)" in conv["G"]["error"]
    assert "flux signal-to-noise" in meta["columns"]["mag_err_G"]["description"]


def test_an_unknown_passband_suggests_the_closest_names(config):
    from cinderclock.config import check_references

    cfg = copy.deepcopy(config)
    cfg["bands"]["G"]["passband"] = "gaia-dr3-G"
    with pytest.raises(ConfigError) as err:
        check_references(cfg)
    assert "closest known passbands: gaiadr3-G" in str(err.value)
    cfg["bands"]["G"] = {"preset": "2mass-K", "mag": "x", "error": "y"}
    with pytest.raises(ConfigError, match="closest: 2mass-Ks"):
        validate(cfg)
