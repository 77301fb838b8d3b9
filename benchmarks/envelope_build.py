"""Print the time to build the default envelope tables (thick-H and helium atmospheres) and the
default mass-radius table from the same envelope. Run: PYTHONPATH=workflow python benchmarks/envelope_build.py"""

import time
import warnings

warnings.filterwarnings("ignore")

t0 = time.perf_counter()
from cinderclock.envelope.structure import layer_stack  # noqa: E402

layer_stack(("H", "He", "core:CO"))
layer_stack(("He", "core:CO"))
t1 = time.perf_counter()
print(f"equation-of-state and opacity tables (H, He, C/O core material): {t1 - t0:6.1f} s")
from cinderclock.envelope import build_envelope_table  # noqa: E402

da = build_envelope_table(atmosphere="H")
t2 = time.perf_counter()
print(f"envelope table, thick H, default grid ({da.masses.size} x {da.log_teff.size}): {t2 - t1:6.1f} s")
build_envelope_table(atmosphere="He")
t3 = time.perf_counter()
print(f"envelope table, He atmosphere: {t3 - t2:6.1f} s")
from cinderclock.massradius.table import build_mass_radius_table  # noqa: E402

build_mass_radius_table(envelope_table=da)
t4 = time.perf_counter()
print(f"mass-radius table from the thick-H envelope: {t4 - t3:6.1f} s")
print(f"total: {t4 - t0:6.1f} s")
