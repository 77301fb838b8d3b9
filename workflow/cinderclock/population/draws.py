"""Per-star posterior draws for collaborators: the Monte Carlo draws of every derived quantity, thinned.

The uncertainty stage summarises each star's Monte Carlo draws by percentiles and throws the
draws away. This step regenerates *the same draws* -- the same function
(:func:`cinderclock.montecarlo.draw_chain`), the same chunks of ``uncertainty.chunk_stars`` stars
per shard and the same random streams seeded by ``(uncertainty.seed, input_row of the chunk's
first star)`` -- from the same per-shard input, so the percentiles of the full set of draws
equal the final table's ``*_p16/_p50/_p84`` columns, and writes them in long format, one row per
(star, kept draw). A collaborator can run a hierarchical analysis on them without rerunning the
workflow.

Size bound: every ``thin``-th draw is kept (draw indices 0, thin, 2 thin, ...); if stars x kept
draws would exceed ``max_rows`` the thinning is raised until they fit (the effective thinning is
in the table's provenance and the summary). A table with more stars than ``max_rows`` is refused
with a one-line error naming the key.
"""

from __future__ import annotations

import numpy as np
import pandas as pd

from ..errors import ConfigError
from ..tableio import Column

DRAW_COLUMNS = {
    "star_id": Column("", "Source identifier from the input catalogue", "meta.id;meta.main"),
    "draw": Column("", "Index of the Monte Carlo draw (0 .. uncertainty.draws - 1; thinned)", "meta.number"),
    "dist_pc": Column("pc", "Distance in this draw", "pos.distance"),
    "log_lum": Column("dex(solLum)", "log10 luminosity L/Lsun in this draw", "phys.luminosity"),
    "teff_k": Column("K", "Effective temperature in this draw", "phys.temperature.effective"),
    "mass_msun": Column("solMass", "White-dwarf mass in this draw", "phys.mass"),
    "radius_rsun": Column("solRad", "White-dwarf radius in this draw", "phys.size.radius"),
    "cool_age_gyr": Column("Gyr", "Cooling age in this draw (NaN: off the model tables)", "time.age"),
    "total_age_gyr": Column("Gyr", "Total age (cooling + progenitor lifetime) in this draw", "time.age"),
}
QUANTITY_KEYS = ("dist_pc", "log_lum", "teff_k", "mass_msun", "radius_rsun", "cool_age_gyr", "total_age_gyr")


def effective_thin(n_stars, draws, thin, max_rows):
    """Thinning that keeps stars x kept draws within ``max_rows``.

    Raises
    ------
    ConfigError
        When even one draw per star exceeds ``max_rows``.
    """
    n_stars, draws, thin, max_rows = int(n_stars), int(draws), max(int(thin), 1), int(max_rows)
    if n_stars > max_rows:
        raise ConfigError(f"population.posterior_draws.max_rows: {n_stars} stars do not fit in {max_rows} rows even "
                          "with one draw per star; raise max_rows")
    kept = lambda t: -(-draws // t)            # noqa: E731  ceil(draws / t): indices 0, t, 2t, ...
    while thin < draws and n_stars * kept(thin) > max_rows:
        thin += 1
    return thin


def shard_draws(table, mass_radius, cooling, settings, thin):
    """Long-format draws of one shard's stars, chunk by chunk as the uncertainty stage draws them.

    Parameters
    ----------
    table : pandas.DataFrame
        The per-shard input of the uncertainty stage (output of the cooling stage).
    mass_radius, cooling :
        Model grids as the uncertainty stage loads them.
    settings : dict
        ``{"uncertainty": ..., "progenitor": ...}``.
    thin : int

    Yields
    ------
    pandas.DataFrame
        :data:`DRAW_COLUMNS`.
    """
    from ..montecarlo import draw_chain

    unc = settings["uncertainty"]
    n, k = len(table), int(unc["draws"])
    if n == 0 or k <= 0:
        return
    rows = table["input_row"].to_numpy()
    ids = table["star_id"].to_numpy()
    keep = np.arange(0, k, int(thin))
    step = max(1, int(unc["chunk_stars"]))
    for s in range(0, n, step):
        sl = slice(s, min(s + step, n))
        rng = np.random.default_rng([int(unc["seed"]), int(rows[s])])
        d = draw_chain(table.iloc[sl], mass_radius, cooling, settings["progenitor"], rng, k)
        m = sl.stop - sl.start
        out = {"star_id": np.repeat(ids[sl], keep.size), "draw": np.tile(keep, m).astype(np.int32)}
        for q in QUANTITY_KEYS:
            out[q] = d[q][:, keep].ravel()
        yield pd.DataFrame(out)
