"""Area-weighted centroids of polygons with holes, for the ring-nesting checks.

Independent of the engine: the .shp record is read with struct (1998 shapefile technical
description), rings are nested by a plain even-odd ray test written here, and areas and centroids
come from the shoelace formulas with numpy:
    A = 1/2 sum(x_i y_{i+1} - x_{i+1} y_i),  Cx = sum((x_i + x_{i+1})(x_i y_{i+1} - x_{i+1} y_i)) / (6A),
holes subtracting their |A| (and their moments) from the outer ring's.

    python3 scripts/reference/ring_centroids.py test/fixtures/auckland/auckland.shp 163
prints the record's parts (vertices, signed area), the centroid with holes subtracted and the
centroid if the hole were read as a second outer part, as JSON.
"""
import json
import struct
import sys

import numpy as np


def record_rings(path, wanted):
    b = open(path, "rb").read()
    at, number = 100, 0
    while at < len(b):
        length = struct.unpack(">i", b[at + 4:at + 8])[0] * 2
        content = b[at + 8:at + 8 + length]
        number += 1
        if number == wanted:
            parts, points = struct.unpack("<ii", content[36:44])
            starts = list(struct.unpack("<%di" % parts, content[44:44 + 4 * parts])) + [points]
            xy = np.frombuffer(content[44 + 4 * parts:44 + 4 * parts + 16 * points], dtype="<f8").reshape(-1, 2)
            return [xy[starts[k]:starts[k + 1]] for k in range(parts)]
        at += 8 + length
    raise SystemExit("no record %d" % wanted)


def moments(ring):
    x, y = ring[:, 0], ring[:, 1]
    cross = x[:-1] * y[1:] - x[1:] * y[:-1]
    a = cross.sum() / 2
    return a, ((x[:-1] + x[1:]) * cross).sum() / 6, ((y[:-1] + y[1:]) * cross).sum() / 6


def inside(point, ring):
    px, py = point
    c = False
    for (xi, yi), (xj, yj) in zip(ring[:-1], ring[1:]):
        if (yi > py) != (yj > py) and px < (xj - xi) * (py - yi) / (yj - yi) + xi:
            c = not c
    return c


def main():
    path, wanted = sys.argv[1], int(sys.argv[2])
    rings = record_rings(path, wanted)
    m = [moments(r) for r in rings]
    depth = [sum(1 for j, o in enumerate(rings) if j != i and abs(m[j][0]) > abs(m[i][0]) and inside(r[0], o))
             for i, r in enumerate(rings)]
    sign = [1 if d % 2 == 0 else -1 for d in depth]
    area = sum(s * abs(a) for s, (a, _, _) in zip(sign, m))
    # moments follow the ring's orientation: flip so outer rings add and holes subtract
    mx = sum(s * np.sign(a) * sx for s, (a, sx, _) in zip(sign, m))
    my = sum(s * np.sign(a) * sy for s, (a, _, sy) in zip(sign, m))
    wrong_area = sum(abs(a) for a, _, _ in m)
    wx = sum(np.sign(a) * sx for a, sx, _ in m)
    wy = sum(np.sign(a) * sy for a, _, sy in m)
    print(json.dumps({
        "record": wanted,
        "parts": [{"positions": len(r), "signedArea": round(float(a), 12), "depth": d} for r, (a, _, _), d in zip(rings, m, depth)],
        "centroid": [round(float(mx / area), 12), round(float(my / area), 12)],
        "centroidIfHoleWereAPart": [round(float(wx / wrong_area), 12), round(float(wy / wrong_area), 12)],
    }, indent=1))


if __name__ == "__main__":
    main()
