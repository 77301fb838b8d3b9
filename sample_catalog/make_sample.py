#!/usr/bin/env python
"""Write the invented Lanternfall DR1 sample catalogue (deterministic for a given seed).

    python sample_catalog/make_sample.py                       # the shipped sample, 3,000 rows
    python sample_catalog/make_sample.py --rows 1000000 --out /tmp/lf_1e6.parquet --no-faults
    python sample_catalog/make_sample.py --mestel ...          # Mestel cooling, no table build

The data are invented: see sample_catalog/README.md.
"""

import argparse
import sys
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "workflow"))

from cinderclock.simulate import make_catalogue, write_csv  # noqa: E402


def default_cooling_grid():
    """The cooling table of the shipped default configuration (built here, about a minute)."""
    from cinderclock.api import ModelSet
    from cinderclock.config import load_config

    return ModelSet.build(load_config(Path(__file__).resolve().parents[1] / "config" / "config.yaml")).cooling


def main(argv=None):
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--rows", type=int, default=3000, help="number of well-formed rows")
    ap.add_argument("--seed", type=int, default=20261201)
    ap.add_argument("--out", default=str(Path(__file__).with_name("lanternfall_dr1.csv")),
                    help="output file; .csv or .parquet")
    ap.add_argument("--truth", default=None, help="also write the true parameters to this Parquet file")
    ap.add_argument("--no-faults", action="store_true", help="leave out the deliberately faulty rows")
    ap.add_argument("--mestel", action="store_true",
                    help="cool the white dwarfs by Mestel's law (quick) instead of the default cooling model")
    args = ap.parse_args(argv)
    cooling = None if args.mestel else default_cooling_grid()
    cat, truth = make_catalogue(args.rows, seed=args.seed, malformed=not args.no_faults, cooling=cooling)
    if args.out.endswith(".parquet"):
        for col in ("plx", "g_mag"):
            cat[col] = cat[col].astype(str) if cat[col].dtype == object else cat[col]
        cat.to_parquet(args.out, index=False)
    else:
        write_csv(cat, args.out, malformed_lines=() if args.no_faults else (5, 19))
    if args.truth:
        truth.to_parquet(args.truth, index=False)
    print(f"wrote {len(cat)} rows to {args.out}")


if __name__ == "__main__":
    main()
