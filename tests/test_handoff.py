"""Hand-off: exports that keep units, UCDs, descriptions and provenance; data dictionary; the CLI.

References outside the project: astropy reads every export back (``astropy.table.Table.read``,
``astropy.io.votable``) and its own VOTable writer is the reference for our vectorised BINARY2
stream; unit strings are checked against astropy's FITS and CDS unit formatters.
"""

from __future__ import annotations

import json
import os
import re
import subprocess
import sys
import warnings
from pathlib import Path

import numpy as np
import pandas as pd
import pytest

from cinderclock import SCHEMA_VERSION
from cinderclock.cli import build_parser, main
from cinderclock.columns import BASE_COLUMNS, INPUT_QUANTITIES, band_specs
from cinderclock.datadict import data_dictionary, describe
from cinderclock.export import astropy_unit, binary2_stream, export_table, parse_unit
from cinderclock.provenance import build, references
from cinderclock.reasons import FLAG_BITS, REASONS, REJECT_COLUMNS, make_rejects, metadata_block
from cinderclock.tableio import Column, read_metadata, write_table

ROOT = Path(__file__).resolve().parents[1]
READ_FORMAT = {"fits": "fits", "votable": "votable", "ecsv": "ascii.ecsv"}

# Columns of every kind a final table holds: integer and text identifiers, NaN, logarithmic units
# (dex(cm / s2), dex(solLum), dex), magnitudes, compound and solar units, text codes.
DERIVED = {
    "dist_pc": Column("pc", "Distance from the corrected parallax", "pos.distance"),
    "teff_k": Column("K", "Effective temperature used downstream", "phys.temperature.effective"),
    "teff_source": Column("", "Where teff_k came from: 'spectroscopic' or 'colour'", "meta.code"),
    "log_lum": Column("dex(solLum)", "log10 of the bolometric luminosity in nominal solar units", "phys.luminosity"),
    "mass_msun": Column("solMass", "White-dwarf mass", "phys.mass"),
    "radius_rsun": Column("solRad", "Radius | with a pipe in its description", "phys.size.radius"),
    "logg": Column("dex(cm / s2)", "Surface gravity log10(g / cm s^-2)", "phys.gravity"),
    "cool_age_gyr": Column("Gyr", "Cooling age", "time.age"),
    "ruwe_lf": Column("", "Column 'ruwe_lf' copied from the input catalogue", ""),
}


def _table(n=400, seed=2):
    rng = np.random.default_rng(seed)
    nan_some = lambda x: np.where(rng.random(n) < 0.1, np.nan, x)   # noqa: E731
    df = pd.DataFrame({
        "star_id": 10**14 + rng.permutation(n).astype(np.int64),
        "input_row": np.arange(n, dtype=np.int64),
        "plx_mas": rng.uniform(2, 50, n), "plx_err_mas": rng.uniform(0.02, 1, n),
        "pmra_mas_yr": rng.normal(0, 40, n),
        "logg_spec": nan_some(rng.normal(8, 0.3, n)), "logg_spec_err": nan_some(np.full(n, 0.05)),
        "mag_G": rng.uniform(12, 20, n), "mag_err_G": rng.uniform(0.001, 0.05, n),
        "quality_bits": rng.integers(0, 2**15, n).astype(np.int64),
        "dist_pc": rng.uniform(20, 500, n), "teff_k": rng.uniform(4000, 40000, n),
        "teff_source": np.where(rng.random(n) < 0.3, "spectroscopic", "colour").astype(object),
        "log_lum": nan_some(rng.uniform(-4.5, -1, n)), "mass_msun": nan_some(rng.normal(0.6, 0.1, n)),
        "radius_rsun": nan_some(rng.normal(0.013, 0.001, n)), "logg": nan_some(rng.normal(8, 0.2, n)),
        "cool_age_gyr": nan_some(rng.uniform(0.1, 10, n)), "ruwe_lf": rng.lognormal(0, 0.1, n),
    })
    specs = {q.column: q.spec for q in INPUT_QUANTITIES.values()} | BASE_COLUMNS | band_specs("G", "gaiadr3-G", "vega")
    return df, specs | DERIVED


def _provenance(tmp):
    """A provenance block shaped like the final table's, with the package's real model entries."""
    from cinderclock.cooling.mestel import MESTEL_1952
    from cinderclock.massradius.nauenberg import NAUENBERG_1972

    (tmp / "shard.parquet").write_bytes(b"stand-in shard")
    mr = build("mass_radius_model", {"mass": {"relation": "nauenberg1972"}},
               models=[NAUENBERG_1972.as_model() | {"caution": NAUENBERG_1972.note}])
    cm = build("cooling_model", {"cooling": {"model": "mestel"}},
               models=[MESTEL_1952.as_model() | {"caution": MESTEL_1952.note}])
    chain = build("cooling", {"cooling": {"model": "mestel"}}, inputs=[tmp / "shard.parquet"], upstream=[mr, cm])
    return chain | {"catalogue": "lanternfall_dr1.csv", "catalogue_sha256": "ab" * 32} | metadata_block()


@pytest.fixture(scope="module")
def final(tmp_path_factory):
    """results/final/{white_dwarfs,rejects}.parquet written by the package's own writer."""
    base = tmp_path_factory.mktemp("run")
    final = base / "results" / "final"
    df, specs = _table()
    prov = _provenance(base)
    write_table(df, final / "white_dwarfs.parquet", specs, prov, stage="final")
    rej = make_rejects(["7", "8", "LF-9"], [3, 5, 9], "select", "parallax_snr", "parallax/error = 1.20 < 5.0")
    write_table(rej, final / "rejects.parquet", REJECT_COLUMNS, prov, stage="final")
    return base, df, specs, prov


@pytest.fixture(scope="module")
def exports(final, tmp_path_factory):
    base, *_ = final
    out = tmp_path_factory.mktemp("exports")
    return {fmt: export_table(base / "results/final/white_dwarfs.parquet", fmt, out / f"wd.{fmt}")
            for fmt in ("fits", "votable", "ecsv")}


def _read(path, fmt):
    from astropy.table import Table

    with warnings.catch_warnings():
        warnings.simplefilter("ignore")            # astropy warns on FITS log() units, checked below
        return Table.read(path, format=READ_FORMAT[fmt])


# ----------------------------------------------------------------------------- exports


@pytest.mark.parametrize("fmt", ["fits", "votable", "ecsv"])
def test_exports_keep_units_descriptions_ucds_and_values(final, exports, fmt):
    from astropy import units as u

    _, df, specs, _ = final
    t = _read(exports[fmt], fmt)
    assert t.colnames == list(df.columns) and len(t) == len(df)
    for name in df.columns:
        spec, col = specs[name], t[name]
        want = astropy_unit(spec.unit)
        if want is None:
            assert col.unit is None, name
        elif isinstance(col.unit, u.UnrecognizedUnit):
            # astropy's FITS reader does not parse the standard's log() notation; the text must
            # still be that notation, and parse_unit must read it back to the same unit
            assert fmt == "fits" and isinstance(want, u.FunctionUnitBase), name
            assert parse_unit(str(col.unit)) == want, name
        else:
            assert col.unit == want, (name, col.unit, want)
        # (the VOTable writer wraps long DESCRIPTION text; XML layout whitespace is not content)
        assert " ".join((col.description or "").split()) == spec.description, name
        assert (col.meta or {}).get("ucd", "") == spec.ucd, name
        values = np.ma.filled(col, np.nan) if col.dtype.kind == "f" else np.asarray(col)
        if values.dtype.kind == "S":                 # astropy reads FITS text as bytes by default
            values = np.char.decode(values, "ascii")
        if df[name].dtype.kind == "f":
            assert np.array_equal(values, df[name].to_numpy(), equal_nan=True), name   # bit-exact, NaN kept
        else:
            assert list(values) == list(df[name]), name


def test_log_units_use_each_formats_own_notation(exports):
    from astropy import units as u
    from astropy.io import fits
    from astropy.io.votable import parse

    header = fits.getheader(exports["fits"], 1)
    tunit = {header[f"TTYPE{i}"]: header.get(f"TUNIT{i}") for i in range(1, header["TFIELDS"] + 1)}
    # FITS: no TUNIT for a logarithm (astropy cannot read any back without a warning; its serialized-column
    # block carries the unit), the standard's function notation log(...) quoted in the column comment
    comment = {header[f"TTYPE{i}"]: header.comments[f"TTYPE{i}"] for i in range(1, header["TFIELDS"] + 1)}
    assert tunit["logg"] is None and comment["logg"].startswith(f"[log({u.Unit('cm / s2').to_string('fits')})]")
    assert tunit["log_lum"] is None and comment["log_lum"].startswith(f"[log({u.solLum.to_string('fits')})]")
    assert tunit["pmra_mas_yr"] == (u.mas / u.yr).to_string("fits") and tunit["mass_msun"] == "solMass"
    assert tunit["star_id"] is None and tunit["teff_source"] is None
    index = next(i for i in range(1, header["TFIELDS"] + 1) if header[f"TTYPE{i}"] == "dist_pc")
    assert header.comments[f"TTYPE{index}"] == DERIVED["dist_pc"].description      # description as the comment
    # VOTable 1.3: CDS unit syntax, as astropy's CDS formatter writes it
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        vot = parse(str(exports["votable"]))
    assert vot.version == "1.3"
    ids = re.findall(r'\bID="([^"]+)"', exports["votable"].read_text(errors="replace"))
    assert len(ids) == len(set(ids))                                  # XML IDs are unique
    raw = exports["votable"].read_text(errors="replace")
    for name, unit in (("logg", "dex(cm / s2)"), ("log_lum", "dex(solLum)"), ("logg_spec_err", "dex")):
        assert re.search(rf'name="{name}"[^>]*unit="{re.escape(astropy_unit(unit).to_string("cds"))}"', raw), name


@pytest.mark.parametrize("fmt", ["fits", "votable", "ecsv"])
def test_exports_carry_schema_version_and_provenance(final, exports, fmt):
    base, _, _, prov = final
    d = describe(exports[fmt])
    source = read_metadata(base / "results/final/white_dwarfs.parquet")
    assert d.schema_version == SCHEMA_VERSION and d.stage == "final"
    assert d.provenance == source["provenance"] == json.loads(json.dumps(prov))
    assert d.meta["exported_from"]["file"] == "white_dwarfs.parquet"
    assert len(d.meta["exported_from"]["sha256"]) == 64
    # references in workflow order (mass-radius model before cooling model), whatever the JSON key order
    assert d.references() == [prov["stages"][s]["models"][0]["reference"] for s in ("mass_radius_model",
                                                                                      "cooling_model")]


def test_vectorised_binary2_stream_equals_astropys(tmp_path):
    # Reference: astropy.io.votable's own BINARY2 writer (row by row); our stream must be the same bytes.
    import base64
    import io

    from astropy.io.votable.tree import Resource, TableElement, VOTableFile
    from astropy.table import Column as AColumn
    from astropy.table import MaskedColumn, Table

    rng = np.random.default_rng(5)
    n = 777
    t = Table()
    t["f8"] = AColumn(np.where(rng.random(n) < 0.2, np.nan, rng.normal(size=n)))
    t["f4"] = AColumn(rng.normal(size=n).astype(np.float32))
    t["i8"] = AColumn(rng.integers(-10**15, 10**15, n))
    t["i4"] = AColumn(rng.integers(-99, 99, n).astype(np.int32))
    t["i2"] = AColumn(rng.integers(-99, 99, n).astype(np.int16))
    t["u1"] = AColumn(rng.integers(0, 255, n).astype(np.uint8))
    t["s"] = AColumn(np.array(["logg", "", "radius"])[rng.integers(0, 3, n)].astype("S"))
    t["u"] = AColumn(np.array(["colour", "", "Mestel–Kramers"])[rng.integers(0, 3, n)])
    t["ms"] = MaskedColumn(np.array(["a", "bb", ""])[rng.integers(0, 3, n)], mask=rng.random(n) < 0.3)
    t["mi"] = MaskedColumn(rng.integers(0, 9, n), mask=rng.random(n) < 0.3)
    vot = VOTableFile(version="1.3")
    vot.resources.append(Resource())
    vot.resources[0].tables.append(TableElement.from_table(vot, t))
    buf = io.BytesIO()
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        vot.to_xml(buf, tabledata_format="binary2")
    stream = re.search(rb'<STREAM encoding="base64">(.*?)</STREAM>', buf.getvalue(), re.S).group(1)
    assert binary2_stream(t) == base64.b64decode(stream)


def test_export_refuses_to_overwrite_or_replace_its_input(final, tmp_path):
    from cinderclock.errors import InputError

    src = final[0] / "results/final/white_dwarfs.parquet"
    out = export_table(src, "fits", tmp_path / "a.fits")
    with pytest.raises(InputError, match="exists"):
        export_table(src, "fits", out)
    export_table(src, "fits", out, overwrite=True)
    with pytest.raises(InputError, match="replace its own input"):
        export_table(src, "fits", src)
    with pytest.raises(InputError, match="unknown export format"):
        export_table(src, "hdf5")
    assert [p.name for p in tmp_path.iterdir()] == ["a.fits"]          # no temporaries left


# ----------------------------------------------------------------------------- data dictionary


def _markdown_rows(text, heading):
    section = text.split(heading, 1)[1].split("\n#", 1)[0]
    return [ln for ln in section.splitlines() if ln.startswith("| ") and not ln.startswith("| column")
            and not ln.startswith("| bit") and not ln.startswith("| stage") and not ln.startswith("| reason")]


def test_data_dictionary_documents_every_column_flag_and_model(final):
    base, df, specs, prov = final
    text = data_dictionary(base / "results/final/white_dwarfs.parquet")
    rows = _markdown_rows(text, "## Columns")
    assert len(rows) == len(df.columns)
    for name, row in zip(df.columns, rows):
        cells = [c.strip() for c in re.split(r"(?<!\\)\|", row)[1:-1]]
        spec = specs[name]
        assert cells[0] == f"`{name}`"
        assert cells[2] == (f"`{spec.unit}`" if spec.unit else "")
        assert cells[3] == (f"`{spec.ucd}`" if spec.ucd else "")
        assert cells[4].replace("\\|", "|") == spec.description
    flags = _markdown_rows(text, "## Quality flags")
    assert [r.split("|")[2].strip() for r in flags] == [f"`{n}`" for n in FLAG_BITS]
    assert [int(r.split("|")[1]) for r in flags] == [b for b, _ in FLAG_BITS.values()]
    for ref in references(prov):
        assert ref in text
    assert "ion heat only" in text                                   # the cooling model's caution
    assert prov["config_hash"] in text and prov["catalogue_sha256"] in text
    assert "## Reject reasons" not in text                           # no reason column here


def test_rejects_dictionary_lists_the_reasons(final):
    text = data_dictionary(final[0] / "results/final/rejects.parquet")
    reasons = _markdown_rows(text, "## Reject reasons")
    assert [r.split("|")[1].strip() for r in reasons] == [f"`{c}`" for c in REASONS]
    assert "## Quality flags" not in text


def test_dictionary_of_an_export_matches_the_parquet(final, exports):
    base = final[0]
    ref = _markdown_rows(data_dictionary(base / "results/final/white_dwarfs.parquet"), "## Columns")
    for fmt in ("fits", "votable", "ecsv"):
        got = _markdown_rows(data_dictionary(exports[fmt]), "## Columns")
        # same names, units, UCDs and descriptions; only the storage type column may differ
        strip = lambda rows: [re.split(r"(?<!\\)\|", r)[1:2] + re.split(r"(?<!\\)\|", r)[3:] for r in rows]  # noqa
        assert strip(got) == strip(ref), fmt


# ----------------------------------------------------------------------------- command line


def test_inspect_prints_provenance_and_columns(final, capsys):
    base, df, specs, prov = final
    assert main(["inspect", str(base / "results/final/white_dwarfs.parquet")]) == 0
    out = capsys.readouterr().out
    assert f"schema version  {SCHEMA_VERSION}" in out and "stage           final" in out
    assert f"config hash     {prov['config_hash']}" in out and prov["catalogue_sha256"] in out
    for stage, entry in prov["stages"].items():
        assert re.search(rf"{stage}\s+{entry['settings_hash'][:16]}", out), stage
    for ref in references(prov):
        assert ref in out
    for name in df.columns:
        line = next(ln for ln in out.splitlines() if ln.startswith(name + " "))
        assert specs[name].unit in line and specs[name].ucd in line and specs[name].description in line


def test_inspect_json_is_the_metadata_block(final, capsys):
    path = final[0] / "results/final/white_dwarfs.parquet"
    assert main(["inspect", str(path), "--json"]) == 0
    got = json.loads(capsys.readouterr().out)
    assert got["metadata"] == read_metadata(path) and got["rows"] == len(final[1])


def test_cite_prints_the_references_of_the_run(final, exports, capsys):
    prov = final[3]
    for path in (final[0] / "results/final/white_dwarfs.parquet", exports["votable"]):
        assert main(["cite", str(path)]) == 0
        out = capsys.readouterr().out
        for i, stage in enumerate(("mass_radius_model", "cooling_model"), start=1):
            assert f"[{i}] {prov['stages'][stage]['models'][0]['reference']}" in out
        assert "Mestel, L. 1952, MNRAS 112, 583" in out and "Nauenberg, M. 1972, ApJ 175, 417" in out


def test_export_and_dictionary_commands(final, tmp_path, capsys):
    src = str(final[0] / "results/final/white_dwarfs.parquet")
    out = tmp_path / "wd.vot"
    assert main(["export", src, "--format", "votable", "-o", str(out)]) == 0
    assert out.exists() and capsys.readouterr().out.strip() == f"wrote {out}"
    assert main(["export", src, "--format", "votable", "-o", str(out)]) == 1
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and "exists" in err and "--overwrite" in err
    assert main(["export", src, "--format", "votable", "-o", str(out), "--overwrite"]) == 0
    md = tmp_path / "dd.md"
    assert main(["dictionary", src, "-o", str(md)]) == 0
    assert md.read_text() == data_dictionary(src)


@pytest.mark.parametrize("args,needle", [
    (["inspect", "missing.parquet"], "missing.parquet: file not found"),
    (["cite", "missing.vot"], "file not found"),
    (["inspect", "table.txt"], "cannot tell the table format"),
    (["export", "missing.parquet", "--format", "fits"], "file not found"),
])
def test_user_faults_are_one_line(tmp_path, capsys, monkeypatch, args, needle):
    monkeypatch.chdir(tmp_path)
    (tmp_path / "table.txt").write_text("x")
    assert main(args) == 1
    captured = capsys.readouterr()
    assert captured.err.count("\n") == 1 and needle in captured.err and "Traceback" not in captured.err


def test_damaged_and_foreign_files(tmp_path, capsys, final):
    bad = tmp_path / "bad.parquet"
    bad.write_bytes((final[0] / "results/final/white_dwarfs.parquet").read_bytes()[:300])
    assert main(["inspect", str(bad)]) == 1
    assert "not a readable Parquet file" in capsys.readouterr().err
    foreign = tmp_path / "foreign.parquet"
    pd.DataFrame({"a": [1, 2]}).to_parquet(foreign)
    assert main(["inspect", str(foreign)]) == 0
    assert "not written by cinderclock" in capsys.readouterr().out
    assert main(["cite", str(foreign)]) == 1
    assert "no cinderclock provenance" in capsys.readouterr().err


def test_unknown_export_format_is_a_usage_error(capsys):
    with pytest.raises(SystemExit) as stop:
        main(["export", "x.parquet", "--format", "hdf5"])
    assert stop.value.code == 2 and "invalid choice: 'hdf5'" in capsys.readouterr().err


def test_console_script_points_at_main():
    import tomllib

    scripts = tomllib.loads((ROOT / "pyproject.toml").read_text())["project"]["scripts"]
    module, func = scripts["cinderclock"].split(":")
    import importlib

    assert getattr(importlib.import_module(module), func) is main


def test_documented_commands_parse():
    # every command line shown in docs/handoff.md is accepted by the parser
    text = (ROOT / "docs" / "handoff.md").read_text()
    blocks = re.findall(r"```\n(.*?)```", text, re.S)
    commands = [ln.strip() for b in blocks for ln in b.splitlines() if ln.strip().startswith("cinderclock ")]
    assert len(commands) >= 4
    for line in commands:
        build_parser().parse_args(line.split("#")[0].split()[1:])


# ----------------------------------------------------------------------------- the workflow rule


def test_handoff_rule_writes_exports_and_dictionary(final, tmp_path):
    import shutil

    import yaml

    wd = tmp_path / "wd"
    shutil.copytree(final[0] / "results", wd / "results")
    (wd / "config").mkdir()
    (wd / "config" / "config.yaml").write_text(yaml.safe_dump({"results_dir": "results"}))
    # a Snakefile holding only the hand-off rule, so the final tables above are its sources
    (wd / "Snakefile").write_text('configfile: "config/config.yaml"\nR = config["results_dir"]\n'
                                  f'include: "{ROOT / "workflow/rules/handoff.smk"}"\n')
    env = dict(os.environ, PYTHONPATH=os.pathsep.join([str(ROOT / "workflow"), os.environ.get("PYTHONPATH", "")]),
               OMP_NUM_THREADS="1")
    out = subprocess.run([sys.executable, "-m", "snakemake", "-s", str(wd / "Snakefile"), "-d", str(wd), "--cores", "1",
                          "results/final/white_dwarfs.fits", "results/final/white_dwarfs.vot",
                          "results/final/data_dictionary.md"], capture_output=True, text=True, timeout=300, env=env)
    assert out.returncode == 0, out.stderr[-3000:]
    final_dir = wd / "results/final"
    for name in ("white_dwarfs.fits", "white_dwarfs.vot"):
        d = describe(final_dir / name)
        assert d.n_rows == len(final[1]) and d.schema_version == SCHEMA_VERSION
    md = (final_dir / "data_dictionary.md").read_text()
    assert "## `white_dwarfs.parquet`" in md and "## `rejects.parquet`" in md
    assert "### Quality flags" in md and "### Reject reasons" in md
    assert not [p for p in final_dir.iterdir() if ".partial-" in p.name]
