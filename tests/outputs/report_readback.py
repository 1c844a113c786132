"""Checks that the study report's figures show the values the NetCDF file holds: the lines
for one station's discharge (left axis) and headwater (right axis), read back through the
figure's stated axis mapping (data-plot-box, data-x-range, data-y-range, data-y2-range; a value
v on an axis [a0, a1] sits at left + (v - a0)/(a1 - a0) width, or top + height - ... for
values, rounded to 0.01 px), against the file read with Debian's xarray (an independent
reader). Also: the page's figure count, and every figure's title and text alternative.

usage: report_readback.py REPORT.html STATIONS.nc STATION SCENARIO STORM
"""
import sys
from html.parser import HTMLParser

import numpy as np
import xarray as xr

report, nc_path, station, scenario, storm = sys.argv[1:6]


class Figures(HTMLParser):
    def __init__(self):
        super().__init__()
        self.svgs = []          # attributes of every <svg>
        self.lines = {}         # data-series -> (svg index, axis, points)
        self.titles = 0
        self.descs = 0
        self.declared = None

    def handle_starttag(self, tag, attrs):
        a = dict(attrs)
        if tag == "main":
            self.declared = int(a["data-figures"])
        elif tag == "svg":
            self.svgs.append(a)
        elif tag == "title" and self.svgs:
            self.titles += 1
        elif tag == "desc":
            self.descs += 1
        elif tag == "polyline" and "data-series" in a:
            pts = [tuple(map(float, p.split(","))) for p in a["points"].split()]
            self.lines.setdefault(a["data-series"], []).append((len(self.svgs) - 1, a["data-axis"], pts))


page = Figures()
page.feed(open(report, encoding="utf-8").read())
failures = []
if page.declared != len(page.svgs):
    failures.append(f"data-figures = {page.declared}, {len(page.svgs)} <svg> elements")
if not (page.titles == page.descs == len(page.svgs)):
    failures.append(f"{len(page.svgs)} figures, {page.titles} titles, {page.descs} descriptions")


def read_back(key):
    """The values a line claims, in axis units: (hours, values)."""
    (svg_index, axis, pts), = page.lines[key]
    svg = page.svgs[svg_index]
    left, top, width, height = map(float, svg["data-plot-box"].split())
    x0, x1 = map(float, svg["data-x-range"].split())
    y0, y1 = map(float, svg[f"data-{axis}-range"].split())
    px = np.array([p[0] for p in pts])
    py = np.array([p[1] for p in pts])
    hours = x0 + (px - left) / width * (x1 - x0)
    values = y0 + (top + height - py) / height * (y1 - y0)
    tolerance = 0.006 * (y1 - y0) / height, 0.006 * (x1 - x0) / width
    return hours, values, tolerance


ds = xr.open_dataset(nc_path).swap_dims({"station": "station_id"}).sel(station_id=station)
file_hours = (ds["time"].values - ds["time"].values[0]) / np.timedelta64(1, "h")
for quantity, variable in (("discharge", "discharge"), ("stage", "stage")):
    key = f"{quantity}|{station}|{scenario}|{storm}"
    if key not in page.lines:
        failures.append(f"no line {key} in the report")
        continue
    hours, values, (tol_v, tol_h) = read_back(key)
    expected = ds[variable].values
    if len(values) != len(expected):
        failures.append(f"{key}: {len(values)} points, the file has {len(expected)} times")
        continue
    dh = np.max(np.abs(hours - file_hours))
    dv = np.max(np.abs(values - expected))
    if dh > tol_h or dv > tol_v:
        failures.append(f"{key}: largest difference {dv:.3g} (allowed {tol_v:.3g}), "
                        f"time {dh:.3g} h (allowed {tol_h:.3g})")
    else:
        print(f"report_readback: {key}: {len(values)} points match the NetCDF file to "
              f"{dv:.2g} (0.01 px is {tol_v:.2g})")

if failures:
    print("report_readback: FAILED\n  " + "\n  ".join(failures))
    sys.exit(1)
print(f"report_readback: {len(page.svgs)} figures, each with a title and a text alternative")
