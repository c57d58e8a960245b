#!/usr/bin/python3
"""Reference values for the pricing model's closed forms, from SciPy.

Usage: count_distributions.py poisson MU KMAX
       count_distributions.py nbinom N P KMAX
       count_distributions.py skellam MU1 MU2 OFFSET
       count_distributions.py beta_rule A B N
Prints one value per line, full precision:
  poisson / nbinom: pmf(0..KMAX) then cdf(KMAX)
  skellam: P(OFFSET + X - Y > 0), P(= 0), P(< 0) with X ~ Poisson(MU1), Y ~ Poisson(MU2)
  beta_rule: the N-node Gauss quadrature rule for Beta(A, B) on [0, 1]: N nodes in increasing
             order, then their N weights (summing to 1), from SciPy's Gauss-Jacobi roots
"""
import sys

from scipy import special, stats


def main(argv):
    kind = argv[1]
    if kind == "poisson":
        mu, kmax = float(argv[2]), int(argv[3])
        values = [stats.poisson.pmf(k, mu) for k in range(kmax + 1)] + [stats.poisson.cdf(kmax, mu)]
    elif kind == "nbinom":
        n, p, kmax = float(argv[2]), float(argv[3]), int(argv[4])
        values = [stats.nbinom.pmf(k, n, p) for k in range(kmax + 1)] + [stats.nbinom.cdf(kmax, n, p)]
    elif kind == "skellam":
        mu1, mu2, offset = float(argv[2]), float(argv[3]), int(argv[4])
        # D = X - Y; final difference offset + D: > 0 when D >= 1 - offset.
        d = stats.skellam(mu1, mu2)
        values = [d.sf(-offset), d.pmf(-offset), d.cdf(-offset - 1)]
    elif kind == "beta_rule":
        a, b, n = float(argv[2]), float(argv[3]), int(argv[4])
        # Jacobi weight (1 - x)^alpha (1 + x)^beta on [-1, 1]; rho = (1 + x) / 2 ~ Beta(a, b)
        # when alpha = b - 1 and beta = a - 1.
        x, w = special.roots_jacobi(n, b - 1.0, a - 1.0)
        values = list((1.0 + x) / 2.0) + list(w / w.sum())
    else:
        raise SystemExit("unknown kind " + kind)
    for v in values:
        print(repr(float(v)))


if __name__ == "__main__":
    main(sys.argv)
