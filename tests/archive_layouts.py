"""Invented catalogues laid out as survey archives lay them out (column names, types, units, nulls).

The values are INVENTED (the Lanternfall demo population of cinderclock.simulate, relabelled); only
the layout imitates the archives: a Gaia DR3 archive export (19-digit source_id, flux_over_error
instead of magnitude errors, ruwe, nu_eff_used_in_astrometry, astrometric_params_solved), an SDSS
PhotoObj-style query result (psfMag_u ... psfMagErr_z), a Pan-STARRS1 MeanObject-style result
(gMeanPSFMag, gMeanPSFMagErr, ...) and a 2MASS PSC-style result (j_m, j_msigcom, ...).
"""

from __future__ import annotations

import gzip
from pathlib import Path

import numpy as np
import pandas as pd

from cinderclock.simulate import make_catalogue

POGSON = 2.5 / np.log(10.0)

#: Gaia archive column -> unit, as the archive declares them
GAIA_UNITS = {"ra": "deg", "dec": "deg", "parallax": "mas", "parallax_error": "mas", "pmra": "mas / yr",
              "pmdec": "mas / yr", "phot_g_mean_mag": "mag", "phot_bp_mean_mag": "mag", "phot_rp_mean_mag": "mag",
              "nu_eff_used_in_astrometry": "1 / um", "pseudocolour": "1 / um", "ecl_lat": "deg"}


def gaia_export(n=240, seed=5):
    """An invented table with the columns of a Gaia DR3 archive export (see the module docstring)."""
    cat, _ = make_catalogue(n, seed=seed, malformed=False)
    rng = np.random.default_rng(seed)
    plx = pd.to_numeric(cat["plx"], errors="coerce").to_numpy(float)
    g = pd.to_numeric(cat["g_mag"], errors="coerce").to_numpy(float)
    six = rng.random(n) < 0.1                                  # a few six-parameter solutions
    df = pd.DataFrame({
        "source_id": (np.int64(4_000_000_000_000_000_000) + np.arange(n, dtype=np.int64) * 7_919_113),
        "ra": cat["ra_icrs"].to_numpy(float), "dec": cat["dec_icrs"].to_numpy(float),
        "parallax": plx, "parallax_error": cat["plx_e"].to_numpy(float),
        "pmra": cat["pm_ra"].to_numpy(float), "pmdec": cat["pm_dec"].to_numpy(float),
        "phot_g_mean_mag": g, "phot_bp_mean_mag": cat["bp_mag"].to_numpy(float),
        "phot_rp_mean_mag": cat["rp_mag"].to_numpy(float),
        "phot_g_mean_flux_over_error": POGSON / cat["g_mag_e"].to_numpy(float),
        "phot_bp_mean_flux_over_error": POGSON / cat["bp_mag_e"].to_numpy(float),
        "phot_rp_mean_flux_over_error": POGSON / cat["rp_mag_e"].to_numpy(float),
        "ruwe": cat["ruwe_lf"].to_numpy(float),
        "nu_eff_used_in_astrometry": np.where(six, np.nan, rng.uniform(1.5, 1.85, n)),
        "pseudocolour": np.where(six, rng.uniform(1.4, 1.7, n), np.nan),
        "ecl_lat": rng.uniform(-80, 80, n),
        "astrometric_params_solved": np.where(six, 95, 31).astype(np.int16),
    })
    df.loc[3, "phot_bp_mean_mag"] = np.nan                      # a missing BP measurement (null in the archive)
    df.loc[3, "phot_bp_mean_flux_over_error"] = np.nan
    return df


def gaia_config(config, path):
    """The default configuration pointed at a Gaia archive export, taken as it comes."""
    cfg = dict(config)
    cfg["catalogue"] = dict(config["catalogue"], path=path, format="auto", units={}, keep_columns=["ruwe"],
                            columns={"star_id": "source_id", "ra": "ra", "dec": "dec", "parallax": "parallax",
                                     "parallax_error": "parallax_error", "pmra": "pmra", "pmdec": "pmdec",
                                     "nu_eff": "nu_eff_used_in_astrometry", "pseudocolour": "pseudocolour",
                                     "ecl_lat": "ecl_lat", "astrometric_params_solved": "astrometric_params_solved"})
    cfg["bands"] = {b: {"preset": f"gaia-{b}", "mag": f"phot_{b.lower()}_mean_mag",
                        "error": f"phot_{b.lower()}_mean_flux_over_error", "error_kind": "flux_over_error"}
                    for b in ("G", "BP", "RP")}
    from cinderclock.photometry.systems import expand_bands

    expand_bands(cfg["bands"])
    for b in cfg["bands"].values():
        b.setdefault("mag_offset", 0.0)
    cfg["select"] = dict(config["select"], quality_cuts=[{"column": "ruwe", "max": 1.4}])
    return cfg


def _astropy_table(df, units):
    from astropy.table import MaskedColumn, Table

    t = Table()
    for c in df.columns:
        v = df[c].to_numpy()
        mask = pd.isna(df[c]).to_numpy()
        t[c] = MaskedColumn(v, mask=mask) if mask.any() else v
        if c in units:
            t[c].unit = units[c]
    return t


def write(df, path, fmt, units=GAIA_UNITS):
    """Write ``df`` as the archive would: csv (empty fields for null), csv.gz, ecsv (``null`` markers,
    declared types and units, optionally gzipped), parquet, fits or votable."""
    import warnings

    path = Path(path)
    if fmt in ("csv", "csv.gz"):
        text = df.to_csv(index=False, na_rep="")
        if fmt == "csv.gz":
            with gzip.open(path, "wt") as fh:
                fh.write(text)
        else:
            path.write_text(text)
    elif fmt in ("ecsv", "ecsv.gz"):
        kinds = {"i": "int64", "f": "float64"}
        lines = ["# %ECSV 1.0", "# ---", "# delimiter: ','", "# datatype:"]
        for c in df.columns:
            unit = f", unit: {units[c]}" if c in units else ""
            lines.append(f"# - {{name: {c}{unit}, datatype: {kinds.get(df[c].dtype.kind, 'string')}}}")
        lines.append("# meta: {note: 'INVENTED values laid out as an archive bulk download'}")
        lines.append("# schema: astropy-2.0")
        body = df.to_csv(index=False, na_rep="null")
        text = "\n".join(lines) + "\n" + body
        if fmt == "ecsv.gz":
            with gzip.open(path, "wt") as fh:
                fh.write(text)
        else:
            path.write_text(text)
    elif fmt == "parquet":
        df.to_parquet(path, index=False)
    else:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            _astropy_table(df, units).write(path, format={"fits": "fits", "votable": "votable"}[fmt], overwrite=True)
    return path


SUFFIX = {"csv": ".csv", "csv.gz": ".csv.gz", "ecsv": ".ecsv", "ecsv.gz": ".csv.gz", "parquet": ".parquet",
          "fits": ".fits", "votable": ".vot"}


def write_split(df, folder, fmt, parts=3, stem="GaiaSource"):
    """Write ``df`` as a split release of ``parts`` files named like archive bulk files."""
    folder = Path(folder)
    folder.mkdir(parents=True, exist_ok=True)
    edges = np.linspace(0, len(df), parts + 1).astype(int)
    paths = []
    for k in range(parts):
        piece = df.iloc[edges[k]:edges[k + 1]].reset_index(drop=True)
        paths.append(write(piece, folder / f"{stem}_{edges[k]:06d}-{edges[k + 1] - 1:06d}{SUFFIX[fmt]}", fmt))
    (folder / "_MD5SUM.txt").write_text("checksums of the parts (an archive folder holds such a file)\n")
    return paths
