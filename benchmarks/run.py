"""Benchmarks: throughput of ionact's hot paths, with ratios against baselines measured in the same run.

Run with ``make bench``. For each workload: the median of several runs, the throughput, and
where it makes sense the ratio against (a) a plain-Python loop doing the same arithmetic
and (b) a bare-numpy expression of the same formula written inline (the floor). Figures
are also written to benchmarks/results.json (not committed). Nothing is asserted: speed is
measured here, never in the tests.
"""

from __future__ import annotations

import atexit
import csv
import json
import math
import os
import shutil
import statistics
import subprocess
import sys
import tempfile
import time
import warnings
from pathlib import Path

import numpy as np

import ionact as ia

RESULTS: dict[str, dict] = {}
warnings.simplefilter("ignore", ia.ValidityRangeWarning)


QUICK = "--quick" in sys.argv  # `make bench-quick`: every workload, smaller and fewer rounds (under a minute)
SCALE = 10 if QUICK else 1
ROUNDS = 3 if QUICK else 7


def _scratch() -> Path:
    """A scratch folder removed when the benchmarks end (the 10⁶-row report alone is ~250 MB)."""
    path = Path(tempfile.mkdtemp(prefix="ionact-bench-"))
    atexit.register(shutil.rmtree, path, True)
    return path


def median_time(fn, repeat=5) -> float:
    fn()  # warm-up
    times = []
    for _ in range(3 if QUICK else repeat):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return statistics.median(times)


def alternate(cands: dict, rounds: int | None = None) -> tuple[dict[str, float], dict[str, float]]:
    """Time candidates in turn (A B C A B C …) so that a slow moment of the machine hits them
    alike: the median time of each, and per candidate after the first the median over rounds
    of (first's time / its time) — "ionact / floor", higher is slower."""
    names = list(cands)
    for f in cands.values():
        f()  # warm-up
    times: dict[str, list[float]] = {k: [] for k in names}
    for _ in range(rounds or ROUNDS):
        for k in names:
            t0 = time.perf_counter()
            cands[k]()
            times[k].append(time.perf_counter() - t0)
    first = names[0]
    med = {k: statistics.median(v) for k, v in times.items()}
    ratio = {k: statistics.median([a / b for a, b in zip(times[first], times[k], strict=True)]) for k in names[1:]}
    return med, ratio


def report(name: str, n: int, t: float, ratios: dict[str, float] | None = None, target: str = "",
           met: bool | None = None) -> None:
    """One line: time, throughput, and ionact's time over each baseline's (higher is slower)."""
    row = {"n": n, "median_s": t, "per_s": n / t}
    line = f"{name:<50} {t * 1e3:9.1f} ms {n / t:10.3g}/s"
    for label, r in (ratios or {}).items():
        row[f"ionact_over_{label.replace(' ', '_')}"] = r
        line += f"  ionact/{label} = {r:.3g}×"
    if target:  # judged at full size only: at a tenth, fixed costs weigh ten times more
        row["target"] = target
        row["target_met"] = None if QUICK else met
        line += f"   [target {target}: {'judged at full size (make bench)' if QUICK else 'met' if met else 'NOT met'}]"
    RESULTS[name] = row
    print(line)


def bench_davies(n=1_000_000) -> None:
    n //= SCALE
    rng = np.random.default_rng(0)
    z = rng.choice([-2, -1, 1, 2], n).astype(float)
    i = rng.uniform(0, 0.5, n)
    a = ia.water.debye_huckel_a(25.0)

    def floor():  # the fastest straightforward numpy: exp of the scaled logarithm, computed in place
        s = np.sqrt(i)
        x = s / (1 + s)
        x -= 0.3 * i
        x *= z * z
        x *= -a * math.log(10)
        return np.exp(x, out=x)

    sub = 50_000 // SCALE
    zl, il = z[:sub].tolist(), i[:sub].tolist()

    def plain():
        out = []
        for zz, ii in zip(zl, il, strict=True):
            s = math.sqrt(ii)
            out.append(math.exp(-a * math.log(10) * zz * zz * (s / (1 + s) - 0.3 * ii)))
        return out

    med, ratio = alternate({"lib": lambda: ia.models.davies(z, i, 25.0), "floor": floor})
    t_plain = median_time(plain, repeat=3) * n / sub
    report("models.davies, 1e6 ions", n, med["lib"], {"floor": ratio["floor"], "plain": med["lib"] / t_plain},
           "≤ 1.2× floor", ratio["floor"] <= 1.2)


def bench_extended(n=1_000_000) -> None:
    n //= SCALE
    rng = np.random.default_rng(0)
    z = rng.choice([-2, -1, 1, 2], n).astype(float)
    i = rng.uniform(0, 0.1, n)
    size = rng.choice([3.0, 4.5, 6.0, 8.0], n)
    a, b = ia.water.debye_huckel_a(25.0), ia.water.debye_huckel_b(25.0)

    def floor():  # exp of the scaled logarithm, in place
        s = np.sqrt(i)
        x = size * s
        x *= b
        x += 1.0
        np.divide(s, x, out=x)
        x *= z * z
        x *= -a * math.log(10)
        return np.exp(x, out=x)

    med, ratio = alternate({"lib": lambda: ia.models.extended_debye_huckel(z, i, size), "floor": floor})
    report("models.extended_debye_huckel, 1e6 ions", n, med["lib"], {"floor": ratio["floor"]}, "≤ 1.2× floor",
           ratio["floor"] <= 1.2)


BASE = {"Na+": 0.486, "K+": 0.0106, "Mg^2+": 0.0547, "Ca^2+": 0.0107,
        "Cl-": 0.566, "SO4^2-": 0.0293, "HCO3-": 0.0018, "Br-": 0.00087}


def seawater_batch(n: int) -> ia.Solution:
    """An invented seawater-like eight-ion mixture, scaled randomly per sample, balanced on Cl-."""
    k = np.random.default_rng(1).uniform(0.05, 1.2, n)
    return ia.Solution({ion: v * k for ion, v in BASE.items()}, balance="Cl-", charge_tolerance=0.05)


def bench_activity(n=100_000) -> None:
    n //= SCALE
    sol = seawater_batch(n)
    m = sol.molality_array
    z = sol.charges
    a = ia.water.debye_huckel_a(25.0)
    z2 = z * z
    ln_a = -a * math.log(10)

    ionic_given = np.asarray(sol.ionic_strength)  # a Solution carries its I: the floor may use it too

    def floor():  # one exp per distinct |z| and a broadcast (the charges repeat)
        ionic = ionic_given
        s = np.sqrt(ionic)
        f = s / (1 + s)
        f -= 0.3 * ionic
        f *= ln_a
        ones = np.exp(f)  # z² = 1
        per = {1.0: ones, 4.0: ones**4}
        return np.stack([per[float(k)] for k in z2])

    sub = 5000 // SCALE
    rows = m[:, :sub].T.tolist()
    zl = z.tolist()

    def plain():
        out = []
        for row in rows:
            ionic = 0.5 * sum(zz * zz * mm for zz, mm in zip(zl, row, strict=True))
            s = math.sqrt(ionic)
            f = s / (1 + s) - 0.3 * ionic
            out.append([math.exp(ln_a * zz * zz * f) for zz in zl])
        return out

    # the same arithmetic as the floors: free ions (seawater's ions pair, so the default speciates)
    med, ratio = alternate({"lib": lambda: ia.activity_coefficients(sol, "davies", equilibrium=False),
                            "floor": floor})
    t_p = median_time(plain, repeat=3) * n / sub
    report("activity_coefficients davies free ions, 1e5 × 8", n, med["lib"],
           {"floor": ratio["floor"], "plain": med["lib"] / t_p}, "≤ 1.3× floor", ratio["floor"] <= 1.3)
    t_eq = median_time(lambda: ia.activity_coefficients(sol, "davies"), repeat=3)
    report("activity_coefficients davies + ion pairs, 1e5 × 8", n, t_eq)
    one = [sol[k] for k in range(200 // SCALE)]

    def loop():
        for s in one:
            ia.activity_coefficients(s, "pitzer", equilibrium=False)

    floor_pz = pitzer_floor(sol.ions, sol.charges, sol.molality_array)
    med, ratio = alternate({"lib": lambda: ia.activity_coefficients(sol, "pitzer", equilibrium=False),
                            "floor": floor_pz})
    t_pz = med["lib"]
    t_loop = median_time(loop, repeat=3) * n / len(one)
    report("activity_coefficients pitzer, 1e5 × 8 ions", n, t_pz,
           {"floor": ratio["floor"], "per-sample calls": t_pz / t_loop},
           "≤ 1.5× floor and ≥ 1e6 solutions/s", ratio["floor"] <= 1.5 and n * SCALE / (t_pz * SCALE) >= 1e6)
    for n_ions in (16, 32):  # the cost grows with the ions as the floor's does
        names, charges, m = many_ions(n_ions, n)
        big = ia.Solution(dict(zip(names, m, strict=True)))
        fl = pitzer_floor(names, charges, m)
        med, ratio = alternate({"lib": lambda big=big: ia.activity_coefficients(big, "pitzer", missing="zero",
                                                                                  equilibrium=False), "floor": fl})
        report(f"activity_coefficients pitzer, 1e5 × {n_ions} ions", n, med["lib"], {"floor": ratio["floor"]},
               "≤ 1.5× floor", ratio["floor"] <= 1.5)


def many_ions(n_ions: int, n: int) -> tuple[list[str], np.ndarray, np.ndarray]:
    """Invented mixtures of n_ions tabulated ions (half cations, half anions), balanced."""
    cats = ["Na+", "K+", "Mg^2+", "Ca^2+", "Li+", "Sr^2+", "Ba^2+", "NH4+", "Cs+", "Rb+", "Mn^2+", "Fe^2+",
            "Zn^2+", "Cu^2+", "Ni^2+", "Co^2+"][: n_ions // 2]
    ans = ["Cl-", "SO4^2-", "Br-", "NO3-", "HCO3-", "F-", "I-", "CO3^2-", "H2PO4-", "HPO4^2-", "OH-",
           "ClO4-", "HSO4-", "CH3COO-", "SCN-", "NO2-"][: n_ions // 2]
    charges = np.array([ia.species.resolve_ion(x).charge for x in cats + ans], dtype=float)
    rng = np.random.default_rng(6)
    m = rng.uniform(0.001, 0.05, (n_ions, n))
    pos = charges > 0
    m[~pos] *= (charges[pos] @ m[pos]) / (-charges[~pos] @ m[~pos])  # electroneutral
    return cats + ans, charges, m


def pitzer_floor(names, charges, m):
    """The same Pitzer equations (Harvie–Møller–Weare form, 25 °C) as bare numpy, written
    inline: B and C terms as (nc, na) matrix products grouped by α, Eθ once per pair of
    charges, ψ one (n, n) product per opposite ion. Parameters come from the same tables."""
    from ionact.models.pitzer import j_function, pitzer_set

    z = np.asarray(charges, dtype=float)
    ci, ai = np.flatnonzero(z > 0), np.flatnonzero(z < 0)
    zc, za = z[ci], -z[ai]
    p = pitzer_set(tuple(names[i] for i in ci), tuple(names[i] for i in ai), tuple(int(x) for x in zc),
                   tuple(int(-x) for x in za), "zero")
    aphi = ia.water.pitzer_aphi(25.0)
    groups = [(float(a), np.where(p.alpha1 == a, p.beta1, 0.0)) for a in np.unique(p.alpha1[p.beta1 != 0])]
    groups += [(float(a), np.where(p.alpha2 == a, p.beta2, 0.0)) for a in np.unique(p.alpha2[p.beta2 != 0])]
    c = p.cphi / (2.0 * np.sqrt(zc[:, None] * za[None, :]))
    like = []
    for zs, theta in ((zc, p.theta_c), (za, p.theta_a)):
        qs = sorted(set(zs.tolist()))
        pairs = [(zp, zq, (((zs[:, None] == zp) & (zs[None, :] == zq)) | ((zs[:, None] == zq) & (zs[None, :] == zp)))
                  .astype(float)) for k, zp in enumerate(qs) for zq in qs[k + 1:]]
        like.append((theta, pairs))
    psis = [(p.psi_cca, [a for a in range(len(za)) if np.any(p.psi_cca[:, :, a])]),
            (p.psi_aac, [k for k in range(len(zc)) if np.any(p.psi_aac[:, :, k])])]
    mc, ma = np.ascontiguousarray(m[ci]), np.ascontiguousarray(m[ai])

    def floor():
        ionic = 0.5 * ((zc * zc) @ mc + (za * za) @ ma)
        sq = np.sqrt(ionic)
        f = -aphi * (sq / (1 + 1.2 * sq) + np.log1p(1.2 * sq) / 0.6)
        bc, ba = p.beta0 @ ma, p.beta0.T @ mc
        for a, b1 in groups:
            x = a * sq
            ex = np.exp(-x)
            g = 2 * (1 - (1 + x) * ex) / (x * x)
            gp = -2 * (1 - (1 + x + 0.5 * x * x) * ex) / (x * x)
            t1 = b1 @ ma
            bc += g * t1
            ba += g * (b1.T @ mc)
            f += gp / ionic * np.einsum("cN,cN->N", mc, t1)
        cc, ca = c @ ma, c.T @ mc
        cs = np.einsum("cN,cN->N", mc, cc)
        zt = zc @ mc + za @ ma
        js = {}
        out = []
        for (theta, pairs), mm in zip(like, (mc, ma), strict=True):
            phi = theta @ mm
            for zp, zq, ind in pairs:
                for q in (zp * zq, zp * zp, zq * zq):
                    if q not in js:
                        xq = 6 * q * aphi * sq
                        js[q] = (xq, *j_function(xq))
                (x1, j1, d1), (x2, j2, d2), (x3, j3, d3) = js[zp * zq], js[zp * zp], js[zq * zq]
                e = zp * zq / (4 * ionic) * (j1 - 0.5 * j2 - 0.5 * j3)
                ep = -e / ionic + zp * zq / (8 * ionic**2) * (x1 * d1 - 0.5 * x2 * d2 - 0.5 * x3 * d3)
                im = ind @ mm
                phi += e * im
                f += 0.5 * ep * np.einsum("iN,iN->N", mm, im)
            out.append(phi)
        lc = 2 * bc + zt * cc + 2 * out[0] + zc[:, None] * cs
        la = 2 * ba + zt * ca + 2 * out[1] + za[:, None] * cs
        for (psi, idx), like_m, other_m, like_out, other_out in ((psis[0], mc, ma, lc, la),
                                                                 (psis[1], ma, mc, la, lc)):
            for k in idx:
                pm = psi[:, :, k] @ like_m
                like_out += pm * other_m[k]
                other_out[k] += 0.5 * np.einsum("iN,iN->N", like_m, pm)
        lc += (zc * zc)[:, None] * f
        la += (za * za)[:, None] * f
        return np.exp(lc), np.exp(la)

    return floor


def bench_conversion(n=100_000) -> None:
    n //= SCALE
    act = np.geomspace(1e-6, 1e-2, n)
    matrix = ia.Solution.from_salts({"NaCl": np.full(n, 0.05)})
    a = ia.water.debye_huckel_a(25.0)
    ln_a = -a * math.log(10)
    target = np.log(act)

    def floor():  # vectorised Newton on ln m with the analytic derivative, I = 0.05 + m
        x = np.log(act)
        for _ in range(8):
            m = np.exp(x)
            ionic = 0.05 + m
            s = np.sqrt(ionic)
            lng = ln_a * (s / (1 + s) - 0.3 * ionic)
            dlng = ln_a * (0.5 / (s * (1 + s) ** 2) - 0.3)
            x -= (x + lng - target) / (1.0 + m * dlng)
        return np.exp(x)

    sub = 2000 // SCALE
    al = act[:sub].tolist()

    def plain():  # the same Newton, one sample at a time
        out = []
        for av in al:
            x, t = math.log(av), math.log(av)
            for _ in range(8):
                mm = math.exp(x)
                ionic = 0.05 + mm
                s = math.sqrt(ionic)
                lng = ln_a * (s / (1 + s) - 0.3 * ionic)
                dlng = ln_a * (0.5 / (s * (1 + s) ** 2) - 0.3)
                x -= (x + lng - t) / (1.0 + mm * dlng)
            out.append(math.exp(x))
        return out

    # free ions, as the floors compute; the default also solves NaF(aq) and HF
    med, ratio = alternate({"lib": lambda: ia.concentration_from_activity("F-", act, matrix=matrix, model="davies",
                                                                          equilibrium=False), "floor": floor})
    t_p = median_time(plain, repeat=3) * n / sub
    report("concentration_from_activity davies free, 1e5", n, med["lib"],
           {"floor": ratio["floor"], "plain": med["lib"] / t_p}, "≤ 2× floor", ratio["floor"] <= 2.0)
    t_eq = median_time(lambda: ia.concentration_from_activity("F-", act, matrix=matrix, model="davies"), repeat=3)
    report("concentration_from_activity davies + pairs, 1e5", n, t_eq)
    t_auto = median_time(lambda: ia.concentration_from_activity("F-", act, matrix=matrix), repeat=3)
    report("concentration_from_activity auto (pitzer), 1e5", n, t_auto, target="≥ 1e5 samples/s",
           met=n / t_auto >= 1e5)


def bench_design(n=10_000) -> None:
    """The design search over explicit sample matrices: 10 000 with free ions (the target's
    workload), and 1 000 with the ion pairs solved (the default where the salts pair)."""
    n //= SCALE
    k = np.random.default_rng(2).uniform(0.001, 0.05, n)
    mats = ia.Solution.from_salts({"NaCl": k, "CaCl2": k / 10, "MgSO4": k / 20})

    def run(samples, equilibrium):
        ia.design_adjuster("NO3-", {"(NH4)2SO4": 2.0}, samples=samples, analyte_range=(1e-5, 1e-3),
                           budget=ia.Budget(mv=1.0), solve="stock", model="davies", equilibrium=equilibrium)

    t = median_time(lambda: run(mats, False), repeat=3)
    report("design_adjuster solve=stock, 1e4 matrices, free ions", n, t, target="< 1 s for 1e4",
           met=t * SCALE < 1.0)
    few = mats[: n // 10]
    t_eq = median_time(lambda: run(few, None), repeat=1)
    report("design_adjuster solve=stock, 1e3 matrices, ion pairs", n // 10, t_eq)


def _write_batch(path: Path, n: int) -> None:
    rng = np.random.default_rng(3)
    with open(path, "w", newline="") as fh:
        w = csv.writer(fh)
        w.writerow(["sample_id", "analyte [mg/L as N]", "conductivity [uS/cm]"])
        for start in range(0, n, 100_000):
            m = min(100_000, n - start)
            for k, (a, e) in enumerate(zip(rng.lognormal(1.5, 1.3, m), rng.uniform(50, 4000, m), strict=True),
                                       start=start):
                w.writerow([f"S{k:07d}", f"{a:.4g}", f"{e:.1f}"])


def bench_check(n=100_000) -> None:
    """The batch check end to end as the command line runs it (streamed read, check, atomic
    write): 1e5 rows in process, and 1e6 rows in a child process whose peak memory is read."""
    n //= SCALE
    from ionact.method import load_method
    from ionact.samples import check_csv

    design = ia.design_adjuster(**load_method("example:nitrate_irrigation"))
    tmp = _scratch()
    src, out = tmp / "batch.csv", tmp / "report.csv"
    _write_batch(src, n)

    def run():
        check_csv(src, design, out=out)

    t = median_time(run, repeat=3)
    report("check_samples, 1e5-row CSV end to end", n, t, target="< 2 s for 1e5", met=t * SCALE < 2.0)
    big_n = 10 * n
    big = tmp / "big.csv"
    _write_batch(big, big_n)
    (tmp / "design.json").write_text(json.dumps(design.to_dict()))
    # the child's own high-water mark: VmHWM of its address space (ru_maxrss would carry this
    # benchmark's own memory across fork and exec)
    code = ("import resource, sys, time; from ionact.cli import main; t = time.perf_counter(); "
            f"rc = main(['check', {str(big)!r}, '--design', {str(tmp / 'design.json')!r}, '--out', "
            f"{str(tmp / 'big_report.csv')!r}]); "
            "hwm = [int(x.split()[1]) for x in open('/proc/self/status') if x.startswith('VmHWM')] "
            "if sys.platform.startswith('linux') else [resource.getrusage(resource.RUSAGE_SELF).ru_maxrss]; "
            "print(time.perf_counter() - t, hwm[0])")
    res = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=False)
    secs, kib = (float(v) for v in res.stdout.split()[-2:])
    report("ionact check, 1e6-row CSV (child process)", big_n, secs, target="< 20 s and peak < 400 MB for 1e6",
           met=secs * SCALE < 20.0 and kib / 1024 < 400)
    RESULTS["ionact check, 1e6-row CSV (child process)"]["peak_mb"] = kib / 1024
    print(f"{'':<50} peak memory {kib / 1024:.0f} MB (the whole process, interpreter and libraries included)")


def bench_speciate(n=100_000) -> None:
    """Speciation of seawater-like samples (8 input ions → 9 components, ~25 species) at a
    given pH and with the pH solved, against a plain-Python Newton loop (one sample at a
    time, numpy for the small linear algebra, Davies γ iterated to self-consistency)."""
    from ionact.equilibrium import network_for

    n //= SCALE
    sol = seawater_batch(n)
    net = network_for([sol.ion(name) for name in sol.ions])
    totals = net.input_nu.T @ sol.molality_array
    logk = net.log_k[:, None] * np.ones((1, 1))
    nu, z2 = net.nu, net.z2
    n_c, h = len(net.components), net.h
    a = ia.water.debye_huckel_a(25.0)
    sub = 100 // SCALE

    def plain():  # the straightforward per-sample tableau Newton with pH held at 8.1
        out = []
        for k in range(sub):
            tot = totals[:, k]
            free = np.flatnonzero((np.arange(n_c) != h) & (tot > 0))
            x = np.log(np.where(tot > 0, tot, 1e-300))
            lg = np.zeros(len(nu))
            for _ in range(100):
                la = x / math.log(10) + lg[:n_c]
                la[h] = -8.1
                m = 10.0 ** np.minimum(logk[:, 0] + nu @ la - lg, 30.0)
                ionic = 0.5 * z2 @ m
                s = math.sqrt(ionic)
                lg = -a * z2 * (s / (1 + s) - 0.3 * ionic)
                r = (nu.T @ m - tot)[free]
                if np.max(np.abs(r) / tot[free]) < 1e-10:
                    break
                jac = (nu[:, free].T * m) @ nu[:, free]
                dx = -np.linalg.solve(jac, r)
                x[free] += dx * min(1.0, math.log(10) / max(np.max(np.abs(dx)), 1e-300))
            out.append(m)
        return out

    t_fixed = median_time(lambda: ia.speciate(sol, pH=8.1, model="davies"), repeat=3)
    t_solved = median_time(lambda: ia.speciate(sol, model="davies"), repeat=3)
    t_plain = median_time(plain, repeat=3) * n / sub
    report("speciate davies at pH 8.1, 1e5 seawater-like", n, t_fixed, {"plain Newton": t_fixed / t_plain},
           "< 2 s for 1e5", t_fixed * SCALE < 2.0)
    report("speciate davies, pH solved, 1e5 seawater-like", n, t_solved, target="< 2 s for 1e5",
           met=t_solved * SCALE < 2.0)


def bench_import() -> None:
    # An installed package imports from cached bytecode; allow it to be written even where the
    # environment sets PYTHONDONTWRITEBYTECODE, and warm the cache once before timing.
    env = {k: v for k, v in os.environ.items() if k != "PYTHONDONTWRITEBYTECODE"}

    def timed(stmt: str) -> float:
        subprocess.run([sys.executable, "-c", stmt], env=env, check=True)
        runs = []
        for _ in range(7):
            res = subprocess.run([sys.executable, "-c", f"import time; t=time.perf_counter(); {stmt}; "
                                  "print(time.perf_counter()-t)"], capture_output=True, text=True, check=True,
                                 env=env)
            runs.append(float(res.stdout))
        return statistics.median(runs)

    t_np = timed("import numpy")
    t_ia = timed("import ionact")
    report("import ionact", 1, t_ia, {"import numpy": t_ia / t_np}, "≤ 1.5× import numpy", t_ia <= 1.5 * t_np)
    RESULTS["import ionact"]["numpy_s"] = t_np
    # what a first command pays: the whole process, the unit parsing of a common unit included
    t_cmd = timed("import os, sys; from ionact.cli import main; sys.stdout = open(os.devnull, 'w'); "
                  "main(['strength', 'CaCl2=2 mmol/kg']); sys.stdout = sys.__stdout__")
    report("first command (ionact strength, in-process)", 1, t_cmd, {"import numpy": t_cmd / t_np},
           "< 0.5 s", t_cmd < 0.5)
    # the command line on the shipped example batch, wall time of the whole process
    from ionact.method import load_method

    tmp = _scratch()
    design = tmp / "design.json"
    design.write_text(json.dumps(ia.design_adjuster(**load_method("example:nitrate_irrigation")).to_dict()))
    batch = Path(ia.__file__).parent / "examples" / "irrigation_batch.csv"
    cmd = [sys.executable, "-m", "ionact", "check", str(batch), "--design", str(design), "--out", str(tmp / "r.csv")]
    subprocess.run(cmd, env=env, capture_output=True, check=False)
    walls = []
    for _ in range(5):
        t0 = time.perf_counter()
        subprocess.run(cmd, env=env, capture_output=True, check=False)
        walls.append(time.perf_counter() - t0)
    t_wall = statistics.median(walls)
    report("ionact check on the example batch (wall, new process)", 1, t_wall, target="< 0.5 s",
           met=t_wall < 0.5)


def main() -> None:
    print(f"ionact {ia.__version__} benchmarks{' (quick)' if QUICK else ''} — candidates timed in turn, medians; "
          "ionact/X is ionact's time over X's (higher is slower)"
          + ("; quick: every workload at a tenth of the size its name gives, targets not judged" if QUICK else "")
          + "\n")
    for bench in (bench_davies, bench_extended, bench_activity, bench_conversion, bench_speciate, bench_design,
                  bench_check, bench_import):
        bench()
    path = Path(__file__).with_name("results.json")
    path.write_text(json.dumps(RESULTS, indent=2))
    print(f"\nfigures written to {path}")


if __name__ == "__main__":
    main()
