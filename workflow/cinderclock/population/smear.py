"""Measurement errors in the model luminosity function: folding the model with the stars' M_bol errors.

A star of true magnitude M is observed at M + e, with e drawn from a normal of the star's own
standard error sigma (``mbol_err`` of the luminosity stage: photometric fit and distance). The
model is therefore compared with the data only after it has been folded with the error
distribution of the sample:

    mu_k = A sum_j m_j dM_j v(M_j) R_jk,
    R_jk = < Phi((M_hi,k - M_j) / sigma) - Phi((M_lo,k - M_j) / sigma) >_sigma,

where m_j is the model on a fine grid of true magnitudes (cells of width dM_j, centres M_j),
v(M) the survey's volume at the *true* magnitude (log Vmax of the stars against their M_bol,
interpolated through the bins' mean points and continued beyond them as in
:func:`cinderclock.population.agefit.exposures`; :func:`volume_points`), and the average runs over the errors of the
stars observed in the bin that holds M_j (per bin, a set of quantiles of the stars' own errors;
a bin without stars borrows the nearest occupied bin's). Without errors R is the indicator of the
bin holding M_j and mu_k reduces to the unfolded A m_k e_k of the age fit.

The folded model is returned in the form the likelihood uses, an "effective" model
m'_k = sum_j m_j dM_j v_j R_jk / e_k, so that mu_k = A m'_k e_k with the exposure e_k of the
observed bin.

Approximations (our choices): the errors of the stars *observed* in a bin stand for those of the
stars whose *true* magnitude lies there (errors change slowly with magnitude); errors are normal
in M_bol and capped at ``max_sigma_mag``; the selection acts on the true magnitude through v(M)
(the survey's magnitude limit is on the measured apparent magnitude, whose error is usually much
smaller than that of M_bol, which carries the parallax error).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .agefit import EXPOSURE_SLOPE_RANGE
from .lf import bin_index

#: Quantiles of the per-bin error distribution used in the fold.
N_QUANTILES = 9


@dataclass(frozen=True)
class ErrorFold:
    """The fine grid and response of a fold (see the module docstring).

    Attributes
    ----------
    fine_edges : (J + 1,) ndarray
        Edges of the fine grid of true magnitudes (mag), reaching ``pad`` bins beyond the fitted range.
    response : (J, K) ndarray
        R_jk, the probability that a star of true magnitude M_j is observed in fitted bin k.
    sigma : (J, Q) ndarray
        The error quantiles (mag) used for each fine cell.
    median_sigma_mag : float
        Median error of the stars in the fitted range (mag).
    """

    fine_edges: np.ndarray
    response: np.ndarray
    sigma: np.ndarray
    median_sigma_mag: float

    def effective_model(self, model_fine, volume_per_mag, exposure):
        """Folded model m'_k (same units as ``model_fine``).

        Parameters
        ----------
        model_fine : (T, J) ndarray
            Model luminosity function on :attr:`fine_edges` (per magnitude).
        volume_per_mag : (J,) ndarray
            v(M_j) (pc^3), see :func:`volume_per_mag`.
        exposure : (K,) ndarray
            Exposures e_k of the fitted bins (pc^3 mag).
        """
        cells = np.asarray(model_fine, dtype=float) * (np.diff(self.fine_edges) * volume_per_mag)[None, :]
        return (cells @ self.response) / np.asarray(exposure, dtype=float)[None, :]


def _bin_quantiles(mbol, sigma, edges, max_sigma_mag):
    """(K, Q) quantiles of the errors of the stars observed in each bin; NaN rows where a bin has none."""
    k = bin_index(mbol, edges)
    ok = (k >= 0) & np.isfinite(sigma)
    s = np.clip(sigma[ok], 0.0, max_sigma_mag)
    kk = k[ok]
    q = (np.arange(N_QUANTILES) + 0.5) / N_QUANTILES
    out = np.full((edges.size - 1, N_QUANTILES), np.nan)
    if s.size == 0:
        return out
    order = np.lexsort((s, kk))                     # sorted by bin, then error: quantiles by index
    s, kk = s[order], kk[order]
    starts = np.searchsorted(kk, np.arange(edges.size - 1), side="left")
    stops = np.searchsorted(kk, np.arange(edges.size - 1), side="right")
    n = stops - starts
    has = n > 0
    pos = starts[has, None] + np.floor(q[None, :] * n[has, None]).astype(int)
    out[has] = s[pos]
    return out


def _nearest_filled(rows):
    """Replace NaN rows of ``rows`` (K, Q) by the nearest row that has values (ties: the brighter one)."""
    good = np.flatnonzero(np.isfinite(rows[:, 0]))
    if good.size == 0:
        return np.zeros_like(rows)
    idx = np.arange(rows.shape[0])
    nearest = good[np.argmin(np.abs(idx[:, None] - good[None, :]), axis=1)]
    return rows[nearest]


def build_fold(mbol, mbol_err, edges, max_sigma_mag=1.0, subdivisions=5):
    """The fine grid and response matrix of the fold for a sample.

    Parameters
    ----------
    mbol, mbol_err : array_like
        Observed M_bol and its standard error (mag) of the usable stars (any range).
    edges : (K + 1,) array_like
        Evenly spaced edges of the fitted bins (mag).
    max_sigma_mag : float
        Errors are capped here (mag); it also sets how far beyond the fitted range the fine grid reaches.
    subdivisions : int
        Fine cells per bin.

    Returns
    -------
    ErrorFold
    """
    from scipy.special import ndtr

    edges = np.asarray(edges, dtype=float)
    mbol = np.asarray(mbol, dtype=float)
    sigma = np.asarray(mbol_err, dtype=float)
    width = float(edges[1] - edges[0])
    in_fit = (bin_index(mbol, edges) >= 0) & np.isfinite(sigma)
    med = float(np.median(np.clip(sigma[in_fit], 0, max_sigma_mag))) if in_fit.any() else 0.0
    reach = min(float(max_sigma_mag), 4.0 * float(np.max(np.clip(sigma[in_fit], 0, max_sigma_mag)))) \
        if in_fit.any() else 0.0
    pad = int(np.ceil(reach / width - 1e-9))
    ext = edges[0] + width * np.arange(-pad, edges.size + pad)            # coarse bins with padding
    quant = _nearest_filled(_bin_quantiles(mbol, sigma, ext, max_sigma_mag))
    sub = int(subdivisions)
    fine = ext[0] + (width / sub) * np.arange((ext.size - 1) * sub + 1)
    centres = 0.5 * (fine[:-1] + fine[1:])
    sig = quant[np.clip(np.arange(centres.size) // sub, 0, quant.shape[0] - 1)]       # (J, Q)
    with np.errstate(divide="ignore", invalid="ignore"):
        z = (edges[None, None, :] - centres[:, None, None]) / sig[:, :, None]        # (J, Q, K + 1)
    # P(observed below each edge); for an exact (zero) error the indicator (bins are left-closed)
    cdf = np.where(sig[:, :, None] > 0, ndtr(z), (edges[None, None, :] > centres[:, None, None]).astype(float))
    response = np.diff(cdf, axis=2).mean(axis=1)
    return ErrorFold(fine_edges=fine, response=np.clip(response, 0.0, 1.0), sigma=sig, median_sigma_mag=med)


def volume_points(mbol, inv_vmax, edges):
    """Points (mean M_bol, mean log10 Vmax) of the stars in each occupied bin.

    For a volume that is log-linear in M within a bin (a magnitude limit gives 10^(-0.6 M)) the
    mean log Vmax of a bin's stars lies on the line at their mean magnitude whatever the shape of
    the luminosity function inside the bin -- unlike the bin's harmonic-mean volume placed at its
    centre, which near the cut-off sits up to ~0.1 dex off.

    Returns
    -------
    mag, logv : ndarray
        Sorted by magnitude (occupied bins only).
    """
    x = np.asarray(mbol, dtype=float)
    w = np.asarray(inv_vmax, dtype=float)
    k = bin_index(x, edges)
    ok = (k >= 0) & np.isfinite(w) & (w > 0)
    nb = np.asarray(edges).size - 1
    n = np.bincount(k[ok], minlength=nb)
    sm = np.bincount(k[ok], weights=x[ok], minlength=nb)
    sv = np.bincount(k[ok], weights=-np.log10(w[ok]), minlength=nb)
    has = n > 0
    return sm[has] / n[has], sv[has] / n[has]


def volume_per_mag(points_mag, points_logv, fine_edges):
    """Volume per magnitude v(M) (pc^3) at the centres of the fine grid.

    Interpolated in log V between the points of :func:`volume_points`; flat beyond the brightest
    point and continued with the slope of the last two points (clipped to
    :data:`~cinderclock.population.agefit.EXPOSURE_SLOPE_RANGE`) beyond the faintest.

    Returns
    -------
    (J,) ndarray
    """
    c = np.asarray(points_mag, dtype=float)
    logv = np.asarray(points_logv, dtype=float)
    x = 0.5 * (np.asarray(fine_edges)[:-1] + np.asarray(fine_edges)[1:])
    out = np.interp(x, c, logv)
    if c.size >= 2:
        slope = np.clip((logv[-1] - logv[-2]) / (c[-1] - c[-2]), *EXPOSURE_SLOPE_RANGE)
        out = np.where(x > c[-1], logv[-1] + slope * (x - c[-1]), out)
    return 10.0 ** out
