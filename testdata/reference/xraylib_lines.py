#!/usr/bin/python3
"""Write K-line wavelengths from xraylib (Debian package python3-xraylib).

Run from the repository root:
    /usr/bin/python3 testdata/reference/xraylib_lines.py > testdata/reference/xraylib_lines.tsv

xraylib gives line energies in keV; the wavelength is lambda[A] = 12.3984198 / E[keV]
(hc = 12.398419843 keV A, CODATA 2018, exact from the SI 2019 constants).
K-alpha1 is the K-L3 transition, K-alpha2 K-L2, K-beta1 K-M3.
"""
import xraylib

HC = 12.3984198
ANODES = [("Cu", 29), ("Co", 27), ("Cr", 24), ("Fe", 26), ("Mo", 42), ("Ag", 47)]
LINES = [("KAlpha1", xraylib.KL3_LINE), ("KAlpha2", xraylib.KL2_LINE), ("KBeta", xraylib.KM3_LINE)]

print("# xraylib %s K-line wavelengths in angstrom, lambda = %.7f / E[keV]" % (xraylib.__version__, HC))
print("# anode\tline\tenergy_keV\twavelength_A")
for sym, z in ANODES:
    for name, line in LINES:
        e = xraylib.LineEnergy(z, line)
        print("%s\t%s\t%.6f\t%.7f" % (sym, name, e, HC / e))
