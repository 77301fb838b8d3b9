"""Selection: polygon membership against matplotlib, and the structured cuts with reason codes."""

import numpy as np
import pandas as pd

from cinderclock.config import stage_settings
from cinderclock.stages.select import points_in_polygon, select


def test_polygon_against_matplotlib():
    # Reference: matplotlib.path.Path.contains_points (general-purpose library, same even-odd rule).
    from matplotlib.path import Path

    verts = [[-1.0, 7.0], [0.3, 8.5], [1.2, 11.5], [2.2, 14.0], [2.2, 18.5], [-1.0, 18.5]]
    rng = np.random.default_rng(1)
    x = rng.uniform(-2, 3, 20000)
    y = rng.uniform(5, 20, 20000)
    ours = points_in_polygon(x, y, verts)
    ref = Path(np.array(verts + [verts[0]]), closed=True).contains_points(np.c_[x, y])
    assert (ours == ref).mean() > 0.9999      # points exactly on an edge may differ


def _table(**overrides):
    n = 6
    t = pd.DataFrame({"star_id": np.arange(n), "input_row": np.arange(n), "plx_mas": np.full(n, 10.0),
                      "plx_err_mas": np.full(n, 0.1), "mag_G": np.full(n, 15.0), "mag_err_G": np.full(n, 0.01),
                      "mag_BP": np.full(n, 15.0), "mag_err_BP": np.full(n, 0.02), "mag_RP": np.full(n, 15.0),
                      "mag_err_RP": np.full(n, 0.02), "ruwe_lf": np.ones(n), "quality_bits": np.zeros(n, np.int64)})
    for col, (i, v) in overrides.items():
        t.loc[i, col] = v
    return t


def test_each_cut_has_its_reason(config):
    # M_G = 15 + 5 log10(10) - 10 = 10 at colour 0: inside the default white-dwarf region
    t = _table(plx_mas=(1, 0.3), ruwe_lf=(2, 2.0), mag_err_G=(3, 0.2), mag_BP=(4, np.nan))
    t.loc[5, ["mag_G", "mag_BP", "mag_RP"]] = [8.0, 8.8, 8.0]      # M_G = 3, colour 0.8: main sequence
    t.loc[0, "plx_mas"] = 1.5                                       # S/N 15 but 667 pc > 500 pc
    kept, rejects = select(t, stage_settings(config, "select"))
    got = dict(zip(rejects["input_row"], rejects["reason"]))
    assert got == {0: "too_distant", 1: "parallax_snr", 2: "quality_cut", 3: "photometric_error",
                   4: "no_colour", 5: "outside_wd_region"}
    assert len(kept) == 0


def test_negative_and_zero_parallaxes_fail_the_snr_cut(config):
    t = _table(plx_mas=(0, -2.0))
    t.loc[1, "plx_mas"] = 0.0
    kept, rejects = select(t, stage_settings(config, "select"))
    assert set(rejects.loc[rejects.reason == "parallax_snr", "input_row"]) == {0, 1}
    assert len(kept) == 4


def test_zero_point_enters_the_corrected_parallax(config):
    # corrected = parallax - zero point: a -0.5 mas offset turns 0.45 mas (S/N 4.5) into 0.95 (S/N 9.5)
    t = _table()
    t["plx_mas"] = 0.45
    s = stage_settings(config, "select")
    s["select"]["max_distance_pc"] = None
    s["select"]["wd_region"] = None
    assert len(select(t, s)[0]) == 0
    s["astrometry"]["parallax_zero_point_mas"] = -0.5
    assert len(select(t, s)[0]) == 6
