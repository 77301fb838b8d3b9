"""Self-describing Parquet: metadata round trip and atomic writes (internal checks)."""


import pandas as pd
import pyarrow.parquet as pq
import pytest

from cinderclock.tableio import Column, StreamingTableWriter, read_table, write_table

SPECS = {"a": Column("K", "a temperature", "phys.temperature.effective"), "b": Column("", "a label", "meta.code")}


def test_metadata_round_trip(tmp_path):
    df = pd.DataFrame({"a": [1.0, 2.0], "b": ["x", "y"]})
    write_table(df, tmp_path / "t.parquet", SPECS, {"package": "cinderclock"}, stage="demo")
    back, specs, meta = read_table(tmp_path / "t.parquet")
    assert back["a"].tolist() == [1.0, 2.0] and specs == SPECS
    assert meta["stage"] == "demo" and meta["provenance"] == {"package": "cinderclock"} and meta["schema_version"]
    field = pq.read_schema(tmp_path / "t.parquet").field("a")
    assert field.metadata[b"unit"] == b"K" and field.metadata[b"ucd"] == b"phys.temperature.effective"


def test_undescribed_column_is_refused(tmp_path):
    with pytest.raises(ValueError, match="without a description"):
        write_table(pd.DataFrame({"c": [1]}), tmp_path / "t.parquet", SPECS, {})


def test_failed_write_leaves_no_file(tmp_path):
    # A frame that cannot be converted raises mid-write: neither the target nor a partial file remains.
    df = pd.DataFrame({"a": [object()], "b": ["x"]})
    with pytest.raises(Exception):
        write_table(df, tmp_path / "t.parquet", SPECS, {})
    assert list(tmp_path.iterdir()) == []


def test_streaming_writer_casts_empty_shards(tmp_path):
    frames = [pd.DataFrame({"a": pd.Series([], dtype=float), "b": pd.Series([], dtype=object)}),
              pd.DataFrame({"a": [1.0], "b": ["x"]}), pd.DataFrame({"a": [2.0], "b": ["y"]})]
    with StreamingTableWriter(tmp_path / "m.parquet", SPECS, {"k": 1}) as w:
        for f in frames:
            w.write(f)
    back, specs, meta = read_table(tmp_path / "m.parquet")
    assert back["b"].tolist() == ["x", "y"] and specs == SPECS and meta["provenance"] == {"k": 1}
