#!/usr/bin/python3
"""Independent high-precision check of tests/reference (Fredholm determinants, Bornemann 2010).

F. Bornemann, "On the numerical evaluation of Fredholm determinants", Math. Comp. 79 (2010):
Nystrom discretisation by Gauss-Legendre quadrature. This script shares no code with the C++:
mpmath at >= 40 digits, its own Gauss-Legendre nodes (Newton iteration in mpmath), mpmath's Airy
functions, and deliberately different formulas where possible:
  F_2(x)    = det(I - K_Ai) on L^2(x, x + L), Christoffel-Darboux form of the Airy kernel
              (the C++ uses det(I - B^2) with the Hankel operator B = Ai(x + u + v));
  F_1(x)    = det(I - B_x) on L^2(0, L)                  (Ferrari-Spohn 2005);
  TW_4(x)   = E_4(2^{2/3} x), E_4 = (det(I - B) + det(I + B)) / 2   (design.md sections 1, 4);
  F_2(x; w) = det(I - K_Ai - s_w (x) Ai) on L^2(x, x + L)  (Baik, Ben Arous, Peche 2005, as a
              rank-one updated determinant), s_w(u) = e^{-w u} (e^{w^3/3} - int_u^inf e^{w t} Ai(t) dt)
              with the integral by mpmath.quad and enough digits to absorb the cancellation
              (the C++ uses a damped oscillatory integral for w >= 1.5).
Survivals are 1 - det in high precision (no cancellation issue at 40+ digits for values >= 1e-25).
Usage: check_fredholm.py PATH/TO/reference_values   (exit 0 when every point agrees).
"""
import subprocess
import sys
import time

import mpmath as mp

ABS_TOL = 1e-13   # bulk: absolute error on cdf and survival
REL_TOL = 1e-9    # tails: relative error of the small one of cdf, survival


def gauss_legendre(m):
    """Nodes and weights on (0, 1) by Newton iteration on P_m in the working precision."""
    xs, ws = [], []
    for i in range(m):
        t = mp.cos(mp.pi * (i + mp.mpf(0.75)) / (m + mp.mpf(0.5)))
        for _ in range(100):
            p0, p1 = mp.mpf(1), t
            for k in range(2, m + 1):
                p0, p1 = p1, ((2 * k - 1) * t * p1 - (k - 1) * p0) / k
            dp = m * (t * p1 - p0) / (t * t - 1)
            dt = p1 / dp
            t -= dt
            if abs(dt) < mp.mpf(10) ** (-mp.mp.dps + 3):
                break
        p0, p1 = mp.mpf(1), t
        for k in range(2, m + 1):
            p0, p1 = p1, ((2 * k - 1) * t * p1 - (k - 1) * p0) / k
        dp = m * (t * p1 - p0) / (t * t - 1)
        xs.append((1 + t) / 2)
        ws.append(1 / ((1 - t * t) * dp * dp))
    return xs, ws


def truncation(x, growth=0.0, digits=32):
    """L with |Ai(x + L)| e^{growth (x + L)} below 10^-digits of its maximum on [x, inf)."""
    def phi(z):
        return mp.log(abs(mp.airyai(z)) + mp.mpf(10) ** (-400)) + growth * z
    best, z = phi(x), mp.mpf(x)
    while True:
        z += mp.mpf(0.25)
        f = phi(z)
        best = max(best, f)
        if z > x + 2 and z > 0 and f < best - digits * mp.log(10):
            return z - x


def nodes_for(L, x):
    osc = float(-x) ** 1.5 if x < 0 else 0.0
    return int(30 + 1.5 * float(L) + 0.6 * osc)


def kernel_cd(u, v, a, ap):
    if u == v:
        return ap[u] ** 2 - u * a[u] ** 2
    return (a[u] * ap[v] - ap[u] * a[v]) / (u - v)


def f2_det(x, w=None):
    """(cdf, survival) of F_2(x) or of F_2(x; w)."""
    growth = 0.0 if w is None else abs(w)
    L = truncation(x, growth)
    m = nodes_for(L, x)
    t, wt = gauss_legendre(m)
    u = [x + L * ti for ti in t]
    W = [L * wi for wi in wt]
    a = {ui: mp.airyai(ui) for ui in u}
    ap = {ui: mp.airyai(ui, derivative=1) for ui in u}
    sq = [mp.sqrt(Wi) for Wi in W]
    M = mp.matrix(m, m)
    for i in range(m):
        for j in range(m):
            M[i, j] = sq[i] * sq[j] * kernel_cd(u[i], u[j], a, ap)
    if w is not None:
        s = s_w(w, u)
        for i in range(m):
            for j in range(m):
                M[i, j] += sq[i] * s[i] * a[u[j]] * sq[j]
    d = mp.det(mp.eye(m) - M)
    return d, 1 - d


def s_w(w, u):
    """s_w at ascending points u: e^{-w u}(e^{w^3/3} - int_u^inf e^{w t} Ai(t) dt)."""
    w = mp.mpf(w)
    f = lambda tt: mp.exp(w * tt) * mp.airyai(tt)
    tail = mp.quad(f, [u[-1], u[-1] + 5, u[-1] + 15, mp.inf])
    G = [mp.mpf(0)] * len(u)
    G[-1] = tail
    for i in range(len(u) - 2, -1, -1):
        G[i] = G[i + 1] + mp.quad(f, [u[i], u[i + 1]])
    c = mp.exp(w ** 3 / 3)
    return [mp.exp(-w * ui) * (c - Gi) for ui, Gi in zip(u, G)]


def b_dets(s):
    """det(I - B_s), det(I + B_s) on L^2(0, L)."""
    L = truncation(s) / 2 + 2   # B(u, v) = Ai(s + u + v): the decay is in u + v
    L = max(L, truncation(s, digits=32))  # be generous: the same decay bound as for K
    m = nodes_for(L, s)
    t, wt = gauss_legendre(m)
    T = [L * ti for ti in t]
    W = [L * wi for wi in wt]
    sq = [mp.sqrt(Wi) for Wi in W]
    B = mp.matrix(m, m)
    for i in range(m):
        for j in range(i + 1):
            B[i, j] = B[j, i] = sq[i] * sq[j] * mp.airyai(s + T[i] + T[j])
    return mp.det(mp.eye(m) - B), mp.det(mp.eye(m) + B)


def tw(beta, x):
    if beta == 2:
        return f2_det(x)
    if beta == 1:
        dm, _ = b_dets(x)
        return dm, 1 - dm
    dm, dp = b_dets(mp.cbrt(4) * x)
    e4 = (dm + dp) / 2
    return e4, 1 - e4


CASES = [("tw", 2, x) for x in (-8.2, -3.0, 0.0, 3.0, 9.3)] + \
        [("tw", 1, x) for x in (-10.3, -1.0, 4.0, 16.2)] + \
        [("tw", 4, x) for x in (-6.9, -2.0, 1.0, 5.3)] + \
        [("spiked", -3, x) for x in (-6.0, 4.0, 36.0)] + \
        [("spiked", 0, x) for x in (-7.6, -1.0, 16.3)] + \
        [("spiked", 2, x) for x in (-7.9, 0.0, 11.0)] + \
        [("spiked", 5, x) for x in (-8.1, 0.5, 10.0)]


def cpp_values(exe, mode, param, x):
    out = subprocess.run([exe, mode, str(param), repr(x)], check=True, capture_output=True, text=True).stdout
    _, c, s = out.strip().split(",")
    return float(c), float(s)


def main():
    exe = sys.argv[1] if len(sys.argv) > 1 else "reference_values"
    worst_abs, worst_rel, failed = 0.0, 0.0, 0
    print(f"{'law':>10} {'param':>5} {'x':>7} {'cdf (mpmath)':>24} {'survival (mpmath)':>24} {'abs err':>9} {'rel err':>9}")
    only = sys.argv[2] if len(sys.argv) > 2 else None
    cases = [c for c in CASES if only is None or c[0] == only]
    for mode, param, x in cases:
        t0 = time.time()
        extra = 0
        if mode == "spiked" and param > 0:
            extra = int((param ** 3 / 3 + param * max(0.0, -x)) / 2.3)  # cancellation in s_w
        elif mode == "spiked" and param < 0:
            extra = 35  # det(I - K - s (x) Ai) cancels down to F_2(x; w) << F_2(x)
        mp.mp.dps = 40 + extra
        xm = mp.mpf(x)
        cdf, surv = tw(param, xm) if mode == "tw" else f2_det(xm, param)
        c_cpp, s_cpp = cpp_values(exe, mode, param, x)
        ea = max(abs(c_cpp - cdf), abs(s_cpp - surv))
        small_ref, small_cpp = (cdf, c_cpp) if cdf < surv else (surv, s_cpp)
        er = abs(small_cpp / small_ref - 1) if small_ref != 0 else mp.inf
        ok = ea <= ABS_TOL and (small_ref > 1e-4 or er <= REL_TOL)
        failed += not ok
        worst_abs = max(worst_abs, float(ea))
        if small_ref < 1e-4:
            worst_rel = max(worst_rel, float(er))
        name = f"TW_{param}" if mode == "tw" else "spiked_2"
        print(f"{name:>10} {param:>5} {x:>7} {mp.nstr(cdf, 17):>24} {mp.nstr(surv, 17):>24} "
              f"{float(ea):9.1e} {float(er):9.1e} {'ok' if ok else 'FAIL'} ({time.time() - t0:.1f}s)", flush=True)
    print(f"worst absolute error {worst_abs:.2e}, worst relative error in the tails {worst_rel:.2e}")
    print(f"{len(cases) - failed} passed, {failed} failed")
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main())
