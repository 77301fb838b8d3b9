"""Maximum volumes of the 1/Vmax method and the <V/Vmax> completeness statistic.

Method (Schmidt 1968, ApJ 151, 393; proper-motion limits as in Schmidt 1975, ApJ 202, 22): each
star could have been placed anywhere between a nearest distance ``d_min`` and a farthest
distance ``d_max`` and still have entered the sample. For a star at distance d with apparent
magnitude m (selection band), parallax S/N s and total proper motion mu:

* faint apparent-magnitude limit m_lim:  d_max <= d 10^(0.2 (m_lim - m));
* bright (saturation) limit m_bright:   d_min  = d 10^(0.2 (m_bright - m));
* parallax S/N limit k, with the parallax error either

  - ``constant`` (the star's own error at any distance): d_max <= 1000 / (k sigma_plx) pc, or
  - ``photon_noise`` (error grows like the flux^-1/2, i.e. like the distance): the S/N falls as
    d^-2 and d_max <= d sqrt(s / k);

* proper-motion limit mu_lim (fixed tangential velocity): d_max <= d mu / mu_lim;
* a distance cut of the selection: d_max <= d_cut.

The maximum volume is the (density-weighted) volume between d_min and d_max, and V the same
volume out to the star's own distance; the space density of a class is sum(1/Vmax). For a
complete sample spread uniformly through its accessible volume each V/Vmax is uniform on [0, 1],
so <V/Vmax> = 1/2 with a standard error 1/sqrt(12 N) (the variance of U(0, 1) is 1/12).

Density weighting (optional): a disk whose density falls exponentially with height,
rho/rho_0 = exp(-|z|/H), z = r sin b, seen from the mid-plane (the Sun's height of some 20 pc is
neglected). The "effective volume" replaces the geometric volume (Felten 1976, ApJ 207, 700, on
generalising Schmidt's estimator: reference and abstract checked, ADS 1976ApJ...207..700F; the
exponential-disk form as used by Stobie, Ishida & Peacock 1989, MNRAS 238, 709: reference
unverified; common practice in white-dwarf luminosity functions). Two geometries:

``line_of_sight``
    the cone through the star's own direction:
    V = Omega int r^2 exp(-r |sin b| / H) dr = Omega (2/a^3) P(3, a r) |_(d_min)^(d), a = |sin b|/H,
    with P the regularised lower incomplete gamma function. Suited to surveys of small fields.
``all_sky``
    the whole sky (or a fraction f of it spread evenly in sin b):
    V = 4 pi f int r^2 (H/r) (1 - e^(-r/H)) dr = 4 pi f H [r^2/2 - H^2 P(2, r/H)].

Both tend to Omega r^3 / 3 when H -> infinity.

Cautions: the parallax-error models are idealisations (real astrometric errors depend on
magnitude, colour and scanning law); an apparent-magnitude limit in one band ignores extinction;
stars whose measured quantities fall outside the limits (V/Vmax > 1, e.g. by measurement noise)
are counted and left out of the luminosity function.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..errors import ConfigError, InputError

#: Codes of the limit that sets d_max (column ``vmax_limit``).
LIMIT_CODES = {0: "magnitude", 1: "parallax_snr", 2: "proper_motion", 3: "distance"}
#: Codes of the reasons a star is left out of the luminosity function (column ``lf_status``).
STATUS_CODES = {0: "used", 1: "no_selection_magnitude", 2: "beyond_limits", 3: "no_mbol", 4: "no_position"}

PARALLAX_ERROR_MODELS = ("constant", "photon_noise")
GEOMETRIES = ("line_of_sight", "all_sky")


@dataclass(frozen=True)
class SurveyLimits:
    """The limits that define which stars a survey would have kept.

    Parameters
    ----------
    faint_mag : float
        Faint apparent-magnitude limit in the selection band (mag).
    bright_mag : float or None
        Bright (saturation) limit in the same band (mag); None for none.
    min_parallax_over_error : float or None
        Parallax signal-to-noise limit; None for none.
    parallax_error_model : str
        ``constant`` or ``photon_noise`` (see the module docstring).
    min_proper_motion_mas_yr : float or None
        Total proper-motion limit (mas/yr); None for none.
    max_distance_pc : float or None
        Distance cut of the selection (pc); None for none.
    sky_fraction : float
        Fraction of the sky covered (solid angle / 4 pi).
    scale_height_pc : float or None
        Exponential-disk scale height H (pc); None for a uniform density.
    geometry : str
        ``line_of_sight`` or ``all_sky`` (used only with a scale height).
    """

    faint_mag: float
    bright_mag: float | None = None
    min_parallax_over_error: float | None = None
    parallax_error_model: str = "constant"
    min_proper_motion_mas_yr: float | None = None
    max_distance_pc: float | None = None
    sky_fraction: float = 1.0
    scale_height_pc: float | None = None
    geometry: str = "line_of_sight"

    def __post_init__(self):
        if self.parallax_error_model not in PARALLAX_ERROR_MODELS:
            raise ConfigError(f"population.survey.parallax_error_model: {self.parallax_error_model!r} is not one of "
                              f"{', '.join(PARALLAX_ERROR_MODELS)}")
        if self.geometry not in GEOMETRIES:
            raise ConfigError(f"population.disk.geometry: {self.geometry!r} is not one of {', '.join(GEOMETRIES)}")
        if not 0 < self.sky_fraction <= 1:
            raise ConfigError(f"population.survey.sky_fraction: {self.sky_fraction} must lie in (0, 1]")

    @property
    def solid_angle_sr(self):
        """Solid angle of the survey in steradians."""
        return 4.0 * np.pi * self.sky_fraction


#: Provenance entries of the luminosity-function method: the 1/Vmax estimator, and the
#: proper-motion limit when the survey has one.
VMAX_METHOD = {"name": "1/Vmax", "reference": "Schmidt, M. 1968, ApJ 151, 393",
               "source_location": "the V/Vm estimator of the paper's section on the luminosity function",
               "verified": True, "verification": "method as cited by the trade (reference-values.md section 9)"}
VMAX_PROPER_MOTION = {"name": "1/Vmax proper-motion limit", "reference": "Schmidt, M. 1975, ApJ 202, 22",
                      "verified": True, "verification": "reference as cited (reference-values.md section 9, C2)"}


def vmax_models(limits_settings):
    """Provenance entries of the 1/Vmax method for the survey limits in use."""
    out = [dict(VMAX_METHOD)]
    if (limits_settings or {}).get("min_proper_motion_mas_yr"):
        out.append(dict(VMAX_PROPER_MOTION))
    return out


def limits_from_settings(settings):
    """:class:`SurveyLimits` from the ``population`` and ``select`` configuration sections.

    The parallax S/N limit defaults to the selection's; the distance limit is the smaller of
    ``population.survey.max_distance_pc`` and ``select.max_distance_pc``.
    """
    pop = settings["population"]
    sel = settings.get("select") or {}
    sv = pop["survey"]
    snr = sv.get("min_parallax_over_error")
    if snr is None:
        snr = sel.get("min_parallax_over_error")
    disk = pop.get("disk") or {}
    cuts = [c for c in (sv.get("max_distance_pc"), sel.get("max_distance_pc")) if c is not None]
    return SurveyLimits(
        faint_mag=float(sv["faint_mag_limit"]),
        bright_mag=sv.get("bright_mag_limit"),
        min_parallax_over_error=snr,
        parallax_error_model=sv.get("parallax_error_model", "constant"),
        min_proper_motion_mas_yr=sv.get("min_proper_motion_mas_yr"),
        max_distance_pc=min(cuts) if cuts else None,
        sky_fraction=float(sv.get("sky_fraction", 1.0)),
        scale_height_pc=disk.get("scale_height_pc"),
        geometry=disk.get("geometry", "line_of_sight"),
    )


def distance_limits(dist_pc, mag, limits, plx_over_err=None, plx_err_mas=None, pm_mas_yr=None):
    """Nearest and farthest distances at which each star would still pass the survey limits.

    Parameters
    ----------
    dist_pc : array_like
        Distance of each star (pc).
    mag : array_like
        Apparent magnitude in the selection band (mag).
    limits : SurveyLimits
    plx_over_err : array_like, optional
        Parallax S/N of each star (needed with ``photon_noise``).
    plx_err_mas : array_like, optional
        Parallax error (mas) (needed with ``constant``).
    pm_mas_yr : array_like, optional
        Total proper motion (mas/yr) (needed with a proper-motion limit).

    Returns
    -------
    d_min, d_max : ndarray
        Distances in pc (d_min = 0 without a bright limit).
    limit_code : ndarray of int8
        Which limit sets d_max (:data:`LIMIT_CODES`).
    """
    d = np.atleast_1d(np.asarray(dist_pc, dtype=float))
    m = np.broadcast_to(np.asarray(mag, dtype=float), d.shape)
    candidates = [d * 10.0 ** (0.2 * (limits.faint_mag - m))]
    codes = [0]
    if limits.min_parallax_over_error is not None:
        k = float(limits.min_parallax_over_error)
        if limits.parallax_error_model == "constant":
            if plx_err_mas is None:
                raise InputError("the parallax S/N limit needs the parallax error column plx_err_mas")
            with np.errstate(divide="ignore"):
                candidates.append(1000.0 / (k * np.asarray(plx_err_mas, dtype=float)))
        else:
            if plx_over_err is None:
                raise InputError("the photon-noise parallax model needs the parallax S/N of each star")
            with np.errstate(invalid="ignore"):
                candidates.append(d * np.sqrt(np.asarray(plx_over_err, dtype=float) / k))
        codes.append(1)
    if limits.min_proper_motion_mas_yr is not None:
        if pm_mas_yr is None:
            raise InputError("the proper-motion limit needs the proper motions pmra_mas_yr and pmdec_mas_yr")
        candidates.append(d * np.asarray(pm_mas_yr, dtype=float) / float(limits.min_proper_motion_mas_yr))
        codes.append(2)
    if limits.max_distance_pc is not None:
        candidates.append(np.full(d.shape, float(limits.max_distance_pc)))
        codes.append(3)
    stack = np.vstack([np.where(np.isnan(c), -np.inf, c) for c in candidates])
    which = np.argmin(stack, axis=0)
    d_max = np.min(stack, axis=0)
    d_max = np.where(np.isfinite(d_max), d_max, np.nan)
    limit_code = np.asarray(codes, dtype=np.int8)[which]
    if limits.bright_mag is not None:
        d_min = d * 10.0 ** (0.2 * (float(limits.bright_mag) - m))
    else:
        d_min = np.zeros(d.shape)
    return d_min, d_max, limit_code


def _cone_integral(r, a):
    """int_0^r x^2 exp(-a x) dx, vectorised, stable for small a r."""
    from scipy.special import gammainc

    r = np.asarray(r, dtype=float)
    a = np.asarray(a, dtype=float)
    x = a * r
    small = x < 1e-4
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        big = 2.0 / a**3 * gammainc(3.0, x)
    series = r**3 * (1.0 / 3.0 - x / 4.0 + x**2 / 10.0)
    return np.where(small, series, big)


def _all_sky_integral(r, h):
    """int_0^r x^2 (h/x) (1 - exp(-x/h)) dx = h [r^2/2 - h^2 P(2, r/h)], stable for small r/h."""
    from scipy.special import gammainc

    r = np.asarray(r, dtype=float)
    x = r / h
    small = x < 1e-4
    big = h * (r**2 / 2.0 - h**2 * gammainc(2.0, x))
    series = r**3 * (1.0 / 3.0 - x / 8.0 + x**2 / 30.0)
    return np.where(small, series, big)


def effective_volume(d_lo, d_hi, limits, sin_b=None):
    """Density-weighted volume between two distances (pc^3).

    Parameters
    ----------
    d_lo, d_hi : array_like
        Inner and outer distances (pc).
    limits : SurveyLimits
        Sky coverage, scale height and geometry.
    sin_b : array_like, optional
        Sine of the galactic latitude (needed for the ``line_of_sight`` geometry with a scale
        height).

    Returns
    -------
    ndarray
        Omega int_(d_lo)^(d_hi) r^2 rho(r)/rho_0 dr in pc^3 (geometric volume without a scale
        height).
    """
    lo = np.asarray(d_lo, dtype=float)
    hi = np.asarray(d_hi, dtype=float)
    omega = limits.solid_angle_sr
    h = limits.scale_height_pc
    if h is None:
        return omega / 3.0 * (hi**3 - lo**3)
    if limits.geometry == "all_sky":
        return omega * (_all_sky_integral(hi, h) - _all_sky_integral(lo, h))
    if sin_b is None:
        raise InputError("the line-of-sight scale-height correction needs sky positions (ra_deg, dec_deg)")
    a = np.abs(np.asarray(sin_b, dtype=float)) / h
    return omega * (_cone_integral(hi, a) - _cone_integral(lo, a))


def galactic_sin_b(ra_deg, dec_deg):
    """sin(galactic latitude) of ICRS positions (astropy's Galactic frame)."""
    from astropy import units as u
    from astropy.coordinates import SkyCoord

    c = SkyCoord(ra=np.asarray(ra_deg, dtype=float) * u.deg, dec=np.asarray(dec_deg, dtype=float) * u.deg,
                 frame="icrs")
    return np.sin(c.galactic.b.radian)


def compute_vmax(dist_pc, mag, limits, plx_over_err=None, plx_err_mas=None, pm_mas_yr=None, sin_b=None):
    """Vmax, V and V/Vmax of each star.

    Parameters
    ----------
    dist_pc, mag, plx_over_err, plx_err_mas, pm_mas_yr :
        As in :func:`distance_limits`.
    limits : SurveyLimits
    sin_b : array_like, optional
        Sine of the galactic latitude (line-of-sight scale-height correction).

    Returns
    -------
    dict of ndarray
        ``d_min_pc``, ``d_max_pc``, ``vmax_pc3``, ``v_pc3``, ``v_over_vmax``, ``vmax_limit``
        (:data:`LIMIT_CODES`) and ``usable`` (finite, positive Vmax and V/Vmax <= 1).
    """
    d = np.asarray(dist_pc, dtype=float)
    d_min, d_max, code = distance_limits(d, mag, limits, plx_over_err, plx_err_mas, pm_mas_yr)
    with np.errstate(invalid="ignore"):
        vmax = effective_volume(d_min, d_max, limits, sin_b)
        v = effective_volume(d_min, np.maximum(d, d_min), limits, sin_b)
        ratio = v / vmax
        usable = np.isfinite(ratio) & (vmax > 0) & (d <= d_max * (1 + 1e-9)) & (d >= d_min * (1 - 1e-9))
    return {"d_min_pc": d_min, "d_max_pc": d_max, "vmax_pc3": vmax, "v_pc3": v, "v_over_vmax": ratio,
            "vmax_limit": code, "usable": usable}


def v_over_vmax_statistic(v_over_vmax):
    """<V/Vmax> with its expectation for a complete uniform sample.

    Returns
    -------
    dict
        ``n``, ``mean``, ``expected`` (0.5), ``sigma`` (1/sqrt(12 n)) and ``z`` ((mean - 0.5)/sigma).
    """
    r = np.asarray(v_over_vmax, dtype=float)
    r = r[np.isfinite(r)]
    n = int(r.size)
    if n == 0:
        return {"n": 0, "mean": float("nan"), "expected": 0.5, "sigma": float("nan"), "z": float("nan")}
    sigma = 1.0 / np.sqrt(12.0 * n)
    mean = float(r.mean())
    return {"n": n, "mean": mean, "expected": 0.5, "sigma": float(sigma), "z": float((mean - 0.5) / sigma)}
