#!/usr/bin/python3
"""X-ray density of copper sulfate pentahydrate from periodictable's masses.

Debian's python3-periodictable (apt-get install python3-periodictable).
Run from the repository root:

    /usr/bin/python3 testdata/reference/periodictable_density.py > testdata/reference/periodictable_density.tsv

The cell is a handbook-like triclinic cell of CuSO4.5H2O (from memory; any
cell would do, the check is of the arithmetic): a=6.12 b=10.69 c=5.96 A,
alpha=82.35 beta=107.33 gamma=102.6 deg, Z = 2. The volume comes from the
general triclinic formula, the molar mass from periodictable's formula
parser, the density from rho = Z M / (N_A V) with N_A = 6.02214076e23 per mol
(exact, SI 2019).
"""
import math
import periodictable

a, b, c = 6.12, 10.69, 5.96
al, be, ga = (math.radians(x) for x in (82.35, 107.33, 102.6))
v = a * b * c * math.sqrt(1 - math.cos(al) ** 2 - math.cos(be) ** 2 - math.cos(ga) ** 2
                          + 2 * math.cos(al) * math.cos(be) * math.cos(ga))
m = periodictable.formula("CuSO4(H2O)5").mass
z = 2
rho = z * m / (6.02214076e23 * v * 1e-24)
print("# periodictable %s: formula, Z, volume (A^3), molar mass (g/mol), X-ray density (g/cm3)" % periodictable.__version__)
print("CuSO4·5H2O\t%d\t%.6f\t%.6f\t%.6f" % (z, v, m, rho))
