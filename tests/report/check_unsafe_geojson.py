"""Checks the unsafe-area polygons in a GeoJSON written by `strewn map --geojson`.

usage: check_unsafe_geojson.py MAP.geojson [MAP.csv]

- RFC 7946, section 3.1.6: every ring closed, at least four positions; exterior rings
  counter-clockwise and holes clockwise (signed area by the shoelace formula).
- Validity by GEOS through GDAL: ogrinfo's SQLite dialect, ST_IsValid = 1 for every polygon.
- With the map's CSV (a site without an origin, positions in site metres or feet, as the
  scenario's unit, with area_m2 or area_ft2 beside them): the polygons' area
  (shoelace, and GDAL's ST_Area) against the area of the grid cells at or above the level; the
  two differ by at most the boundary's length times a cell (a cell-wise outline against one
  interpolated between cell centres).
Exit status 0 when every check passes; the faults are printed.
"""
import csv
import json
import math
import os
import subprocess
import sys


def shoelace(ring):
    return 0.5 * sum(x1 * y2 - x2 * y1 for (x1, y1), (x2, y2) in zip(ring, ring[1:]))


def length(ring):
    return sum(math.hypot(x2 - x1, y2 - y1) for (x1, y1), (x2, y2) in zip(ring, ring[1:]))


def main():
    path = sys.argv[1]
    grid = sys.argv[2] if len(sys.argv) > 2 else None
    faults = []
    doc = json.load(open(path))
    unsafe = [f for f in doc["features"] if f["properties"].get("kind") == "unsafe_area"]
    if not unsafe:
        faults.append("no unsafe_area feature")
    for f in unsafe:
        level = f["properties"]["level"]
        if f["geometry"]["type"] != "MultiPolygon":
            faults.append("level %g: geometry %s, not MultiPolygon" % (level, f["geometry"]["type"]))
            continue
        for polygon in f["geometry"]["coordinates"]:
            for k, ring in enumerate(polygon):
                if len(ring) < 4 or ring[0] != ring[-1]:
                    faults.append("level %g: a ring not closed or with fewer than four positions" % level)
                    continue
                a = shoelace(ring)
                if (k == 0) != (a > 0):
                    faults.append("level %g: ring %d runs the wrong way (signed area %g)" % (level, k, a))

    layer = os.path.splitext(os.path.basename(path))[0]
    sql = ("SELECT level, ST_IsValid(geometry) AS valid, ST_Area(geometry) AS area FROM \"%s\" "
           "WHERE kind = 'unsafe_area'" % layer)
    out = subprocess.run(["ogrinfo", "-ro", "-q", path, "-dialect", "SQLite", "-sql", sql],
                         capture_output=True, text=True, check=False)
    valid = [line.split("=")[1].strip() for line in out.stdout.splitlines() if line.strip().startswith("valid")]
    gdal_area = [float(line.split("=")[1]) for line in out.stdout.splitlines() if line.strip().startswith("area")]
    if out.returncode != 0 or len(valid) != len(unsafe):
        faults.append("GDAL read %d unsafe areas of %d: %s" % (len(valid), len(unsafe), out.stderr.strip()))
    for v in valid:
        if v != "1":
            faults.append("GEOS (ST_IsValid) finds an unsafe area invalid")

    if grid and not faults:
        unit = {"site_metres": "m", "site_feet": "ft"}.get(doc.get("strewn_coordinates"))
        if unit is None:
            faults.append("the area check needs positions in site metres or feet")
            unit = "m"
        rows = list(csv.DictReader(open(grid)))
        risk = [k for k in rows[0] if k.startswith("risk_per_")][0]
        xs = sorted({float(r["x_" + unit]) for r in rows})
        spacing = min(b - a for a, b in zip(xs, xs[1:]))
        for f, ga in zip(unsafe, gdal_area):
            level = f["properties"]["level"]
            polygon_area = sum(shoelace(r) for p in f["geometry"]["coordinates"] for r in p)
            boundary = sum(length(r) for p in f["geometry"]["coordinates"] for r in p)
            cells = sum(1 for r in rows if float(r[risk]) >= level) * spacing * spacing
            print("level %g: polygons %.4f %s^2 (GDAL %.4f), cells at or above it %.4f %s^2, boundary %.2f %s"
                  % (level, polygon_area, unit, ga, cells, unit, boundary, unit))
            if abs(ga - polygon_area) > 1e-6 * polygon_area:
                faults.append("level %g: GDAL's area %g differs from the shoelace's %g" % (level, ga, polygon_area))
            if abs(polygon_area - cells) > boundary * spacing:
                faults.append("level %g: polygons %g %s^2 against %g %s^2 of cells" % (level, polygon_area, unit, cells, unit))
            key = "area_%s2" % unit
            if abs(f["properties"][key] - polygon_area) > 1e-6 * polygon_area:
                faults.append("level %g: %s %g differs from the polygons' %g" % (level, key, f["properties"][key], polygon_area))
    for fault in faults:
        print("%s: %s" % (path, fault), file=sys.stderr)
    return 1 if faults else 0


if __name__ == "__main__":
    sys.exit(main())
