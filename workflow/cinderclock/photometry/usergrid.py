"""User-supplied synthetic-photometry tables, used instead of blackbodies.

Format (cinderclock's own, long: one row per model)
---------------------------------------------------
A CSV file (lines starting with ``#`` are comments; first other line is the header) or a Parquet
file (name ending in ``.parquet``) with the columns

==================  ====================================================================
``atmosphere``      model class label, free text without commas (e.g. ``H``, ``He``, ``mixed``)
``teff_k``          effective temperature, K (> 0)
``logg_cgs``        log10 of surface gravity in cm s^-2
``mbol_abs``        absolute bolometric magnitude of the model, mag, on the IAU 2015 B2 scale
                    (M_bol,sun = 4.74); OR, instead, ``radius_rsun``: the model radius, Rsun
``absmag_<key>``    absolute magnitude (at 10 pc) in the band with configuration key ``<key>``,
                    mag, in that band's configured system (AB or Vega); one column per band
==================  ====================================================================

Within each atmosphere class the models must form a full rectangle: every Teff at every log g,
once. Magnitudes must be unreddened. Extra columns are ignored.

Use
---
The absolute magnitudes are converted to magnitudes for unit solid angle, (R/d)^2 = 1, through the
model's own bolometric magnitude: m_unit = M_X - M_bol + m_bol,unit(Teff), where
m_bol,unit = -2.5 log10(sigma Teff^4 / f0) (IAU 2015 B2), or through its radius:
m_unit = M_X + 5 log10(R / 10 pc). The table is then resampled onto a fine grid uniform in log Teff
(monotone cubic Hermite interpolation along Teff, linear in log g) and band extinction is added
from a blackbody table of the same Teff (see
:data:`cinderclock.photometry.cautions.USER_GRID_EXTINCTION_CAUTION`). The result is a
:class:`~cinderclock.photometry.grid.PhotometryGrid` that :func:`~cinderclock.photometry.sedfit.fit_sed`
uses like the blackbody one (pass ``logg``).
"""

from __future__ import annotations

from pathlib import Path

import numpy as np

from ..constants import PC_M, R_SUN_M
from ..errors import InputError
from .bolometric import unit_solid_angle_mbol
from .cautions import USER_GRID_EXTINCTION_CAUTION
from .grid import PhotometryGrid

ATMOSPHERE = "atmosphere"
TEFF = "teff_k"
LOGG = "logg_cgs"
MBOL = "mbol_abs"
RADIUS = "radius_rsun"
ABSMAG_PREFIX = "absmag_"


def _read_frame(path):
    import pandas as pd

    path = Path(path)
    if not path.exists():
        raise InputError("synthetic-photometry table not found", path=path)
    try:
        if path.suffix == ".parquet":
            return pd.read_parquet(path)
        return pd.read_csv(path, comment="#", skipinitialspace=True)
    except Exception as exc:  # pandas/pyarrow parse errors
        raise InputError(f"cannot read synthetic-photometry table: {exc}", path=path) from None


def _numeric_column(df, col, path):
    import pandas as pd

    vals = pd.to_numeric(df[col], errors="coerce").to_numpy(float)
    bad = ~np.isfinite(vals)
    if np.any(bad):
        row = int(np.flatnonzero(bad)[0])
        raise InputError(f"value '{df[col].iloc[row]}' is not a finite number", path=path, row=row, column=col)
    return vals


class UserPhotometryTable:
    """A validated user synthetic-photometry table.

    Parameters
    ----------
    frame : pandas.DataFrame
        The table in the format above.
    band_keys : sequence of str
        Configured band keys that must all be present as ``absmag_<key>`` columns.
    path : str, optional
        File name, used in error messages.

    Raises
    ------
    InputError
        Naming file, row and column of the first fault.
    """

    def __init__(self, frame, band_keys, path=None):
        self.path = None if path is None else str(path)
        df = frame.reset_index(drop=True)
        required = [ATMOSPHERE, TEFF, LOGG] + [ABSMAG_PREFIX + k for k in band_keys]
        for col in required:
            if col not in df.columns:
                raise InputError("required column missing", path=path, column=col)
        if MBOL not in df.columns and RADIUS not in df.columns:
            raise InputError(f"need a column '{MBOL}' (absolute bolometric magnitude) or "
                             f"'{RADIUS}' (model radius)", path=path, column=MBOL)
        if len(df) == 0:
            raise InputError("synthetic-photometry table has no rows", path=path)
        atm = df[ATMOSPHERE].astype(str).str.strip().to_numpy()
        empty = (atm == "") | (atm == "nan")
        if np.any(empty):
            raise InputError("empty atmosphere class", path=path, row=int(np.flatnonzero(empty)[0]),
                             column=ATMOSPHERE)
        teff = _numeric_column(df, TEFF, path)
        if np.any(teff <= 0):
            raise InputError("Teff must be positive", path=path, row=int(np.flatnonzero(teff <= 0)[0]),
                             column=TEFF)
        logg = _numeric_column(df, LOGG, path)
        if MBOL in df.columns:
            conv_col, conv = MBOL, _numeric_column(df, MBOL, path)
        else:
            conv_col, conv = RADIUS, _numeric_column(df, RADIUS, path)
            if np.any(conv <= 0):
                raise InputError("radius must be positive", path=path,
                                 row=int(np.flatnonzero(conv <= 0)[0]), column=RADIUS)
        absmag = np.column_stack([_numeric_column(df, ABSMAG_PREFIX + k, path) for k in band_keys])

        # magnitudes for unit solid angle
        if conv_col == MBOL:
            unit = absmag - conv[:, None] + unit_solid_angle_mbol(teff)[:, None]
        else:
            unit = absmag + 5.0 * np.log10(conv * R_SUN_M / (10.0 * PC_M))[:, None]

        self.band_keys = tuple(band_keys)
        self._classes = {}
        for cls in sorted(set(atm)):
            rows = np.flatnonzero(atm == cls)
            self._classes[cls] = self._regular(cls, rows, teff[rows], logg[rows], unit[rows])

    def _regular(self, cls, rows, teff, logg, unit):
        t_ax, ti = np.unique(teff, return_inverse=True)
        g_ax, gi = np.unique(logg, return_inverse=True)
        flat = gi * t_ax.size + ti
        counts = np.bincount(flat, minlength=t_ax.size * g_ax.size)
        if np.any(counts > 1):
            dup = np.flatnonzero(counts[flat] > 1)
            raise InputError(f"duplicate model (atmosphere {cls}, Teff {teff[dup[1]]:g}, log g {logg[dup[1]]:g})",
                             path=self.path, row=int(rows[dup[1]]), column=TEFF)
        if np.any(counts == 0):
            k = int(np.flatnonzero(counts == 0)[0])
            raise InputError(f"atmosphere class {cls}: models must cover every Teff at every log g; "
                             f"missing Teff {t_ax[k % t_ax.size]:g} K at log g {g_ax[k // t_ax.size]:g}",
                             path=self.path, column=TEFF)
        if t_ax.size < 2:
            raise InputError(f"atmosphere class {cls}: need at least two Teff values", path=self.path,
                             column=TEFF)
        mag = np.empty((g_ax.size * t_ax.size, len(self.band_keys)))
        mag[flat] = unit
        return t_ax, g_ax, mag.reshape(g_ax.size, t_ax.size, len(self.band_keys))

    @classmethod
    def read(cls, path, band_keys):
        """Read and validate a table from CSV or Parquet."""
        return cls(_read_frame(path), band_keys, path=path)

    @property
    def atmospheres(self):
        """Atmosphere class labels in the table."""
        return tuple(self._classes)

    def photometry_grid(self, atmosphere, extinction_grid=None, step_dex=0.002):
        """Grid of magnitudes for unit solid angle of one atmosphere class, for :func:`fit_sed`.

        Parameters
        ----------
        atmosphere : str
            Class label.
        extinction_grid : PhotometryGrid, optional
            Blackbody grid with the same band keys and an E(B-V) axis starting at 0; its band
            extinction (m(T, E) - m(T, 0)) is added to the user magnitudes. Without it the grid
            has E(B-V) = 0 only.
        step_dex : float
            Step of the resampled Teff axis in log10 Teff.
        """
        from scipy.interpolate import PchipInterpolator

        if atmosphere not in self._classes:
            raise InputError(f"atmosphere class '{atmosphere}' not in the synthetic-photometry table "
                             f"(classes: {', '.join(self._classes)})", path=self.path, column=ATMOSPHERE)
        t_ax, g_ax, mag = self._classes[atmosphere]
        x_ax = np.log10(t_ax)
        n = int(np.ceil((x_ax[-1] - x_ax[0]) / step_dex)) + 1
        x = np.linspace(x_ax[0], x_ax[-1], n)
        fine = PchipInterpolator(x_ax, mag, axis=1)(x)              # (n_logg, n, nb)
        meta = {"spectra": "user table", "source": self.path, "atmosphere": atmosphere}
        if extinction_grid is None:
            ebv = np.array([0.0])
            full = fine[:, None, :, :]
        else:
            order = extinction_grid.band_index(self.band_keys)
            lo, hi = extinction_grid.teff_range_k
            if t_ax[0] < lo * (1 - 1e-9) or t_ax[-1] > hi * (1 + 1e-9):
                raise InputError(f"user table Teff range {t_ax[0]:g}-{t_ax[-1]:g} K exceeds the blackbody "
                                 f"extinction grid ({lo:g}-{hi:g} K)", path=self.path, column=TEFF)
            ebv = extinction_grid.ebv
            t = np.clip(10.0**x, lo, hi)
            base = extinction_grid.magnitudes(t, 0.0)[:, order]
            ext = np.stack([extinction_grid.magnitudes(t, e)[:, order] - base for e in ebv])  # (n_ebv, n, nb)
            full = fine[:, None, :, :] + ext[None, :, :, :]
            meta.update({k: extinction_grid.metadata.get(k) for k in ("extinction_law", "r_v")})
            meta["caution"] = USER_GRID_EXTINCTION_CAUTION
        return PhotometryGrid(band_keys=self.band_keys, log_teff=x, ebv=ebv, logg=g_ax,
                              mag=full, metadata=meta)


def read_user_grid(path, band_keys):
    """Read a user synthetic-photometry table (format in this module's docstring)."""
    return UserPhotometryTable.read(path, band_keys)
