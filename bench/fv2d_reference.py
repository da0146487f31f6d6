"""Reference solver for the 2-D bench (landscape-scipy.bench.ts): the same finite-volume semi-discretisation
as the TypeScript map engine (its sparse diffusion operator exported from it as coordinates, the same
logistic growth r u (h - u) and host loss -c u h per cell), integrated by scipy's solve_ivp with BDF and a
sparse analytic Jacobian. Reads JSON on stdin, prints JSON."""
import json, sys, time
import numpy as np
from scipy.integrate import solve_ivp
from scipy.sparse import coo_matrix, diags, bmat, csc_matrix

d = json.load(sys.stdin)
n = d['n']
L = coo_matrix((np.array(d['vals']), (np.array(d['rows']), np.array(d['cols']))), shape=(n, n)).tocsc()
r, c = d['rate'], d['hostKill']
u0 = np.array(d['u0']); h0 = np.array(d['h0'])

def f(t, y):
    u = y[:n]; h = y[n:]
    return np.concatenate([L @ u + r * u * (h - u), -c * u * h])

def jac(t, y):
    u = y[:n]; h = y[n:]
    return csc_matrix(bmat([[L + diags(r * (h - 2 * u)), diags(r * u)], [diags(-c * h), diags(-c * u)]]))

def solve(rtol):
    t0 = time.perf_counter()
    sol = solve_ivp(f, (0, d['tEnd']), np.concatenate([u0, h0]), method='BDF', jac=jac, rtol=rtol, atol=rtol * 1e-3, t_eval=[d['tEnd']])
    return sol, time.perf_counter() - t0

solve(1e-2)  # warm-up (imports, caches)
out = []
for rtol in d['rtols']:
    best = float('inf')
    for _ in range(d.get('repeats', 1)):
        sol, dt = solve(rtol)
        best = min(best, dt)
    out.append({'rtol': rtol, 'seconds': best, 'status': int(sol.status), 'nfev': int(sol.nfev), 'njev': int(sol.njev), 'nlu': int(sol.nlu), 'u': sol.y[:n, -1].tolist()})
import scipy
print(f'scipy {scipy.__version__}, numpy {np.__version__}', file=sys.stderr)
print(json.dumps(out))
