"""Model tables built once per configuration and interpolated by the per-shard stages.

Each builder takes its section of the configuration and returns ``(table, specs, models)``: a
DataFrame of plain numeric columns, their descriptions, and the model choices with references
(for provenance). Each loader turns the table back into an object with vectorised lookups.
"""

from __future__ import annotations

import numpy as np
import pandas as pd

from ..errors import ConfigError
from ..tableio import Column


# ---------------------------------------------------------------- photometry
def band_list(bands):
    """``bands`` section as a list of (key, passband, system)."""
    return [(k, b["passband"], b["system"]) for k, b in bands.items()]


def build_photometry_table(settings):
    """Synthetic magnitudes of the model spectra for unit solid angle on a Teff grid.

    Columns: ``teff_k``, ``mbol_unit`` (apparent bolometric magnitude of a star with (R/d)^2 = 1)
    and ``mag_unit_<band>`` per band.
    """
    from ..photometry.bolometric import blackbody_magnitudes, bolometric_magnitude_from_flux
    from ..constants import SIGMA_SB_SI

    lum = settings["luminosity"]
    grid = lum["teff_grid"]
    if lum.get("spectra", "blackbody") != "blackbody":
        raise ConfigError(f"luminosity.spectra: unknown model spectra {lum['spectra']!r}")
    teff = np.geomspace(grid["min_k"], grid["max_k"], int(grid["n"]))
    bands = band_list(settings["bands"])
    mags = blackbody_magnitudes(teff, [b[1] for b in bands], [b[2] for b in bands])
    table = pd.DataFrame({"teff_k": teff, "mbol_unit": bolometric_magnitude_from_flux(SIGMA_SB_SI * teff**4)})
    specs = {"teff_k": Column("K", "Effective temperature of the model spectrum", "phys.temperature.effective"),
             "mbol_unit": Column("mag", "Apparent bolometric magnitude (IAU 2015 B2) for a solid angle (R/d)^2 = 1",
                                 "phot.mag.bol")}
    for j, (key, passband, system) in enumerate(bands):
        table[f"mag_unit_{key}"] = mags[:, j]
        specs[f"mag_unit_{key}"] = Column("mag", f"Synthetic {system.upper() if system == 'ab' else 'Vega'} magnitude "
                                                 f"through {passband} for (R/d)^2 = 1", "phot.mag")
    models = [{"name": "blackbody", "reference": "Planck law; synthetic photometry through speclite passbands; "
               "AB: Oke, J. B. & Gunn, J. E. 1983, ApJ 266, 713; bolometric scale: IAU 2015 Resolution B2",
               "caution": BLACKBODY_CAUTION}]
    if any(b[2] == "vega" for b in bands):
        from ..photometry.passbands import vega_zero_points
        refs = sorted({vega_zero_points()[b[1]][2] for b in bands if b[2] == "vega"})
        models.append({"name": "vega_zero_points", "reference": "; ".join(refs)})
    return table, specs, models


BLACKBODY_CAUTION = ("Model spectra are blackbodies. White-dwarf atmospheres are not: hydrogen-atmosphere (DA) stars "
                     "have a Balmer jump and strong Balmer lines, so blackbody colours, Teff from colours and "
                     "bolometric corrections are biased, most in blue bands and between about 8,000 and 20,000 K.")


class PhotometryModel:
    """Vectorised lookups on a photometry table (see :func:`build_photometry_table`)."""

    def __init__(self, table):
        self.teff = table["teff_k"].to_numpy(dtype=float)
        self.log_teff = np.log10(self.teff)
        self.mbol_unit = table["mbol_unit"].to_numpy(dtype=float)
        self.mag_unit = {c[len("mag_unit_"):]: table[c].to_numpy(dtype=float)
                         for c in table.columns if c.startswith("mag_unit_")}

    def bc(self, band, teff):
        """Bolometric correction BC = m_bol - m_band at ``teff`` (NaN outside the grid)."""
        lt = np.log10(np.asarray(teff, dtype=float))
        return np.interp(lt, self.log_teff, self.mbol_unit - self.mag_unit[band], left=np.nan, right=np.nan)

    def teff_from_colour(self, band1, band2, colour):
        """Teff (K) whose model colour m_band1 - m_band2 equals ``colour`` (NaN outside the grid).

        The blackbody colour falls monotonically as Teff rises, so the inversion is one interpolation.
        """
        model = self.mag_unit[band1] - self.mag_unit[band2]
        order = np.argsort(model)
        if np.any(np.diff(model[order]) <= 0):
            raise ConfigError(f"colour {band1}-{band2} is not monotonic in Teff on the model grid")
        lt = np.interp(np.asarray(colour, dtype=float), model[order], self.log_teff[order], left=np.nan, right=np.nan)
        return 10.0**lt


# ---------------------------------------------------------------- mass-radius
def build_mass_radius_table(settings):
    """Mass-radius table on a (mass, Teff) grid, long format.

    ``relation: structure`` integrates Chandrasekhar's equation for the configured core (with the
    Salpeter 1961 Coulomb correction if asked) and adds the finite-temperature envelope for the
    hydrogen-layer choice; ``relation: nauenberg1972`` tabulates the closed-form zero-temperature
    fit (the same radius at every Teff).
    """
    from ..massradius.table import TABLE_COLUMNS

    cfg = settings["mass"]
    if cfg["relation"] == "structure":
        from ..massradius.table import build_mass_radius_table as build

        df = build(core=cfg["core"], hydrogen_layer=cfg["hydrogen_layer"], coulomb=cfg["coulomb"])
        models = list(df.attrs.get("models", []))
        models.append({"name": "mass_radius_settings", "reference": "", **df.attrs.get("settings", {})})
    elif cfg["relation"] == "nauenberg1972":
        from ..massradius.nauenberg import NAUENBERG_1972, NauenbergInverse, logg_cgs

        inv = NauenbergInverse(mu_e=cfg["mu_e"])
        teff = np.geomspace(3000.0, 150000.0, 5)
        m2, t2 = np.meshgrid(inv.mass, teff, indexing="ij")
        r2 = np.broadcast_to(inv.radius[:, None], m2.shape)
        df = pd.DataFrame({"mass_msun": m2.ravel(), "teff_k": t2.ravel(), "radius_rsun": r2.ravel(),
                           "logg_cgs": logg_cgs(m2, r2).ravel()})
        models = [NAUENBERG_1972.as_model() | {"mu_e": cfg["mu_e"], "caution": NAUENBERG_1972.note}]
    else:
        raise ConfigError(f"mass.relation: unknown relation {cfg['relation']!r}")
    df = pd.DataFrame({c: df[c].to_numpy() for c in df.columns})      # plain frame, attrs moved to provenance
    return df, {c: TABLE_COLUMNS[c] for c in df.columns}, models


def load_mass_radius(table):
    """Vectorised mass-radius lookups (:class:`cinderclock.massradius.grid.MassRadiusGrid`)."""
    from ..massradius.grid import MassRadiusGrid

    return MassRadiusGrid.from_frame(table)


# ---------------------------------------------------------------- cooling
def build_cooling_table(settings):
    """Cooling-model parameters (Mestel's law: one row holding its age coefficient)."""
    cool = settings["cooling"]
    if cool["model"] != "mestel":
        raise ConfigError(f"cooling.model: unknown model {cool['model']!r}")
    from ..cooling.mestel import MESTEL_1952, age_coefficient_yr

    m = cool["mestel"]
    if m.get("coefficient_yr") is not None:
        coeff, source = float(m["coefficient_yr"]), m.get("coefficient_source", "user-supplied")
    else:
        env = m["envelope"]
        coeff = age_coefficient_yr(m["ion_mass_number"], X=env["X"], Z=env["Z"], mu=env["mu"], mu_e=env["mu_e"])
        source = "derived from the Kramers-envelope constants (Shapiro & Teukolsky 1983, section 4.1)"
    table = pd.DataFrame({"coefficient_yr": [coeff], "ion_mass_number": [float(m["ion_mass_number"])]})
    specs = {"coefficient_yr": Column("yr", "k in t = k (M/Msun)^(5/7) (L/Lsun)^(-5/7)", ""),
             "ion_mass_number": Column("", "Mean mass number of the core ions", "")}
    return table, specs, [MESTEL_1952.as_model() | {"coefficient_yr": coeff, "coefficient_source": source,
                                                    "caution": MESTEL_1952.note}]


class CoolingModel:
    """Cooling ages from the cooling table."""

    def __init__(self, table):
        self.coefficient_yr = float(table["coefficient_yr"].iloc[0])

    def age_yr(self, mass, log_lum):
        """(age in yr, in-range mask)."""
        from ..cooling.mestel import MESTEL_1952, cooling_age_yr

        age = cooling_age_yr(mass, log_lum, self.coefficient_yr)
        return age, MESTEL_1952.inside(mass=mass, log_lum=log_lum)
