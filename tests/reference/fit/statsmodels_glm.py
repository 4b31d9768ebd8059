"""Reference fits for tests/reference/fit/statsmodels_test.cpp.

Generates two data sets with a fixed seed (written as CSV into the directory given as the
first argument), fits them with statsmodels, and prints one JSON object with the
coefficients, standard errors, log-likelihoods and deviances, and the versions used.
Run with /usr/bin/python3 (Debian's python3-statsmodels, python3-numpy).
"""
import json
import sys

import numpy as np
import statsmodels
import statsmodels.api as sm


def main():
    out = sys.argv[1]
    rng = np.random.default_rng(20261201)

    # Logistic: P(y=1) = 1 / (1 + exp(-(-0.4 + 1.3 x1 - 0.8 x2))), x1 ~ N(0,1), x2 ~ U(-2, 2).
    n = 500
    x1 = rng.normal(0.0, 1.0, n)
    x2 = rng.uniform(-2.0, 2.0, n)
    eta = -0.4 + 1.3 * x1 - 0.8 * x2
    y = (rng.uniform(0.0, 1.0, n) < 1.0 / (1.0 + np.exp(-eta))).astype(float)
    with open(f"{out}/logistic.csv", "w") as f:
        f.write("x1,x2,outcome\n")
        for a, b, c in zip(x1, x2, y):
            f.write(f"{a!r},{b!r},{c:.0f}\n")
    X = sm.add_constant(np.column_stack([x1, x2]))
    logit = sm.Logit(y, X).fit(method="newton", tol=1e-14, maxiter=200, disp=0)
    glm_b = sm.GLM(y, X, family=sm.families.Binomial()).fit(tol=1e-14)

    # Poisson: counts with mean exp(0.3 + 0.5 u - 0.25 v), u ~ U(0, 3), v ~ N(0, 1).
    m = 400
    u = rng.uniform(0.0, 3.0, m)
    v = rng.normal(0.0, 1.0, m)
    counts = rng.poisson(np.exp(0.3 + 0.5 * u - 0.25 * v)).astype(float)
    with open(f"{out}/poisson.csv", "w") as f:
        f.write("u,v,count\n")
        for a, b, c in zip(u, v, counts):
            f.write(f"{a!r},{b!r},{c:.0f}\n")
    Z = sm.add_constant(np.column_stack([u, v]))
    pois = sm.Poisson(counts, Z).fit(method="newton", tol=1e-14, maxiter=200, disp=0)
    glm_p = sm.GLM(counts, Z, family=sm.families.Poisson()).fit(tol=1e-14)

    print(json.dumps({
        "statsmodels": statsmodels.__version__,
        "numpy": np.__version__,
        "logistic": {"params": list(logit.params), "bse": list(logit.bse), "llf": logit.llf,
                     "deviance": glm_b.deviance},
        "poisson": {"params": list(pois.params), "bse": list(pois.bse), "llf": pois.llf,
                    "deviance": glm_p.deviance},
    }))


if __name__ == "__main__":
    main()
