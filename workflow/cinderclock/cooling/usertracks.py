"""Reader and validator of user-supplied cooling tracks (cinderclock's long track format).

Users with detailed evolutionary sequences can replace the built-in cooling model with their own
tracks, in one table of our own long format: one row per (track, luminosity) point.

Format
------
A CSV file (``#`` starts a comment line; the first non-comment line is the header) or a Parquet
file (``.parquet``). Columns, by exact name:

=================  ========  ======================================================  =========
column             unit      meaning                                                 required
=================  ========  ======================================================  =========
``mass_msun``      Msun      white-dwarf mass; rows of equal mass form one track      yes
``log_lum``        dex       log10 L/Lsun (photon luminosity)                         yes
``age_yr``         yr        cooling age; must increase as ``log_lum`` decreases      yes
``teff_k``         K         effective temperature                                    no
``logg_cgs``       dex       log10 surface gravity in cm s^-2                        no
``composition``    text      label of the envelope/core, e.g. ``H`` or ``He``        no
=================  ========  ======================================================  =========

Rules: at least two tracks of at least two rows each; no repeated ``log_lum`` within a track;
finite values in the required columns (optional ones may be empty); 0 < mass <= 1.5 Msun,
age >= 0, -20 <= log L <= 6, Teff > 0, 4 <= log g <= 11. If ``composition`` holds several labels
the caller must choose one. Other column names are refused (a misspelt column would otherwise be
ignored silently). Faults raise :class:`cinderclock.errors.InputError` naming the file, the
zero-based data row and the column.

Radii are derived from log g (R = sqrt(G M / g)) or, failing that, from L and Teff; Teff from L
and R when absent. Rows of a user table are all treated as inside the calibrated range
(``far_future`` False): the user vouches for the tracks.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np

from ..constants import G_SI, L_SUN_W, M_SUN_KG, R_SUN_M, SIGMA_SB_SI
from ..errors import InputError

REQUIRED_COLUMNS = ("mass_msun", "log_lum", "age_yr")
OPTIONAL_COLUMNS = ("teff_k", "logg_cgs", "composition")
#: Accepted value ranges (inclusive) of the numeric columns.
VALUE_RANGES = {
    "mass_msun": (0.0, 1.5),
    "log_lum": (-20.0, 6.0),
    "age_yr": (0.0, np.inf),
    "teff_k": (0.0, np.inf),
    "logg_cgs": (4.0, 11.0),
}
_EXCLUSIVE_LOW = {"mass_msun", "teff_k"}


def _load(path):
    import pandas as pd

    p = Path(path)
    if not p.is_file():
        raise InputError("cooling-track file not found", path)
    try:
        if p.suffix.lower() in (".parquet", ".pq"):
            return pd.read_parquet(p)
        return pd.read_csv(p, comment="#", skipinitialspace=True)
    except Exception as exc:           # pandas and pyarrow raise many types for bad files
        raise InputError(f"cannot read the cooling-track table ({exc.__class__.__name__}: {exc})", path) from None


def validate_user_tracks(df, path=None, composition=None):
    """Check a user track table and return it in the cooling-table long format.

    Parameters
    ----------
    df : pandas.DataFrame
        The table as read.
    path : str, optional
        File name for error messages.
    composition : str, optional
        Keep only rows with this ``composition`` label.

    Returns
    -------
    pandas.DataFrame
        Columns ``mass_msun``, ``log_lum``, ``age_yr``, ``teff_k``, ``radius_rsun``, ``logg_cgs``,
        ``far_future``; sorted by mass and descending log L; ``attrs["cooling_model"]`` set.
    """
    import pandas as pd

    df = df.copy()
    df.columns = [str(c).strip() for c in df.columns]
    unknown = [c for c in df.columns if c not in REQUIRED_COLUMNS + OPTIONAL_COLUMNS]
    if unknown:
        raise InputError(f"unknown column(s) {unknown}; allowed: {list(REQUIRED_COLUMNS + OPTIONAL_COLUMNS)}",
                         path, column=unknown[0])
    for c in REQUIRED_COLUMNS:
        if c not in df.columns:
            raise InputError(f"required column '{c}' is missing", path, column=c)
    df = df.reset_index(drop=True)
    df["_row"] = np.arange(len(df))

    if "composition" in df.columns:
        labels = df["composition"].astype(str).str.strip()
        df["composition"] = labels
        distinct = sorted(labels.unique())
        if composition is not None:
            if composition not in distinct:
                raise InputError(f"no rows with composition '{composition}' (found {distinct})", path,
                                 column="composition")
            df = df[labels == composition]
        elif len(distinct) > 1:
            raise InputError(f"several compositions {distinct}: choose one in the configuration", path,
                             column="composition")

    for c in ("mass_msun", "log_lum", "age_yr", "teff_k", "logg_cgs"):
        if c not in df.columns:
            continue
        values = pd.to_numeric(df[c], errors="coerce")
        raw_missing = df[c].isna() | (df[c].astype(str).str.strip() == "")
        not_number = values.isna() & ~raw_missing
        if not_number.any():
            k = int(np.flatnonzero(not_number.to_numpy())[0])
            raise InputError(f"not a number: {df[c].iloc[k]!r}", path, int(df["_row"].iloc[k]), c)
        v = values.to_numpy(dtype=float)
        if c in REQUIRED_COLUMNS:
            bad = ~np.isfinite(v)
            if bad.any():
                k = int(np.flatnonzero(bad)[0])
                raise InputError("empty or non-finite value in a required column", path, int(df["_row"].iloc[k]), c)
        lo, hi = VALUE_RANGES[c]
        with np.errstate(invalid="ignore"):
            out = (v <= lo if c in _EXCLUSIVE_LOW else v < lo) | (v > hi) | np.isinf(v)
        if out.any():
            k = int(np.flatnonzero(out)[0])
            bound = f"({lo}, {hi}]" if c in _EXCLUSIVE_LOW else f"[{lo}, {hi}]"
            raise InputError(f"value {v[k]} outside the accepted range {bound}", path, int(df["_row"].iloc[k]), c)
        df[c] = v

    masses = np.unique(df["mass_msun"].to_numpy())
    if masses.size < 2:
        raise InputError(f"need at least two tracks (distinct masses), found {masses.size}", path, column="mass_msun")
    parts = []
    for m in masses:
        t = df[df["mass_msun"].to_numpy() == m].sort_values("log_lum", ascending=False, kind="stable")
        if len(t) < 2:
            raise InputError(f"track of mass {m} has a single row; need at least two", path,
                             int(t["_row"].iloc[0]), "mass_msun")
        lum = t["log_lum"].to_numpy()
        age = t["age_yr"].to_numpy()
        rep = np.flatnonzero(np.diff(lum) == 0)
        if rep.size:
            raise InputError(f"log_lum {lum[rep[0]]} repeated in the track of mass {m}", path,
                             int(t["_row"].iloc[rep[0] + 1]), "log_lum")
        dec = np.flatnonzero(np.diff(age) <= 0)
        if dec.size:
            raise InputError(f"age must increase as log_lum decreases along the track of mass {m} "
                             f"(age {age[dec[0] + 1]} at log_lum {lum[dec[0] + 1]} follows {age[dec[0]]})",
                             path, int(t["_row"].iloc[dec[0] + 1]), "age_yr")
        parts.append(t)
    df = pd.concat(parts, ignore_index=True)

    mass = df["mass_msun"].to_numpy()
    lum_w = L_SUN_W * 10.0 ** df["log_lum"].to_numpy()
    teff = df["teff_k"].to_numpy() if "teff_k" in df.columns else np.full(len(df), np.nan)
    logg = df["logg_cgs"].to_numpy() if "logg_cgs" in df.columns else np.full(len(df), np.nan)
    radius_from_g = np.sqrt(G_SI * mass * M_SUN_KG / (10.0**logg / 100.0)) / R_SUN_M
    with np.errstate(invalid="ignore", divide="ignore"):
        radius_from_t = np.sqrt(lum_w / (4.0 * np.pi * SIGMA_SB_SI * teff**4)) / R_SUN_M
    radius = np.where(np.isfinite(radius_from_g), radius_from_g, radius_from_t)
    teff = np.where(np.isfinite(teff), teff,
                    (lum_w / (4.0 * np.pi * (radius * R_SUN_M) ** 2 * SIGMA_SB_SI)) ** 0.25)
    with np.errstate(invalid="ignore", divide="ignore"):
        logg = np.where(np.isfinite(logg), logg, np.log10(G_SI * mass * M_SUN_KG / (radius * R_SUN_M) ** 2 * 100.0))
    label = None
    if "composition" in df.columns and len(df):
        label = str(df["composition"].iloc[0])
    out = pd.DataFrame({"mass_msun": mass, "log_lum": df["log_lum"].to_numpy(), "age_yr": df["age_yr"].to_numpy(),
                        "teff_k": teff, "radius_rsun": radius, "logg_cgs": logg,
                        "far_future": np.zeros(len(df), dtype=bool)})
    out.attrs["cooling_model"] = {
        "name": "cooling_user_tracks",
        "reference": f"user-supplied cooling tracks ({Path(path).name if path else 'in-memory table'})",
        "caution": "ages as good as the user's evolutionary sequences; no extrapolation beyond them",
        "settings": {"composition": label, "n_tracks": int(masses.size)},
    }
    return out


def read_user_tracks(path, composition=None):
    """Read and validate a user cooling-track table (see the module docstring for the format).

    Parameters
    ----------
    path : str or Path
        CSV or Parquet file.
    composition : str, optional
        Keep only the rows with this ``composition`` label.

    Returns
    -------
    pandas.DataFrame
        The tracks in the cooling-table long format (see :func:`validate_user_tracks`).
    """
    from ..provenance import file_checksum

    df = _load(path)
    out = validate_user_tracks(df, path=str(path), composition=composition)
    out.attrs["cooling_model"]["settings"]["sha256"] = file_checksum(path)
    return out
