#!/usr/bin/python3
"""Golden file of atomic weights and molar masses from periodictable.

Independent reference for density/: Debian's python3-periodictable
(apt-get install python3-periodictable). Run from the repository root:

    /usr/bin/python3 testdata/reference/periodictable_weights.py > testdata/reference/periodictable_weights.tsv

Lines: "element<TAB>symbol<TAB>Z<TAB>mass" for H..Pu and D, then
"formula<TAB>reticle text<TAB>periodictable text<TAB>mass". periodictable
carries an older IUPAC table than 2021; the Go test states how far the two
may differ and why.
"""
import periodictable as pt

print("# periodictable", pt.__version__)
for z in range(1, 95):
    e = pt.elements[z]
    print("element\t%s\t%d\t%.10g" % (e.symbol, z, e.mass))
print("element\tD\t1\t%.12g" % pt.D.mass)

# (text for reticle, text for periodictable): hydrates and nested brackets
# are written in periodictable's own grammar on the right.
FORMULAS = [
    ("NaCl", "NaCl"),
    ("Si", "Si"),
    ("TiO2", "TiO2"),
    ("Al2O3", "Al2O3"),
    ("MgAl2O4", "MgAl2O4"),
    ("Ca3(PO4)2", "Ca3(PO4)2"),
    ("[Co(NH3)6]Cl3", "Co(NH3)6Cl3"),
    ("CuSO4·5H2O", "CuSO4(H2O)5"),
    ("CuSO4.5H2O", "CuSO4(H2O)5"),
    ("MgSO4*7H2O", "MgSO4(H2O)7"),
    ("Fe0.95O", "Fe0.95O"),
    ("YBa2Cu3O6.93", "YBa2Cu3O6.93"),
    ("La1.85Sr0.15CuO4", "La1.85Sr0.15CuO4"),
    ("LiFePO4", "LiFePO4"),
    ("LiCoO2", "LiCoO2"),
    ("Ca10(PO4)6(OH)2", "Ca10(PO4)6(OH)2"),
    ("K2[PtCl6]", "K2PtCl6"),
    ("D2O", "D2O"),
    ("UO2", "UO2"),
    ("CaSO4·0.5H2O", "CaSO4(H2O)0.5"),
    ("BaTiO3", "BaTiO3"),
    ("CsCl", "CsCl"),
]
for mine, theirs in FORMULAS:
    print("formula\t%s\t%s\t%.10g" % (mine, theirs, pt.formula(theirs).mass))
