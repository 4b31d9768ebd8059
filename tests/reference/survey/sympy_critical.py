#!/usr/bin/python3
"""Every real critical point of polynomial functions of two variables, for the critical-point
map's reference test (tests/reference/survey/critical_reference_test.cpp).

Input: a JSON file {"problems": [{"name", "formula" (SymPy syntax, variables x and y), "box":
[xlo, xhi, ylo, yhi]}]}. Output on stdout: {"sympy": version, "results": [{"name", "points":
[{"x", "y", "value", "eigenvalues", "kind", "index"}]}]}.

Method: the resultant of df/dx and df/dy in x is a polynomial in y; its real roots (nroots,
30 digits) give y; for each, the real roots of df/dx(., y) give candidate x; each candidate is
polished by sympy.nsolve on the gradient system at 30 digits and kept when it stays where it
started (to 1e-6). The Hessian's eigenvalues (closed form for 2 x 2, 30 digits) classify it.
"""
import json
import sys

import sympy as sp

x, y = sp.symbols("x y")


def critical_points(f, box):
    gx, gy = sp.expand(sp.diff(f, x)), sp.expand(sp.diff(f, y))
    resultant = sp.Poly(sp.resultant(gx, gy, x), y)
    found = []
    for root_y in resultant.nroots(n=30, maxsteps=300):
        if abs(sp.im(root_y)) > 1e-12:
            continue
        yr = sp.re(root_y)
        for root_x in sp.Poly(gx.subs(y, yr), x).nroots(n=30, maxsteps=300):
            if abs(sp.im(root_x)) > 1e-10:
                continue
            xr = sp.re(root_x)
            try:
                s = sp.nsolve([gx, gy], [x, y], [xr, yr], prec=30, tol=1e-25)
            except (ValueError, ZeroDivisionError):
                continue
            p = (s[0], s[1])
            if abs(p[0] - xr) > 1e-6 or abs(p[1] - yr) > 1e-6:
                continue
            if not (box[0] <= p[0] <= box[1] and box[2] <= p[1] <= box[3]):
                continue
            if any(abs(p[0] - q[0]) < 1e-12 and abs(p[1] - q[1]) < 1e-12 for q in found):
                continue
            found.append(p)
    hessian = sp.hessian(f, (x, y))
    points = []
    for px, py in sorted(found, key=lambda q: (float(q[0]), float(q[1]))):
        h = hessian.subs({x: px, y: py}).evalf(30)
        # A symmetric 2 x 2 matrix: (a + d)/2 -+ sqrt(((a - d)/2)^2 + b^2).
        a, b, d = h[0, 0], h[0, 1], h[1, 1]
        mean, radius = (a + d) / 2, sp.sqrt(((a - d) / 2) ** 2 + b ** 2)
        eigen = [float(mean - radius), float(mean + radius)]
        scale = max(abs(v) for v in eigen)
        negative = sum(1 for v in eigen if v < -1e-8 * scale)
        zero = sum(1 for v in eigen if abs(v) <= 1e-8 * scale)
        kind = "degenerate" if zero else ("minimum" if negative == 0 else ("maximum" if negative == 2 else "saddle"))
        points.append({"x": float(px), "y": float(py), "value": float(f.subs({x: px, y: py}).evalf(30)),
                       "eigenvalues": eigen, "kind": kind, "index": negative})
    return points


def main():
    request = json.load(open(sys.argv[1]))
    results = []
    for problem in request["problems"]:
        f = sp.sympify(problem["formula"], locals={"x": x, "y": y})
        results.append({"name": problem["name"], "points": critical_points(f, problem["box"])})
    json.dump({"sympy": sp.__version__, "results": results}, sys.stdout)


if __name__ == "__main__":
    main()
