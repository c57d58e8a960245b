"""Reference fits for the in-play estimators, by statsmodels.

  states FILE   rows "state,goals,prior,exposure" (state 0 leading, 1 level, 2 trailing): Poisson
                GLM, log link, one coefficient per state, offset log(prior * exposure)
  totals FILE   rows "goals,prior,exposure" (a side's regulation total): negative binomial (NB2)
                regression with an intercept and offset log(prior * exposure)
  extra FILE    rows "first_goal,rate_times_exposure" (0/1, and (c_home + c_away) * tau): Poisson
                GLM with an intercept and offset log(rate_times_exposure)

Prints "name value standard_error" lines and "loglik value nan".
"""
import sys

import numpy as np
import statsmodels.api as sm
from statsmodels.discrete.discrete_model import NegativeBinomial


def states(path):
    data = np.loadtxt(path, delimiter=",", ndmin=2)
    state = data[:, 0].astype(int)
    exog = np.eye(3)[state]
    offset = np.log(data[:, 2] * data[:, 3])
    fit = sm.GLM(data[:, 1], exog, family=sm.families.Poisson(), offset=offset).fit(tol=1e-13, maxiter=200)
    for name, b, se in zip(("leading", "level", "trailing"), fit.params, fit.bse):
        print(f"{name} {b!r} {se!r}")
    print(f"loglik {fit.llf!r} nan")


def totals(path):
    data = np.loadtxt(path, delimiter=",", ndmin=2)
    offset = np.log(data[:, 1] * data[:, 2])
    model = NegativeBinomial(data[:, 0], np.ones((len(data), 1)), loglike_method="nb2", offset=offset)
    fit = model.fit(method="newton", maxiter=200, tol=1e-13, disp=0)
    print(f"intercept {fit.params[0]!r} {fit.bse[0]!r}")
    print(f"alpha {fit.params[1]!r} {fit.bse[1]!r}")
    print(f"loglik {fit.llf!r} nan")


def extra(path):
    data = np.loadtxt(path, delimiter=",", ndmin=2)
    fit = sm.GLM(data[:, 0], np.ones((len(data), 1)), family=sm.families.Poisson(),
                 offset=np.log(data[:, 1])).fit(tol=1e-13, maxiter=200)
    print(f"intercept {fit.params[0]!r} {fit.bse[0]!r}")
    print(f"loglik {fit.llf!r} nan")


if __name__ == "__main__":
    {"states": states, "totals": totals, "extra": extra}[sys.argv[1]](sys.argv[2])
