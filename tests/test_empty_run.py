"""An all-rejected catalogue finishes cleanly: empty, typed final table, exports and a complete rejects table."""

import subprocess
import sys
import warnings

import pyarrow as pa
import pyarrow.parquet as pq
import pytest
import yaml

from cinderclock.simulate import make_catalogue, write_csv
from conftest import ROOT


@pytest.mark.slow                       # about a minute: the whole chain through the hand-off
def test_a_run_whose_final_table_is_empty_finishes_with_typed_exports(tmp_path):
    cat, _ = make_catalogue(200, seed=4)
    write_csv(cat, tmp_path / "catalogue.csv")
    with open(ROOT / "config" / "config.yaml") as fh:
        cfg = yaml.safe_load(fh)
    cfg["catalogue"]["path"] = "catalogue.csv"
    cfg["select"]["min_parallax_over_error"] = 1e9           # nothing passes the selection
    (tmp_path / "config").mkdir()
    (tmp_path / "config" / "config.yaml").write_text(yaml.safe_dump(cfg))
    cmd = [sys.executable, "-m", "snakemake", "-s", str(ROOT / "Snakefile"), "-d", str(tmp_path), "--cores", "2",
           "final", "handoff"]
    out = subprocess.run(cmd, capture_output=True, text=True, timeout=600)
    assert out.returncode == 0, out.stderr[-3000:]
    final = tmp_path / "results" / "final"
    table, rejects = pq.read_table(final / "white_dwarfs.parquet"), pq.read_table(final / "rejects.parquet")
    assert table.num_rows == 0 and rejects.num_rows == 200
    assert not [f.name for f in table.schema if pa.types.is_null(f.type)]     # typed columns stay typed
    assert table.schema.field("star_id").type == rejects.schema.field("star_id").type == pa.int64()
    from astropy.table import Table

    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        for name in ("white_dwarfs.fits", "white_dwarfs.vot"):
            t = Table.read(final / name)
            assert len(t) == 0 and t["mbol"].dtype.kind == "f" and t["star_id"].dtype.kind == "i"
