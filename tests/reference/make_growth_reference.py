#!/usr/bin/python3
"""Reference linear growth factors for tests/kernel/growth.test.ts.

Solves delta'' + (1 + (a''/a)/H^2) delta' - 1.5 Omega_m(a) delta = 0 in x = ln a with scipy's
solve_ivp (DOP853, rtol 1e-13), starting independently of the kernel at a = 1e-11 on the
Meszaros (1974) growing mode D = a + (2/3) a_eq (exact for matter + radiation). Background:
matter, radiation (w = 1/3), CPL dark energy (Linder 2003) and curvature, the same analytic
densities as tests/kernel/helpers.ts.

Run with Debian's python3 (python3-scipy):  /usr/bin/python3 tests/reference/make_growth_reference.py
Writes tests/reference/growth-reference.json (committed).
"""
import json
import os
import numpy as np
import scipy
from scipy.integrate import solve_ivp

MODELS = [
    dict(name="EdS", omegaM=1.0, omegaR=0.0, omegaDE=0.0, w0=-1.0, wa=0.0),
    dict(name="flat LCDM", omegaM=0.3, omegaR=0.0, omegaDE=0.7, w0=-1.0, wa=0.0),
    dict(name="flat LCDM + radiation", omegaM=0.31, omegaR=9.1e-5, omegaDE=0.69, w0=-1.0, wa=0.0),
    dict(name="open matter", omegaM=0.3, omegaR=0.0, omegaDE=0.0, w0=-1.0, wa=0.0),
    dict(name="closed LCDM + radiation", omegaM=0.4, omegaR=8e-5, omegaDE=0.7, w0=-1.0, wa=0.0),
    dict(name="w0wa + radiation", omegaM=0.3, omegaR=8.5e-5, omegaDE=0.7, w0=-0.9, wa=-0.4),
    dict(name="phantom open", omegaM=0.25, omegaR=5e-5, omegaDE=0.7, w0=-1.2, wa=0.1),
]
ZS = [0.0, 0.1, 0.5, 1.0, 2.0, 5.0, 10.0, 100.0, 1000.0]
A_INIT = 1e-11


def background(m):
    om, orad, ode, w0, wa = m["omegaM"], m["omegaR"], m["omegaDE"], m["w0"], m["wa"]
    ok = 1.0 - om - orad - ode

    def de(a):
        return ode * a ** (-3 * (1 + w0 + wa)) * np.exp(-3 * wa * (1 - a))

    def E2(a):
        return om * a ** -3 + orad * a ** -4 + de(a) + ok * a ** -2

    def accel(a):
        w = w0 + wa * (1 - a)
        return -0.5 * (om * a ** -3 + 2 * orad * a ** -4 + de(a) * (1 + 3 * w))

    return ok, E2, accel


def solve(m):
    ok, E2, accel = background(m)
    om, orad = m["omegaM"], m["omegaR"]

    def rhs(x, y):
        a = np.exp(x)
        e2 = E2(a)
        return [y[1], -(1 + accel(a) / e2) * y[1] + 1.5 * om * a ** -3 / e2 * y[0]]

    a = A_INIT
    other = E2(a) - om * a ** -3
    y0 = [a * (1 + (2.0 / 3.0) * other / (om * a ** -3)), a]
    xs = sorted({-np.log1p(z) for z in ZS})
    sol = solve_ivp(rhs, (np.log(a), 0.0), y0, method="DOP853", rtol=1e-13, atol=1e-40,
                    t_eval=xs, dense_output=False)
    assert sol.success, sol.message
    out = {}
    for x, d, dd in zip(sol.t, sol.y[0], sol.y[1]):
        out[float(x)] = (d, dd)
    d0 = out[0.0][0]
    rows = []
    for z in ZS:
        d, dd = out[float(-np.log1p(z))]
        rows.append(dict(z=z, Dearly=d, Dtoday=d / d0, f=dd / d))
    return dict(model=dict(m, omegaK=ok), rows=rows)


def main():
    data = dict(
        generator="tests/reference/make_growth_reference.py",
        scipy=scipy.__version__,
        numpy=np.__version__,
        method="solve_ivp DOP853 rtol=1e-13 from a=1e-11 (Meszaros growing mode)",
        models=[solve(m) for m in MODELS],
    )
    path = os.path.join(os.path.dirname(os.path.abspath(__file__)), "growth-reference.json")
    with open(path, "w") as fh:
        json.dump(data, fh, indent=1)
    print("wrote", path)


if __name__ == "__main__":
    main()
