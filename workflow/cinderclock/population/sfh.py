"""Star-formation histories as cumulative functions of lookback time.

A history with population age T (Gyr) gives the number of stars formed between the present and
lookback time tau, Psi_T(tau) = int_0^tau psi_T(t) dt, in units of "rate 1 per Gyr during the
star-forming periods" (the forward model's normalisation is fitted separately). Functions are
vectorised and broadcast over tau and T together, so a whole grid of ages is evaluated at once.

``constant``
    psi = 1 for 0 <= tau <= T.
``constant_plus_burst``
    constant as above plus a burst: the rate is multiplied by ``rate_factor`` between lookback
    times ``lookback_gyr +- duration_gyr / 2`` (the part older than T is cut off).
``single_burst``
    psi = 1 for T - duration_gyr <= tau <= T only: a population whose oldest stars are T old.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..errors import ConfigError

KINDS = ("constant", "constant_plus_burst", "single_burst")


@dataclass(frozen=True)
class StarFormationHistory:
    """Star-formation history with the population age T as its free parameter.

    Parameters
    ----------
    kind : str
        One of :data:`KINDS`.
    burst_lookback_gyr : float
        Centre of the burst in lookback time (``constant_plus_burst``).
    burst_duration_gyr : float
        Full width of the burst (``constant_plus_burst`` and ``single_burst``).
    burst_rate_factor : float
        Extra star-formation rate during the burst, in units of the constant rate
        (``constant_plus_burst``): the rate there is 1 + factor.
    """

    kind: str = "constant"
    burst_lookback_gyr: float = 2.0
    burst_duration_gyr: float = 0.5
    burst_rate_factor: float = 5.0

    def __post_init__(self):
        if self.kind not in KINDS:
            raise ConfigError(f"population.sfh.kind: {self.kind!r} is not one of {', '.join(KINDS)}")
        if self.burst_duration_gyr <= 0:
            raise ConfigError("population.sfh.burst.duration_gyr must be positive")

    def cumulative(self, tau_gyr, age_gyr):
        """Stars formed between now and lookback time ``tau_gyr`` for a population of age ``age_gyr``.

        Parameters
        ----------
        tau_gyr, age_gyr : array_like
            Broadcast together (Gyr).
        """
        tau = np.asarray(tau_gyr, dtype=float)
        age = np.asarray(age_gyr, dtype=float)
        upto = np.clip(tau, 0.0, None)
        if self.kind == "single_burst":
            start = np.maximum(age - self.burst_duration_gyr, 0.0)
            return np.clip(np.minimum(upto, age) - start, 0.0, None)
        base = np.minimum(upto, age)
        if self.kind == "constant":
            return base
        lo = max(self.burst_lookback_gyr - 0.5 * self.burst_duration_gyr, 0.0)
        hi = self.burst_lookback_gyr + 0.5 * self.burst_duration_gyr
        burst = np.clip(np.minimum(base, hi) - lo, 0.0, None)
        return base + self.burst_rate_factor * burst

    def total(self, age_gyr):
        """All stars formed over the history (same units as :meth:`cumulative`)."""
        return self.cumulative(np.inf, age_gyr)

    def as_model(self):
        d = {"name": f"sfh_{self.kind}", "reference": "star-formation history of our choosing (see population.sfh)"}
        if self.kind != "constant":
            d["burst_duration_gyr"] = self.burst_duration_gyr
        if self.kind == "constant_plus_burst":
            d |= {"burst_lookback_gyr": self.burst_lookback_gyr, "burst_rate_factor": self.burst_rate_factor}
        return d


@dataclass(frozen=True)
class PiecewiseHistory:
    """A rate that is constant within each lookback bin (for simulations and the inferred history).

    Parameters
    ----------
    edges_gyr : tuple of float
        Ascending lookback-time edges (Gyr), the first at 0 or later.
    rates : tuple of float
        Rate in each bin (any units; star formation stops beyond the last edge).
    """

    edges_gyr: tuple
    rates: tuple

    def __post_init__(self):
        e = np.asarray(self.edges_gyr, dtype=float)
        if e.ndim != 1 or e.size != len(self.rates) + 1 or np.any(np.diff(e) <= 0) or e[0] < 0:
            raise ConfigError("a piecewise history needs ascending edges, one more than rates")
        if np.any(np.asarray(self.rates, dtype=float) < 0):
            raise ConfigError("a piecewise history needs non-negative rates")

    def cumulative(self, tau_gyr, age_gyr=None):
        """Stars formed between now and lookback ``tau_gyr`` (``age_gyr`` only broadcasts: the
        history ends at its last edge)."""
        e = np.asarray(self.edges_gyr, dtype=float)
        cum = np.concatenate([[0.0], np.cumsum(np.asarray(self.rates, dtype=float) * np.diff(e))])
        tau = np.asarray(tau_gyr, dtype=float)
        out = np.interp(np.clip(tau, 0.0, None), e, cum, left=0.0, right=cum[-1])
        out = np.where(np.isposinf(tau), cum[-1], out)
        if age_gyr is not None:
            out = np.broadcast_to(out, np.broadcast_shapes(out.shape, np.shape(age_gyr)))
        return out

    def total(self, age_gyr=None):
        return self.cumulative(np.inf, age_gyr)

    def as_model(self):
        return {"name": "sfh_piecewise", "reference": "piecewise-constant star-formation history",
                "edges_gyr": [float(x) for x in self.edges_gyr], "rates": [float(x) for x in self.rates]}


def sfh_from_settings(sfh):
    """:class:`StarFormationHistory` from the ``population.sfh`` configuration section."""
    burst = sfh.get("burst") or {}
    return StarFormationHistory(kind=sfh.get("kind", "constant"),
                                burst_lookback_gyr=float(burst.get("lookback_gyr", 2.0)),
                                burst_duration_gyr=float(burst.get("duration_gyr", 0.5)),
                                burst_rate_factor=float(burst.get("rate_factor", 5.0)))
