"""The envelope table: T_c, radius and luminosity of white dwarfs on a (mass, log Teff) grid.

:func:`build_envelope_table` integrates the envelope of every grid star once per configuration
(:mod:`~cinderclock.envelope.build`); :class:`EnvelopeTable` interpolates it with the methods of
the Mestel-type :class:`cinderclock.cooling.envelope.EnvelopeModel` (``log_lum``, ``log_tc``),
so the cooling tracks can use either, plus radii for the mass-radius relation and the cooling
table's Teff/radius/log g columns. ``to_frame`` / ``from_frame`` give a long table with column
units for :func:`cinderclock.tableio.write_table`.

Between mass nodes values are interpolated linearly in mass; along a mass node, in log Teff
(or in log T_c / log L, which rise monotonically with Teff). Beyond the coolest and hottest
converged node of a mass, ``log_lum`` / ``log_tc`` continue along the end slope in
(log L, log T_c) (a formal continuation, flagged by :meth:`EnvelopeTable.inside`); radii are
never extrapolated (NaN).
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from ..tableio import Column
from .convection import DEFAULT_ALPHA

#: Default mass grid (Msun) and log10 Teff grid (K, 3,000 to 150,000 K).
DEFAULT_MASSES = np.round(np.arange(0.15, 1.35 + 1e-9, 0.05), 6)
DEFAULT_LOG_TEFF = np.round(np.linspace(np.log10(3000.0), np.log10(150000.0), 57), 6)
#: Helium atmospheres cooler than this are left out (NaN): without He- free-free and collision-
#: induced absorption the grey helium atmosphere is far too transparent there (our limit).
HE_ATMOSPHERE_MIN_TEFF = 8000.0

REFERENCES = [
    "Eddington grey atmosphere; validity limit: Rohrmann, R. D. et al. 2012, A&A 546, A119",
    "Saha ionization with electron degeneracy; hard-sphere occupation probabilities after Hummer, D. G. & "
    "Mihalas, D. 1988, ApJ 331, 794",
    "Fermi-Dirac electrons: Antia, H. M. 1993, ApJS 84, 101 (inverse F_1/2); Chandrasekhar, S. 1939 (T = 0 pressure)",
    "Coulomb: Debye-Hueckel and ion-sphere (Salpeter, E. E. 1961, ApJ 134, 669) limits",
    "Opacity: Kramers/Gaunt bound-free and H- fits as in Gray, D. F. 2005, The Observation and Analysis of "
    "Stellar Photospheres, ch. 8 (Wishart 1979; Bell & Berrington 1987); free-free Rybicki & Lightman 1979 eq. 5.18b",
    "Conduction: Yakovlev, D. G. & Urpin, V. A. 1980, Sov. Astron. 24, 303; Potekhin, A. Y. et al. 1999, A&A 346, 345",
    "Convection: Boehm-Vitense, E. 1958, Z. Astrophys. 46, 108, as in Kippenhahn, Weigert & Weiss 2012, ch. 7",
    "Core material below the helium layer (to Dm = 0.3 M): fully ionised C/O, linear-mixing Coulomb energy, "
    "Kramers free-free (Rybicki & Lightman 1979 eq. 5.18b) with Z^2 and Thomson, conduction with the ion charges",
    "Core: Chandrasekhar equation with the Salpeter 1961 lattice term (cinderclock.massradius.chandrasekhar)",
]
CAUTION = ("grey Eddington boundary (poor below Teff ~5,000-6,000 K: non-grey, convective atmospheres); no "
           "molecules, collision-induced absorption or He- free-free (cool DA below ~5,000 K and DB below "
           f"{HE_ATMOSPHERE_MIN_TEFF:.0f} K too transparent; DB rows below that are NaN); analytic opacities "
           "(Kramers free-free, hydrogenic bound-free) instead of opacity tables; local mixing-length "
           "convection with one alpha; radiation pressure left out; T_c taken at Dm = 0.3 M with L_r = L m/M "
           "and no neutrino losses (hot stars above ~30,000 K: core too hot; the temperature still rises "
           "by 0.01-0.1 dex per decade of pressure there); radius matched to the zero-temperature core at "
           "Dm = 0.3 M (its thermal pressure below is left out)")

#: Columns of the long table (Parquet-ready, see cinderclock.tableio.write_table).
TABLE_COLUMNS = {
    "mass_msun": Column("solMass", "White-dwarf mass", "phys.mass"),
    "log_teff": Column("dex(K)", "log10 of the effective temperature", "phys.temperature.effective"),
    "log_tc": Column("dex(K)", "log10 of the core temperature (at Dm = 0.3 M in the core material, below the helium layer)", "phys.temperature"),
    "radius_rsun": Column("solRad", "Photospheric radius with the integrated envelope (NaN where not bound)",
                          "phys.size.radius"),
    "log_lum": Column("dex(solLum)", "log10 of 4 pi R^2 sigma Teff^4 in solar units", "phys.luminosity"),
    "logg": Column("dex(cm/s2)", "log10 of the surface gravity G M / R^2", "phys.gravity"),
    "radius_zero_t_rsun": Column("solRad", "Radius of the zero-temperature core model of the same mass",
                                 "phys.size.radius"),
    "log_dm_conv": Column("", "log10 of the mass above the base of the outer convection zone over M (NaN: "
                          "radiative envelope)", ""),
    "eta_conv": Column("", "Electron degeneracy parameter mu/kT at the base of the convection zone", ""),
    "coupled": Column("", "1 where the convection zone reaches degenerate electrons (eta > 0): convective "
                      "coupling to the core", ""),
}


@dataclass
class EnvelopeTable:
    """Envelope solutions on a (mass, log Teff) grid; arrays of shape (n_mass, n_teff)."""

    masses: np.ndarray
    log_teff: np.ndarray
    columns: dict
    settings: dict = field(default_factory=dict)

    # ------------------------------------------------------------------ interpolation helpers
    def _mass_weights(self, mass):
        m = np.asarray(mass, dtype=float)
        i = np.clip(np.searchsorted(self.masses, m) - 1, 0, self.masses.size - 2)
        w = (m - self.masses[i]) / (self.masses[i + 1] - self.masses[i])
        ok = (m >= self.masses[0]) & (m <= self.masses[-1])
        return i, np.clip(w, 0.0, 1.0), ok

    def _along(self, x_name, y_name, mass, x, extrapolate):
        """Interpolate column y against column x along each mass node, then linearly in mass."""
        mass, x = np.broadcast_arrays(np.asarray(mass, dtype=float), np.asarray(x, dtype=float))
        i, w, ok = self._mass_weights(mass)
        out = np.zeros(mass.shape)
        for k in range(self.masses.size):                 # loop over mass nodes, not stars
            sel = (i == k) | (i + 1 == k)
            if not sel.any():
                continue
            xs, ys = self.columns[x_name][k], self.columns[y_name][k]
            good = np.isfinite(xs) & np.isfinite(ys)
            xs, ys = xs[good], ys[good]
            order = np.argsort(xs)
            xs, ys = xs[order], ys[order]
            val = np.interp(x[sel], xs, ys) if xs.size else np.full(sel.sum(), np.nan)
            if extrapolate and xs.size >= 2:
                lo, hi = x[sel] < xs[0], x[sel] > xs[-1]
                val = np.where(lo, ys[0] + (x[sel] - xs[0]) * (ys[1] - ys[0]) / (xs[1] - xs[0]), val)
                val = np.where(hi, ys[-1] + (x[sel] - xs[-1]) * (ys[-1] - ys[-2]) / (xs[-1] - xs[-2]), val)
            elif xs.size:
                val = np.where((x[sel] < xs[0]) | (x[sel] > xs[-1]), np.nan, val)
            weight = np.where(i[sel] == k, 1.0 - w[sel], w[sel])
            out[sel] += weight * val
        return np.where(ok & np.isfinite(x), out, np.nan)

    # ------------------------------------------------------------------ EnvelopeModel interface
    def log_lum(self, mass_msun, log_tc):
        """log10 L/Lsun of a star of ``mass_msun`` with core temperature 10**``log_tc`` K."""
        return self._along("log_tc", "log_lum", mass_msun, log_tc, extrapolate=True)

    def log_tc(self, mass_msun, log_lum):
        """log10 of the core temperature (K) at luminosity 10**``log_lum`` Lsun."""
        return self._along("log_lum", "log_tc", mass_msun, log_lum, extrapolate=True)

    def inside(self, mass_msun, log_lum):
        """True where (mass, log L) lies inside the computed part of the table (no continuation)."""
        return np.isfinite(self._along("log_lum", "log_tc", mass_msun, log_lum, extrapolate=False))

    def radius_rsun(self, mass_msun, log_lum):
        """Photospheric radius (Rsun) at (mass, log L); NaN outside the computed table."""
        return self._along("log_lum", "radius_rsun", mass_msun, log_lum, extrapolate=False)

    def radius_at_teff(self, mass_msun, teff_k):
        """Photospheric radius (Rsun) at (mass, Teff); NaN outside the computed table."""
        return self._along("log_teff_grid", "radius_rsun", mass_msun, np.log10(teff_k), extrapolate=False)

    def as_model(self):
        """Provenance entry."""
        return {"name": f"integrated_envelope_{self.settings.get('atmosphere', '')}",
                "reference": "; ".join(REFERENCES), "settings": dict(self.settings), "caution": CAUTION}

    # ------------------------------------------------------------------ long table
    def to_frame(self):
        """Long-format DataFrame (columns of :data:`TABLE_COLUMNS`), settings and provenance in ``attrs``."""
        import pandas as pd

        m2, t2 = np.meshgrid(self.masses, self.log_teff, indexing="ij")
        data = {"mass_msun": m2.ravel(), "log_teff": t2.ravel()}
        for name in list(TABLE_COLUMNS)[2:]:
            data[name] = np.asarray(self.columns[name], dtype=float).ravel()
        df = pd.DataFrame(data)
        df.attrs["settings"] = dict(self.settings)
        df.attrs["models"] = [self.as_model()]
        return df

    @classmethod
    def from_frame(cls, df):
        """Rebuild from :meth:`to_frame` output (or the Parquet table written from it)."""
        masses = np.unique(df["mass_msun"].to_numpy(dtype=float))
        log_teff = np.unique(df["log_teff"].to_numpy(dtype=float))
        d = df.sort_values(["mass_msun", "log_teff"])
        shape = (masses.size, log_teff.size)
        if len(d) != masses.size * log_teff.size:
            raise ValueError("envelope table is not a complete (mass, log Teff) grid")
        cols = {name: d[name].to_numpy(dtype=float).reshape(shape) for name in list(TABLE_COLUMNS)[2:]}
        settings = dict(df.attrs.get("settings", {}))
        return cls._with_grid(masses, log_teff, cols, settings)

    @classmethod
    def _with_grid(cls, masses, log_teff, cols, settings):
        cols = dict(cols)
        cols["log_teff_grid"] = np.broadcast_to(log_teff[None, :], (masses.size, log_teff.size))
        return cls(masses, log_teff, cols, settings)


def build_envelope_table(masses=None, log_teff=None, atmosphere="H", q_h=1e-4, q_he=1e-2, core="CO",
                         mlt_alpha=DEFAULT_ALPHA):
    """Integrate the envelopes of a (mass, log Teff) grid and return an :class:`EnvelopeTable`.

    Parameters
    ----------
    masses : array_like, optional
        Masses in Msun, increasing (default :data:`DEFAULT_MASSES`, 0.15-1.35).
    log_teff : array_like, optional
        log10 Teff (K), increasing (default :data:`DEFAULT_LOG_TEFF`, 3,000-150,000 K).
    atmosphere : {"H", "He"}
        Hydrogen layer of mass fraction ``q_h`` on helium, or a helium atmosphere (no hydrogen).
    q_h, q_he : float
        Layer mass fractions M_H / M (thick 1e-4, thin 1e-10; common practice) and M_He / M (1e-2).
    core : str
        Core composition key of :mod:`cinderclock.composition` (zero-temperature core model).
    mlt_alpha : float
        Mixing-length parameter of :mod:`cinderclock.envelope.convection`.
    """
    from .build import solve_grid

    if atmosphere not in ("H", "He"):
        raise ValueError(f"atmosphere must be 'H' or 'He', not {atmosphere!r}")
    masses = np.asarray(DEFAULT_MASSES if masses is None else masses, dtype=float)
    log_teff = np.asarray(DEFAULT_LOG_TEFF if log_teff is None else log_teff, dtype=float)
    for name, arr in (("masses", masses), ("log_teff", log_teff)):
        if arr.ndim != 1 or arr.size < 2 or np.any(np.diff(arr) <= 0):
            raise ValueError(f"{name} must be a strictly increasing 1-d array of at least two values")
    q_h_used = float(q_h) if atmosphere == "H" else 0.0
    out = solve_grid(masses, 10.0**log_teff, atmosphere, q_h_used, float(q_he), core, float(mlt_alpha))
    if atmosphere == "He":
        cool = np.broadcast_to(10.0 ** log_teff[None, :] < HE_ATMOSPHERE_MIN_TEFF, out["log_tc"].shape)
        for key in ("radius_rsun", "log_tc", "log_lum", "logg", "log_dm_conv", "eta_conv"):
            out[key] = np.where(cool, np.nan, out[key])
    with np.errstate(invalid="ignore"):
        coupled = np.where(np.isfinite(out["log_tc"]), (out["eta_conv"] > 0).astype(float), np.nan)
    cols = {name: out[name] for name in ("log_tc", "radius_rsun", "log_lum", "logg", "radius_zero_t_rsun",
                                         "log_dm_conv", "eta_conv")}
    cols["coupled"] = coupled
    settings = {"atmosphere": atmosphere, "q_h": q_h_used, "q_he": float(q_he), "core": str(core),
                "mlt_alpha": float(mlt_alpha), "mlt_version": "Boehm-Vitense 1958 as in Kippenhahn, Weigert & Weiss ch. 7",
                "n_mass": int(masses.size), "n_teff": int(log_teff.size)}
    return EnvelopeTable._with_grid(masses, log_teff, cols, settings)
