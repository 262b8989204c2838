#!/usr/bin/python3
"""Outside reader for the mesh export tests: reads .vtu / .vtk files with meshio (Debian's
python3-meshio) and prints, as JSON, what an independent tool sees in them.

Usage: /usr/bin/python3 read_vtu.py FILE [FILE ...]

For each file: point count, cell blocks (type, count, connectivity), points, point/cell data
arrays, the summed volume of the tetrahedra computed here with numpy (det of the corner
vectors / 6; for quadratic tetrahedra the straight-sided volume of the four corners), and for
10-node tetrahedra the largest distance between nodes 4..9 and the midpoints of the edges
(0,1), (1,2), (0,2), (0,3), (1,3), (2,3) -- the VTK quadratic-tetra node order.
"""
import json
import sys

try:
    import meshio
    import numpy as np
except ImportError as exc:  # the test turns this into a clear failure
    print(json.dumps({"error": f"python3-meshio/numpy not importable: {exc}"}))
    sys.exit(3)

VTK_EDGES = [(0, 1), (1, 2), (0, 2), (0, 3), (1, 3), (2, 3)]


def describe(path):
    mesh = meshio.read(path)
    pts = np.asarray(mesh.points, dtype=np.float64)
    out = {
        "file": path,
        "numPoints": int(pts.shape[0]),
        "points": pts.reshape(-1).tolist(),
        "cells": [],
        "pointData": {k: np.asarray(v).reshape(-1).tolist() for k, v in mesh.point_data.items()},
        "cellData": {k: np.concatenate([np.asarray(b).reshape(-1) for b in v]).tolist() for k, v in mesh.cell_data.items()},
        "volume": 0.0,
        "minSignedVolume": None,
        "maxMidEdgeDeviation": None,
    }
    volume = 0.0
    min_vol = None
    for block in mesh.cells:
        conn = np.asarray(block.data, dtype=np.int64)
        out["cells"].append({"type": block.type, "count": int(conn.shape[0]), "connectivity": conn.reshape(-1).tolist()})
        if block.type not in ("tetra", "tetra10"):
            continue
        p = pts[conn[:, :4]]
        d = np.linalg.det(np.stack([p[:, 1] - p[:, 0], p[:, 2] - p[:, 0], p[:, 3] - p[:, 0]], axis=2)) / 6.0
        volume += float(np.sum(d))
        m = float(np.min(d))
        min_vol = m if min_vol is None else min(min_vol, m)
        if block.type == "tetra10":
            dev = 0.0
            for k, (a, b) in enumerate(VTK_EDGES):
                mid = 0.5 * (pts[conn[:, a]] + pts[conn[:, b]])
                dev = max(dev, float(np.max(np.abs(pts[conn[:, 4 + k]] - mid))))
            out["maxMidEdgeDeviation"] = dev
    out["volume"] = volume
    out["minSignedVolume"] = min_vol
    return out


def main():
    if len(sys.argv) < 2:
        print(json.dumps({"error": "usage: read_vtu.py FILE [FILE ...]"}))
        return 2
    print(json.dumps([describe(p) for p in sys.argv[1:]]))
    return 0


if __name__ == "__main__":
    sys.exit(main())
