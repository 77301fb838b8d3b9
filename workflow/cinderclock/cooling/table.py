"""Cooling tables: age, effective temperature and radius against (mass, log L), built once.

:func:`build_cooling_table` returns a long-format :class:`pandas.DataFrame`, one row per
(mass, log L) node, which the workflow writes once per configuration and the cooling stage reads
back into a :class:`~cinderclock.cooling.grid.CoolingGrid` for vectorised look-ups over whole
shards. The same long format (with fewer columns) is accepted from users with their own
evolutionary sequences (:mod:`cinderclock.cooling.usertracks`).

Columns (units in :func:`table_columns`):

``mass_msun``, ``log_lum`` (log10 L/Lsun, photon luminosity), ``age_yr`` (cooling age),
``teff_k``, ``radius_rsun``, ``logg_cgs``, ``log_tc`` (log10 core temperature, K),
``log_lum_nu`` (log10 neutrino luminosity, Lsun; NaN where not modelled),
``crystallized_fraction`` (NaN where not modelled), ``far_future`` (True for rows fainter than
:data:`FAINT_LIMIT_LOG_LUM`: the model's formal continuation, not a calibrated prediction).

The frame's ``attrs["cooling_model"]`` holds the provenance (model, references, settings).
"""

from __future__ import annotations

import numpy as np

from ..constants import L_SUN_W, R_SUN_M, SIGMA_SB_SI
from . import mestel
from .composition import core_composition
from .envelope import envelope_model
from .grid import CoolingGrid  # noqa: F401  (re-exported: the table's reader)

#: Default white-dwarf masses of a table (Msun): 0.45 to 1.20 in steps of 0.05.
DEFAULT_MASSES_MSUN = np.round(np.arange(0.45, 1.2001, 0.05), 4)
#: Brightest tabulated luminosity, log10 L/Lsun.
BRIGHT_LIMIT_LOG_LUM = 2.0
#: Faintest luminosity (log10 L/Lsun) treated as inside the model's range; fainter rows are the
#: "far future". The faintest known disk white dwarfs sit near log L = -4.5 to -5 (common practice);
#: -5.5 matches the range of validity stored with Mestel's law.
FAINT_LIMIT_LOG_LUM = -5.5
#: Faintest tabulated luminosity (far future; 1e-18 Lsun is a white dwarf of a few kelvin).
FAR_FUTURE_LOG_LUM = -18.0

def _numerical_references():
    from .tracks import INGREDIENT_REFERENCES

    base = ["Itoh, N., Hayashi, H., Nishikawa, A. & Kohyama, Y. 1996, ApJS 102, 411 (neutrino emission)",
            "Chandrasekhar, S. 1939, An Introduction to the Study of Stellar Structure (core structure)"]
    return base + [r["reference"] for r in INGREDIENT_REFERENCES]


MODEL_REFERENCES = {
    "numerical": None,        # filled from the ingredients of cinderclock.cooling.tracks (see model_references)
    "mestel": [
        "Mestel, L. 1952, MNRAS 112, 583; Shapiro & Teukolsky 1983, section 4.1",
        "Chandrasekhar, S. 1939, An Introduction to the Study of Stellar Structure (T = 0 radii)",
    ],
}


def model_references(kind):
    """Reference list of a cooling model kind (``"numerical"`` or ``"mestel"``)."""
    return _numerical_references() if kind == "numerical" else list(MODEL_REFERENCES[kind])


def _numerical_caution(kramers):
    from .tracks import CAUTIONS

    head = ("Kramers envelope law (expert choice): no conduction or convective coupling, absolute ages off by "
            "tens of per cent" if kramers else
            "integrated grey-atmosphere envelope: unreliable below Teff ~ 5,500 K where non-grey atmospheres "
            "matter (Rohrmann et al. 2012, A&A 546, A119)")
    return "; ".join([head, *CAUTIONS])


MODEL_CAUTIONS = {
    "mestel": "ion heat only, no neutrinos, no crystallization, no electron heat capacity; indicative ages",
}


#: Below these Teff (K) a grey Eddington boundary condition misrepresents the atmosphere and detailed
#: non-grey boundary conditions become relevant: 5,800 K for 0.60 Msun and 6,100 K for 0.90 Msun
#: sequences (Rohrmann et al. 2012, A&A 546, A119, abstract). Rows of a table built on the integrated
#: (grey) envelope carry ``grey_boundary`` = 1 below the line through the two points (held at
#: 5,800 K below 0.6 Msun, continued linearly above 0.9 Msun: our choice, both on the cautious side);
#: the cooling stage flags them.
GREY_BOUNDARY_POINTS = ((0.60, 5800.0), (0.90, 6100.0))


def grey_boundary_teff_k(mass_msun):
    """Teff (K) below which the grey boundary condition fails, at a mass (Msun); see above."""
    (m0, t0), (m1, t1) = GREY_BOUNDARY_POINTS
    m = np.asarray(mass_msun, dtype=float)
    return np.where(m <= m0, t0, t0 + (t1 - t0) * (m - m0) / (m1 - m0))


def default_log_lum_grid(bright=BRIGHT_LIMIT_LOG_LUM, far_future=FAR_FUTURE_LOG_LUM):
    """Descending log L nodes: steps of 0.01 dex down to -6, then 0.05 dex to ``far_future``."""
    fine = np.round(np.arange(bright, -6.0, -0.01), 6)
    coarse = np.round(np.arange(-6.0, far_future - 1e-9, -0.05), 6)
    return np.concatenate([fine, coarse])


def _radius_sequence(masses, mu_e):
    from ..massradius.chandrasekhar import zero_temperature_sequence

    seq = zero_temperature_sequence(mu_e=mu_e)
    return np.interp(masses, seq["mass_msun"], seq["radius_rsun"], left=np.nan, right=np.nan)


def _teff_k(log_lum, radius_rsun):
    lum = L_SUN_W * 10.0 ** np.asarray(log_lum, dtype=float)
    r = np.asarray(radius_rsun, dtype=float) * R_SUN_M
    return (lum / (4.0 * np.pi * r**2 * SIGMA_SB_SI)) ** 0.25


def _logg(mass_msun, radius_rsun):
    from ..massradius.nauenberg import logg_cgs
    return logg_cgs(mass_msun, radius_rsun)


def _radius_for(env, masses, log_lum, mu_e):
    """Radius (Rsun) on the (mass, log L) grid: the envelope's finite-temperature radius where the
    envelope object provides one, else the zero-temperature radius of each mass."""
    n_m, n_l = log_lum.shape
    if hasattr(env, "radius_rsun"):
        r = np.asarray(env.radius_rsun(masses[:, None] * np.ones((1, n_l)), log_lum), dtype=float)
        # beyond the computed envelopes (hotter or cooler than its Teff grid) the radius is held at
        # the nearest computed one: the cool end is nearly the zero-temperature radius, and hot
        # rows are flagged by the envelope's validity range
        for i in range(n_m):                       # one pass per track, not per star
            ok = np.isfinite(r[i])
            if ok.any() and not ok.all():
                x = log_lum[i]
                order = np.argsort(x[ok])
                r[i] = np.interp(x, x[ok][order], r[i][ok][order])
        return r, True
    return np.broadcast_to(_radius_sequence(masses, mu_e)[:, None], (n_m, n_l)), False


def build_cooling_table(model="numerical", masses=None, envelope="He", core="CO", *, physics=None,
                        calibration=None, log_lum_grid=None, profiles=None, faint_limit=FAINT_LIMIT_LOG_LUM,
                        dlog_tc=0.005):
    """Tabulate cooling age, Teff and radius against mass and luminosity.

    Parameters
    ----------
    model : {"numerical", "mestel"}
        The energy-budget model of :mod:`~cinderclock.cooling.tracks`, or Mestel's law with a
        Kramers envelope.
    masses : array_like, optional
        White-dwarf masses in Msun (default :data:`DEFAULT_MASSES_MSUN`).
    envelope : str or object
        ``"He"`` or ``"H"`` (Kramers presets of :mod:`~cinderclock.cooling.envelope`), or an envelope
        object with ``log_lum(mass, log_tc)``, ``log_tc(mass, log_lum)`` and optionally
        ``radius_rsun(mass, log_lum)``, ``faint_limit_log_lum(mass)`` and ``as_model()`` (the
        integrated envelope of :mod:`cinderclock.envelope`). Mestel's law needs a Kramers preset.
    core : str or CoreComposition
        Core composition.
    physics : dict or PhysicsSwitches, optional
        Physics switches of the numerical model (:class:`~cinderclock.cooling.tracks.PhysicsSwitches`
        fields; ignored by ``"mestel"``). Default: everything on.
    calibration : float, optional
        Kramers-envelope calibration factor (expert option; see
        :func:`~cinderclock.cooling.envelope.calibration_for_coefficient`).
    log_lum_grid : array_like, optional
        Descending log10 L/Lsun nodes (default :func:`default_log_lum_grid`).
    profiles : list of dict, optional
        Structure profiles, one per mass (numerical model only).
    faint_limit : float
        Rows fainter than this (or than the envelope's own faint limit, where it has one) are marked
        ``far_future``.
    dlog_tc : float
        Integration step in log10 T_c (numerical model).

    Returns
    -------
    pandas.DataFrame
        Long format, sorted by mass then descending log L; provenance in ``attrs["cooling_model"]``.
    """
    import pandas as pd

    masses = np.asarray(DEFAULT_MASSES_MSUN if masses is None else masses, dtype=float)
    grid = np.asarray(default_log_lum_grid() if log_lum_grid is None else log_lum_grid, dtype=float)
    if isinstance(envelope, str):
        env = envelope_model(envelope, calibration)
    else:
        env = envelope
        if calibration is not None:
            raise ValueError("a calibration factor applies to the Kramers envelope presets only")
    comp = core_composition(core)
    n_m, n_l = masses.size, grid.size
    log_lum = np.broadcast_to(grid, (n_m, n_l))

    if model == "numerical":
        from .tracks import PhysicsSwitches, cooling_tracks

        if isinstance(physics, PhysicsSwitches):
            sw = physics
        else:
            sw = PhysicsSwitches(**(physics or {}))
        tr = cooling_tracks(masses, env, comp, sw, profiles=profiles, log_lum_end=float(grid.min()),
                            dlog_tc=dlog_tc)
        age = np.empty((n_m, n_l))
        log_tc = np.empty((n_m, n_l))
        lnu = np.empty((n_m, n_l))
        qc = np.empty((n_m, n_l))
        for i in range(n_m):                     # resample each track (ascending x for np.interp)
            x = -tr.log_lum[i]
            age[i] = 10.0 ** np.interp(-grid, x, np.log10(tr.age_yr[i]), left=np.nan, right=np.nan)
            log_tc[i] = np.interp(-grid, x, tr.log_tc, left=np.nan, right=np.nan)
            lnu[i] = np.interp(-grid, x, np.where(np.isfinite(tr.log_lum_nu[i]), tr.log_lum_nu[i], -99.0),
                               left=np.nan, right=np.nan)
            qc[i] = np.interp(-grid, x, tr.crystallized_fraction[i], left=np.nan, right=np.nan)
        lnu = np.where(lnu < -90.0, -np.inf, lnu)
        settings = tr.settings
    elif model == "mestel":
        if not hasattr(env, "constant_cgs"):
            raise ValueError("Mestel's law needs a Kramers envelope preset ('He' or 'H')")
        k = mestel.age_coefficient_yr(comp.abar, envelope_cgs=env.constant_cgs())
        mm = masses[:, None]
        age = mestel.cooling_age_yr(mm, log_lum, k)
        log_tc = env.log_tc(mm, log_lum)
        lnu = np.full((n_m, n_l), np.nan)
        qc = np.full((n_m, n_l), np.nan)
        settings = {"envelope": env.as_model(), "core": comp.key, "age_coefficient_yr": float(k)}
    else:
        raise ValueError(f"unknown cooling model {model!r}; choose 'numerical' or 'mestel'")
    radius, finite_t = _radius_for(env, masses, log_lum, comp.mu_e)
    faint = np.full(n_m, float(faint_limit))
    if hasattr(env, "faint_limit_log_lum"):
        faint = np.maximum(faint, np.asarray(env.faint_limit_log_lum(masses), dtype=float))

    mass2 = np.broadcast_to(masses[:, None], (n_m, n_l))
    df = pd.DataFrame({
        "mass_msun": mass2.ravel(),
        "log_lum": log_lum.ravel(),
        "age_yr": age.ravel(),
        "teff_k": _teff_k(log_lum, radius).ravel(),
        "radius_rsun": np.asarray(radius).ravel(),
        "logg_cgs": _logg(mass2, radius).ravel(),
        "log_tc": log_tc.ravel(),
        "log_lum_nu": lnu.ravel(),
        "crystallized_fraction": qc.ravel(),
        "far_future": (log_lum < faint[:, None]).ravel(),
    })
    if finite_t:
        df["grey_boundary"] = (df["teff_k"].to_numpy()
                               < grey_boundary_teff_k(df["mass_msun"].to_numpy())).astype(float)
    df = df[np.isfinite(df["age_yr"].to_numpy())].reset_index(drop=True)
    kind = "numerical" if model == "numerical" else "mestel"
    df.attrs["cooling_model"] = {
        "name": f"cooling_{model}",
        "reference": "; ".join(model_references(kind) + (list(getattr(env, "references", ())) if kind == "numerical"
                                                         else [])),
        "caution": MODEL_CAUTIONS["mestel"] if kind == "mestel" else _numerical_caution(not finite_t),
        "faint_limit_log_lum": float(np.min(faint)),
        "radius": "finite-temperature radius of the envelope" if finite_t else "zero-temperature radius",
        "settings": settings,
    }
    return df


def _columns():
    from ..tableio import Column

    return {
        "mass_msun": Column("solMass", "White-dwarf mass of the cooling track", "phys.mass"),
        "log_lum": Column("dex(solLum)", "log10 photon luminosity in solar units", "phys.luminosity"),
        "age_yr": Column("yr", "Cooling age since the start of the white-dwarf track", "time.age"),
        "teff_k": Column("K", "Effective temperature from L = 4 pi R^2 sigma Teff^4", "phys.temperature.effective"),
        "radius_rsun": Column("solRad", "Radius of the track (finite-temperature radius of the integrated envelope; "
                                         "zero-temperature radius for the Kramers law)", "phys.size.radius"),
        "logg_cgs": Column("dex(cm/s2)", "log10 surface gravity", "phys.gravity"),
        "log_tc": Column("dex(K)", "log10 core temperature of the isothermal core", "phys.temperature"),
        "log_lum_nu": Column("dex(solLum)", "log10 neutrino luminosity (NaN where not modelled)", "phys.luminosity"),
        "crystallized_fraction": Column("", "Crystallized mass fraction of the star (NaN where not modelled)", ""),
        "far_future": Column("", "True fainter than the model's calibrated range (formal continuation)", "meta.code"),
        "grey_boundary": Column("", "1 where Teff is below 5,800 K (0.6 Msun) to 6,100 K (0.9 Msun): the grey "
                                    "boundary condition of the integrated envelope fails there (Rohrmann et "
                                    "al. 2012)", "meta.code"),
    }


def table_columns():
    """Column descriptions (:class:`cinderclock.tableio.Column`) of a cooling table."""
    return _columns()
