"""Shared by the SciPy cross-check (scipy_minimize.py) and the SciPy side of scripts/bench_solve
(tests/bench/bench_solve_scipy.py): compile one problem's formula text (this program's syntax,
^ for powers) with SymPy into NumPy functions for the value, the exact gradient and the exact
Hessian, so SciPy gets the same exact derivatives as our engine derives itself."""
import numpy as np
import sympy


def compile_problem(problem):
    """problem: {"variables": [...], "formula": text}. Returns (f, g, h) taking a NumPy vector."""
    symbols = sympy.symbols(problem["variables"], real=True)
    names = {str(s): s for s in symbols}
    names.update({"sign": sympy.sign, "atan": sympy.atan, "exp": sympy.exp, "sqrt": sympy.sqrt,
                  "log": sympy.log, "pi": sympy.pi})
    expr = sympy.parse_expr(problem["formula"].replace("^", "**"), local_dict=names)
    # d sign(x)/dx is 0 wherever the formula is smooth (x != 0).
    grad = [sympy.diff(expr, s).replace(sympy.DiracDelta, lambda *a: 0) for s in symbols]
    hess = [[sympy.diff(gi, s).replace(sympy.DiracDelta, lambda *a: 0) for s in symbols] for gi in grad]
    f = sympy.lambdify(symbols, expr, "numpy")
    g = sympy.lambdify(symbols, grad, "numpy")
    h = sympy.lambdify(symbols, hess, "numpy")
    return (lambda x: float(f(*x)),
            lambda x: np.array(g(*x), dtype=float),
            lambda x: np.array(h(*x), dtype=float))
