"""Ingest: the user's catalogue to canonical columns, units and types, with row-level vetting.

What happens to each kind of fault:

* a configured column missing from the file, an unknown unit, a numeric column that is mostly
  text, an empty file: one-line :class:`~cinderclock.errors.InputError`, the run stops;
* a row with the wrong number of fields, an empty or repeated identifier, text in a numeric
  field, a missing/NaN/infinite parallax or parallax error, a non-positive parallax error, or no
  usable magnitude in any band: the row goes to the rejects table with a reason code;
* a sentinel or implausible magnitude (or one without a valid uncertainty): that band is treated
  as missing for the star and the ``band_missing`` flag is set;
* a spectroscopic Teff or log g outside the plausible range (or infinite): the value is ignored and
  the ``spec_out_of_range`` flag is set (the star continues on photometry);
* an infinite value of any other optional quantity: treated as not measured (NaN), with a warning
  in the log naming the column;
* parallax uncertainties whose median is far below what any astrometric survey reaches: a
  one-line error, because the values are almost certainly in arcsec, not mas (see
  :func:`check_parallax_unit`).
"""

from __future__ import annotations

import logging

import numpy as np
import pandas as pd

from .. import columns as C
from ..catalogue import read_catalogue
from .ingest_bands import band_columns, check_error_column, magnitude_error
from ..errors import ConfigError, InputError
from ..reasons import Rejector, make_rejects, set_flag
from ..tableio import Column
from ..units import conversion_factor

STAGE = "ingest"
#: A numeric column where more than this fraction of the values is text is a mapping error, not bad rows.
TEXT_COLUMN_FRACTION = 0.5
#: Magnitudes outside this interval are treated as sentinels (common practice: catalogues use 99, -99, 99.99).
MAG_PLAUSIBLE = (-5.0, 35.0)
#: A median parallax uncertainty below this (mas) is taken as a unit error. No astrometric survey
#: comes near it: Gaia EDR3's median parallax uncertainty is 0.02-0.03 mas at G = 9 to 14 and about
#: 0.5 mas at G = 20 (Lindegren et al. 2021, A&A 649, A2, abstract), and white-dwarf samples are
#: faint, so their median is a few tenths of a mas. The same survey in arcsec has a median of
#: ~1e-4 to 1e-3 "mas", far below the floor, while a genuinely distant sample (parallaxes all
#: below 0.1 mas) still has uncertainties of >= 0.02 mas and passes.
PARALLAX_ERROR_FLOOR_MAS = 0.005

log = logging.getLogger("cinderclock")


def wanted_columns(settings):
    """User column names the ingest stage reads."""
    cols = dict(settings["catalogue"]["columns"])
    unknown = [k for k in cols if k not in C.INPUT_QUANTITIES]
    if unknown:
        raise ConfigError(f"catalogue.columns: unknown quantity {unknown[0]!r}; known: {', '.join(C.INPUT_QUANTITIES)}")
    for q, spec in C.INPUT_QUANTITIES.items():
        if spec.required and q not in cols:
            raise ConfigError(f"catalogue.columns: the required quantity '{q}' is not mapped to a column")
    names = list(cols.values())
    for band in settings["bands"].values():
        names += band_columns(band)
    names += list(settings["catalogue"].get("keep_columns", []))
    return names


def _parse_numeric(data, name, raw):
    """Values as float, the mask of entries that were text, and a clear error if most are text."""
    values = data[name]
    if values.dtype.kind in "fiub":
        return np.array(values, dtype=float), np.zeros(len(values), dtype=bool)
    text = values.astype(object)
    parsed = np.array(pd.to_numeric(text, errors="coerce"), dtype=float)
    blank = text.isna().to_numpy() | (text.astype(str).str.strip() == "").to_numpy()
    bad = np.isnan(parsed) & ~blank & ~text.astype(str).str.strip().str.lower().isin(["nan", "null", "na"]).to_numpy()
    if bad.any() and bad.mean() > TEXT_COLUMN_FRACTION:
        i = int(np.argmax(bad))
        where, row = raw.where(i)
        raise InputError(f"expected numbers, found text such as {str(text.iloc[i])!r} in {bad.mean():.0%} of the rows "
                         "(is the column mapping right?)", where, row=row, column=name)
    return parsed, bad


_INT64_MAX = "9223372036854775807"


def text_ids_to_int(text):
    """Identifiers given as text to int64, exactly (no float round trip); -1 where a text is no integer.

    Integers up to 19 digits that fit int64 are accepted (Gaia source_id values have 19 digits).
    """
    t = pd.Series(np.asarray(text, dtype=object)).astype(str).str.strip()
    body = t.str.lstrip("+-")
    ok = body.str.fullmatch(r"\d{1,19}").to_numpy(dtype=bool).copy()
    long = ok & (body.str.len().to_numpy() == 19)
    ok[long] = (body[long] <= _INT64_MAX).to_numpy(dtype=bool)
    return np.where(ok, t, "-1").astype(np.int64)


def parse_ids(values, declared_kind=None):
    """Identifiers in the catalogue's own type.

    Parameters
    ----------
    values : pandas.Series
        The identifier column as read.
    declared_kind : str, optional
        numpy kind the file declares for the column (FITS, VOTable, Parquet, ECSV); None for CSV,
        whose identifiers are integers when every non-empty value is one that fits int64.

    Returns
    -------
    ids : ndarray
        int64 (-1 where a row has none) or text ("" where a row has none).
    text : ndarray of object
        The identifiers as text, for messages.
    missing : ndarray of bool
    is_int : bool
    """
    n = len(values)
    if values.dtype.kind in "iu":
        ids = values.to_numpy(dtype=np.int64)
        return ids, pd.Series(ids).astype(str).to_numpy(dtype=object), np.zeros(n, dtype=bool), True
    text = values.astype(object).where(values.notna(), "").astype(str).str.strip()
    missing = (text == "").to_numpy()
    if declared_kind is None:
        as_int = text_ids_to_int(text)
        is_int = bool(n) and bool(((as_int != -1) | missing | (text == "-1").to_numpy()).all())
    else:
        is_int = declared_kind in "iu"
    if is_int:
        return text_ids_to_int(text.where(~missing, "-1")), text.to_numpy(dtype=object), missing, True
    return text.to_numpy(dtype=object), text.to_numpy(dtype=object), missing, False


def _declared_unit_conflict(cfg_unit, file_unit):
    """True if a unit from catalogue.units differs from the one the file declares."""
    if cfg_unit in (None, "") or file_unit in (None, ""):
        return False
    if str(cfg_unit).strip() == str(file_unit).strip():
        return False
    from astropy import units as u

    try:
        return u.Unit(str(cfg_unit)) != u.Unit(str(file_unit))
    except (ValueError, TypeError):
        return True


def check_parallax_unit(plx_err_mas, path, column, unit_source):
    """Stop with one line if the parallax uncertainties cannot be in mas (most likely arcsec).

    Parameters
    ----------
    plx_err_mas : ndarray
        Parallax uncertainties after unit conversion (mas).
    path, column : str
        File and column (user's name) for the message.
    unit_source : str
        Where the unit came from, for the message (e.g. "declared by the file as 'mas'").
    """
    err = plx_err_mas[np.isfinite(plx_err_mas) & (plx_err_mas > 0)]
    if err.size == 0:
        return
    median = float(np.median(err))
    if median < PARALLAX_ERROR_FLOOR_MAS:
        raise InputError(f"the median parallax uncertainty is {median:.2g} mas, far below what any astrometric "
                         f"survey reaches (about 0.02 mas at best), so the values look like arcsec, not mas (unit "
                         f"{unit_source}); set catalogue.units.parallax and catalogue.units.parallax_error to "
                         "'arcsec' or fix the unit in the file", path, column=column)


def ingest(raw, settings, dedupe=True):
    """Turn a :class:`~cinderclock.catalogue.RawCatalogue` into the canonical table.

    Parameters
    ----------
    raw : RawCatalogue
        Columns as read from the file.
    settings : dict
        ``{"catalogue": ..., "bands": ...}`` sections of the configuration.
    dedupe : bool
        Reject repeated identifiers here (False when the caller checks them over all batches).

    Returns
    -------
    table : pandas.DataFrame
        Canonical columns, one row per accepted input row, in input order.
    rejects : pandas.DataFrame
    specs : dict of str to Column
    """
    cat = settings["catalogue"]
    path = raw.path
    data, rows = raw.data, raw.rows
    n = len(data)

    id_col = cat["columns"]["star_id"]
    id_values, id_text, missing_id, id_is_int = parse_ids(data[id_col], raw.types.get(id_col))

    rj = Rejector(STAGE, id_values, rows)
    reject = rj.reject
    if raw.malformed:
        bad_rows = np.array([r for r, _ in raw.malformed], dtype=np.int64)
        texts = [f"{t[:120]}" for _, t in raw.malformed]
        bad_ids = pd.Series([t.split(",")[0].strip()[:40] for _, t in raw.malformed], dtype=object)
        if id_is_int:
            bad_ids = text_ids_to_int(bad_ids)
        rj.add(make_rejects(bad_ids, bad_rows, STAGE, "malformed_row", texts))

    reject(missing_id, "missing_id", f"column '{id_col}' is empty")

    out = {}
    specs = {C.ID: C.INPUT_QUANTITIES["star_id"].spec, C.ROW: C.BASE_COLUMNS[C.ROW]}
    units_cfg = cat.get("units", {}) or {}

    def numeric(name, quantity_key, canonical_unit):
        values, text = _parse_numeric(data, name, raw)
        if text.any():
            shown = data[name].astype(str).to_numpy()
            reject(text, "not_a_number", lambda i: [f"column '{name}': {v!r} is not a number" for v in shown[i]])
        file_unit = raw.units.get(name)
        cfg_unit = units_cfg.get(quantity_key) if quantity_key else None
        if _declared_unit_conflict(cfg_unit, file_unit):
            raise InputError(f"catalogue.units.{quantity_key} is {cfg_unit!r} but the file declares {file_unit!r} for "
                             "this column; remove the catalogue.units entry or correct it", path, column=name)
        unit = file_unit if file_unit not in (None, "") else cfg_unit
        if canonical_unit is None:
            return values
        factor = conversion_factor(unit, canonical_unit, path, name)
        return values * factor if factor != 1.0 else values

    for key, user_name in cat["columns"].items():
        if key == "star_id":
            continue
        q = C.INPUT_QUANTITIES[key]
        out[q.column] = numeric(user_name, key, q.unit)
        specs[q.column] = q.spec
        inf = np.isinf(out[q.column])
        if inf.any() and not q.required and key not in ("teff_spec", "logg_spec"):   # those two: flagged below
            out[q.column][inf] = np.nan
            log.warning("%s: column '%s': %d infinite value(s) treated as not measured (first at row %d)",
                        raw.where(int(np.argmax(inf)))[0], user_name, int(inf.sum()),
                        raw.where(int(np.argmax(inf)))[1])

    err_name = cat["columns"]["parallax_error"]
    if raw.units.get(err_name):
        unit_source = f"declared by the file as {raw.units[err_name]!r}"
    elif units_cfg.get("parallax_error"):
        unit_source = f"{units_cfg['parallax_error']!r} from catalogue.units"
    else:
        unit_source = "not given, so mas was assumed"
    check_parallax_unit(out["plx_err_mas"], path, err_name, unit_source)

    bits = np.zeros(n, dtype=np.int64)
    # required astrometry
    for key in ("parallax", "parallax_error"):
        col = C.INPUT_QUANTITIES[key].column
        bad = ~np.isfinite(out[col])
        reject(bad, "nonfinite_required", f"column '{cat['columns'][key]}' is missing, NaN or infinite")
    reject(out["plx_err_mas"] <= 0, "bad_parallax_error", f"column '{cat['columns']['parallax_error']}' is not positive")

    # spectroscopic values outside the plausible range are ignored, with a flag
    for key in ("teff_spec", "logg_spec"):
        if key in cat["columns"]:
            q = C.INPUT_QUANTITIES[key]
            v = out[q.column]
            off = ~np.isnan(v) & ((v < q.low) | (v > q.high))          # infinities included
            bits = set_flag(bits, "spec_out_of_range", off)
            v[off] = np.nan
            err_key = key + "_error"
            if err_key in cat["columns"]:
                out[C.INPUT_QUANTITIES[err_key].column][off] = np.nan

    # photometry
    sentinels = np.asarray(cat.get("missing_values", []), dtype=float)
    n_bands = np.zeros(n, dtype=int)
    for band, b in settings["bands"].items():
        kind = b.get("error_kind", "mag")
        mag = numeric(b["mag"], None, "mag")
        raw_err = numeric(b["error"], None, "mag" if kind == "mag" else "")
        check_error_column(raw_err, band, b, path, sentinels)
        flux = None
        if kind == "flux":
            flux = numeric(b["flux"], None, None)
            funit, eunit = raw.units.get(b["flux"]), raw.units.get(b["error"])
            if funit and eunit and funit != eunit:
                raw_err = raw_err * conversion_factor(eunit, funit, path, b["error"])
        bad_raw = ~np.isfinite(raw_err) | (raw_err <= 0) | np.isin(raw_err, sentinels)
        err = magnitude_error(raw_err, flux, kind)
        mag = mag + float(b.get("mag_offset", 0.0) or 0.0)
        unusable = (~np.isfinite(mag) | np.isin(mag - float(b.get("mag_offset", 0.0) or 0.0), sentinels)
                    | (mag < MAG_PLAUSIBLE[0]) | (mag > MAG_PLAUSIBLE[1]) | bad_raw | ~np.isfinite(err) | (err <= 0))
        mag = np.where(unusable, np.nan, mag)
        err = np.where(unusable, np.nan, err)
        bits = set_flag(bits, "band_missing", unusable)
        n_bands += ~unusable
        out[C.mag_column(band)] = mag
        out[C.mag_err_column(band)] = err
        specs.update(C.band_specs(band, b["passband"], b["system"]))
        if kind != "mag":
            specs[C.mag_err_column(band)] = Column("mag", f"Uncertainty of the {band} magnitude, converted at ingest "
                                                   f"from {'the flux signal-to-noise' if kind == 'flux_over_error' else 'the flux uncertainty'}"
                                                   " (sigma_m = 2.5/ln10 sigma_F/F)", "stat.error;phot.mag")
    reject(n_bands == 0, "no_photometry", "no usable magnitude in any configured band")

    # duplicated identifiers: keep the first occurrence among the rows still alive
    if dedupe:
        live_ids = pd.Series(id_text).where(rj.alive)
        dup = live_ids.duplicated(keep="first").to_numpy() & rj.alive
        reject(dup, "duplicate_id", lambda i: [f"identifier {v!r} appeared earlier" for v in id_text[i]])

    for name in cat.get("keep_columns", []):
        values = data[name]
        if values.dtype.kind not in "fiub":
            parsed = pd.to_numeric(values, errors="coerce")
            values = parsed if parsed.notna().sum() >= values.notna().sum() else values.astype(str)
        out[name] = np.asarray(values)
        unit = raw.units.get(name, "")
        specs[name] = Column(unit or "", f"Column '{name}' copied from the input catalogue", "")

    table = pd.DataFrame({C.ID: id_values, C.ROW: rows, **out, C.FLAGS: bits})
    table.attrs["id_is_int"] = id_is_int
    specs[C.FLAGS] = C.BASE_COLUMNS[C.FLAGS]
    table = table.loc[rj.alive].reset_index(drop=True)
    return table, rj.rejects(), specs


def load_and_ingest(settings):
    """Read the configured catalogue and ingest it (see :func:`ingest`)."""
    raw = read_catalogue(settings["catalogue"]["path"], wanted_columns(settings),
                         settings["catalogue"].get("format", "auto"))
    return ingest(raw, settings)


def shard_labels(table, settings):
    """Shard name of every row of the canonical table, and the rows that cannot be placed.

    ``shards.method: rows`` cuts the catalogue into consecutive blocks of ``rows_per_shard`` input
    rows (by input position, so an edit to one row changes one shard): names ``s0000``, ...
    ``shards.method: healpix`` groups stars by HEALPix pixel (nested scheme, ``healpix_nside``) of
    their position (astropy-healpix): names ``p000123``; rows without a finite position cannot be
    placed.

    Returns
    -------
    labels : ndarray of str
    unplaced : ndarray of bool
    """
    sh = settings.get("shards", {"method": "rows", "rows_per_shard": 250000})
    n = len(table)
    if sh["method"] == "rows":
        idx = np.asarray(table[C.ROW], dtype=np.int64) // int(sh["rows_per_shard"])
        return np.char.add("s", np.char.zfill(idx.astype(str), 4)), np.zeros(n, dtype=bool)
    if sh["method"] == "healpix":
        from astropy import units as u
        from astropy_healpix import HEALPix

        if "ra_deg" not in table or "dec_deg" not in table:
            raise ConfigError("shards.method: healpix needs ra and dec in catalogue.columns")
        ra = table["ra_deg"].to_numpy(dtype=float)
        dec = table["dec_deg"].to_numpy(dtype=float)
        ok = np.isfinite(ra) & np.isfinite(dec)
        pix = np.zeros(n, dtype=np.int64)
        if ok.any():
            hp = HEALPix(nside=int(sh["healpix_nside"]), order="nested")
            pix[ok] = hp.lonlat_to_healpix(ra[ok] * u.deg, dec[ok] * u.deg)
        return np.char.add("p", np.char.zfill(pix.astype(str), 6)), ~ok
    raise ConfigError(f"shards.method: unknown method {sh['method']!r}")
