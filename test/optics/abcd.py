# An independent paraxial check of a prescription table: effective focal length and back focal
# distance from ray-transfer (ABCD) matrices (refraction C = -(n2 - n1) / R, translation B = t / n
# in reduced form), written here with numpy and sharing nothing with straylight's code.
# Reads the table (CSV: surface, radius, thickness, n_d, V_d, semi-diameter; STO for the stop)
# from the file given; prints JSON {efl, bfd}.

import json
import sys

import numpy as np

rows = []
for line in open(sys.argv[1]):
    line = line.split('#')[0].strip()
    if not line:
        continue
    f = [x.strip() for x in line.split(',')]
    if not f[1].replace('.', '', 1).replace('-', '', 1).isdigit() and f[1].lower() not in ('inf', 'flat'):
        continue  # header
    r = 0.0 if f[1].lower() in ('inf', 'flat') else float(f[1])
    n = float(f[3]) if f[3] not in ('', 'air') else 1.0
    rows.append((r, float(f[2]), n))

m = np.eye(2)
n1 = 1.0
for i, (r, t, n2) in enumerate(rows):
    power = 0.0 if r == 0 else (n2 - n1) / r
    m = np.array([[1, 0], [-power, 1]]) @ m
    if i < len(rows) - 1:
        m = np.array([[1, t / n2], [0, 1]]) @ m
    n1 = n2
a, b = m[0]
c, d = m[1]
print(json.dumps({'efl': -1 / c, 'bfd': -a / c}))
