#!/usr/bin/python3
"""Reference values, gradients and Hessians computed with SymPy for sympy_reference_test.

Usage: sympy_derivatives.py FORMULAS.json OUTPUT.json

Each entry holds a formula in our syntax (muParser's) and a point; an entry may give the
SymPy spelling itself ("sympy") where the syntax differs beyond the simple mapping below
(comparisons as numbers, && and ||). Variables are x, y, z in that order, real.
Derivatives are evaluated at the point with 40 significant digits.
"""
import json
import sys

import sympy as sp


def main():
    formulas_path, output_path = sys.argv[1], sys.argv[2]
    with open(formulas_path) as f:
        entries = json.load(f)
    x, y, z = sp.symbols("x y z", real=True)
    names = {
        "x": x, "y": y, "z": z,
        "ln": sp.log, "log": sp.log,
        "log10": lambda u: sp.log(u, 10), "log2": lambda u: sp.log(u, 2),
        "abs": sp.Abs, "sign": sp.sign, "min": sp.Min, "max": sp.Max,
        "atan2": sp.atan2, "pi": sp.pi, "e": sp.E,
    }
    results = []
    for entry in entries:
        point = entry["at"]
        variables = [x, y, z][: len(point)]
        text = entry.get("sympy")
        if text is None:
            text = entry["formula"]
            if "?" in text:  # c ? a : b with a single comparison as condition
                condition, rest = text.split("?")
                whenTrue, whenFalse = rest.split(":")
                text = "Piecewise((%s, %s), (%s, True))" % (whenTrue, condition, whenFalse)
            text = text.replace("^", "**")
        f = sp.parse_expr(text, local_dict=names)
        at = dict(zip(variables, [sp.Float(repr(v), 40) for v in point]))

        def number(expr):
            value = sp.N(expr.subs(at), 40)
            return float(value)

        gradient = [sp.diff(f, v) for v in variables]
        results.append({
            "formula": entry["formula"],
            "sympy": str(f),
            "value": number(f),
            "gradient": [number(g) for g in gradient],
            "hessian": [[number(sp.diff(g, v)) for v in variables] for g in gradient],
        })
    with open(output_path, "w") as f:
        json.dump({"sympy_version": sp.__version__, "results": results}, f, indent=1)


if __name__ == "__main__":
    main()
