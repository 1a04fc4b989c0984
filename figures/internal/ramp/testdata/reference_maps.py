# Writes reference_maps.json: samples of every colour map registered in
# Matplotlib (Debian package python3-matplotlib), the maps lidscope's own
# maps must not resemble (TestMapsDistinctFromReferences).
#
# Run once with Debian's python3 and commit the output:
#   /usr/bin/python3 reference_maps.py > reference_maps.json
#
# Each map is sampled at N evenly spaced points t = i/(N-1) and written as
# 8-bit sRGB hex; reversed variants (names ending in _r) are left out, the
# test compares both directions itself.
import json
import sys

import matplotlib
from matplotlib import colormaps

N = 17
maps = {}
for name in sorted(colormaps):
    if name.endswith("_r"):
        continue
    cm = colormaps[name]
    samples = []
    for i in range(N):
        r, g, b, _ = cm(i / (N - 1))
        samples.append("#%02x%02x%02x" % (round(r * 255), round(g * 255), round(b * 255)))
    maps[name] = samples
out = {
    "source": "Matplotlib %s colormaps registry (Debian python3-matplotlib), sampled by reference_maps.py" % matplotlib.__version__,
    "samples": N,
    "maps": maps,
}
# One map a line, so that a regenerated file diffs readably.
lines = ['{"source": %s, "samples": %d, "maps": {' % (json.dumps(out["source"]), N)]
for i, name in enumerate(sorted(maps)):
    sep = "," if i < len(maps) - 1 else ""
    lines.append("%s: %s%s" % (json.dumps(name), json.dumps(maps[name]), sep))
lines.append("}}")
sys.stdout.write("\n".join(lines) + "\n")
