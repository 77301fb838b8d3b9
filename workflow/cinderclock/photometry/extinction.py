"""Interstellar extinction curves from dust_extinction, applied to spectra on each band's grid.

The curve A(lambda)/A(V) of a named R_V-dependent law from ``dust_extinction.parameter_averages``
(for example G23: Gordon et al. 2023, ApJ 950, 86; F99: Fitzpatrick 1999, PASP 111, 63; CCM89:
Cardelli, Clayton & Mathis 1989, ApJ 345, 245) is evaluated once on the wavelength grid of each
passband. A spectrum reddened by E(B-V) is

    f_obs(lambda) = f(lambda) * 10^(-0.4 * E(B-V) * R_V * A(lambda)/A(V)),

and the reddened spectrum is integrated through the band. Band extinction so computed depends on the
spectrum: for a hot star in a broad band it differs from A(lambda)/A(V) at the band's pivot
wavelength. E(B-V) here is the nominal colour excess of the law, A(V)/R_V, not the colour excess a
particular star would show in real B and V filters.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import lru_cache

import numpy as np

from ..errors import ConfigError

#: Laws accepted by name: R_V-dependent average curves of dust_extinction.parameter_averages.
KNOWN_LAWS = ("CCM89", "O94", "F99", "F04", "VCG04", "GCC09", "M14", "F19", "D22", "G23")


@lru_cache(maxsize=None)
def _model(law, r_v):
    if law not in KNOWN_LAWS:
        raise ConfigError(f"unknown extinction law '{law}'; choose one of {', '.join(KNOWN_LAWS)}")
    import dust_extinction.parameter_averages as pa

    cls = getattr(pa, law)
    lo, hi = cls.Rv_range
    if not (lo <= r_v <= hi):
        raise ConfigError(f"extinction law {law} is defined for R_V in [{lo}, {hi}], got {r_v}")
    return cls(Rv=r_v)


@dataclass(frozen=True)
class ExtinctionLaw:
    """A named dust_extinction law at a given R_V.

    Parameters
    ----------
    name : str
        One of :data:`KNOWN_LAWS`.
    r_v : float
        Ratio of total to selective extinction A(V)/E(B-V).
    """

    name: str = "G23"
    r_v: float = 3.1

    def __post_init__(self):
        _model(self.name, float(self.r_v))  # validate early

    @property
    def wavelength_range_m(self):
        """Wavelength range (m) over which the law is defined."""
        x_lo, x_hi = _model(self.name, float(self.r_v)).x_range   # inverse micron
        return 1e-6 / x_hi, 1e-6 / x_lo

    def a_over_av(self, wavelength_m, band=None):
        """A(lambda)/A(V) at wavelengths in m.

        Raises
        ------
        ConfigError
            If any wavelength lies outside the law's range (naming ``band`` if given).
        """
        import astropy.units as u

        lam = np.asarray(wavelength_m, dtype=float)
        lo, hi = self.wavelength_range_m
        if np.any(lam < lo * (1 - 1e-9)) or np.any(lam > hi * (1 + 1e-9)):
            what = f"passband '{band}'" if band else "the requested wavelengths"
            raise ConfigError(f"extinction law {self.name} covers {lo * 1e6:.3f}-{hi * 1e6:.3f} micron; "
                              f"{what} extends to {lam.min() * 1e6:.3f}-{lam.max() * 1e6:.3f} micron; "
                              f"choose a law that covers it (G23 spans 0.09-32 micron)")
        lam = np.clip(lam, lo, hi)
        return np.asarray(_model(self.name, float(self.r_v))(lam * u.m), dtype=float)

    def a_over_ebv(self, wavelength_m, band=None):
        """A(lambda)/E(B-V) = R_V A(lambda)/A(V) at wavelengths in m."""
        return float(self.r_v) * self.a_over_av(wavelength_m, band=band)

    def transmission(self, wavelength_m, ebv_mag, band=None):
        """Fraction of flux transmitted, 10^(-0.4 E(B-V) A(lambda)/E(B-V)), shape (n_ebv, n_lambda)."""
        k = self.a_over_ebv(wavelength_m, band=band)
        e = np.atleast_1d(np.asarray(ebv_mag, dtype=float))
        return 10.0 ** (-0.4 * e[:, None] * k[None, :])

    def as_model(self):
        """Provenance entry."""
        import dust_extinction

        return {"name": f"dust_extinction.{self.name}", "r_v": float(self.r_v),
                "version": getattr(dust_extinction, "__version__", "unknown")}
