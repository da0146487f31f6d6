#!/usr/bin/env python3
"""Independent reference for the habitat-edge problem, by a different method than the engine.

Method of lines with Chebyshev collocation in each habitat (spectral accuracy, no finite volumes) and
scipy.integrate.solve_ivp (Radau, tight tolerances) in time. At the edge the two conditions of the
edge-preference random walk are imposed as algebraic rows (Ovaskainen & Cornell 2003; Maciel & Lutscher
2013; convention of the methods note, server/numerics/README.md §1):
    flux continuity   D_L u_x(0-) = D_R u_x(0+)
    density jump      u(0+) = k u(0-),  k = (1 - alpha) D_L / (alpha D_R),
and zero flux at the outer ends. Chebyshev differentiation matrices: Trefethen (2000), Spectral Methods
in MATLAB, SIAM, program cheb.m (re-implemented here).

Reads a JSON request on stdin:
    {"problem": {...}, "times": [...], "xs": [...]}
problem keys: left, right (segment ends, edge at 0), DL, DR, alpha, growthRate (logistic r u (1 - u) on
the left; 0 switches growth off), mortality (m on the right), x0, sigma, amplitude (Gaussian start on the
left), NL, NR (collocation points).
Prints JSON: {"times": [...], "values": [[u(x) for x in xs] per time], "massLeft": [...],
"massRight": [...], "method": "..."}.
"""
import json
import sys

import numpy as np
from scipy.integrate import solve_ivp


def cheb(n):
    """Chebyshev points x_j = cos(pi j / n), j = 0..n (from +1 to -1), and the differentiation matrix."""
    x = np.cos(np.pi * np.arange(n + 1) / n)
    c = np.ones(n + 1)
    c[0] = c[-1] = 2.0
    c *= (-1.0) ** np.arange(n + 1)
    dx = x[:, None] - x[None, :]
    d = np.outer(c, 1.0 / c) / (dx + np.eye(n + 1))
    d -= np.diag(d.sum(axis=1))
    return x, d


def clenshaw_curtis_weights(n):
    """Quadrature weights on the Chebyshev points of cheb(n) for the interval [-1, 1]."""
    theta = np.pi * np.arange(n + 1) / n
    w = np.zeros(n + 1)
    v = np.ones(n - 1)
    if n % 2 == 0:
        w[0] = w[n] = 1.0 / (n * n - 1)
        for k in range(1, n // 2):
            v -= 2.0 * np.cos(2 * k * theta[1:-1]) / (4 * k * k - 1)
        v -= np.cos(n * theta[1:-1]) / (n * n - 1)
    else:
        w[0] = w[n] = 1.0 / (n * n)
        for k in range(1, (n - 1) // 2 + 1):
            v -= 2.0 * np.cos(2 * k * theta[1:-1]) / (4 * k * k - 1)
    w[1:-1] = 2.0 * v / n
    return w


def barycentric(xn, fn, x):
    """Interpolates values fn on Chebyshev points xn (second-kind points, cheb ordering) at x."""
    n = len(xn) - 1
    w = (-1.0) ** np.arange(n + 1)
    w[0] *= 0.5
    w[-1] *= 0.5
    out = np.empty(len(x))
    for i, xi in enumerate(x):
        d = xi - xn
        hit = np.where(np.abs(d) < 1e-14)[0]
        if hit.size:
            out[i] = fn[hit[0]]
        else:
            t = w / d
            out[i] = np.dot(t, fn) / t.sum()
    return out


def solve(req):
    p = req["problem"]
    a, b = p["left"], p["right"]
    DL, DR, alpha = p["DL"], p["DR"], p["alpha"]
    r, m = p.get("growthRate", 0.0), p.get("mortality", 0.0)
    k = (1.0 - alpha) * DL / (alpha * DR)
    NL, NR = p.get("NL", 48), p.get("NR", 32)

    # Left habitat [a, 0], right habitat [0, b]; map from [-1, 1].
    sL, DmL = cheb(NL)
    sR, DmR = cheb(NR)
    hL, hR = -a / 2.0, b / 2.0
    xL = a / 2.0 + hL * sL  # x = a/2 + (|a|/2) s: s = 1 -> 0 (edge), s = -1 -> a
    xR = b / 2.0 + hR * sR  # s = 1 -> b, s = -1 -> 0 (edge)
    D1L, D1R = DmL / hL, DmR / hR
    D2L, D2R = D1L @ D1L, D1R @ D1R
    # Node indices: left edge node is xL[0] (x = 0), outer left end is xL[NL];
    # right outer end is xR[0] (x = b), right edge node is xR[NR] (x = 0).
    iL_in = np.arange(1, NL)
    iR_in = np.arange(1, NR)

    def boundary(uL_in, uR_in):
        """Solves the four boundary rows for (uL[0], uL[NL], uR[0], uR[NR]) given interior values."""
        # Unknowns z = [uL_edge, uL_end, uR_end, uR_edge].
        A = np.zeros((4, 4))
        rhs = np.zeros(4)
        # (1) zero flux at x = a: (D1L u)[NL] = 0
        A[0, 0], A[0, 1] = D1L[NL, 0], D1L[NL, NL]
        rhs[0] = -D1L[NL, iL_in] @ uL_in
        # (2) zero flux at x = b: (D1R u)[0] = 0
        A[1, 2], A[1, 3] = D1R[0, 0], D1R[0, NR]
        rhs[1] = -D1R[0, iR_in] @ uR_in
        # (3) jump: uR_edge - k uL_edge = 0
        A[2, 0], A[2, 3] = -k, 1.0
        # (4) flux continuity: DL (D1L u)[0] - DR (D1R u)[NR] = 0
        A[3, 0] = DL * D1L[0, 0]
        A[3, 1] = DL * D1L[0, NL]
        A[3, 2] = -DR * D1R[NR, 0]
        A[3, 3] = -DR * D1R[NR, NR]
        rhs[3] = -DL * D1L[0, iL_in] @ uL_in + DR * D1R[NR, iR_in] @ uR_in
        return np.linalg.solve(A, rhs)

    def full(y):
        uL = np.empty(NL + 1)
        uR = np.empty(NR + 1)
        uL[iL_in] = y[: NL - 1]
        uR[iR_in] = y[NL - 1 :]
        z = boundary(uL[iL_in], uR[iR_in])
        uL[0], uL[NL], uR[0], uR[NR] = z
        return uL, uR

    def rhs(t, y):
        uL, uR = full(y)
        fL = DL * (D2L @ uL) + r * uL * (1.0 - uL)
        fR = DR * (D2R @ uR) - m * uR
        return np.concatenate([fL[iL_in], fR[iR_in]])

    g = lambda x: p["amplitude"] * np.exp(-0.5 * ((x - p["x0"]) / p["sigma"]) ** 2)
    y0 = np.concatenate([g(xL[iL_in]), np.zeros(NR - 1)])
    times = req["times"]
    sol = solve_ivp(rhs, (0.0, max(times)), y0, method="Radau", t_eval=times, rtol=1e-11, atol=1e-13)
    if not sol.success:
        raise RuntimeError(sol.message)

    xs = np.asarray(req.get("xs", []), dtype=float)
    wL = clenshaw_curtis_weights(NL) * hL
    wR = clenshaw_curtis_weights(NR) * hR
    values, massL, massR = [], [], []
    for j in range(len(times)):
        uL, uR = full(sol.y[:, j])
        left = xs <= 0.0
        v = np.empty(len(xs))
        v[left] = barycentric(sL, uL, (xs[left] - a / 2.0) / hL)
        v[~left] = barycentric(sR, uR, (xs[~left] - b / 2.0) / hR)
        values.append(v.tolist())
        massL.append(float(wL @ uL))
        massR.append(float(wR @ uR))
    return {
        "times": list(times),
        "values": values,
        "massLeft": massL,
        "massRight": massR,
        "jump": k,
        "method": f"Chebyshev collocation ({NL}+{NR} points) + solve_ivp Radau rtol 1e-11, scipy {__import__('scipy').__version__}",
    }


if __name__ == "__main__":
    json.dump(solve(json.load(sys.stdin)), sys.stdout)
