"""Ready photometric bands: passband, magnitude system and offset of common survey photometry.

``bands.<key>.preset`` names a row of ``data/photometric_systems.csv`` (Gaia G/BP/RP, SDSS ugriz,
Pan-STARRS1 grizy, 2MASS JHKs, WISE W1/W2); it fills in the band's speclite passband, its system
(AB or Vega, with the published zero points of ``data/vega_zero_points.csv``) and ``mag_offset``,
the published correction that puts the catalogue magnitude on that system (SDSS u and z are
offset from AB). Explicit ``passband``/``system``/``mag_offset`` keys in the band win over the
preset. The passband curves are those speclite ships: nothing is downloaded at run time.

Caution: a flux-density zero point (2MASS, WISE) turns a synthetic AB magnitude into the Vega
system exactly only for the flux-averaging convention of its source; for hot white dwarfs the
difference between conventions is of order 0.01-0.03 mag in the infrared bands (common practice).
"""

from __future__ import annotations

import csv
import difflib
from functools import lru_cache
from pathlib import Path

from ..errors import ConfigError

_DATA = Path(__file__).resolve().parents[1] / "data" / "photometric_systems.csv"


@lru_cache(maxsize=None)
def presets():
    """``{preset: {"passband", "system", "mag_offset", "source"}}`` from the data file."""
    text = _DATA.read_text()
    rows = csv.reader(line for line in text.splitlines() if line.strip() and not line.startswith("#"))
    return {r[0]: {"passband": r[1], "system": r[2], "mag_offset": float(r[3]), "source": r[4]} for r in rows}


def closest(name, known, n=5):
    """Known names closest to ``name`` (difflib ratio, case-insensitive), best first."""
    lower = {k.lower(): k for k in known}
    hits = difflib.get_close_matches(name.lower(), list(lower), n=n, cutoff=0.4)
    family = [k for k in known if k.split("-")[0].lower() == name.split("-")[0].lower()]
    out = [lower[h] for h in hits] + [k for k in family if lower[k.lower()] not in hits]
    return list(dict.fromkeys(out))[:n] or sorted(known)[:n]


def expand_bands(bands):
    """Fill passband, system and mag_offset of bands that name a preset (in place; returns ``bands``).

    Raises
    ------
    ConfigError
        For an unknown preset (naming the closest known ones).
    """
    table = presets()
    for key, band in (bands or {}).items():
        name = band.get("preset")
        if name is None:
            continue
        if name not in table:
            raise ConfigError(f"config key 'bands.{key}.preset': unknown preset {name!r}; closest: "
                              f"{', '.join(closest(name, table))}")
        p = table[name]
        band.setdefault("passband", p["passband"])
        band.setdefault("system", p["system"])
        if not band.get("mag_offset"):
            band["mag_offset"] = p["mag_offset"]
        band.setdefault("mag_offset_source", p["source"])
    return bands
