#!/usr/bin/python3
"""Check values of the PSF tests, computed from the published formulas with SciPy's special functions.

Airy pattern I(v) = [2 J1(v)/v]^2 with v = 2 pi NA r / lambda (Born & Wolf, Principles of Optics, 7th ed., 1999,
sec. 8.5.2); paraxial on-axis intensity I(u) = [sin(u/4)/(u/4)]^2 with u = 2 pi NA^2 z / (n lambda) (same, sec.
8.8); confocal with a vanishing pinhole and equal wavelengths: Airy^2 (Wilson & Sheppard 1984).
Writes src/test/resources/reference/psf-optics-values.txt (key = value, in units of lambda/NA or n lambda/NA^2).
Run with Debian's /usr/bin/python3 (python3-scipy).
"""
import os
import numpy as np
import scipy
from scipy.special import j1, jn_zeros
from scipy.optimize import brentq

airy = lambda v: (2 * j1(v) / v) ** 2 if v != 0 else 1.0
two_pi = 2 * np.pi
values = {}
values["airy_first_zero"] = jn_zeros(1, 1)[0] / two_pi
values["airy_fwhm"] = 2 * brentq(lambda v: airy(v) - 0.5, 0.1, 3.0) / two_pi
values["confocal_fwhm"] = 2 * brentq(lambda v: airy(v) ** 2 - 0.5, 0.1, 3.0) / two_pi
axial = lambda u: (np.sin(u / 4) / (u / 4)) ** 2
values["axial_first_zero"] = 4 * np.pi / two_pi            # sin(u/4) = 0 at u = 4 pi
values["axial_fwhm"] = 2 * brentq(lambda u: axial(u) - 0.5, 0.1, 12.0) / two_pi
values["confocal_axial_fwhm"] = 2 * brentq(lambda u: axial(u) ** 2 - 0.5, 0.1, 12.0) / two_pi

out = os.path.join(os.path.dirname(__file__), "..", "..", "src", "test", "resources", "reference",
                   "psf-optics-values.txt")
with open(out, "w") as f:
    f.write("# made by tools/reference/psf_optics_values.py with scipy %s\n" % scipy.__version__)
    f.write("# lateral values in lambda/NA, axial values in n lambda/NA^2\n")
    for k, v in values.items():
        f.write("%s = %.6f\n" % (k, v))
print(open(out).read())
