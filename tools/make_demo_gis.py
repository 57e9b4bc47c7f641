#!/usr/bin/env python3
"""Make the demo's GIS inputs from the invented scenario in demo/valley.yaml.

Writes, into demo/gis/ (or --out DIR):
  valley.gpkg       layers streams, drains, wells, observations, marsh,
                    irrigated (all EPSG:32633, the scenario's grid CRS)
  conductivity.tif  hydraulic conductivity (m/day) on the model's 10 m grid:
                    the buried-channel zone rasterized by cell centre, the
                    background elsewhere

demo/valley-gis.yaml reads these instead of typed coordinates; it gives the
same heads as demo/valley.yaml (tests/check_gis_roundtrip.py checks this).
Needs python3-gdal and python3-yaml (Debian packages).
"""
import argparse
import os
import sys

try:
    from osgeo import gdal, ogr, osr
except ImportError:  # a Python without Debian's GDAL bindings on PATH first
    if os.path.exists("/usr/bin/python3") and os.path.realpath(sys.executable) != os.path.realpath("/usr/bin/python3"):
        os.execv("/usr/bin/python3", ["/usr/bin/python3"] + sys.argv)
    raise
import yaml

gdal.UseExceptions()
ogr.UseExceptions()


def point_in_polygon(x, y, ring):
    """Even-odd rule, as the model uses for zones (solver/rasterize.h)."""
    inside = False
    n = len(ring)
    for i in range(n):
        x1, y1 = ring[i]
        x2, y2 = ring[(i + 1) % n]
        if (y1 > y) != (y2 > y):
            xc = x1 + (y - y1) * (x2 - x1) / (y2 - y1)
            if x < xc:
                inside = not inside
    return inside


def layer(ds, name, geom_type, srs, fields):
    lyr = ds.CreateLayer(name, srs, geom_type)
    for fname, ftype in fields:
        lyr.CreateField(ogr.FieldDefn(fname, ftype))
    return lyr


def add(lyr, geom, **attrs):
    f = ogr.Feature(lyr.GetLayerDefn())
    for k, v in attrs.items():
        f.SetField(k, v)
    f.SetGeometry(geom)
    lyr.CreateFeature(f)


def line(coords):
    g = ogr.Geometry(ogr.wkbLineString)
    for x, y in coords:
        g.AddPoint_2D(float(x), float(y))
    return g


def polygon(coords):
    r = ogr.Geometry(ogr.wkbLinearRing)
    for x, y in list(coords) + [coords[0]]:
        r.AddPoint_2D(float(x), float(y))
    g = ogr.Geometry(ogr.wkbPolygon)
    g.AddGeometry(r)
    return g


def point(xy):
    g = ogr.Geometry(ogr.wkbPoint)
    g.AddPoint_2D(float(xy[0]), float(xy[1]))
    return g


def main():
    here = os.path.dirname(os.path.abspath(__file__))
    root = os.path.dirname(here)
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("--model", default=os.path.join(root, "demo", "valley.yaml"))
    ap.add_argument("--out", default=os.path.join(root, "demo", "gis"))
    a = ap.parse_args()
    with open(a.model) as f:
        m = yaml.safe_load(f)
    os.makedirs(a.out, exist_ok=True)
    srs = osr.SpatialReference()
    srs.SetFromUserInput(m["grid"]["crs"])

    gpkg = os.path.join(a.out, "valley.gpkg")
    if os.path.exists(gpkg):
        os.remove(gpkg)
    ds = ogr.GetDriverByName("GPKG").CreateDataSource(gpkg)
    s = layer(ds, "streams", ogr.wkbLineString, srs, [("name", ogr.OFTString)])
    for st in m.get("streams", []):
        add(s, line(st["line"]), name=st["name"])
    d = layer(ds, "drains", ogr.wkbLineString, srs,
              [("name", ogr.OFTString), ("elevation_m", ogr.OFTReal), ("conductance_m_per_day", ogr.OFTReal)])
    for dr in m.get("drains", []):
        add(d, line(dr["line"]), name=dr["name"], elevation_m=dr["elevation"],
            conductance_m_per_day=dr["conductance"])
    w = layer(ds, "wells", ogr.wkbPoint, srs, [("name", ogr.OFTString), ("pumping_m3_per_day", ogr.OFTReal)])
    for we in m.get("wells", []):
        add(w, point(we["at"]), name=we["name"], pumping_m3_per_day=we["pumping"])
    o = layer(ds, "observations", ogr.wkbPoint, srs, [("name", ogr.OFTString), ("head_m", ogr.OFTReal)])
    for ob in m.get("observations", []):
        add(o, point(ob["at"]), name=ob["name"], head_m=ob.get("head"))
    mk = layer(ds, "marsh", ogr.wkbPolygon, srs, [("name", ogr.OFTString)])
    for lk in m.get("leakage", []):
        add(mk, polygon(lk["polygon"]), name=lk["name"])
    ir = layer(ds, "irrigated", ogr.wkbPolygon, srs, [("name", ogr.OFTString)])
    for z in (m.get("recharge", {}).get("zones") or []):
        add(ir, polygon(z["polygon"]), name=z["name"])
    ds = None

    # Conductivity on the model grid, by the zone rule (later zones win, a
    # cell takes a zone's value when its centre lies inside the polygon).
    g = m["grid"]
    x0, y0 = g["origin"]
    dx = dy = float(g["cell_size"]) if not isinstance(g["cell_size"], list) else None
    if dx is None:
        dx, dy = map(float, g["cell_size"])
    nx, ny = int(g["columns"]), int(g["rows"])
    k = m["aquifer"]["conductivity"]
    background = float(k["value"]) if isinstance(k, dict) else float(k)
    zones = k.get("zones", []) if isinstance(k, dict) else []
    tif = os.path.join(a.out, "conductivity.tif")
    r = gdal.GetDriverByName("GTiff").Create(tif, nx, ny, 1, gdal.GDT_Float32, ["COMPRESS=DEFLATE"])
    r.SetGeoTransform([x0, dx, 0.0, y0 + ny * dy, 0.0, -dy])
    r.SetSpatialRef(srs)
    band = r.GetRasterBand(1)
    band.SetNoDataValue(-9999.0)
    band.SetDescription("hydraulic conductivity (m/day)")
    import array
    rows = []
    for row in range(ny):
        yc = y0 + (ny - row - 0.5) * dy
        vals = array.array("f", [background] * nx)
        for col in range(nx):
            xc = x0 + (col + 0.5) * dx
            for z in zones:
                if point_in_polygon(xc, yc, z["polygon"]):
                    vals[col] = float(z["value"])
        rows.append(vals.tobytes())
    band.WriteRaster(0, 0, nx, ny, b"".join(rows), nx, ny, gdal.GDT_Float32)
    r = None
    print("wrote %s and %s" % (gpkg, tif))


if __name__ == "__main__":
    main()
