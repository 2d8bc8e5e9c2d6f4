"""High-precision integrators in mpmath for tools/reference/models.py.

Two one-step methods with automatic step-size control:

* `gbs`: Gragg's explicit midpoint rule extrapolated in h^2 (Gragg, Bulirsch
  and Stoer; HNW I, section II.9, the method behind ODEX), step-number
  sequence 2, 4, 6, ..., 2k, so the result has order 2k.  For non-stiff
  problems.  Step control on the difference of the last two extrapolated
  values.
* `radau`: the s-stage Radau IIA collocation method (order 2s - 1, stage
  order s; HNW II, section IV.5), solved by simplified Newton iterations
  on the full s*n system with a central-difference Jacobian, the error
  estimated by Richardson extrapolation (one step of H against two of
  H/2).  For stiff problems.  (An extrapolated linearly implicit Euler
  method, HNW II IV.9, was tried first and dropped: at tolerances below
  1e-14 it suffers order reduction on Robertson and needs thousands of
  steps on [0, 40], where Radau IIA with 7 stages needs about 100.)

Both work in the working precision of mpmath (`mp.dps`), standard library
plus mpmath only.
"""
from mpmath import mp, mpf


STATS = {"newton_fail": 0}


def _norm(err, y, ynew, rtol, atol):
    m = mpf(0)
    for e, a, b in zip(err, y, ynew):
        sc = atol + rtol * max(abs(a), abs(b))
        m = max(m, abs(e) / sc)
    return m


def _hit_times(step, t0, y0, touts, h0, accepted=None, fac_max=4):
    """Drive `step(t, y, H) -> (ynew, err, order_exp)` to every output time."""
    t = mpf(t0)
    y = list(y0)
    H = mpf(h0)
    out = []
    stats = {"accepted": 0, "rejected": 0}
    for tout in touts:
        tout = mpf(tout)
        while t < tout:
            last = t + H >= tout
            h = tout - t if last else H
            ynew, err, expo = step(t, y, h)
            if err != err or err > 1:  # NaN or too large
                stats["rejected"] += 1
                fac = mpf("0.5") if err != err else max(mpf("0.2"), mpf("0.9") * err ** (-expo))
                H = h * min(fac, mpf("0.9"))
                continue
            stats["accepted"] += 1
            if accepted is not None:
                accepted()
            t = tout if last else t + h
            y = ynew
            fac = mpf(fac_max) if err == 0 else min(mpf(fac_max), max(mpf("0.2"), mpf("0.9") * err ** (-expo)))
            H = max(H, h * fac) if last else h * fac
        out.append(list(y))
    return out, stats


def gbs(f, t0, y0, touts, rtol, atol, k=12, h0="1e-3"):
    """Values of y at `touts` (increasing, > t0) by explicit extrapolation."""
    ns = [2 * (j + 1) for j in range(k)]
    rtol, atol = mpf(rtol), mpf(atol)

    def step(t, y, H):
        T = []
        f0 = f(t, y)
        for j, n in enumerate(ns):
            h = H / n
            z0 = list(y)
            z1 = [a + h * b for a, b in zip(y, f0)]
            for i in range(1, n):
                fz = f(t + i * h, z1)
                z0, z1 = z1, [a + 2 * h * b for a, b in zip(z0, fz)]
            row = [z1]
            for l in range(1, j + 1):
                r = mpf(ns[j]) ** 2 / mpf(ns[j - l]) ** 2 - 1
                row.append([a + (a - b) / r for a, b in zip(row[l - 1], T[j - 1][l - 1])])
            T.append(row)
        ynew = T[-1][-1]
        diff = [a - b for a, b in zip(ynew, T[-1][-2])]
        return ynew, _norm(diff, y, ynew, rtol, atol), mpf(1) / (2 * k - 1)

    return _hit_times(step, t0, y0, touts, h0)


def _lu(a):
    n = len(a)
    a = [row[:] for row in a]
    piv = list(range(n))
    for c in range(n):
        p = max(range(c, n), key=lambda r: abs(a[r][c]))
        if p != c:
            a[c], a[p] = a[p], a[c]
            piv[c], piv[p] = piv[p], piv[c]
        for r in range(c + 1, n):
            if a[r][c] != 0:
                m = a[r][c] / a[c][c]
                a[r][c] = m
                rr, rc = a[r], a[c]
                for q in range(c + 1, n):
                    rr[q] -= m * rc[q]
    return a, piv


def _solve(lu, b):
    a, piv = lu
    n = len(a)
    x = [b[p] for p in piv]
    for r in range(n):
        s = x[r]
        for q in range(r):
            s -= a[r][q] * x[q]
        x[r] = s
    for r in range(n - 1, -1, -1):
        s = x[r]
        for q in range(r + 1, n):
            s -= a[r][q] * x[q]
        x[r] = s / a[r][r]
    return x


def fd_jacobian(f, t, y):
    """Central differences at the working precision (error ~ eps^(2/3))."""
    n = len(y)
    J = [[mpf(0)] * n for _ in range(n)]
    e = mpf(2) ** (-mp.prec // 3)
    for c in range(n):
        d = e * max(abs(y[c]), mpf(1) / 2 ** 20)
        yp = list(y)
        ym = list(y)
        yp[c] += d
        ym[c] -= d
        fp, fm = f(t, yp), f(t, ym)
        for r in range(n):
            J[r][c] = (fp[r] - fm[r]) / (2 * d)
    return J


def _poly_mul(p, q):
    r = [mpf(0)] * (len(p) + len(q) - 1)
    for i, a in enumerate(p):
        for j, b in enumerate(q):
            r[i + j] += a * b
    return r


def _poly_deriv(p):
    return [i * a for i, a in enumerate(p)][1:]


def radau_coefficients(s):
    """Nodes c and matrix A of Radau IIA with s stages (coefficients lowest first)."""
    p = [mpf(1)]
    for _ in range(s - 1):
        p = _poly_mul(p, [mpf(0), mpf(1)])
    for _ in range(s):
        p = _poly_mul(p, [mpf(-1), mpf(1)])
    for _ in range(s - 1):
        p = _poly_deriv(p)
    roots = mp.polyroots(list(reversed(p)), maxsteps=200, extraprec=4 * mp.prec)
    c = sorted(mp.re(r) for r in roots)
    c[-1] = mpf(1)
    A = [[mpf(0)] * s for _ in range(s)]
    for j in range(s):
        ell = [mpf(1)]
        for m in range(s):
            if m != j:
                ell = _poly_mul(ell, [-c[m] / (c[j] - c[m]), 1 / (c[j] - c[m])])
        integ = [mpf(0)] + [a / (i + 1) for i, a in enumerate(ell)]
        for i in range(s):
            A[i][j] = mp.polyval(list(reversed(integ)), c[i])
    return c, A


def _interp(c, Z, n, thetas):
    """Collocation polynomial through (0, 0) and (c_i, Z_i) at each theta (stage vectors)."""
    nodes = [mpf(0)] + list(c)
    vals = [[mpf(0)] * n] + [Z[i * n:(i + 1) * n] for i in range(len(c))]
    out = []
    for th in thetas:
        acc = [mpf(0)] * n
        for j, xj in enumerate(nodes):
            if j == 0:
                continue  # value 0
            w = mpf(1)
            for m, xm in enumerate(nodes):
                if m != j:
                    w *= (th - xm) / (xj - xm)
            for r in range(n):
                acc[r] += w * vals[j][r]
        out.extend(acc)
    return out


def radau(f, t0, y0, touts, rtol, atol, s=7, h0="1e-6"):
    """Values of y at `touts` by Radau IIA (s stages) with Richardson control.

    Newton starts from the collocation polynomial of the previous step
    (HNW II, IV.8, starting values), and the two half steps start from the polynomial of
    the full step, so most solves take two to four iterations."""
    rtol, atol = mpf(rtol), mpf(atol)
    c, A = radau_coefficients(s)
    p = 2 * s - 1
    newton_tol = mpf("1e-6")  # in units of the error tolerance
    state = {"prev": None, "pending": None, "jac": None}

    def matrix(h, J):
        n = len(J)
        M = [[mpf(0)] * (s * n) for _ in range(s * n)]
        for i in range(s):
            for j in range(s):
                hij = h * A[i][j]
                for r in range(n):
                    row = M[i * n + r]
                    for q in range(n):
                        row[j * n + q] = -hij * J[r][q]
                    if i == j:
                        row[j * n + r] += 1
        return _lu(M)

    def one(t, y, h, lu, guess):
        n = len(y)
        for Z0 in ([guess, None] if guess is not None else [None]):
            Z = list(Z0) if Z0 is not None else [mpf(0)] * (s * n)
            prev = None
            for it in range(40):
                F = [f(t + c[j] * h, [y[r] + Z[j * n + r] for r in range(n)]) for j in range(s)]
                G = []
                for i in range(s):
                    for r in range(n):
                        acc = Z[i * n + r]
                        for j in range(s):
                            acc -= h * A[i][j] * F[j][r]
                        G.append(-acc)
                dZ = _solve(lu, G)
                Z = [a + b for a, b in zip(Z, dZ)]
                nrm = _norm(dZ, y, y, rtol, atol)
                if prev is not None and prev > 0:
                    theta = nrm / prev
                    if theta < 1 and nrm * theta / (1 - theta) <= newton_tol:
                        return [y[r] + Z[(s - 1) * n + r] for r in range(n)], Z
                    if theta >= 1 and it > 2:
                        break
                if nrm == 0:
                    return [y[r] + Z[(s - 1) * n + r] for r in range(n)], Z
                prev = nrm
            STATS["newton_fail"] += 1
        return None, None

    def step(t, y, H):
        n = len(y)
        key = (t, tuple(y))
        if state["jac"] is None or state["jac"][0] != key:
            state["jac"] = (key, fd_jacobian(f, t, y))
        J = state["jac"][1]
        guess = None
        if state["prev"] is not None:
            Zp, hp_ = state["prev"]
            last = Zp[(s - 1) * n:]
            pred = _interp(c, Zp, n, [1 + ci * H / hp_ for ci in c])
            guess = [pred[i * n + r] - last[r] for i in range(s) for r in range(n)]
        y1, Z1 = one(t, y, H, matrix(H, J), guess)
        if y1 is None:
            return y, mpf("nan"), mpf(1) / (p + 1)
        lu2 = matrix(H / 2, J)
        ga = _interp(c, Z1, n, [ci / 2 for ci in c])
        yh, Za = one(t, y, H / 2, lu2, ga)
        if yh is None:
            return y, mpf("nan"), mpf(1) / (p + 1)
        gb_full = _interp(c, Z1, n, [(1 + ci) / 2 for ci in c])
        gb = [gb_full[i * n + r] - (yh[r] - y[r]) for i in range(s) for r in range(n)]
        y2, Zb = one(t + H / 2, yh, H / 2, lu2, gb)
        if y2 is None:
            return y, mpf("nan"), mpf(1) / (p + 1)
        state["pending"] = (Zb, H / 2)
        diff = [(a - b) / (2 ** p - 1) for a, b in zip(y2, y1)]
        return y2, _norm(diff, y, y2, rtol, atol), mpf(1) / (p + 1)

    def accepted():
        state["prev"] = state["pending"]

    return _hit_times(step, t0, y0, touts, h0, accepted=accepted, fac_max=2)
