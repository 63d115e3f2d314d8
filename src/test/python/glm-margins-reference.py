"""Average marginal effects of a 0/1 key predictor and their delta-method standard errors from statsmodels
(Seabold & Perktold 2010, "statsmodels: Econometric and statistical modeling with Python", Proceedings of
the 9th Python in Science Conference), a second reference beside R for two of the GLM plans:

    birthwt-smoking-plan.json   Logit and Probit, smoke (0/1), errors classical, HC0 and cluster:age
    quine-plan.json             Poisson, Eth (A = 0, N = 1), errors classical and HC0

For each of those specifications it fits the model by Newton's method and asks
get_margeff(at="overall", dummy=True): the mean over rows of F(x_i with the key at 1) - F(x_i with the key
at 0), with the analytic gradient of that mean for the delta method. Forkscape's cluster errors for a GLM
are sandwich::vcovCL's default for a glm, the cluster sandwich times G/(G-1); statsmodels' cluster
covariance is taken without its own correction (use_correction=False; its default G/(G-1) (N-1)/(N-K) is
least squares' CR1) and both standard errors are multiplied by sqrt(G/(G-1)), which is exact, each being the
square root of a quadratic form in that covariance. statsmodels' HC1 to HC3 for these models are not the
regression corrections, so only HC0 is taken. For Probit, statsmodels' covariance
is built on the observed information (the Newton Hessian), where Forkscape and R use the expected (Fisher)
information; the two differ for a non-canonical link (by up to 2% here), so the Probit rows carry the
estimate and the marginal effect only, and their standard-error cells are empty.

Run from the repository root with Debian's python3-statsmodels (the system interpreter):

    /usr/bin/python3 src/test/python/glm-margins-reference.py

It reads the data files that src/test/r/glm-reference.R wrote and writes statsmodels-margins.csv and
statsmodels-versions.txt beside them. The multiverse is written out with loops in the plans' decision
order, the last decision varying fastest, so the spec numbers are Forkscape's (1-based).
"""

import csv
import os
import sys

import numpy as np
import pandas as pd
import scipy
import statsmodels
import statsmodels.api as sm

OUT = os.path.join("src", "test", "resources", "reference", "glm")


def num(x):
    """17 significant digits: enough to read back the same double; empty for none."""
    return "" if x is None else "%.17g" % x


def dummies(column):
    """A text column as 0/1 columns for every level but the first in sorted order (the reference level)."""
    levels = sorted(column.unique())
    return pd.DataFrame({"%s=%s" % (column.name, level): (column == level).astype(float) for level in levels[1:]})


def design(d, controls, absorb, key):
    """Intercept, controls (text ones as dummies), fixed-effect dummies, then the key predictor."""
    parts = [pd.DataFrame({"const": np.ones(len(d))})]
    for c in controls + absorb:
        parts.append(dummies(d[c]) if d[c].dtype == object else d[[c]].astype(float))
    parts.append(key.rename("key").to_frame())
    return pd.concat([p.reset_index(drop=True) for p in parts], axis=1)


def fit(model, y, x, errors, groups):
    """One specification: Newton's method to a gradient far below what the comparison needs."""
    if errors == "classical":
        kwargs = {"cov_type": "nonrobust"}
    elif errors == "HC0":
        kwargs = {"cov_type": "HC0"}
    else:
        kwargs = {"cov_type": "cluster", "cov_kwds": {"groups": groups, "use_correction": False}}
    r = model(y, x).fit(disp=0, method="newton", tol=1e-12, maxiter=100, **kwargs)
    if not r.mle_retvals["converged"]:
        sys.exit("statsmodels did not converge")
    m = r.get_margeff(at="overall", dummy=True)
    k = list(x.columns).index("key")
    clusters = len(np.unique(groups)) if errors.startswith("cluster:") else 0
    scale = np.sqrt(clusters / (clusters - 1)) if clusters else 1.0
    # margeff has no entry for the constant
    return r.params["key"], scale * r.bse["key"], m.margeff[k - 1], scale * m.margeff_se[k - 1]


def subset_of(optional, mask):
    return [c for j, c in enumerate(optional) if mask >> j & 1]


def label(controls):
    return " + ".join(controls) if controls else "none"


def birthwt_smoking(rows):
    d = pd.read_csv(os.path.join(OUT, "birthwt.csv"))
    optional = ["age", "lwt", "ptl", "ht"]
    absorbs = [("none", []), ("race", ["race"])]
    errors = ["classical", "HC0", "HC1", "HC2", "HC3", "cluster:age"]
    for m, (name, model) in enumerate([("logit", sm.Logit), ("probit", sm.Probit)]):
        for mask in range(16):
            for a, (fe_label, absorb) in enumerate(absorbs):
                controls = subset_of(optional, mask)
                x = design(d, controls, absorb, d["smoke"].astype(float))
                for e, err in enumerate(errors):
                    if err not in ("classical", "HC0", "cluster:age"):
                        continue
                    spec = ((m * 16 + mask) * 2 + a) * len(errors) + e + 1
                    values = list(fit(model, d["low"].astype(float), x, err, d["age"].values))
                    if name == "probit":
                        values[1] = values[3] = None
                    rows.append(["birthwt-smoking", spec, name, label(controls), fe_label, err] + values)


def quine(rows):
    d = pd.read_csv(os.path.join(OUT, "quine.csv"))
    optional = ["Sex", "Lrn"]
    absorbs = [("none", []), ("age group", ["Age"])]
    errors = ["classical", "HC0", "HC1", "HC2", "HC3"]
    poisson = 1  # the second alternative of the plan's model decision (ols, poisson)
    for mask in range(4):
        for a, (fe_label, absorb) in enumerate(absorbs):
            controls = subset_of(optional, mask)
            # A (first in sorted order) is coded 0, N is coded 1
            x = design(d, controls, absorb, (d["Eth"] == "N").astype(float))
            for e, err in enumerate(errors[:2]):
                spec = ((poisson * 4 + mask) * 2 + a) * len(errors) + e + 1
                values = fit(sm.Poisson, d["Days"].astype(float), x, err, None)
                rows.append(["quine", spec, "poisson", label(controls), fe_label, err] + list(values))


def main():
    if not os.path.isdir(OUT):
        sys.exit("run this script from the repository root (%s not found)" % OUT)
    rows = []
    birthwt_smoking(rows)
    quine(rows)
    with open(os.path.join(OUT, "statsmodels-margins.csv"), "w", newline="") as f:
        w = csv.writer(f, quoting=csv.QUOTE_ALL, lineterminator="\n")
        w.writerow(["plan", "spec", "model", "controls", "fixed effects", "errors", "estimate", "std_error",
                    "effect", "effect_std_error"])
        for r in rows:
            w.writerow(r[:6] + [num(v) for v in r[6:]])
    with open(os.path.join(OUT, "statsmodels-versions.txt"), "w") as f:
        f.write("Python: %s\n" % sys.version.split()[0])
        f.write("statsmodels: %s\n" % statsmodels.__version__)
        f.write("numpy: %s\n" % np.__version__)
        f.write("scipy: %s\n" % scipy.__version__)
        f.write("pandas: %s\n" % pd.__version__)
        f.write("script: src/test/python/glm-margins-reference.py\n")


main()
