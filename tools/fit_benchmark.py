#!/usr/bin/python3
"""Throughput and peak memory of `contrast-bench-cli fit` against pandas on one large file.

What it does
  1. Writes a long-format CSV of 10 million rows (about 140 MB) to /tmp unless it is there
     already: a factor column `group` with 8 levels of unequal frequency (30% down to 2%)
     and a response column `value` with 6 significant digits ("grp_c,512.337").
  2. Reads it once to warm the page cache, then times, several times each and in turn:
       cli-file   contrast-bench-cli fit --data FILE ... --json   (treatment coding)
       cli-stdin  the same with --data - and the file on standard input
       pandas     pandas.read_csv(FILE) then groupby count/mean/var (Debian's python3-pandas)
     each under /usr/bin/time, which gives the wall time and the peak resident memory.
  3. Prints the medians: wall seconds, MB/s (file bytes / 1e6 / wall seconds), CPU seconds
     (user + system) with the MB/s they give, and peak RSS in MiB; then checks that both
     tools found the same level means. On a shared machine the CPU figures are the steadier.

Usage
  /usr/bin/python3 tools/fit_benchmark.py [--cli PATH] [--rows N] [--runs R] [--file PATH]

--cli defaults to the first of build/release, build/dev and build-*/ that holds
app/contrast-bench-cli; build it in Release or RelWithDebInfo first. The data file is
not part of the repository; delete it from /tmp when done.
"""
import argparse
import glob
import json
import os
import statistics
import subprocess
import sys
import tempfile

import numpy as np

LEVELS = [f"grp_{c}" for c in "abcdefgh"]
SHARES = np.array([30, 20, 15, 12, 9, 7, 5, 2], dtype=float) / 100.0
ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))


def generate(path, rows, seed=20240611):
    """Fixed-width rows "grp_x,ddd.ddd\\n" (14 bytes), written in chunks without Python loops."""
    rng = np.random.default_rng(seed)
    means = np.array([480.0, 505.0, 520.0, 470.0, 530.0, 495.0, 515.0, 500.0])
    names = np.array([list(n.encode()) for n in LEVELS], dtype=np.uint8)
    with open(path, "wb") as out:
        out.write(b"group,value\n")
        chunk = 1_000_000
        for start in range(0, rows, chunk):
            n = min(chunk, rows - start)
            g = rng.choice(len(LEVELS), size=n, p=SHARES)
            v = np.clip(np.rint((means[g] + rng.normal(0.0, 60.0, n)) * 1000), 100_000, 999_999).astype(np.int64)
            line = np.empty((n, 14), dtype=np.uint8)
            line[:, 0:5] = names[g]
            line[:, 5] = ord(",")
            for i, div in enumerate([100_000, 10_000, 1_000]):
                line[:, 6 + i] = ord("0") + (v // div) % 10
            line[:, 9] = ord(".")
            for i, div in enumerate([100, 10, 1]):
                line[:, 10 + i] = ord("0") + (v // div) % 10
            line[:, 13] = ord("\n")
            out.write(line.tobytes())


def find_cli(given):
    if given:
        return given
    candidates = [os.path.join(ROOT, d, "app", "contrast-bench-cli") for d in ("build/release", "build/dev")]
    candidates += sorted(glob.glob(os.path.join(ROOT, "build-*", "app", "contrast-bench-cli")))
    for c in candidates:
        if os.access(c, os.X_OK):
            return c
    sys.exit("no contrast-bench-cli found; build it or pass --cli PATH")


def timed(cmd, stdin_path=None, stdout_path=os.devnull):
    """Runs cmd under /usr/bin/time; returns (wall seconds, CPU seconds, peak RSS in KiB)."""
    with tempfile.NamedTemporaryFile("r", suffix=".time") as t:
        stdin = open(stdin_path, "rb") if stdin_path else subprocess.DEVNULL
        with open(stdout_path, "wb") as out:
            subprocess.run(["/usr/bin/time", "-o", t.name, "-f", "%e %U %S %M"] + cmd, stdin=stdin, stdout=out,
                           check=True)
        if stdin_path:
            stdin.close()
        wall, user, system, kib = t.read().split()
    return float(wall), float(user) + float(system), int(kib)


PANDAS = """
import sys, json, pandas as pd
frame = pd.read_csv(sys.argv[1])
stats = frame.groupby("group")["value"].agg(["count", "mean", "var"])
json.dump({k: v["mean"] for k, v in stats.to_dict("index").items()}, sys.stdout)
"""


def main():
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("--cli")
    ap.add_argument("--rows", type=int, default=10_000_000)
    ap.add_argument("--runs", type=int, default=5)
    ap.add_argument("--file", default="/tmp/cb_fit_benchmark.csv")
    args = ap.parse_args()
    cli = find_cli(args.cli)
    if not os.path.exists(args.file):
        print(f"writing {args.rows} rows to {args.file} ...", flush=True)
        generate(args.file, args.rows)
    size = os.path.getsize(args.file)
    with open(args.file, "rb") as f:  # warm the page cache
        while f.read(1 << 24):
            pass

    fit = [cli, "fit", "--factor", "group", "--response", "value", "--levels", ",".join(LEVELS),
           "--scheme", "treatment", "--json"]
    tools = {
        "cli-file": (fit + ["--data", args.file], None),
        "cli-stdin": (fit + ["--data", "-"], args.file),
        "pandas": (["/usr/bin/python3", "-c", PANDAS, args.file], None),
    }
    results = {name: [] for name in tools}
    for _ in range(args.runs):
        for name, (cmd, stdin) in tools.items():
            results[name].append(timed(cmd, stdin))

    print(f"file: {args.file}, {size / 1e6:.1f} MB, {args.rows} rows; {args.runs} runs each, medians")
    print(f"{'tool':<11}{'wall s':>8}{'MB/s':>8}{'CPU s':>8}{'MB/s':>8}{'peak RSS MiB':>14}")
    summary = {}
    for name, runs in results.items():
        wall = statistics.median(r[0] for r in runs)
        cpu = statistics.median(r[1] for r in runs)
        rss = statistics.median(r[2] for r in runs) / 1024
        summary[name] = (size / 1e6 / wall, size / 1e6 / cpu)
        print(f"{name:<11}{wall:>8.2f}{size / 1e6 / wall:>8.0f}{cpu:>8.2f}{size / 1e6 / cpu:>8.0f}{rss:>14.1f}")
    ratio = [summary["cli-file"][i] / summary["pandas"][i] for i in (0, 1)]
    print(f"cli-file over pandas: {ratio[0]:.1f}x by wall time, {ratio[1]:.1f}x by CPU time")

    # Both must have found the same level means.
    ours = json.loads(subprocess.run(tools["cli-file"][0], capture_output=True, check=True).stdout)
    theirs = json.loads(subprocess.run(tools["pandas"][0], capture_output=True, check=True).stdout)
    worst = max(abs(l["mean"] - theirs[l["name"]]) for l in ours["levels"])
    print(f"largest difference in level means between the two: {worst:.2e}")


if __name__ == "__main__":
    main()
