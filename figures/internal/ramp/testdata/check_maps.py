# Independent check of lidscope's colour maps with colorspacious (Debian
# package python3-colorspacious). Reads JSON from stdin:
#   {"white": [X, Y, Z] (Y = 100), "maps": {name: {"lab": [[L, a, b], ...]}}}
# and writes JSON to stdout with, per map: the sRGB1 conversion of every
# entry, the CAM02-UCS distances between consecutive entries, and the
# CAM02-UCS lightness J' of every entry under simulated colour-vision
# deficiency (Machado et al. 2009, severity 100).
import json
import sys

import numpy as np
from colorspacious import cspace_convert

req = json.load(sys.stdin)
lab_space = {"name": "CIELab", "XYZ100_w": req["white"]}
out = {}
for name, m in req["maps"].items():
    lab = np.array(m["lab"], dtype=float)
    rgb = cspace_convert(lab, lab_space, "sRGB1")
    clipped = np.clip(rgb, 0, 1)
    ucs = cspace_convert(clipped, "sRGB1", "CAM02-UCS")
    steps = np.linalg.norm(np.diff(ucs, axis=0), axis=1)
    cvd = {}
    for kind in ("deuteranomaly", "protanomaly", "tritanomaly"):
        sim = cspace_convert(clipped, {"name": "sRGB1+CVD", "cvd_type": kind, "severity": 100}, "sRGB1")
        u = cspace_convert(np.clip(sim, 0, 1), "sRGB1", "CAM02-UCS")
        cvd[kind] = {"J": u[:, 0].tolist(), "ucs": u.tolist()}
    out[name] = {"srgb": rgb.tolist(), "steps": steps.tolist(), "J": ucs[:, 0].tolist(), "cvd": cvd}
json.dump(out, sys.stdout)
