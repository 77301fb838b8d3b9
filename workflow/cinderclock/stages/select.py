"""Select: white-dwarf candidates by structured cuts (no expressions are evaluated).

Cuts, applied in this order, each rejecting with its own reason code:

1. ``min_parallax_over_error``: (parallax - zero point) / error at least this value. Zero and
   negative parallaxes fail it. The zero point is the configured constant or each star's own
   (``astrometry.zero_point_model``: Lindegren et al. 2021, or a catalogue column); it is written
   as ``plx_zp_mas`` for the later stages.
2. ``max_distance_pc``: inverse corrected parallax at most this distance (``null``: no limit).
3. ``max_mag_error``: per-band upper limits on magnitude uncertainties (a missing band passes).
4. ``quality_cuts``: a list of ``{column, min, max}`` on catalogue columns kept at ingest.
5. ``wd_region``: the absolute magnitude M = m + 5 log10(parallax / mas) - 10 in one band against a
   colour must fall inside a polygon given by its vertices. Extinction is neglected here, which is
   fair for nearby samples (say within ~100-200 pc) and biased beyond.
"""

from __future__ import annotations

import numpy as np

from .. import columns as C
from ..errors import ConfigError
from ..reasons import Rejector
from ..tableio import Column

STAGE = "select"
#: The column this stage adds.
ZERO_POINT_COLUMN = {"plx_zp_mas": Column("mas", "Parallax zero point applied (corrected parallax = plx_mas - "
                                                 "plx_zp_mas)", "pos.parallax.zeroPoint")}


def points_in_polygon(x, y, vertices):
    """Vectorised even-odd test: True where (x, y) lies inside the polygon.

    Parameters
    ----------
    x, y : ndarray
        Points.
    vertices : array_like, shape (k, 2)
        Polygon vertices in order (the polygon is closed automatically).
    """
    v = np.asarray(vertices, dtype=float)
    x = np.asarray(x, dtype=float)
    y = np.asarray(y, dtype=float)
    inside = np.zeros(x.shape, dtype=bool)
    x0, y0 = v[-1]
    for x1, y1 in v:
        crosses = (y1 > y) != (y0 > y)
        with np.errstate(divide="ignore", invalid="ignore"):
            x_at = (x0 - x1) * (y - y1) / (y0 - y1) + x1
        inside ^= crosses & (x < x_at)
        x0, y0 = x1, y1
    return inside


def corrected_parallax(table, zero_point_mas):
    """Parallax minus the zero point (the zero point is the catalogue's offset: plx_true = plx - zp)."""
    return table["plx_mas"].to_numpy(dtype=float) - zero_point_mas


def zero_points(table, settings):
    """Each star's parallax zero point (mas) and the flag bits it sets (see :func:`cinderclock.distance.star_zero_points`)."""
    from ..distance import star_zero_points
    from ..reasons import set_flag

    zp, outside, fallback = star_zero_points(table, settings["astrometry"], settings.get("bands"))
    bits = table[C.FLAGS].to_numpy(dtype=np.int64) if C.FLAGS in table else np.zeros(len(table), dtype=np.int64)
    bits = set_flag(set_flag(bits, "zero_point_out_of_range", outside), "zero_point_fallback", fallback)
    return zp, bits


def select(table, settings):
    """Apply the selection.

    Parameters
    ----------
    table : pandas.DataFrame
        Output of the ingest stage.
    settings : dict
        ``{"select": ..., "astrometry": ..., "bands": ...}``.

    Returns
    -------
    kept : pandas.DataFrame
    rejects : pandas.DataFrame
    """
    sel = settings["select"]
    table = table.copy()
    zp, bits = zero_points(table, settings)
    table["plx_zp_mas"] = zp
    table[C.FLAGS] = bits
    n = len(table)
    rj = Rejector(STAGE, table[C.ID].to_numpy(), table[C.ROW].to_numpy())
    reject = rj.reject

    plx = corrected_parallax(table, zp)
    err = table["plx_err_mas"].to_numpy(dtype=float)
    snr = plx / err
    limit = sel["min_parallax_over_error"]
    reject(~(snr >= limit), "parallax_snr", lambda i: [f"parallax/error = {s:.2f} < {limit}" for s in snr[i]])

    dmax = sel.get("max_distance_pc")
    if dmax is not None:
        with np.errstate(divide="ignore"):
            dist = 1000.0 / plx
        reject(dist > dmax, "too_distant", lambda i: [f"1/parallax = {d:.0f} pc > {dmax} pc" for d in dist[i]])

    for band, lim in (sel.get("max_mag_error") or {}).items():
        if band not in settings["bands"]:
            raise ConfigError(f"select.max_mag_error: unknown band '{band}'; bands: {', '.join(settings['bands'])}")
        e = table[C.mag_err_column(band)].to_numpy(dtype=float)
        reject(e > lim, "photometric_error", lambda i: [f"{band} error {v:.3f} > {lim}" for v in e[i]])

    for cut in sel.get("quality_cuts") or []:
        col = cut["column"]
        if col not in table.columns:
            raise ConfigError(f"select.quality_cuts: column '{col}' is not in the table; list it in "
                              "catalogue.keep_columns")
        v = table[col].to_numpy(dtype=float)
        ok = np.isfinite(v) if cut.get("require", True) else np.ones(n, dtype=bool)
        if "min" in cut:
            ok &= ~(v < cut["min"])
        if "max" in cut:
            ok &= ~(v > cut["max"])
        span = f"[{cut.get('min', '-inf')}, {cut.get('max', 'inf')}]"
        reject(~ok, "quality_cut", lambda i: [f"{col} = {x!r} outside {span}" for x in v[i]])

    region = sel.get("wd_region")
    if region:
        b1, b2 = region["colour"]
        mb = region["magnitude"]
        for b in (b1, b2, mb):
            if b not in settings["bands"]:
                raise ConfigError(f"select.wd_region: unknown band '{b}'; bands: {', '.join(settings['bands'])}")
        colour = table[C.mag_column(b1)].to_numpy(dtype=float) - table[C.mag_column(b2)].to_numpy(dtype=float)
        with np.errstate(divide="ignore", invalid="ignore"):
            absmag = table[C.mag_column(mb)].to_numpy(dtype=float) + 5 * np.log10(plx) - 10
        missing = ~np.isfinite(colour) | ~np.isfinite(absmag)
        reject(missing, "no_colour", f"needs {b1}, {b2} and {mb}")
        inside = points_in_polygon(colour, absmag, region["vertices"])
        reject(~inside, "outside_wd_region",
               lambda i: [f"({b1}-{b2}, M_{mb}) = ({c:.2f}, {m:.2f})" for c, m in zip(colour[i], absmag[i])])
    return table.loc[rj.alive].reset_index(drop=True), rj.rejects()
