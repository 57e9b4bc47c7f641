#!/usr/bin/env python3
"""The demo model from typed coordinates (demo/valley.yaml) and from a
GeoPackage plus a conductivity GeoTIFF (demo/valley-gis.yaml, inputs made by
tools/make_demo_gis.py) must give identical heads and budgets.

Reference: the two runs describe one model, so agreement is exact; heads.tif
is read with GDAL (python3-gdal, a reference library).
"""
import json
import os
import shutil
import subprocess
import sys
import tempfile

import gwcheck_util

# CMake may pick a Python without Debian's GDAL bindings.
gwcheck_util.need_system_python("osgeo.gdal", "osgeo.ogr")

from osgeo import gdal, ogr  # noqa: E402

SRC = gwcheck_util.SOURCE_DIR
CMD = gwcheck_util.command()


def run(model, out):
    p = subprocess.run([CMD, "run", model, "--out", out, "--quiet"], capture_output=True, text=True)
    if p.returncode != 0:
        sys.exit("FAIL: gwdivide run %s: %s" % (model, p.stderr))


def heads(path):
    ds = gdal.Open(path)
    return ds.GetGeoTransform(), ds.GetSpatialRef().GetAuthorityCode(None), ds.GetRasterBand(1).ReadAsArray()


def main():
    tmp = tempfile.mkdtemp(prefix="gw-gisrt-")
    try:
        shutil.copy(os.path.join(SRC, "demo", "valley.yaml"), tmp)
        shutil.copy(os.path.join(SRC, "demo", "valley-gis.yaml"), tmp)
        subprocess.run([sys.executable, os.path.join(SRC, "tools", "make_demo_gis.py"),
                        "--model", os.path.join(tmp, "valley.yaml"), "--out", os.path.join(tmp, "gis")],
                       check=True, capture_output=True)
        run(os.path.join(tmp, "valley.yaml"), os.path.join(tmp, "a"))
        run(os.path.join(tmp, "valley-gis.yaml"), os.path.join(tmp, "b"))
        ga, ca, ha = heads(os.path.join(tmp, "a", "heads.tif"))
        gb, cb, hb = heads(os.path.join(tmp, "b", "heads.tif"))
        assert ga == gb, "grids differ: %s vs %s" % (ga, gb)
        assert ca == cb == "32633", (ca, cb)
        diff = abs(ha - hb).max()
        assert diff == 0.0, "heads differ by up to %g" % diff
        ra = json.load(open(os.path.join(tmp, "a", "report.json")))
        rb = json.load(open(os.path.join(tmp, "b", "report.json")))
        fa = {f["name"]: f["net"] for f in ra["features"]}
        fb = {f["name"]: f["net"] for f in rb["features"]}
        assert fa == fb, "budgets differ:\n%s\n%s" % (fa, fb)
        oa = [(o["name"], o["at"], o["observed"]) for o in ra["observations"]]
        ob = [(o["name"], o["at"], o["observed"]) for o in rb["observations"]]
        assert oa == ob, (oa, ob)
        print("heads identical over %d cells (max |dh| = %g); %d feature budgets identical" % (ha.size, diff, len(fa)))
    finally:
        shutil.rmtree(tmp)


if __name__ == "__main__":
    main()
