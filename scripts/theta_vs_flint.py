#!/usr/bin/env python3
"""Theta timing: kelp against python-flint, measured in the same run on the same matrices.

kelp's figures come from `cargo run --release -p kelp-evaluator --example theta_timing`;
python-flint's from acb_mat.theta at 53-bit precision, which computes all 4^g
characteristics at once: its time per characteristic value is the total divided by 4^g.
Needs python-flint (tests/fixtures/gen/requirements.txt). Genus 1..5 (FLINT's all-
characteristics call grows like 4^g). Prints a table and the ratios.

Run: python3 scripts/theta_vs_flint.py
"""
import json
import subprocess
import sys
import time

import flint
from flint import acb, acb_mat


def cargo_example(*args):
    cmd = ["cargo", "run", "-q", "--release", "-p", "kelp-evaluator", "--example", "theta_timing", "--"] + list(args)
    return json.loads(subprocess.run(cmd, check=True, capture_output=True, text=True).stdout)


def flint_time(tau, zs):
    flint.ctx.prec = 53
    t = acb_mat([[acb(*e) for e in row] for row in tau])
    cols = [acb_mat([[acb(*e)] for e in z]) for z in zs]
    best = float("inf")
    for _ in range(3):
        n = 0
        t0 = time.perf_counter()
        while time.perf_counter() - t0 < 0.2:
            t.theta(cols[n % len(cols)])
            n += 1
        best = min(best, (time.perf_counter() - t0) / n)
    return best * 1e6


def main():
    cases = cargo_example("--print-cases")
    kelp = cargo_example()
    print("python-flint %s, Python %s" % (flint.__version__, sys.version.split()[0]))
    print("genus cond  points  kelp_us  kelp_batch_us  flint_all_us  flint_per_char_us  ratio(flint/kelp)  ratio(batch)")
    for case, row in zip(cases, kelp):
        g = row["genus"]
        if g > 5:
            print("%5d %-5s %7d %8.2f %14.2f   (FLINT not timed above genus 5)" % (
                g, row["conditioning"], row["plain_points"], row["plain_us"], row["batch_plain_us"]))
            continue
        total = flint_time(case["tau"], case["zs"])
        per = total / 4**g
        print("%5d %-5s %7d %8.2f %14.2f %13.1f %18.2f %18.1f %13.1f" % (
            g, row["conditioning"], row["plain_points"], row["plain_us"], row["batch_plain_us"], total, per,
            per / row["plain_us"], per / row["batch_plain_us"]))


if __name__ == "__main__":
    main()
