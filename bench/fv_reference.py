"""Reference solver for bench (b): the same finite-volume semi-discretisation as the TypeScript engine
(tridiagonal diffusion operator exported from it, the same per-cell growth, mortality and host loss),
integrated by scipy's solve_ivp with BDF and a sparse analytic Jacobian. Reads JSON on stdin, prints JSON."""
import json, sys, time
import numpy as np
from scipy.integrate import solve_ivp
from scipy.sparse import diags, bmat, csc_matrix

d = json.load(sys.stdin)
n = len(d['diag'])
L = diags([np.array(d['lower'][1:]), np.array(d['diag']), np.array(d['upper'][:-1])], [-1, 0, 1], format='csc')
host = np.array(d['host'], dtype=bool)
m = np.array(d['mortality'])
r, a, c = d['rate'], d['allee'], d['hostKill']
u0 = np.array(d['u0']); h0 = np.array(d['h0'])

def f(t, y):
    u = y[:n]; h = y[n:]
    g = np.where(host, r * (h - u) * (u - a * h), -m)
    du = L @ u + u * g
    dh = np.where(host, -c * u * h, 0.0)
    return np.concatenate([du, dh])

def jac(t, y):
    u = y[:n]; h = y[n:]
    # g = r (h-u)(u-a h); d(u g)/du = g + u dg/du; dg/du = r[(h-u) - (u - a h)]; dg/dh = r[(u - a h) - a (h-u)]
    g = r * (h - u) * (u - a * h)
    dgdu = r * ((h - u) - (u - a * h))
    dgdh = r * ((u - a * h) - a * (h - u))
    Juu = L + diags(np.where(host, g + u * dgdu, -m))
    Juh = diags(np.where(host, u * dgdh, 0.0))
    Jhu = diags(np.where(host, -c * h, 0.0))
    Jhh = diags(np.where(host, -c * u, 0.0))
    return csc_matrix(bmat([[Juu, Juh], [Jhu, Jhh]]))

out = []
solve_ivp(f, (0, 1.0), np.concatenate([u0, h0]), method='BDF', jac=jac, rtol=1e-3, atol=1e-6)  # warm-up (imports, caches)
for rtol in d['rtols']:
    dt = float('inf')
    for _ in range(d.get('repeats', 2)):
        t0 = time.perf_counter()
        sol = solve_ivp(f, (0, d['tEnd']), np.concatenate([u0, h0]), method='BDF', jac=jac, rtol=rtol, atol=rtol * 1e-3, t_eval=[d['tEnd']])
        dt = min(dt, time.perf_counter() - t0)
    out.append({'rtol': rtol, 'seconds': dt, 'status': int(sol.status), 'nfev': int(sol.nfev), 'njev': int(sol.njev), 'nlu': int(sol.nlu),
                'u': sol.y[:n, -1].tolist()})
import scipy
print(f'scipy {scipy.__version__}, numpy {np.__version__}', file=sys.stderr)
print(json.dumps(out))
