"""Vectorised interpolation of a (mass, Teff) mass-radius table and its inversion.

Forward lookups (radius, log g at given mass and Teff) are bilinear in (mass, log10 Teff) on
log10 R. Inversions (mass from log g or from radius, at Teff) need no root finding: along each
Teff column of the table log g rises and log R falls monotonically with mass, so the mass at a
given log g is a linear interpolation within the column. All columns are stacked into one sorted
key array (column j shifted by j * offset), so one ``np.searchsorted`` call finds the bracketing
rows of every star in its two neighbouring columns; the two column masses are then blended
linearly in log10 Teff. Cost is O(N log n_table) with no Python loop over stars.
"""

from __future__ import annotations

import numpy as np

from ..constants import G_SI, M_SUN_KG, R_SUN_M

_LOGG_CONST = np.log10(G_SI * M_SUN_KG / R_SUN_M**2 * 100.0)   # log g of 1 Msun at 1 Rsun, cgs
_OFFSET = 100.0        # separation of stacked columns in key units (> any key range)


def logg_from_mass_radius(mass_msun, radius_rsun):
    """log10(g / cm s^-2) = log10(G M / R^2) for mass in Msun and radius in Rsun."""
    with np.errstate(invalid="ignore", divide="ignore"):
        return _LOGG_CONST + np.log10(mass_msun) - 2.0 * np.log10(radius_rsun)


def _bracket(grid, values):
    """Index j (grid[j] <= v <= grid[j+1], clipped) and fraction w; inside mask for the grid span."""
    j = np.clip(np.searchsorted(grid, values, side="right") - 1, 0, grid.size - 2)
    w = (values - grid[j]) / (grid[j + 1] - grid[j])
    inside = (values >= grid[0]) & (values <= grid[-1])
    return j, w, inside


class _StackedColumns:
    """Per-column monotone key -> value interpolation, all columns in one sorted array."""

    def __init__(self, keys, values):
        # keys, values: (n_mass, n_teff); NaN where the table has no model
        n_t = keys.shape[1]
        ks, vs, start, stop = [], [], np.zeros(n_t, dtype=np.int64), np.zeros(n_t, dtype=np.int64)
        pos = 0
        for j in range(n_t):                        # loop over table columns, not stars
            ok = np.isfinite(keys[:, j]) & np.isfinite(values[:, j])
            k, v = keys[ok, j], values[ok, j]
            if k.size >= 2 and np.any(np.diff(k) <= 0):
                raise ValueError(f"table column {j} is not monotone in its key; cannot invert")
            ks.append(k + _OFFSET * j)
            vs.append(v)
            start[j], stop[j] = pos, pos + k.size
            pos += k.size
        self.keys = np.concatenate(ks)
        self.values = np.concatenate(vs)
        self.start, self.stop = start, stop
        self.key_min = np.array([k.min() - _OFFSET * j if k.size else np.nan for j, k in enumerate(ks)])

    def lookup(self, key, col):
        """Interpolated value at ``key`` in column ``col`` (arrays), and a validity mask."""
        q = key + _OFFSET * col
        start, stop = self.start[col], self.stop[col]
        usable = (stop - start) >= 2
        idx = np.searchsorted(self.keys, q, side="left")
        idx = np.clip(idx, start + 1, np.maximum(stop - 1, start + 1))
        idx = np.minimum(idx, self.keys.size - 1)
        k0, k1 = self.keys[idx - 1], self.keys[idx]
        f = (q - k0) / (k1 - k0)
        ok = usable & (f >= -1e-12) & (f <= 1.0 + 1e-12)
        v = self.values[idx - 1] + np.clip(f, 0.0, 1.0) * (self.values[idx] - self.values[idx - 1])
        return v, ok


class MassRadiusGrid:
    """Interpolator over a long (mass, Teff) table from :func:`build_mass_radius_table`.

    Parameters
    ----------
    mass_grid : array_like
        Masses in Msun (strictly increasing).
    teff_grid : array_like
        Effective temperatures in K (strictly increasing).
    radius_rsun : array_like, shape (n_mass, n_teff)
        Radii in Rsun; NaN where the model does not apply.
    settings, models : optional
        Copied from the table's ``attrs`` for provenance.

    Notes
    -----
    Every method accepts arrays of any (broadcastable) shape and returns NaN plus ``inside=False``
    for inputs outside the table or where the table has no model. Interpolation error with the
    default grids is below 1e-4 in mass (internal check), well below the model's own systematics
    (the finite-temperature envelope is a simplified model, radii good to some per cent).
    """

    def __init__(self, mass_grid, teff_grid, radius_rsun, settings=None, models=None):
        self.mass_grid = np.asarray(mass_grid, dtype=float)
        self.teff_grid = np.asarray(teff_grid, dtype=float)
        self.log_teff_grid = np.log10(self.teff_grid)
        r = np.asarray(radius_rsun, dtype=float)
        if r.shape != (self.mass_grid.size, self.teff_grid.size):
            raise ValueError("radius table must have shape (n_mass, n_teff)")
        self.radius_table = r
        with np.errstate(invalid="ignore", divide="ignore"):
            self._log_r = np.log10(r)
        self._logg = logg_from_mass_radius(self.mass_grid[:, None], r)
        mass2 = np.broadcast_to(self.mass_grid[:, None], r.shape)
        self._by_logg = _StackedColumns(self._logg, mass2)
        self._by_neg_log_r = _StackedColumns(-self._log_r, mass2)
        self.settings = dict(settings or {})
        self.models = list(models or [])

    @classmethod
    def from_frame(cls, df):
        """Build from the long DataFrame (columns ``mass_msun``, ``teff_k``, ``radius_rsun``)."""
        piv = df.pivot(index="mass_msun", columns="teff_k", values="radius_rsun").sort_index().sort_index(axis=1)
        return cls(piv.index.to_numpy(float), piv.columns.to_numpy(float), piv.to_numpy(float),
                   settings=df.attrs.get("settings"), models=df.attrs.get("models"))

    def fast_inverse(self, kind):
        """A cached :class:`RegularInverse` of this grid (``kind``: "logg" or "radius")."""
        cache = self.__dict__.setdefault("_fast", {})
        if kind not in cache:
            cache[kind] = RegularInverse(self, kind)
        return cache[kind]

    # ------------------------------------------------------------------ forward ----------------
    def radius(self, mass_msun, teff_k):
        """Radius in Rsun at mass (Msun) and Teff (K); NaN outside the table."""
        m, t = np.broadcast_arrays(np.asarray(mass_msun, dtype=float), np.asarray(teff_k, dtype=float))
        with np.errstate(invalid="ignore", divide="ignore"):
            i, u, in_m = _bracket(self.mass_grid, m)
            j, w, in_t = _bracket(self.log_teff_grid, np.log10(t))
            lr = self._log_r
            val = ((1 - u) * (1 - w) * lr[i, j] + u * (1 - w) * lr[i + 1, j]
                   + (1 - u) * w * lr[i, j + 1] + u * w * lr[i + 1, j + 1])
            return np.where(in_m & in_t & np.isfinite(val), 10.0**val, np.nan)

    def logg(self, mass_msun, teff_k):
        """log10(g / cm s^-2) at mass (Msun) and Teff (K); NaN outside the table."""
        m = np.asarray(mass_msun, dtype=float)
        return logg_from_mass_radius(m, self.radius(m, teff_k))

    # ------------------------------------------------------------------ inverse ----------------
    def _invert(self, stacked, key, teff_k):
        key, t = np.broadcast_arrays(np.asarray(key, dtype=float), np.asarray(teff_k, dtype=float))
        with np.errstate(invalid="ignore", divide="ignore"):
            j, w, in_t = _bracket(self.log_teff_grid, np.log10(t))
            finite = np.isfinite(key) & np.isfinite(w)
            k = np.where(finite, key, 0.0)
            m0, ok0 = stacked.lookup(k, j)
            m1, ok1 = stacked.lookup(k, j + 1)
            inside = finite & in_t & ok0 & ok1
            mass = np.where(inside, (1 - w) * m0 + w * m1, np.nan)
        return mass, inside

    def mass_from_logg(self, logg_cgs, teff_k):
        """Mass and radius from spectroscopic log g and Teff.

        Parameters
        ----------
        logg_cgs : array_like
            log10(g / cm s^-2).
        teff_k : array_like
            Effective temperature in K.

        Returns
        -------
        mass_msun, radius_rsun : numpy arrays
            NaN where ``inside_mask`` is False. The radius is sqrt(G M / g), consistent with the
            input log g.
        inside_mask : numpy bool array
            True where (log g, Teff) lies inside the table.
        """
        mass, inside = self._invert(self._by_logg, logg_cgs, teff_k)
        g = np.asarray(logg_cgs, dtype=float)
        with np.errstate(invalid="ignore", divide="ignore"):
            radius = np.sqrt(10.0 ** (_LOGG_CONST - g) * mass)
        return mass, np.where(inside, radius, np.nan), inside

    def mass_from_radius(self, radius_rsun, teff_k):
        """Mass and log g from a (photometric) radius in Rsun and Teff in K.

        Returns
        -------
        mass_msun, logg_cgs : numpy arrays
            NaN where ``inside_mask`` is False.
        inside_mask : numpy bool array
        """
        r = np.asarray(radius_rsun, dtype=float)
        with np.errstate(invalid="ignore", divide="ignore"):
            key = -np.log10(np.where(r > 0, r, np.nan))
        mass, inside = self._invert(self._by_neg_log_r, key, teff_k)
        logg = np.where(inside, logg_from_mass_radius(mass, r), np.nan)
        return mass, logg, inside

    def solve(self, teff_k, logg_cgs=None, radius_rsun=None):
        """Mass by log g where it is finite, otherwise by the photometric radius.

        Parameters
        ----------
        teff_k : array_like
            Effective temperature in K.
        logg_cgs, radius_rsun : array_like, optional
            Spectroscopic log g (cgs dex) and photometric radius (Rsun); either may be NaN per row.

        Returns
        -------
        dict of numpy arrays
            ``mass_msun``, ``radius_rsun``, ``logg_cgs``, ``inside`` (bool) and ``route``
            (int8: 1 = from log g, 2 = from the photometric radius, 0 = neither available).
        """
        t = np.asarray(teff_k, dtype=float)
        nan = np.full(t.shape, np.nan)
        g = nan if logg_cgs is None else np.broadcast_to(np.asarray(logg_cgs, dtype=float), t.shape)
        rp = nan if radius_rsun is None else np.broadcast_to(np.asarray(radius_rsun, dtype=float), t.shape)
        use_g = np.isfinite(g)
        use_r = ~use_g & np.isfinite(rp)
        m_g, r_g, in_g = self.mass_from_logg(np.where(use_g, g, np.nan), t)
        m_r, g_r, in_r = self.mass_from_radius(np.where(use_r, rp, np.nan), t)
        route = np.where(use_g, 1, np.where(use_r, 2, 0)).astype(np.int8)
        return {
            "mass_msun": np.where(use_g, m_g, m_r),
            "radius_rsun": np.where(use_g, r_g, np.where(use_r & in_r, rp, np.nan)),
            "logg_cgs": np.where(use_g, np.where(in_g, g, np.nan), g_r),
            "inside": np.where(use_g, in_g, in_r),
            "route": route,
        }


class RegularInverse:
    """The mass inversion of a :class:`MassRadiusGrid` resampled on a regular (key, log Teff) grid.

    For very many look-ups (Monte Carlo draws) the per-star binary search of
    :meth:`MassRadiusGrid.mass_from_logg` dominates the cost. This class evaluates that exact
    inversion once on a fine regular grid of the key (log g, or -log10 R) at the table's Teff
    columns; each look-up is then index arithmetic and a bilinear interpolation. Nodes where the
    exact inversion has no mass are NaN, and any NaN corner gives NaN (the valid domain shrinks by
    at most one fine step at its edges).

    Parameters
    ----------
    grid : MassRadiusGrid
    kind : {"logg", "radius"}
        Invert log g (cgs) or the radius (Rsun).
    step : float
        Spacing of the key axis (dex).
    """

    def __init__(self, grid, kind="logg", step=0.001):
        self.grid = grid
        self.kind = kind
        keys = grid._logg if kind == "logg" else -grid._log_r
        lo, hi = np.nanmin(keys), np.nanmax(keys)
        self.key0, self.step = float(lo), float(step)
        self.n_key = int(np.ceil((hi - lo) / step)) + 1
        k = self.key0 + self.step * np.arange(self.n_key)
        kk, tt = np.meshgrid(k, grid.teff_grid, indexing="ij")
        stacked = grid._by_logg if kind == "logg" else grid._by_neg_log_r
        mass, inside = grid._invert(stacked, kk.ravel(), tt.ravel())
        self.mass = np.where(inside, mass, np.nan).reshape(kk.shape)

    def __call__(self, value, teff_k):
        """Mass (Msun) at log g (or radius in Rsun) and Teff (K); NaN outside the table."""
        v = np.asarray(value, dtype=float)
        with np.errstate(invalid="ignore", divide="ignore"):
            key = v if self.kind == "logg" else -np.log10(np.where(v > 0, v, np.nan))
            x = (key - self.key0) / self.step
            ok = np.isfinite(x) & (x >= 0) & (x <= self.n_key - 1)
            i = np.clip(np.floor(np.where(ok, x, 0)).astype(np.int64), 0, self.n_key - 2)
            u = np.where(ok, x, 0) - i
            j, w, in_t = _bracket(self.grid.log_teff_grid, np.log10(np.asarray(teff_k, dtype=float)))
            m = self.mass
            val = ((1 - u) * (1 - w) * m[i, j] + u * (1 - w) * m[i + 1, j]
                   + (1 - u) * w * m[i, j + 1] + u * w * m[i + 1, j + 1])
        return np.where(ok & in_t, val, np.nan)
