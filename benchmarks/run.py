"""Benchmarks: throughput of ionact's hot paths against a plain-Python loop and a bare-numpy floor.

Run with ``make bench``. Prints, per workload, the median of several runs, the throughput
and the ratios, all measured in one run; writes the figures to benchmarks/results.json
(not committed). Nothing here is asserted: speed is measured, not tested.
"""

from __future__ import annotations

import json
import math
import statistics
import subprocess
import sys
import time
import warnings
from pathlib import Path

import numpy as np

import ionact as ia

RESULTS: dict[str, dict] = {}


def median_time(fn, repeat=5) -> float:
    fn()  # warm-up
    times = []
    for _ in range(repeat):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return statistics.median(times)


def report(name: str, n: int, t: float, baselines: dict[str, float] | None = None, target: str = "") -> None:
    row = {"n": n, "median_s": t, "per_s": n / t}
    line = f"{name:<46} {t * 1e3:9.2f} ms  {n / t:12.3g} /s"
    for label, tb in (baselines or {}).items():
        row[f"ratio_vs_{label}"] = t / tb
        line += f"  {t / tb:7.2f}× {label}"
    if target:
        row["target"] = target
        line += f"   [target: {target}]"
    RESULTS[name] = row
    print(line)


def bench_davies(n=1_000_000) -> None:
    rng = np.random.default_rng(0)
    z = rng.choice([-2, -1, 1, 2], n)
    i = rng.uniform(0, 0.5, n)
    a = ia.water.debye_huckel_a(25.0)

    def floor():
        s = np.sqrt(i)
        return 10.0 ** (-a * z * z * (s / (1 + s) - 0.3 * i))

    zl, il = z[:20000].tolist(), i[:20000].tolist()

    def plain():
        out = []
        for zz, ii in zip(zl, il, strict=True):
            s = math.sqrt(ii)
            out.append(10.0 ** (-a * zz * zz * (s / (1 + s) - 0.3 * ii)))
        return out

    t_lib = median_time(lambda: ia.models.davies(z, i, 25.0))
    t_floor = median_time(floor)
    t_plain = median_time(plain) * n / len(zl)
    report("davies γ, 1e6 ions", n, t_lib, {"numpy-floor": t_floor, "plain-python": t_plain},
           "≤ 2× floor, ≥ 50× faster than plain Python")


def seawater_batch(n: int) -> ia.Solution:
    """An invented seawater-like eight-ion mixture, scaled randomly per sample."""
    rng = np.random.default_rng(1)
    k = rng.uniform(0.05, 1.2, n)
    base = {"Na+": 0.486, "K+": 0.0106, "Mg+2": 0.0547, "Ca+2": 0.0107,
            "Cl-": 0.566, "SO4-2": 0.0293, "HCO3-": 0.0018, "Br-": 0.00087}
    sol = ia.Solution({ion: v * k for ion, v in base.items()}, balance="Cl-", charge_tolerance=0.05)
    return sol


def bench_activity(n=100_000) -> None:
    sol = seawater_batch(n)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        t_d = median_time(lambda: ia.activity_coefficients(sol, "davies"), repeat=3)
        t_p = median_time(lambda: ia.activity_coefficients(sol, "pitzer"), repeat=3)
    report("activity_coefficients davies, 1e5 × 8 ions", n, t_d)
    report("activity_coefficients pitzer, 1e5 × 8 ions", n, t_p, target="≥ 1e5 solutions/s")


def bench_import() -> None:
    def timed(stmt: str) -> float:
        runs = []
        for _ in range(5):
            out = subprocess.run([sys.executable, "-c", f"import time; t=time.perf_counter(); {stmt}; "
                                  "print(time.perf_counter()-t)"], capture_output=True, text=True, check=True)
            runs.append(float(out.stdout))
        return statistics.median(runs)

    t_np = timed("import numpy")
    t_ia = timed("import ionact")
    report("import ionact", 1, t_ia, {"import-numpy": t_np}, "< 2× import numpy")


def main() -> None:
    print(f"ionact {ia.__version__ if hasattr(ia, '__version__') else ''} benchmarks — median of several runs\n")
    bench_davies()
    bench_activity()
    bench_import()
    path = Path(__file__).with_name("results.json")
    path.write_text(json.dumps(RESULTS, indent=2))
    print(f"\nfigures written to {path}")


if __name__ == "__main__":
    main()
