#!/usr/bin/python3
"""Write Niggli reduced cells computed by gemmi (Debian package python3-gemmi).

Run from the repository root:
    /usr/bin/python3 testdata/reference/gemmi_niggli.py > testdata/reference/gemmi_niggli.tsv

Each line is one lattice given in a setting that is not reduced: a random
primitive basis (edges 2.5-20 A), or a conventional centred cell of a random
Bravais lattice, transformed by a random unimodular integer matrix; then the
reduced cell that gemmi's GruberVector.niggli_reduce gives. The cells are
random numbers: the check is of the reduction, not of any material.
"""
import math
import random
import gemmi

random.seed(20261202)


def cell_of_basis(m):
    g = [[sum(m[i][k] * m[j][k] for k in range(3)) for j in range(3)] for i in range(3)]
    a, b, c = (math.sqrt(g[i][i]) for i in range(3))
    al = math.degrees(math.acos(g[1][2] / (b * c)))
    be = math.degrees(math.acos(g[0][2] / (a * c)))
    ga = math.degrees(math.acos(g[0][1] / (a * b)))
    return (a, b, c, al, be, ga)


def unimodular():
    while True:
        m = [[random.choice((-1, 0, 0, 1)) for _ in range(3)] for _ in range(3)]
        for i in range(3):
            m[i][i] += random.choice((1, 1, -1))
        d = (m[0][0] * (m[1][1] * m[2][2] - m[1][2] * m[2][1]) - m[0][1] * (m[1][0] * m[2][2] - m[1][2] * m[2][0])
             + m[0][2] * (m[1][0] * m[2][1] - m[1][1] * m[2][0]))
        if d == 1:
            return m


def mul(a, b):
    return [[sum(a[i][k] * b[k][j] for k in range(3)) for j in range(3)] for i in range(3)]


def random_basis():
    while True:
        m = [[random.uniform(-1, 1) for _ in range(3)] for _ in range(3)]
        for i in range(3):
            m[i][i] += random.choice((1.5, -1.5))
        s = random.uniform(2.5, 20)
        m = [[x * s * random.uniform(0.6, 1.4) for x in row] for row in m]
        p = cell_of_basis(m)
        if min(p[3:]) > 25 and max(p[3:]) < 155 and gemmi.UnitCell(*p).volume > 0.05 * p[0] * p[1] * p[2]:
            return m


def conventional():
    """A random centred Bravais lattice in its conventional setting."""
    kind = random.choice(['cF', 'cI', 'tI', 'hR', 'oC', 'oI', 'oF', 'mC'])
    a, b, c = (random.uniform(3, 15) for _ in range(3))
    if kind in ('cF', 'cI'):
        return (a, a, a, 90, 90, 90), kind[1]
    if kind == 'tI':
        return (a, a, c, 90, 90, 90), 'I'
    if kind == 'hR':
        return (a, a, c, 90, 90, 120), 'R'
    if kind == 'mC':
        return (a, b, c, 90, random.uniform(92, 125), 90), 'C'
    return (a, b, c, 90, 90, 90), kind[1]


print("# gemmi %s Niggli reduction (epsilon 1e-5): centring, input a b c alpha beta gamma (A, deg), reduced a b c alpha beta gamma" % gemmi.__version__)
n = 0
while n < 240:
    if n < 160:
        m = mul(unimodular(), random_basis())
        par, cen = cell_of_basis(m), 'P'
    else:
        par, cen = conventional()
        if cen == 'P':
            continue
    gv = gemmi.GruberVector(gemmi.UnitCell(*par), cen)
    gv.niggli_reduce(1e-5, 1000)
    if not gv.is_niggli():
        continue
    red = gv.cell_parameters()
    print("%s\t%s\t%s" % (cen, " ".join("%.10f" % x for x in par), " ".join("%.10f" % x for x in red)))
    n += 1
