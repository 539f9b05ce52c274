#!/usr/bin/python3
"""Write d-spacings and lattice absences from gemmi (Debian package python3-gemmi).

Run from the repository root:
    /usr/bin/python3 testdata/reference/gemmi_reflections.py > testdata/reference/gemmi_reflections.tsv

For each cell and space group below (symmorphic groups, so every systematic
absence is a lattice-centring absence), every hkl with |h|,|k|,|l| <= 4 is
listed with gemmi's d-spacing and whether the space group's operations make
it systematically absent. The cells are handbook-like values (from memory);
any cell would do, the check is of the arithmetic and the extinction rules.
"""
import itertools
import gemmi

CASES = [
    ("P m -3 m", (4.1230, 4.1230, 4.1230, 90, 90, 90)),
    ("I m -3 m", (3.1652, 3.1652, 3.1652, 90, 90, 90)),
    ("F m -3 m", (5.6402, 5.6402, 5.6402, 90, 90, 90)),
    ("P 4/m m m", (4.5937, 4.5937, 2.9587, 90, 90, 90)),
    ("I 4/m m m", (3.2523, 3.2523, 4.9461, 90, 90, 90)),
    ("P 6/m m m", (3.2094, 3.2094, 5.2108, 90, 90, 120)),
    ("R -3 m:H", (4.7590, 4.7590, 12.9910, 90, 90, 120)),
    ("P m m m", (5.0896, 4.5248, 7.3133, 90, 90, 90)),
    ("C m m m", (2.8537, 4.9548, 4.6080, 90, 90, 90)),
    ("A m m m", (3.9120, 6.1230, 5.5100, 90, 90, 90)),
    ("B m m m", (4.4100, 5.8800, 6.6300, 90, 90, 90)),
    ("I m m m", (4.4300, 7.4600, 5.2000, 90, 90, 90)),
    ("F m m m", (4.3000, 9.4000, 7.1000, 90, 90, 90)),
    ("P 1 2/m 1", (5.1505, 5.2031, 5.3173, 90, 99.23, 90)),
    ("C 1 2/m 1", (9.4100, 5.3800, 6.1200, 90, 102.40, 90)),
    ("A 1 2/m 1", (6.1200, 5.3800, 9.8000, 90, 108.20, 90)),
    ("I 1 2/m 1", (8.3000, 5.3800, 6.1200, 90, 94.70, 90)),
    ("P -1", (6.1200, 10.6900, 5.9600, 82.35, 107.33, 102.60)),
]

print("# gemmi %s: space group, a b c alpha beta gamma, h k l, d (A), absent (1) or allowed (0)" % gemmi.__version__)
for name, cell in CASES:
    sg = gemmi.SpaceGroup(name)
    ops = sg.operations()
    uc = gemmi.UnitCell(*cell)
    for h, k, l in itertools.product(range(-4, 5), repeat=3):
        if h == k == l == 0:
            continue
        d = uc.calculate_d([h, k, l])
        absent = 1 if ops.is_systematically_absent([h, k, l]) else 0
        print("%s\t%s\t%d\t%d\t%d\t%.8f\t%d" % (name, " ".join("%g" % x for x in cell), h, k, l, d, absent))
