"""Ingest: formats, column mapping, units, and row-level vetting with reason codes."""

import numpy as np
import pytest

from cinderclock.catalogue import read_catalogue
from cinderclock.config import stage_settings
from cinderclock.errors import InputError
from cinderclock.stages.ingest import load_and_ingest, wanted_columns
from helpers import frame, ingest_file


def test_row_faults_become_reason_coded_rejects(tmp_path, config):
    df = frame(8).astype({"plx": object, "g_mag": object})
    df.loc[1, "plx"] = "pending"          # text in a numeric column
    df.loc[2, "plx"] = np.nan             # missing required value
    df.loc[3, "plx_e"] = -0.1             # impossible uncertainty
    df.loc[4, "lf_source"] = df.loc[0, "lf_source"]   # repeated identifier
    df.loc[5, "g_mag"] = 99.0             # sentinel: band dropped, row kept
    table, rejects, _ = ingest_file(tmp_path, df, config)
    got = dict(zip(rejects["input_row"], rejects["reason"]))
    assert got == {1: "not_a_number", 2: "nonfinite_required", 3: "bad_parallax_error", 4: "duplicate_id"}
    assert len(table) + len(rejects) == 8                  # nothing lost
    row5 = table.loc[table["input_row"] == 5].iloc[0]
    assert np.isnan(row5["mag_G"]) and int(row5["quality_bits"]) & 1   # band_missing flag (bit 0)


def test_malformed_csv_rows_are_rejected_with_their_position(tmp_path, config):
    df = frame(4)
    lines = df.to_csv(index=False).splitlines()
    lines[2] = ",".join(lines[2].split(",")[:5])          # data row 1 cut short
    table, rejects, _ = ingest_file(tmp_path, df, config, text="\n".join(lines) + "\n")
    assert rejects["reason"].tolist() == ["malformed_row"]
    assert rejects["input_row"].tolist() == [1]
    assert table["input_row"].tolist() == [0, 2, 3]


def test_out_of_range_spectroscopy_is_ignored_and_flagged(tmp_path, config):
    df = frame(3)
    df.loc[1, "teff_sp"] = 1e7
    table, rejects, _ = ingest_file(tmp_path, df, config)
    assert len(rejects) == 0
    assert np.isnan(table.loc[1, "teff_spec_k"]) and table.loc[1, "quality_bits"] & 2


@pytest.mark.parametrize("fmt", ["csv", "parquet", "fits", "votable"])
def test_all_formats_give_the_same_table(tmp_path, config, fmt):
    from astropy.table import Table

    df = frame(5)
    path = tmp_path / f"cat.{ {'votable': 'vot'}.get(fmt, fmt)}"
    if fmt == "csv":
        df.to_csv(path, index=False)
    elif fmt == "parquet":
        df.to_parquet(path, index=False)
    else:
        Table.from_pandas(df).write(path, format=fmt)
    config["catalogue"]["path"] = str(path)
    table, rejects, _ = load_and_ingest(stage_settings(config, "ingest"))
    assert len(rejects) == 0 and len(table) == 5
    assert table["plx_mas"].tolist() == [10.0] * 5
    assert table["star_id"].tolist() == list(range(100, 105))


def test_units_from_file_metadata_are_converted(tmp_path, config):
    # A FITS file declaring the parallax in arcsec: converted once to mas (astropy.units).
    from astropy import units as u
    from astropy.table import Table

    df = frame(3)
    t = Table.from_pandas(df)
    t["plx"] = t["plx"] / 1000.0
    t["plx"].unit = u.arcsec
    t["plx_e"] = t["plx_e"] / 1000.0
    t["plx_e"].unit = u.arcsec
    t.write(tmp_path / "cat.fits")
    config["catalogue"]["path"] = str(tmp_path / "cat.fits")
    config["catalogue"]["units"] = {}                # the file's own units apply
    table, _, _ = load_and_ingest(stage_settings(config, "ingest"))
    assert np.allclose(table["plx_mas"], 10.0) and np.allclose(table["plx_err_mas"], 0.1)
    # a catalogue.units entry that contradicts the file's declared unit is an error naming both
    config["catalogue"]["units"] = {"parallax": "mas"}
    with pytest.raises(InputError) as err:
        load_and_ingest(stage_settings(config, "ingest"))
    text = str(err.value)
    assert "'mas'" in text and "'arcsec'" in text and "column 'plx'" in text and "\n" not in text
    # an entry that agrees with the file (same unit, other spelling) is fine
    config["catalogue"]["units"] = {"parallax": "arcsec", "parallax_error": "arcsecond"}
    table, _, _ = load_and_ingest(stage_settings(config, "ingest"))
    assert np.allclose(table["plx_mas"], 10.0)


@pytest.mark.parametrize("text,message", [
    ("", "empty"),
    (",".join(["lf_source", "ra_icrs", "dec_icrs", "plx", "plx_e", "pm_ra", "pm_dec", "g_mag", "g_mag_e", "bp_mag",
               "bp_mag_e", "rp_mag", "rp_mag_e", "teff_sp", "teff_sp_e", "logg_sp", "logg_sp_e", "ruwe_lf"]) + "\n",
     "header but no data rows"),
])
def test_empty_files_are_clear_errors(tmp_path, config, text, message):
    with pytest.raises(InputError, match=message):
        ingest_file(tmp_path, None, config, text=text if text else "")


def test_missing_column_names_the_column_and_file(tmp_path, config):
    df = frame(3).drop(columns=["plx_e"])
    with pytest.raises(InputError, match=r"cat\.csv.*'plx_e'"):
        ingest_file(tmp_path, df, config)


def test_text_column_is_a_mapping_error_naming_row_and_column(tmp_path, config):
    df = frame(4).astype({"plx": object})
    df["plx"] = ["a", "b", "c", "1"]
    with pytest.raises(InputError, match=r"row 0, column 'plx'"):
        ingest_file(tmp_path, df, config)


def test_truncated_parquet_is_a_clear_error(tmp_path, config):
    path = tmp_path / "cat.parquet"
    frame(50).to_parquet(path)
    path.write_bytes(path.read_bytes()[:200])
    with pytest.raises(InputError, match="not a readable Parquet"):
        read_catalogue(path, wanted_columns(stage_settings(config, "ingest")))
