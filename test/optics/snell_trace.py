"""An independent real-ray tracer for straylight's lens files (shares no code or tables with src/).

Reads a JSON request on stdin: {"lenses": [{"file": LENS.yaml, "rays": [{"path": [[surface, action,
dir], ...], "nm": WAVELENGTH, "o": [x, y, z], "d": [dx, dy, dz]}, ...]}]} and prints, per lens and
ray, where it lands on the sensor plane ({"x", "y"}) or null when it misses a sphere or is totally
internally reflected.

The lens file is read with PyYAML. Surfaces are spheres (or planes: `flat`, the stop) with vertices
at the running sum of the gaps from z = 0; the sensor is the plane after the last gap. Rays are
traced with numpy in the vector form of Snell's law and the mirror law (e.g. Glassner, "An
Introduction to Ray Tracing", 1989, ch. 6: t = eta i + (eta cos_i - cos_t) n), always meeting each
sphere on its vertex's side. Indices: SCHOTT's published Sellmeier coefficients for N-BK7 and N-SF5
(typed here from the data sheets), and for glasses given as (n_d, V_d) the lens-file format's own
definition (README, "Lenses"): a Cauchy curve n = A + B / lambda^2 through n_d at the d line whose
n_F - n_C is (n_d - 1) / V_d. Air is 1.
"""

import json
import sys

import numpy as np
import yaml

D_NM, F_NM, C_NM = 587.5618, 486.1327, 656.2725

SCHOTT = {
    # B1, B2, B3, C1, C2, C3 (um^2), SCHOTT optical glass data sheets
    "N-BK7": (1.03961212, 0.231792344, 1.01046945, 0.00600069867, 0.0200179144, 103.560653),
    "N-SF5": (1.52481889, 0.187085527, 1.42729015, 0.011254756, 0.0588995392, 129.141675),
}


def index_of(glass, glasses, nm):
    if glass is None:
        return 1.0
    if glass in glasses:
        g = glasses[glass]
        if "sellmeier" in g:
            b, c = g["sellmeier"]["b"], g["sellmeier"]["c"]
            coeffs = (*b, *c)
        else:
            nd, vd = float(g["nd"]), float(g["vd"])
            slope = (nd - 1.0) / vd / (1.0 / F_NM**2 - 1.0 / C_NM**2)
            return nd - slope / D_NM**2 + slope / nm**2
    else:
        coeffs = SCHOTT[glass]
    l2 = (nm / 1000.0) ** 2
    b1, b2, b3, c1, c2, c3 = coeffs
    return float(np.sqrt(1.0 + b1 * l2 / (l2 - c1) + b2 * l2 / (l2 - c2) + b3 * l2 / (l2 - c3)))


def load(file):
    with open(file, encoding="utf-8") as fh:
        doc = yaml.safe_load(fh)
    glasses = doc.get("glasses") or {}
    surfaces = []
    z = 0.0
    for s in doc["surfaces"]:
        r = 0.0 if s.get("stop") or s.get("radius") in ("flat", 0) else float(s["radius"])
        surfaces.append({"z": z, "r": r, "glass": s.get("glass"), "stop": bool(s.get("stop"))})
        z += float(s["gap"])
    return surfaces, glasses, z


def trace(surfaces, glasses, sensor_z, path, nm, o, d):
    p = np.array(o, dtype=float)
    v = np.array(d, dtype=float)
    v /= np.linalg.norm(v)
    for surface, action, direction in path:
        s = surfaces[surface]
        if s["r"] == 0.0:
            t = (s["z"] - p[2]) / v[2]
            p = p + t * v
            normal = np.array([0.0, 0.0, -1.0])
        else:
            centre = np.array([0.0, 0.0, s["z"] + s["r"]])
            oc = p - centre
            b = float(np.dot(oc, v))
            disc = b * b - (float(np.dot(oc, oc)) - s["r"] ** 2)
            if disc < 0:
                return None
            roots = (-b - np.sqrt(disc), -b + np.sqrt(disc))
            # the crossing on the vertex's side of the centre: (z - z_centre) has the sign of -r
            on_cap = [tt for tt in roots if (p[2] + tt * v[2] - centre[2]) * -s["r"] > 0]
            if not on_cap:
                return None  # it meets only the far half of the sphere: not the surface
            t = on_cap[0]
            p = p + t * v
            normal = (p - centre) / s["r"]
        if s["stop"]:
            continue
        cos_i = -float(np.dot(normal, v))
        if cos_i < 0:
            normal, cos_i = -normal, -cos_i
        if action == "reflect":
            v = v + 2.0 * cos_i * normal
            continue
        before = index_of(surfaces[surface - 1]["glass"], glasses, nm) if surface > 0 else 1.0
        after = index_of(s["glass"], glasses, nm)
        n_in, n_out = (before, after) if direction == 1 else (after, before)
        eta = n_in / n_out
        k = 1.0 - eta * eta * (1.0 - cos_i * cos_i)
        if k < 0:
            return None
        v = eta * v + (eta * cos_i - np.sqrt(k)) * normal
    t = (sensor_z - p[2]) / v[2]
    q = p + t * v
    return {"x": float(q[0]), "y": float(q[1])}


def main():
    req = json.load(sys.stdin)
    out = []
    for lens in req["lenses"]:
        surfaces, glasses, sensor_z = load(lens["file"])
        out.append([trace(surfaces, glasses, sensor_z, r["path"], r["nm"], r["o"], r["d"]) for r in lens["rays"]])
    json.dump(out, sys.stdout)


main()
