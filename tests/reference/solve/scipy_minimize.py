#!/usr/bin/python3
"""Reference minimisations with SciPy for the solver cross-check (tests/reference/solve).

Reads a JSON file: {"gtol": g, "problems": [{"name", "variables", "formula", "start"}]},
where each formula is this program's formula text (^ for powers). Derivatives come from
SymPy (exact, like ours). For each problem runs scipy.optimize.minimize with method='BFGS'
and method='trust-exact' from the same start and prints one JSON object:
{"scipy": version, "sympy": version, "results": [{"name", "bfgs": {...}, "trust-exact": {...}}]}.
"""
import json
import sys
import warnings

import numpy as np
import scipy
import scipy.optimize
import sympy

from sympy_problem import compile_problem  # same directory


def summary(result):
    return {"x": [float(v) for v in result.x], "fun": float(result.fun), "nit": int(result.nit),
            "success": bool(result.success), "message": str(result.message)}


def main():
    with open(sys.argv[1]) as handle:
        request = json.load(handle)
    gtol = request.get("gtol", 1e-9)
    results = []
    for problem in request["problems"]:
        f, g, h = compile_problem(problem)
        x0 = np.array(problem["start"], dtype=float)
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            bfgs = scipy.optimize.minimize(f, x0, jac=g, method="BFGS", options={"gtol": gtol, "maxiter": 5000})
            exact = scipy.optimize.minimize(f, x0, jac=g, hess=h, method="trust-exact",
                                            options={"gtol": gtol, "maxiter": 5000})
        results.append({"name": problem["name"], "bfgs": summary(bfgs), "trust-exact": summary(exact)})
    json.dump({"scipy": scipy.__version__, "sympy": sympy.__version__, "results": results}, sys.stdout)


if __name__ == "__main__":
    main()
