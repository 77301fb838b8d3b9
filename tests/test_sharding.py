"""Sharding: batched ingest equals whole-file ingest; HEALPix shards; shards rewritten only on change."""

import os

import pandas as pd
import pytest

from cinderclock.config import stage_settings
from cinderclock.simulate import make_catalogue, write_csv
from cinderclock.sharding import ingest_to_shards
from cinderclock.stages.ingest import load_and_ingest
from cinderclock.tableio import read_table


@pytest.fixture
def catalogue(tmp_path):
    cat, _ = make_catalogue(3000, seed=21)
    path = tmp_path / "cat.csv"
    write_csv(cat, path, malformed_lines=(5, 1300, 2999))
    return path


def _all_shards(folder):
    frames = [read_table(p)[0] for p in sorted(folder.glob("*.parquet"))]
    return pd.concat(frames, ignore_index=True).sort_values("input_row").reset_index(drop=True)


def test_batched_ingest_equals_whole_file_ingest(tmp_path, config, catalogue):
    # internal check: reading in batches of 500 rows (malformed rows in several batches, a repeated
    # identifier across batches) gives exactly the rows and rejects of reading the file whole
    config["catalogue"]["path"] = str(catalogue)
    s = stage_settings(config, "ingest")
    s["shards"]["rows_per_shard"] = 1000
    whole, whole_rej, _ = load_and_ingest(s)
    manifest, n = ingest_to_shards(s, tmp_path / "shards", tmp_path / "rej.parquet", batch_rows=500)
    assert n == 3000 and sorted(manifest) == ["s0000", "s0001", "s0002"]
    got = _all_shards(tmp_path / "shards")
    pd.testing.assert_frame_equal(got, whole.sort_values("input_row").reset_index(drop=True), check_dtype=False)
    rej, _, _ = read_table(tmp_path / "rej.parquet")
    key = ["input_row", "reason"]
    assert rej[key].sort_values(key).values.tolist() == whole_rej[key].sort_values(key).values.tolist()
    assert {5, 1300, 2999} <= set(rej.loc[rej.reason == "malformed_row", "input_row"])


def test_unchanged_shards_are_not_rewritten(tmp_path, config, catalogue):
    config["catalogue"]["path"] = str(catalogue)
    s = stage_settings(config, "ingest")
    s["shards"]["rows_per_shard"] = 1000
    ingest_to_shards(s, tmp_path / "shards", tmp_path / "rej.parquet", batch_rows=700)
    before = {p.name: os.stat(p).st_mtime_ns for p in (tmp_path / "shards").glob("*.parquet")}
    lines = catalogue.read_text().split("\n")
    f = lines[1501].split(",")
    f[5] = "0.123"                                  # one proper motion in shard s0001
    lines[1501] = ",".join(f)
    catalogue.write_text("\n".join(lines))
    ingest_to_shards(s, tmp_path / "shards", tmp_path / "rej.parquet", batch_rows=700)
    after = {p.name: os.stat(p).st_mtime_ns for p in (tmp_path / "shards").glob("*.parquet")}
    changed = sorted(k for k in before if before[k] != after[k])
    assert changed == ["s0001.parquet"]


def test_healpix_shards_group_stars_by_sky_pixel(tmp_path, config, catalogue):
    # nside = 1 in the nested scheme: 12 base pixels; 0-3 form the northern polar cap, 8-11 the
    # southern (Gorski et al. 2005, ApJ 622, 759, Fig. 4). Stars above dec +45 deg lie in 0-3 and
    # below -45 deg in 8-11 (the caps reach down to |dec| = 41.8 deg).
    config["catalogue"]["path"] = str(catalogue)
    s = stage_settings(config, "ingest")
    s["shards"] = {"method": "healpix", "healpix_nside": 1, "rows_per_shard": 1}
    manifest, _ = ingest_to_shards(s, tmp_path / "shards", tmp_path / "rej.parquet", batch_rows=1000)
    assert 1 < len(manifest) <= 12
    for name in manifest:
        t, _, _ = read_table(tmp_path / "shards" / f"{name}.parquet")
        pix = int(name[1:])
        if (t["dec_deg"] > 45).any():
            assert pix <= 3
        if (t["dec_deg"] < -45).any():
            assert pix >= 8
