#!/usr/bin/python3
"""Write the systematic absences of orthorhombic and monoclinic space groups
from gemmi (Debian package python3-gemmi), with the extinction symbol that
International Tables for Crystallography Vol. A (Part 3, 2005 edition) gives
for each (from memory).

Run from the repository root:
    /usr/bin/python3 testdata/reference/gemmi_absences.py > testdata/reference/gemmi_absences.tsv

Each line: the space group's Hermann-Mauguin symbol, its lattice centring,
the extinction symbol, and every hkl with |h|,|k|,|l| <= 5 that gemmi's
operations make systematically absent (centring absences included),
separated by spaces. Monoclinic groups are in the b-unique setting. Body-centred
groups are left out: in their zones the centring makes two axial glides give the
same absences, and the letter Tables choose is not recalled with certainty.
"""
import itertools
import gemmi

CASES = [
    ("P 21 21 21", "P 21 21 21"),
    ("P 21 21 2", "P 21 21 -"),
    ("P 2 2 21", "P - - 21"),
    ("P m m m", "P - - -"),
    ("P n m a", "P n - a"),
    ("P b c a", "P b c a"),
    ("P n a 21", "P n a -"),
    ("P c a 21", "P c a -"),
    ("P m c 21", "P - c -"),
    ("P c c n", "P c c n"),
    ("P b a m", "P b a -"),
    ("P n n m", "P n n -"),
    ("P c c m", "P c c -"),
    ("P b c m", "P b c -"),
    ("P m n a", "P - n a"),
    ("C m c m", "C - c -"),
    ("C m c 21", "C - c -"),
    ("C m c e", "C - c (ab)"),
    ("F d d d:1", "F d d d"),
    ("F d d 2", "F d d -"),
    ("P 1 21/c 1", "P 1 21/c 1"),
    ("P 1 21/n 1", "P 1 21/n 1"),
    ("P 1 21 1", "P 1 21 1"),
    ("P 1 21/m 1", "P 1 21 1"),
    ("P 1 c 1", "P 1 c 1"),
    ("P 1 2/c 1", "P 1 c 1"),
    ("P 1 2/m 1", "P 1 - 1"),
    ("C 1 2/c 1", "C 1 c 1"),
    ("C 1 2/m 1", "C 1 - 1"),
]

for name, symbol in CASES:
    sg = gemmi.SpaceGroup(name)
    ops = sg.operations()
    absent = []
    for h, k, l in itertools.product(range(-5, 6), repeat=3):
        if (h, k, l) != (0, 0, 0) and ops.is_systematically_absent([h, k, l]):
            absent.append(f"{h},{k},{l}")
    print(f"{name}\t{sg.centring_type()}\t{symbol}\t{' '.join(absent)}")
