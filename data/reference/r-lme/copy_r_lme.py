#!/usr/bin/env python3
"""Copy the R mixed-model results shipped in statsmodels' own test suite into JSON, with their data.

Source: Debian's python3-statsmodels, folder statsmodels/regression/tests/results/ (BSD-3 licence,
Copyright 2009-2022 Statsmodels Developers): data sets lme00.csv .. lme11.csv (made by
generate_lme.py there) and lme_r_results.py (values from R, written by the statsmodels developers).
Nothing is refitted here: the numbers are copied as published, at the precision they are given.

    /usr/bin/python3 data/reference/r-lme/copy_r_lme.py [--out DIR]
"""
import argparse
import json
import os
import shutil

import numpy as np
import statsmodels
from statsmodels.regression.tests.results import lme_r_results as r

RESULTS_DIR = os.path.dirname(os.path.abspath(r.__file__))


def matrix(name):
    return np.atleast_2d(getattr(r, name)).tolist()


def main():
    parser = argparse.ArgumentParser()
    parser.add_argument("--out", default=os.path.dirname(os.path.abspath(__file__)))
    out = parser.parse_args().out
    cases = []
    for ds in range(12):
        data = "lme%02d.csv" % ds
        shutil.copyfile(os.path.join(RESULTS_DIR, data), os.path.join(out, data))
        # statsmodels' test suite has independent-effects results only where there are two random effects
        for structure in ["drf", "irf"]:
            for method in ["reml", "ml"]:
                b = "_%s_%s_%d" % (method, structure, ds)
                if not hasattr(r, "coef" + b):
                    continue
                cases.append({
                    "data": data,
                    "estimation": method.upper(),
                    "random_effects": "correlated" if structure == "drf" else "independent",
                    "coef": np.atleast_1d(getattr(r, "coef" + b)).tolist(),
                    "vcov": matrix("vcov" + b),
                    "cov_re": matrix("cov_re" + b),
                    "scale": float(np.atleast_1d(getattr(r, "scale" + b))[0]),
                    "loglike": float(np.atleast_1d(getattr(r, "loglike" + b))[0]),
                })
    doc = {
        "source": "statsmodels/regression/tests/results/lme_r_results.py and lme*.csv (values from R)",
        "statsmodels_version": statsmodels.__version__,
        "cases": cases,
    }
    with open(os.path.join(out, "results.json"), "w") as f:
        json.dump(doc, f, indent=1)
        f.write("\n")


if __name__ == "__main__":
    main()
