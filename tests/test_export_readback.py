"""Every export reads back in astropy without unit warnings and with the Parquet table's units.

Reference: astropy's unit parser (a general-purpose library) reading the files back; the unit
conventions are the FITS standard's (function notation quoted in the column comment) and the CDS
syntax VOTable 1.3 prescribes ("[X]" for log10 of a quantity in X). Also the data dictionary's
plain column types and the command's --version.
"""

import warnings

import numpy as np
import pandas as pd
import pytest
from astropy import units as u

from cinderclock import __version__
from cinderclock.cli import main
from cinderclock.datadict import data_dictionary
from cinderclock.export import export_table
from cinderclock.provenance import build
from cinderclock.tableio import Column, write_table

SPECS = {
    "star_id": Column("", "Identifier", "meta.id"),
    "log_lum": Column("dex(solLum)", "log10 L/Lsun", "phys.luminosity"),
    "log_lum_err": Column("dex", "Uncertainty of log L", "stat.error"),
    "logg_cgs": Column("dex(cm / s2)", "Surface gravity", "phys.gravity"),
    "mass_msun": Column("solMass", "Mass", "phys.mass"),
    "pmra_mas_yr": Column("mas / yr", "Proper motion", "pos.pm"),
    "mag_G": Column("mag", "G magnitude", "phot.mag"),
    "quality_bits": Column("", "Flags", "meta.code.qual"),
}


@pytest.fixture
def parquet(tmp_path):
    n = 5
    df = pd.DataFrame({"star_id": [f"s{i}" for i in range(n)], "log_lum": np.linspace(-4, -2, n),
                       "log_lum_err": np.full(n, 0.05), "logg_cgs": np.linspace(7.8, 8.2, n),
                       "mass_msun": np.linspace(0.5, 0.9, n), "pmra_mas_yr": np.linspace(-10, 10, n),
                       "mag_G": np.linspace(15, 19, n), "quality_bits": np.arange(n, dtype=np.int64)})
    prov = build("final", {}, models=[{"name": "edsd", "reference": "Bailer-Jones, C. A. L. 2015, PASP 127, 994"}])
    path = tmp_path / "white_dwarfs.parquet"
    write_table(df, path, SPECS, prov, stage="final")
    return path


@pytest.mark.parametrize("fmt", ["fits", "votable", "ecsv"])
def test_export_reads_back_without_unit_warnings(parquet, fmt):
    from astropy.table import Table

    out = export_table(parquet, fmt)
    with warnings.catch_warnings():
        warnings.simplefilter("error", u.UnitsWarning)
        back = Table.read(out, format={"fits": "fits", "votable": "votable", "ecsv": "ascii.ecsv"}[fmt])
    for name, spec in SPECS.items():
        expected = u.Unit(spec.unit) if spec.unit else None
        got = back[name].unit
        if expected is None:
            assert got in (None, u.dimensionless_unscaled), (fmt, name, got)
        else:
            assert got == expected, (fmt, name, got, expected)
    assert np.allclose(np.asarray(back["log_lum"], dtype=float), np.linspace(-4, -2, 5))


def test_data_dictionary_plain_types(parquet):
    text = data_dictionary(parquet)
    assert "| `star_id` | string |" in text and "| `log_lum` | float64 |" in text
    assert "| `quality_bits` | int64 |" in text and "large_string" not in text


def test_version(capsys):
    with pytest.raises(SystemExit) as exc:
        main(["--version"])
    assert exc.value.code == 0 and __version__ in capsys.readouterr().out


def test_cite_numbers_and_bibtex(parquet, tmp_path, capsys):
    # BibTeX fields of Bailer-Jones (2015) checked against its bibcode 2015PASP..127..994B.
    bib = tmp_path / "refs.bib"
    assert main(["cite", str(parquet), "--bibtex", str(bib)]) == 0
    out = capsys.readouterr().out
    assert "[1] Bailer-Jones" in out
    text = bib.read_text()
    assert "Bailer-Jones, C. A. L." in text and "journal = {PASP}" in text and "volume = {127}" in text
    assert "pages = {994}" in text and "year = {2015}" in text
