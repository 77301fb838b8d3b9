"""The ``cinderclock`` command: start a project folder; look into, export, document and cite the
tables a run wrote.

::

    cinderclock init DIR [--with-sample]       # a project folder using the installed workflow
    cinderclock defaults                       # every configuration key and its default (schema)
    cinderclock path [NAME]                    # where the installed workflow's files are
    cinderclock inspect results/final/white_dwarfs.parquet          # provenance and columns
    cinderclock inspect results/final/white_dwarfs.parquet --json   # the whole metadata block
    cinderclock export results/final/white_dwarfs.parquet --format votable [-o OUT] [--overwrite]
    cinderclock dictionary results/final/white_dwarfs.parquet -o data_dictionary.md
    cinderclock cite results/final/white_dwarfs.parquet             # references of the models used
    cinderclock cite results/final/white_dwarfs.parquet --bibtex refs.bib
    cinderclock --version

``inspect``, ``dictionary`` and ``cite`` read Parquet tables and their FITS, VOTable and ECSV
exports alike. A fault the user can fix (missing or damaged file, unknown format, existing output)
is reported in one line, with exit status 1 and no traceback.
"""

from __future__ import annotations

import argparse
import json
import sys
from pathlib import Path

from .errors import CinderclockError, InputError


def _summary_lines(d):
    """Header of ``inspect``: what the file is and where it came from."""
    prov = d.provenance
    lines = [f"file            {d.path}",
             f"format          {d.kind}, {d.n_rows} rows, {len(d.columns)} columns"]
    if not d.meta:
        lines.append("metadata        none: this file was not written by cinderclock (or its metadata was stripped)")
        return lines
    lines += [f"schema version  {d.schema_version}",
              f"stage           {d.stage}",
              f"package         {prov.get('package', 'cinderclock')} {prov.get('package_version', '?')}",
              f"config hash     {prov.get('config_hash', '-')}"]
    if prov.get("catalogue"):
        lines.append(f"catalogue       {prov['catalogue']}  sha256 {prov.get('catalogue_sha256', '-')}")
    if d.meta.get("exported_from"):
        src = d.meta["exported_from"]
        lines.append(f"exported from   {src.get('file')}  sha256 {src.get('sha256')}")
    stages = d.stages()
    if stages:
        lines.append("stages          name                 settings hash     inputs")
        for name, entry in stages.items():
            lines.append(f"                {name:<20} {entry.get('settings_hash', '')[:16]:<17} "
                         f"{len(entry.get('inputs', {}))} file(s)")
    models = d.models()
    if models:
        lines.append("models")
        lines += [f"                {st}: {m.get('name', '')}: {m.get('reference') or '(no reference)'}"
                  for st, m in models]
    bits = d.flag_bits()
    if bits:
        lines.append("quality bits    " + ", ".join(f"{b}={n}" for n, (b, _) in bits.items()))
    reasons = d.reasons()
    if reasons:
        lines.append("reject reasons  " + ", ".join(reasons))
    return lines


def _column_lines(d):
    names = list(d.columns)
    w_name = max([len("column")] + [len(n) for n in names])
    w_type = max([len("type")] + [len(d.dtypes.get(n, "")) for n in names])
    w_unit = max([len("unit")] + [len(s.unit) for s in d.columns.values()])
    w_ucd = max([len("UCD")] + [len(s.ucd) for s in d.columns.values()])
    lines = [f"{'column':<{w_name}}  {'type':<{w_type}}  {'unit':<{w_unit}}  {'UCD':<{w_ucd}}  description"]
    for n, s in d.columns.items():
        lines.append(f"{n:<{w_name}}  {d.dtypes.get(n, ''):<{w_type}}  {s.unit:<{w_unit}}  {s.ucd:<{w_ucd}}  "
                     f"{s.description}")
    return lines


def cmd_inspect(args):
    from .datadict import describe

    d = describe(args.file)
    if args.json:
        print(json.dumps({"file": d.path, "format": d.kind, "rows": d.n_rows, "metadata": d.meta},
                         indent=1, sort_keys=True))
        return 0
    print("\n".join(_summary_lines(d) + ["", *_column_lines(d)]))
    return 0


def cmd_export(args):
    from .export import export_table

    out = export_table(args.file, args.format, args.output, overwrite=args.overwrite)
    print(f"wrote {out}")
    return 0


def cmd_dictionary(args):
    from .datadict import data_dictionary

    text = data_dictionary(args.file)
    if args.output is None:
        sys.stdout.write(text)
        return 0
    out = Path(args.output)
    if out.exists() and not args.overwrite:
        raise InputError("the output file exists; pass --overwrite to replace it", out)
    from .tableio import atomic_write

    atomic_write(out, lambda tmp: Path(tmp).write_text(text))
    print(f"wrote {out}")
    return 0


def cmd_cite(args):
    from .datadict import describe

    d = describe(args.file)
    if not d.meta:
        raise InputError("no cinderclock provenance in this file, so the models it used are unknown", d.path)
    cited = d.cited_models()
    prov = d.provenance
    print(f"Models used to make {Path(d.path).name} (from its provenance):")
    if not cited:
        print("  (none recorded)")
    for i, (ref, names, _) in enumerate(cited, start=1):
        print(f"  [{i}] {ref}  ({', '.join(names)})")
    print(f"Software: {prov.get('package', 'cinderclock')} {prov.get('package_version', '?')}, "
          f"configuration hash {prov.get('config_hash', '?')}.")
    if args.bibtex:
        from .bibliography import bibtex
        from .tableio import atomic_write

        out = Path(args.bibtex)
        if out.exists() and not args.overwrite:
            raise InputError("the output file exists; pass --overwrite to replace it", out)
        text = bibtex([(ref, fields) for ref, _, fields in cited])
        atomic_write(out, lambda tmp: Path(tmp).write_text(text))
        print(f"wrote {out}")
    return 0


def cmd_init(args):
    from .project import init_project

    written = init_project(args.folder, with_sample=args.with_sample)
    for path in written:
        print(f"wrote {path}")
    todo = "" if args.with_sample else " after filling in the FILL IN keys of config/config.yaml"
    print(f"next: cd {args.folder} && snakemake --cores 2{todo}")
    return 0


def cmd_defaults(args):
    from .project import defaults_listing

    print("\n".join(defaults_listing()))
    return 0


def cmd_path(args):
    from .resources import RESOURCES, locate

    if args.name:
        print(locate(args.name))
        return 0
    for name in RESOURCES:
        print(f"{name:<17} {locate(name)}")
    return 0


def build_parser():
    p = argparse.ArgumentParser(prog="cinderclock", description="Start a project folder; look into, export, "
                                "document and cite the tables a cinderclock run wrote.")
    p.add_argument("--version", action="version", version=f"cinderclock {_version()}")
    sub = p.add_subparsers(dest="command", required=True, metavar="COMMAND")

    from .resources import RESOURCES

    s = sub.add_parser("init", help="write a project folder (Snakefile using the installed workflow, commented "
                       "configuration to fill in)")
    s.add_argument("folder", help="the project folder (created if missing; existing files are never overwritten)")
    s.add_argument("--with-sample", action="store_true", help="also copy the invented sample catalogue and its "
                   "configuration, so the folder runs as it is")
    s.set_defaults(func=cmd_init)

    s = sub.add_parser("defaults", help="print every configuration key with its default (from the schema)")
    s.set_defaults(func=cmd_defaults)

    s = sub.add_parser("path", help="print where the installed workflow's files are")
    s.add_argument("name", nargs="?", choices=list(RESOURCES), help="one resource (default: all)")
    s.set_defaults(func=cmd_path)

    s = sub.add_parser("inspect", help="print the schema version, provenance and columns of a table")
    s.add_argument("file", help="a cinderclock table: Parquet, or a FITS/VOTable/ECSV export")
    s.add_argument("--json", action="store_true", help="print the whole metadata block as JSON")
    s.set_defaults(func=cmd_inspect)

    from .export import FORMATS

    s = sub.add_parser("export", help="write a Parquet table as FITS, VOTable or ECSV (units kept)")
    s.add_argument("file", help="a cinderclock Parquet table")
    s.add_argument("--format", required=True, choices=sorted(FORMATS))
    s.add_argument("-o", "--output", help="output file (default: next to FILE, with the format's suffix)")
    s.add_argument("--overwrite", action="store_true", help="replace an existing output file")
    s.set_defaults(func=cmd_export)

    s = sub.add_parser("dictionary", help="write the data dictionary of a table (Markdown)")
    s.add_argument("file")
    s.add_argument("-o", "--output", help="Markdown file to write (default: standard output)")
    s.add_argument("--overwrite", action="store_true", help="replace an existing output file")
    s.set_defaults(func=cmd_dictionary)

    s = sub.add_parser("cite", help="print the references of the models a run used (numbered); --bibtex writes them")
    s.add_argument("file")
    s.add_argument("--bibtex", metavar="BIBFILE", help="also write the references as BibTeX to BIBFILE")
    s.add_argument("--overwrite", action="store_true", help="replace an existing BibTeX file")
    s.set_defaults(func=cmd_cite)
    return p


def _version():
    from . import __version__

    return __version__


def main(argv=None):
    """Entry point of the ``cinderclock`` console script; returns the exit status."""
    args = build_parser().parse_args(argv)
    try:
        return args.func(args)
    except CinderclockError as exc:
        sys.stderr.write(f"cinderclock {args.command}: error: {exc}\n")
        return 1
    except BrokenPipeError:                    # output piped into `head`
        return 0
    except OSError as exc:                     # e.g. no permission to write the output
        sys.stderr.write(f"cinderclock {args.command}: error: {exc.strerror or exc}: {exc.filename or ''}\n")
        return 1


if __name__ == "__main__":
    sys.exit(main())
