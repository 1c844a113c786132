#!/usr/bin/env python3
"""Stage of a reach above a culvert with and without backwater represented, as an SVG figure.

Routes one storm of a basin file twice with `freshet route`: as the file is, and with
`backwater = "level-pool"` added to its [study] table (in a scratch copy of the basin file's
folder and of a sibling `hydrographs` folder). Reads the stage of the reach and of the pond
from each run's NetCDF file (with `ncdump`), prints the peak stages and the largest change,
and draws the three stage hydrographs into an SVG file:

    python3 tools/backwater_figure.py --freshet build/freshet \\
        --basin basins/tansy-brook.toml --storm aep1-60min \\
        --reach middle-tansy --pond mill-lane --svg docs/img/backwater-mill-lane.svg

Standard-library Python 3 only (and ncdump from Debian's netcdf-bin). Exit status 1 when a
run fails or a station is missing.
"""
import argparse
import glob
import os
import re
import shutil
import subprocess
import sys
import tempfile


def scratch_copy(basin, workdir, level_pool):
    """Copy the basin's folder (and a sibling hydrographs folder) and return the copy's path."""
    folder = os.path.dirname(os.path.abspath(basin))
    parent = os.path.dirname(folder)
    dest_parent = os.path.join(workdir, "level-pool" if level_pool else "warn-only")
    dest = os.path.join(dest_parent, os.path.basename(folder))
    shutil.copytree(folder, dest)
    hydro = os.path.join(parent, "hydrographs")
    if os.path.isdir(hydro):
        shutil.copytree(hydro, os.path.join(dest_parent, "hydrographs"))
    path = os.path.join(dest, os.path.basename(basin))
    if level_pool:
        with open(path, encoding="utf-8") as f:
            text = f.read()
        text, n = re.subn(r"^\[study\][^\n]*\n", '[study]\nbackwater = "level-pool"\n', text,
                          count=1, flags=re.M)
        if n != 1:
            sys.exit(f"{basin}: no [study] table")
        with open(path, "w", encoding="utf-8") as f:
            f.write(text)
    return path


def route(freshet, basin, storm, out):
    cmd = [freshet, "route", basin, "--storm", storm, "--out", out]
    proc = subprocess.run(cmd, capture_output=True, text=True)
    if proc.returncode != 0:
        sys.exit(f"{' '.join(cmd)} failed ({proc.returncode}):\n{proc.stdout}{proc.stderr}")
    files = glob.glob(os.path.join(out, "**", storm + ".nc"), recursive=True)
    if len(files) != 1:
        sys.exit(f"{out}: expected one {storm}.nc, found {files}")
    return files[0], proc.stdout


def ncdump_values(ncdump, path, name):
    text = subprocess.run([ncdump, "-v", name, path], capture_output=True, text=True,
                          check=True).stdout
    body = text.split("data:", 1)[1]
    m = re.search(r"\b" + re.escape(name) + r"\s*=\s*(.*?);", body, flags=re.S)
    return m.group(1)


def stage_series(ncdump, path, stations):
    ids = re.findall(r'"((?:[^"\\]|\\.)*)"', ncdump_values(ncdump, path, "station_id"))
    times_s = [float(v) for v in ncdump_values(ncdump, path, "time").replace("\n", " ").split(",")]
    raw = ncdump_values(ncdump, path, "stage").replace("\n", " ").split(",")
    stage = [float("nan") if v.strip() == "_" else float(v) for v in raw]
    out = {}
    for s in stations:
        if s not in ids:
            sys.exit(f"{path}: no station '{s}'")
        k = ids.index(s)
        out[s] = [stage[i * len(ids) + k] for i in range(len(times_s))]
    return [t / 3600.0 for t in times_s], out


def svg(path, title, t_h, lines, y_label):
    width, height, left, right, top, bottom = 760, 380, 70, 190, 40, 50
    ys = [v for _, _, _, vs in lines for v in vs]
    y0, y1 = min(ys), max(ys)
    pad = 0.05 * (y1 - y0 or 1.0)
    y0, y1 = y0 - pad, y1 + pad
    x0, x1 = t_h[0], t_h[-1]
    px = lambda t: left + (width - left - right) * (t - x0) / (x1 - x0)
    py = lambda y: top + (height - top - bottom) * (1.0 - (y - y0) / (y1 - y0))
    parts = [f'<svg xmlns="http://www.w3.org/2000/svg" width="{width}" height="{height}" '
             f'viewBox="0 0 {width} {height}" font-family="sans-serif" font-size="12">',
             f'<rect width="{width}" height="{height}" fill="white"/>',
             f'<text x="{left}" y="22" font-size="14">{title}</text>']
    for k in range(7):
        y = y0 + (y1 - y0) * k / 6
        parts.append(f'<line x1="{left}" x2="{width - right}" y1="{py(y):.1f}" y2="{py(y):.1f}" '
                     'stroke="#ddd"/>')
        parts.append(f'<text x="{left - 6}" y="{py(y) + 4:.1f}" text-anchor="end">{y:.2f}</text>')
    for t in range(int(x0), int(x1) + 1):
        parts.append(f'<line x1="{px(t):.1f}" x2="{px(t):.1f}" y1="{top}" '
                     f'y2="{height - bottom}" stroke="#eee"/>')
        parts.append(f'<text x="{px(t):.1f}" y="{height - bottom + 16}" '
                     f'text-anchor="middle">{t}</text>')
    parts.append(f'<text x="{(left + width - right) / 2:.0f}" y="{height - 12}" '
                 'text-anchor="middle">time from the storm start (h)</text>')
    parts.append(f'<text transform="translate(18,{(top + height - bottom) / 2:.0f}) rotate(-90)" '
                 f'text-anchor="middle">{y_label}</text>')
    parts.append(f'<rect x="{left}" y="{top}" width="{width - left - right}" '
                 f'height="{height - top - bottom}" fill="none" stroke="#333"/>')
    for n, (label, colour, dash, vs) in enumerate(lines):
        pts = " ".join(f"{px(t):.1f},{py(v):.1f}" for t, v in zip(t_h, vs) if v == v)
        parts.append(f'<polyline points="{pts}" fill="none" stroke="{colour}" stroke-width="2" '
                     f'stroke-dasharray="{dash}"/>')
        ly = top + 16 + 20 * n
        parts.append(f'<line x1="{width - right + 12}" x2="{width - right + 40}" y1="{ly - 4}" '
                     f'y2="{ly - 4}" stroke="{colour}" stroke-width="2" stroke-dasharray="{dash}"/>')
        parts.append(f'<text x="{width - right + 46}" y="{ly}">{label}</text>')
    parts.append("</svg>\n")
    tmp = path + ".tmp"
    with open(tmp, "w", encoding="utf-8") as f:
        f.write("\n".join(parts))
    os.replace(tmp, path)


def main():
    ap = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    ap.add_argument("--freshet", required=True)
    ap.add_argument("--basin", required=True)
    ap.add_argument("--storm", required=True)
    ap.add_argument("--reach", required=True)
    ap.add_argument("--pond", required=True)
    ap.add_argument("--svg", required=True)
    ap.add_argument("--ncdump", default="ncdump")
    a = ap.parse_args()
    with tempfile.TemporaryDirectory() as work:
        runs = {}
        for level_pool in (False, True):
            basin = scratch_copy(a.basin, work, level_pool)
            out = os.path.join(work, "out-" + ("level-pool" if level_pool else "warn-only"))
            nc, log = route(os.path.abspath(a.freshet), basin, a.storm, out)
            runs[level_pool] = stage_series(a.ncdump, nc, [a.reach, a.pond]), log
    (t_h, without), _ = runs[False]
    (_, with_bw), log = runs[True]
    peak = lambda vs: max(v for v in vs if v == v)
    change = [b - w for w, b in zip(without[a.reach], with_bw[a.reach])]
    print(f"{a.reach} peak stage: {peak(without[a.reach]):.3f} m without backwater, "
          f"{peak(with_bw[a.reach]):.3f} m with it (level pool)")
    print(f"{a.pond} peak stage: {peak(without[a.pond]):.3f} m without, "
          f"{peak(with_bw[a.pond]):.3f} m with")
    k = max(range(len(change)), key=lambda i: change[i])
    print(f"largest rise of {a.reach}'s stage: {change[k]:.3f} m at {t_h[k] * 60:.0f} min")
    for line in log.splitlines():
        if "drowned up to" in line:
            print(line.strip())
    svg(a.svg, f"{a.reach} above {a.pond}, storm {a.storm}", t_h,
        [(f"{a.pond} (pond level)", "#777", "6,4", with_bw[a.pond]),
         (f"{a.reach}, warn-only", "#1f5fbf", "", without[a.reach]),
         (f"{a.reach}, level-pool", "#c0392b", "", with_bw[a.reach])],
        "stage at the reach's outlet (m)")
    return 0


if __name__ == "__main__":
    sys.exit(main())
