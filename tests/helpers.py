"""Helpers shared by the tests: a small well-formed catalogue, a one-call ingest, a quick chain configuration."""

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


def spectroscopic_config(config):
    """A copy of ``config`` reading only identifiers, parallaxes and spectroscopic Teff/log g, without
    selection cuts, on a coarse cooling mass grid (quick in-memory chains)."""
    import copy

    cfg = copy.deepcopy(config)
    cfg["select"].update(wd_region=None, quality_cuts=[], max_mag_error={})
    keep = ("star_id", "parallax", "parallax_error", "teff_spec", "teff_spec_error", "logg_spec", "logg_spec_error")
    cfg["catalogue"]["columns"] = {k: v for k, v in cfg["catalogue"]["columns"].items() if k in keep}
    cfg["catalogue"]["keep_columns"] = []
    cfg["cooling"]["masses_msun"] = {"min": 0.45, "max": 1.1, "step": 0.05}
    return cfg
