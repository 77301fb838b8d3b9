"""The example configurations of docs/surveys.md, run on INVENTED catalogues laid out like the
archives' tables (Gaia DR3 export, SDSS PhotoObj PSF magnitudes, Pan-STARRS1 MeanObject, 2MASS PSC)."""

import copy
import re

import numpy as np
import pytest
import yaml

from archive_layouts import gaia_export, write, write_split
from cinderclock.config import check_references, stage_settings, validate
from cinderclock.sharding import ingest_to_shards
from cinderclock.stages.select import select
from cinderclock.tableio import read_table
from conftest import ROOT


def examples():
    text = (ROOT / "docs" / "surveys.md").read_text()
    blocks = re.findall(r"```yaml\n(.*?)```", text, re.S)
    return {re.match(r"# example: (\S+)", b).group(1): yaml.safe_load(b) for b in blocks if b.startswith("# example")}


def _invented_survey_columns(df, rng):
    """Invented SDSS/PS1/2MASS-like magnitudes beside the invented Gaia ones (values are not physical)."""
    n = len(df)
    g = df["phot_g_mean_mag"].to_numpy()
    out = df.copy()
    for b, off in zip("ugriz", (0.6, 0.1, -0.2, -0.3, -0.35)):
        out[f"psfMag_{b}"] = g + off + rng.normal(0, 0.02, n)
        out[f"psfMagErr_{b}"] = np.full(n, 0.03)
    for b, off in zip("grizy", (0.1, -0.2, -0.3, -0.35, -0.4)):
        out[f"{b}MeanPSFMag"] = g + off
        out[f"{b}MeanPSFMagErr"] = np.full(n, 0.02)
    out.loc[::7, "yMeanPSFMag"] = -999.0                  # PS1 writes -999 for no measurement
    for b, off in zip("jhk", (-0.6, -0.7, -0.8)):
        out[f"{b}_m"] = g + off
        out[f"{b}_msigcom"] = np.full(n, 0.05)
    return out


def test_the_docs_hold_the_three_example_configurations():
    assert set(examples()) == {"gaia-only", "gaia-sdss", "gaia-ps1-2mass"}


@pytest.mark.parametrize("name", ["gaia-only", "gaia-sdss", "gaia-ps1-2mass"])
def test_example_configuration_runs_on_an_invented_catalogue(tmp_path, config, name):
    ex = examples()[name]
    df = _invented_survey_columns(gaia_export(n=180, seed=9), np.random.default_rng(9))
    path = ex["catalogue"]["path"]
    if name == "gaia-only":
        write_split(df, tmp_path / "data", "csv.gz")
        spec = str(tmp_path / path)
    elif name == "gaia-sdss":
        write(df, tmp_path / "data.fits", "fits")
        spec = str(tmp_path / "data.fits")
    else:
        (tmp_path / "data").mkdir()
        spec = [str(write(df.iloc[:90].reset_index(drop=True), tmp_path / p, "parquet")) if i == 0 else
                str(write(df.iloc[90:].reset_index(drop=True), tmp_path / p, "parquet")) for i, p in enumerate(path)]
    cfg = copy.deepcopy(config)
    for key in ("catalogue", "bands", "astrometry"):
        cfg.pop(key)
    cfg.update(copy.deepcopy(ex))
    cfg["catalogue"]["path"] = spec
    cfg["select"]["quality_cuts"] = [{"column": "ruwe", "max": 1.4}]
    validate(cfg)
    check_references(cfg)
    s = stage_settings(cfg, "ingest")
    manifest, n = ingest_to_shards(s, tmp_path / "sh", tmp_path / "rej.parquet", batch_rows=64)
    assert n == len(df)
    table = read_table(next((tmp_path / "sh").glob("*.parquet")))[0]
    kept, _ = select(table, stage_settings(cfg, "select"))
    assert len(kept) > 0 and np.isfinite(kept["plx_zp_mas"]).all()
    if name == "gaia-sdss":
        # the published offset u_AB = u_SDSS - 0.04 mag is applied once, at ingest
        src = df.set_index("source_id").loc[table["star_id"]]
        assert np.allclose(table["mag_u"] - src["psfMag_u"].to_numpy(), -0.04)
        assert np.allclose(table["mag_z"] - src["psfMag_z"].to_numpy(), +0.02)
    if name == "gaia-ps1-2mass":
        assert np.isnan(table.loc[table.input_row % 7 == 0, "mag_y"]).all()   # -999: not measured
    # the model photometry table builds for every configured band (passbands and zero points ship)
    from cinderclock.photometry.table import build_photometry_table

    bands = [{"key": k, "passband": b["passband"], "system": b["system"]} for k, b in cfg["bands"].items()]
    grid = build_photometry_table(bands, np.geomspace(5000, 50000, 5), law=None)
    assert np.isfinite(grid[[f"mag_{k}" for k in cfg["bands"]]].to_numpy()).all()


def test_vega_minus_ab_offsets_of_the_infrared_presets():
    # Loose checks (from memory): AB - Vega for 2MASS J, H, Ks is about 0.89, 1.37, 1.84 mag and
    # for WISE W1, W2 about 2.70, 3.34 mag (Blanton & Roweis 2007, AJ 133, 734; WISE Explanatory
    # Supplement IV.4.h). Tolerance 0.04 mag covers the flux-averaging conventions.
    from cinderclock.photometry.passbands import vega_minus_ab

    expected = {"twomass-J": 0.89, "twomass-H": 1.37, "twomass-Ks": 1.84, "wise2010-W1": 2.70, "wise2010-W2": 3.34}
    for band, ab_minus_vega in expected.items():
        assert abs(-vega_minus_ab(band) - ab_minus_vega) < 0.04, band
