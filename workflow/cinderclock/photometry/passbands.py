"""Passband response curves, read offline from the curves speclite ships.

speclite (a general-purpose synthetic-photometry library) carries the Gaia DR2/DR3, SDSS, 2MASS,
WISE, Pan-STARRS, DECam, LSST, GALEX and Bessell curves as ECSV files; names follow its
``<survey>-<band>`` form, for example ``gaiadr3-G`` or ``sdss2010-r``.
"""

from __future__ import annotations

import csv
from dataclasses import dataclass
from functools import lru_cache
from importlib import resources

import numpy as np

from ..constants import ANGSTROM_M
from ..errors import ConfigError


@dataclass(frozen=True)
class Passband:
    """One passband: wavelengths (m) and dimensionless response (photon-counting convention)."""

    name: str
    wavelength_m: np.ndarray
    response: np.ndarray

    @property
    def pivot_wavelength_m(self):
        """Pivot wavelength sqrt(int S lam dlam / int S / lam dlam), in m."""
        lam, s = self.wavelength_m, self.response
        return np.sqrt(np.trapezoid(s * lam, lam) / np.trapezoid(s / lam, lam))


def available_passbands():
    """Names of the passband curves shipped with speclite."""
    import speclite.filters

    root = resources.files(speclite.filters.__name__.rsplit(".", 1)[0]) / "data" / "filters"
    return sorted(p.name[:-5] for p in root.iterdir() if p.name.endswith(".ecsv"))


@lru_cache(maxsize=None)
def load_passband(name):
    """Load a passband by its speclite name; a clear error names the unknown band."""
    import speclite.filters

    try:
        curve = speclite.filters.load_filter(name)
    except Exception:
        from .systems import closest

        raise ConfigError(f"unknown passband '{name}'; closest known passbands: "
                          f"{', '.join(closest(name, available_passbands()))}") from None
    lam = np.asarray(curve.wavelength, dtype=float) * ANGSTROM_M
    return Passband(name=name, wavelength_m=lam, response=np.asarray(curve.response, dtype=float))


@lru_cache(maxsize=None)
def vega_zero_points():
    """Published Vega/AB zero points as ``{passband: (zp_vega, zp_ab, source)}``."""
    text = (resources.files("cinderclock") / "data" / "vega_zero_points.csv").read_text()
    rows = csv.reader(line for line in text.splitlines() if line and not line.startswith("#"))
    return {r[0]: (float(r[1]), float(r[2]), r[3]) for r in rows}


def vega_minus_ab(name):
    """Offset m_Vega - m_AB for a passband, from its published zero points.

    Raises
    ------
    ConfigError
        If no published zero points for the band are known to cinderclock.
    """
    zps = vega_zero_points()
    if name not in zps:
        raise ConfigError(f"no published Vega zero point for passband '{name}'; use system: ab "
                          f"or one of: {', '.join(sorted(zps))}")
    zp_vega, zp_ab, _ = zps[name]
    # m = -2.5 log10(I) + ZP in both systems, so m_Vega - m_AB = ZP_Vega - ZP_AB
    return zp_vega - zp_ab
