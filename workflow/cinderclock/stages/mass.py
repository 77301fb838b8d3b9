"""Mass: mass and radius of each white dwarf from log g, or from the photometric radius.

Route ``logg`` (spectroscopic log g given): invert log g(M) of the mass-radius table. Route
``radius`` (no log g): invert R(M) at the photometric radius of the luminosity stage. Stars that
fall off the table keep NaN mass and the ``mass_off_table`` flag; they stay in the results.
"""

from __future__ import annotations

import numpy as np

from .. import columns as C
from ..reasons import set_flag
from ..tableio import Column

STAGE = "mass"

COLUMNS = {
    "mass_msun": Column("solMass", "White-dwarf mass", "phys.mass"),
    "radius_rsun": Column("solRad", "Radius: sqrt(G M / g) on the log g route, the photometric radius on the "
                                    "radius route", "phys.size.radius"),
    "logg": Column("dex(cm / s2)", "Surface gravity log10(g / cm s^-2): spectroscopic on the log g route, "
                                   "G M / R^2 on the radius route", "phys.gravity"),
    "mass_route": Column("", "How the mass was found: 'logg' (spectroscopic) or 'radius' (photometric)", "meta.code"),
    "radius_ratio": Column("", "Photometric radius over the mass-radius radius at the spectroscopic log g "
                               "(about sqrt(2) for an unresolved equal pair)", "arith.ratio"),
}


def mass(table, settings, mr):
    """Add mass, radius, log g, the route and the over-luminosity check.

    Parameters
    ----------
    table : pandas.DataFrame
        Output of the luminosity stage.
    settings : dict
        ``{"mass": ...}`` with ``low_mass_msun`` and ``high_mass_msun`` flag thresholds.
    mr : cinderclock.massradius.grid.MassRadiusGrid
    """
    cfg = settings["mass"]
    out = table.copy()
    n = len(out)
    bits = out[C.FLAGS].to_numpy()
    teff = out["teff_k"].to_numpy(dtype=float)
    logg_in = out["logg_spec"].to_numpy(dtype=float) if "logg_spec" in out else np.full(n, np.nan)
    by_logg = np.isfinite(logg_in)

    m = np.full(n, np.nan)
    r = np.full(n, np.nan)
    g = np.full(n, np.nan)
    m[by_logg], r[by_logg], _ = mr.mass_from_logg(logg_in[by_logg], teff[by_logg])
    g[by_logg] = logg_in[by_logg]
    r_phot = out["radius_phot_rsun"].to_numpy(dtype=float)
    m[~by_logg], g[~by_logg], _ = mr.mass_from_radius(r_phot[~by_logg], teff[~by_logg])
    r[~by_logg] = r_phot[~by_logg]
    r[~np.isfinite(m)] = np.nan
    g[~np.isfinite(m)] = np.nan

    # over-luminosity: on the log g route the photometric radius should match the model radius
    from ..photometry.consistency import overluminosity

    ol = cfg["overluminous"]
    logg_err = out["logg_spec_err"].to_numpy(dtype=float) if "logg_spec_err" in out else np.full(n, np.nan)
    r_exp_err = np.full(n, np.nan)
    if by_logg.any():
        # radius error from the log g error, by finite differences through the table
        _, r_lo, _ = mr.mass_from_logg(logg_in[by_logg] - logg_err[by_logg], teff[by_logg])
        _, r_hi, _ = mr.mass_from_logg(logg_in[by_logg] + logg_err[by_logg], teff[by_logg])
        r_exp_err[by_logg] = 0.5 * np.abs(r_lo - r_hi)
    r_phot_err = out["radius_phot_err_rsun"].to_numpy(dtype=float) if "radius_phot_err_rsun" in out \
        else np.full(n, np.nan)
    check = overluminosity(np.where(by_logg, r_phot, np.nan), r_phot_err, np.where(by_logg, r, np.nan),
                           np.where(np.isfinite(r_exp_err), r_exp_err, 0.0),
                           min_ratio=ol["min_radius_ratio"], n_sigma=ol["n_sigma"])
    bits = set_flag(bits, "overluminous", check["overluminous"])
    out["radius_ratio"] = check["radius_ratio"]

    bits = set_flag(bits, "mass_from_radius", ~by_logg)
    from ..massradius.flags import mass_flags

    f = mass_flags(m, np.isfinite(m), cfg["low_mass_msun"], cfg["high_mass_msun"])
    bits = set_flag(bits, "mass_off_table", f["outside_table"])
    bits = set_flag(bits, "low_mass", f["low_mass"])
    bits = set_flag(bits, "high_mass", f["high_mass"])
    out["mass_msun"] = m
    out["radius_rsun"] = r
    out["logg"] = g
    out["mass_route"] = np.where(by_logg, "logg", "radius").astype(object)
    out[C.FLAGS] = bits
    return out
