#!/usr/bin/python3
"""Reference check of `plateau fit` against SciPy (a general-purpose library, independent of plateau's engine).

The same objective, -2 log posterior = sum[(y - f)^2/s^2 + ln s^2] + eta' Omega^-1 eta, with -2 ln Phi((L - f)/s)
for a level below its quantification limit L (Beal's M3), is minimised by scipy.optimize.minimize, with the
predictions from scipy.integrate.solve_ivp (DOP853, rtol 1e-13). The models, doses and levels are written out
here a second time, by hand, from the files in tests/fit/data. Estimates must agree within 1e-6 relative and the
objective within 1e-8.

Usage: scipy_reference.py PLATEAU_BINARY TESTS_DIR. Exits 0 when every check passes, 77 (skipped) when SciPy is
missing, 1 otherwise.
"""
import json
import math
import subprocess
import sys

try:
    import numpy as np
    from scipy.integrate import solve_ivp
    from scipy.optimize import minimize
    from scipy.stats import norm
except ImportError as e:  # pragma: no cover
    print(f"SKIPPED: SciPy is not installed ({e}); apt-get install python3-scipy to run this reference check")
    sys.exit(77)


def two_comp(p):
    cl, v1, q, v2 = p["cl"], p["v1"], p["q"], p["v2"]

    def rhs(_t, x, rate):
        c, pe = x
        return [rate - cl / v1 * c - q / v1 * c + q / v2 * pe, q / v1 * c - q / v2 * pe]

    return rhs, 2, lambda x: x[0] / v1


def mm(p):
    vmax, km, v = p["vmax"], p["km"], p["v"]

    def rhs(_t, x, rate):
        c = x[0] / v
        return [rate - vmax * c / (km + c)]

    return rhs, 1, lambda x: x[0] / v


CASES = [
    {
        "name": "two-comp-fit",
        "model": two_comp,
        "typical": {"cl": 5.0, "v1": 20.0, "q": 4.0, "v2": 30.0},
        "varied": [("cl", 0.30), ("v1", 0.25)],          # log-normal CVs
        "correlation": 0.3,
        "prop": 0.10, "add": 0.1,
        "doses": [(0.0, 1000.0, 1.0), (12.0, 500.0, 0.0)],  # time h, mg, duration h
        "levels": [(2.0, 22.4, False), (11.0, 5.3, False), (18.0, 7.1, False)],
    },
    {
        "name": "mm-fit",
        "model": mm,
        "typical": {"vmax": 50.0, "km": 5.0, "v": 30.0},
        "varied": [("vmax", 0.30), ("v", 0.20)],
        "correlation": 0.0,
        "prop": 0.10, "add": 0.2,
        "doses": [(0.0, 600.0, 0.0), (12.0, 300.0, 2.0)],
        "levels": [(4.0, 17.2, False), (11.5, 9.1, False), (30.0, 0.5, True)],
    },
]


def predictions(case, eta):
    p = dict(case["typical"])
    for (name, _cv), e in zip(case["varied"], eta):
        p[name] *= math.exp(e)
    rhs, n, out = case["model"](p)
    # Breakpoints: dose starts, infusion ends, level times.
    marks = set()
    for t, _a, d in case["doses"]:
        marks.add(t)
        if d > 0:
            marks.add(t + d)
    for t, _y, _b in case["levels"]:
        marks.add(t)
    x = np.zeros(n)
    t0 = 0.0
    values = {}
    for t1 in sorted(marks):
        rate = sum(a / d for ts, a, d in case["doses"] if d > 0 and ts <= t0 < ts + d)
        if t1 > t0:
            sol = solve_ivp(rhs, (t0, t1), x, method="DOP853", rtol=1e-13, atol=1e-12, args=(rate,))
            x = sol.y[:, -1].copy()
        for ts, a, d in case["doses"]:
            if d == 0 and ts == t1:
                x[0] += a
        values[t1] = out(x)
        t0 = t1
    return [values[t] for t, _y, _b in case["levels"]], p


def objective(case, eta):
    f, _ = predictions(case, eta)
    total = 0.0
    for (t, y, below), fi in zip(case["levels"], f):
        var = case["add"] ** 2 + (case["prop"] * fi) ** 2
        if below:
            total += -2.0 * norm.logcdf((y - fi) / math.sqrt(var))
        else:
            total += (y - fi) ** 2 / var + math.log(var)
    om = np.array([math.sqrt(math.log1p(cv * cv)) for _n, cv in case["varied"]])
    omega = np.outer(om, om) * np.array([[1.0, case["correlation"]], [case["correlation"], 1.0]])
    e = np.asarray(eta)
    return total + float(e @ np.linalg.solve(omega, e))


def gradient(case, eta, h=1e-5):
    g = np.zeros(len(eta))
    for k in range(len(eta)):
        up = np.array(eta, dtype=float)
        dn = np.array(eta, dtype=float)
        up[k] += h
        dn[k] -= h
        g[k] = (objective(case, up) - objective(case, dn)) / (2 * h)
    return g


def main():
    binary, tests = sys.argv[1], sys.argv[2]
    failures = 0
    for case in CASES:
        name = case["name"]
        run = subprocess.run(
            [binary, "fit", f"{tests}/fit/data/{name}-regimen.toml", "--levels", f"{tests}/fit/data/{name}-levels.csv",
             "--json", "-", "--tol", "1e-13"], capture_output=True, text=True)
        if run.returncode != 0:
            print(f"{name}: plateau fit failed ({run.returncode}): {run.stderr}")
            failures += 1
            continue
        mine = json.loads(run.stdout)
        ref = minimize(lambda e: objective(case, e), np.zeros(2), jac=lambda e: gradient(case, e), method="BFGS",
                       options={"gtol": 1e-9, "maxiter": 200})
        _f, p = predictions(case, ref.x)
        ref_obj = objective(case, ref.x)
        print(f"{name}: SciPy eta {ref.x}, objective {ref_obj:.12g}; plateau objective {mine['objective']:.12g}")
        if abs(mine["objective"] - ref_obj) > 1e-8:
            print(f"  objective differs by {mine['objective'] - ref_obj:.3g}")
            failures += 1
        for est in mine["parameters"]:
            want = p[est["name"]]
            rel = abs(est["estimate"] - want) / abs(want)
            print(f"  {est['name']}: plateau {est['estimate']:.12g}, SciPy {want:.12g}, relative difference {rel:.2g}")
            if rel > 1e-6:
                failures += 1
    if failures:
        print(f"FAILED: {failures} check(s)")
        return 1
    print("all checks passed")
    return 0


if __name__ == "__main__":
    sys.exit(main())
