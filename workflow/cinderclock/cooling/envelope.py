"""Envelope relation between the core temperature and the photon luminosity of a white dwarf.

The relation is Mestel's radiative Kramers-opacity envelope (see :mod:`cinderclock.cooling.mestel`
for the derivation): L = f C(X, Z, mu, mu_e) (M / Msun) T_c^(7/2), with C computed from the
envelope's hydrogen and metal mass fractions and mean molecular weight, and an optional
calibration factor f (default 1).

Presets
-------
``"He"`` (helium-dominated envelope, non-DA)
    X = 0, Z = 0.1, mu = 1.4: the values of Shapiro & Teukolsky (1983, section 4.1), giving
    C = 2.0e6 erg s^-1 K^-3.5 per Msun. This is the baseline of :mod:`~cinderclock.cooling.mestel`.
``"H"`` (hydrogen-rich envelope, DA)
    X = 0.70, Z = 0.02, mu = 0.617 (a solar-like fully ionised mixture; our choice): C = 2.6e6.

Calibration
-----------
Published Mestel-type age coefficients for the same law differ by a factor of about two
(4.3e6 yr from the Shapiro & Teukolsky constants, 6e6 yr and 8.8e6 yr in the literature; see the
Mestel module). Because the age scales as C^(-2/7), a factor f changes ages by f^(-2/7):
:func:`calibration_for_coefficient` returns the f that reproduces a chosen coefficient.

Cautions
--------
This envelope is a deliberately simple model: a single Kramers bound-free opacity law, no
conductive or convective layer (no convective coupling of a cool envelope to the core, which
speeds late cooling), no hydrogen/helium layering (the H/He presets differ only through X, Z and
mu), no dependence on the thickness of the hydrogen layer. Absolute ages carry the calibration
uncertainty above (tens of per cent), which dominates over the H/He preset difference (~7 %).
"""

from __future__ import annotations

from dataclasses import dataclass, replace

import numpy as np

from ..constants import L_SUN_W
from . import mestel

_L_SUN_ERG_S = L_SUN_W * 1e7


@dataclass(frozen=True)
class EnvelopeModel:
    """Kramers-opacity envelope linking core temperature and photon luminosity.

    Parameters
    ----------
    key : str
        Preset name (``"H"`` or ``"He"``) or a name of the user's choosing.
    X, Z : float
        Hydrogen and metal mass fractions of the envelope gas.
    mu : float
        Mean molecular weight of the envelope gas.
    mu_e : float
        Mean molecular weight per electron at the core boundary.
    calibration : float
        Factor f multiplying the envelope constant C.
    """

    key: str
    X: float
    Z: float
    mu: float
    mu_e: float = 2.0
    calibration: float = 1.0

    def constant_cgs(self):
        """f C in L = f C (M/Msun) T_c^(7/2), L in erg s^-1, T_c in K."""
        return self.calibration * mestel.envelope_constant_cgs(X=self.X, Z=self.Z, mu=self.mu, mu_e=self.mu_e)

    def log_lum(self, mass_msun, log_tc):
        """log10 L/Lsun of a star of ``mass_msun`` with core temperature 10**``log_tc`` K."""
        m = np.asarray(mass_msun, dtype=float)
        return np.log10(self.constant_cgs() * m / _L_SUN_ERG_S) + 3.5 * np.asarray(log_tc, dtype=float)

    def log_tc(self, mass_msun, log_lum):
        """log10 of the core temperature (K) at luminosity 10**``log_lum`` Lsun."""
        m = np.asarray(mass_msun, dtype=float)
        return (np.asarray(log_lum, dtype=float) - np.log10(self.constant_cgs() * m / _L_SUN_ERG_S)) / 3.5

    def with_calibration(self, factor):
        """A copy with calibration factor ``factor``."""
        return replace(self, calibration=float(factor))

    def as_model(self):
        """Provenance entry."""
        return {"name": f"kramers_envelope_{self.key}",
                "reference": "Mestel, L. 1952, MNRAS 112, 583; Shapiro & Teukolsky 1983, section 4.1",
                "settings": {"X": self.X, "Z": self.Z, "mu": self.mu, "mu_e": self.mu_e,
                             "calibration": self.calibration,
                             "constant_erg_s_K-3.5_per_Msun": float(self.constant_cgs())}}


#: Envelope presets (see the module docstring for their sources).
ENVELOPES = {
    "He": EnvelopeModel("He", X=0.0, Z=0.1, mu=1.4),
    "H": EnvelopeModel("H", X=0.70, Z=0.02, mu=1.0 / (2 * 0.70 + 0.75 * 0.28 + 0.5 * 0.02)),
}


def envelope_model(envelope, calibration=None):
    """Return an :class:`EnvelopeModel` from a preset key or pass one through.

    Parameters
    ----------
    envelope : str or EnvelopeModel
        ``"H"``, ``"He"`` or a model.
    calibration : float, optional
        Replace the calibration factor.
    """
    if isinstance(envelope, EnvelopeModel):
        model = envelope
    else:
        try:
            model = ENVELOPES[envelope]
        except KeyError:
            raise ValueError(f"unknown envelope {envelope!r}; choose one of {sorted(ENVELOPES)}") from None
    return model if calibration is None else model.with_calibration(calibration)


def calibration_for_coefficient(target_coefficient_yr, envelope="He", ion_mass_number=12.0):
    """Calibration factor f that makes Mestel's age coefficient equal ``target_coefficient_yr``.

    Mestel's law t = k (M/Msun)^(5/7) (L/Lsun)^(-5/7) has k proportional to C^(-2/7), so
    f = (k_target / k)^(-7/2) with k computed from the uncalibrated preset.

    Parameters
    ----------
    target_coefficient_yr : float
        Desired coefficient k in years (e.g. 8.8e6, Althaus et al. 2010, from memory).
    envelope : str or EnvelopeModel
        Envelope whose constant is calibrated (its own calibration factor is ignored).
    ion_mass_number : float
        Mean ion mass number A used in k.
    """
    model = envelope_model(envelope, calibration=1.0)
    k0 = mestel.age_coefficient_yr(ion_mass_number, envelope_cgs=model.constant_cgs())
    return (target_coefficient_yr / k0) ** (-3.5)
