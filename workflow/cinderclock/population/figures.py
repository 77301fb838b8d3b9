"""Figures of a run (matplotlib, Agg backend), each written as PNG and PDF.

* :func:`colour_magnitude` -- the sample in the absolute-magnitude/colour plane with model cooling
  tracks computed from the run's mass-radius and photometry tables (and cooling-age marks from
  its cooling model);
* :func:`mass_distribution` -- histogram of masses by mass route;
* :func:`age_distributions` -- cooling ages and, if the table has them, total ages, with the
  fitted population age;
* :func:`luminosity_function` -- the 1/Vmax luminosity function with the fitted model;
* :func:`age_fit` -- profile likelihood and bootstrap ages of the population-age fit.

Colours, markers and layout are our own. Every axis carries its unit.
"""

from __future__ import annotations

import numpy as np

#: Our palette.
INK = "#22313f"
TEAL = "#1f7a8c"
AMBER = "#e09f3e"
BRICK = "#9e2a2b"
SAGE = "#6b8f5e"
PLUM = "#5c415d"
MIST = "#c9d6df"

_RC = {
    "font.size": 10, "axes.titlesize": 11, "axes.labelsize": 10, "legend.fontsize": 8.5,
    "axes.spines.top": False, "axes.spines.right": False, "axes.grid": True, "grid.color": "#e4e8ec",
    "grid.linewidth": 0.6, "axes.edgecolor": INK, "axes.labelcolor": INK, "xtick.color": INK,
    "ytick.color": INK, "savefig.dpi": 150, "figure.dpi": 100,
}


def _plt():
    import logging

    import matplotlib

    logging.getLogger("fontTools").setLevel(logging.WARNING)     # font subsetting chatter of the PDF backend

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    return plt


def save(fig, stem):
    """Write ``stem.png`` and ``stem.pdf``; return the two paths."""
    from pathlib import Path

    stem = Path(stem)
    stem.parent.mkdir(parents=True, exist_ok=True)
    paths = [stem.with_suffix(".png"), stem.with_suffix(".pdf")]
    for p in paths:
        fig.savefig(p, bbox_inches="tight", metadata={"Creator": "cinderclock"} if p.suffix == ".pdf" else None)
    _plt().close(fig)
    return paths


def _values(table, name):
    """A column as floats, or NaN for every row when the table lacks it (e.g. an empty final table)."""
    return table[name].to_numpy(dtype=float) if name in table else np.full(len(table), np.nan)


def _note(ax, text):
    ax.text(0.5, 0.5, text, transform=ax.transAxes, ha="center", va="center", fontsize=9, color=INK,
            wrap=True, bbox={"boxstyle": "round,pad=0.6", "facecolor": "#f4f6f8", "edgecolor": MIST})


# ------------------------------------------------------------------------------------ tracks
def cmd_tracks(mass_radius, photometry, colour, band, masses_msun, age_yr=None, tolerance_msun=0.03):
    """Model cooling tracks in the absolute-magnitude/colour plane.

    For each requested mass the nearest mass of the mass-radius table (within ``tolerance_msun``)
    gives R(Teff); the photometry table's synthetic magnitudes for unit solid angle give
    M_X = m_unit,X(Teff) - 5 log10(R / 10 pc). Cooling ages along the track come from
    ``age_yr(mass, log L)`` with L = 4 pi R^2 sigma Teff^4.

    Parameters
    ----------
    mass_radius : pandas.DataFrame
        Long-format mass-radius table (``mass_msun``, ``teff_k``, ``radius_rsun``).
    photometry : pandas.DataFrame
        The run's photometry model table (``results/models/photometry.parquet``); its unreddened
        magnitudes for unit solid angle are used (at log g 8 for gravity-dependent user tables).
    colour : (str, str)
        Bands of the colour.
    band : str
        Band of the absolute magnitude.
    masses_msun : iterable of float
    age_yr : callable, optional
        ``(mass_msun, log_lum) -> cooling age (yr)``.

    Returns
    -------
    list of dict
        ``mass_msun``, ``colour``, ``absmag``, ``teff_k``, ``age_yr`` (NaN without a cooling
        model), sorted by Teff descending.
    """
    from ..constants import L_SUN_W, PC_M, R_SUN_M, SIGMA_SB_SI

    from ..photometry.grid import PhotometryGrid

    grid_m = np.unique(mass_radius["mass_msun"].to_numpy(dtype=float))
    phot = PhotometryGrid.from_frame(photometry)
    logg = 8.0 if phot.gravity_dependent else None

    def unit_mag(b, teff):
        return phot.magnitudes(teff, 0.0, logg)[:, phot.band_index([b])[0]]

    tracks = []
    for target in masses_msun:
        j = int(np.argmin(np.abs(grid_m - target)))
        if abs(grid_m[j] - target) > tolerance_msun:
            continue
        rows = mass_radius[mass_radius["mass_msun"].to_numpy(dtype=float) == grid_m[j]].sort_values(
            "teff_k", ascending=False)
        teff = rows["teff_k"].to_numpy(dtype=float)
        r = rows["radius_rsun"].to_numpy(dtype=float)
        absmag = unit_mag(band, teff) - 5.0 * np.log10(r * R_SUN_M / (10.0 * PC_M))
        col = unit_mag(colour[0], teff) - unit_mag(colour[1], teff)
        logl = np.log10(4 * np.pi * (r * R_SUN_M) ** 2 * SIGMA_SB_SI * teff**4 / L_SUN_W)
        ages = np.full(teff.shape, np.nan)
        if age_yr is not None:
            ages = np.asarray(age_yr(np.full(teff.shape, grid_m[j]), logl), dtype=float)
        ok = np.isfinite(absmag) & np.isfinite(col)
        tracks.append({"mass_msun": float(grid_m[j]), "colour": col[ok], "absmag": absmag[ok], "teff_k": teff[ok],
                       "age_yr": ages[ok]})
    return tracks


# ------------------------------------------------------------------------------------ figures
def colour_magnitude(table, tracks, colour, band, stem, age_marks_gyr=(0.1, 1.0, 5.0), title=None):
    """Colour-magnitude diagram of the sample with model cooling tracks (PNG and PDF)."""
    plt = _plt()
    from matplotlib import patheffects
    from matplotlib.colors import LinearSegmentedColormap

    with plt.rc_context(_RC):
        fig, ax = plt.subplots(figsize=(6.4, 6.2))
        x = _values(table, f"absmag_{colour[0]}") - _values(table, f"absmag_{colour[1]}")
        y = _values(table, f"absmag_{band}")
        mass = _values(table, "mass_msun")
        ok = np.isfinite(x) & np.isfinite(y)
        cmap = LinearSegmentedColormap.from_list("cinder", [AMBER, BRICK, PLUM, INK])
        has_mass = ok & np.isfinite(mass)
        if ok.sum() <= DENSITY_ABOVE:
            raster = bool(ok.sum() > 5000)            # keep the PDF small for large samples
            if (ok & ~has_mass).any():
                ax.scatter(x[ok & ~has_mass], y[ok & ~has_mass], s=9, marker="D", color="#9aa5ae", lw=0,
                           label="no mass", zorder=2, rasterized=raster)
            sc = ax.scatter(x[has_mass], y[has_mass], c=mass[has_mass], cmap=cmap, vmin=0.4, vmax=1.2, s=9,
                            marker="D", lw=0, alpha=0.8, zorder=2, rasterized=raster)
            label = "white-dwarf mass (M$_\\odot$)"
        else:
            # large samples: mean mass in cells of the diagram (one image instead of millions of markers)
            xr = np.nanpercentile(x[ok], [0.2, 99.8]) + [-0.25, 0.25]
            yr = np.nanpercentile(y[ok], [0.1, 99.9]) + [-0.7, 0.7]
            n_cell, xe, ye = np.histogram2d(x[has_mass], y[has_mass], bins=(300, 300), range=(xr, yr))
            m_sum, _, _ = np.histogram2d(x[has_mass], y[has_mass], bins=(xe, ye), weights=mass[has_mass])
            with np.errstate(invalid="ignore", divide="ignore"):
                mean = np.where(n_cell > 0, m_sum / n_cell, np.nan)
            sc = ax.pcolormesh(xe, ye, mean.T, cmap=cmap, vmin=0.4, vmax=1.2, zorder=2, rasterized=True)
            label = "mean white-dwarf mass in the cell (M$_\\odot$)"
        cb = fig.colorbar(sc, ax=ax, pad=0.02, shrink=0.85)
        cb.set_label(label)
        halo = [patheffects.Stroke(linewidth=3.6, foreground="white"), patheffects.Normal()]
        for i, t in enumerate(tracks):
            c = cmap(np.clip((t["mass_msun"] - 0.4) / 0.8, 0, 1))
            ax.plot(t["colour"], t["absmag"], color=c, lw=1.8, zorder=3, path_effects=halo,
                    label=f"model track {t['mass_msun']:.2f} M$_\\odot$")
            if np.isfinite(t["age_yr"]).any():
                for a in age_marks_gyr:
                    age = t["age_yr"]
                    if np.nanmin(age) <= a * 1e9 <= np.nanmax(age):
                        o = np.argsort(age)
                        xa = np.interp(np.log10(a * 1e9), np.log10(age[o]), t["colour"][o])
                        ya = np.interp(np.log10(a * 1e9), np.log10(age[o]), t["absmag"][o])
                        ax.plot(xa, ya, marker="h", ms=6, mfc="white", mec=c, mew=1.3, zorder=4)
                        if i == len(tracks) - 1:
                            ax.annotate(f"{a:g} Gyr", (xa, ya), xytext=(7, -3), textcoords="offset points",
                                        fontsize=8, color=INK)
        if ok.any():
            ax.set_xlim(np.nanpercentile(x[ok], 0.2) - 0.25, np.nanpercentile(x[ok], 99.8) + 0.25)
            ax.set_ylim(np.nanpercentile(y[ok], 99.9) + 0.7, np.nanpercentile(y[ok], 0.1) - 0.7)
        else:
            ax.invert_yaxis()
        ax.set_xlabel(f"{colour[0]} $-$ {colour[1]} (mag)")
        ax.set_ylabel(f"absolute magnitude M$_{{{band}}}$ (mag)")
        ax.set_title(title or f"Colour-magnitude diagram ({int(ok.sum()):,} white dwarfs)")
        marks = ", ".join(f"{a:g}" for a in age_marks_gyr)
        if any(np.isfinite(t["age_yr"]).any() for t in tracks):
            ax.plot([], [], ls="none", marker="h", mfc="white", mec=INK, label=f"cooling ages {marks} Gyr")
        if ax.get_legend_handles_labels()[0]:
            ax.legend(loc="lower left", frameon=True, framealpha=0.9)
        return save(fig, stem)


def mass_distribution(table, stem, bin_width=0.02):
    """Histogram of white-dwarf masses, stacked by mass route (PNG and PDF)."""
    plt = _plt()
    with plt.rc_context(_RC):
        fig, ax = plt.subplots(figsize=(6.4, 4.2))
        m = _values(table, "mass_msun")
        ok = np.isfinite(m)
        bins = np.arange(0.2, 1.42 + 1e-9, bin_width)
        if ok.any():
            routes = table["mass_route"].astype(str).to_numpy() if "mass_route" in table else np.full(m.shape, "all")
            names = {"logg": "from spectroscopic log g", "radius": "from photometric radius"}
            groups = [r for r in ("logg", "radius") if np.any(routes[ok] == r)] or sorted(set(routes[ok]))
            data = [m[ok & (routes == r)] for r in groups]
            ax.hist(data, bins=bins, stacked=True, color=[TEAL, AMBER, PLUM][:len(data)], edgecolor="white",
                    linewidth=0.4, label=[names.get(r, str(r)) for r in groups])
            med = float(np.median(m[ok]))
            ax.axvline(med, color=BRICK, lw=1.4, ls="--", label=f"median {med:.3f} M$_\\odot$")
            ax.legend(frameon=False)
        else:
            _note(ax, "no masses in this table")
        ax.set_xlabel("white-dwarf mass (M$_\\odot$)")
        ax.set_ylabel(f"stars per {bin_width:g} M$_\\odot$")
        ax.set_title(f"Mass distribution ({int(ok.sum()):,} stars with a mass)")
        return save(fig, stem)


def age_distributions(table, stem, population_age=None):
    """Cooling-age and total-age histograms (PNG and PDF).

    ``population_age`` is ``(age, low68, high68)`` in Gyr or None; the total-age panel shows a note
    when the table has no ``total_age_gyr`` column.
    """
    plt = _plt()
    from matplotlib.ticker import FuncFormatter, LogLocator, NullFormatter

    with plt.rc_context(_RC):
        fig, axes = plt.subplots(1, 2, figsize=(10.5, 4.2), sharey=False)
        panels = (("cool_age_gyr", "cooling age", TEAL), ("total_age_gyr", "total age (cooling + progenitor)", PLUM))
        for ax, (col, label, colour) in zip(axes, panels):
            if col not in table:
                _note(ax, f"No '{col}' column in this table:\nthe total-age stage has not run,\nso total ages "
                          "are not shown.")
                ax.set_xlabel(f"{label} (Gyr)")
                ax.set_title(label.capitalize())
                ax.set_xticks([])
                ax.set_yticks([])
                continue
            a = table[col].to_numpy(dtype=float)
            ok = np.isfinite(a) & (a > 0)
            if ok.any():
                lo = max(np.nanmin(a[ok]), 1e-3)
                bins = np.logspace(np.log10(lo), np.log10(max(np.nanmax(a[ok]), 15.0)), 40)
                ax.hist(a[ok], bins=bins, color=colour, edgecolor="white", linewidth=0.4,
                        label=f"{int(ok.sum()):,} stars")
                ax.set_xscale("log")
                decades = np.log10(bins[-1] / bins[0])
                ax.xaxis.set_major_locator(LogLocator(base=10, subs=(1.0, 2.0, 5.0) if decades <= 2.5 else (1.0,)))
                ax.xaxis.set_major_formatter(FuncFormatter(lambda v, _: f"{v:g}"))
                ax.xaxis.set_minor_formatter(NullFormatter())
            else:
                _note(ax, f"no finite {label}s")
            if population_age is not None and np.isfinite(population_age[0]):
                t, lo68, hi68 = population_age
                ax.axvspan(lo68, hi68, color=AMBER, alpha=0.35, lw=0, zorder=0)
                ax.axvline(t, color=BRICK, lw=1.6, label=f"population age {t:.2f} Gyr (68 % band)")
            ax.set_xlabel(f"{label} (Gyr)")
            ax.set_ylabel("stars per bin (log-spaced bins)")
            ax.set_title(label.capitalize())
            if ok.any():
                ax.legend(frameon=False, loc="upper left")
        fig.tight_layout()
        return save(fig, stem)


#: Above this many stars the colour-magnitude diagram shows cells of mean mass instead of markers.
DENSITY_ABOVE = 50_000
#: Longest lower error bar drawn in the luminosity function (dex).
LOWER_BAR_DEX = 1.0


def luminosity_function(lf, stem, model=None, fit=None, error_column="phi_err_poisson", note=None):
    """1/Vmax luminosity function with the fitted model (PNG and PDF).

    Parameters
    ----------
    lf : pandas.DataFrame
        Binned luminosity function (``mbol_mid``, ``phi``, the error column, ``n_stars``).
    model : pandas.DataFrame, optional
        ``mbol_mid``, ``phi_model`` and optionally ``phi_model_low``/``phi_model_high``.
    fit : dict, optional
        Summary of the age fit (``age_gyr``, ``interval68_gyr``, ``fit_edges_mbol``).
    note : str, optional
        Text shown in the lower right corner (e.g. the <V/Vmax> statistic).
    """
    plt = _plt()
    with plt.rc_context(_RC):
        fig, ax = plt.subplots(figsize=(6.8, 4.8))
        ok = (lf["n_stars"].to_numpy() > 0) & (lf["phi"].to_numpy(dtype=float) > 0)
        x = lf["mbol_mid"].to_numpy(dtype=float)[ok]
        phi = lf["phi"].to_numpy(dtype=float)[ok]
        err = lf[error_column].to_numpy(dtype=float)[ok]
        y = np.log10(phi)
        with np.errstate(divide="ignore", invalid="ignore"):
            # lower bars reaching zero density (one-star bins) are drawn 1 dex long
            lo = np.where(phi - err > 0, y - np.log10(np.clip(phi - err, 1e-300, None)), np.inf)
            lo = np.minimum(lo, LOWER_BAR_DEX)
            hi = np.log10(phi + err) - y
        if fit and fit.get("fit_edges_mbol"):
            e = fit["fit_edges_mbol"]
            ax.axvspan(e[0], e[-1], color=MIST, alpha=0.45, lw=0, label="fitted range")
        if fit and fit.get("age_gyr") is None:
            fit = dict(fit, age_gyr=float("nan"))
            model = None
        if model is not None and len(model):
            xm = model["mbol_mid"].to_numpy(dtype=float)
            pm = model["phi_model"].to_numpy(dtype=float)
            pos = pm > 0
            if fit:
                lab = f"model, T = {fit['age_gyr']:.2f} Gyr"
            else:
                lab = "model"
            if "phi_model_low" in model and "phi_model_high" in model:
                for c, ls, txt in (("phi_model_low", (0, (4, 2)), "16 %"), ("phi_model_high", (0, (1, 1.5)), "84 %")):
                    pv = model[c].to_numpy(dtype=float)
                    pp = pv > 0
                    age = fit["interval68_gyr"][0 if c.endswith("low") else 1] if fit else float("nan")
                    ax.plot(xm[pp], np.log10(pv[pp]), color=TEAL, lw=1.0, ls=ls, alpha=0.9,
                            label=f"model at the {txt} bootstrap age ({age:.2f} Gyr)")
            ax.plot(xm[pos], np.log10(pm[pos]), color=TEAL, lw=2.0, label=lab)
        ax.errorbar(x, y, yerr=[lo, hi], fmt="D", ms=4.5, color=BRICK, mfc=BRICK, mec="white", mew=0.6,
                    elinewidth=1.1, capsize=2, label="1/V$_{max}$ estimate", zorder=5)
        ax.set_xlabel("absolute bolometric magnitude M$_{bol}$ (mag)")
        ax.set_ylabel("log$_{10}$ $\\Phi$ (pc$^{-3}$ mag$^{-1}$)")
        n = int(lf["n_stars"].sum())
        ax.set_title(f"White-dwarf luminosity function ({n:,} stars)")
        if len(y):
            ax.set_ylim(np.nanmin(y - lo) - 0.3, np.nanmax(y + np.nan_to_num(hi)) + 0.9)
        if note:
            ax.text(0.98, 0.04, note, transform=ax.transAxes, ha="right", va="bottom", fontsize=8.5, color=INK,
                    bbox={"boxstyle": "round,pad=0.4", "facecolor": "white", "edgecolor": MIST})
        ax.legend(frameon=True, framealpha=0.9, loc="upper left")
        return save(fig, stem)


def age_fit(fit, profile, stem):
    """Profile likelihood and bootstrap distribution of the population age (PNG and PDF)."""
    plt = _plt()
    with plt.rc_context(_RC):
        fig, (a1, a2) = plt.subplots(1, 2, figsize=(10.5, 4.0))
        if fit.get("age_gyr") is None:
            for ax in (a1, a2):
                _note(ax, "\n".join(fit.get("cautions", ["no population-age fit"])[:1]))
                ax.set_xlabel("population age T (Gyr)")
            a1.set_title("Likelihood of the population age")
            a2.set_title("Bootstrap distribution")
            fig.tight_layout()
            return save(fig, stem)
        t = profile["age_gyr"].to_numpy(dtype=float)
        d = profile["delta_lnl"].to_numpy(dtype=float)
        best = fit["age_gyr"]
        keep = d > -30
        a1.plot(t[keep], d[keep], color=TEAL, lw=1.8, label="profile log-likelihood")
        a1.axhline(-0.5, color=AMBER, lw=1.2, ls="--", label="$\\Delta$ ln L = $-$0.5")
        a1.axvline(best, color=BRICK, lw=1.4, label=f"best fit {best:.2f} Gyr")
        a1.set_xlabel("population age T (Gyr)")
        a1.set_ylabel("ln L $-$ ln L$_{max}$")
        a1.set_title("Likelihood of the population age")
        if keep.any():
            span = t[keep]
            a1.set_xlim(span.min(), span.max())
            a1.set_ylim(max(-30, d[keep].min()) - 0.5, 1.0)
        a1.legend(frameon=False, loc="lower center")
        boot = np.asarray(fit.get("bootstrap_ages_gyr", []), dtype=float)
        if boot.size:
            a2.hist(boot, bins=min(40, max(10, boot.size // 10)), color=PLUM, edgecolor="white", linewidth=0.4,
                    label=f"{boot.size} bootstrap resamples")
            lo68, hi68 = fit["interval68_gyr"]
            a2.axvspan(lo68, hi68, color=AMBER, alpha=0.3, lw=0, zorder=0, label=f"68 %: {lo68:.2f}$-${hi68:.2f} Gyr")
            a2.axvline(best, color=BRICK, lw=1.4, label=f"best fit {best:.2f} Gyr")
            a2.legend(frameon=True, framealpha=0.9, loc="upper left")
        else:
            _note(a2, "no bootstrap resamples were requested")
        a2.set_xlabel("population age T (Gyr)")
        a2.set_ylabel("resamples per bin")
        a2.set_title("Bootstrap distribution")
        fig.tight_layout()
        return save(fig, stem)
