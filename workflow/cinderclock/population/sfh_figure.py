"""Figure of the star-formation history: rate against lookback time, with the constant-rate fit (PNG and PDF)."""

from __future__ import annotations

import numpy as np

from .figures import AMBER, BRICK, INK, PLUM, TEAL, _RC, _note, _plt, save


def star_formation_history(sfh, summary, stem):
    """Rates per lookback bin (median and 16-84 % band, mean as markers) for each method, and the
    constant rate fitted back to the population age.

    Parameters
    ----------
    sfh : pandas.DataFrame
        :data:`cinderclock.population.sfh_stage.SFH_COLUMNS`.
    summary : dict
        Summary of the star-formation-history step.
    stem : path
        Output without suffix.
    """
    plt = _plt()
    with plt.rc_context(_RC):
        fig, ax = plt.subplots(figsize=(7.2, 4.6))
        if not summary.get("fitted") or not len(sfh):
            _note(ax, summary.get("not_fitted", "no star-formation history was fitted"))
        colours = {"luminosity_function": TEAL, "total_ages": PLUM}
        labels = {"luminosity_function": "from the luminosity function (posterior)",
                  "total_ages": "from per-star total ages (bootstrap)"}
        for method, part in sfh.groupby("method", sort=False) if len(sfh) else []:
            lo = part["lookback_lo_gyr"].to_numpy(dtype=float)
            hi = part["lookback_hi_gyr"].to_numpy(dtype=float)
            c = colours.get(method, INK)
            for a, b, p16, p84 in zip(lo, hi, part["rate_p16"], part["rate_p84"]):
                ax.fill_between([a, b], [p16, p16], [p84, p84], color=c, alpha=0.25, lw=0)
            x = np.concatenate([lo, hi[-1:]])
            med = part["rate_p50"].to_numpy(dtype=float)
            ax.step(x, np.concatenate([med, med[-1:]]), where="post", color=c, lw=2.0,
                    label=f"{labels.get(method, method)}: median, 16-84 %")
            ax.plot(0.5 * (lo + hi), part["rate_mean"], ls="none", marker="o", ms=4.5, color=c, mec="white", mew=0.6)
        const = summary.get("constant_rate")
        if const and const.get("rate") is not None and np.isfinite(const["rate"]):
            t = const["age_gyr"]
            ax.plot([0, t, t], [const["rate"], const["rate"], 0], color=BRICK, lw=1.5, ls="--",
                    label=f"constant rate back to the fitted age {t:.2f} Gyr")
        ax.axhline(0, color=INK, lw=0.6)
        ax.set_xlabel("lookback time (Gyr before present)")
        ax.set_ylabel("star-formation rate (progenitors pc$^{-3}$ Gyr$^{-1}$)")
        ax.set_title("Star-formation history")
        ess = (summary.get("luminosity_function") or {}).get("effective_samples")
        if ess is not None:
            ax.text(0.98, 0.97, f"prior: {summary['luminosity_function']['smoothing_dex']:g} dex between bins\n"
                                f"bulk ESS >= {ess:.0f}, R-hat <= "
                                f"{(summary['luminosity_function'].get('sampling') or {}).get('rhat_max', float('nan')):.3f}", transform=ax.transAxes, ha="right", va="top",
                    fontsize=8, color=INK)
        if ax.get_legend_handles_labels()[0]:
            ax.legend(frameon=True, framealpha=0.9, loc="upper left", fontsize=8)
        for w in summary.get("warnings", []):
            ax.text(0.02, 0.02, f"warning: {w['code']}", transform=ax.transAxes, color=AMBER, fontsize=8)
        return save(fig, stem)
