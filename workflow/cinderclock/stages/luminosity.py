"""Luminosity: distance, effective temperature, radius and bolometric luminosity of each candidate.

* **Distance.** The parallax is corrected for the configured zero point. At or above
  ``distance.min_parallax_over_error_inverse`` the distance is the inverse corrected parallax;
  below it, the mode of the posterior with an exponentially decreasing space-density prior
  (Bailer-Jones 2015) of length scale ``distance.prior_length_scale_pc``, with 16th/84th
  percentiles as bounds (flag ``distance_from_prior``).
* **Extinction.** None, one E(B-V) for all stars, or the catalogue's E(B-V) column; the law from
  dust_extinction with the configured R_V, applied to the model spectrum before it is integrated
  through each band (in the model table).
* **SED fit.** Teff and the solid angle (R/d)^2 are fitted to all available bands at once
  (chi-square over a Teff grid vectorised across the shard, then refined); where a spectroscopic
  Teff is given only the solid angle is fitted at that Teff. With two bands the fit reduces to
  the Teff of the observed colour. Radius R = d sqrt((R/d)^2), L = 4 pi R^2 sigma Teff^4 and M_bol
  (IAU 2015 B2) follow, with errors from the fit and the distance bounds.
"""

from __future__ import annotations

import numpy as np

from .. import columns as C
from ..reasons import Rejector, set_flag
from ..tableio import Column

STAGE = "luminosity"


def column_specs(bands):
    """Descriptions of the columns this stage adds."""
    specs = {
        "plx_corr_mas": Column("mas", "Parallax corrected for the zero point (plx_mas - plx_zp_mas)",
                               "pos.parallax.trig"),
        "dist_pc": Column("pc", "Distance: inverse corrected parallax, or the mode of the EDSD posterior",
                          "pos.distance"),
        "dist_lo_pc": Column("pc", "16th percentile of the distance", "pos.distance;stat.min"),
        "dist_hi_pc": Column("pc", "84th percentile of the distance", "pos.distance;stat.max"),
        "dist_method": Column("", "'inverse_parallax' or 'edsd_mode' (exponentially decreasing space-density prior)",
                              "meta.code"),
        "ebv_used_mag": Column("mag", "E(B-V) applied in the fit", "phot.color.excess"),
        "teff_k": Column("K", "Effective temperature used downstream", "phys.temperature.effective"),
        "teff_err_k": Column("K", "Uncertainty of teff_k", "stat.error;phys.temperature.effective"),
        "teff_source": Column("", "Where teff_k came from: 'spectroscopic', 'sed' (multi-band fit) or 'colour' "
                                  "(two bands)", "meta.code"),
        "sed_chi2": Column("", "Chi-square of the photometric fit", "stat.fit.chi2"),
        "sed_n_bands": Column("", "Number of bands used in the fit", "meta.number"),
        "mbol": Column("mag", "Absolute bolometric magnitude (IAU 2015 B2 scale)", "phys.magAbs.bol"),
        "mbol_err": Column("mag", "Uncertainty of mbol", "stat.error;phys.magAbs.bol"),
        "log_lum": Column("dex(solLum)", "log10 of the bolometric luminosity in nominal solar units",
                          "phys.luminosity"),
        "log_lum_err": Column("dex", "Uncertainty of log_lum", "stat.error;phys.luminosity"),
        "radius_phot_rsun": Column("solRad", "Photometric radius: distance times the square root of the fitted "
                                             "solid angle", "phys.size.radius"),
        "radius_phot_err_rsun": Column("solRad", "Uncertainty of radius_phot_rsun", "stat.error;phys.size.radius"),
        "log_solid_angle": Column("", "log10 of the fitted solid angle (R/d)^2", "phys.angSize"),
        "log_solid_angle_err": Column("", "Uncertainty of log_solid_angle", "stat.error;phys.angSize"),
        "teff_solid_angle_corr": Column("", "Correlation of log10 Teff and log_solid_angle in the fit",
                                        "stat.correlation"),
        "dlogteff_debv": Column("mag-1", "Derivative of log10 Teff of the fit with respect to E(B-V)", "arith.diff"),
        "dlogsa_debv": Column("mag-1", "Derivative of log_solid_angle with respect to E(B-V)", "arith.diff"),
    }
    for band in bands:
        specs[f"absmag_{band}"] = Column("mag", f"Absolute magnitude in band {band}, not corrected for extinction",
                                         "phys.magAbs")
    return specs


def luminosity(table, settings, grid):
    """Add distance, Teff, radius, M_bol and log L.

    Parameters
    ----------
    table : pandas.DataFrame
        Output of the select stage.
    settings : dict
        ``{"luminosity": ..., "astrometry": ..., "bands": ...}``.
    grid : cinderclock.photometry.grid.PhotometryGrid
        Model photometry for unit solid angle.

    Returns
    -------
    table, rejects : pandas.DataFrame
    """
    from ..distance import distances
    from ..photometry.sedfit import fit_sed

    lum = settings["luminosity"]
    bands = list(settings["bands"])
    out = table.copy()
    n = len(out)
    bits = out[C.FLAGS].to_numpy()
    rj = Rejector(STAGE, out[C.ID].to_numpy(), out[C.ROW].to_numpy())

    if "plx_zp_mas" in out:                        # each star's zero point, from the select stage
        zp = out["plx_zp_mas"].to_numpy(float)
    else:
        from .select import zero_points

        zp = zero_points(out, settings)[0]
    dcfg = lum["distance"]
    d = distances(out["plx_mas"].to_numpy(float), out["plx_err_mas"].to_numpy(float), zero_point_mas=zp,
                  min_snr_inverse=dcfg["min_parallax_over_error_inverse"],
                  length_scale_pc=dcfg["prior_length_scale_pc"])
    out["plx_corr_mas"] = out["plx_mas"].to_numpy(float) - zp
    out["dist_pc"] = d["distance_pc"]
    out["dist_lo_pc"] = d["distance_lo_pc"]
    out["dist_hi_pc"] = d["distance_hi_pc"]
    out["dist_method"] = d["method"].astype(object)
    bits = set_flag(bits, "distance_from_prior", d["method"] == "edsd_mode")
    with np.errstate(divide="ignore", invalid="ignore"):
        dm = 5 * np.log10(d["distance_pc"]) - 5.0          # distance modulus m - M
    for band in bands:
        out[f"absmag_{band}"] = out[C.mag_column(band)].to_numpy(float) - dm

    ext = lum["extinction"]
    if ext["mode"] == "none":
        ebv = np.zeros(n)
    elif ext["mode"] == "constant":
        ebv = np.full(n, float(ext["ebv_mag"]))
    else:
        ebv = out["ebv_mag"].to_numpy(float) if "ebv_mag" in out else np.full(n, np.nan)
        ebv = np.where(np.isfinite(ebv), ebv, float(ext["ebv_mag"]))
    too_red = ebv > grid.ebv[-1] + 1e-12
    rj.reject(too_red, "extinction_out_of_range",
              lambda i: [f"E(B-V) = {e:.3f} beyond the model table's {grid.ebv[-1]:.3f}" for e in ebv[i]])
    ebv = np.clip(ebv, 0.0, grid.ebv[-1])

    mags = np.column_stack([out[C.mag_column(b)].to_numpy(float) for b in grid.band_keys])
    errs = np.column_stack([out[C.mag_err_column(b)].to_numpy(float) for b in grid.band_keys])
    teff_spec = out["teff_spec_k"].to_numpy(float) if "teff_spec_k" in out else np.full(n, np.nan)
    teff_spec_err = out["teff_spec_err_k"].to_numpy(float) if "teff_spec_err_k" in out else np.full(n, np.nan)
    t_lo, t_hi = grid.teff_range_k
    rj.reject((teff_spec < t_lo) | (teff_spec > t_hi), "temperature_out_of_range",
              lambda i: [f"spectroscopic Teff {t:.0f} K outside the model photometry ({t_lo:.0f}-{t_hi:.0f} K)"
                         for t in teff_spec[i]])
    logg = out["logg_spec"].to_numpy(float) if "logg_spec" in out else np.full(n, np.nan)
    logg = np.where(np.isfinite(logg), logg, lum["default_logg"])
    if grid.gravity_dependent:
        rj.reject((logg < grid.logg[0]) | (logg > grid.logg[-1]), "gravity_out_of_range",
                  lambda i: [f"log g = {g:.2f} outside the table's {grid.logg[0]:.2f}-{grid.logg[-1]:.2f}"
                             for g in logg[i]])
    fit_args = dict(distance_pc=d["distance_pc"], distance_lo_pc=d["distance_lo_pc"], distance_hi_pc=d["distance_hi_pc"],
                    logg=logg if grid.gravity_dependent else None, teff_fixed_k=teff_spec,
                    teff_fixed_err_k=teff_spec_err, error_floor_mag=lum["error_floor_mag"])
    fit = fit_sed(mags, errs, grid, ebv=ebv, **fit_args)
    if ext["mode"] == "column" and "ebv_err_mag" in out and np.any(out["ebv_err_mag"].to_numpy(float) > 0):
        # slopes of the fit with respect to E(B-V), for the Monte Carlo propagation of its error
        step = max(float(lum["extinction"]["ebv_step_mag"]), 1e-3)
        sign = np.where(ebv + step <= grid.ebv[-1], 1.0, -1.0)
        fit2 = fit_sed(mags, errs, grid, ebv=ebv + sign * step, **fit_args)
        with np.errstate(divide="ignore", invalid="ignore"):
            out["dlogteff_debv"] = (np.log10(fit2["teff_k"]) - np.log10(fit["teff_k"])) / (sign * step)
            out["dlogsa_debv"] = (fit2["log_solid_angle"] - fit["log_solid_angle"]) / (sign * step)
    method = np.asarray(fit["method"])
    source = np.select([method == "fixed_teff", method == "sed", method == "colour"],
                       ["spectroscopic", "sed", "colour"], "none").astype(object)
    rj.reject(method == "none", "no_temperature",
              "no spectroscopic Teff and fewer than two usable bands (or no band inside the model table)")
    rj.reject(~np.isfinite(fit["log_lum"]), "temperature_out_of_range", "the fit found no Teff inside the model table")
    bits = set_flag(bits, "teff_from_photometry", (method == "sed") | (method == "colour"))
    bits = set_flag(bits, "teff_at_grid_edge", np.asarray(fit["teff_at_grid_edge"], dtype=bool))

    out["ebv_used_mag"] = ebv
    out["teff_k"] = fit["teff_k"]
    out["teff_err_k"] = fit["teff_err_k"]
    out["teff_source"] = source
    out["sed_chi2"] = fit["chi2"]
    out["sed_n_bands"] = np.asarray(fit["n_bands"], dtype=np.int64)
    out["mbol"] = fit["mbol"]
    out["mbol_err"] = fit["mbol_err"]
    out["log_lum"] = fit["log_lum"]
    out["log_lum_err"] = fit["log_lum_err"]
    out["radius_phot_rsun"] = fit["radius_rsun"]
    out["radius_phot_err_rsun"] = fit["radius_err_rsun"]
    out["log_solid_angle"] = fit["log_solid_angle"]
    out["log_solid_angle_err"] = fit["log_solid_angle_err"]
    out["teff_solid_angle_corr"] = fit["teff_solid_angle_corr"]
    out[C.FLAGS] = bits
    return out.loc[rj.alive].reset_index(drop=True), rj.rejects()


def model_cautions(grid_metadata, table):
    """Cautions for the output metadata: model spectra, extinction, distance prior."""
    from ..photometry.cautions import output_cautions

    return output_cautions(grid_metadata, bool((table["dist_method"] == "edsd_mode").any()) if len(table) else False)


def luminosity_models(settings, grid_metadata, table):
    """Provenance entries of the luminosity stage: the distance prior when any star's distance came
    from it (with its length scale), and the stage's cautions as an entry of kind ``caution``
    (not a model: it has no reference and the models tables leave it out)."""
    from ..distance import EDSD_BAILER_JONES_2015

    out = []
    used_prior = bool((table["dist_method"] == "edsd_mode").any()) if len(table) else False
    if used_prior:
        scale = (settings.get("luminosity") or {}).get("distance", {}).get("prior_length_scale_pc")
        out.append(EDSD_BAILER_JONES_2015.as_model() | {"length_scale_pc": scale,
                                                        "caution": EDSD_BAILER_JONES_2015.note})
    out.append({"name": "luminosity_cautions", "kind": "caution", "reference": "",
                "cautions": model_cautions(grid_metadata, table)})
    return out
