"""Binned luminosity function by the 1/Vmax method, with Poisson and bootstrap errors.

In a bin of width dM the space density per magnitude is Phi = sum_i (1/Vmax_i) / dM (Schmidt
1968, ApJ 151, 393). Its Poisson error treats each star's contribution as a Poisson count of
weight 1/Vmax: sigma = sqrt(sum_i 1/Vmax_i^2) / dM (common practice; white-dwarf luminosity
functions by 1/Vmax go back to Liebert, Dahn & Monet 1988, ApJ 332, 891, reference checked in
citing papers' reference lists; that they use this error form is unverified). The bootstrap error resamples the stars with
replacement and takes the standard deviation of Phi over the resamples; it also captures the
scatter of the weights.

Bootstrap numerics: only stars inside the binned range contribute, so each resample draws the
number of in-range stars from the binomial distribution a full resample implies, then draws that
many stars from the in-range ones -- the same distribution as resampling all N stars at a cost
that scales with the in-range stars only.
"""

from __future__ import annotations

import numpy as np

from ..errors import ConfigError


def edges_from_settings(bins):
    """Bin edges (mag) from ``{min, max, width}``."""
    lo, hi, w = float(bins["min"]), float(bins["max"]), float(bins["width"])
    if not (hi > lo and w > 0):
        raise ConfigError(f"population.mbol_bins: need max > min and width > 0 (got {bins})")
    n = int(round((hi - lo) / w))
    if n < 1 or not np.isclose(lo + n * w, hi, rtol=0, atol=1e-6 * w):
        raise ConfigError(f"population.mbol_bins: (max - min) must be a whole number of widths (got {bins})")
    return lo + w * np.arange(n + 1)


def bin_index(mbol, edges):
    """Bin of each value (-1 outside [edges[0], edges[-1]) or NaN)."""
    x = np.asarray(mbol, dtype=float)
    k = np.searchsorted(edges, x, side="right") - 1
    return np.where((k >= 0) & (k < len(edges) - 1) & np.isfinite(x), k, -1)


def binned_lf(mbol, inv_vmax, edges, v_over_vmax=None):
    """Luminosity function in M_bol bins.

    Parameters
    ----------
    mbol : array_like
        Absolute bolometric magnitudes (mag).
    inv_vmax : array_like
        1/Vmax of each star (pc^-3).
    edges : (K + 1,) array_like
        Ascending bin edges (mag).
    v_over_vmax : array_like, optional
        V/Vmax of each star, for the per-bin completeness statistic.

    Returns
    -------
    dict of (K,) ndarray
        ``mbol_lo``, ``mbol_hi``, ``mbol_mid`` (mag); ``n_stars``; ``phi`` and
        ``phi_err_poisson`` (pc^-3 mag^-1); ``sum_inv_vmax`` (pc^-3); ``vmax_harmonic_pc3``
        (n / sum 1/Vmax, NaN for empty bins); ``mean_v_over_vmax`` and ``v_over_vmax_sigma``
        (1/sqrt(12 n)).
    """
    edges = np.asarray(edges, dtype=float)
    k = bin_index(mbol, edges)
    w = np.asarray(inv_vmax, dtype=float)
    ok = (k >= 0) & np.isfinite(w)
    nb = edges.size - 1
    n = np.bincount(k[ok], minlength=nb)
    s1 = np.bincount(k[ok], weights=w[ok], minlength=nb)
    s2 = np.bincount(k[ok], weights=w[ok] ** 2, minlength=nb)
    width = np.diff(edges)
    out = {"mbol_lo": edges[:-1], "mbol_hi": edges[1:], "mbol_mid": 0.5 * (edges[:-1] + edges[1:]),
           "n_stars": n, "phi": s1 / width, "phi_err_poisson": np.sqrt(s2) / width, "sum_inv_vmax": s1}
    with np.errstate(divide="ignore", invalid="ignore"):
        out["vmax_harmonic_pc3"] = np.where(n > 0, n / s1, np.nan)
        if v_over_vmax is not None:
            r = np.asarray(v_over_vmax, dtype=float)
            good = ok & np.isfinite(r)
            sr = np.bincount(k[good], weights=r[good], minlength=nb)
            nr = np.bincount(k[good], minlength=nb)
            out["mean_v_over_vmax"] = np.where(nr > 0, sr / nr, np.nan)
            out["v_over_vmax_sigma"] = np.where(nr > 0, 1.0 / np.sqrt(12.0 * nr), np.nan)
    return out


def bootstrap_bin_sums(bins, weights, n_total, n_bins, n_boot, rng, batch=8):
    """Per-bin counts and weight sums of bootstrap resamples.

    Parameters
    ----------
    bins : (n_in,) ndarray of int
        Bin of each in-range star (0 .. n_bins - 1).
    weights : (n_in,) ndarray
        Weight of each in-range star (1/Vmax).
    n_total : int
        Size of the whole sample (in range or not) that a resample redraws.
    n_boot : int
        Number of resamples.
    rng : numpy.random.Generator

    Returns
    -------
    counts, sums : (n_boot, n_bins) ndarray
    """
    bins = np.asarray(bins)
    weights = np.asarray(weights, dtype=float)
    n_in = bins.size
    counts = np.zeros((n_boot, n_bins))
    sums = np.zeros((n_boot, n_bins))
    if n_in == 0 or n_boot == 0:
        return counts, sums
    draws = rng.binomial(n_total, n_in / n_total, size=n_boot)
    for b0 in range(0, n_boot, batch):
        sizes = draws[b0:b0 + batch]
        idx = rng.integers(0, n_in, size=int(sizes.sum()))
        which = np.repeat(np.arange(sizes.size), sizes)
        flat = which * n_bins + bins[idx]
        m = sizes.size * n_bins
        counts[b0:b0 + sizes.size] = np.bincount(flat, minlength=m).reshape(sizes.size, n_bins)
        sums[b0:b0 + sizes.size] = np.bincount(flat, weights=weights[idx], minlength=m).reshape(sizes.size, n_bins)
    return counts, sums


def bootstrap_lf_error(mbol, inv_vmax, edges, n_boot, seed):
    """Bootstrap standard deviation of Phi per bin (pc^-3 mag^-1).

    Parameters
    ----------
    mbol, inv_vmax, edges :
        As in :func:`binned_lf`.
    n_boot : int
        Number of resamples.
    seed : int
        Seed of the random generator (same seed, same errors).
    """
    edges = np.asarray(edges, dtype=float)
    k = bin_index(mbol, edges)
    w = np.asarray(inv_vmax, dtype=float)
    ok = (k >= 0) & np.isfinite(w)
    n_total = int(np.sum(np.isfinite(w)))
    rng = np.random.default_rng(seed)
    _, sums = bootstrap_bin_sums(k[ok], w[ok], max(n_total, 1), edges.size - 1, int(n_boot), rng)
    if n_boot < 2:
        return np.full(edges.size - 1, np.nan)
    return sums.std(axis=0, ddof=1) / np.diff(edges)
