"""Expand the Dormand-Prince 5(4) continuous extension into monomial weights.

Source: Hairer, Norsett and Wanner, Solving ODEs I, 2nd ed., section II.6
(dense output of Dormand–Prince 5(4)): with y1 - y0 = h sum b_i k_i and the coefficients
d_i of the book,

  y(theta) = y0 + theta*D + theta(1-theta)*(h k1 - D)
             + theta^2 (1-theta) * (2 D - h k1 - h k7)
             + theta^2 (1-theta)^2 * h sum d_i k_i,      D = y1 - y0.

This script writes b_i(theta) = sum_k beta_ik theta^k in exact rationals;
crates/ballast-core/src/explicit/tableau.rs holds the output.
Run: python3 tools/reference/dp54_dense.py   (standard library only)
"""
from fractions import Fraction as F

b = [F(35, 384), 0, F(500, 1113), F(125, 192), F(-2187, 6784), F(11, 84), 0]
d = [F(-12715105075, 11282082432), 0, F(87487479700, 32700410799),
     F(-10690763975, 1880347072), F(701980252875, 199316789632),
     F(-1453857185, 822651844), F(69997945, 29380423)]


def mul(p, q):
    r = {}
    for a, x in p.items():
        for c, y in q.items():
            r[a + c] = r.get(a + c, 0) + x * y
    return r


def add(*ps):
    r = {}
    for p in ps:
        for a, x in p.items():
            r[a] = r.get(a, 0) + x
    return r


def scale(c, p):
    return {a: c * x for a, x in p.items()}


theta = {1: F(1)}
one_minus = {0: F(1), 1: F(-1)}
for i in range(7):
    d1 = 1 if i == 0 else 0
    d7 = 1 if i == 6 else 0
    p = add(scale(b[i], theta),
            scale(d1 - b[i], mul(theta, one_minus)),
            scale(2 * b[i] - d1 - d7, mul(mul(theta, theta), one_minus)),
            scale(d[i], mul(mul(theta, theta), mul(one_minus, one_minus))))
    assert sum(p.values()) == b[i], "b_i(1) must equal b_i"
    print(f"stage {i + 1}:", [str(p.get(k, 0)) for k in range(1, 5)])
