"""Model tables built once per configuration and interpolated by the per-shard stages.

Each builder takes its section of the configuration and returns ``(table, specs, models)``: a
DataFrame of plain numeric columns, their descriptions, and the model choices with references
(for provenance). Each loader turns the table back into an object with vectorised lookups.
"""

from __future__ import annotations

import numpy as np
import pandas as pd

from ..errors import ConfigError
from ..tableio import Column


# ---------------------------------------------------------------- photometry
def band_list(bands):
    """``bands`` section as a list of ``{key, passband, system}``."""
    return [{"key": k, "passband": b["passband"], "system": b["system"]} for k, b in bands.items()]


def _ebv_grid(ext):
    """E(B-V) nodes the photometry table needs for the configured extinction."""
    from ..photometry.table import default_ebv_grid_mag

    if ext["mode"] == "none":
        return np.array([0.0])
    top = max(float(ext["max_ebv_mag"]), float(ext.get("ebv_mag", 0.0)) if ext["mode"] == "constant" else 0.0)
    return default_ebv_grid_mag(top, float(ext["ebv_step_mag"]))


def build_photometry_table(settings, user_table_path=None):
    """Synthetic magnitudes for unit solid angle on a (Teff, E(B-V)[, log g]) grid.

    Blackbody spectra by default (extinction applied to the spectrum before band integration);
    with ``luminosity.spectra: user_table`` the user's synthetic-photometry table of one
    atmosphere class, with band extinction from reddened blackbodies.

    Returns ``(table, specs, models)``; the table's columns are ``teff_k``, ``ebv_mag``,
    optionally ``logg_cgs``, ``mag_<band>`` (magnitude for (R/d)^2 = 1) and ``mbol_unit``.
    """
    from ..photometry.cautions import BLACKBODY_CAUTION, USER_GRID_EXTINCTION_CAUTION
    from ..photometry.passbands import vega_zero_points
    from ..photometry.table import build_photometry_grid, default_teff_grid_k

    lum = settings["luminosity"]
    ext = lum["extinction"]
    grid_cfg = lum["teff_grid"]
    bands = band_list(settings["bands"])
    law = ext["law"] if ext["mode"] != "none" else None
    teff = default_teff_grid_k(grid_cfg["min_k"], grid_cfg["max_k"], grid_cfg["step_dex"])
    bb = build_photometry_grid(bands, teff, _ebv_grid(ext), law=law, r_v=ext["r_v"])
    models = []
    if lum["spectra"] == "blackbody":
        grid = bb
        models.append({"name": "blackbody", "reference": "Planck law through speclite passbands; AB: Oke & Gunn "
                       "1983, ApJ 266, 713; bolometric scale: IAU 2015 Resolution B2", "caution": BLACKBODY_CAUTION})
    elif lum["spectra"] == "user_table":
        from ..photometry.usergrid import read_user_grid

        user = read_user_grid(user_table_path, [b["key"] for b in bands])
        grid = user.photometry_grid(lum["user_table"]["atmosphere"], extinction_grid=bb if law else None,
                                    step_dex=grid_cfg["step_dex"])
        models.append({"name": "user synthetic-photometry table", "reference": lum["user_table"].get("reference", ""),
                       "file": str(user_table_path), "atmosphere": lum["user_table"]["atmosphere"]}
                      | ({"caution": USER_GRID_EXTINCTION_CAUTION} if law else {}))
    else:
        raise ConfigError(f"luminosity.spectra: unknown model spectra {lum['spectra']!r}")
    if law:
        from ..photometry.extinction import ExtinctionLaw

        models.append(ExtinctionLaw(law, float(ext["r_v"])).as_model())
    vega = sorted({vega_zero_points()[b["passband"]][2] for b in bands if b["system"] == "vega"})
    if vega:
        models.append({"name": "vega_zero_points", "reference": "; ".join(vega)})
    table = grid.to_frame()
    table = pd.DataFrame({c: table[c].to_numpy() for c in table.columns})
    specs = {"teff_k": Column("K", "Effective temperature of the model", "phys.temperature.effective"),
             "ebv_mag": Column("mag", "Colour excess E(B-V) applied to the model spectrum", "phot.color.excess"),
             "logg_cgs": Column("dex(cm / s2)", "Surface gravity of the model", "phys.gravity"),
             "mbol_unit": Column("mag", "Apparent bolometric magnitude (IAU 2015 B2) for (R/d)^2 = 1, unreddened",
                                 "phot.mag.bol")}
    for b in bands:
        specs[f"mag_{b['key']}"] = Column("mag", f"Synthetic {b['system'].upper() if b['system'] == 'ab' else 'Vega'} "
                                                 f"magnitude through {b['passband']} for (R/d)^2 = 1", "phot.mag")
    return table, {c: specs[c] for c in table.columns}, models


def load_photometry(table):
    """Photometry grid for the SED fit (:class:`cinderclock.photometry.grid.PhotometryGrid`)."""
    from ..photometry.grid import PhotometryGrid

    return PhotometryGrid.from_frame(table)


# ---------------------------------------------------------------- envelope
HYDROGEN_LAYERS = {"thick": 1e-4, "thin": 1e-10}


def envelope_choice(env_cfg):
    """Keyword arguments of :func:`cinderclock.envelope.build_envelope_table` from the ``envelope`` section."""
    layer = env_cfg["hydrogen_layer"]
    q_h = HYDROGEN_LAYERS[layer] if isinstance(layer, str) else float(layer)
    if env_cfg["atmosphere"] == "He":
        q_h = 0.0
    m = env_cfg["masses_msun"]
    masses = np.round(np.arange(m["min"], m["max"] + 0.5 * m["step"], m["step"]), 6)
    return {"masses": masses, "atmosphere": env_cfg["atmosphere"], "q_h": q_h,
            "q_he": float(env_cfg["helium_layer_mass_fraction"]), "mlt_alpha": float(env_cfg["mixing_length_alpha"])}


def build_envelope_table(settings):
    """The integrated envelope on a (mass, Teff) grid for the configured layers and core.

    Returns ``(table, specs, models)``; read it back with :func:`load_envelope`.
    """
    from ..envelope import TABLE_COLUMNS
    from ..envelope import build_envelope_table as build

    env = build(core=settings["mass"]["core"], **envelope_choice(settings["envelope"]))
    frame = env.to_frame()
    table = pd.DataFrame({c: frame[c].to_numpy() for c in frame.columns})
    models = [env.as_model()]
    settings_entry = dict(frame.attrs.get("settings", {}))
    table.attrs["settings"] = settings_entry
    return table, {c: TABLE_COLUMNS[c] for c in table.columns}, models


def load_envelope(table_or_path):
    """:class:`cinderclock.envelope.EnvelopeTable` from its table (a frame or a Parquet path)."""
    from ..envelope import EnvelopeTable

    settings = None
    if isinstance(table_or_path, (str, bytes)) or hasattr(table_or_path, "__fspath__"):
        from ..tableio import read_table

        table_or_path, _, meta = read_table(table_or_path)
        # the envelope's settings travel in the provenance's model entry
        for stage in (meta.get("provenance", {}).get("stages") or {}).values():
            for model in stage.get("models", []):
                if str(model.get("name", "")).startswith("integrated_envelope"):
                    settings = dict(model.get("settings", {}))
    env = EnvelopeTable.from_frame(table_or_path)
    if settings is not None and not env.settings:
        env.settings = settings
    return env


def _layer_of(envelope):
    """The hydrogen-layer choice an envelope table was built with (name, or a HydrogenLayer for a number)."""
    from ..massradius.envelope import HydrogenLayer

    q_h = float(envelope.settings.get("q_h", HYDROGEN_LAYERS["thick"]))
    if q_h == 0.0:
        return "none"
    for name, value in HYDROGEN_LAYERS.items():
        if np.isclose(q_h, value, rtol=1e-9, atol=0.0):
            return name
    return HydrogenLayer(f"q_H={q_h:g}", q_h, 0.5, "hydrogen-layer mass fraction set in the configuration")


# ---------------------------------------------------------------- mass-radius
def build_mass_radius_table(settings, envelope_path=None, envelope=None):
    """Mass-radius table on a (mass, Teff) grid, long format.

    ``relation: structure`` integrates Chandrasekhar's equation for the configured core (with the
    Salpeter 1961 Coulomb correction if asked) and adds the finite-temperature envelope for the
    hydrogen-layer choice; ``relation: nauenberg1972`` tabulates the closed-form zero-temperature
    fit (the same radius at every Teff).
    """
    from ..massradius.table import TABLE_COLUMNS

    cfg = settings["mass"]
    if cfg["relation"] == "structure":
        from ..massradius.table import build_mass_radius_table as build

        if envelope is None:
            if envelope_path is None:
                raise ConfigError("mass.relation: structure needs the envelope table (results/models/envelope.parquet)")
            envelope = load_envelope(envelope_path)
        df = build(core=cfg["core"], hydrogen_layer=_layer_of(envelope), envelope="integrated",
                   envelope_table=envelope, coulomb=cfg["coulomb"])
        models = list(df.attrs.get("models", []))
    elif cfg["relation"] == "nauenberg1972":
        from ..massradius.nauenberg import NAUENBERG_1972, NauenbergInverse, logg_cgs

        inv = NauenbergInverse(mu_e=cfg["mu_e"])
        teff = np.geomspace(3000.0, 150000.0, 5)
        m2, t2 = np.meshgrid(inv.mass, teff, indexing="ij")
        r2 = np.broadcast_to(inv.radius[:, None], m2.shape)
        df = pd.DataFrame({"mass_msun": m2.ravel(), "teff_k": t2.ravel(), "radius_rsun": r2.ravel(),
                           "logg_cgs": logg_cgs(m2, r2).ravel()})
        models = [NAUENBERG_1972.as_model() | {"mu_e": cfg["mu_e"], "caution": NAUENBERG_1972.note}]
    else:
        raise ConfigError(f"mass.relation: unknown relation {cfg['relation']!r}")
    df = pd.DataFrame({c: df[c].to_numpy() for c in df.columns})      # plain frame, attrs moved to provenance
    return df, {c: TABLE_COLUMNS[c] for c in df.columns}, models


def load_mass_radius(table):
    """Vectorised mass-radius lookups (:class:`cinderclock.massradius.grid.MassRadiusGrid`)."""
    from ..massradius.grid import MassRadiusGrid

    return MassRadiusGrid.from_frame(table)


# ---------------------------------------------------------------- cooling
def uses_kramers(cool, model):
    """True where ``model`` runs on the Kramers envelope law rather than the integrated envelope."""
    return model == "mestel" or (model == "numerical" and cool["envelope_relation"] == "kramers")


def _cooling_frame(cool, model, user_tracks_path=None, envelope=None):
    """One cooling table (long format) for ``model`` with the shared cooling settings."""
    if model == "user_tracks":
        from ..cooling.usertracks import read_user_tracks

        return read_user_tracks(user_tracks_path, composition=(cool.get("user_tracks") or {}).get("composition"))
    from ..cooling.envelope import calibration_for_coefficient
    from ..cooling.table import build_cooling_table as build

    cal = None
    kramers = uses_kramers(cool, model)
    if kramers and cool["calibration"]["coefficient_yr"] is not None:
        cal = calibration_for_coefficient(cool["calibration"]["coefficient_yr"], envelope=cool["kramers_envelope"])
    if not kramers and envelope is None:
        raise ConfigError("the numerical cooling model needs the envelope table (results/models/envelope.parquet)")
    m = cool["masses_msun"]
    masses = np.round(np.arange(m["min"], m["max"] + 0.5 * m["step"], m["step"]), 6)
    return build(model=model, masses=masses, envelope=cool["kramers_envelope"] if kramers else envelope,
                 core=cool["core"], physics=dict(cool["physics"]), calibration=cal)


def build_cooling_table(settings, which="primary", user_tracks_path=None, envelope_path=None, envelope=None):
    """Cooling table of the configured model (``which="primary"``) or of the comparison model.

    Returns ``(table, specs, models)`` with the long format of
    :func:`cinderclock.cooling.table.build_cooling_table`.
    """
    from ..cooling.table import table_columns

    cool = settings["cooling"]
    model = cool["model"] if which == "primary" else cool["compare_with"]
    if model is None:
        raise ConfigError("cooling.compare_with is not set")
    if envelope is None and envelope_path is not None and not uses_kramers(cool, model):
        envelope = load_envelope(envelope_path)
    df = _cooling_frame(cool, model, user_tracks_path, envelope)
    info = dict(df.attrs.get("cooling_model", {}))
    if cool["calibration"]["coefficient_yr"] is not None and uses_kramers(cool, model):
        info["calibration"] = {"coefficient_yr": cool["calibration"]["coefficient_yr"],
                               "source": cool["calibration"]["source"]}
        info["caution"] = (info.get("caution", "") + "; EXPERT CALIBRATION of the Kramers law: one coefficient "
                           "rescales every luminosity alike and cannot fix both ends of the sequence").lstrip("; ")
    info.setdefault("name", f"cooling_{model}")
    info.setdefault("reference", "")
    cols = table_columns()
    df = pd.DataFrame({c: df[c].to_numpy() for c in df.columns})
    specs = {c: cols.get(c, Column("", c, "")) for c in df.columns}
    return df, specs, [info]


def load_cooling(table):
    """Vectorised cooling look-ups (:class:`cinderclock.cooling.grid.CoolingGrid`)."""
    from ..cooling.grid import CoolingGrid

    return CoolingGrid.from_frame(table)
