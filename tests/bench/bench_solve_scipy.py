#!/usr/bin/python3
"""SciPy side of scripts/bench_solve: times scipy.optimize.minimize on the same problems and
method families as tests/bench/bench_solve.cpp and prints the side-by-side table.

    bench_solve_scipy.py PROBLEMS_JSON OURS_JSON [--markdown]

PROBLEMS_JSON comes from `bench_solve --problems-json`, OURS_JSON from
`bench_solve --benchmark_format=json`. SciPy gets exact derivatives compiled from the same
formula text by SymPy (lambdify to NumPy), so both sides use exact gradients and Hessians.
Times are CPU time per solve on both sides (process time here, Google Benchmark's cpu_time
for ours), so other load on the machine inflates neither side, and each is the smallest of
five repetitions (batches here, benchmark repetitions there): single runs of SciPy moved by
+-30 % from one run of the script to the next.
"""
import json
import os
import sys
import time
import warnings

import numpy as np
import scipy
import scipy.optimize

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "reference", "solve"))
from sympy_problem import compile_problem  # noqa: E402  (shared with the SciPy cross-check)

TARGET_RATIO = 100  # issue 3: at least 100x faster per solve, no more iterations for the same family

# Why a pair can fall short of the speed target, printed beside it (from perf profiles of our side and
# the per-iteration times in the table; see docs/BENCHMARKS.md). For extra iterations the table names how
# the two implementations differ; that this difference causes them is not proven.
BELOW_TARGET = {
    "lbfgs": "SciPy's L-BFGS-B is compiled Fortran, 25-40 us per iteration on these problems (its cheapest "
             "method); ours 0.28-0.45 us, of which the two-loop recursion alone (m = 10 pairs, each waiting on the "
             "previous) is 0.10 us at n = 2 and 0.14 us at n = 4; recycling the records changed it by < 2 %",
    "nelder-mead": "SciPy's Nelder-Mead costs 19-50 us per iteration; ours 0.13-0.46 us, the evaluations, the "
                   "record and the (uncounted) gradient shown at the best vertex",
    "trust-region-cg": "SciPy's trust-ncg iterations are its cheapest trust-region ones (~50-70 us); ours ~0.3-0.8 us, "
                       "mostly the exact Hessian and the record",
    "trust-region-dogleg": "SciPy's dogleg iterations are its cheapest trust-region ones (~50-75 us); ours ~0.3-0.8 us, "
                           "mostly the exact Hessian and the record",
}
MORE_ITERATIONS = {
    "trust-region-exact": "same radius update (N&W Alg. 4.1); SciPy's subproblem stops within 10% of the radius "
                          "(k_easy 0.1), ours solves it to rounding, so the paths part from the first step",
    "trust-region-cg": "same radius update (N&W Alg. 4.1); the cause is not traced",
    "trust-region-dogleg": "same radius update (N&W Alg. 4.1); ours shifts an indefinite Hessian where SciPy stops",
    "bfgs": "first trial step: SciPy starts each line search from N&W eq. 3.60, ours from the full step alpha = 1; "
            "option first_trial=previous_decrease takes SciPy's count (tests/reference/solve/scipy_variant_test.cpp) "
            "but more iterations over the whole catalogue",
    "lbfgs": "the same algorithm: both paths agree to rounding for ~25 iterations, then rounding differences "
             "(presumably L-BFGS-B's compact matrix vs our two-loop recursion) grow on the way through the saddle "
             "region",
    "cg-polak-ribiere": "line search: ours c2 = 0.02 with orthogonality restarts, SciPy c2 = 0.4 with a descent test; "
                        "SciPy's settings (options curvature=0.4 restart_orthogonality=0 descent_test=0.01) need 16 "
                        "here but more over the catalogue",
}
# Pairs whose iteration counts are sensitive to rounding: how far SciPy's own count moves when the start
# is perturbed at the 1e-16..1e-12 relative level (printed beside the extra iterations).
ROUNDING_SENSITIVE = {"lbfgs", "cg-polak-ribiere"}
PERTURBATIONS = (1e-16, 2e-16, 5e-16, 1e-15, 2e-15, 5e-15, 1e-14, 1e-13, 1e-12)


def rounding_spread(method, funcs, x0, gtol, simplex):
    """SciPy's iteration counts from starts perturbed by each relative size in PERTURBATIONS (a fixed pattern of
    signs per component): (smallest, largest, how many of those runs did not succeed)."""
    counts, failed = [], 0
    pattern = np.array([((i * 7 + 3) % 5 - 2) / 2.0 for i in range(len(x0))])
    for eps in PERTURBATIONS:
        result = scipy_solve(method, funcs, x0 * (1 + eps * pattern), gtol, simplex)
        counts.append(int(result.nit))
        failed += 0 if result.success else 1
    return min(counts), max(counts), failed


def exact_subproblem_iterations(funcs, x0, gtol):
    """SciPy's trust-exact with its subproblem solved to rounding (k_easy = k_hard = 1e-10 instead of 0.1, 0.2):
    its iteration count, or None when SciPy's private trust-region driver is not available."""
    try:
        from scipy.optimize._trustregion import _minimize_trust_region
        from scipy.optimize._trustregion_exact import IterativeSubproblem
    except ImportError:
        return None

    class ExactSubproblem(IterativeSubproblem):
        def __init__(self, x, fun, jac, hess, hessp=None, k_easy=0.1, k_hard=0.2):
            super().__init__(x, fun, jac, hess, hessp, k_easy=1e-10, k_hard=1e-10)

    f, g, h = funcs
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        result = _minimize_trust_region(f, x0, jac=g, hess=h, subproblem=ExactSubproblem, gtol=gtol, maxiter=5000)
    return int(result.nit)


def why_more(pair, funcs, x0, gtol, simplex):
    """The explanation of extra iterations, with a live check where one exists."""
    text = MORE_ITERATIONS.get(pair["ours"], "different step rules; see docs/BENCHMARKS.md")
    if pair["ours"] == "trust-region-exact" and pair["scipy"] == "trust-exact":
        tight = exact_subproblem_iterations(funcs, x0, gtol)
        if tight is not None:
            text += "; SciPy with its subproblem solved to rounding: %d iterations" % tight
    if pair["ours"] in ROUNDING_SENSITIVE:
        low, high, failed = rounding_spread(pair["scipy"], funcs, x0, gtol, simplex)
        text += "; SciPy from starts perturbed by 1e-16..1e-12: %d-%d iterations" % (low, high)
        if failed:
            text += ", %d of %d runs stopped short of gtol" % (failed, len(PERTURBATIONS))
    return text


NEEDS_HESSIAN = {"trust-exact", "trust-ncg", "dogleg", "Newton-CG", "trust-krylov"}
NEEDS_GRADIENT = NEEDS_HESSIAN | {"BFGS", "L-BFGS-B", "CG"}


def scipy_solve(method, funcs, x0, gtol, simplex=(1e-8, 1e-12)):
    f, g, h = funcs
    kwargs = {}
    options = {"maxiter": 5000}
    if method in NEEDS_GRADIENT:
        kwargs["jac"] = g
        options["gtol"] = gtol
    if method in NEEDS_HESSIAN:
        kwargs["hess"] = h
    if method in ("BFGS", "CG"):
        options["norm"] = 2  # SciPy's default is the max norm; ours is |g|_2 <= gtol (L-BFGS-B has no choice)
    if method == "L-BFGS-B":
        options = {"maxiter": 5000, "gtol": gtol, "ftol": 0.0}  # projected-gradient test only, like ours
    if method == "Nelder-Mead":
        # The same stopping test as ours: every vertex within xatol (max norm) of the best and
        # every value within fatol of the best value, with our default tolerances.
        options = {"maxiter": 5000, "xatol": simplex[0], "fatol": simplex[1]}
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        return scipy.optimize.minimize(f, x0, method=method, options=options, **kwargs)


def time_per_solve(method, funcs, x0, gtol, simplex, batches=5, batch_seconds=0.06):
    """CPU time per solve: the smallest mean over `batches` batches of at least `batch_seconds`
    each. The minimum is the run least disturbed by the rest of the machine (and by Python's
    garbage collector); ours is taken the same way (Google Benchmark repetitions, smallest)."""
    result = scipy_solve(method, funcs, x0, gtol, simplex)
    best = float("inf")
    for _ in range(batches):
        count, start = 0, time.process_time()
        while True:
            scipy_solve(method, funcs, x0, gtol, simplex)
            count += 1
            elapsed = time.process_time() - start
            if elapsed >= batch_seconds and count >= 3:
                break
        best = min(best, elapsed / count)
    return best, result


def main():
    problems = json.load(open(sys.argv[1]))
    ours = json.load(open(sys.argv[2]))
    markdown = "--markdown" in sys.argv
    our_runs = {}
    for b in ours["benchmarks"]:
        if b.get("run_type", "iteration") != "iteration":
            continue  # repetitions' aggregates (mean, median, ...): the smallest repetition is taken below
        unit = {"ns": 1e-9, "us": 1e-6, "ms": 1e-3, "s": 1.0}[b.get("time_unit", "ns")]
        name = b.get("run_name", b["name"])
        seconds = b["cpu_time"] * unit
        if name in our_runs and our_runs[name]["seconds"] <= seconds:
            continue
        our_runs[name] = {"seconds": seconds, "iterations": int(b.get("solver_iterations", -1)),
                          "value": float(b.get("final_value", float("nan")))}
    rows = []
    for problem in problems["problems"]:
        funcs = compile_problem(problem)
        x0 = np.array(problem["start"], dtype=float)
        for pair in problems["pairs"]:
            key = pair["ours"] + "/" + problem["name"]
            if key not in our_runs:
                continue
            mine = our_runs[key]
            simplex = (problems.get("simplex_size_below", 1e-8), problems.get("value_spread_below", 1e-12))
            seconds, result = time_per_solve(pair["scipy"], funcs, x0, problems["gtol"], simplex)
            ratio = seconds / mine["seconds"]
            scipy_iterations = int(getattr(result, "nit", -1))
            remarks = []
            if not result.success:
                remarks.append("SciPy stopped: " + str(result.message).split("\n")[0][:60])
            else:
                if ratio < TARGET_RATIO:
                    remarks.append("below %dx: %s" % (TARGET_RATIO, BELOW_TARGET.get(pair["ours"], "see docs/BENCHMARKS.md")))
                worse = float(result.fun) > mine["value"] + 1e-6 * abs(mine["value"]) + 1e-12
                if worse:
                    remarks.append("SciPy reported success at a higher f than ours, so not like for like")
                if mine["iterations"] > scipy_iterations >= 0 and not worse:
                    remarks.append("%d more iterations than SciPy (how the two differ: %s)" % (
                        mine["iterations"] - scipy_iterations, why_more(pair, funcs, x0, problems["gtol"], simplex)))
            rows.append((problem["name"], pair["ours"], pair["scipy"], mine["seconds"], seconds, ratio,
                         mine["iterations"], scipy_iterations, mine["value"], float(result.fun),
                         "; ".join(remarks), result.success))
    print("SciPy %s scipy.optimize.minimize vs Saddlewise, CPU time per solve (same start, exact derivatives, "
          "gtol %g)" % (scipy.__version__, problems["gtol"]))
    header = ("problem", "ours", "SciPy", "ours [us]", "SciPy [us]", "ratio", "ours it", "SciPy it", "ours f", "SciPy f",
              "note")
    if markdown:
        print("| " + " | ".join(header) + " |")
        print("|" + "---|" * len(header))
    else:
        print("%-18s %-20s %-12s %10s %11s %8s %8s %8s %11s %11s  %s" % header)
    for r in rows:
        cells = (r[0], r[1], r[2], "%.1f" % (r[3] * 1e6), "%.1f" % (r[4] * 1e6), "%.0fx" % r[5], str(r[6]), str(r[7]),
                 "%.3g" % r[8], "%.3g" % r[9], r[10])
        if markdown:
            print("| " + " | ".join(cells) + " |")
        else:
            print("%-18s %-20s %-12s %10s %11s %8s %8s %8s %11s %11s  %s" % cells)
    ratios = [r[5] for r in rows if r[11]]
    if ratios:
        print("where SciPy succeeded: median ratio %.0fx, smallest %.0fx, largest %.0fx over %d pairs"
              % (float(np.median(ratios)), min(ratios), max(ratios), len(ratios)))
    for family in sorted({r[1] for r in rows}):
        mine = [r[5] for r in rows if r[1] == family and r[11]]
        if mine:
            more = sum(1 for r in rows if r[1] == family and r[11] and r[6] > r[7] and "not like for like" not in r[10])
            print("  %-20s median ratio %.0fx, smallest %.0fx; %d of %d pairs at >= %dx; %d with more iterations than SciPy"
                  % (family, float(np.median(mine)), min(mine), sum(1 for x in mine if x >= TARGET_RATIO), len(mine),
                     TARGET_RATIO, more))


if __name__ == "__main__":
    main()
