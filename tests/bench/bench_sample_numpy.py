#!/usr/bin/python3
"""The NumPy route of the whole-process comparison in scripts/bench_expr: what a modeler would
write to get the summary `saddlewise sample FORMULA --box x=-3:3,y=-3:3 --grid N --order 2`
prints. SymPy derives the value, gradient and Hessian of the benchmark landscape, lambdify
(cse=True) turns them into one NumPy function, NumPy evaluates it on the N x N grid, and for
each output the minimum, maximum and mean of the finite values and the count of the others are
printed. Timed as a whole process (interpreter start and imports included) by the caller.

Usage: bench_sample_numpy.py [N]   (default 2000)
"""
import sys

import numpy as np
import sympy as sp

FORMULA = "0.1*x**4 + 0.1*y**4 - 0.5*x*y + 3*exp(-0.5*((x - 1)**2 + (y + 0.5)**2))*sin(2*x)*cos(3*y)"


def main():
    n = int(sys.argv[1]) if len(sys.argv) > 1 else 2000
    x, y = sp.symbols("x y", real=True)
    f = sp.sympify(FORMULA, locals={"x": x, "y": y})
    outputs = [f, sp.diff(f, x), sp.diff(f, y), sp.diff(f, x, x), sp.diff(f, x, y), sp.diff(f, y, y)]
    names = ["f", "df/dx", "df/dy", "d2f/dx2", "d2f/dxdy", "d2f/dy2"]
    fn = sp.lambdify((x, y), outputs, modules="numpy", cse=True)
    axis = np.linspace(-3.0, 3.0, n)
    X, Y = np.meshgrid(axis, axis)
    for name, values in zip(names, fn(X, Y)):
        values = np.broadcast_to(values, X.shape)
        finite = np.isfinite(values)
        kept = values[finite]
        print("%-10s %24.17g %24.17g %24.17g %d" % (name, kept.min(), kept.max(), kept.mean(), values.size - kept.size))


if __name__ == "__main__":
    main()
