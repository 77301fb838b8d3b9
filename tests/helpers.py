"""Helpers shared by the ingest tests: a small well-formed catalogue and a one-call ingest."""

import numpy as np
import pandas as pd

from cinderclock.config import stage_settings
from cinderclock.stages.ingest import load_and_ingest


def frame(n=6):
    """A well-formed catalogue in the sample survey's column names (invented values)."""
    return pd.DataFrame({
        "lf_source": np.arange(100, 100 + n), "ra_icrs": np.linspace(10, 20, n), "dec_icrs": np.zeros(n),
        "plx": np.full(n, 10.0), "plx_e": np.full(n, 0.1), "pm_ra": np.zeros(n), "pm_dec": np.zeros(n),
        "g_mag": np.full(n, 15.0), "g_mag_e": np.full(n, 0.01), "bp_mag": np.full(n, 15.1),
        "bp_mag_e": np.full(n, 0.02), "rp_mag": np.full(n, 14.9), "rp_mag_e": np.full(n, 0.02),
        "teff_sp": np.full(n, 12000.0), "teff_sp_e": np.full(n, 200.0), "logg_sp": np.full(n, 8.0),
        "logg_sp_e": np.full(n, 0.05), "ruwe_lf": np.ones(n)})


def ingest_file(tmp_path, df, config, name="cat.csv", text=None):
    """Write ``df`` (or ``text``) as the configured catalogue and ingest it whole."""
    path = tmp_path / name
    if text is not None:
        path.write_text(text)
    elif name.endswith(".csv"):
        df.to_csv(path, index=False)
    elif name.endswith(".parquet"):
        df.to_parquet(path, index=False)
    config["catalogue"]["path"] = str(path)
    return load_and_ingest(stage_settings(config, "ingest"))
