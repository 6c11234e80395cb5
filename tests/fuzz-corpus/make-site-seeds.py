#!/usr/bin/env python3
"""Writes the seed files of the drainage-site reader fuzz tests: tests/fuzz-corpus/site (GeoJSON
site files, RFC 7946), levels (x,y,z spot-level CSV), geotiff (elevation rasters, TIFF 6.0 with
the OGC GeoTIFF 1.1 placement tags) and sizing (the JSON design form). Every site is an invented
scenario, none a survey. Run from the repository root: python3 tests/fuzz-corpus/make-site-seeds.py"""
import json
import struct
from pathlib import Path

HERE = Path(__file__).resolve().parent


def ring(*points):
    points = [list(p) for p in points]
    return [points + [points[0]]]


def polygon(role, coordinates, **properties):
    return {"type": "Feature", "properties": {"role": role, **properties},
            "geometry": {"type": "Polygon", "coordinates": coordinates}}


def point(role, xy, **properties):
    return {"type": "Feature", "properties": {"role": role, **properties},
            "geometry": {"type": "Point", "coordinates": list(xy)}}


def site(features, **properties):
    return {"type": "FeatureCollection", "properties": properties, "features": features}


SQUARE = ring((0, 0), (20, 0), (20, 20), (0, 20))


def site_files():
    files = {
        # A 20 m square yard draining to one corner.
        "square-m.geojson": site([polygon("outline", SQUARE), point("outlet", (0.5, 0.5))],
                                 units="m", runoff_coefficient=0.5),
        # A 60 ft L-shaped lot in feet: a roof zone, a shed kept clear, three spot levels,
        # two outlets.
        "lot-ft.geojson": site([
            polygon("outline", ring((0, 0), (60, 0), (60, 30), (30, 30), (30, 60), (0, 60)),
                    name="lot"),
            polygon("zone", ring((5, 5), (25, 5), (25, 25), (5, 25)), runoff_coefficient=0.9,
                    surface="roof", name="house"),
            polygon("obstacle", ring((40, 10), (50, 10), (50, 20), (40, 20)), name="shed"),
            point("outlet", (60, 1), name="street drain"),
            point("outlet", (1, 60), name="ditch"),
            point("level", (2, 2), elevation=10.0),
            point("level", (58, 28), elevation=9.0),
            point("level", (2, 58), elevation=9.5, units="ft"),
        ], units="ft", runoff_coefficient=0.35),
        # Every cell in a zone, no site coefficient; a point with an altitude.
        "zones-only.geojson": site([
            polygon("outline", ring((100, 100), (130, 100), (130, 115), (100, 115))),
            polygon("zone", ring((100, 100), (115, 100), (115, 115), (100, 115)),
                    runoff_coefficient=0.3),
            polygon("zone", ring((115, 100), (130, 100), (130, 115), (115, 115)),
                    runoff_coefficient=0.8),
            point("outlet", (130, 107.5, 4.0)),
        ]),
        # Broken: an open ring, a bow tie, an outlet outside, a wall cutting the yard in two,
        # a hole, two outlines, an unknown unit, a feature in other units, two spot levels,
        # an elevation that is text, a coefficient over 1, no outlet, not a collection.
        "open-ring.geojson": site([polygon("outline", [[[0, 0], [9, 0], [9, 9], [0, 9]]]),
                                   point("outlet", (1, 1))], runoff_coefficient=0.5),
        "bow-tie.geojson": site([polygon("outline", ring((0, 0), (9, 9), (9, 0), (0, 9))),
                                 point("outlet", (1, 1))], runoff_coefficient=0.5),
        "outlet-outside.geojson": site([polygon("outline", SQUARE), point("outlet", (30, 5))],
                                       runoff_coefficient=0.5),
        "cut-in-two.geojson": site([polygon("outline", SQUARE),
                                    polygon("obstacle", ring((-1, 9), (21, 9), (21, 11), (-1, 11))),
                                    point("outlet", (0.5, 0.5))], runoff_coefficient=0.5),
        "hole.geojson": site([polygon("outline", SQUARE + ring((5, 5), (6, 5), (6, 6))),
                              point("outlet", (1, 1))], runoff_coefficient=0.5),
        "two-outlines.geojson": site([polygon("outline", SQUARE), polygon("outline", SQUARE),
                                      point("outlet", (1, 1))], runoff_coefficient=0.5),
        "units-km.geojson": site([polygon("outline", SQUARE), point("outlet", (1, 1))],
                                 units="km", runoff_coefficient=0.5),
        "mixed-units.geojson": site([polygon("outline", SQUARE, units="ft"),
                                     point("outlet", (1, 1))], units="m", runoff_coefficient=0.5),
        "two-levels.geojson": site([polygon("outline", SQUARE), point("outlet", (1, 1)),
                                    point("level", (2, 2), elevation=1),
                                    point("level", (3, 3), elevation=2)], runoff_coefficient=0.5),
        "text-elevation.geojson": site([polygon("outline", SQUARE), point("outlet", (1, 1)),
                                        point("level", (2, 2), elevation="high")],
                                       runoff_coefficient=0.5),
        "coefficient-over-one.geojson": site([polygon("outline", SQUARE),
                                              point("outlet", (1, 1))], runoff_coefficient=1.5),
        "no-outlet.geojson": site([polygon("outline", SQUARE)], runoff_coefficient=0.5),
        "not-a-collection.geojson": {"type": "Feature", "properties": {"role": "outline"},
                                     "geometry": None},
    }
    out = {name: json.dumps(value, separators=(",", ":")).encode() for name, value in files.items()}
    # The two example sites, compacted.
    examples = HERE.parent.parent / "examples" / "sites"
    for path in sorted(examples.glob("*.geojson")):
        value = json.loads(path.read_text())
        value["properties"].pop("description", None)
        out["example-" + path.name] = json.dumps(value, separators=(",", ":")).encode()
    return out


def level_files():
    return {
        "header.csv": b"x,y,z\n2,2,10\n58,28,9.25\n2,58,9.5\n",
        "no-header-crlf.csv": b"0.5,0.5,100\r\n\r\n19.5,0.5,99.875\r\n10,19.5,100.2\r\n",
        "bom-spaces.csv": "\ufeffX, Y, Z\n 1e2 , -3.5e-1, 1.25\n4,5,-6\n".encode(),
        "two-fields.csv": b"x,y,z\n1,2\n",
        "text-value.csv": b"1,2,high\n",
        "nan.csv": b"1,2,NaN\n3,4,inf\n",
        "latin1.csv": b"x,y,z\n1,2,3\n\xe9,1,1\n",
    }


def tiff(width, height, samples, *, fmt="f", big=False, scale=(2.0, 2.0, 0.0),
         tiepoint=(0, 0, 0, 1000.0, 2000.0, 0), geokeys=None, nodata=None, transform=None):
    """A strip TIFF 6.0 of one band; `fmt` a struct code: f (float32), d (float64), h (int16),
    B (uint8). Placement tags of OGC GeoTIFF 1.1: 33550 ModelPixelScale, 33922 ModelTiepoint,
    34264 ModelTransformation, 34735 GeoKeyDirectory; 42113 the GDAL no-data text."""
    order = ">" if big else "<"
    bits = struct.calcsize(fmt) * 8
    sample_format = {"f": 3, "d": 3, "h": 2, "B": 1}[fmt]
    data = struct.pack(order + fmt * len(samples), *samples)
    entries = []  # (tag, type, count, payload bytes)

    def add(tag, kind, values):
        code = {3: "H", 4: "I", 12: "d", 2: "s"}[kind]
        if kind == 2:
            payload = values.encode() + b"\0"
            entries.append((tag, kind, len(payload), payload))
        else:
            entries.append((tag, kind, len(values), struct.pack(order + code * len(values), *values)))

    add(256, 4, [width])
    add(257, 4, [height])
    add(258, 3, [bits])
    add(259, 3, [1])
    add(262, 3, [1])
    add(273, 4, [0])  # patched below
    add(277, 3, [1])
    add(278, 4, [height])
    add(279, 4, [len(data)])
    add(339, 3, [sample_format])
    if scale is not None:
        add(33550, 12, list(scale))
    if tiepoint is not None:
        add(33922, 12, list(tiepoint))
    if transform is not None:
        add(34264, 12, list(transform))
    if geokeys is not None:
        add(34735, 3, geokeys)
    if nodata is not None:
        add(42113, 2, nodata)
    entries.sort()
    header = (b"MM" if big else b"II") + struct.pack(order + "HI", 42, 8)
    ifd_size = 2 + 12 * len(entries) + 4
    extra_at = 8 + ifd_size
    extra = b""
    placed = []
    for tag, kind, count, payload in entries:
        if len(payload) > 4:
            placed.append((tag, kind, count, struct.pack(order + "I", extra_at + len(extra))))
            extra += payload + (b"\0" if len(payload) % 2 else b"")
        else:
            placed.append((tag, kind, count, payload.ljust(4, b"\0")))
    data_at = extra_at + len(extra)
    ifd = struct.pack(order + "H", len(placed))
    for tag, kind, count, payload in placed:
        if tag == 273:
            payload = struct.pack(order + "I", data_at)
        ifd += struct.pack(order + "HHI", tag, kind, count) + payload
    ifd += struct.pack(order + "I", 0)
    return header + ifd + extra + data


def geotiff_files():
    # z = 100 + 0.01 x - 0.02 y sampled at pixel centres, an invented slope.
    def plane(width, height, sx=2.0, sy=2.0, x0=1000.0, y0=2000.0):
        return [100 + 0.01 * (x0 + (i + 0.5) * sx) - 0.02 * (y0 - (j + 0.5) * sy)
                for j in range(height) for i in range(width)]
    pixel_is_point = [1, 1, 0, 1, 1025, 0, 1, 2]
    return {
        "float32.tif": tiff(4, 3, plane(4, 3)),
        "float64-big-endian.tif": tiff(3, 2, plane(3, 2), fmt="d", big=True),
        "int16-pixel-is-point.tif": tiff(3, 3, [10, 11, 12, 11, 12, 13, 12, 13, 14], fmt="h",
                                         geokeys=pixel_is_point),
        "uint8-nodata.tif": tiff(2, 2, [5, 255, 6, 7], fmt="B", nodata="255"),
        "no-placement.tif": tiff(2, 2, [1.0, 2.0, 3.0, 4.0], scale=None, tiepoint=None),
        "transform-only.tif": tiff(2, 2, [1.0, 2.0, 3.0, 4.0], scale=None, tiepoint=None,
                                   transform=[2, 0, 0, 1000, 0, -2, 0, 2000, 0, 0, 1, 0,
                                              0, 0, 0, 1]),
        "short-scale.tif": tiff(2, 2, [1.0, 2.0, 3.0, 4.0], scale=(2.0, 2.0),
                                tiepoint=(0, 0, 0, 1, 2)),
        "zero-scale.tif": tiff(2, 2, [1.0, 2.0, 3.0, 4.0], scale=(0.0, 2.0, 0.0)),
    }


def sizing_files():
    forms = {
        "constant-si.json": {"system": "si", "rain": {"kind": "constant", "intensity": "75"}},
        "idf-us-swale.json": {"system": "us", "rain": {"kind": "idf", "a": "60", "b": "10",
                                                       "c": "0.8"},
                              "conveyance": "swale", "inlet_time": "10", "manning_n": "0.03",
                              "min_grade_percent": "1", "velocity_min": "0.5",
                              "velocity_max": "6"},
        "pipes-list.json": {"rain": {"kind": "idf", "a": "1500", "b": "10", "c": "0.8"},
                            "pipe_sizes": "100, 150;225 300", "velocity_min": "0.6",
                            "velocity_max": "3"},
        "empty.json": {},
        "negative-b.json": {"rain": {"kind": "idf", "a": "1500", "b": "-10", "c": "0.8"}},
        "nan-intensity.json": {"rain": {"kind": "constant", "intensity": "NaN"}},
        "zero-pipe.json": {"rain": {"kind": "constant", "intensity": "50"}, "pipe_sizes": "0"},
        "unknown-system.json": {"system": "imperial", "rain": {"intensity": "2"}},
    }
    out = {name: json.dumps(value).encode() for name, value in forms.items()}
    out["not-text-values.json"] = b'{"rain":{"kind":"constant","intensity":75}}'
    return out


def main():
    for folder, files in [("site", site_files()), ("levels", level_files()),
                          ("geotiff", geotiff_files()), ("sizing", sizing_files())]:
        (HERE / folder).mkdir(exist_ok=True)
        for name, data in files.items():
            (HERE / folder / name).write_bytes(data)


if __name__ == "__main__":
    main()
