#!/usr/bin/python3
"""Reference values for the Comoving kernel, computed with astropy (and scipy where astropy's own
integration is looser than the kernel's 1e-7 target).

Run with Debian's interpreter (python3-astropy, python3-scipy):

    /usr/bin/python3 tests/reference/make_reference.py            # writes tests/reference/astropy-reference.json
    /usr/bin/python3 tests/reference/make_reference.py --seed 7 --models 12 --out /tmp/live.json

Without --seed the fixed set of models below is used; with --seed a random set is drawn.

What is written per model and redshift:
  astropy: E, H, comoving/transverse/angular/luminosity distances, distance modulus, angular diameter
           distance between z/2 and z, lookback time, age, comoving volume, differential comoving
           volume, proper and comoving kpc per arcsec, Om/Ogamma/Onu/Ode/Ok(z), Tcmb(z).
  quad:    the same integrands as astropy's (its inv_efunc, i.e. the Komatsu et al. 2011 fitting form
           for massive neutrinos) integrated by scipy.integrate.quad at epsrel = 1e-13 in ln a: comoving
           distance, lookback time, age, conformal time (Gyr) and comoving particle horizon (Mpc).
  exact:   for models with massive neutrinos, E(z), comoving distance and age with the exact
           Fermi-Dirac energy integral (nested scipy quad), so the kernel's default can be checked too.
  nuEnergy: F(y) = I(y)/I(0), I(y) = int_0^inf x^2 sqrt(x^2+y^2)/(e^x+1) dx, by scipy quad.
"""
import argparse
import json
import math
import sys

import numpy as np
import astropy
import scipy
from astropy import units as u
from astropy import constants as const
from astropy.cosmology import FlatLambdaCDM, LambdaCDM, wCDM, FlatwCDM, w0waCDM, Flatw0waCDM
from scipy.integrate import quad

REDSHIFTS = [-0.3, 0.0, 0.01, 0.1, 0.5, 1.0, 1.5, 2.0, 3.0, 5.0, 10.0, 30.0, 100.0, 300.0, 1000.0, 1100.0]

FIXED_MODELS = [
    # name, kernel params (the same numbers go to astropy)
    ("flat LCDM, radiation, massless nu", dict(H0=67.66, omegaM=0.3111, Tcmb=2.7255, Neff=3.046)),
    ("flat LCDM, no radiation", dict(H0=70.0, omegaM=0.3, Tcmb=0.0)),
    ("open LCDM (Ode given), radiation", dict(H0=70.0, omegaM=0.3, omegaDE=0.6, Tcmb=2.7255)),
    ("closed LCDM (Ode given), radiation", dict(H0=72.0, omegaM=0.35, omegaDE=0.75, Tcmb=2.7255, Neff=3.046)),
    ("flat wCDM w=-0.9, radiation", dict(H0=68.0, omegaM=0.3, w0=-0.9, Tcmb=2.7255)),
    ("curved w0waCDM, no radiation", dict(H0=69.0, omegaM=0.28, omegaDE=0.75, w0=-0.95, wa=0.3, Tcmb=0.0)),
    ("flat LCDM, one massive nu 0.06 eV (fitting)", dict(H0=67.66, omegaM=0.3096, Tcmb=2.7255, Neff=3.046, mNu=[0.06], neutrinoModel="fitting")),
    ("open LCDM, three massive nu (fitting)", dict(H0=70.0, omegaM=0.29, omegaDE=0.69, Tcmb=2.7255, Neff=3.046, mNu=[0.05, 0.01, 0.1], neutrinoModel="fitting")),
    ("flat w0waCDM, massive nu 0.3 eV, Neff 3.5 (fitting)", dict(H0=66.0, omegaM=0.32, w0=-1.1, wa=-0.4, Tcmb=2.7255, Neff=3.5, mNu=[0.3], neutrinoModel="fitting")),
    ("Einstein-de Sitter", dict(H0=70.0, omegaM=1.0, Tcmb=0.0)),
    ("open matter only", dict(H0=70.0, omegaM=0.3, omegaDE=0.0, Tcmb=0.0)),
    ("closed matter only, radiation", dict(H0=60.0, omegaM=2.0, omegaDE=0.0, Tcmb=2.7255)),
    ("flat phantom w=-1.3, Neff 3.2 massless", dict(H0=73.0, omegaM=0.27, w0=-1.3, Tcmb=2.7255, Neff=3.2)),
]


def to_astropy(p):
    """The astropy model with the kernel's parameters (flat when omegaDE is not given)."""
    kw = dict(H0=p["H0"], Om0=p["omegaM"], Tcmb0=p.get("Tcmb", 0.0), Neff=p.get("Neff", 3.046))
    m = list(p.get("mNu", []))
    if m:
        kw["m_nu"] = (m + [0.0] * (3 - len(m))) * u.eV
    w0 = p.get("w0", -1.0)
    wa = p.get("wa", 0.0)
    flat = "omegaDE" not in p
    if wa != 0.0:
        return Flatw0waCDM(w0=w0, wa=wa, **kw) if flat else w0waCDM(Ode0=p["omegaDE"], w0=w0, wa=wa, **kw)
    if w0 != -1.0:
        return FlatwCDM(w0=w0, **kw) if flat else wCDM(Ode0=p["omegaDE"], w0=w0, **kw)
    return FlatLambdaCDM(**kw) if flat else LambdaCDM(Ode0=p["omegaDE"], **kw)


def nu_energy_exact(y):
    """F(y) = I(y)/I(0) by quad (I(0) = 7 pi^4 / 120)."""
    f = lambda x: x * x * math.sqrt(x * x + y * y) / (math.exp(x) + 1.0) if x < 700 else 0.0
    val = quad(f, 0, 20, epsabs=0, epsrel=1e-13, limit=400)[0] + quad(f, 20, 200, epsabs=0, epsrel=1e-13, limit=400)[0]
    return val / (7 * math.pi ** 4 / 120)


def exact_inv_efunc(cosmo):
    """1/E(z) with the exact Fermi-Dirac integral in place of astropy's fitting form."""
    Ogamma0 = cosmo.Ogamma0
    neff_per_nu = cosmo.Neff / 3.0
    prefac = 0.22710731766 * Ogamma0 * neff_per_nu  # 7/8 (4/11)^(4/3), as astropy
    nu_y = list(cosmo._nu_y) if cosmo.has_massive_nu else []
    n_massless = 3 - len(nu_y)
    Om0, Ok0, Ode0 = cosmo.Om0, cosmo.Ok0, cosmo.Ode0
    # Today's neutrino density with the exact integral differs from astropy's, so the sum rule
    # gives a different Ode0 (flat) or Ok0 (curved); the kernel closes it the same way.
    onu_exact0 = prefac * (n_massless + sum(nu_energy_exact(y) for y in nu_y))
    flat = abs(Ok0) < 1e-15
    if flat:
        Ode0 = 1 - Om0 - Ogamma0 - onu_exact0
    else:
        Ok0 = 1 - Om0 - Ogamma0 - onu_exact0 - Ode0
    cache = {}

    def E(z):
        if z in cache:
            return cache[z]
        a = 1 / (1 + z)
        onu = prefac * (n_massless + sum(nu_energy_exact(y * a) for y in nu_y)) * (1 + z) ** 4
        e2 = Om0 * (1 + z) ** 3 + Ogamma0 * (1 + z) ** 4 + onu + Ok0 * (1 + z) ** 2 + Ode0 * cosmo.de_density_scale(z)
        cache[z] = 1 / math.sqrt(e2)
        return cache[z]

    return E


def quad_x(f, x0, x1):
    """int_{x0}^{x1} f(x) dx at tight tolerance (x = ln a)."""
    if x0 == x1:
        return 0.0
    return quad(f, x0, x1, epsabs=0, epsrel=1e-13, limit=1000)[0]


def model_block(name, p, with_exact):
    cosmo = to_astropy(p)
    z = np.array(REDSHIFTS)
    dh = (const.c / cosmo.H0).to(u.Mpc).value
    th = (1 / cosmo.H0).to(u.Gyr).value
    inv = cosmo.inv_efunc
    g1 = lambda x: inv(math.expm1(-x))             # 1/E in ln a
    g2 = lambda x: inv(math.expm1(-x)) * math.exp(-x)  # 1/(a E)
    xs = [-math.log1p(zz) for zz in REDSHIFTS]
    # Deep past start: the integrands fall like a^1.5 or faster, so 60 e-folds is far below 1e-13.
    past = lambda x: x - 60.0
    q = {
        "comovingDistance": [dh * quad_x(g2, x, 0.0) for x in xs],
        "lookbackTime": [th * quad_x(g1, x, 0.0) for x in xs],
        "age": [th * quad_x(g1, past(x), x) for x in xs],
        "conformalTime": [th * quad_x(g2, past(x), x) for x in xs],
        "particleHorizon": [dh * quad_x(g2, past(x), x) for x in xs],
    }
    a = {
        "E": cosmo.efunc(z).tolist(),
        "H": cosmo.H(z).to(u.km / u.s / u.Mpc).value.tolist(),
        "comovingDistance": cosmo.comoving_distance(z).to(u.Mpc).value.tolist(),
        "transverseComovingDistance": cosmo.comoving_transverse_distance(z).to(u.Mpc).value.tolist(),
        "angularDiameterDistance": cosmo.angular_diameter_distance(z).to(u.Mpc).value.tolist(),
        "luminosityDistance": cosmo.luminosity_distance(z).to(u.Mpc).value.tolist(),
        "distanceModulus": [None if zz <= 0 else float(v) for zz, v in zip(REDSHIFTS, cosmo.distmod(np.where(z > 0, z, 1.0)).value)],
        "angularDiameterDistanceBetweenHalf": cosmo.angular_diameter_distance_z1z2(z / 2, z).to(u.Mpc).value.tolist(),
        "lookbackTime": cosmo.lookback_time(z).to(u.Gyr).value.tolist(),
        "age": cosmo.age(z).to(u.Gyr).value.tolist(),
        "comovingVolume": cosmo.comoving_volume(z).to(u.Mpc ** 3).value.tolist(),
        "differentialComovingVolume": cosmo.differential_comoving_volume(z).to(u.Mpc ** 3 / u.sr).value.tolist(),
        "properSizePerArcsec": (cosmo.kpc_proper_per_arcmin(z).to(u.kpc / u.arcmin).value / 60.0).tolist(),
        "comovingSizePerArcsec": (cosmo.kpc_comoving_per_arcmin(z).to(u.kpc / u.arcmin).value / 60.0).tolist(),
        "omegaMatter": cosmo.Om(z).tolist(),
        "omegaPhotons": np.broadcast_to(cosmo.Ogamma(z), z.shape).tolist(),
        "omegaNeutrinos": np.broadcast_to(cosmo.Onu(z), z.shape).tolist(),
        "omegaDarkEnergy": cosmo.Ode(z).tolist(),
        "omegaCurvature": np.broadcast_to(cosmo.Ok(z), z.shape).tolist(),
        "Tcmb": np.broadcast_to(cosmo.Tcmb(z).to(u.K).value, z.shape).tolist(),
    }
    # distmod at z = 0 is -inf; at z < 0 undefined: stored as null and skipped.
    block = {
        "name": name,
        "params": p,
        "derived": {"Ogamma0": cosmo.Ogamma0, "Onu0": cosmo.Onu0, "Ok0": cosmo.Ok0, "Ode0": cosmo.Ode0},
        "z": REDSHIFTS,
        "astropy": a,
        "quad": q,
    }
    if with_exact and p.get("mNu"):
        inv_x = exact_inv_efunc(cosmo)
        zs = [zz for zz in REDSHIFTS if zz >= 0]
        block["exact"] = {
            "z": zs,
            "E": [1 / inv_x(zz) for zz in zs],
            "comovingDistance": [dh * quad(lambda t: inv_x(math.expm1(-t)) * math.exp(-t), -math.log1p(zz), 0.0, epsabs=0, epsrel=1e-11, limit=400)[0] for zz in zs],
            "age": [th * quad(lambda t: inv_x(math.expm1(-t)), -math.log1p(zz) - 40.0, -math.log1p(zz), epsabs=0, epsrel=1e-11, limit=400)[0] for zz in zs],
        }
    return block


def random_models(seed, n):
    rng = np.random.default_rng(seed)
    out = []
    while len(out) < n:
        p = {"H0": float(np.round(rng.uniform(50, 90), 3)), "omegaM": float(np.round(rng.uniform(0.05, 1.0), 4))}
        if rng.random() < 0.6:
            p["omegaDE"] = float(np.round(rng.uniform(0.0, 1.1), 4))
        if rng.random() < 0.5:
            p["w0"] = float(np.round(rng.uniform(-1.4, -0.6), 3))
            if rng.random() < 0.6:
                p["wa"] = float(np.round(rng.uniform(-0.8, 0.8), 3))
        if rng.random() < 0.75:
            p["Tcmb"] = float(np.round(rng.uniform(2.0, 3.0), 4))
            p["Neff"] = float(np.round(rng.uniform(3.0, 3.9), 3))
            if rng.random() < 0.5:
                k = int(rng.integers(1, 4))
                p["mNu"] = [float(np.round(rng.uniform(0.001, 0.5), 4)) for _ in range(k)]
                p["neutrinoModel"] = "fitting"
        else:
            p["Tcmb"] = 0.0
        cosmo = to_astropy(p)
        # Keep only models that expand monotonically from a big bang through z = 1100 and a little into the future.
        zz = np.concatenate([np.linspace(-0.3, 10, 400), np.geomspace(10, 1e6, 200)])
        e = cosmo.efunc(zz)
        if not np.all(np.isfinite(e)) or np.any(e <= 0):
            continue
        if "wa" in p and p["w0"] + p["wa"] > -0.2:
            continue  # dark energy growing into the past faster than matter: not a standard big bang
        out.append((f"random seed {seed} #{len(out)}", p))
    return out


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--seed", type=int, default=None)
    ap.add_argument("--models", type=int, default=10)
    ap.add_argument("--out", default=None)
    args = ap.parse_args()
    models = FIXED_MODELS if args.seed is None else random_models(args.seed, args.models)
    out = {
        "generator": "tests/reference/make_reference.py",
        "astropy": astropy.__version__,
        "scipy": scipy.__version__,
        "numpy": np.__version__,
        "python": sys.version.split()[0],
        "seed": args.seed,
        "note": "astropy values as astropy computes them; 'quad' = astropy's own integrand by scipy quad at epsrel 1e-13; 'exact' = exact Fermi-Dirac neutrinos",
        "models": [model_block(n, p, args.seed is None) for n, p in models],
    }
    if args.seed is None:
        out["nuEnergy"] = [{"y": y, "F": nu_energy_exact(y)} for y in [0.0, 0.01, 0.1, 0.5, 1.0, 2.0, 3.7, 10.0, 31.4, 79.0, 81.0, 150.0, 1000.0]]
    path = args.out or __file__.replace("make_reference.py", "astropy-reference.json")
    with open(path, "w") as fh:
        json.dump(out, fh, indent=1)
    print(f"wrote {path}: {len(models)} models, astropy {astropy.__version__}")


if __name__ == "__main__":
    main()
