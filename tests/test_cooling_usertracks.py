"""User-supplied cooling tracks: reading, validation errors, and look-ups on irregular tracks.

The valid example tracks follow Mestel's closed form (reference-values.md section 4, exact
algebra), so look-ups can be checked against it.
"""

import numpy as np
import pandas as pd
import pytest

from cinderclock.cooling import mestel
from cinderclock.cooling.grid import STATUS_INSIDE, CoolingGrid
from cinderclock.cooling.usertracks import read_user_tracks
from cinderclock.errors import InputError

K = 6.0e6     # a published Mestel coefficient (Zingale notes, section 4, C2); any value would do


def mestel_tracks(masses=(0.5, 0.6, 0.7), seed=1):
    """Tracks with different, irregular log L nodes per mass (ages from Mestel's formula)."""
    rng = np.random.default_rng(seed)
    rows = []
    for m in masses:
        ll = np.sort(np.concatenate([[-5.0, 0.0], rng.uniform(-5, 0, 300)]))[::-1]
        for x in ll:
            rows.append({"mass_msun": m, "log_lum": round(float(x), 6),
                         "age_yr": float(mestel.cooling_age_yr(m, round(float(x), 6), K)),
                         "logg_cgs": 8.0, "composition": "H"})
    return pd.DataFrame(rows)


def write(tmp_path, df, name="tracks.csv"):
    path = tmp_path / name
    with open(path, "w") as fh:
        fh.write("# my evolutionary sequences\n")
        df.to_csv(fh, index=False)
    return path


def test_valid_file_round_trip(tmp_path):
    path = write(tmp_path, mestel_tracks())
    df = read_user_tracks(path)
    assert df.attrs["cooling_model"]["settings"]["composition"] == "H"
    assert df.attrs["cooling_model"]["settings"]["n_tracks"] == 3
    grid = CoolingGrid.from_frame(df)
    m = np.array([0.5, 0.55, 0.6, 0.68])
    ll = np.array([-1.23, -2.5, -3.77, -4.9])
    age, status = grid.age_yr(m, ll)
    assert np.all(status == STATUS_INSIDE)
    # resampling onto common nodes + linear mass interpolation of log age, which is (5/7) log M:
    # at 0.1 Msun spacing the curvature costs up to ~1.3e-3 dex (0.3 %) midway; tolerance 4e-3.
    assert np.allclose(age, mestel.cooling_age_yr(m, ll, K), rtol=4e-3)
    # radius from log g = 8: R = sqrt(G M / g) with astropy constants
    from astropy import constants as c
    r = np.sqrt(c.G.cgs.value * 0.6 * c.M_sun.cgs.value / 1e8) / c.R_sun.cgs.value
    assert df.loc[df["mass_msun"] == 0.6, "radius_rsun"].iloc[0] == pytest.approx(r, rel=1e-10)


def test_parquet_input(tmp_path):
    path = tmp_path / "tracks.parquet"
    mestel_tracks().to_parquet(path)
    assert len(read_user_tracks(path)) == 3 * 302


def _expect(tmp_path, df, *, row=None, column=None, text=""):
    path = write(tmp_path, df)
    with pytest.raises(InputError) as err:
        read_user_tracks(path)
    e = err.value
    assert e.path.endswith("tracks.csv")
    assert e.row == row and e.column == column
    assert text in str(e)
    return e


def test_missing_required_column(tmp_path):
    _expect(tmp_path, mestel_tracks().drop(columns="age_yr"), column="age_yr", text="missing")


def test_unknown_column_is_refused(tmp_path):
    _expect(tmp_path, mestel_tracks().rename(columns={"logg_cgs": "logg"}), column="logg", text="unknown")


def test_non_numeric_value(tmp_path):
    df = mestel_tracks().astype({"log_lum": object})
    df.loc[7, "log_lum"] = "bright"
    _expect(tmp_path, df, row=7, column="log_lum", text="not a number")


def test_age_must_increase_as_luminosity_falls(tmp_path):
    df = mestel_tracks()
    df.loc[10, "age_yr"] = 1e20
    # the next-fainter row of the same track (data row 11) is the first that fails
    _expect(tmp_path, df, row=11, column="age_yr", text="must increase")


def test_missing_required_value(tmp_path):
    df = mestel_tracks()
    df.loc[4, "age_yr"] = np.nan
    _expect(tmp_path, df, row=4, column="age_yr", text="non-finite")


def test_value_out_of_range(tmp_path):
    df = mestel_tracks()
    df.loc[0:301, "mass_msun"] = 2.0
    _expect(tmp_path, df, row=0, column="mass_msun", text="outside the accepted range")


def test_repeated_luminosity(tmp_path):
    df = mestel_tracks()
    df.loc[5, "log_lum"] = df.loc[4, "log_lum"]
    _expect(tmp_path, df, row=5, column="log_lum", text="repeated")


def test_single_track_is_refused(tmp_path):
    df = mestel_tracks(masses=(0.6,))
    _expect(tmp_path, df, column="mass_msun", text="at least two tracks")


def test_several_compositions_need_a_choice(tmp_path):
    df = pd.concat([mestel_tracks(), mestel_tracks().assign(composition="He")], ignore_index=True)
    _expect(tmp_path, df, column="composition", text="several compositions")
    path = write(tmp_path, df)
    assert len(read_user_tracks(path, composition="He")) == 3 * 302


def test_missing_file():
    with pytest.raises(InputError, match="not found"):
        read_user_tracks("/nonexistent/tracks.csv")
