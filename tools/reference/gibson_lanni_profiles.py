#!/usr/bin/python3
"""Reference intensities of the scalar Gibson-Lanni focus, integrated with SciPy's adaptive quadrature.

I(r, z) = |integral_0^rho_max J0(k NA r rho) exp(i k W(rho, z)) rho d rho|^2, k = 2 pi / lambda,
W = depth (ns cs - ni ci) + (tg - tg*) (ng cg - ni ci) - z ni ci,  c_m = sqrt(1 - (NA rho / n_m)^2),
rho_max = min(1, ns / NA, ng / NA) (Gibson & Lanni, JOSA A 8(10):1601-1613, 1991; uniform pupil, z = focus
movement from where a matched sample would be in focus, positive = deeper).
Cases: oil objective (ni 1.518, NA 1.3) into water (ns 1.33) at depth 10 um; and a thick coverslip (ng 1.522,
tg - tg* = 20 um) with matched sample; and oil into water at 5, 15, 25 and 30 um, sampled around the axial
intensity maximum (found by a scan and a bounded scalar minimisation, scipy.optimize.minimize_scalar). Writes
src/test/resources/reference/gibson-lanni-profiles.txt with lines "case r_um z_um intensity", and for the depth
cases "peak case z_um intensity". Run with Debian's /usr/bin/python3 (python3-scipy).
"""
import os
import numpy as np
import scipy
from scipy.integrate import quad
from scipy.optimize import minimize_scalar
from scipy.special import j0

CASES = {
    "oil-into-water": dict(na=1.3, lam=0.52, ni=1.518, ns=1.33, ng=1.518, depth=10.0, dt=0.0),
    "thick-coverslip": dict(na=1.3, lam=0.52, ni=1.518, ns=1.518, ng=1.522, depth=0.0, dt=20.0),
}
DEPTHS = (5.0, 15.0, 25.0, 30.0)


def intensity(c, r, z):
    k = 2 * np.pi / c["lam"]
    na = c["na"]
    rho_max = min(1.0, c["ns"] / na * (1 - 1e-9), c["ng"] / na * (1 - 1e-9))
    cos = lambda n, rho: np.sqrt(max(0.0, 1 - (na * rho / n) ** 2))

    def phase(rho):
        ci = cos(c["ni"], rho)
        w = c["depth"] * (c["ns"] * cos(c["ns"], rho) - c["ni"] * ci) \
            + c["dt"] * (c["ng"] * cos(c["ng"], rho) - c["ni"] * ci) - z * c["ni"] * ci
        return k * w

    re = quad(lambda p: j0(k * na * r * p) * np.cos(phase(p)) * p, 0, rho_max, limit=2000, epsabs=1e-13)[0]
    im = quad(lambda p: j0(k * na * r * p) * np.sin(phase(p)) * p, 0, rho_max, limit=2000, epsabs=1e-13)[0]
    return re * re + im * im


out = os.path.join(os.path.dirname(__file__), "..", "..", "src", "test", "resources", "reference",
                   "gibson-lanni-profiles.txt")
with open(out, "w") as f:
    f.write("# made by tools/reference/gibson_lanni_profiles.py with scipy %s (scipy.integrate.quad)\n"
            % scipy.__version__)
    f.write("# case r_um z_um intensity\n")
    for name, c in CASES.items():
        for z in (-1.0, 0.0, 0.8, 1.6, 2.4):
            for r in (0.0, 0.1, 0.2, 0.3, 0.5, 0.8):
                f.write("%s %.3f %.3f %.10e\n" % (name, r, z, intensity(c, r, z)))
    for depth in DEPTHS:
        name = "water-depth-%g" % depth
        c = dict(CASES["oil-into-water"], depth=depth)
        zs = np.linspace(-1.0, 0.4 * depth + 1.0, 121)
        z0 = zs[int(np.argmax([intensity(c, 0.0, z) for z in zs]))]
        step = zs[1] - zs[0]
        best = minimize_scalar(lambda z: -intensity(c, 0.0, z), bounds=(z0 - step, z0 + step), method="bounded",
                               options=dict(xatol=1e-6))
        zp = best.x
        f.write("peak %s %.6f %.10e\n" % (name, zp, intensity(c, 0.0, zp)))
        for dz in (-1.5, -0.5, 0.0, 0.7, 2.0):
            for r in (0.0, 0.15, 0.3, 0.6):
                f.write("%s %.3f %.6f %.10e\n" % (name, r, zp + dz, intensity(c, r, zp + dz)))
print(open(out).read())
