"""Checks a resumed run against the whole run, and a state file's layout, with h5py (an HDF5
reader independent of freshet; netCDF-4 files are HDF5 files).

usage: hot_start_check.py BASIN SCRATCH SPLIT_S STATE_FILE RESUMED_FOLDER
       hot_start_check.py --flip STATE_FILE OUT   (copies STATE_FILE with one data byte changed)
"""
import filecmp
import hashlib
import struct
import sys
from pathlib import Path

import h5py
import numpy as np


def fail(message):
    print("hot_start_check: " + message)
    sys.exit(1)


def same_bits(a, b):
    a, b = np.asarray(a), np.asarray(b)
    if a.shape != b.shape or a.dtype != b.dtype:
        return False
    return a.tobytes() == b.tobytes()


def compare_netcdf(whole, resumed, split_s):
    """Every variable along time: the resumed file's records are the whole file's after split_s."""
    with h5py.File(whole, "r") as w, h5py.File(resumed, "r") as r:
        tw, tr = w["time"][:], r["time"][:]
        units = w["time"].attrs["units"].decode() if isinstance(w["time"].attrs["units"], bytes) \
            else str(w["time"].attrs["units"])
        scale = {"seconds": 1.0, "minutes": 60.0, "hours": 3600.0}[units.split()[0]]
        after = tw * scale > split_s + 1e-9
        if not same_bits(tw[after], tr):
            fail(f"{resumed}: times {tr} are not the whole run's after {split_s} s")
        checked = 0
        for name, var in w.items():
            if not isinstance(var, h5py.Dataset) or name not in r or var.ndim == 0:
                continue
            if var.shape[0] == len(tw) and name != "time":
                if not same_bits(var[:][after], r[name][:]):
                    fail(f"{resumed}: variable {name} differs from the whole run after {split_s} s")
                checked += 1
        if checked == 0:
            fail(f"{resumed}: no time-varying variable compared")
        return checked


def digest(state):
    """SHA-256 of the archive as docs/state-files.md defines it."""
    entries = {}

    def visit(name, obj):
        if isinstance(obj, h5py.Dataset):
            entries[name] = obj

    state.visititems(visit)
    h = hashlib.sha256()
    for path in sorted(entries, key=lambda p: p.encode()):
        d = entries[path]
        raw = path.encode()
        h.update(struct.pack("<Q", len(raw)) + raw)
        if d.dtype.kind == "f":
            values = d[:].astype("<f8")
            h.update(struct.pack("<B", 0) + struct.pack("<Q", values.size) + values.tobytes())
        elif d.dtype.kind == "i":
            values = d[:].astype("<i8")
            h.update(struct.pack("<B", 1) + struct.pack("<Q", values.size) + values.tobytes())
        else:
            text = d[()].rstrip(b"\0")
            h.update(struct.pack("<B", 2) + struct.pack("<Q", len(text)) + text)
    return h.hexdigest()


def text(attr):
    return attr.decode() if isinstance(attr, bytes) else str(attr)


def check_layout(basin, state_file, split_s):
    with h5py.File(state_file, "r") as f:
        a = f.attrs
        if text(a["format"]) != "freshet hot-start state":
            fail("format attribute")
        if int(a["layout_version"]) != 1:
            fail("layout_version is not 1")
        if text(a["study_sha256"]) != hashlib.sha256(Path(basin).read_bytes()).hexdigest():
            fail("study_sha256 is not the SHA-256 of the basin file")
        if text(a["storm"]) != "aep1-30min" or text(a["scenario"]) != "":
            fail("storm or scenario attribute")
        if float(a["time_s"]) != split_s or int(f["run/time_s"][0]) != split_s:
            fail("time_s attribute or run/time_s")
        if int(a["step"]) != int(f["run/step"][0]) or int(a["step"]) != split_s // 60:
            fail("step: 60-s coupling steps in the demo")
        if text(a["content_sha256"]) != digest(f):
            fail("content_sha256 differs from the digest of the datasets computed here")
        reaches = [k for k in f["elements"] if "reach" in f["elements"][k]]
        if not reaches:
            fail("no element with a reach group")
        for k in reaches:
            cells = f["elements"][k]["reach"]["area_m2"]
            faces = f["elements"][k]["reach"]["face_flux_m3s"]
            if cells.dtype != np.float64 or faces.shape[0] != cells.shape[0] + 1:
                fail(f"{k}: area_m2 and face_flux_m3s are not N and N+1 float64 values")


def flip(state_file, out):
    data = bytearray(Path(state_file).read_bytes())
    with h5py.File(state_file, "r") as f:
        for k in f["elements"]:
            if "reach" in f["elements"][k]:
                offset = f["elements"][k]["reach"]["area_m2"].id.get_offset()
                break
    data[offset + 3] ^= 0x10
    Path(out).write_bytes(bytes(data))


def main():
    if sys.argv[1] == "--flip":
        flip(sys.argv[2], sys.argv[3])
        return
    basin, scratch, split_s, state_file, resumed = sys.argv[1:6]
    scratch, split_s = Path(scratch), int(split_s)
    whole, again = scratch / "whole/base", scratch / resumed / "base"
    checked = 0
    for nc in sorted(whole.glob("*.nc")):
        checked += compare_netcdf(nc, again / nc.name, split_s)
    texts = sorted(p.name for p in list(whole.glob("*.csv")) + list(whole.glob("*_summary.json")))
    if not texts:
        fail("no summary CSV")
    for name in texts:
        if not filecmp.cmp(whole / name, again / name, shallow=False):
            fail(f"{again / name} differs from the whole run's")
    check_layout(basin, state_file, split_s)
    print(f"hot_start_check: split at {split_s} s: {checked} NetCDF variables and "
          f"{len(texts)} CSV and JSON files equal the whole run's; state file layout read back")


main()
