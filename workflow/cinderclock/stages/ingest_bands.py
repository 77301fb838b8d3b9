"""Ingest of the photometry: magnitudes and their uncertainties as catalogues give them.

A band's uncertainty column may hold (``bands.<band>.error_kind``):

* ``mag``: the magnitude uncertainty itself;
* ``flux_over_error``: the flux signal-to-noise F / sigma_F (Gaia archive exports give only this),
  converted with sigma_m = 2.5 / ln(10) / (F / sigma_F);
* ``flux``: the flux uncertainty sigma_F, with the flux in ``bands.<band>.flux``, converted with
  sigma_m = 2.5 / ln(10) * sigma_F / F.

The conversion is first-order error propagation of m = -2.5 log10 F + ZP (common practice; it
understates the error below S/N of a few, where the magnitude error is no longer Gaussian). It is
done once, here; the provenance of every ingest table records which conversion each band had
(:func:`conversions`). ``bands.<band>.mag_offset`` (set by the ready photometric systems, e.g. the
SDSS u and z offsets from AB) is added to the catalogue magnitude here as well.

Before anything else each error column is checked for plausibility over its whole batch (see
:func:`check_error_column`): a mapping mistake stops the run with one line naming the column and
what it probably holds, instead of rejecting every star.
"""

from __future__ import annotations

import numpy as np

from ..errors import InputError

#: 2.5 / ln(10): d(mag) / d(ln flux), mag.
POGSON = 2.5 / np.log(10.0)
#: A median magnitude uncertainty above this (mag) is not a magnitude uncertainty (common practice:
#: survey photometry of catalogued stars has errors of hundredths to tenths of a magnitude).
MAX_MEDIAN_MAG_ERROR = 1.0
#: A median flux signal-to-noise below this is not a signal-to-noise (a catalogue lists detections).
MIN_MEDIAN_FLUX_OVER_ERROR = 1.0

ERROR_KINDS = ("mag", "flux_over_error", "flux")


def band_columns(band):
    """Catalogue columns one band reads (magnitude, uncertainty and, for ``error_kind: flux``, the flux)."""
    cols = [band["mag"], band["error"]]
    if band.get("error_kind", "mag") == "flux":
        cols.append(band["flux"])
    return cols


def conversions(bands):
    """What ingest does to each band's magnitude and uncertainty, for the provenance."""
    out = {}
    for key, b in bands.items():
        kind = b.get("error_kind", "mag")
        text = {"mag": f"magnitude uncertainty read from column '{b['error']}'",
                "flux_over_error": f"sigma_m = 2.5 / ln(10) / x with x the flux signal-to-noise in column "
                                   f"'{b['error']}'",
                "flux": f"sigma_m = 2.5 / ln(10) * sigma_F / F with sigma_F in column '{b['error']}' and F in "
                        f"column '{b.get('flux')}'"}[kind]
        entry = {"error_kind": kind, "error": text}
        if b.get("mag_offset"):
            entry["mag_offset"] = (f"{b['mag_offset']:+.3f} mag added to column '{b['mag']}' "
                                   f"({b.get('mag_offset_source', 'configured')})")
        out[key] = entry
    return out


def _median(values, sentinels):
    v = values[np.isfinite(values) & (values > 0) & ~np.isin(values, sentinels)]
    return float(np.median(v)) if v.size else None


def check_error_column(values, key, band, path, sentinels):
    """Stop with one line if an uncertainty column cannot hold what its ``error_kind`` says.

    Parameters
    ----------
    values : ndarray
        The column as read (in its own unit), one batch.
    key : str
        Band key of the configuration.
    band : dict
        The band's configuration.
    path : str
        File, for the message.
    sentinels : array_like
        Values that mean "not measured".
    """
    kind = band.get("error_kind", "mag")
    med = _median(values, sentinels)
    if med is None:
        return
    col = band["error"]
    if kind == "mag" and med > MAX_MEDIAN_MAG_ERROR:
        guess = ("a flux signal-to-noise: set bands.{k}.error_kind: flux_over_error" if med > 5.0 else
                 "a flux uncertainty: set bands.{k}.error_kind: flux and bands.{k}.flux").format(k=key)
        raise InputError(f"the median magnitude uncertainty is {med:.4g} mag, impossible for catalogued photometry; "
                         f"the column probably holds {guess}", path, column=col)
    if kind == "flux_over_error" and med < MIN_MEDIAN_FLUX_OVER_ERROR:
        raise InputError(f"the median flux signal-to-noise is {med:.3g}, below 1 for most stars; the column probably "
                         f"holds magnitude uncertainties: set bands.{key}.error_kind: mag", path, column=col)


def magnitude_error(err, flux, kind):
    """Magnitude uncertainty (mag) from an uncertainty column of kind ``kind`` (see the module docstring)."""
    with np.errstate(divide="ignore", invalid="ignore"):
        if kind == "flux_over_error":
            return POGSON / err
        if kind == "flux":
            return POGSON * err / flux
    return err
