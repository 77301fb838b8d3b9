"""Canonical columns: the quantities cinderclock understands, with units, descriptions and UCDs.

Input quantities are mapped from the user's column names through the ``catalogue.columns``
mapping of the configuration and converted to the canonical unit at ingest. Derived columns are
described by the stage that adds them; the descriptions travel with the data in every table's
metadata.
"""

from __future__ import annotations

from dataclasses import dataclass

from .tableio import Column


@dataclass(frozen=True)
class InputQuantity:
    """A quantity that may be read from the catalogue.

    Parameters
    ----------
    column : str
        Canonical column name in cinderclock tables.
    unit : str
        Canonical unit (astropy string); values are converted to it at ingest.
    description, ucd : str
        As in :class:`cinderclock.tableio.Column`.
    required : bool
        Ingest fails with a clear error if the catalogue lacks it.
    low, high : float
        Plausible range; values outside it are treated as the ingest stage documents.
    """

    column: str
    unit: str
    description: str
    ucd: str
    required: bool = False
    low: float = float("-inf")
    high: float = float("inf")

    @property
    def spec(self):
        return Column(self.unit, self.description, self.ucd)


#: Quantities a catalogue may provide, keyed by the name used in ``catalogue.columns``.
INPUT_QUANTITIES = {
    "star_id": InputQuantity("star_id", "", "Source identifier from the input catalogue", "meta.id;meta.main",
                             required=True),
    "ra": InputQuantity("ra_deg", "deg", "Right ascension (ICRS)", "pos.eq.ra;meta.main", low=0.0, high=360.0),
    "dec": InputQuantity("dec_deg", "deg", "Declination (ICRS)", "pos.eq.dec;meta.main", low=-90.0, high=90.0),
    "parallax": InputQuantity("plx_mas", "mas", "Trigonometric parallax as published (before zero-point correction)",
                              "pos.parallax.trig", required=True, low=-1e4, high=1e4),
    "parallax_error": InputQuantity("plx_err_mas", "mas", "Standard uncertainty of the parallax",
                                    "stat.error;pos.parallax.trig", required=True, low=0.0, high=1e4),
    "pmra": InputQuantity("pmra_mas_yr", "mas / yr", "Proper motion in right ascension, mu_alpha* = mu_alpha cos(dec)",
                          "pos.pm;pos.eq.ra"),
    "pmdec": InputQuantity("pmdec_mas_yr", "mas / yr", "Proper motion in declination", "pos.pm;pos.eq.dec"),
    "teff_spec": InputQuantity("teff_spec_k", "K", "Spectroscopic effective temperature", "phys.temperature.effective",
                               low=1500.0, high=250000.0),
    "teff_spec_error": InputQuantity("teff_spec_err_k", "K", "Uncertainty of the spectroscopic Teff",
                                     "stat.error;phys.temperature.effective", low=0.0, high=1e5),
    "logg_spec": InputQuantity("logg_spec", "dex(cm / s2)", "Spectroscopic surface gravity log10(g / cm s^-2)",
                               "phys.gravity", low=5.0, high=10.5),
    "logg_spec_error": InputQuantity("logg_spec_err", "dex", "Uncertainty of the spectroscopic log g",
                                     "stat.error;phys.gravity", low=0.0, high=5.0),
    "teff_logg_corr": InputQuantity("teff_logg_corr", "", "Correlation coefficient between spectroscopic Teff and log g",
                                    "stat.correlation", low=-1.0, high=1.0),
    "ebv": InputQuantity("ebv_mag", "mag", "Colour excess E(B-V) along the line of sight", "phot.color.excess",
                         low=0.0, high=10.0),
    "ebv_error": InputQuantity("ebv_err_mag", "mag", "Uncertainty of E(B-V)", "stat.error;phot.color.excess",
                               low=0.0, high=10.0),
    # inputs of the per-star parallax zero point (astrometry.zero_point_model)
    "nu_eff": InputQuantity("nu_eff_um", "1 / um", "Effective wavenumber used in the astrometric solution "
                            "(five-parameter solutions)", "em.wavenumber"),
    "pseudocolour": InputQuantity("pseudocolour_um", "1 / um", "Astrometrically estimated effective wavenumber "
                                  "(six-parameter solutions)", "em.wavenumber"),
    "ecl_lat": InputQuantity("ecl_lat_deg", "deg", "Ecliptic latitude", "pos.ecliptic.lat", low=-90.0, high=90.0),
    "astrometric_params_solved": InputQuantity("astrometric_params_solved", "", "Astrometric solution type "
                                               "(31: five parameters, 95: six parameters)", "meta.code"),
    "parallax_zero_point": InputQuantity("plx_zp_cat_mas", "mas", "Parallax zero point given by the catalogue for "
                                         "the star", "pos.parallax.zeroPoint"),
}

ID = "star_id"
ROW = "input_row"
FLAGS = "quality_bits"

BASE_COLUMNS = {
    ROW: Column("", "Zero-based position of the row in the input catalogue (header excluded)", "meta.number"),
    FLAGS: Column("", "Bit mask of quality flags; bits are listed in the table metadata and by "
                      "'cinderclock inspect'", "meta.code.qual"),
}


def mag_column(band):
    """Canonical name of the apparent magnitude in band ``band`` (the band key of the configuration)."""
    return f"mag_{band}"


def mag_err_column(band):
    """Canonical name of the magnitude uncertainty in band ``band``."""
    return f"mag_err_{band}"


def band_specs(band, passband, system):
    """Column descriptions of one band's magnitude and uncertainty."""
    sys_name = "AB" if system == "ab" else "Vega"
    return {
        mag_column(band): Column("mag", f"Apparent magnitude in band {band} ({passband}, {sys_name} system)",
                                 "phot.mag"),
        mag_err_column(band): Column("mag", f"Uncertainty of the {band} magnitude", "stat.error;phot.mag"),
    }


def input_specs():
    """Column descriptions of every canonical input quantity."""
    return {q.column: q.spec for q in INPUT_QUANTITIES.values()}
