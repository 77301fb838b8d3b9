"""Reason codes for rejected rows and bits of the quality mask.

Every input row ends either in the results or in a rejects table with one of these codes and the
stage that rejected it. Codes are stable identifiers: add new ones, never reuse or rename one.
"""

from __future__ import annotations

import numpy as np
import pandas as pd

from .tableio import Column

#: reason code -> description
REASONS = {
    # ingest
    "malformed_row": "The row has a different number of fields from the header",
    "missing_id": "The source identifier is empty",
    "duplicate_id": "The source identifier already appeared on an earlier row (the first occurrence is kept)",
    "not_a_number": "A numeric column holds text that is not a number",
    "nonfinite_required": "A required quantity (parallax or its error) is missing, NaN or infinite",
    "bad_parallax_error": "The parallax uncertainty is zero or negative",
    "no_photometry": "No usable magnitude in any configured band",
    "no_position": "No finite RA/Dec, needed to place the star in a sky (HEALPix) shard",
    # select
    "parallax_snr": "Parallax signal-to-noise below the selection limit (includes zero and negative parallaxes)",
    "too_distant": "Distance (inverse corrected parallax) beyond the selection limit",
    "outside_wd_region": "Outside the white-dwarf region of the absolute-magnitude/colour plane",
    "no_colour": "Magnitudes needed for the absolute-magnitude/colour selection are missing",
    "photometric_error": "A magnitude uncertainty exceeds the selection limit",
    "quality_cut": "A catalogue quality column fails its configured limit",
    # luminosity
    "no_temperature": "No spectroscopic Teff and not enough bands to estimate one",
    "temperature_out_of_range": "The estimated Teff lies outside the model photometry table",
    "gravity_out_of_range": "log g (spectroscopic or default) outside the user synthetic-photometry table",
    "extinction_out_of_range": "E(B-V) exceeds the largest value of the model photometry table",
}

#: flag name -> (bit, description)
FLAG_BITS = {
    "band_missing": (0, "At least one configured band is missing or held a sentinel value"),
    "spec_out_of_range": (1, "A spectroscopic Teff or log g lay outside the plausible range and was ignored"),
    "distance_from_prior": (2, "Parallax S/N below the inverse-parallax limit: distance from a space-density prior"),
    "teff_from_photometry": (3, "Teff estimated from photometry (no spectroscopic value)"),
    "mass_from_radius": (4, "Mass from the photometric radius (no spectroscopic log g)"),
    "mass_off_table": (5, "Mass could not be assigned: log g or radius outside the mass-radius table"),
    "low_mass": (6, "Mass below the low-mass threshold: likely a binary-evolution product; single-star age unreliable"),
    "high_mass": (7, "Mass above the high-mass threshold: possible merger product or O/Ne core"),
    "cooling_off_table": (8, "Cooling age could not be assigned (mass or luminosity outside the cooling model)"),
    "cooling_out_of_range": (9, "Mass or luminosity outside the validity range of the cooling relation"),
    "cooling_extrapolated": (10, "Cooling age extrapolated beyond the faint end of the tabulated model"),
    "overluminous": (11, "Photometric radius larger than the mass-radius radius: candidate unresolved double"),
    "ifmr_out_of_range": (12, "White-dwarf mass outside the calibrated range of the initial-final mass relation"),
    "progenitor_uncertain": (13, "Progenitor lifetime too uncertain for a reliable total age"),
    "mc_off_table": (14, "More than the configured fraction of Monte Carlo draws fell off the model tables"),
    "teff_at_grid_edge": (15, "Photometric Teff at an end of the model grid: a bound, not a fit"),
    "older_than_universe": (16, "Total age exceeds the age of the Universe (Planck 2018, via astropy)"),
    "zero_point_out_of_range": (17, "Per-star parallax zero point: G or colour outside the validity range of the "
                                    "correction (evaluated at the edge of the range)"),
    "zero_point_fallback": (18, "Per-star parallax zero point not available (inputs missing): the configured "
                                "constant was used"),
    "grey_boundary": (19, "Teff below 5,800 K (0.6 Msun) to 6,100 K (0.9 Msun, rising with mass), where the "
                          "grey-atmosphere boundary of the integrated envelope fails (Rohrmann et al. 2012, "
                          "A&A 546, A119): cooling-age systematics larger"),
}

REJECT_COLUMNS = {
    "star_id": Column("", "Source identifier, in the same type as in the results (-1 or empty where the row has "
                          "none)", "meta.id"),
    "input_row": Column("", "Zero-based position of the row in the input catalogue (header excluded)", "meta.number"),
    "stage": Column("", "Stage that rejected the row", "meta.code"),
    "reason": Column("", "Reason code (listed in the table metadata)", "meta.code.error"),
    "detail": Column("", "Human-readable detail: column and value that caused the rejection", "meta.note"),
}


def bit(name):
    """Integer mask of one named flag."""
    return np.int64(1) << FLAG_BITS[name][0]


def set_flag(bits, name, mask):
    """Return ``bits`` with flag ``name`` set where ``mask`` is True."""
    return np.where(np.asarray(mask, dtype=bool), bits | bit(name), bits)


def flag_names(value):
    """Names of the flags set in one mask value."""
    return [n for n, (b, _) in FLAG_BITS.items() if int(value) >> b & 1]


def make_rejects(ids, rows, stage, reason, detail):
    """Build a rejects table.

    Parameters
    ----------
    ids : array_like
        Source identifiers, in the catalogue's own type: integers stay int64, anything else is text.
    rows : array_like of int
        Input-row positions.
    stage, reason : str
        Stage name and a code from :data:`REASONS`.
    detail : str or array_like of str
        Detail per row (or one text for all).
    """
    if reason not in REASONS:
        raise ValueError(f"unknown reason code {reason!r}")
    ids = np.asarray(ids)
    if ids.dtype.kind in "iu":
        ids = ids.astype(np.int64)
    else:
        ids = pd.Series(ids, dtype=object).astype(str).to_numpy(dtype=object)
    n = len(ids)
    detail = np.full(n, detail, dtype=object) if isinstance(detail, str) else np.asarray(detail, dtype=object)
    return pd.DataFrame({
        "star_id": ids,
        "input_row": np.asarray(rows, dtype=np.int64),
        "stage": np.full(n, stage, dtype=object),
        "reason": np.full(n, reason, dtype=object),
        "detail": detail,
    })


def empty_rejects():
    """A rejects table with no rows and the right columns (text identifiers)."""
    return make_rejects(np.array([], dtype=object), [], "ingest", "missing_id", "")


def concat_rejects(frames):
    """Concatenate rejects tables (an empty table if there are none)."""
    frames = [f for f in frames if f is not None and len(f)]
    return pd.concat(frames, ignore_index=True) if frames else empty_rejects()


def metadata_block():
    """Reason codes and flag bits, for the provenance of tables that use them."""
    return {"reasons": REASONS, "flag_bits": {n: {"bit": b, "meaning": d} for n, (b, d) in FLAG_BITS.items()}}


class Rejector:
    """Tracks which rows of a stage are still alive and collects the rejects, one reason per row.

    Parameters
    ----------
    stage : str
        Stage name written in the rejects table.
    ids, rows : array_like
        Identifiers and input-row positions of the stage's rows.
    """

    def __init__(self, stage, ids, rows):
        self.stage = stage
        self.ids = np.asarray(ids)
        self.rows = np.asarray(rows)
        self.alive = np.ones(len(self.ids), dtype=bool)
        self._frames = []

    def reject(self, mask, reason, detail):
        """Reject the live rows where ``mask`` is True.

        ``detail`` is one text for all, or a callable taking the integer positions of the rejected
        rows and returning one text per row (so texts are only formatted for rejected rows).
        """
        mask = np.asarray(mask, dtype=bool) & self.alive
        if not mask.any():
            return
        idx = np.flatnonzero(mask)
        text = detail if isinstance(detail, str) else np.asarray(detail(idx), dtype=object)
        self._frames.append(make_rejects(self.ids[idx], self.rows[idx], self.stage, reason, text))
        self.alive[idx] = False

    def add(self, frame):
        """Add an already built rejects table (rows not in this stage's arrays)."""
        self._frames.append(frame)

    def rejects(self):
        """All rejects collected so far."""
        return concat_rejects(self._frames)
