#!/usr/bin/env python3
"""Scaling series: route synthetic networks of growing size and print what each run cost.

For each size, tools/make_network.py writes a study into a scratch folder, `freshet route`
runs it (one storm, one run), and this script prints the wall time, the CPU time (user +
system, from the child's resource usage), the reach cell updates (the sum of the counts the
route prints for each reach), the cell-update rate against the CPU time, the peak resident
memory (getrusage ru_maxrss), the size of the result files and, once in the same session, the
rate of the bare update loop (`freshet-bench --bare-update`: Q(A) and the upwind update of the
same trapezoidal channel, nothing else). Not a test; figures depend on the machine and its load.

    python3 tools/scale_bench.py --freshet build/freshet --bench build/freshet-bench \\
        --reaches 100 1000 10000 [--shape binary] [--duration-h 24] [--threads N] \\
        [-- MAKE_NETWORK_ARGS...]

Standard-library Python 3 only. Arguments after `--` go to make_network.py unchanged.
"""
import argparse
import os
import re
import shutil
import subprocess
import sys
import tempfile
import time

HERE = os.path.dirname(os.path.abspath(__file__))


def run_measured(cmd, stdout_path):
    """Run cmd with stdout/stderr to a file; return (exit code, wall s, rusage of the child)."""
    with open(stdout_path, "w", encoding="utf-8") as out:
        start = time.perf_counter()
        proc = subprocess.Popen(cmd, stdout=out, stderr=subprocess.STDOUT)
        _, status, usage = os.wait4(proc.pid, 0)
        wall = time.perf_counter() - start
        proc.returncode = os.waitstatus_to_exitcode(status)
    return proc.returncode, wall, usage


def folder_bytes(path):
    total = 0
    for root, _, files in os.walk(path):
        total += sum(os.path.getsize(os.path.join(root, f)) for f in files)
    return total


def bare_rate(bench):
    out = subprocess.run([bench, "--bare-update"], check=True, capture_output=True, text=True).stdout
    match = re.search(r"bare-update (\S+)", out)
    if not match:
        sys.exit(f"scale_bench.py: {bench} --bare-update printed no rate: {out!r}")
    return float(match.group(1))


def main(argv):
    extra = []
    if "--" in argv:
        extra = argv[argv.index("--") + 1:]
        argv = argv[:argv.index("--")]
    p = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    p.add_argument("--freshet", default="build/freshet")
    p.add_argument("--bench", default="build/freshet-bench")
    p.add_argument("--reaches", type=int, nargs="+", default=[100, 1000])
    p.add_argument("--shape", choices=("binary", "random"), default="binary")
    p.add_argument("--duration-h", type=float, default=24.0)
    p.add_argument("--threads", type=int, default=1,
                   help="threads of the one run (freshet route --jobs N on one storm: independent "
                        "subtrees in parallel, results identical to one thread)")
    p.add_argument("--keep", help="keep the generated studies and results in this folder")
    args = p.parse_args(argv)

    scratch = args.keep or tempfile.mkdtemp(prefix="freshet-scale-")
    os.makedirs(scratch, exist_ok=True)
    load = os.getloadavg()
    bare_before = bare_rate(args.bench)
    print(f"load average {load[0]:.2f} {load[1]:.2f} {load[2]:.2f}; {os.cpu_count()} CPUs; "
          f"{args.shape} networks, {args.duration_h} h, {args.threads} thread(s) per run")
    print(f"{'reaches':>8} {'cells':>9} {'cell upd':>10} {'wall s':>8} {'CPU s':>8} "
          f"{'upd/CPU s':>10} {'vs bare':>8} {'peak MB':>8} {'B/cell':>7} {'output MB':>9}")
    for n in args.reaches:
        study = os.path.join(scratch, f"{args.shape}{n}.toml")
        out = os.path.join(scratch, f"{args.shape}{n}-out")
        subprocess.run([sys.executable, os.path.join(HERE, "make_network.py"), "--reaches", str(n),
                        "--shape", args.shape, "--duration-h", str(args.duration_h),
                        "--out", study] + extra, check=True, stderr=subprocess.DEVNULL)
        log = os.path.join(scratch, f"{args.shape}{n}.log")
        code, wall, usage = run_measured(
            [args.freshet, "route", study, "--out", out, "--overwrite", "--jobs", str(args.threads)], log)
        text = open(log, encoding="utf-8").read()
        if code != 0:
            sys.exit(f"scale_bench.py: freshet route {study} exited {code}; see {log}")
        updates = sum(int(u) for u in re.findall(r"(\d+) cell updates", text))
        cells = sum(int(c) for c in re.findall(r"^\s*cells = (\d+)", open(study).read(), re.M))
        cpu = usage.ru_utime + usage.ru_stime
        peak_mb = usage.ru_maxrss / 1024.0  # ru_maxrss is in KiB on Linux
        rate = updates / cpu if cpu > 0 else float("nan")
        print(f"{n:>8} {cells:>9} {updates:>10.3g} {wall:>8.2f} {cpu:>8.2f} {rate:>10.3g} "
              f"{rate / bare_before:>8.2f} {peak_mb:>8.1f} {usage.ru_maxrss * 1024.0 / cells:>7.0f} "
              f"{folder_bytes(out) / 1e6:>9.2f}", flush=True)
    print(f"bare update loop: {bare_before:.3g} cell updates/s (before the series), "
          f"{bare_rate(args.bench):.3g} (after); load average now {os.getloadavg()[0]:.2f}")
    print("cells: reach and plane cells; cell upd: reach cell updates; B/cell: peak memory per cell")
    if not args.keep:
        shutil.rmtree(scratch)


if __name__ == "__main__":
    main(sys.argv[1:])
