#!/usr/bin/python3
"""
Reference values for Quadrat's count and detection models, produced with statsmodels and scipy.

Run (Debian packages python3-statsmodels, python3-scipy, python3-pandas):

    /usr/bin/python3 data/reference/counts/make_count_reference.py [--out DIR]

DIR defaults to the folder of this script. Writes <case>.csv (GENERATED, invented data drawn
with numpy.random.default_rng(seed)) and <case>.json (reference fits), plus pmf.json (probability
tables for the variate tests). Every CSV is written with six decimals and read back before fitting.

References per case:
  glm:          statsmodels GLM with the family and link of the case (the mixed model with its
                random-effect SD held at zero must equal it)
  nb_ml:        statsmodels discrete NegativeBinomial (loglike_method "nb2"): ML of beta and alpha = 1/k
  marginal_ml:  for a random intercept, the maximum of the marginal log-likelihood computed by
                scipy.integrate.quad per group (no Gauss-Hermite rule), maximised by scipy.optimize
"""

import argparse
import json
import math
import os
import platform
import sys
import warnings

import numpy as np
import pandas as pd
import scipy
import scipy.integrate
import scipy.optimize
import scipy.special
import scipy.stats
import statsmodels
import statsmodels.api as sm
from statsmodels.discrete.discrete_model import NegativeBinomial


def versions():
    return {
        "statsmodels": statsmodels.__version__, "scipy": scipy.__version__, "pandas": pd.__version__,
        "numpy": np.__version__, "python": platform.python_version(),
    }


def poisson_groups(seed):
    """12 groups x 10 visits; effort 0.5..2 as offset log(effort); y ~ Poisson(effort exp(0.3 + 0.5 x + b_g)), sd_b 0.6."""
    rng = np.random.default_rng(seed)
    rows = []
    for j in range(12):
        b = rng.normal(0.0, 0.6)
        for _ in range(10):
            x = rng.uniform(-1.0, 1.0)
            effort = rng.uniform(0.5, 2.0)
            y = rng.poisson(effort * math.exp(0.3 + 0.5 * x + b))
            rows.append({"g": "g%02d" % (j + 1), "x": x, "effort": effort, "y": y})
    return pd.DataFrame(rows)


def binomial_groups(seed):
    """10 groups x 8; trials 1..6; y ~ Binomial(m, logistic(-0.4 + 0.9 x + b_g)), sd_b 0.8."""
    rng = np.random.default_rng(seed)
    rows = []
    for j in range(10):
        b = rng.normal(0.0, 0.8)
        for _ in range(8):
            x = rng.uniform(-1.0, 1.0)
            m = int(rng.integers(1, 7))
            p = 1 / (1 + math.exp(-(-0.4 + 0.9 * x + b)))
            rows.append({"g": "g%02d" % (j + 1), "x": x, "m": m, "y": int(rng.binomial(m, p))})
    return pd.DataFrame(rows)


def presence_groups(seed):
    """15 ponds x 6 visits, detected (0/1) with probability logistic(0.2 + 1.0 x + b_pond), sd_b 1."""
    rng = np.random.default_rng(seed)
    rows = []
    for j in range(15):
        b = rng.normal(0.0, 1.0)
        for _ in range(6):
            x = rng.uniform(-1.0, 1.0)
            p = 1 / (1 + math.exp(-(0.2 + 1.0 * x + b)))
            rows.append({"g": "p%02d" % (j + 1), "x": x, "y": int(rng.random() < p)})
    return pd.DataFrame(rows)


def nb_groups(seed):
    """15 groups x 8; y ~ NB2(mean exp(1 + 0.6 x + b_g), k = 2), sd_b 0.4 (gamma-Poisson)."""
    rng = np.random.default_rng(seed)
    rows = []
    for j in range(15):
        b = rng.normal(0.0, 0.4)
        for _ in range(8):
            x = rng.uniform(-1.0, 1.0)
            mu = math.exp(1.0 + 0.6 * x + b)
            lam = rng.gamma(2.0, mu / 2.0)
            rows.append({"g": "g%02d" % (j + 1), "x": x, "y": int(rng.poisson(lam))})
    return pd.DataFrame(rows)


def poisson_even(seed):
    """8 groups, each holding the same 6 (x, y) rows in a different order: the group totals are
    equal, so the between-group variance is estimated at zero (a boundary fit)."""
    rng = np.random.default_rng(seed)
    base = [(float(rng.uniform(-1, 1)), 0) for _ in range(6)]
    base = [(x, int(rng.poisson(math.exp(0.8 + 0.5 * x)))) for x, _ in base]
    rows = []
    for j in range(8):
        for i in rng.permutation(6):
            rows.append({"g": "g%02d" % (j + 1), "x": base[i][0], "y": base[i][1]})
    return pd.DataFrame(rows)


def roundtrip(df, path):
    df.to_csv(path, index=False, float_format="%.6f")
    return pd.read_csv(path)


def glm_reference(df, family, offset=None, trials=None):
    X = sm.add_constant(df[["x"]].to_numpy())
    if trials is not None:
        endog = np.column_stack([df["y"].to_numpy(), (df[trials] - df["y"]).to_numpy()])
    else:
        endog = df["y"].to_numpy()
    kw = {}
    if offset is not None:
        kw["offset"] = offset
    res = sm.GLM(endog, X, family=family, **kw).fit(tol=1e-14, maxiter=200)
    return {
        "call": "GLM(y, [1, x], family=%s%s).fit(tol=1e-14)" % (type(family).__name__, ", offset=log(effort)" if offset is not None else ""),
        "fixed": [{"term": t, "estimate": float(b), "se": float(s)} for t, b, s in zip(["intercept", "x"], res.params, res.bse)],
        "llf": float(res.llf), "pearson_chi2": float(res.pearson_chi2), "df_resid": float(res.df_resid),
    }


def marginal_ml(df, family, offset=None, trials=None, k=None):
    """ML of (beta0, beta1, sd) for a random intercept, integrating each group with scipy.integrate.quad."""
    groups = [g for _, g in df.groupby("g", sort=True)]
    data = []
    for g in groups:
        x = g["x"].to_numpy()
        y = g["y"].to_numpy().astype(float)
        off = offset[g.index].to_numpy() if offset is not None else np.zeros(len(g))
        m = g[trials].to_numpy().astype(float) if trials is not None else None
        data.append((x, y, off, m))

    def log_cond(eta, y, m):
        if family == "poisson":
            return np.sum(scipy.stats.poisson.logpmf(y, np.exp(eta)))
        if family == "binomial":
            return np.sum(scipy.stats.binom.logpmf(y, m, scipy.special.expit(eta)))
        mu = np.exp(eta)
        return np.sum(scipy.stats.nbinom.logpmf(y, k, k / (k + mu)))

    def loglik(params):
        b0, b1, sd = params
        sd = abs(sd)
        total = 0.0
        for x, y, off, m in data:
            fixed = b0 + b1 * x + off
            # centre the integral at the integrand's maximum so quad sees the bulk of the mass
            f = lambda u: -(log_cond(fixed + sd * u, y, m) - 0.5 * u * u)
            c = scipy.optimize.minimize_scalar(f, bounds=(-12, 12), method="bounded", options={"xatol": 1e-10}).x
            peak = -f(c)
            val, _ = scipy.integrate.quad(lambda u: math.exp(-f(u) - peak), -np.inf, np.inf, epsabs=0, epsrel=1e-13, limit=400, points=None) if False else \
                scipy.integrate.quad(lambda u: math.exp(-f(u) - peak), c - 40, c + 40, epsabs=0, epsrel=1e-13, limit=400, points=[c])
            total += peak + math.log(val) - 0.5 * math.log(2 * math.pi)
        return total

    return loglik


def fit_marginal(loglik, start):
    best = None
    for s in start:
        r = scipy.optimize.minimize(lambda p: -loglik(p), s, method="Nelder-Mead",
                                    options={"xatol": 1e-9, "fatol": 1e-12, "maxiter": 20000, "maxfev": 40000})
        if best is None or r.fun < best.fun:
            best = r
    b0, b1, sd = best.x
    return {"call": "scipy.optimize.minimize(Nelder-Mead) of the scipy.integrate.quad marginal log-likelihood",
            "fixed": [{"term": "intercept", "estimate": float(b0)}, {"term": "x", "estimate": float(b1)}],
            "sd": float(abs(sd)), "llf": float(-best.fun)}


def pmf_tables():
    out = {"poisson": [], "binomial": [], "negative_binomial": []}
    for mean in [0.3, 4.0, 9.5, 10.0, 37.5, 400.0]:
        hi = int(scipy.stats.poisson.ppf(1 - 1e-12, mean)) + 1
        out["poisson"].append({"mean": mean, "pmf": [float(v) for v in scipy.stats.poisson.pmf(np.arange(hi + 1), mean)]})
    for n, p in [(1, 0.3), (6, 0.7), (20, 0.45), (50, 0.3), (1000, 0.02), (200, 0.9)]:
        out["binomial"].append({"trials": n, "probability": p, "pmf": [float(v) for v in scipy.stats.binom.pmf(np.arange(n + 1), n, p)]})
    for mean, k in [(2.0, 0.5), (5.0, 2.0), (30.0, 5.0), (3.0, 50.0)]:
        hi = int(scipy.stats.nbinom.ppf(1 - 1e-12, k, k / (k + mean))) + 1
        out["negative_binomial"].append({"mean": mean, "aggregation": k,
                                         "pmf": [float(v) for v in scipy.stats.nbinom.pmf(np.arange(hi + 1), k, k / (k + mean))]})
    out["call"] = "scipy.stats.{poisson,binom,nbinom}.pmf; nbinom(n=k, p=k/(k+mean))"
    return out


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--out", default=os.path.dirname(os.path.abspath(__file__)))
    ap.add_argument("--quick", action="store_true", help="skip the slow marginal maximisations")
    args = ap.parse_args()
    os.makedirs(args.out, exist_ok=True)
    warnings.simplefilter("ignore")

    cases = []
    df = roundtrip(poisson_groups(20261), os.path.join(args.out, "poisson-groups.csv"))
    off = np.log(df["effort"])
    case = {"case": "poisson-groups", "seed": 20261, "family": "poisson", "offset": "log(effort)",
            "glm": glm_reference(df, sm.families.Poisson(), offset=off.to_numpy())}
    if not args.quick:
        g = case["glm"]["fixed"]
        case["marginal_ml"] = fit_marginal(marginal_ml(df, "poisson", offset=off), [[g[0]["estimate"], g[1]["estimate"], 0.5]])
    cases.append(case)

    df = roundtrip(binomial_groups(20262), os.path.join(args.out, "binomial-groups.csv"))
    case = {"case": "binomial-groups", "seed": 20262, "family": "binomial", "trials": "m",
            "glm": glm_reference(df, sm.families.Binomial(), trials="m")}
    if not args.quick:
        g = case["glm"]["fixed"]
        case["marginal_ml"] = fit_marginal(marginal_ml(df, "binomial", trials="m"), [[g[0]["estimate"], g[1]["estimate"], 0.7]])
    cases.append(case)

    df = roundtrip(presence_groups(20263), os.path.join(args.out, "presence-groups.csv"))
    case = {"case": "presence-groups", "seed": 20263, "family": "binomial", "trials": 1,
            "glm": glm_reference(df, sm.families.Binomial())}
    cases.append(case)

    df = roundtrip(nb_groups(20264), os.path.join(args.out, "nb-groups.csv"))
    X = sm.add_constant(df[["x"]].to_numpy())
    case = {"case": "nb-groups", "seed": 20264, "family": "negative-binomial", "aggregation_fixed": 2.0,
            "glm": glm_reference(df, sm.families.NegativeBinomial(alpha=0.5))}
    nbres = NegativeBinomial(df["y"].to_numpy(), X, loglike_method="nb2").fit(method="bfgs", maxiter=2000, gtol=1e-10, disp=0)
    case["nb_ml"] = {"call": "NegativeBinomial(y, [1, x], loglike_method='nb2').fit(method='bfgs', gtol=1e-10)",
                     "fixed": [{"term": t, "estimate": float(b), "se": float(s)} for t, b, s in zip(["intercept", "x"], nbres.params[:2], nbres.bse[:2])],
                     "alpha": float(nbres.params[2]), "aggregation": float(1 / nbres.params[2]), "llf": float(nbres.llf)}
    if not args.quick:
        g = case["glm"]["fixed"]
        case["marginal_ml_k2"] = fit_marginal(marginal_ml(df, "negative-binomial", k=2.0), [[g[0]["estimate"], g[1]["estimate"], 0.4]])
    cases.append(case)

    df = roundtrip(poisson_even(20265), os.path.join(args.out, "poisson-even.csv"))
    case = {"case": "poisson-even", "seed": 20265, "family": "poisson", "glm": glm_reference(df, sm.families.Poisson())}
    cases.append(case)

    for case in cases:
        case["versions"] = versions()
        with open(os.path.join(args.out, case["case"] + ".json"), "w") as f:
            json.dump(case, f, indent=1, sort_keys=True)
            f.write("\n")
    with open(os.path.join(args.out, "pmf.json"), "w") as f:
        tables = pmf_tables()
        tables["versions"] = versions()
        json.dump(tables, f, sort_keys=True)
        f.write("\n")


if __name__ == "__main__":
    sys.exit(main())
