"""A regular grid of synthetic magnitudes for unit solid angle, interpolated for whole arrays.

The grid holds m_X(log g, E(B-V), log Teff) for a spectrum f_lambda of a star seen at solid-angle
factor (R/d)^2 = 1; a star of solid-angle factor theta has m_X - 2.5 log10(theta). Axes:

* ``log_teff`` : log10 Teff/K, increasing (the blackbody tables use a uniform step);
* ``ebv``      : E(B-V) in mag, increasing, first value 0 (length 1 when no extinction);
* ``logg``     : log10 g/cm s^-2, increasing (length 1 and ignored for blackbodies).

Interpolation is linear in each axis (log Teff, E(B-V), log g). Built tables are fine in log Teff
(step 0.002 dex by default) so linear interpolation errors stay far below 1e-4 mag.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from ..errors import InputError

TEFF_COLUMN = "teff_k"
EBV_COLUMN = "ebv_mag"
LOGG_COLUMN = "logg_cgs"
MBOL_COLUMN = "mbol_unit"
BAND_PREFIX = "mag_"


def _axis_index(axis, values):
    """Lower node index and fraction for linear interpolation; NaN fraction outside the axis."""
    v = np.asarray(values, dtype=float)
    if axis.size == 1:
        inside = v == axis[0]
        return np.zeros(v.shape, dtype=np.intp), np.where(inside, 0.0, np.nan)
    i = np.clip(np.searchsorted(axis, v, side="right") - 1, 0, axis.size - 2)
    f = (v - axis[i]) / (axis[i + 1] - axis[i])
    outside = ~((v >= axis[0]) & (v <= axis[-1]))
    return i, np.where(outside, np.nan, f)


@dataclass
class PhotometryGrid:
    """Synthetic magnitudes for unit solid angle on a regular (log g, E(B-V), log Teff) grid.

    Attributes
    ----------
    band_keys : tuple of str
        Band keys, in the order of the last axis of ``mag``.
    log_teff : ndarray, shape (n_teff,)
        log10 Teff/K.
    ebv : ndarray, shape (n_ebv,)
        E(B-V), mag.
    logg : ndarray, shape (n_logg,)
        log10 g (cgs); ``[nan]`` when magnitudes do not depend on gravity.
    mag : ndarray, shape (n_logg, n_ebv, n_teff, n_band)
        Magnitudes for (R/d)^2 = 1.
    metadata : dict
        Provenance and cautions (law, R_V, systems, spectra, caution text).
    """

    band_keys: tuple
    log_teff: np.ndarray
    ebv: np.ndarray
    logg: np.ndarray
    mag: np.ndarray
    metadata: dict = field(default_factory=dict)

    def __post_init__(self):
        self.log_teff = np.asarray(self.log_teff, dtype=float)
        self.ebv = np.asarray(self.ebv, dtype=float)
        self.logg = np.asarray(self.logg, dtype=float)
        self.mag = np.asarray(self.mag, dtype=float)
        shape = (self.logg.size, self.ebv.size, self.log_teff.size, len(self.band_keys))
        if self.mag.shape != shape:
            raise ValueError(f"magnitude array has shape {self.mag.shape}, expected {shape}")
        for name, ax in (("log_teff", self.log_teff), ("ebv", self.ebv)):
            if ax.size > 1 and np.any(np.diff(ax) <= 0):
                raise ValueError(f"grid axis {name} must increase strictly")

    @property
    def gravity_dependent(self):
        """True if magnitudes depend on log g."""
        return not (self.logg.size == 1 and np.isnan(self.logg[0]))

    @property
    def teff_range_k(self):
        """(lowest, highest) Teff of the grid, K."""
        return 10 ** self.log_teff[0], 10 ** self.log_teff[-1]

    def band_index(self, keys):
        """Positions of band keys in the grid's band axis."""
        missing = [k for k in keys if k not in self.band_keys]
        if missing:
            raise KeyError(f"bands not in the photometry grid: {', '.join(missing)}")
        return [self.band_keys.index(k) for k in keys]

    # -- interpolation -------------------------------------------------------------------------

    def _corners(self, ebv, logg, shape):
        """Per-star (index, weight) pairs for the (log g, E(B-V)) plane."""
        e = np.broadcast_to(np.asarray(ebv, dtype=float), shape)
        ie, fe = _axis_index(self.ebv, e)
        if self.gravity_dependent:
            if logg is None:
                raise ValueError("this grid depends on log g: pass logg")
            g = np.broadcast_to(np.asarray(logg, dtype=float), shape)
            ig, fg = _axis_index(self.logg, g)
        else:
            ig, fg = np.zeros(shape, dtype=np.intp), np.zeros(shape)
        out = []
        for dg, wg in ((0, 1.0 - fg), (1, fg)):
            for de, we in ((0, 1.0 - fe), (1, fe)):
                w = wg * we
                gi = np.minimum(ig + dg, self.logg.size - 1)
                ei = np.minimum(ie + de, self.ebv.size - 1)
                out.append((gi, ei, w))
        return out

    def on_teff_nodes(self, node_index, ebv=0.0, logg=None):
        """Magnitudes at grid Teff nodes for each star's E(B-V) and log g.

        Returns shape (1, n_node, n_band) when ``ebv`` and ``logg`` are scalars (shared by all
        stars), else (n_star, n_node, n_band). NaN where E(B-V) or log g is off the grid.
        """
        sub = self.mag[:, :, node_index, :]
        scalar = np.ndim(ebv) == 0 and (logg is None or np.ndim(logg) == 0)
        shape = (1,) if scalar else np.broadcast_shapes(np.shape(ebv), np.shape(logg) if logg is not None else ())
        out = None
        for k, (gi, ei, w) in enumerate(self._corners(ebv, logg, shape)):
            if k > 0 and np.all((w == 0) | np.isnan(w)):
                continue   # a corner of zero weight (always so on a length-1 axis)
            term = sub[gi, ei] * w[:, None, None]
            out = term if out is None else out + term
        return out

    def magnitudes(self, teff_k, ebv=0.0, logg=None):
        """Magnitudes for unit solid angle at arrays of (Teff, E(B-V), log g), shape (..., n_band).

        Linear in log Teff, E(B-V) and log g; NaN outside the grid.
        """
        t = np.asarray(teff_k, dtype=float)
        shape = np.broadcast_shapes(t.shape, np.shape(ebv), np.shape(logg) if logg is not None else ())
        x = np.broadcast_to(np.log10(t), shape)
        it, ft = _axis_index(self.log_teff, x)
        out = np.zeros(shape + (len(self.band_keys),))
        for k, (gi, ei, w) in enumerate(self._corners(ebv, logg, shape)):
            if k > 0 and np.all((w == 0) | np.isnan(w)):
                continue
            lo = self.mag[gi, ei, it]
            hi = self.mag[gi, ei, np.minimum(it + 1, self.log_teff.size - 1)]
            out += (w * (1.0 - ft))[..., None] * lo + (w * ft)[..., None] * hi
        return out

    def bolometric_unit(self, teff_k):
        """Apparent bolometric magnitude of unit solid angle, -2.5 log10(sigma T^4 / f0) (IAU 2015 B2)."""
        from .bolometric import unit_solid_angle_mbol

        return unit_solid_angle_mbol(teff_k)

    # -- tables ---------------------------------------------------------------------------------

    @classmethod
    def from_frame(cls, df, path=None):
        """Build a grid from a long table (one row per node) as written by ``build_photometry_table``.

        Columns: ``teff_k``, ``ebv_mag``, optionally ``logg_cgs``, one ``mag_<band>`` per band
        (magnitude for unit solid angle) and optionally ``mbol_unit``. Every combination of the
        axis values must be present once.

        Raises
        ------
        InputError
            Naming the column or the row of a missing or duplicated node.
        """
        for col in (TEFF_COLUMN, EBV_COLUMN):
            if col not in df.columns:
                raise InputError("photometry grid lacks a required column", path=path, column=col)
        bands = tuple(c[len(BAND_PREFIX):] for c in df.columns if c.startswith(BAND_PREFIX))
        if not bands:
            raise InputError(f"photometry grid has no band columns (named '{BAND_PREFIX}<band>')", path=path)
        has_g = LOGG_COLUMN in df.columns
        teff = df[TEFF_COLUMN].to_numpy(float)
        ebv = df[EBV_COLUMN].to_numpy(float)
        g = df[LOGG_COLUMN].to_numpy(float) if has_g else np.zeros(len(df))
        t_ax, ti = np.unique(teff, return_inverse=True)
        e_ax, ei = np.unique(ebv, return_inverse=True)
        g_ax, gi = np.unique(g, return_inverse=True)
        flat = (gi * e_ax.size + ei) * t_ax.size + ti
        counts = np.bincount(flat, minlength=g_ax.size * e_ax.size * t_ax.size)
        if np.any(counts > 1):
            row = int(np.flatnonzero(counts[flat] > 1)[1])
            raise InputError("duplicate grid node (same Teff, E(B-V), log g)", path=path, row=row,
                             column=TEFF_COLUMN)
        if np.any(counts == 0):
            k = int(np.flatnonzero(counts == 0)[0])
            kt, ke, kg = k % t_ax.size, (k // t_ax.size) % e_ax.size, k // (t_ax.size * e_ax.size)
            raise InputError(f"grid is not regular: no row for teff_k={t_ax[kt]:g}, ebv_mag={e_ax[ke]:g}"
                             + (f", logg_cgs={g_ax[kg]:g}" if has_g else ""), path=path)
        mag = np.empty((g_ax.size * e_ax.size * t_ax.size, len(bands)))
        for j, b in enumerate(bands):
            mag[flat, j] = df[BAND_PREFIX + b].to_numpy(float)
        mag = mag.reshape(g_ax.size, e_ax.size, t_ax.size, len(bands))
        meta = dict(df.attrs.get("photometry", {})) if hasattr(df, "attrs") else {}
        return cls(band_keys=bands, log_teff=np.log10(t_ax), ebv=e_ax,
                   logg=g_ax if has_g else np.array([np.nan]), mag=mag, metadata=meta)

    def to_frame(self):
        """Long table, one row per node, the inverse of :meth:`from_frame`."""
        import pandas as pd

        gg, ee, tt = np.meshgrid(self.logg, self.ebv, 10 ** self.log_teff, indexing="ij")
        data = {TEFF_COLUMN: tt.ravel(), EBV_COLUMN: ee.ravel()}
        if self.gravity_dependent:
            data[LOGG_COLUMN] = gg.ravel()
        flat = self.mag.reshape(-1, len(self.band_keys))
        for j, b in enumerate(self.band_keys):
            data[BAND_PREFIX + b] = flat[:, j]
        data[MBOL_COLUMN] = self.bolometric_unit(tt.ravel())
        df = pd.DataFrame(data)
        df.attrs["photometry"] = dict(self.metadata)
        return df
