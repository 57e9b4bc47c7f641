#!/usr/bin/env python3
"""results.gpkg of the demo run, read back with GDAL/OGR (python3-gdal, a
reference library): every layer opens, holds the expected features, is in
the grid's CRS, and has fields of the expected types; the numbers agree with
report.json (catchment areas within the mixed-cell bound, capture and
travel-time zone areas, observation residuals, per-reach budgets summing to
the feature budgets); head contours lie where the heads say.
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

R, S, I = ogr.OFTReal, ogr.OFTString, ogr.OFTInteger64
EXPECTED = {
    "head_contours": (ogr.wkbLineString, {"id": I, "head_m": R}),
    "stream_reaches": (ogr.wkbMultiLineString, {"feature": S, "type": S, "col": I, "row": I, "length_m": R,
                                                "inflow_m3_per_day": R, "outflow_m3_per_day": R,
                                                "net_m3_per_day": R, "state": S, "level_m": R, "head_m": R}),
    "wells": (ogr.wkbPoint, {"name": S, "pumping_m3_per_day": R, "withdrawn_m3_per_day": R, "cell_head_m": R,
                             "col": I, "row": I}),
    "observations": (ogr.wkbPoint, {"name": S, "observed_head_m": R, "simulated_head_m": R, "residual_m": R}),
    "divides": (ogr.wkbMultiLineString, {"feature_a": S, "feature_b": S, "length_m": R}),
    "catchments": (ogr.wkbMultiPolygon, {"feature": S, "type": S, "report_area_m2": R, "mixed_area_m2": R,
                                         "recharge_m3_per_day": R, "area_m2": R}),
    "stagnation_points": (ogr.wkbPoint, {"type": S, "head_m": R}),
    "capture_zones": (ogr.wkbMultiPolygon, {"well": S, "pumping_m3_per_day": R, "area_m2": R}),
    "travel_time_zones": (ogr.wkbMultiPolygon, {"well": S, "time_day": R, "area_m2": R}),
}


def check(cond, msg):
    if not cond:
        sys.exit("FAIL: " + msg)


def main():
    tmp = tempfile.mkdtemp(prefix="gw-gisout-")
    try:
        out = os.path.join(tmp, "out")
        p = subprocess.run([CMD, "run", os.path.join(SRC, "demo", "valley.yaml"), "--out", out, "--quiet"],
                           capture_output=True, text=True)
        check(p.returncode == 0, "gwdivide run: " + p.stderr)
        rep = json.load(open(os.path.join(out, "report.json")))
        ds = ogr.Open(os.path.join(out, "results.gpkg"))
        check(ds is not None, "results.gpkg does not open")
        names = [ds.GetLayer(i).GetName() for i in range(ds.GetLayerCount())]
        check(sorted(names) == sorted(EXPECTED), "layers %s" % names)
        for name, (gtype, fields) in EXPECTED.items():
            lyr = ds.GetLayerByName(name)
            srs = lyr.GetSpatialRef()
            check(srs is not None and srs.GetAuthorityCode(None) == "32633", "%s: CRS %s" % (name, srs))
            check(lyr.GetGeomType() == gtype, "%s: geometry type %d" % (name, lyr.GetGeomType()))
            d = lyr.GetLayerDefn()
            got = {d.GetFieldDefn(i).GetName(): d.GetFieldDefn(i).GetType() for i in range(d.GetFieldCount())}
            check(got == fields, "%s: fields %s" % (name, got))
            for f in lyr:
                g = f.GetGeometryRef()
                check(g is not None and not g.IsEmpty(), "%s: empty geometry" % name)
                if gtype == ogr.wkbMultiPolygon:
                    check(g.IsValid(), "%s: invalid polygon for %s" % (name, f.GetField(0)))
            lyr.ResetReading()
        print("%d layers, all in EPSG:32633 with the expected fields" % len(names))

        # Catchments: the polygon covers the cells whose water mostly ends in
        # the feature; the report weights every cell by its share.  They agree
        # on unmixed cells, so they differ by at most the mixed-cell area.
        cat = {c["feature"]: c["area"] for c in rep["catchments"]}
        n = 0
        for f in ds.GetLayerByName("catchments"):
            a = f.GetGeometryRef().GetArea()
            check(abs(a - f["area_m2"]) < 1e-6 * a, "catchment area field")
            check(abs(f["report_area_m2"] - cat[f["feature"]]) <= 1e-9 * cat[f["feature"]], "report_area field")
            check(abs(a - cat[f["feature"]]) <= f["mixed_area_m2"] + 1e-6 * a,
                  "catchment %s: polygon %.1f vs report %.1f (mixed %.1f)" % (f["feature"], a, cat[f["feature"]],
                                                                              f["mixed_area_m2"]))
            check(abs(a / 100.0 - round(a / 100.0)) < 1e-6, "catchment area is not whole cells")
            print("catchment %-18s polygon %10.0f m2, report %10.0f m2 (mixed cells %9.0f m2)"
                  % (f["feature"], a, cat[f["feature"]], f["mixed_area_m2"]))
            n += 1
        check(n >= 2, "fewer than two catchment polygons")

        # Capture and travel-time zones: polygon area = report area.
        cz = {c["well"]: c for c in rep["capture_zones"]}
        for f in ds.GetLayerByName("capture_zones"):
            a = f.GetGeometryRef().GetArea()
            check(abs(a - cz[f["well"]]["area"]) <= 1e-6 * a, "capture zone area %g vs %g" % (a, cz[f["well"]]["area"]))
        tt = {(c["well"], t["time"]): t["area"] for c in rep["capture_zones"] for t in c["travel_time_zones"]}
        k = 0
        for f in ds.GetLayerByName("travel_time_zones"):
            a = f.GetGeometryRef().GetArea()
            ref = tt[(f["well"], f["time_day"])]
            check(abs(a - ref) <= 1e-6 * a, "travel-time zone %g: %g vs %g" % (f["time_day"], a, ref))
            k += 1
        check(k == len(tt), "travel-time zones: %d layer rows, %d in the report" % (k, len(tt)))

        # Observations and wells.
        ob = {o["name"]: o for o in rep["observations"]}
        for f in ds.GetLayerByName("observations"):
            o = ob[f["name"]]
            g = f.GetGeometryRef()
            check((g.GetX(), g.GetY()) == tuple(o["at"]), "observation position")
            check(abs(f["residual_m"] - o["residual"]) < 1e-9, "residual")
        check(ds.GetLayerByName("wells").GetFeatureCount() == 1, "wells")

        # Reaches sum to each feature's budget.
        feat = {f["name"]: f for f in rep["features"]}
        sums = {}
        for f in ds.GetLayerByName("stream_reaches"):
            s = sums.setdefault(f["feature"], [0.0, 0.0])
            s[0] += f["inflow_m3_per_day"]
            s[1] += f["outflow_m3_per_day"]
        for name, (i, o) in sums.items():
            ref = feat[name]
            tol = 1e-9 * (abs(ref["inflow"]) + abs(ref["outflow"]) + 1)
            check(abs(i - ref["inflow"]) < tol and abs(o - ref["outflow"]) < tol,
                  "reaches of %s sum to %g/%g, report %g/%g" % (name, i, o, ref["inflow"], ref["outflow"]))
        print("reach budgets of %d features sum to the report's" % len(sums))

        # Contours: the head interpolated from heads.tif along each contour
        # equals its level (bilinear between cell centres; GDAL's contour
        # generator interpolates linearly along cell-centre edges).
        h = gdal.Open(os.path.join(out, "heads.tif"))
        gt = h.GetGeoTransform()
        arr = h.GetRasterBand(1).ReadAsArray()
        worst = 0.0
        for f in ds.GetLayerByName("head_contours"):
            g = f.GetGeometryRef()
            for i in range(g.GetPointCount()):
                u = (g.GetX(i) - gt[0]) / gt[1] - 0.5
                v = (g.GetY(i) - gt[3]) / gt[5] - 0.5
                c0, r0 = int(u), int(v)
                if u < 0 or v < 0 or c0 + 1 >= arr.shape[1] or r0 + 1 >= arr.shape[0]:
                    continue
                fu, fv = u - c0, v - r0
                if abs(fu) > 1e-6 and abs(fu - 1) > 1e-6 and abs(fv) > 1e-6 and abs(fv - 1) > 1e-6:
                    continue   # vertices lie on cell-centre lines; skip any other
                block = arr[r0:r0 + 2, c0:c0 + 2]
                if (block <= -9998).any():
                    continue
                val = (block[0, 0] * (1 - fu) * (1 - fv) + block[0, 1] * fu * (1 - fv) +
                       block[1, 0] * (1 - fu) * fv + block[1, 1] * fu * fv)
                worst = max(worst, abs(val - f["head_m"]))
        check(worst < 1e-3, "contour vertices off their level by %g m" % worst)
        print("contour vertices within %.2g m of their level" % worst)
    finally:
        shutil.rmtree(tmp)


if __name__ == "__main__":
    main()
