"""A project folder of one's own: ``cinderclock init DIR [--with-sample]`` and the defaults listing.

A project folder holds a survey team's configuration, catalogue and results; the workflow itself
stays in the installed package and is used as a Snakemake module (``data/project/Snakefile``), so
upgrading the package upgrades the workflow and never touches the folder's files. The starter
configuration names only what a catalogue must supply (path, column mapping, bands, survey limits);
every other key takes its default from the schema, listed (commented out) at its end from the
schema of the installed version, so keys added to the schema appear without a change here.
"""

from __future__ import annotations

import shutil
from pathlib import Path

from .errors import InputError

TEMPLATES = Path(__file__).resolve().parent / "data" / "project"

def _scalar(value):
    """A default as one line of YAML (flow style)."""
    import yaml

    return yaml.safe_dump(value, default_flow_style=True, width=10**6).replace("\n...\n", "").strip()


def _choices(sub):
    if "enum" in sub:
        return " | ".join("null" if v is None else str(v) for v in sub["enum"])
    return ""


def defaults_listing(schema=None, prefix=""):
    """Every key of the schema with its default and what it means, as YAML lines.

    Parameters
    ----------
    schema : dict, optional
        The configuration schema (default: the installed one).
    prefix : str
        Put before every line (``"# "`` for a commented-out listing).

    Returns
    -------
    list of str
        Nested like the configuration. A key without a default is ``null`` and marked required or
        optional; a mapping with keys of the user's choosing (``bands``) shows the form of an entry.
    """
    from .config import load_schema

    schema = schema if schema is not None else load_schema()
    lines = []

    def walk(node, depth):
        pad = "  " * depth
        for name, sub in node.get("properties", {}).items():
            desc = sub.get("description", "")
            if "properties" in sub and sub.get("default", {}) is not None:     # a section: its keys
                lines.append(f"{pad}{name}:" + (f"  # {desc}" if desc else ""))
                walk(sub, depth + 1)
                continue
            entry = sub.get("additionalProperties")
            notes = []
            if "default" in sub:
                value = _scalar(sub["default"])
            elif isinstance(entry, dict) and "properties" in entry:
                value = "{KEY: {" + ", ".join(f"{k}: ..." for k in entry["properties"]) + "}}"
            else:
                value = "null"
            if "default" not in sub:
                notes.append("required" if name in node.get("required", []) else "optional")
            if _choices(sub):
                notes.append(_choices(sub))
            if "properties" in sub:                                            # optional block
                notes.append("or a mapping of " + ", ".join(sub["properties"]))
            if desc:
                notes.append(desc)
            lines.append(f"{pad}{name}: {value}" + (f"  # {'; '.join(notes)}" if notes else ""))

    walk(schema, 0)
    return [f"{prefix}{ln}" for ln in lines]


def _columns_block():
    """The starter configuration's column mapping, one line per quantity cinderclock reads."""
    from .columns import INPUT_QUANTITIES

    lines = []
    for name, q in INPUT_QUANTITIES.items():
        unit = f", {q.unit}" if q.unit else ""
        need = "required" if q.required else "optional"
        lines.append(f"    {name + ':':<18} null    # {need}: {q.description}{unit}")
    return "\n".join(lines)


def starter_config():
    """Text of the starter configuration (commented, with FILL IN marks and the defaults listing)."""
    from . import __version__

    head = (f"# ---- Every key and its default (schema of cinderclock {__version__}; `cinderclock defaults` prints\n"
            "# ---- the installed version's). Copy a key above, uncommented, to change it.")
    text = (TEMPLATES / "config.yaml").read_text()
    text = text.replace("@VERSION@", __version__).replace("@COLUMNS@", _columns_block())
    return text.replace("@DEFAULTS@", "\n".join([head, *defaults_listing(prefix="# ")]) + "\n")


def _sample_config():
    from .resources import locate

    text = locate("sample-config").read_text()
    note = ("# Copied by `cinderclock init --with-sample` from the installed package: the invented sample's\n"
            "# configuration (the Snakefile of this folder runs it). For your catalogue fill in\n"
            "# config/config.yaml and point the Snakefile's configfile at it.\n")
    return note + text


def init_project(folder, with_sample=False):
    """Write a starter project folder; never overwrite a file.

    Parameters
    ----------
    folder : str or Path
        The project folder (created if missing; it may already hold, e.g., the catalogue).
    with_sample : bool
        Also copy the invented sample catalogue and its configuration, and make the Snakefile run
        it, so the folder runs as it is.

    Returns
    -------
    list of Path
        The files written.

    Raises
    ------
    InputError
        A file to be written exists already, or the folder is a file.
    """
    from . import __version__
    from .resources import locate

    folder = Path(folder)
    if folder.exists() and not folder.is_dir():
        raise InputError("not a folder", folder)
    configfile = "config/sample.yaml" if with_sample else "config/config.yaml"
    snakefile = (TEMPLATES / "Snakefile").read_text().replace("@VERSION@", __version__)
    files = {"Snakefile": snakefile.replace("@CONFIGFILE@", configfile),
             "config/config.yaml": starter_config(),
             ".gitignore": (TEMPLATES / "gitignore").read_text()}
    copies = {}
    if with_sample:
        files["config/sample.yaml"] = _sample_config()
        copies = {"sample_catalog/lanternfall_dr1.csv": locate("sample-catalogue"),
                  "sample_catalog/README.md": locate("sample-readme")}
    existing = [str(folder / rel) for rel in [*files, *copies] if (folder / rel).exists()]
    if existing:
        raise InputError(f"exists already; cinderclock init never overwrites a file (move it away or choose "
                         f"another folder): {', '.join(existing)}")
    written = []
    for rel, text in files.items():
        (folder / rel).parent.mkdir(parents=True, exist_ok=True)
        (folder / rel).write_text(text)
        written.append(folder / rel)
    for rel, src in copies.items():
        (folder / rel).parent.mkdir(parents=True, exist_ok=True)
        shutil.copyfile(src, folder / rel)
        written.append(folder / rel)
    return written
