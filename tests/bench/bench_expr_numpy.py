#!/usr/bin/python3
"""NumPy route for scripts/bench_expr: SymPy derives the value, gradient and Hessian of the
benchmark landscape, lambdify turns them into NumPy functions, and NumPy evaluates them on
the same 1000 x 1000 grid. Prints one JSON object with the best of several runs.

Usage: bench_expr_numpy.py [REPEATS]
"""
import json
import sys
import time

import numpy as np
import sympy as sp

FORMULA = "0.1*x**4 + 0.1*y**4 - 0.5*x*y + 3*exp(-0.5*((x - 1)**2 + (y + 0.5)**2))*sin(2*x)*cos(3*y)"
GRID = 1000
LO, HI = -3.0, 3.0


def main():
    repeats = int(sys.argv[1]) if len(sys.argv) > 1 else 5
    x, y = sp.symbols("x y", real=True)
    f = sp.sympify(FORMULA, locals={"x": x, "y": y})
    outputs = [f, sp.diff(f, x), sp.diff(f, y), sp.diff(f, x, x), sp.diff(f, x, y), sp.diff(f, y, y)]
    # One function for all six, with common subexpressions shared (lambdify(cse=True)).
    started = time.perf_counter()
    fn = sp.lambdify((x, y), outputs, modules="numpy", cse=True)
    lambdify_seconds = time.perf_counter() - started
    axis = np.linspace(LO, HI, GRID)
    X, Y = np.meshgrid(axis, axis)  # row-major, x fastest, as ours
    best = float("inf")
    for _ in range(repeats):
        started = time.perf_counter()
        values = fn(X, Y)
        values = [np.broadcast_to(v, X.shape) for v in values]
        best = min(best, time.perf_counter() - started)
    checksum = [float(np.nansum(v)) for v in values]
    print(json.dumps({
        "numpy_version": np.__version__,
        "sympy_version": sp.__version__,
        "seconds": best,
        "lambdify_seconds": lambdify_seconds,
        "points": GRID * GRID,
        "checksum": checksum,
    }))


if __name__ == "__main__":
    main()
