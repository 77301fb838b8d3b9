"""Luminosity: distance, effective temperature and bolometric luminosity of each candidate.

Baseline method: distance is the inverse of the zero-point-corrected parallax (the selection keeps
only stars with a parallax signal-to-noise above its limit); Teff is the spectroscopic value when
given, otherwise the value whose model colour matches the observed colour; the bolometric
magnitude is the absolute magnitude in the preferred band plus the model bolometric correction at
that Teff (the next configured band is used when the preferred one is missing).
"""

from __future__ import annotations

import numpy as np

from .. import columns as C
from ..constants import L_SUN_W, R_SUN_M, SIGMA_SB_SI
from ..photometry.bolometric import log_lum_from_mbol
from ..reasons import Rejector, set_flag
from ..tableio import Column

STAGE = "luminosity"


def column_specs(bands):
    """Descriptions of the columns this stage adds."""
    specs = {
        "plx_corr_mas": Column("mas", "Parallax corrected for the configured zero point", "pos.parallax.trig"),
        "dist_pc": Column("pc", "Distance from the corrected parallax", "pos.distance"),
        "teff_k": Column("K", "Effective temperature used downstream (spectroscopic if given, else photometric)",
                         "phys.temperature.effective"),
        "teff_source": Column("", "Where teff_k came from: 'spectroscopic' or 'colour'", "meta.code"),
        "bc_band": Column("", "Band whose bolometric correction gave mbol", "meta.id;instr.filter"),
        "mbol": Column("mag", "Absolute bolometric magnitude (IAU 2015 B2 scale)", "phys.magAbs.bol"),
        "log_lum": Column("dex(solLum)", "log10 of the bolometric luminosity in nominal solar units",
                          "phys.luminosity"),
        "radius_phot_rsun": Column("solRad", "Radius from L = 4 pi R^2 sigma Teff^4", "phys.size.radius"),
    }
    for band in bands:
        specs[f"absmag_{band}"] = Column("mag", f"Absolute magnitude in band {band} (no extinction correction)",
                                         "phys.magAbs")
    return specs


def luminosity(table, settings, phot):
    """Add distance, Teff, M_bol, log L and the photometric radius.

    Parameters
    ----------
    table : pandas.DataFrame
        Output of the select stage.
    settings : dict
        ``{"luminosity": ..., "astrometry": ..., "bands": ...}``.
    phot : cinderclock.stages.models.PhotometryModel
        Model photometry.
    """
    lum = settings["luminosity"]
    bands = list(settings["bands"])
    out = table.copy()
    bits = out[C.FLAGS].to_numpy()
    plx = out["plx_mas"].to_numpy(dtype=float) - settings["astrometry"]["parallax_zero_point_mas"]
    with np.errstate(divide="ignore", invalid="ignore"):
        out["plx_corr_mas"] = plx
        out["dist_pc"] = 1000.0 / plx
        dm = 5 * np.log10(plx) - 10.0          # M = m + 5 log10(plx/mas) - 10
    for band in bands:
        out[f"absmag_{band}"] = out[C.mag_column(band)].to_numpy(dtype=float) + dm

    teff = out["teff_spec_k"].to_numpy(dtype=float).copy() if "teff_spec_k" in out else np.full(len(out), np.nan)
    source = np.where(np.isfinite(teff), "spectroscopic", "colour").astype(object)
    need = ~np.isfinite(teff)
    b1, b2 = lum["teff_colour"]
    colour = out[C.mag_column(b1)].to_numpy(dtype=float) - out[C.mag_column(b2)].to_numpy(dtype=float)
    teff[need] = phot.teff_from_colour(b1, b2, colour[need])
    bits = set_flag(bits, "teff_from_photometry", need)

    rj = Rejector(STAGE, out[C.ID].to_numpy(), out[C.ROW].to_numpy())
    rj.reject(need & ~np.isfinite(colour), "no_temperature", f"no spectroscopic Teff and no {b1}-{b2} colour")
    rj.reject(~np.isfinite(teff), "temperature_out_of_range",
              lambda i: [f"{b1}-{b2} = {c:.3f} outside the model colours" for c in colour[i]])

    order = [lum["bolometric_band"]] + [b for b in bands if b != lum["bolometric_band"]]
    mbol = np.full(len(out), np.nan)
    used = np.full(len(out), "", dtype=object)
    for band in order:
        est = out[f"absmag_{band}"].to_numpy(dtype=float) + phot.bc(band, teff)
        take = ~np.isfinite(mbol) & np.isfinite(est)
        mbol[take] = est[take]
        used[take] = band
    rj.reject(~np.isfinite(mbol), "temperature_out_of_range", "no band with a bolometric correction at this Teff")
    log_lum = log_lum_from_mbol(mbol)
    radius = np.sqrt(10.0**log_lum * L_SUN_W / (4 * np.pi * SIGMA_SB_SI * teff**4)) / R_SUN_M

    out["teff_k"] = teff
    out["teff_source"] = source
    out["bc_band"] = used
    out["mbol"] = mbol
    out["log_lum"] = log_lum
    out["radius_phot_rsun"] = radius
    out[C.FLAGS] = bits
    return out.loc[rj.alive].reset_index(drop=True), rj.rejects()
