#!/usr/bin/python3
"""
Time statsmodels' GLM fit (no random effect) of a count or detection data set, for comparison with
Quadrat's mixed-model fits of the same data.

    /usr/bin/python3 bench/statsmodels_glm_bench.py <case.csv> <poisson|binomial> <repeats>

poisson:  y ~ x, log link, offset log(effort) when the CSV has an effort column
binomial: successes y out of trials m, logit link
Prints JSON {"fitsPerSecond", "fitsPerCpuSecond", "seconds", "llf"}; only the fit calls are timed
(wall time, and this process's CPU time for the per-core rate on a shared machine).
"""

import json
import sys
import time

import numpy as np
import pandas as pd
import statsmodels.api as sm


def main():
    path, family, repeats = sys.argv[1], sys.argv[2], int(sys.argv[3])
    df = pd.read_csv(path)
    X = sm.add_constant(df[["x"]].to_numpy())
    if family == "poisson":
        kw = {"offset": np.log(df["effort"].to_numpy())} if "effort" in df.columns else {}
        model = sm.GLM(df["y"].to_numpy(), X, family=sm.families.Poisson(), **kw)
    else:
        endog = np.column_stack([df["y"].to_numpy(), (df["m"] - df["y"]).to_numpy()])
        model = sm.GLM(endog, X, family=sm.families.Binomial())
    res = model.fit()
    start = time.perf_counter()
    cpu_start = time.process_time()
    for _ in range(repeats):
        res = model.fit()
    seconds = time.perf_counter() - start
    cpu = time.process_time() - cpu_start
    print(json.dumps({"fitsPerSecond": repeats / seconds, "fitsPerCpuSecond": repeats / cpu, "seconds": seconds, "llf": float(res.llf)}))


if __name__ == "__main__":
    main()
