#!/usr/bin/python3
"""
Time statsmodels' REML fit of one mixed model, for comparison with Quadrat's engine.

    /usr/bin/python3 bench/statsmodels_bench.py <case.csv> <kind> <repeats>

kind: intercept  y ~ x (or rain), random intercept for g (or site)
      crossed    y ~ rain (or x), crossed random intercepts for site and year
      slope      y ~ x, correlated random intercept and slope on x for g
Prints JSON {"fitsPerSecond", "seconds", "params"}; only the fit calls are timed.
Needs Debian's python3-statsmodels (run with /usr/bin/python3).
"""

import json
import sys
import time
import warnings

import numpy as np
import pandas as pd
import statsmodels.formula.api as smf


def pick(df, *names):
    for name in names:
        if name in df.columns:
            return name
    sys.exit("column missing: expected one of %s in %s" % (", ".join(names), list(df.columns)))


def build(df, kind):
    x = pick(df, "x", "rain")
    formula = "y ~ %s" % x
    if kind == "intercept":
        g = pick(df, "g", "site")
        return smf.mixedlm(formula, df, groups=df[g])
    if kind == "crossed":
        pick(df, "site")
        pick(df, "year")
        return smf.mixedlm(formula, df, groups=np.ones(len(df)), re_formula="0",
                           vc_formula={"site": "0 + C(site)", "year": "0 + C(year)"})
    if kind == "slope":
        g = pick(df, "g", "site")
        return smf.mixedlm(formula, df, groups=df[g], re_formula="1 + %s" % x)
    sys.exit("kind must be intercept, crossed or slope, got %r" % kind)


def main():
    if len(sys.argv) != 4:
        sys.exit(__doc__)
    path, kind, repeats = sys.argv[1], sys.argv[2], int(sys.argv[3])
    if repeats < 1:
        sys.exit("repeats must be a positive integer, got %d" % repeats)
    df = pd.read_csv(path)
    warnings.simplefilter("ignore")
    model = build(df, kind)  # formula parsing and design building are not timed
    result = None
    start = time.perf_counter()
    for _ in range(repeats):
        try:
            result = model.fit(reml=True, method=["lbfgs"])
        except np.linalg.LinAlgError:
            # L-BFGS can step onto a singular point near a zero variance; retry as a user would
            result = model.fit(reml=True, method=["bfgs"])
    seconds = time.perf_counter() - start
    params = {str(k): float(v) for k, v in result.fe_params.items()}
    params["scale"] = float(result.scale)
    for k, v in zip(model.exog_vc.names, np.asarray(result.vcomp)):
        params["vcomp:" + k] = float(v)
    cov = np.asarray(result.cov_re)
    for i in range(cov.shape[0]):
        for j in range(i + 1):
            params["cov_re:%d,%d" % (i, j)] = float(cov[i, j])
    print(json.dumps({"fitsPerSecond": repeats / seconds, "seconds": seconds, "params": params}))


if __name__ == "__main__":
    main()
