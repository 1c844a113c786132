#!/usr/bin/env python3
"""Write a synthetic dendritic study (basin file) for scaling measurements.

Two shapes:

* ``binary``: a complete binary tree of reaches (reach k drains to reach (k-1)//2, reach 0 to the
  outlet); one subcatchment on every head reach (a reach that no other reach drains to).
* ``random``: a random dendritic tree (reach k drains to a random earlier reach that has fewer
  than two upstream reaches, seeded, so the file is reproducible); one subcatchment on every
  reach.

Every number here is invented for measuring speed; the networks describe no real place.
Standard-library Python 3 only. Examples:

    python3 tools/make_network.py --reaches 10000 --shape binary --out /tmp/b10k.toml
    python3 tools/make_network.py --reaches 1000 --shape random --duration-h 2 \
        --storm "block:60" --out /tmp/r1k.toml

Storms (``--storm``, repeatable): ``nrcs:TYPE:DEPTH_MM`` (a 24-hour NRCS distribution, step 6 min),
``block:DURATION_MIN`` (an alternating-block storm from an invented IDF relation,
i = 1300 / (t + 10)^0.75 mm/h, 5 min blocks), or ``toml:FILE`` (a file holding one or more
``[[storm]]`` tables, copied verbatim).
"""
import argparse
import random
import sys


def positive_int(text):
    value = int(text)
    if value < 1:
        raise argparse.ArgumentTypeError(f"{text}: must be a whole number >= 1")
    return value


def parse_args(argv):
    p = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    p.add_argument("--reaches", type=positive_int, required=True, help="number of reaches")
    p.add_argument("--shape", choices=("binary", "random"), default="binary")
    p.add_argument("--seed", type=int, default=1, help="seed of the random shape (default 1)")
    p.add_argument("--out", required=True, help="basin file to write ('-' for stdout)")
    p.add_argument("--storm", action="append", default=None,
                   help="storm spec (repeatable; default nrcs:II:100)")
    p.add_argument("--duration-h", type=float, default=24.0)
    p.add_argument("--output-interval-min", type=float, default=10.0)
    p.add_argument("--coupling-step-s", type=float, default=60.0)
    p.add_argument("--reach-length-m", type=float, default=1000.0)
    p.add_argument("--reach-cells", type=positive_int, default=50)
    p.add_argument("--plane-length-m", type=float, default=100.0)
    p.add_argument("--plane-cells", type=positive_int, default=20)
    p.add_argument("--subcatchment-area-ha", type=float, default=20.0)
    p.add_argument("--curve-number", type=float, default=75.0)
    p.add_argument("--scheme", default="explicit-upwind", help="channel_scheme (default explicit-upwind)")
    p.add_argument("--plane-scheme", default="explicit-upwind", help="plane_scheme (default explicit-upwind)")
    return p.parse_args(argv)


def parents_binary(n):
    return [-1] + [(k - 1) // 2 for k in range(1, n)]


def parents_random(n, seed):
    rng = random.Random(seed)
    parents = [-1]
    open_slots = [0, 0]  # each reach takes at most two upstream reaches
    for k in range(1, n):
        i = rng.randrange(len(open_slots))
        parent = open_slots[i]
        open_slots[i] = open_slots[-1]
        open_slots.pop()
        parents.append(parent)
        open_slots += [k, k]
    return parents


def storm_text(spec, index):
    kind, _, rest = spec.partition(":")
    if kind == "nrcs":
        dist, _, depth = rest.partition(":")
        return (f'[[storm]]\nid = "nrcs-{dist.lower()}-{depth}mm"\nmethod = "nrcs-24h"\n'
                f'distribution = "{dist}"\ndepth = {float(depth)}\nstep_min = 6\n')
    if kind == "block":
        duration = float(rest)
        return (f'[[storm]]\nid = "block-{rest}min"\nmethod = "alternating-block"\n'
                f'duration_min = {duration}\nstep_min = 5\n'
                'idf = { a = 1300.0, b = 10.0, c = 0.75 }  # invented IDF relation\n')
    if kind == "toml":
        with open(rest, encoding="utf-8") as f:
            return f.read()
    sys.exit(f"make_network.py: --storm {spec!r} (storm {index + 1}): expected "
             "nrcs:TYPE:DEPTH_MM, block:DURATION_MIN or toml:FILE")


def write_study(args, out):
    n = args.reaches
    parents = parents_binary(n) if args.shape == "binary" else parents_random(n, args.seed)
    upstream = [0] * n
    for p in parents[1:]:
        upstream[p] += 1
    with_sub = [args.shape == "random" or upstream[k] == 0 for k in range(n)]
    cells = n * args.reach_cells + sum(with_sub) * args.plane_cells
    steps = args.duration_h * 3600.0 / args.coupling_step_s
    w = out.write
    w(f"# Synthetic {args.shape} dendritic network of {n} reaches and {sum(with_sub)} subcatchments,\n"
      f"# written by tools/make_network.py for speed measurements. Invented: no real place.\n\n")
    w("[study]\n")
    w(f'title = "synthetic {args.shape} network, {n} reaches"\n')
    w('units = "si"\n')
    w(f"duration_h = {args.duration_h}\n")
    w(f"output_interval_min = {args.output_interval_min}\n")
    w(f"coupling_step_s = {args.coupling_step_s}\n")
    w(f'channel_scheme = "{args.scheme}"\n')
    w(f'plane_scheme = "{args.plane_scheme}"\n')
    # The run budget scales with the network: lift it well above this run's own need.
    w(f"max_cell_steps = {max(1e10, 100.0 * cells * steps):.6g}\n")
    w(f"max_memory_mb = {max(2048, cells * 256 // 2**20 + 1)}\n\n")
    for i, spec in enumerate(args.storm or ["nrcs:II:100"]):
        w(storm_text(spec, i) + "\n")
    w('[[outlet]]\nid = "outfall"\n\n')
    for k in range(n):
        to = "outfall" if parents[k] < 0 else f"r{parents[k]}"
        w(f'[[reach]]\nid = "r{k}"\nto = "{to}"\nlength = {args.reach_length_m}\nslope = 0.005\n'
          f"manning_n = 0.035\ncells = {args.reach_cells}\n"
          'section = { shape = "trapezoidal", bottom_width = 2.0, left_side_slope = 2.0, '
          'right_side_slope = 2.0 }\n\n')
    for k in range(n):
        if not with_sub[k]:
            continue
        w(f'[[subcatchment]]\nid = "s{k}"\nto = "r{k}"\narea = {args.subcatchment_area_ha}\n'
          f'loss = {{ method = "curve-number", curve_number = {args.curve_number} }}\n'
          f"  [[subcatchment.plane]]\n  length = {args.plane_length_m}\n  slope = 0.02\n"
          f"  manning_n = 0.15\n  cells = {args.plane_cells}\n\n")
    return cells


def main(argv):
    args = parse_args(argv)
    if args.out == "-":
        cells = write_study(args, sys.stdout)
    else:
        with open(args.out, "w", encoding="utf-8") as f:
            cells = write_study(args, f)
    print(f"make_network.py: {args.reaches} reaches, {cells} cells -> {args.out}", file=sys.stderr)


if __name__ == "__main__":
    main(sys.argv[1:])
