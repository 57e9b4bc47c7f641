#!/usr/bin/env python3
"""Bad GIS input is rejected with a clear message and nothing is written:
missing file, missing layer, a `where` that selects nothing, a wrong
geometry type, a raster that does not cover the grid, nodata inside the
active area, a layer without CRS (accepted with assume_crs: true), and
grid.like naming a missing raster.  Each run must exit with status 1, name
the model file position, and leave no output folder behind (DESIGN.md,
Reliability).  Test inputs are made with python3-gdal.
"""
import os
import shutil
import subprocess
import sys
import tempfile

import gwcheck_util

# CMake may pick a Python without Debian's GDAL bindings.
gwcheck_util.need_system_python("osgeo.gdal", "osgeo.ogr", "osgeo.osr")

from osgeo import gdal, ogr, osr  # noqa: E402

CMD = gwcheck_util.command()
gdal.UseExceptions()
ogr.UseExceptions()

BASE = """title: bad GIS input
units: {length: m, time: day}
grid: {origin: [0, 0], cell_size: 10, columns: 40, rows: 20, crs: EPSG:32633}
aquifer: {conductivity: %(k)s, thickness: 10}
recharge: 0.001
fixed_heads:
  - {name: West, line: [[5, 0], [5, 200]], head: 50}
streams:
  - name: East Creek
    line: %(line)s
    stage: 49
    bed_bottom: 48
    bed_conductance: 1.0
"""
GOOD_LINE = "{file: in.gpkg, layer: streams, where: \"name = 'East Creek'\"}"


def make_inputs(d):
    utm = osr.SpatialReference()
    utm.ImportFromEPSG(32633)
    ds = ogr.GetDriverByName("GPKG").CreateDataSource(os.path.join(d, "in.gpkg"))
    s = ds.CreateLayer("streams", utm, ogr.wkbLineString)
    s.CreateField(ogr.FieldDefn("name", ogr.OFTString))
    f = ogr.Feature(s.GetLayerDefn())
    f.SetField("name", "East Creek")
    f.SetGeometry(ogr.CreateGeometryFromWkt("LINESTRING (395 0, 395 200)"))
    s.CreateFeature(f)
    p = ds.CreateLayer("wells", utm, ogr.wkbPoint)
    f = ogr.Feature(p.GetLayerDefn())
    f.SetGeometry(ogr.CreateGeometryFromWkt("POINT (200 100)"))
    p.CreateFeature(f)
    ds = None
    # the same line in a Shapefile without a .prj (no CRS)
    ds = ogr.GetDriverByName("ESRI Shapefile").CreateDataSource(os.path.join(d, "nocrs.shp"))
    s = ds.CreateLayer("nocrs", None, ogr.wkbLineString)
    f = ogr.Feature(s.GetLayerDefn())
    f.SetGeometry(ogr.CreateGeometryFromWkt("LINESTRING (395 0, 395 200)"))
    s.CreateFeature(f)
    ds = None
    # conductivity rasters: one too small, one with a nodata hole
    for name, nx, hole in (("small.tif", 30, False), ("hole.tif", 40, True)):
        r = gdal.GetDriverByName("GTiff").Create(os.path.join(d, name), nx, 20, 1, gdal.GDT_Float32)
        r.SetGeoTransform([0, 10, 0, 200, 0, -10])
        r.SetSpatialRef(utm)
        b = r.GetRasterBand(1)
        b.SetNoDataValue(-1)
        b.Fill(5.0)
        if hole:
            b.WriteRaster(12, 7, 1, 1, bytes(bytearray(b"\x00\x00\x80\xbf")))   # -1.0f at col 12, row 7
        r = None


CASES = [
    # name, line, conductivity, expected words in the message
    ("missing file", "{file: nothere.gpkg, layer: streams}", "5", ["nothere.gpkg", "m.yaml:10:11"]),
    ("missing layer", "{file: in.gpkg, layer: rivers}", "5", ["no layer 'rivers'", "streams"]),
    ("where selects nothing", "{file: in.gpkg, layer: streams, where: \"name = 'Nowhere'\"}", "5",
     ["selects no features"]),
    ("wrong geometry type", "{file: in.gpkg, layer: wells}", "5", ["expected a line", "Point"]),
    ("raster not covering the grid", GOOD_LINE, "{raster: small.tif}", ["does not cover", "col 30, row 0"]),
    ("nodata in the active area", GOOD_LINE, "{raster: hole.tif}", ["nodata", "col 12, row 7", "x 125, y 125"]),
    ("layer without CRS", "{file: nocrs.shp}", "5", ["no coordinate reference system", "assume_crs"]),
]


def run(d, text, out):
    with open(os.path.join(d, "m.yaml"), "w") as f:
        f.write(text)
    return subprocess.run([CMD, "run", os.path.join(d, "m.yaml"), "--out", out], capture_output=True, text=True)


def main():
    d = tempfile.mkdtemp(prefix="gw-giserr-")
    bad = 0
    try:
        make_inputs(d)
        out = os.path.join(d, "out")
        p = run(d, BASE % {"k": "5", "line": GOOD_LINE}, out)
        if p.returncode != 0:
            sys.exit("FAIL: the good model is rejected: " + p.stderr)
        shutil.rmtree(out)
        cases = CASES + [("grid.like of a missing raster", GOOD_LINE, "5", ["nothere.tif", "m.yaml:3:"])]
        for name, line, k, words in cases:
            text = BASE % {"k": k, "line": line}
            if name.startswith("grid.like"):
                text = text.replace("grid: {origin: [0, 0], cell_size: 10, columns: 40, rows: 20, crs: EPSG:32633}",
                                    "grid: {like: nothere.tif}")
            p = run(d, text, out)
            msg = p.stderr.strip()
            ok = p.returncode == 1 and all(w in msg for w in words) and not os.path.exists(out)
            print("%-32s %s  %s" % (name, "ok  " if ok else "FAIL", msg.splitlines()[0] if msg else "(no message)"))
            bad += not ok
            if os.path.exists(out):
                shutil.rmtree(out)
        p = run(d, BASE % {"k": "5", "line": "{file: nocrs.shp, assume_crs: true}"}, out)
        ok = p.returncode == 0
        print("%-32s %s" % ("assume_crs: true accepted", "ok" if ok else "FAIL  " + p.stderr))
        bad += not ok
    finally:
        shutil.rmtree(d)
    if bad:
        sys.exit("FAIL: %d case(s)" % bad)


if __name__ == "__main__":
    main()
