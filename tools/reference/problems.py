"""The ballast-models problems in Python, for tools/reference/models.py.

Each `make_*` takes `num` (how to turn a Python float into the working
number: `float` or `mpmath.mpf`) and `sqrt`, and returns `f(t, y) -> list`.
Constants and initial values are the f64 values the Rust models use,
converted exactly (`mpf(0.04)` is the double nearest 0.04, to all its
digits), so a reference is the exact solution of the problem the Rust
`System` defines.  Each formula is the one in the Rust doc comment of the
same model (crates/ballast-models/src/*.rs), with the same source.
"""
import math


def arenstorf(num, sqrt):
    mu = num(0.012277471)
    mup = 1 - mu

    def f(t, y):
        y1, y2, v1, v2 = y
        d1 = (y1 + mu) ** 2 + y2 ** 2
        d2 = (y1 - mup) ** 2 + y2 ** 2
        d1 = d1 * sqrt(d1)
        d2 = d2 * sqrt(d2)
        return [v1, v2,
                y1 + 2 * v2 - mup * (y1 + mu) / d1 - mu * (y1 - mup) / d2,
                y2 - 2 * v1 - mup * y2 / d1 - mu * y2 / d2]
    return f


ARENSTORF_Y0 = [0.994, 0.0, 0.0, -2.00158510637908252240537862224]
ARENSTORF_Y0_STR = ["0.994", "0", "0", "-2.00158510637908252240537862224"]
ARENSTORF_T = 17.0652165601579625588917206249
ARENSTORF_T_STR = "17.0652165601579625588917206249"


def pleiades(num, sqrt):
    def f(t, y):
        x, yy, vx, vy = y[0:7], y[7:14], y[14:21], y[21:28]
        ax = [num(0.0)] * 7
        ay = [num(0.0)] * 7
        for i in range(7):
            for j in range(i + 1, 7):
                dx = x[j] - x[i]
                dy = yy[j] - yy[i]
                r2 = dx * dx + dy * dy
                r3 = r2 * sqrt(r2)
                ax[i] += (j + 1) * dx / r3
                ay[i] += (j + 1) * dy / r3
                ax[j] -= (i + 1) * dx / r3
                ay[j] -= (i + 1) * dy / r3
        return list(vx) + list(vy) + ax + ay
    return f


PLEIADES_Y0 = ([3.0, 3.0, -1.0, -3.0, 2.0, -2.0, 2.0]
               + [3.0, -3.0, 2.0, 0.0, 0.0, -4.0, 4.0]
               + [0.0, 0.0, 0.0, 0.0, 0.0, 1.75, -1.5]
               + [0.0, 0.0, 0.0, -1.25, 1.0, 0.0, 0.0])


def lorenz(num, sqrt):
    s, r, b = num(10.0), num(28.0), num(8.0 / 3.0)

    def f(t, y):
        return [s * (y[1] - y[0]), y[0] * (r - y[2]) - y[1], y[0] * y[1] - b * y[2]]
    return f


def robertson(num, sqrt):
    k1, k2, k3 = num(0.04), num(3e7), num(1e4)

    def f(t, y):
        a = k1 * y[0]
        b = k3 * y[1] * y[2]
        c = k2 * y[1] * y[1]
        return [-a + b, a - b - c, c]
    return f


def hires(num, sqrt):
    c = {k: num(v) for k, v in dict(
        a=1.71, b=0.43, c=8.32, d=0.0007, e=8.75, f=10.03, g=0.035, h=1.12,
        i=1.745, j=280.0, k=0.69, l=1.81).items()}

    def f(t, y):
        r = c["j"] * y[5] * y[7]
        return [
            -c["a"] * y[0] + c["b"] * y[1] + c["c"] * y[2] + c["d"],
            c["a"] * y[0] - c["e"] * y[1],
            -c["f"] * y[2] + c["b"] * y[3] + c["g"] * y[4],
            c["c"] * y[1] + c["a"] * y[2] - c["h"] * y[3],
            -c["i"] * y[4] + c["b"] * y[5] + c["b"] * y[6],
            -r + c["k"] * y[3] + c["a"] * y[4] - c["b"] * y[5] + c["k"] * y[6],
            r - c["l"] * y[6],
            -r + c["l"] * y[6],
        ]
    return f


HIRES_Y0 = [1.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0057]


def vanderpol_eps(eps):
    def make(num, sqrt):
        e = num(eps)

        def f(t, y):
            return [y[1], ((1 - y[0] * y[0]) * y[1] - y[0]) / e]
        return f
    return make


def vanderpol_mu(mu):
    def make(num, sqrt):
        m = num(mu)

        def f(t, y):
            return [y[1], m * (1 - y[0] * y[0]) * y[1] - y[0]]
        return f
    return make


def oregonator(num, sqrt):
    s, q, w = num(77.27), num(8.375e-6), num(0.161)

    def f(t, y):
        return [s * (y[1] + y[0] * (1 - q * y[0] - y[1])),
                (y[2] - (1 + y[0]) * y[1]) / s,
                w * (y[0] - y[2])]
    return f


def brusselator(n):
    """Interleaved (u1, v1, ..., uN, vN); boundary u = 1, v = 3."""
    def make(num, sqrt):
        c = num((1.0 / 50.0) * float((n + 1) ** 2))

        def f(t, y):
            out = []
            for i in range(n):
                u, v = y[2 * i], y[2 * i + 1]
                ul = y[2 * i - 2] if i > 0 else num(1.0)
                vl = y[2 * i - 1] if i > 0 else num(3.0)
                ur = y[2 * i + 2] if i < n - 1 else num(1.0)
                vr = y[2 * i + 3] if i < n - 1 else num(3.0)
                out.append(1 + u * u * v - 4 * u + c * (ul - 2 * u + ur))
                out.append(3 * u - u * u * v + c * (vl - 2 * v + vr))
            return out
        return f
    return make


def brusselator_y0(n):
    y = []
    for i in range(1, n + 1):
        y.append(1.0 + math.sin(2.0 * math.pi * (i / (n + 1))))
        y.append(3.0)
    return y
