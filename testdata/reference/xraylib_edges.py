#!/usr/bin/python3
"""Write the K absorption edges of the usual K-beta filters from xraylib
(Debian package python3-xraylib).

Run from the repository root:
    /usr/bin/python3 testdata/reference/xraylib_edges.py > testdata/reference/xraylib_edges.tsv

xraylib gives edge energies in keV; the wavelength is lambda[A] = 12.3984198 / E[keV].
The filter of each anode is the element one or two below it whose K edge
lies between the anode's K-beta and K-alpha lines (common practice).
"""
import xraylib

HC = 12.3984198
FILTERS = [("Cu", "Ni", 28), ("Co", "Fe", 26), ("Cr", "V", 23), ("Fe", "Mn", 25), ("Mo", "Zr", 40), ("Ag", "Pd", 46)]

print("# xraylib %s K-edge wavelengths of K-beta filters, lambda = %.7f / E[keV]" % (xraylib.__version__, HC))
print("# anode\tfilter\tedge_keV\twavelength_A")
for anode, el, z in FILTERS:
    e = xraylib.EdgeEnergy(z, xraylib.K_SHELL)
    print("%s\t%s\t%.6f\t%.7f" % (anode, el, e, HC / e))
