"""Vectorised look-ups in a cooling table: age from (mass, log L), log L from (mass, age).

A :class:`CoolingGrid` holds the tracks of a long-format cooling table on a common, sorted grid
of log L (tracks are resampled once if their nodes differ) and interpolates bilinearly: in log L
along the two tracks that bracket the mass, then linearly in mass. Ages are interpolated in
log10(age) (linear in age where a node has age 0). Every look-up returns a status code per star:

========================  =====  ==========================================================
name                      code   meaning
========================  =====  ==========================================================
``inside``                0      inside the tabulated, calibrated range
``far_future``            1      fainter than the calibrated faint limit: the model's formal
                                 continuation (extrapolation beyond the tabulated range)
``mass_outside``          2      mass outside the tracks' range (NaN returned)
``luminosity_outside``    3      brighter than the tracks' start or fainter than their last
                                 row, or younger/older than the tracks (NaN returned)
``invalid``               4      NaN or non-positive input (NaN returned)
========================  =====  ==========================================================
"""

from __future__ import annotations

import numpy as np

STATUS_INSIDE = 0
STATUS_FAR_FUTURE = 1
STATUS_MASS_OUTSIDE = 2
STATUS_LUMINOSITY_OUTSIDE = 3
STATUS_INVALID = 4
#: Code to name.
STATUS_NAMES = {STATUS_INSIDE: "inside", STATUS_FAR_FUTURE: "far_future", STATUS_MASS_OUTSIDE: "mass_outside",
                STATUS_LUMINOSITY_OUTSIDE: "luminosity_outside", STATUS_INVALID: "invalid"}

_MAX_COMMON_NODES = 20000


def _bracket(nodes, x):
    """Index i (nodes[i] <= x <= nodes[i+1], clipped) and weight of nodes[i+1] (ascending nodes).

    Evenly spaced nodes (the default log L grid) are indexed by arithmetic, others by binary search.
    """
    step = np.diff(nodes)
    if nodes.size > 2 and np.allclose(step, step[0], rtol=1e-9, atol=0.0):
        with np.errstate(invalid="ignore"):
            k = np.floor((np.asarray(x, dtype=float) - nodes[0]) / step[0])
        i = np.clip(np.nan_to_num(k, nan=0.0), 0, nodes.size - 2).astype(np.intp)
    else:
        i = np.clip(np.searchsorted(nodes, x, side="right") - 1, 0, nodes.size - 2)
    with np.errstate(invalid="ignore"):
        w = (x - nodes[i]) / (nodes[i + 1] - nodes[i])
    return i, w


def _bilinear(values, i, wi, j, wj):
    """Bilinear interpolation of values[i, j] with weights along both axes (NaN propagates)."""
    v00 = values[i, j]
    v01 = values[i, j + 1]
    v10 = values[i + 1, j]
    v11 = values[i + 1, j + 1]
    return (1 - wi) * ((1 - wj) * v00 + wj * v01) + wi * ((1 - wj) * v10 + wj * v11)


class CoolingGrid:
    """Cooling tracks on a common (mass, log L) grid with vectorised interpolation.

    Build it with :meth:`from_frame` from a long-format table (see
    :mod:`cinderclock.cooling.table`).

    Attributes
    ----------
    masses : (n_mass,) ndarray
        Track masses in Msun, ascending.
    log_lum : (n_lum,) ndarray
        Common log10 L/Lsun nodes, ascending.
    columns : dict of str to (n_mass, n_lum) ndarray
        Tabulated quantities (``age_yr`` always; ``teff_k``, ``radius_rsun``, ... when present),
        NaN where a track does not reach.
    faint_limit : (n_mass,) ndarray
        Per track, the faintest log L inside the calibrated range.
    model : dict
        Provenance of the table (``attrs["cooling_model"]`` of the frame), if any.
    """

    def __init__(self, masses, log_lum, columns, faint_limit, model=None):
        self.masses = np.asarray(masses, dtype=float)
        self.log_lum = np.asarray(log_lum, dtype=float)
        self.columns = {k: np.asarray(v, dtype=float) for k, v in columns.items()}
        self.faint_limit = np.asarray(faint_limit, dtype=float)
        self.model = model or {}
        if self.masses.size < 2 or self.log_lum.size < 2:
            raise ValueError("a cooling grid needs at least two masses and two luminosity nodes")
        age = self.columns["age_yr"]
        with np.errstate(divide="ignore", invalid="ignore"):
            self._log_age = np.where(age > 0, np.log10(age), -np.inf)
        self._build_inverse()

    # ------------------------------------------------------------------ construction
    @classmethod
    def from_frame(cls, df, mass_column="mass_msun"):
        """Grid from a long-format table (one row per mass and log L node).

        Tracks are the groups of equal ``mass_msun``. If every track has the same log L nodes they
        are used as they are; otherwise all tracks are resampled (linearly in log L, in log age for
        ages) onto a common set of nodes spanning them all, with NaN where a track does not reach.

        Parameters
        ----------
        df : pandas.DataFrame
            Columns ``mass_msun``, ``log_lum``, ``age_yr`` and optionally ``teff_k``,
            ``radius_rsun``, ``logg_cgs``, ``log_tc``, ``log_lum_nu``, ``crystallized_fraction``,
            ``far_future``.
        """
        numeric = [c for c in df.columns if c not in (mass_column, "log_lum", "far_future")
                   and np.issubdtype(df[c].dtype, np.number)]
        masses = np.unique(df[mass_column].to_numpy(dtype=float))
        tracks = []
        for m in masses:
            t = df[df[mass_column].to_numpy(dtype=float) == m].sort_values("log_lum")
            tracks.append(t)
        nodes = [t["log_lum"].to_numpy(dtype=float) for t in tracks]
        same = all(n.size == nodes[0].size and np.allclose(n, nodes[0], rtol=0, atol=1e-9) for n in nodes)
        if same:
            common = nodes[0]
        else:
            lo = min(n.min() for n in nodes)
            hi = max(n.max() for n in nodes)
            step = min(float(np.median(np.diff(n))) for n in nodes if n.size > 1)
            count = int(min(_MAX_COMMON_NODES, np.ceil((hi - lo) / step) + 1))
            common = np.linspace(lo, hi, count)
        columns = {c: np.full((masses.size, common.size), np.nan) for c in numeric}
        faint = np.empty(masses.size)
        for i, t in enumerate(tracks):
            x = t["log_lum"].to_numpy(dtype=float)
            for c in numeric:
                y = t[c].to_numpy(dtype=float)
                if same:
                    columns[c][i] = y
                elif c == "age_yr" and np.all(y > 0):
                    columns[c][i] = 10.0 ** np.interp(common, x, np.log10(y), left=np.nan, right=np.nan)
                else:
                    columns[c][i] = np.interp(common, x, y, left=np.nan, right=np.nan)
            if "far_future" in t.columns:
                calibrated = ~t["far_future"].to_numpy(dtype=bool)
                faint[i] = x[calibrated].min() if calibrated.any() else np.inf
            else:
                faint[i] = x.min()
        return cls(masses, common, columns, faint, model=dict(df.attrs.get("cooling_model", {})))

    def _build_inverse(self):
        """Tabulate log L on a common grid of log age, per track, for :meth:`log_lum_at_age`."""
        la = self._log_age
        finite = np.isfinite(la)
        lo = np.min(np.where(finite, la, np.inf))
        hi = np.max(np.where(finite, la, -np.inf))
        n = int(min(_MAX_COMMON_NODES, np.ceil((hi - lo) / 0.002) + 1))
        self._inv_log_age = np.linspace(lo, hi, max(n, 2))
        inv = np.full((self.masses.size, self._inv_log_age.size), np.nan)
        for i in range(self.masses.size):
            ok = finite[i]
            # along a track age rises as log L falls: ascending log age <-> descending log L
            x = la[i, ok][::-1]
            y = self.log_lum[ok][::-1]
            keep = np.concatenate([[True], np.diff(x) > 0])         # strictly increasing ages
            inv[i] = np.interp(self._inv_log_age, x[keep], y[keep], left=np.nan, right=np.nan)
        self._inv_log_lum = inv

    # ------------------------------------------------------------------ look-ups
    def _mass_status(self, mass):
        status = np.zeros(mass.shape, dtype=np.int8)
        bad_mass = ~((mass >= self.masses[0]) & (mass <= self.masses[-1]))
        status[bad_mass] = STATUS_MASS_OUTSIDE
        return status

    def _faint_limit_at(self, i, wi):
        f = self.faint_limit
        return (1 - wi) * f[i] + wi * f[i + 1]

    def interpolate(self, column, mass_msun, log_lum):
        """Any tabulated column at (mass, log L), bilinear; NaN outside the tracks.

        Parameters
        ----------
        column : str
            Column name, e.g. ``"teff_k"``, ``"radius_rsun"``, ``"crystallized_fraction"``.
        mass_msun, log_lum : array_like
            Mass in Msun and log10 L/Lsun (broadcast together).
        """
        if column == "age_yr":
            return self.age_yr(mass_msun, log_lum)[0]
        m, x = np.broadcast_arrays(np.asarray(mass_msun, dtype=float), np.asarray(log_lum, dtype=float))
        i, wi = _bracket(self.masses, m)
        j, wj = _bracket(self.log_lum, x)
        v = _bilinear(self.columns[column], i, wi, j, wj)
        outside = (m < self.masses[0]) | (m > self.masses[-1]) | (x < self.log_lum[0]) | (x > self.log_lum[-1])
        return np.where(outside, np.nan, v)

    def age_yr(self, mass_msun, log_lum):
        """Cooling age (yr) and status code at (mass, log L).

        Parameters
        ----------
        mass_msun : array_like
            White-dwarf mass in Msun.
        log_lum : array_like
            log10 L/Lsun (photon luminosity).

        Returns
        -------
        age_yr : ndarray
            Cooling age in years (NaN where the status is 2, 3 or 4).
        status : ndarray of int8
            See the module docstring.
        """
        m, x = np.broadcast_arrays(np.asarray(mass_msun, dtype=float), np.asarray(log_lum, dtype=float))
        status = self._mass_status(m)
        i, wi = _bracket(self.masses, m)
        j, wj = _bracket(self.log_lum, x)
        with np.errstate(invalid="ignore"):
            log_age = _bilinear(self._log_age, i, wi, j, wj)
            lin = _bilinear(self.columns["age_yr"], i, wi, j, wj)
            age = np.where(np.isfinite(log_age), 10.0**log_age, lin)
        off_lum = (x < self.log_lum[0]) | (x > self.log_lum[-1]) | ~np.isfinite(age)
        status = np.where((status == 0) & off_lum, STATUS_LUMINOSITY_OUTSIDE, status)
        far = x < self._faint_limit_at(i, wi)
        status = np.where((status == 0) & far, STATUS_FAR_FUTURE, status)
        status = np.where(~(np.isfinite(m) & np.isfinite(x)), STATUS_INVALID, status).astype(np.int8)
        age = np.where(status <= STATUS_FAR_FUTURE, age, np.nan)
        return age, status

    def log_lum_at_age(self, mass_msun, age_yr):
        """Photon luminosity log10 L/Lsun reached at a cooling age, and status code.

        Parameters
        ----------
        mass_msun : array_like
            White-dwarf mass in Msun.
        age_yr : array_like
            Cooling age in years (> 0).

        Returns
        -------
        log_lum : ndarray
            log10 L/Lsun (NaN where the status is 2, 3 or 4).
        status : ndarray of int8
            ``far_future`` where the result is fainter than the calibrated faint limit.
        """
        m, t = np.broadcast_arrays(np.asarray(mass_msun, dtype=float), np.asarray(age_yr, dtype=float))
        status = self._mass_status(m)
        valid = np.isfinite(m) & np.isfinite(t) & (t > 0)
        with np.errstate(divide="ignore", invalid="ignore"):
            la = np.log10(np.where(valid, t, 1.0))
        i, wi = _bracket(self.masses, m)
        j, wj = _bracket(self._inv_log_age, la)
        with np.errstate(invalid="ignore"):
            out = _bilinear(self._inv_log_lum, i, wi, j, wj)
        off = (la < self._inv_log_age[0]) | (la > self._inv_log_age[-1]) | ~np.isfinite(out)
        status = np.where((status == 0) & off, STATUS_LUMINOSITY_OUTSIDE, status)
        far = out < self._faint_limit_at(i, wi)
        status = np.where((status == 0) & far, STATUS_FAR_FUTURE, status)
        status = np.where(~valid, STATUS_INVALID, status).astype(np.int8)
        out = np.where(status <= STATUS_FAR_FUTURE, out, np.nan)
        return out, status

    def as_model(self):
        """Provenance entry of the underlying table."""
        return dict(self.model)
