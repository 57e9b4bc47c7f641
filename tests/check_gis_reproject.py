#!/usr/bin/env python3
"""Layers in another CRS than the grid are reprojected to it: observation
wells in geographic coordinates (EPSG:4326, GeoJSON) and a well in web
Mercator (EPSG:3857, Shapefile) must land where PROJ, through python3-gdal's
osr (a reference library), puts them in the grid's UTM zone 33N (EPSG:32633).
"""
import json
import os
import shutil
import subprocess
import sys
import tempfile

import gwcheck_util

# CMake may pick a Python without Debian's GDAL bindings.
gwcheck_util.need_system_python("osgeo.ogr", "osgeo.osr")

from osgeo import ogr, osr  # noqa: E402

CMD = gwcheck_util.command()
ogr.UseExceptions()


def srs(code):
    s = osr.SpatialReference()
    s.ImportFromEPSG(code)
    s.SetAxisMappingStrategy(osr.OAMS_TRADITIONAL_GIS_ORDER)
    return s


def write_points(path, driver, crs, rows):
    ds = ogr.GetDriverByName(driver).CreateDataSource(path)
    lyr = ds.CreateLayer("pts", crs, ogr.wkbPoint)
    lyr.CreateField(ogr.FieldDefn("name", ogr.OFTString))
    lyr.CreateField(ogr.FieldDefn("value", ogr.OFTReal))
    for name, x, y, v in rows:
        f = ogr.Feature(lyr.GetLayerDefn())
        f.SetField("name", name)
        f.SetField("value", v)
        g = ogr.Geometry(ogr.wkbPoint)
        g.AddPoint_2D(x, y)
        f.SetGeometry(g)
        lyr.CreateFeature(f)
    ds = None


def main():
    utm, geo, merc = srs(32633), srs(4326), srs(3857)
    to_utm = osr.CoordinateTransformation(geo, utm)
    merc_to_utm = osr.CoordinateTransformation(merc, utm)
    to_merc = osr.CoordinateTransformation(geo, merc)
    # Grid: 2 km x 1.5 km in zone 33N around 15.6 E, 45.2 N (off the
    # central meridian, so the projection is not trivial there).
    x0, y0 = to_utm.TransformPoint(15.6, 45.2)[:2]
    x0, y0 = round(x0 / 10) * 10 - 1000, round(y0 / 10) * 10 - 750
    obs = [("OW-%d" % i, 15.6 + dx, 45.2 + dy, 100.0 + i) for i, (dx, dy) in
           enumerate([(-0.008, 0.003), (0.004, -0.005), (0.0071, 0.0042)], 1)]
    wlon, wlat = 15.5987, 45.2011
    wx, wy = to_merc.TransformPoint(wlon, wlat)[:2]

    tmp = tempfile.mkdtemp(prefix="gw-gisproj-")
    try:
        write_points(os.path.join(tmp, "obs.geojson"), "GeoJSON", geo, obs)
        write_points(os.path.join(tmp, "well.shp"), "ESRI Shapefile", merc, [("PW-9", wx, wy, 300.0)])
        model = os.path.join(tmp, "m.yaml")
        with open(model, "w") as f:
            f.write("""title: reprojection check
units: {length: m, time: day}
grid: {origin: [%r, %r], cell_size: 10, columns: 200, rows: 150, crs: EPSG:32633}
aquifer: {conductivity: 10, thickness: 20}
recharge: 0.0005
fixed_heads:
  - {name: West, line: [[%r, %r], [%r, %r]], head: 100}
  - {name: East, line: [[%r, %r], [%r, %r]], head: 99}
wells:
  - name: {field: name}
    at: {file: well.shp}
    pumping: {field: value}
observations:
  - name: {field: name}
    at: {file: obs.geojson}
    head: {field: value}
""" % (x0, y0, x0 + 5, y0, x0 + 5, y0 + 1500, x0 + 1995, y0, x0 + 1995, y0 + 1500))
        out = os.path.join(tmp, "out")
        p = subprocess.run([CMD, "run", model, "--out", out, "--quiet"], capture_output=True, text=True)
        if p.returncode != 0:
            sys.exit("FAIL: gwdivide run: " + p.stderr)
        rep = json.load(open(os.path.join(out, "report.json")))
        worst = 0.0
        got = {o["name"]: o for o in rep["observations"]}
        for name, lon, lat, v in obs:
            ex, ey = to_utm.TransformPoint(lon, lat)[:2]
            gx, gy = got[name]["at"]
            worst = max(worst, abs(gx - ex), abs(gy - ey))
            assert got[name]["observed"] == v, got[name]
        ds = ogr.Open(os.path.join(out, "results.gpkg"))
        f = ds.GetLayerByName("wells").GetNextFeature()
        ex, ey = merc_to_utm.TransformPoint(wx, wy)[:2]
        g = f.GetGeometryRef()
        worst = max(worst, abs(g.GetX() - ex), abs(g.GetY() - ey))
        assert f["name"] == "PW-9" and f["pumping_m3_per_day"] == 300.0, (f["name"], f["pumping_m3_per_day"])
        # 1 mm: the report prints coordinates with enough digits for this
        assert worst < 1e-3, "positions off by %g m" % worst
        print("3 observation wells (EPSG:4326) and 1 well (EPSG:3857) within %.2g m of PROJ's positions" % worst)
    finally:
        shutil.rmtree(tmp)


if __name__ == "__main__":
    main()
