#!/usr/bin/env python3
"""Independent reading and writing of GDSII files with gdspy (Debian's
python3-gdspy), for dimerpath's cross-check (export/gds_gdspy_test.go).

  gdspy_check.py summary FILE.gds   print what gdspy reads from FILE.gds
  gdspy_check.py write FILE.gds     write a hierarchy with rotation,
                                    magnification and reflection, then
                                    print gdspy's own flattening of it

Both print one JSON object: per "layer/datatype" the flattened polygon
count, total area (user units squared) and bounding box, the flattened
labels, the top structures' array references (columns x rows), and with
"write" every flattened polygon's points.
"""
import json
import sys

import gdspy


def summary(lib, with_points=False):
    tops = lib.top_level()
    layers = {}
    labels = []
    arefs = []
    points = []
    for top in tops:
        polys = top.get_polygons(by_spec=True)
        areas = top.area(by_spec=True)
        for (layer, datatype), ps in sorted(polys.items()):
            key = "%d/%d" % (layer, datatype)
            entry = layers.setdefault(key, {"count": 0, "area": 0.0, "bbox": None})
            entry["count"] += len(ps)
            entry["area"] += float(areas.get((layer, datatype), 0.0))
            for p in ps:
                lo, hi = p.min(axis=0), p.max(axis=0)
                b = entry["bbox"]
                if b is None:
                    entry["bbox"] = [float(lo[0]), float(lo[1]), float(hi[0]), float(hi[1])]
                else:
                    entry["bbox"] = [min(b[0], float(lo[0])), min(b[1], float(lo[1])),
                                     max(b[2], float(hi[0])), max(b[3], float(hi[1]))]
                if with_points:
                    points.append({"layer": key, "xy": [[float(x), float(y)] for x, y in p]})
        for lab in top.get_labels():
            labels.append({"text": lab.text, "layer": "%d/%d" % (lab.layer, lab.texttype),
                           "at": [float(lab.position[0]), float(lab.position[1])]})
        for ref in top.references:
            if isinstance(ref, gdspy.CellArray):
                arefs.append({"cell": ref.ref_cell.name if hasattr(ref.ref_cell, "name") else str(ref.ref_cell),
                              "columns": int(ref.columns), "rows": int(ref.rows)})
    out = {"tops": [t.name for t in tops], "layers": layers, "labels": labels, "arefs": arefs}
    if with_points:
        out["polygons"] = points
    return out


def write(path):
    # User unit 1 nm, database unit 1 pm, as dimerpath writes.
    lib = gdspy.GdsLibrary(name="GDSPY.DB", unit=1e-9, precision=1e-12)

    def new_cell(name):
        c = gdspy.Cell(name, exclude_from_current=True)
        lib.add(c)
        return c

    leaf = new_cell("LEAF")
    # An L shape, so a reflection or a wrong rotation shows.
    leaf.add(gdspy.Polygon([(0, 0), (30, 0), (30, 10), (10, 10), (10, 40), (0, 40)], layer=7, datatype=0))
    leaf.add(gdspy.Rectangle((2, 2), (6, 5), layer=8, datatype=3))
    leaf.add(gdspy.Label("leaf-mark", (5, 20), layer=9, texttype=1))
    mid = new_cell("MID")
    mid.add(gdspy.CellReference(leaf, origin=(100, 50), rotation=30, magnification=2, x_reflection=True))
    mid.add(gdspy.CellArray(leaf, 3, 2, (60, 80), origin=(-200, 0), rotation=90, x_reflection=True))
    top = new_cell("TOP")
    top.add(gdspy.CellReference(mid, origin=(1000, -500), rotation=-45))
    top.add(gdspy.CellArray(leaf, 4, 3, (50, 70), origin=(0, 2000), rotation=180, magnification=0.5))
    top.add(gdspy.Polygon([(0, 0), (5, 0), (0, 5)], layer=7, datatype=0))
    lib.write_gds(path)
    return summary(lib, with_points=True)


def main():
    if len(sys.argv) != 3 or sys.argv[1] not in ("summary", "write"):
        sys.stderr.write(__doc__)
        return 2
    if sys.argv[1] == "write":
        out = write(sys.argv[2])
    else:
        lib = gdspy.GdsLibrary(infile=sys.argv[2])
        out = summary(lib)
    json.dump(out, sys.stdout)
    return 0


if __name__ == "__main__":
    sys.exit(main())
