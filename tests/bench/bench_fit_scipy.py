"""Side-by-side fit benchmark, driven by scripts/bench_fit.

    bench_fit_scipy.py generate DIR            writes DIR/two_exponentials.csv (100,000 rows)
    bench_fit_scipy.py compare DIR OURS.json [--markdown]
        times scipy.optimize.least_squares (analytic NumPy Jacobian, same start, same
        tolerances) on the same file and prints the table with our Google Benchmark numbers.

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
    for _ in range(5):
        begin, begin_cpu = time.perf_counter(), time.process_time()
        result = least_squares(residuals, START, jac=jacobian, method=method, ftol=TOL, xtol=TOL, gtol=TOL,
                               x_scale=x_scale)
        elapsed, cpu = time.perf_counter() - begin, time.process_time() - begin_cpu
        best = elapsed if best is None else min(best, elapsed)
        best_cpu = cpu if best_cpu is None else min(best_cpu, cpu)
    return best, best_cpu, result


def compare(directory, ours_path, markdown):
    data = np.loadtxt(f"{directory}/two_exponentials.csv", delimiter=",", skiprows=1)
    t, y = data[:, 0].copy(), data[:, 1].copy()
    with open(ours_path) as f:
        ours = json.load(f)
    bench = {b["name"]: b for b in ours["benchmarks"]}
    lm = bench["BM_LevenbergMarquardtTwoExponentials"]
    diag = bench["BM_LevenbergMarquardtWithDiagnostics"]
    to_ms = {"ms": 1.0, "us": 1e-3, "ns": 1e-6, "s": 1e3}

    def ms(b):
        return b["real_time"] * to_ms[b["time_unit"]]

    rows = []
    our_ms = ms(lm)
    one = bench["BM_LevenbergMarquardtOneThread"]
    one_cpu_ms = one["cpu_time"] * to_ms[one["time_unit"]]
    rows.append(("saddlewise levenberg-marquardt", None, None, our_ms, None, lm))
    rows.append(("saddlewise levenberg-marquardt + diagnostics", None, None, ms(diag), None, diag))
    cpu_rows = [("saddlewise levenberg-marquardt, 1 thread", one["solver_iterations"], one_cpu_ms)]
    # x_scale='jac' is MINPACK's own column scaling (Moré 1978), the scaling our LM uses;
    # SciPy's default x_scale=1.0 runs MINPACK with a fixed unit scaling.
    for method, x_scale in (("lm", 1.0), ("lm", "jac"), ("trf", 1.0)):
        seconds, cpu, result = scipy_fit(t, y, method, x_scale)
        name = f"scipy least_squares '{method}', x_scale={x_scale!r}"
        rows.append((name, result.njev, result.nfev, seconds * 1e3, result, None))
        cpu_rows.append((name, result.njev, cpu * 1e3))

    print(f"Fit benchmark: y = a1*exp(-k1*t) + a2*exp(-k2*t), {ROWS} rows, start {list(START)}, "
          f"ftol = xtol = {TOL}")
    print(f"SciPy {scipy.__version__}, NumPy {np.__version__}, Python {platform.python_version()}, "
          f"{platform.machine()}, load average {open('/proc/loadavg').read().split()[0]}")
    ours_iter = lm["solver_iterations"]
    ours_per_iter = our_ms / ours_iter
    header = ["run", "iterations", "Jacobians", "residual passes", "time to converge (ms)", "per iteration (ms)",
              "our speed-up (total)", "our speed-up (per iteration)"]
    table = []
    for name, njev, nfev, total_ms, result, b in rows:
        if b is not None:
            iters = b["solver_iterations"]
            table.append([name, f"{iters:.0f}", f"{b['jacobians']:.0f}", f"{b['residual_passes']:.0f}",
                          f"{total_ms:.1f}", f"{total_ms / iters:.2f}", "", ""])
        else:
            per = total_ms / njev
            table.append([name, f"{njev}", f"{njev}", f"{nfev}", f"{total_ms:.1f}", f"{per:.2f}",
                          f"{total_ms / our_ms:.1f}x", f"{per / ours_per_iter:.1f}x"])
            rss = float(np.sum(result.fun ** 2))
            print(f"  {name}: x = {np.array2string(result.x, precision=8)}, RSS {rss:.10g}, status {result.status}")
    print(f"  saddlewise: x = [{lm['x0']:.8f} {lm['x1']:.8f} {lm['x2']:.8f} {lm['x3']:.8f}], RSS {lm['rss']:.10g}")
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
    print("Iterations count Jacobian evaluations for SciPy (njev); time per iteration = total / that.")
    print()
    print("CPU time (one thread each; insensitive to other load on the machine):")
    ours_cpu_per_iter = cpu_rows[0][2] / cpu_rows[0][1]
    for name, iters, cpu_ms in cpu_rows:
        per = cpu_ms / iters
        ratio = "" if name.startswith("saddlewise") else (
            f"  our speed-up {cpu_ms / cpu_rows[0][2]:.1f}x total, {per / ours_cpu_per_iter:.1f}x per iteration")
        print(f"  {name:<48} {iters:4.0f} iterations  {cpu_ms:8.1f} ms  {per:7.2f} ms/iteration{ratio}")


if __name__ == "__main__":
    if sys.argv[1] == "generate":
        generate(sys.argv[2])
    else:
        compare(sys.argv[2], sys.argv[3], "--markdown" in sys.argv)
