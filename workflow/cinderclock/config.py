"""Configuration: safe YAML loading, JSON-Schema validation with defaults, per-stage settings.

The schema (``workflow/schemas/config.schema.yaml``, found through :mod:`cinderclock.resources` in a
checkout or in the installed package) is the single reference for every key, its type, allowed
values and default: a configuration holds only what differs from it, and nothing is taken from the
invented sample's configuration. :func:`stage_settings` cuts the configuration into the part each
stage depends on: the workflow passes exactly that part as the rule's ``params``, so changing one
stage's settings reruns only that stage and the stages after it.
"""

from __future__ import annotations

import copy
from pathlib import Path

from .errors import ConfigError

#: stage -> top-level configuration sections it depends on
STAGE_SECTIONS = {
    "ingest": ("catalogue", "bands", "shards"),
    "select": ("select", "astrometry", "bands"),
    "photometry_model": ("luminosity", "bands"),
    "luminosity": ("luminosity", "astrometry", "bands"),
    "envelope_model": ("envelope", "mass.core"),
    "mass_radius_model": ("mass",),        # and the envelope table (an input file)
    "mass": ("mass",),
    "cooling_model": ("cooling",),
    "cooling": ("cooling", "progenitor"),
    "uncertainty": ("uncertainty", "progenitor"),
    "population": ("population", "select", "luminosity", "progenitor", "bands"),
}


def __getattr__(name):
    # SCHEMA_PATH, found when asked for (a missing schema must not break `import cinderclock.config`)
    if name == "SCHEMA_PATH":
        from .resources import locate

        return locate("schema")
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")


def load_schema():
    """The configuration schema (JSON Schema as YAML) of this installation."""
    import yaml

    from .resources import locate

    with open(locate("schema")) as fh:
        return yaml.safe_load(fh)


def _format_error(err):
    import difflib

    path = ".".join(str(p) for p in err.absolute_path) or "(top level)"
    if err.validator == "additionalProperties":
        allowed = sorted(err.schema.get("properties", {}))
        extra = sorted(set(err.instance) - set(allowed))
        key = f"{path}.{extra[0]}" if path != "(top level)" else extra[0]
        close = difflib.get_close_matches(extra[0], allowed, n=1, cutoff=0.6)
        hint = f" (did you mean '{close[0]}'?)" if close else ""
        return f"config key '{key}' is not allowed{hint}; allowed keys here: {', '.join(allowed)}"
    if err.validator == "type" and err.instance is None:
        return f"config key '{path}' is not set (null); fill it in (expected {err.message.split(' is not of ')[-1]})"
    if err.validator in ("oneOf", "anyOf") and err.instance is None:
        return f"config key '{path}' is not set (null); fill it in"
    if err.validator == "enum":
        return f"config key '{path}': {err.instance!r} is not one of {', '.join(map(repr, err.validator_value))}"
    return f"config key '{path}': {err.message}"


def validate(config, schema=None):
    """Validate ``config`` in place against the schema, filling in defaults.

    Raises
    ------
    ConfigError
        One line naming the offending key and, where it applies, the allowed keys or values.
    """
    import jsonschema

    schema = schema or load_schema()
    base = jsonschema.Draft202012Validator

    def set_defaults(validator, properties, instance, schema):
        if isinstance(instance, dict):
            for name, sub in properties.items():
                if "default" in sub and name not in instance:
                    instance[name] = copy.deepcopy(sub["default"])
        yield from base.VALIDATORS["properties"](validator, properties, instance, schema)

    filling = jsonschema.validators.extend(base, {"properties": set_defaults})
    # An unexpected (misspelt) key comes first: it is usually why a required key looks missing.
    errors = sorted(filling(schema).iter_errors(config),
                    key=lambda e: (e.validator != "additionalProperties", len(list(e.absolute_path)), str(e.message)))
    if errors:
        raise ConfigError(_format_error(errors[0]))
    if isinstance(config.get("bands"), dict):
        from .photometry.systems import expand_bands

        expand_bands(config["bands"])
    columns = (config.get("catalogue") or {}).get("columns") or {}
    for quantity in [q for q, name in columns.items() if name is None]:
        del columns[quantity]        # `teff_spec: null`: the catalogue has no such column
    return config


def load_config(path):
    """Read a YAML configuration with ``yaml.safe_load`` and validate it."""
    import yaml

    try:
        with open(path) as fh:
            config = yaml.safe_load(fh) or {}
    except FileNotFoundError:
        raise ConfigError(f"{path}: configuration file not found") from None
    except yaml.YAMLError as exc:
        raise ConfigError(f"{path}: not valid YAML ({str(exc).splitlines()[0]})") from None
    return validate(config)


def stage_settings(config, stage):
    """The part of the configuration that ``stage`` depends on (a deep copy)."""
    out = {}
    for key in STAGE_SECTIONS[stage]:
        section, _, sub = key.partition(".")
        if sub:         # one key of a section (a stage that needs, say, only mass.core)
            out.setdefault(section, {})[sub] = copy.deepcopy((config.get(section) or {}).get(sub))
        else:
            out[section] = copy.deepcopy(config.get(section))
    return out


def check_results_dir(config):
    """The results folder must be a relative path that stays below the working directory."""
    from pathlib import PurePath

    p = PurePath(config.get("results_dir", "results"))
    if p.is_absolute() or ".." in p.parts or str(p) in ("", "."):
        raise ConfigError(f"config key 'results_dir': {str(p)!r} must be a relative folder below the working "
                          "directory (no '..', not absolute)")


def _speclite_passbands():
    """Names of the passband curves speclite ships, found without importing speclite (cheap).

    Mirrors :func:`cinderclock.photometry.passbands.available_passbands`; returns None when the
    curves cannot be located (the photometry stage then reports an unknown band itself).
    """
    from importlib.util import find_spec

    spec = find_spec("speclite")
    folders = list(spec.submodule_search_locations or []) if spec else []
    for folder in folders:
        curves = Path(folder) / "data" / "filters"
        if curves.is_dir():
            return sorted(p.name[:-5] for p in curves.iterdir() if p.name.endswith(".ecsv"))
    return None


def _vega_passbands():
    """Passbands with published Vega zero points (first field of ``data/vega_zero_points.csv``)."""
    text = (Path(__file__).resolve().parent / "data" / "vega_zero_points.csv").read_text()
    return sorted(line.split(",")[0] for line in text.splitlines() if line.strip() and not line.startswith("#"))


def check_references(config):
    """Checks the schema cannot express: passband names, and band and column names used across sections.

    Raises
    ------
    ConfigError
        One line naming the key, the offending value and the allowed values.
    """
    bands = config.get("bands", {})
    known = _speclite_passbands()
    vega = _vega_passbands()
    for key, band in bands.items():
        name = band["passband"]
        if known is not None and name not in known:
            from .photometry.systems import closest

            raise ConfigError(f"config key 'bands.{key}.passband': unknown passband {name!r}; closest known "
                              f"passbands: {', '.join(closest(name, known))}")
        if band.get("error_kind") == "flux" and not band.get("flux"):
            raise ConfigError(f"config key 'bands.{key}.flux': error_kind flux needs the catalogue column of the flux")
        if band["system"] == "vega" and name not in vega:
            raise ConfigError(f"config key 'bands.{key}.system': no published Vega zero point for {name!r}; use "
                              f"'ab' or one of: {', '.join(vega)}")
    allowed = ", ".join(bands)
    cmd = ((config.get("population") or {}).get("figures") or {}).get("cmd") or {}
    uses = [("population.figures.cmd.colour", b) for b in cmd.get("colour", [])]
    uses.append(("population.survey.band", ((config.get("population") or {}).get("survey") or {}).get("band")))
    if cmd:
        uses.append(("population.figures.cmd.magnitude", cmd.get("magnitude")))
    sel = config.get("select", {}) or {}
    uses += [("select.max_mag_error", b) for b in (sel.get("max_mag_error") or {})]
    region = sel.get("wd_region") or {}
    uses += [("select.wd_region.colour", b) for b in region.get("colour", [])]
    if region:
        uses.append(("select.wd_region.magnitude", region.get("magnitude")))
    for key, band in uses:
        if band is not None and band not in bands:
            raise ConfigError(f"config key '{key}': band {band!r} is not configured; configured bands: {allowed}")
    from .columns import INPUT_QUANTITIES, mag_column, mag_err_column

    cat = config.get("catalogue", {})
    columns = set(cat.get("keep_columns", [])) | {INPUT_QUANTITIES[q].column for q in cat.get("columns", {})}
    columns |= {f(b) for b in bands for f in (mag_column, mag_err_column)}
    for cut in sel.get("quality_cuts") or []:
        if cut["column"] not in columns:
            raise ConfigError(f"config key 'select.quality_cuts': column {cut['column']!r} is not available; list "
                              f"it in catalogue.keep_columns (available: {', '.join(sorted(columns))})")


def check_workflow_settings(config):
    """Settings the workflow needs that a library call may leave out.

    The survey's magnitude limit has no default (it belongs to the survey, not to cinderclock): the
    luminosity function and the population age need it.
    """
    survey = ((config.get("population") or {}).get("survey") or {})
    if survey.get("faint_mag_limit") is None:
        raise ConfigError(f"config key 'population.survey.faint_mag_limit' is not set: give your survey's "
                          f"apparent-magnitude limit in its selection band (population.survey.band: "
                          f"{survey.get('band')!r}); the 1/Vmax luminosity function and the population age need it")


def check_config(config):
    """Validate a configuration for the workflow; on a fault print one line and stop.

    Used by the Snakefile, where a traceback would bury the message.
    """
    import sys

    from .resources import ResourceError

    try:
        validate(config)
        check_results_dir(config)
        check_references(config)
        check_workflow_settings(config)
    except ConfigError as exc:
        sys.stderr.write(f"cinderclock: configuration error: {exc}\n")
        raise SystemExit(1) from None
    except ResourceError as exc:
        sys.stderr.write(f"cinderclock: error: {exc}\n")
        raise SystemExit(1) from None
    except FileNotFoundError as exc:           # a data file of the package itself
        sys.stderr.write(f"cinderclock: error: cannot find {exc.filename}, a file of the installed package; "
                         "reinstall cinderclock\n")
        raise SystemExit(1) from None
    return config
