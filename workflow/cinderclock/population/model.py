"""Forward-modelled white-dwarf luminosity function of a stellar population.

A star of initial mass M_i born at lookback time tau is a white dwarf today if tau exceeds its
pre-white-dwarf lifetime t_prog(M_i); it then has mass M_f = IFMR(M_i), cooling age
t_c = tau - t_prog and bolometric magnitude M_bol(M_f, t_c) from the cooling model. The number
of white dwarfs per unit M_bol is

    n(M_bol) = int dM_i xi(M_i) psi(t_prog(M_i) + t_c) |dt_c / dM_bol|   (t_c at M_bol),

with xi the IMF and psi the star-formation rate (:mod:`cinderclock.population.sfh`). Because the
history enters only through its cumulative Psi, the count in a magnitude bin [E_k, E_(k+1)] is
exact for any history:

    N_k = sum_i w_i [Psi_T(t_prog,i + t_c,i(E_(k+1))) - Psi_T(t_prog,i + t_c,i(E_k))],

where w_i is the IMF number in progenitor-mass cell i and t_c,i(E) the cooling age at which
white dwarfs from that cell reach M_bol = E.

Numerics: the progenitor masses are a log-spaced grid of cells (400 by default) whose weights are
the IMF's exact integrals; each cell's white dwarf is tabulated once in M_bol against a
log-spaced cooling-age grid (1e4 yr to 20 Gyr, 1500 nodes) through the cooling callable, and
the cooling ages at bin edges come from a vectorised per-row inversion, linear in log age. A grid
of population ages is then evaluated at once.

Normalisation: the IMF weights sum to one over the progenitor-mass range, and the history forms
stars at unit rate per Gyr, so :meth:`PopulationModel.luminosity_function` returns white dwarfs per
magnitude per (progenitor born per Gyr). Multiplying by the birth rate of progenitors per pc^3 per
Gyr gives the luminosity function in pc^-3 mag^-1.

Cautions: single-star evolution only (no mergers or binary products); white dwarfs from
progenitors outside the IFMR's calibrated range are left out (their share is recorded); the model
is not convolved with measurement errors in M_bol; the result inherits every caution of the
cooling model, the IFMR and the lifetimes (ages from Mestel's law in particular are indicative).
"""

from __future__ import annotations

import numpy as np

from ..errors import ConfigError
from .cooling_link import mbol_sun
from .imf import get_imf
from .sfh import StarFormationHistory

#: Sentinels for M_bol where the cooling model gives no value: brighter than its start, or fainter
#: than its end.
_BRIGHT_SENTINEL = -60.0
_FAINT_SENTINEL = 90.0


def _row_interp(x, y, q):
    """Per-row linear interpolation: ``y_i(q_i)`` for rows of non-decreasing ``x``; queries clipped per row.

    Parameters
    ----------
    x, y : (n, m) ndarray
        Abscissae (non-decreasing along each row, finite) and ordinates.
    q : (n, k) ndarray
        Queries.
    """
    n, m = x.shape
    ramp = np.arange(m) * 1e-9                      # strict increase for np.interp
    xs = x + ramp
    lo = xs[:, :1]
    hi = xs[:, -1:]
    span = float(np.nanmax(xs) - np.nanmin(xs)) + 10.0
    off = (np.arange(n) * span)[:, None]
    qq = np.clip(q, lo, hi) + off
    return np.interp(qq.ravel(), (xs + off).ravel(), y.ravel()).reshape(q.shape)


class PopulationModel:
    """Tabulated white-dwarf population for luminosity functions at any age and history.

    Parameters
    ----------
    log_lum_at_age : callable
        ``(mass_msun, age_yr) -> log10 L/Lsun`` of the cooling model (vectorised; NaN where
        undefined), e.g. ``CoolingLink.log_lum_at_age``, ``lambda m, t:
        mestel.luminosity_at_age(m, t, mestel.age_coefficient_yr())`` or a
        ``CoolingGrid``'s ``log_lum_at_age`` (its status output is dropped).
    ifmr : str or PiecewiseLinearIFMR
        Initial-final mass relation (:mod:`cinderclock.progenitor.ifmr`); any object with
        ``final_mass(mi) -> (mf, in_range)``, ``initial_range`` and ``as_model()`` works.
    lifetime : str or LifetimeModel
        Progenitor lifetime (:mod:`cinderclock.progenitor.lifetimes`); any object with
        ``lifetime_yr(mi, metallicity) -> (t_yr, in_range)`` and ``as_model()`` works.
    imf : str or PowerLawIMF
        ``salpeter`` or ``kroupa`` (:mod:`cinderclock.population.imf`).
    mass_range_msun : (float, float), optional
        Progenitor masses considered; default: the IFMR's calibrated initial-mass range.
    metallicity : float
        Progenitor metallicity passed to the lifetime formula.
    n_mass : int
        Number of progenitor-mass cells.
    n_age : int
        Number of cooling-age nodes of the tabulation.
    max_cooling_age_yr : float
        Oldest tabulated cooling age (yr); population ages must stay below it.
    """

    def __init__(self, log_lum_at_age, ifmr="cummings2018_mist", lifetime="hurley2000", imf="salpeter",
                 mass_range_msun=None, metallicity=0.02, n_mass=400, n_age=1500, max_cooling_age_yr=2.0e10,
                 min_cooling_age_yr=1.0e4):
        from ..progenitor.ifmr import get_ifmr
        from ..progenitor.lifetimes import get_lifetime

        self.ifmr = get_ifmr(ifmr) if isinstance(ifmr, (str, dict)) else ifmr
        self.lifetime = get_lifetime(lifetime) if isinstance(lifetime, (str, dict)) else lifetime
        self.imf = get_imf(imf)
        self.metallicity = float(metallicity)
        lo, hi = mass_range_msun if mass_range_msun is not None else self.ifmr.initial_range
        r_lo, r_hi = self.ifmr.initial_range
        if not (r_lo - 1e-9 <= lo < hi <= r_hi + 1e-9):
            raise ConfigError(f"population.imf.mass_range_msun: [{lo}, {hi}] must lie inside the calibrated "
                              f"initial-mass range [{r_lo}, {r_hi}] of the IFMR {self.ifmr.key}")
        self.mass_range_msun = (float(lo), float(hi))
        self.max_cooling_age_yr = float(max_cooling_age_yr)

        edges = np.geomspace(lo, hi, int(n_mass) + 1)
        mi = np.sqrt(edges[:-1] * edges[1:])
        w = self.imf.number_between(edges[:-1], edges[1:])
        w = w / w.sum()
        mf, _ = self.ifmr.final_mass(mi)
        t_prog_yr, life_ok = self.lifetime.lifetime_yr(mi, self.metallicity, mf)
        self.initial_mass_msun = mi
        self.final_mass_msun = np.asarray(mf, dtype=float)
        self.progenitor_lifetime_gyr = np.asarray(t_prog_yr, dtype=float) / 1e9
        self.lifetime_in_range = np.asarray(life_ok, dtype=bool)

        ages = np.geomspace(min_cooling_age_yr, max_cooling_age_yr, int(n_age))
        with np.errstate(invalid="ignore", divide="ignore"):
            logl = np.asarray(log_lum_at_age(self.final_mass_msun[:, None], ages[None, :]), dtype=float)
        logl = np.broadcast_to(logl, (mi.size, ages.size))
        mbol = mbol_sun() - 2.5 * logl
        finite = np.isfinite(mbol)
        usable = finite.any(axis=1) & np.isfinite(self.final_mass_msun) & np.isfinite(self.progenitor_lifetime_gyr)
        self.lost_fraction = float(w[~usable].sum())   # IMF share the cooling model or IFMR cannot place
        self.weight = np.where(usable, w, 0.0)
        self._mbol = self._fill(mbol, finite)
        self._log_age_gyr = np.log10(ages / 1e9)

    @staticmethod
    def _fill(mbol, finite):
        """Replace NaN: before the first finite node by a bright sentinel, later gaps by the previous
        value, after the last finite node by a faint sentinel; then enforce non-decreasing rows."""
        n, m = mbol.shape
        idx = np.where(finite, np.arange(m)[None, :], -1)
        last_seen = np.maximum.accumulate(idx, axis=1)
        filled = np.take_along_axis(np.where(finite, mbol, 0.0), np.clip(last_seen, 0, None), axis=1)
        filled = np.where(last_seen < 0, _BRIGHT_SENTINEL, filled)
        any_finite = finite.any(axis=1)
        last_finite = np.where(any_finite, m - 1 - np.argmax(finite[:, ::-1], axis=1), -1)
        after = np.arange(m)[None, :] > last_finite[:, None]
        filled = np.where(after & any_finite[:, None], _FAINT_SENTINEL, filled)
        filled = np.where(any_finite[:, None], filled, _FAINT_SENTINEL)
        return np.maximum.accumulate(filled, axis=1)

    def cooling_age_at_mbol_gyr(self, mbol):
        """Cooling age (Gyr) at which each progenitor cell's white dwarf reaches ``mbol``.

        Returns
        -------
        (n_mass, len(mbol)) ndarray
        """
        q = np.broadcast_to(np.asarray(mbol, dtype=float)[None, :], (self._mbol.shape[0], np.size(mbol)))
        y = np.broadcast_to(self._log_age_gyr[None, :], self._mbol.shape)
        t = 10.0 ** _row_interp(self._mbol, y, q)
        # brighter than the youngest tabulated node: reached at cooling age zero
        return np.where(q < self._mbol[:, :1], 0.0, t)

    def bin_counts(self, mbol_edges, ages_gyr, sfh=None, chunk=64):
        """White dwarfs per M_bol bin for each population age.

        Parameters
        ----------
        mbol_edges : (K + 1,) array_like
            Ascending bin edges (mag).
        ages_gyr : array_like
            Population ages T (Gyr).
        sfh : StarFormationHistory, optional
            Default: constant.

        Returns
        -------
        (len(ages), K) ndarray
            Number per (progenitor born per Gyr).
        """
        sfh = sfh or StarFormationHistory()
        edges = np.asarray(mbol_edges, dtype=float)
        ages = np.atleast_1d(np.asarray(ages_gyr, dtype=float))
        if np.any(ages * 1e9 > self.max_cooling_age_yr):
            raise ConfigError(f"population ages up to {ages.max()} Gyr exceed the tabulated "
                              f"{self.max_cooling_age_yr / 1e9} Gyr of cooling")
        keep = self.weight > 0
        tau = self.progenitor_lifetime_gyr[keep, None] + self.cooling_age_at_mbol_gyr(edges)[keep]   # (n, K+1)
        w = self.weight[keep]
        out = np.empty((ages.size, edges.size - 1))
        for s in range(0, ages.size, chunk):
            a = ages[s:s + chunk, None, None]
            cum = sfh.cumulative(tau[None, :, :], a)                 # (c, n, K+1)
            out[s:s + chunk] = np.einsum("i,cik->ck", w, np.diff(cum, axis=2))
        return out

    def luminosity_function(self, mbol_edges, ages_gyr, sfh=None):
        """White dwarfs per magnitude per (progenitor born per Gyr) in each bin: bin counts / widths."""
        return self.bin_counts(mbol_edges, ages_gyr, sfh) / np.diff(np.asarray(mbol_edges, dtype=float))[None, :]

    def white_dwarf_total(self, ages_gyr, sfh=None):
        """All white dwarfs of the population (any M_bol) per (progenitor born per Gyr)."""
        sfh = sfh or StarFormationHistory()
        ages = np.atleast_1d(np.asarray(ages_gyr, dtype=float))
        tp = self.progenitor_lifetime_gyr[self.weight > 0]
        w = self.weight[self.weight > 0]
        return (sfh.total(ages)[:, None] - sfh.cumulative(tp[None, :], ages[:, None])) @ w

    def models(self):
        """Provenance entries of the IMF, IFMR and lifetime formula."""
        return [self.imf.as_model(), self.ifmr.as_model(), self.lifetime.as_model(self.metallicity)]


#: Progenitor choices used when neither the ``population`` nor the ``progenitor`` section sets them.
PROGENITOR_DEFAULTS = {"ifmr": {"relation": "cummings2018", "isochrones": "mist"},
                       "lifetime": {"formulae": "hurley2000", "until": "agb_end"}, "metallicity": 0.02}


def progenitor_choices(population, progenitor=None):
    """IFMR, lifetime and metallicity: ``population.*`` if set, else ``progenitor.*`` (the total-age
    stage's choices), else :data:`PROGENITOR_DEFAULTS`."""
    progenitor = progenitor or {}
    out = {}
    for key, default in PROGENITOR_DEFAULTS.items():
        value = population.get(key)
        out[key] = value if value is not None else progenitor.get(key, default)
    return out


def model_from_settings(population, cooling_link, progenitor=None):
    """A :class:`PopulationModel` from the ``population`` (and ``progenitor``) configuration sections
    and a cooling link."""
    imf = population.get("imf") or {}
    choice = progenitor_choices(population, progenitor)
    return PopulationModel(cooling_link.log_lum_at_age, ifmr=choice["ifmr"], lifetime=choice["lifetime"],
                           imf=imf.get("kind", "salpeter"), mass_range_msun=imf.get("mass_range_msun"),
                           metallicity=choice["metallicity"])
