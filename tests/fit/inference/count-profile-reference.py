"""
Brute-force profile-likelihood limits for tests/fit/inference/count-profile.test.ts, computed
independently of Quadrat with statsmodels and scipy (Debian python3-statsmodels, python3-scipy).
Usage: count-profile-reference.py <csv with g, x, effort, y> <level>. Prints JSON:
  glm:  per coefficient [lower, upper], where 2(llf_hat - llf(v)) = chi2_1(level), the other
        coefficient refitted by statsmodels GLM(Poisson, offset=log(effort) + v*x_j), scipy brentq;
  glmm: a Poisson random intercept by group; the marginal log-likelihood by 40-node Gauss-Hermite
        around each group's mode (found by Newton), maximised by scipy Nelder-Mead; limits for the
        slope of x and for the group SD by brentq on the profile (Pawitan 2001, In All Likelihood, 2.4).
"""
import sys, json, math
import numpy as np, pandas as pd, scipy.optimize as so, scipy.special as sp
import statsmodels.api as sm
df = pd.read_csv(sys.argv[1]); level = float(sys.argv[2])
crit = float(__import__('scipy').stats.chi2.ppf(level, 1))
off = np.log(df['effort'].to_numpy()); x = df['x'].to_numpy(); y = df['y'].to_numpy().astype(float)
X = np.column_stack([np.ones(len(y)), x])
out = {}
# GLM: profile of each coefficient, the other one re-fitted by statsmodels GLM with v*x_j in the offset
full = sm.GLM(y, X, family=sm.families.Poisson(), offset=off).fit(tol=1e-14)
glm = []
for j in range(2):
    keep = [a for a in range(2) if a != j]
    def stat(v):
        r = sm.GLM(y, X[:, keep], family=sm.families.Poisson(), offset=off + v * X[:, j]).fit(tol=1e-14)
        return 2 * (full.llf - r.llf) - crit
    b, se = full.params[j], full.bse[j]
    glm.append([so.brentq(stat, b - 10 * se, b, xtol=1e-12), so.brentq(stat, b, b + 10 * se, xtol=1e-12)])
out['glm'] = glm
# GLMM: random intercept by group; marginal likelihood by adaptive Gauss-Hermite with 40 nodes around each group's mode
codes, groups = pd.factorize(df['g'], sort=True)
idx = [np.where(codes == g)[0] for g in range(len(groups))]
t, w = np.polynomial.hermite.hermgauss(40)
lgy = sp.gammaln(y + 1)
def loglik(b0, b1, sd):
    tot = 0.0
    for ii in idx:
        fx = b0 + b1 * x[ii] + off[ii]; yy = y[ii]; c = -lgy[ii].sum()
        if sd <= 0:
            tot += np.sum(yy * fx - np.exp(fx)) + c; continue
        u = 0.0
        for _ in range(50):  # Newton for the mode of h(u) = sum(y(f+sd u) - e^(f+sd u)) - u^2/2
            mu = np.exp(fx + sd * u); g = sd * np.sum(yy - mu) - u; hh = -sd * sd * np.sum(mu) - 1
            step = g / hh; u -= step
            if abs(step) < 1e-13: break
        s = 1 / math.sqrt(-hh)
        uu = u + math.sqrt(2) * s * t
        e = fx[:, None] + sd * uu[None, :]
        h = np.sum(yy[:, None] * e - np.exp(e), axis=0) - uu * uu / 2
        tot += c + math.log(math.sqrt(2) * s / math.sqrt(2 * math.pi)) + sp.logsumexp(h + t * t + np.log(w))
    return tot
def best(fixed_index, value, start):
    free = [i for i in range(3) if i != fixed_index]
    def f(z):
        p = [0.0, 0.0, 0.0]; p[fixed_index] = value
        for i, zz in zip(free, z): p[i] = zz
        p[2] = abs(p[2]) if fixed_index != 2 else p[2]
        return -loglik(*p)
    r = so.minimize(f, [start[i] for i in free], method='Nelder-Mead', options={'xatol': 1e-8, 'fatol': 1e-11, 'maxiter': 4000})
    return -r.fun
r = so.minimize(lambda p: -loglik(p[0], p[1], abs(p[2])), [0.4, 0.35, 0.5], method='Nelder-Mead', options={'xatol': 1e-9, 'fatol': 1e-12, 'maxiter': 4000})
mle = [r.x[0], r.x[1], abs(r.x[2])]; lhat = -r.fun
def limits(i, lo, hi):
    stat = lambda v: 2 * (lhat - best(i, v, mle)) - crit
    return [so.brentq(stat, lo, mle[i], xtol=1e-9), so.brentq(stat, mle[i], hi, xtol=1e-9)]
out['glmm'] = {'mle': mle, 'llf': lhat, 'x': limits(1, mle[1] - 1, mle[1] + 1), 'sd': limits(2, 1e-6, 3 * mle[2])}
print(json.dumps(out))
