#!/usr/bin/env python3
"""The VTK field map read back by an independent reader.

The reader below is written against the published legacy VTK format ("The VTK User's Guide",
Kitware, 11th ed., 2010, ch. 19 "VTK File Formats": header line, title, ASCII|BINARY, DATASET
STRUCTURED_GRID with DIMENSIONS and POINTS, then POINT_DATA with VECTORS and SCALARS +
LOOKUP_TABLE). It shares no code with coilwright. The values are compared with
  * the closed form of a circular filament on its axis, B_z = mu0 N I R^2 / (2 (R^2 + z^2)^(3/2))
    (any electromagnetism textbook, e.g. Jackson, Classical Electrodynamics, 3rd ed., sec. 5.5),
  * `coilwright field --points` (another code path of the program) at every lattice point,
  * the CSV map of the same lattice.
Usage: vtk_readback.py <coilwright binary> <source dir> <work dir>
"""
import csv
import math
import os
import subprocess
import sys


def read_legacy_vtk(path):
    with open(path, encoding="ascii") as f:
        lines = f.read().split("\n")
    assert lines[0].startswith("# vtk DataFile Version"), lines[0]
    title = lines[1]
    assert lines[2].strip() == "ASCII", lines[2]
    tokens = " ".join(lines[3:]).split()
    pos = 0

    def take():
        nonlocal pos
        pos += 1
        return tokens[pos - 1]

    def number(t):
        return float(t)  # python reads "nan" as NaN

    assert take() == "DATASET" and take() == "STRUCTURED_GRID"
    assert take() == "DIMENSIONS"
    dims = [int(take()) for _ in range(3)]
    assert take() == "POINTS"
    n = int(take())
    take()  # data type
    assert n == dims[0] * dims[1] * dims[2]
    points = [[number(take()) for _ in range(3)] for _ in range(n)]
    data = {}
    while pos < len(tokens):
        kw = take()
        if kw == "POINT_DATA":
            assert int(take()) == n
        elif kw == "VECTORS":
            name = take()
            take()
            data[name] = [[number(take()) for _ in range(3)] for _ in range(n)]
        elif kw == "SCALARS":
            name = take()
            take()
            ncomp = 1
            if tokens[pos] != "LOOKUP_TABLE":
                ncomp = int(take())
            assert take() == "LOOKUP_TABLE"
            take()
            data[name] = [number(take()) for _ in range(n * ncomp)]
        else:
            raise AssertionError(f"unexpected keyword {kw}")
    return title, dims, points, data


def close(a, b, rel=1e-12, floor=1e-18):
    if math.isnan(a) or math.isnan(b):
        return math.isnan(a) and math.isnan(b)
    return abs(a - b) <= max(floor, rel * max(abs(a), abs(b)))


def run(*args):
    r = subprocess.run(args, capture_output=True, text=True)
    if r.returncode != 0:
        sys.exit(f"command failed ({r.returncode}): {' '.join(args)}\n{r.stderr}")
    return r.stdout


def main():
    binary, source, work = sys.argv[1:4]
    os.makedirs(work, exist_ok=True)
    loop = os.path.join(source, "configs", "shapes", "loop.toml")  # 10 turns, R = 100 mm, 2.5 A
    failures = []

    # 1. On the axis against the closed form.
    axis_vtk = os.path.join(work, "axis.vtk")
    run(binary, "-q", "map", loop, "--line", "0,0,-200mm", "0,0,200mm", "--n", "41", "--out", axis_vtk)
    title, dims, pts, data = read_legacy_vtk(axis_vtk)
    assert dims == [41, 1, 1], dims
    mu0 = 1.25663706212e-6  # CODATA 2018 value of the vacuum permeability [N/A^2]
    for p, b in zip(pts, data["B"]):
        z = p[2]
        expected = mu0 * 10 * 2.5 * 0.1**2 / (2 * (0.1**2 + z**2) ** 1.5)
        # 1e-9: the CODATA mu0 above has 11 digits; the kernel's accuracy is about 1e-15.
        if not close(b[2], expected, rel=1e-9) or abs(b[0]) > 1e-12 * expected or abs(b[1]) > 1e-12 * expected:
            failures.append(f"axis z={z}: B={b}, closed form Bz={expected}")

    # 2. A 3-D grid against `coilwright field --points` and the CSV map of the same lattice.
    grid_vtk = os.path.join(work, "grid.vtk")
    grid_csv = os.path.join(work, "grid.csv")
    common = ["--grid", "--from", "-50mm,-40mm,-30mm", "--to", "50mm,40mm,30mm", "--n", "5,4,3"]
    run(binary, "-q", "map", loop, *common, "--out", grid_vtk)
    run(binary, "-q", "map", loop, *common, "--out", grid_csv)
    title, dims, pts, data = read_legacy_vtk(grid_vtk)
    assert dims == [5, 4, 3], dims
    # x varies fastest (the VTK order): the second point differs from the first in x only.
    assert pts[1][1] == pts[0][1] and pts[1][2] == pts[0][2] and pts[1][0] > pts[0][0]
    points_csv = os.path.join(work, "points.csv")
    with open(points_csv, "w") as f:
        f.write("x,y,z\n")
        for p in pts:
            f.write(",".join(repr(c) for c in p) + "\n")
    field_csv = os.path.join(work, "field.csv")
    run(binary, "-q", "field", loop, "--points", points_csv, "--out", field_csv)
    with open(field_csv) as f:
        rows = [r for r in csv.reader(line for line in f if not line.startswith("#"))][1:]
    assert len(rows) == len(pts), (len(rows), len(pts))
    for i, r in enumerate(rows):
        b_ref = [float(v) for v in r[3:6]]
        b = data["B"][i]
        for k in range(3):
            if not close(b[k], b_ref[k], rel=1e-14, floor=1e-20):
                failures.append(f"grid point {i} component {k}: VTK {b[k]} vs field {b_ref[k]}")
        mag = math.sqrt(sum(c * c for c in b))
        if not close(data["B_magnitude"][i], mag, rel=1e-14):
            failures.append(f"grid point {i}: |B| {data['B_magnitude'][i]} vs {mag}")
    with open(grid_csv) as f:
        rows = [r for r in csv.reader(line for line in f if not line.startswith("#"))]
    assert rows[0] == ["x", "y", "z", "Bx", "By", "Bz", "|B|", "deviation"], rows[0]
    for i, r in enumerate(rows[1:]):
        vals = [float(v) for v in r]
        ref = pts[i] + data["B"][i] + [data["B_magnitude"][i], data["deviation"][i]]
        for a, b in zip(vals, ref):
            if not close(a, b, rel=0.0, floor=0.0):  # same 17-digit text: identical values
                failures.append(f"csv row {i}: {vals} vs vtk {ref}")
                break

    if failures:
        print("\n".join(failures[:20]))
        sys.exit(1)
    print(f"VTK read back: {len(pts)} grid points and 41 axis points agree")


if __name__ == "__main__":
    main()
