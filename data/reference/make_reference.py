#!/usr/bin/python3
"""
Reference fixtures for Quadrat's model fits, produced with statsmodels.

Run (Debian packages python3-statsmodels, python3-scipy, python3-pandas):

    /usr/bin/python3 data/reference/make_reference.py [--out DIR]

DIR defaults to the folder of this script (data/reference). For every case it writes
<case>.csv (the data) and <case>.json (statsmodels' fits plus checks derived from them).

The data sets are GENERATED (invented) with numpy.random.default_rng(seed) from the
models stated below; they are not survey data.

Each data set is written to CSV first (fixed number format) and read back before
fitting, so the fits refer exactly to the numbers another program reads from the CSV.
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
import scipy.linalg
import scipy.optimize
import statsmodels
import statsmodels.formula.api as smf

LETTERS = "ABCDEFGHIJKLMNOPQRSTUVWXYZ"


# ---------------------------------------------------------------------------
# Data generation (invented data)
# ---------------------------------------------------------------------------

def one_way(seed, sd_b):
    """8 groups of sizes 3..12, y = 5 + 0.7 x + b_g + e, sd_e = 1."""
    rng = np.random.default_rng(seed)
    sizes = [3, 4, 5, 7, 8, 10, 11, 12]
    rows = []
    for j, size in enumerate(sizes):
        b = rng.normal(0.0, sd_b)
        for _ in range(size):
            x = rng.uniform(0.0, 4.0)
            y = 5.0 + 0.7 * x + b + rng.normal(0.0, 1.0)
            rows.append({"g": LETTERS[j], "x": x, "y": y})
    return pd.DataFrame(rows, columns=["g", "x", "y"])


def crossed(seed):
    """site (6) x year (4) x 5 obs, y = 2 + 0.5 rain + site + year + e."""
    rng = np.random.default_rng(seed)
    sd_site, sd_year, sd_e = 1.0, 0.7, 0.8
    site_eff = rng.normal(0.0, sd_site, 6)
    year_eff = rng.normal(0.0, sd_year, 4)
    rows = []
    for s in range(6):
        for t in range(4):
            for _ in range(5):
                rain = rng.uniform(0.0, 6.0)
                y = 2.0 + 0.5 * rain + site_eff[s] + year_eff[t] + rng.normal(0.0, sd_e)
                rows.append({"site": LETTERS[s], "year": 2019 + t, "rain": rain, "y": y})
    truth = {"intercept": 2.0, "rain": 0.5, "sd_site": sd_site, "sd_year": sd_year, "sd_residual": sd_e}
    return pd.DataFrame(rows, columns=["site", "year", "rain", "y"]), truth


def nested(seed):
    """5 sites, plots 1..4 within each site (labels repeat across sites), 3 obs per plot."""
    rng = np.random.default_rng(seed)
    sd_site, sd_plot, sd_e = 1.0, 0.6, 0.5
    rows = []
    for s in range(5):
        a = rng.normal(0.0, sd_site)
        for p in range(4):
            c = rng.normal(0.0, sd_plot)
            for _ in range(3):
                x = rng.uniform(0.0, 2.0)
                y = 3.0 + 0.4 * x + a + c + rng.normal(0.0, sd_e)
                rows.append({"site": LETTERS[s], "plot": p + 1, "x": x, "y": y})
    truth = {"intercept": 3.0, "x": 0.4, "sd_site": sd_site, "sd_plot": sd_plot, "sd_residual": sd_e}
    return pd.DataFrame(rows, columns=["site", "plot", "x", "y"]), truth


def random_slope(seed):
    """8 groups x 10 obs; intercept and slope on x vary by group (sd 1, 0.5, corr 0.3)."""
    rng = np.random.default_rng(seed)
    sd0, sd1, rho, sd_e = 1.0, 0.5, 0.3, 0.7
    cov = np.array([[sd0 * sd0, rho * sd0 * sd1], [rho * sd0 * sd1, sd1 * sd1]])
    rows = []
    for j in range(8):
        b0, b1 = rng.multivariate_normal([0.0, 0.0], cov)
        for _ in range(10):
            x = rng.uniform(-2.0, 2.0)
            y = 1.0 + 0.8 * x + b0 + b1 * x + rng.normal(0.0, sd_e)
            rows.append({"g": LETTERS[j], "x": x, "y": y})
    truth = {"intercept": 1.0, "x": 0.8, "sd_intercept": sd0, "sd_slope": sd1, "corr": rho, "sd_residual": sd_e}
    return pd.DataFrame(rows, columns=["g", "x", "y"]), truth


def ols_fixed(seed):
    """5 sites as fixed effects (unequal sizes) plus a covariate."""
    rng = np.random.default_rng(seed)
    site_means = [0.0, 1.5, -0.8, 0.6, 2.2]
    sizes = [6, 9, 7, 10, 8]
    rows = []
    for s, size in enumerate(sizes):
        for _ in range(size):
            x = rng.uniform(0.0, 10.0)
            y = 4.0 + 0.3 * x + site_means[s] + rng.normal(0.0, 1.1)
            rows.append({"site": LETTERS[s], "x": x, "y": y})
    truth = {"intercept": 4.0, "x": 0.3, "site_offsets": dict(zip(LETTERS, site_means)), "sd_residual": 1.1}
    return pd.DataFrame(rows, columns=["site", "x", "y"]), truth


# ---------------------------------------------------------------------------
# Case table. `structure` describes the random part for the dense checks below:
# each block is (Quadrat factor name, columns giving the level identity, terms).
# ---------------------------------------------------------------------------

def build_cases():
    cases = []
    df = one_way(101, 1.2)
    cases.append({
        "case": "one-way-unbalanced",
        "description": "8 groups, sizes 3..12; y = 5 + 0.7 x + b_g + e; sd_b 1.2, sd_e 1.",
        "seed": 101, "data": df,
        "truth": {"intercept": 5.0, "x": 0.7, "sd_g": 1.2, "sd_residual": 1.0},
        "model": {"response": "y", "fixed": ["x"], "groups": [{"factor": "g", "as": "random"}]},
        "statsmodels": {"formula": "y ~ x", "groups": "g", "re_formula": "1", "vc_formula": None},
        "structure": [{"factor": "g", "key": ["g"], "terms": ["intercept"]}],
        "re_names": {"g": ["intercept"]},
    })
    df = one_way(202, 0.05)
    cases.append({
        "case": "one-way-near-zero",
        "description": "As one-way-unbalanced but sd_b 0.05: the group variance is near the zero boundary.",
        "seed": 202, "data": df,
        "truth": {"intercept": 5.0, "x": 0.7, "sd_g": 0.05, "sd_residual": 1.0},
        "model": {"response": "y", "fixed": ["x"], "groups": [{"factor": "g", "as": "random"}]},
        "statsmodels": {"formula": "y ~ x", "groups": "g", "re_formula": "1", "vc_formula": None},
        "structure": [{"factor": "g", "key": ["g"], "terms": ["intercept"]}],
        "re_names": {"g": ["intercept"]},
    })
    df, truth = crossed(303)
    cases.append({
        "case": "crossed",
        "description": "site (6) x year (4) x 5 obs; y = 2 + 0.5 rain + site + year + e; sd 1, 0.7, 0.8.",
        "seed": 303, "data": df, "truth": truth,
        "model": {"response": "y", "fixed": ["rain"],
                  "groups": [{"factor": "site", "as": "random"}, {"factor": "year", "as": "random"}]},
        "statsmodels": {"formula": "y ~ rain", "groups": None, "re_formula": "0",
                        "vc_formula": {"site": "0 + C(site)", "year": "0 + C(year)"}},
        "structure": [{"factor": "site", "key": ["site"], "terms": ["intercept"]},
                      {"factor": "year", "key": ["year"], "terms": ["intercept"]}],
        "re_names": {},
    })
    df, truth = nested(404)
    cases.append({
        "case": "nested",
        "description": "5 sites, plots 1..4 within site (labels repeat), 3 obs per plot; "
                       "y = 3 + 0.4 x + site + plot + e; sd 1, 0.6, 0.5.",
        "seed": 404, "data": df, "truth": truth,
        "model": {"response": "y", "fixed": ["x"],
                  "groups": [{"factor": "site", "as": "random"},
                             {"factor": "plot", "within": "site", "as": "random"}]},
        "statsmodels": {"formula": "y ~ x", "groups": "site", "re_formula": "1",
                        "vc_formula": {"plot": "0 + C(plot)"}},
        "structure": [{"factor": "site", "key": ["site"], "terms": ["intercept"]},
                      {"factor": "plot", "key": ["site", "plot"], "terms": ["intercept"]}],
        "re_names": {"site": ["intercept"]},
    })
    df, truth = random_slope(505)
    cases.append({
        "case": "random-slope",
        "description": "8 groups x 10 obs; y = 1 + 0.8 x + b0_g + b1_g x + e; "
                       "sd(b0) 1, sd(b1) 0.5, corr 0.3, sd_e 0.7.",
        "seed": 505, "data": df, "truth": truth,
        "model": {"response": "y", "fixed": ["x"],
                  "groups": [{"factor": "g", "as": "random", "slopes": ["x"], "correlated": True}]},
        "statsmodels": {"formula": "y ~ x", "groups": "g", "re_formula": "1 + x", "vc_formula": None},
        "structure": [{"factor": "g", "key": ["g"], "terms": ["intercept", "x"]}],
        "re_names": {"g": ["intercept", "x"]},
    })
    df, truth = ols_fixed(606)
    cases.append({
        "case": "ols-fixed",
        "description": "5 sites as fixed effects (sizes 6..10) plus covariate x; ordinary least squares.",
        "seed": 606, "data": df, "truth": truth,
        "model": {"response": "y", "fixed": ["x"], "groups": [{"factor": "site", "as": "fixed"}]},
        "statsmodels": {"formula": "y ~ x + C(site)"},
        "structure": [],
        "re_names": {},
    })
    return cases


# ---------------------------------------------------------------------------
# CSV round trip
# ---------------------------------------------------------------------------

def fmt(v):
    if isinstance(v, (float, np.floating)):
        return "%.6f" % v
    return str(v)


def write_csv(df, path):
    with open(path, "w", newline="\n") as f:
        f.write(",".join(df.columns) + "\n")
        for row in df.itertuples(index=False):
            f.write(",".join(fmt(v) for v in row) + "\n")


# ---------------------------------------------------------------------------
# Dense Gaussian likelihoods (n x n), independent of statsmodels' internals.
# ML: log N(y; X beta, V). REML (Harville 1974; Patterson & Thompson 1971), in the form
# without the constant +0.5 log|X'X|:
#   -0.5 [ (n-p) log(2 pi) + log|V| + log|X'V^-1 X| + r'V^-1 r ],  r = y - X beta_GLS.
# ---------------------------------------------------------------------------

def design_z(df, block):
    key = df[block["key"]].astype(str).agg("/".join, axis=1)
    levels = sorted(key.unique())
    index = {lv: i for i, lv in enumerate(levels)}
    n, k = len(df), len(block["terms"])
    Z = np.zeros((n, len(levels) * k))
    for i, lv in enumerate(key):
        for t, term in enumerate(block["terms"]):
            Z[i, index[lv] * k + t] = 1.0 if term == "intercept" else df[term].iloc[i]
    return Z, len(levels), k


def dense_loglik(X, y, V, reml, beta=None):
    n, p = X.shape
    C = np.linalg.cholesky(V)
    logdet_v = 2.0 * np.sum(np.log(np.diag(C)))
    Ci_X = scipy.linalg.solve_triangular(C, X, lower=True)
    Ci_y = scipy.linalg.solve_triangular(C, y, lower=True)
    xtvx = Ci_X.T @ Ci_X
    beta_gls = np.linalg.solve(xtvx, Ci_X.T @ Ci_y)
    if reml:
        r = Ci_y - Ci_X @ beta_gls
        _, logdet_xvx = np.linalg.slogdet(xtvx)
        return -0.5 * ((n - p) * math.log(2 * math.pi) + logdet_v + logdet_xvx + r @ r), beta_gls, xtvx
    b = beta_gls if beta is None else beta
    r = Ci_y - Ci_X @ b
    return -0.5 * (n * math.log(2 * math.pi) + logdet_v + r @ r), beta_gls, xtvx


def covariance(Zs, covs, sigma2, n):
    """V = sum_b Z_b (I_q kron Sigma_b) Z_b' + sigma2 I."""
    V = sigma2 * np.eye(n)
    for (Z, q, k), S in zip(Zs, covs):
        V += Z @ np.kron(np.eye(q), S) @ Z.T
    return V


def theta_to_covs(theta, Zs):
    """Relative covariance blocks Sigma_b = L_b L_b' from lower-triangular entries (row-wise)."""
    covs, pos = [], 0
    for (_, _, k) in Zs:
        L = np.zeros((k, k))
        for i in range(k):
            for j in range(i + 1):
                L[i, j] = theta[pos]
                pos += 1
        covs.append(L @ L.T)
    return covs


def theta_bounds(Zs):
    b = []
    for (_, _, k) in Zs:
        for i in range(k):
            for j in range(i + 1):
                b.append((0.0, None) if i == j else (None, None))
    return b


def profiled(theta, X, y, Zs, reml):
    """Profiled (over beta and sigma^2) log-likelihood at relative parameters theta."""
    n, p = X.shape
    V = covariance(Zs, theta_to_covs(theta, Zs), 1.0, n)
    C = np.linalg.cholesky(V)
    logdet_v = 2.0 * np.sum(np.log(np.diag(C)))
    Ci_X = scipy.linalg.solve_triangular(C, X, lower=True)
    Ci_y = scipy.linalg.solve_triangular(C, y, lower=True)
    xtvx = Ci_X.T @ Ci_X
    beta = np.linalg.solve(xtvx, Ci_X.T @ Ci_y)
    r = Ci_y - Ci_X @ beta
    q = r @ r
    if reml:
        m = n - p
        _, ld = np.linalg.slogdet(xtvx)
        return -0.5 * (m * math.log(2 * math.pi * q / m) + logdet_v + ld + m)
    return -0.5 * (n * math.log(2 * math.pi * q / n) + logdet_v + n)


def independent_optimum(X, y, Zs, reml):
    """Maximise the dense profiled likelihood from several starts (scipy L-BFGS-B)."""
    nt = sum(k * (k + 1) // 2 for (_, _, k) in Zs)
    starts = []
    for s in (0.0, 0.1, 0.5, 1.0, 2.0):
        th = []
        for (_, _, k) in Zs:
            for i in range(k):
                for j in range(i + 1):
                    th.append(s if i == j else 0.0)
        starts.append(np.array(th))
    best = None
    for th0 in starts:
        res = scipy.optimize.minimize(lambda t: -profiled(t, X, y, Zs, reml), th0,
                                      method="L-BFGS-B", bounds=theta_bounds(Zs),
                                      options={"ftol": 1e-15, "gtol": 1e-10, "maxiter": 2000})
        if best is None or res.fun < best.fun:
            best = res
    assert best is not None and nt == len(best.x)
    return -best.fun, best.x


# ---------------------------------------------------------------------------
# statsmodels fits
# ---------------------------------------------------------------------------

def quadrat_fixed_name(name):
    if name == "Intercept":
        return "intercept"
    if name.startswith("C(") and ")[T." in name:
        col = name[2:name.index(")")]
        level = name[name.index("[T.") + 3:-1]
        return "%s=%s" % (col, level)
    return name


# Tighter than statsmodels' L-BFGS-B defaults (factr 1e7): with those, SDs stop about 3e-4
# (relative) short of the optimum; with these they agree with the dense optimum to ~1e-7.
LBFGS_OPTIONS = {"factr": 10.0, "pgtol": 1e-10}


def finite_or_none(v):
    return float(v) if np.isfinite(v) else None


def mixed_model(case, df):
    sm = case["statsmodels"]
    groups = np.ones(len(df)) if sm["groups"] is None else df[sm["groups"]]
    return smf.mixedlm(sm["formula"], df, groups=groups, re_formula=sm["re_formula"],
                       vc_formula=sm["vc_formula"])


def run_fit(model, reml, method, start):
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        kwargs = dict(LBFGS_OPTIONS) if method == "lbfgs" else {}
        res = model.fit(reml=reml, method=[method], start_params=start, **kwargs)
    # statsmodels warns "Argument factr not used by MixedLM.fit" although the options reach
    # scipy's L-BFGS-B (the optimum moves when they change): that message is dropped.
    messages = set(str(w.message).split("\n")[0] for w in caught)
    return res, sorted(m for m in messages if " not used by MixedLM.fit" not in m)


def variance_blocks(case, model, res):
    """Absolute covariance blocks by Quadrat factor name. cov_re and vcomp are already
    multiplied by `scale` (the residual variance) in statsmodels' results."""
    covs = {}
    for factor in case["re_names"]:
        covs[factor] = np.asarray(res.cov_re, dtype=float)
    for name, v in zip(model.exog_vc.names, np.asarray(res.vcomp, dtype=float)):
        covs[name] = np.array([[v]])
    return covs


def summarise_fit(case, model, res, reml, call, found_warnings):
    fixed = []
    for i, name in enumerate(model.exog_names):
        fixed.append({"term": quadrat_fixed_name(name), "statsmodels_name": name,
                      "estimate": float(res.fe_params.iloc[i]),
                      "se": finite_or_none(res.bse_fe.iloc[i])})
    covs = variance_blocks(case, model, res)
    random, correlations = [], []
    for block in case["structure"]:
        cov = covs[block["factor"]]
        terms = block["terms"]
        for t, term in enumerate(terms):
            random.append({"factor": block["factor"], "term": term, "variance": float(cov[t, t]),
                           "sd": math.sqrt(max(cov[t, t], 0.0))})
        for a in range(len(terms)):
            for b in range(a + 1, len(terms)):
                denom = math.sqrt(max(cov[a, a] * cov[b, b], 0.0))
                correlations.append({"factor": block["factor"], "terms": [terms[a], terms[b]],
                                     "value": float(cov[a, b] / denom) if denom > 0 else None})
    return {
        "estimation": "REML" if reml else "ML",
        "call": call,
        "fixed": fixed,
        "random": random,
        "correlations": correlations,
        "residual_variance": float(res.scale),
        "residual_sd": math.sqrt(float(res.scale)),
        "llf": finite_or_none(res.llf),
        "converged": bool(res.converged),
        "warnings": found_warnings,
    }, covs


def case_arrays(case, df):
    y = df["y"].to_numpy(float)
    X = np.column_stack([np.ones(len(df))] + [df[c].to_numpy(float) for c in case["model"]["fixed"]])
    Zs = [design_z(df, b) for b in case["structure"]]
    return X, y, Zs


def optimum_summary(case, X, y, Zs, reml):
    """The independent optimum: llf, SDs, residual SD, GLS beta and SEs there."""
    n, p = X.shape
    best_ll, best_theta = independent_optimum(X, y, Zs, reml)
    covs_rel = theta_to_covs(best_theta, Zs)
    Vrel = covariance(Zs, covs_rel, 1.0, n)
    _, beta, xtvx_rel = dense_loglik(X, y, Vrel, True)
    r = y - X @ beta
    sigma2 = r @ np.linalg.solve(Vrel, r) / ((n - p) if reml else n)
    sds = []
    for b, S in zip(case["structure"], covs_rel):
        for t, term in enumerate(b["terms"]):
            sds.append({"factor": b["factor"], "term": term, "sd": math.sqrt(max(S[t, t] * sigma2, 0.0))})
    se = np.sqrt(np.diag(np.linalg.inv(xtvx_rel)) * sigma2)
    return {
        "method": "scipy L-BFGS-B on the dense profiled likelihood; starts with all relative SDs "
                  "in {0, 0.1, 0.5, 1, 2}; best kept",
        "llf": float(best_ll), "residual_sd": math.sqrt(sigma2), "random": sds,
        "fixed": [float(v) for v in beta], "gls_se": [float(v) for v in se],
    }


def dense_checks(X, y, Zs, case, fit, covs, reml):
    """Fix the conventions: the dense likelihood at statsmodels' estimates and the GLS
    standard errors sqrt(diag((X'V^-1X)^-1)) there (V on the absolute scale)."""
    V = covariance(Zs, [covs[b["factor"]] for b in case["structure"]], fit["residual_variance"], len(y))
    beta_sm = np.array([f["estimate"] for f in fit["fixed"]])
    ll_dense, beta_gls, xtvx = dense_loglik(X, y, V, reml, beta=beta_sm)
    _, logdet_xtx = np.linalg.slogdet(X.T @ X)
    return {
        "dense_llf_at_statsmodels": float(ll_dense),
        "gls_beta_at_statsmodels": [float(v) for v in beta_gls],
        "gls_se_at_statsmodels": [float(v) for v in np.sqrt(np.diag(np.linalg.inv(xtvx)))],
        "logdet_XtX": float(logdet_xtx),
    }


def fit_mixed_case(case, df):
    """REML then ML. The brief's call is L-BFGS from statsmodels' default start. When it ends
    with a non-finite llf (statsmodels returns +inf at an exactly zero variance) or below the
    independent optimum, retry: L-BFGS from the REML estimates (ML only), then BFGS and Powell
    from the default start; the best finite llf becomes the reference, all attempts are listed."""
    X, y, Zs = case_arrays(case, df)
    model = mixed_model(case, df)
    sm = case["statsmodels"]
    base = "smf.mixedlm(%r, df, groups=%s, re_formula=%r, vc_formula=%r)" % (
        sm["formula"], "np.ones(n)" if sm["groups"] is None else "df[%r]" % sm["groups"],
        sm["re_formula"], sm["vc_formula"])
    fits, reml_res = {}, None
    for reml in (True, False):
        optimum = optimum_summary(case, X, y, Zs, reml)
        plans = [("lbfgs", None, "default start")]
        if not reml:
            plans.append(("lbfgs", reml_res.params_object, "start at the REML estimates"))
        plans += [("bfgs", None, "default start"), ("powell", None, "default start")]
        attempts, best = [], None
        for method, start, start_text in plans:
            res, found = run_fit(model, reml, method, start)
            opts = ", %s" % ", ".join("%s=%r" % kv for kv in LBFGS_OPTIONS.items()) if method == "lbfgs" else ""
            call = "%s.fit(reml=%s, method=[%r]%s)  # %s" % (base, reml, method, opts, start_text)
            ok = bool(np.isfinite(res.llf) and res.llf >= optimum["llf"] - 1e-6)
            summary, _ = summarise_fit(case, model, res, reml, call, found)
            attempts.append({"call": call, "llf": finite_or_none(res.llf), "converged": bool(res.converged),
                             "at_optimum": ok,
                             "fixed": [f["estimate"] for f in summary["fixed"]],
                             "random": summary["random"], "correlations": summary["correlations"],
                             "residual_variance": summary["residual_variance"]})
            if np.isfinite(res.llf) and (best is None or res.llf > best[0].llf):
                best = (res, found, call)
            if ok:
                break
        if best is None:
            raise RuntimeError("%s %s: every statsmodels attempt ended with a non-finite llf"
                               % (case["case"], "REML" if reml else "ML"))
        res, found, call = best
        if reml:
            reml_res = res
        fit, covs = summarise_fit(case, model, res, reml, call, found)
        fit["attempts"] = attempts
        fit["at_optimum"] = bool(fit["llf"] >= optimum["llf"] - 1e-6)
        # Boundary: a component whose SD at the optimum is below 1e-3 residual SDs.
        fit["boundary"] = bool(any(r["sd"] < 1e-3 * optimum["residual_sd"] for r in optimum["random"]))
        fit["checks"] = dense_checks(X, y, Zs, case, fit, covs, reml)
        fit["checks"]["independent_optimum"] = optimum
        fits["REML" if reml else "ML"] = fit
    return fits


def fit_ols(case, df):
    res = smf.ols(case["statsmodels"]["formula"], df).fit()
    ci = res.conf_int(0.05)
    fixed = []
    for name in res.params.index:
        fixed.append({"term": quadrat_fixed_name(name), "statsmodels_name": name,
                      "estimate": float(res.params[name]), "se": float(res.bse[name]),
                      "df": float(res.df_resid),
                      "lower": float(ci.loc[name, 0]), "upper": float(ci.loc[name, 1])})
    return {
        "estimation": "OLS",
        "call": "smf.ols(%r, df).fit(); conf_int(0.05)" % case["statsmodels"]["formula"],
        "fixed": fixed,
        "random": [],
        "correlations": [],
        "residual_variance": float(res.scale),
        "residual_sd": math.sqrt(float(res.scale)),
        "llf": float(res.llf),
        "converged": True,
        "warnings": [],
    }


def main():
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--out", default=os.path.dirname(os.path.abspath(__file__)),
                        help="output folder (default: the folder of this script)")
    args = parser.parse_args()
    os.makedirs(args.out, exist_ok=True)
    versions = {"statsmodels": statsmodels.__version__, "scipy": scipy.__version__,
                "pandas": pd.__version__, "numpy": np.__version__, "python": platform.python_version()}
    for case in build_cases():
        csv_path = os.path.join(args.out, case["case"] + ".csv")
        write_csv(case["data"], csv_path)
        df = pd.read_csv(csv_path)
        doc = {
            "case": case["case"],
            "description": case["description"],
            "data": {"file": case["case"] + ".csv", "rows": len(df), "seed": case["seed"],
                     "generator": "numpy.random.default_rng(seed); invented data, not a survey",
                     "truth": case["truth"]},
            "model": case["model"],
            "versions": versions,
            "fits": {},
        }
        if case["case"] == "ols-fixed":
            doc["fits"]["OLS"] = fit_ols(case, df)
        else:
            doc["fits"] = fit_mixed_case(case, df)
        with open(os.path.join(args.out, case["case"] + ".json"), "w") as f:
            json.dump(doc, f, indent=2, allow_nan=False)
            f.write("\n")
        print("wrote", case["case"], file=sys.stderr)


if __name__ == "__main__":
    main()
