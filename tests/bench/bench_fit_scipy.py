"""Side-by-side fit benchmark, driven by scripts/bench_fit.

    bench_fit_scipy.py generate DIR            writes DIR/two_exponentials.csv (100,000 rows)
    bench_fit_scipy.py compare DIR OURS.json [--markdown]
        times scipy.optimize.least_squares (analytic NumPy Jacobian, same start, same
        tolerances, trust-region scaling matched to ours: see PAIRS) on the same file and
        prints the table with our Google Benchmark numbers.

Model y = a1*exp(-k1*t) + a2*exp(-k2*t); data a1 = 3, k1 = 0.8, a2 = 1.5, k2 = 0.15,
t evenly in [0, 20], normal noise with sd 0.01, NumPy seed 20261201; start (1, 1, 1, 0.1).
Run with /usr/bin/python3 (Debian's python3-scipy, python3-numpy).
"""
import json
import platform
import sys
import time

import numpy as np
import scipy
from scipy.optimize import least_squares

ROWS = 100_000
START = np.array([1.0, 1.0, 1.0, 0.1])
TOL = 1e-12


def generate(directory):
    rng = np.random.default_rng(20261201)
    t = np.linspace(0.0, 20.0, ROWS)
    y = 3.0 * np.exp(-0.8 * t) + 1.5 * np.exp(-0.15 * t) + rng.normal(0.0, 0.01, ROWS)
    with open(f"{directory}/two_exponentials.csv", "w") as f:
        f.write("t,y\n")
        for a, b in zip(t, y):
            f.write(f"{a!r},{b!r}\n")


def scipy_fit(t, y, method, x_scale):
    def residuals(p):
        a1, k1, a2, k2 = p
        return a1 * np.exp(-k1 * t) + a2 * np.exp(-k2 * t) - y

    def jacobian(p):
        a1, k1, a2, k2 = p
        e1, e2 = np.exp(-k1 * t), np.exp(-k2 * t)
        return np.column_stack([e1, -a1 * t * e1, e2, -a2 * t * e2])

    best, best_cpu, result = None, None, None
    for _ in range(7):
        begin, begin_cpu = time.perf_counter(), time.process_time()
        result = least_squares(residuals, START, jac=jacobian, method=method, ftol=TOL, xtol=TOL, gtol=TOL,
                               x_scale=x_scale)
        elapsed, cpu = time.perf_counter() - begin, time.process_time() - begin_cpu
        best = elapsed if best is None else min(best, elapsed)
        best_cpu = cpu if best_cpu is None else min(best_cpu, cpu)
    return best, best_cpu, result


# Each SciPy run is set against our run with the same settings (benchmark names in
# tests/bench/bench_fit.cpp). MINPACK's lmder (SciPy 'lm') scales the trust region by
# diag = 1/x_scale (x_scale=1.0: a plain ball, MINPACK mode 2) or by the column norms of J
# (x_scale='jac', mode 1, Moré 1978), starts at radius factor * |diag * x0| with factor = 100,
# and stops on ftol, xtol, gtol. Ours: scaling none/jacobian, initial_radius_factor,
# reduction_below, scaled_radius_below, column_cosine_below.
PAIRS = (
    ("lm", 1.0, "MinpackUnitScaling",
     "scaling=none, initial_radius_factor=100, reduction/scaled radius/column cosine below 1e-12"),
    ("lm", "jac", "JacobianScaling",
     "scaling=jacobian, initial_radius_factor=1 (our defaults), reduction/scaled radius/column cosine below 1e-12"),
    ("trf", 1.0, "JacobianScaling", "as above (our defaults)"),
)


def compare(directory, ours_path, markdown):
    data = np.loadtxt(f"{directory}/two_exponentials.csv", delimiter=",", skiprows=1)
    t, y = data[:, 0].copy(), data[:, 1].copy()
    with open(ours_path) as f:
        ours = json.load(f)
    bench = {b["name"]: b for b in ours["benchmarks"]}
    to_ms = {"ms": 1.0, "us": 1e-3, "ns": 1e-6, "s": 1e3}

    def ms(b, key="real_time"):
        return b[key] * to_ms[b["time_unit"]]

    print(f"Fit benchmark: y = a1*exp(-k1*t) + a2*exp(-k2*t), {ROWS} rows, start {list(START)}")
    print(f"SciPy {scipy.__version__}, NumPy {np.__version__}, Python {platform.python_version()}, "
          f"{platform.machine()}, load average {' '.join(open('/proc/loadavg').read().split()[:3])}")
    print("Settings:")
    print(f"  SciPy: least_squares(fun, x0, jac=<analytic NumPy>, method, x_scale, ftol=xtol=gtol={TOL}); "
          "MINPACK factor 100 in 'lm'")
    seen = set()
    for method, x_scale, ours_name, ours_settings in PAIRS:
        if ours_name not in seen:
            print(f"  saddlewise {ours_name}: levenberg-marquardt, {ours_settings}")
            seen.add(ours_name)
    print("Iterations = trial points (one residual evaluation each: SciPy nfev - 1, our solver iterations);")
    print("per iteration = time to converge / iterations. Our times include the start checks and the exact")
    print("Hessian at the end point (its classification); best of SciPy's 7 runs, Google Benchmark's mean.")

    header = ["run", "iterations", "Jacobians", "time to converge (ms)", "per iteration (ms)",
              "our speed-up (total)", "our speed-up (per iteration)"]
    table, cpu_lines = [], []
    printed = set()
    for method, x_scale, ours_name, _ in PAIRS:
        b = bench["BM_LevenbergMarquardt" + ours_name]
        one = bench["BM_LevenbergMarquardt" + ours_name + "OneThread"]
        our_iters = b["solver_iterations"]
        our_ms = ms(b)
        if ours_name not in printed:
            table.append([f"saddlewise {ours_name} (2 threads)", f"{our_iters:.0f}", f"{b['jacobians']:.0f}",
                          f"{our_ms:.2f}", f"{our_ms / our_iters:.3f}", "", ""])
            cpu_lines.append((f"saddlewise {ours_name}, 1 thread", one["solver_iterations"], ms(one, "cpu_time"),
                              None))
            printed.add(ours_name)
            print(f"  saddlewise {ours_name}: x = [{b['x0']:.8f} {b['x1']:.8f} {b['x2']:.8f} {b['x3']:.8f}], "
                  f"RSS {b['rss']:.10g}")
        seconds, cpu, result = scipy_fit(t, y, method, x_scale)
        iters = result.nfev - 1
        name = f"scipy '{method}', x_scale={x_scale!r} (vs {ours_name})"
        total = seconds * 1e3
        table.append([name, f"{iters}", f"{result.njev}", f"{total:.2f}", f"{total / iters:.3f}",
                      f"{total / our_ms:.1f}x", f"{(total / iters) / (our_ms / our_iters):.1f}x"])
        cpu_lines.append((name, iters, cpu * 1e3, (one["solver_iterations"], ms(one, "cpu_time"))))
        rss = float(np.sum(result.fun ** 2))
        print(f"  {name}: x = {np.array2string(result.x, precision=8)}, RSS {rss:.10g}, status {result.status}")
    if markdown:
        print("| " + " | ".join(header) + " |")
        print("|" + "---|" * len(header))
        for row in table:
            print("| " + " | ".join(row) + " |")
    else:
        widths = [max(len(h), *(len(r[i]) for r in table)) for i, h in enumerate(header)]
        print("  ".join(h.ljust(w) for h, w in zip(header, widths)))
        for row in table:
            print("  ".join(c.ljust(w) for c, w in zip(row, widths)))
    print()
    print("CPU time, one thread each (less sensitive to other load on the machine):")
    for name, iters, cpu_ms, against in cpu_lines:
        per = cpu_ms / iters
        ratio = ""
        if against is not None:
            our_iters, our_cpu = against
            ratio = f"  our speed-up {cpu_ms / our_cpu:.1f}x total, {per / (our_cpu / our_iters):.1f}x per iteration"
        print(f"  {name:<52} {iters:4.0f} iterations  {cpu_ms:8.2f} ms  {per:7.3f} ms/iteration{ratio}")


if __name__ == "__main__":
    if sys.argv[1] == "generate":
        generate(sys.argv[2])
    else:
        compare(sys.argv[2], sys.argv[3], "--markdown" in sys.argv)
