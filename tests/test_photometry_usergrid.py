"""User synthetic-photometry tables: reading, validation, conversion and use in the fit."""

import numpy as np
import pandas as pd
import pytest

from cinderclock.constants import G_SI, M_SUN_KG, PC_M, R_SUN_M, SIGMA_SB_SI
from cinderclock.errors import InputError
from cinderclock.photometry.sedfit import fit_sed
from cinderclock.photometry.table import build_photometry_grid, default_teff_grid_k
from cinderclock.photometry.usergrid import read_user_grid

import test_photometry_reference as ref

KEYS = ["G", "BP", "RP"]
PASSBANDS = ["gaiadr3-G", "gaiadr3-BP", "gaiadr3-RP"]
SYSTEMS = ["vega"] * 3
L0_W = 3.0128e28   # IAU 2015 B2 zero point of M_bol


def _models(radius_column=False):
    """Blackbody 'models' of 0.6 Msun stars, synthesised independently (absolute magnitudes at
    10 pc), as a user would tabulate model atmospheres: 25 Teff x 3 log g x 2 classes."""
    teff = np.geomspace(4000, 40000, 25)
    rows = []
    for cls in ("H", "He"):
        for logg in (7.5, 8.0, 8.5):
            r_m = np.sqrt(G_SI * 0.6 * M_SUN_KG / (10 ** logg / 100.0))
            absmag = ref.magnitudes(PASSBANDS, SYSTEMS, teff, (r_m / (10 * PC_M)) ** 2, 0.0)
            mbol = -2.5 * np.log10(4 * np.pi * r_m**2 * SIGMA_SB_SI * teff**4 / L0_W)
            for i, t in enumerate(teff):
                row = {"atmosphere": cls, "teff_k": t, "logg_cgs": logg}
                row.update({"radius_rsun": r_m / R_SUN_M} if radius_column else {"mbol_abs": mbol[i]})
                row.update({f"absmag_{k}": absmag[i, j] for j, k in enumerate(KEYS)})
                rows.append(row)
    return pd.DataFrame(rows)


@pytest.fixture(scope="module")
def bb_grid():
    bands = [{"key": k, "passband": p, "system": "vega"} for k, p in zip(KEYS, PASSBANDS)]
    return build_photometry_grid(bands, default_teff_grid_k(3000, 60000, 0.002), [0.0, 0.1, 0.2],
                                 law="F99", r_v=3.1)


@pytest.fixture
def csv_path(tmp_path):
    path = tmp_path / "models.csv"
    with open(path, "w") as fh:
        fh.write("# blackbody test models\n")
        _models().to_csv(fh, index=False)
    return path


@pytest.mark.parametrize("radius_column", [False, True])
def test_user_table_converts_to_unit_solid_angle(tmp_path, bb_grid, radius_column):
    # Converted through M_bol (IAU 2015 B2) or through the radius, the user's absolute magnitudes
    # of blackbodies must equal blackbody magnitudes for unit solid angle, whatever the log g.
    # Tolerance 2e-3 mag: monotone cubic interpolation between Teff nodes 0.04 dex apart.
    path = tmp_path / "m.parquet"
    _models(radius_column).to_parquet(path)
    ug = read_user_grid(path, KEYS)
    assert ug.atmospheres == ("H", "He")
    g = ug.photometry_grid("H")
    t = np.array([4321.0, 9876.0, 23456.0, 39000.0])
    for logg in (7.5, 7.8, 8.5):
        np.testing.assert_allclose(g.magnitudes(t, 0.0, logg), bb_grid.magnitudes(t, 0.0), atol=2e-3)


def test_user_table_with_extinction_and_fit(csv_path, bb_grid):
    ug = read_user_grid(csv_path, KEYS)
    g = ug.photometry_grid("He", extinction_grid=bb_grid)
    assert "extinction" in g.metadata["caution"]
    t = np.array([6000.0, 15000.0])
    np.testing.assert_allclose(g.magnitudes(t, 0.15, 8.0), bb_grid.magnitudes(t, 0.15), atol=2e-3)
    # the fit with the user grid and per-star log g recovers the Teff of noise-free blackbodies
    teff = np.array([7000.0, 12000.0, 25000.0])
    theta = (0.013 * R_SUN_M / (30 * PC_M)) ** 2
    obs = ref.magnitudes(PASSBANDS, SYSTEMS, teff, theta, 0.1)
    fit = fit_sed(obs, np.full_like(obs, 0.01), g, ebv=0.1, distance_pc=np.full(3, 30.0),
                  logg=np.array([7.7, 8.0, 8.3]))
    np.testing.assert_allclose(fit["teff_k"], teff, rtol=5e-3)
    np.testing.assert_allclose(fit["radius_rsun"], 0.013, rtol=5e-3)


VALIDATION_CASES = [
    # (how the table is broken, expected fragments of the one-line message)
    ("drop_column", ["column 'absmag_BP'", "missing"]),
    ("bad_number", ["row 3", "column 'teff_k'", "not a finite number"]),
    ("negative_teff", ["row 4", "column 'teff_k'", "positive"]),
    ("duplicate", ["row 1", "duplicate model"]),
    ("hole", ["every Teff at every log g"]),
    ("no_mbol", ["mbol_abs"]),
]


@pytest.mark.parametrize("how,fragments", VALIDATION_CASES)
def test_validation_errors_name_file_row_column(tmp_path, how, fragments):
    df = _models()
    if how == "drop_column":
        df = df.drop(columns="absmag_BP")
    elif how == "bad_number":
        df["teff_k"] = df["teff_k"].astype(object)
        df.loc[3, "teff_k"] = "hot"
    elif how == "negative_teff":
        df.loc[4, "teff_k"] = -5.0
    elif how == "duplicate":
        df.loc[1, "teff_k"] = df.loc[0, "teff_k"]
    elif how == "hole":
        df = df.drop(index=30)
    elif how == "no_mbol":
        df = df.drop(columns="mbol_abs")
    path = tmp_path / "broken.csv"
    df.to_csv(path, index=False)
    with pytest.raises(InputError) as info:
        read_user_grid(path, KEYS)
    msg = str(info.value)
    assert str(path) in msg
    for frag in fragments:
        assert frag in msg
