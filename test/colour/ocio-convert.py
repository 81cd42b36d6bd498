# The independent reference for colour-space conversion: OpenColorIO (Debian python3-pyopencolorio).
# A config written here, with CIE XYZ (D65) as its reference: ACEScg and ACES2065-1 through OCIO's
# own built-in transforms (AP1 / AP0 to XYZ D65 with Bradford adaptation), Rec.709 and Rec.2020
# through matrices worked out here with numpy from the primaries published in ITU-R BT.709 and
# BT.2020 (SMPTE RP 177's method). Every pixel given is converted between every pair of spaces.
#
# Run: /usr/bin/python3 ocio-convert.py  (reads JSON {pixels: [[r,g,b],...]} on stdin)
# Prints JSON {"from>to": [[r,g,b],...]}

import json
import sys

import numpy as np
import PyOpenColorIO as OCIO


def npm(primaries, white):
    xyz = lambda x, y: np.array([x / y, 1.0, (1 - x - y) / y])
    p = np.stack([xyz(*c) for c in primaries], axis=1)
    k = np.linalg.solve(p, xyz(*white))
    return p * k


D65 = (0.3127, 0.3290)
REC709 = npm([(0.64, 0.33), (0.30, 0.60), (0.15, 0.06)], D65)
REC2020 = npm([(0.708, 0.292), (0.170, 0.797), (0.131, 0.046)], D65)

cfg = OCIO.Config.CreateRaw()


def add(name, transform):
    cs = OCIO.ColorSpace(name=name)
    cs.setTransform(transform, OCIO.COLORSPACE_DIR_TO_REFERENCE)
    cfg.addColorSpace(cs)


def matrix(m):
    t = OCIO.MatrixTransform()
    t.setMatrix([float(v) for v in [*m[0], 0, *m[1], 0, *m[2], 0, 0, 0, 0, 1]])
    return t


add('acescg', OCIO.BuiltinTransform('UTILITY - ACES-AP1_to_CIE-XYZ-D65_BFD'))
add('aces2065-1', OCIO.BuiltinTransform('UTILITY - ACES-AP0_to_CIE-XYZ-D65_BFD'))
add('rec709', matrix(REC709))
add('rec2020', matrix(REC2020))

pixels = json.load(sys.stdin)['pixels']
out = {}
for a in ['rec709', 'rec2020', 'acescg', 'aces2065-1']:
    for b in ['rec709', 'rec2020', 'acescg', 'aces2065-1']:
        cpu = cfg.getProcessor(a, b).getDefaultCPUProcessor()
        out[f'{a}>{b}'] = [list(cpu.applyRGB([float(v) for v in p])) for p in pixels]
print(json.dumps(out))
