#!/usr/bin/env python3
"""Switching default / best single method, per model and tolerance, from the
CSV files the `compare` example writes (`--out DIR`).

    python3 tools/results/ratios.py DIR                 # best of every single method run
    python3 tools/results/ratios.py DIR --among "Dormand-Prince 5(4)" "Radau IIA 5" BDF
    python3 tools/results/ratios.py DIR1 DIR2 ... DIRn  # the last run, with ranges over all
    python3 tools/results/ratios.py DIR --matched       # also at equal accuracy (needs a
                                                        # run over several tolerances)

"Best" follows the example's winner rule: the fastest run whose error is at
most 10 x rtol or, when no run reaches that, the fastest run within 10 x the
smallest error reached. Prints a Markdown table: time ratio, right-hand-side
call ratio, the method compared against, and the switches of the default,
from the last directory; with several directories, a last column gives the
range of the time ratio over all of them, and a summary follows: per
tolerance and run, on how many models the goal is met (a ratio of at most
`--goal`, default 1.2, or below 1 for the models named by `--changing`),
how many are below 1, the median ratio and the misses.

With `--matched`, a second table compares at equal accuracy instead of
equal tolerance: for each tolerance, the time each single method needs to
reach the error the switching default reached or better (a run of its own
at least that accurate, or a time interpolated log-log between two of its
runs at neighbouring tolerances whose errors bracket that error; no
extrapolation: a method with neither is left out), and the default's
time over the cheapest of those. Where a method's error is not monotone
in the tolerance, or the reference limits the error (chaotic or long
runs), read it with care.
"""
import argparse
import csv
import glob
import os
import statistics

SWITCHING = "switching DP5/Radau IIA"


def best(rows, rtol):
    ok = [r for r in rows if r["status"] == "ok"]
    if not ok:
        return None
    good = [r for r in ok if float(r["error"]) <= 10 * rtol]
    if not good:
        smallest = min(float(r["error"]) for r in ok)
        good = [r for r in ok if float(r["error"]) <= 10 * smallest]
    return min(good, key=lambda r: float(r["seconds"]))


def ratios(directory, among):
    """{(model, rtol): (switches, time ratio, rhs ratio, against)} of one run."""
    out = {}
    for path in sorted(glob.glob(os.path.join(directory, "*.csv"))):
        with open(path) as f:
            rows = list(csv.DictReader(f))
        for rtol in sorted({float(r["rtol"]) for r in rows}, reverse=True):
            at = [r for r in rows if float(r["rtol"]) == rtol]
            sw = [r for r in at if r["label"] == SWITCHING and r["status"] == "ok"]
            singles = [
                r for r in at
                if not r["method"].startswith("switching")
                and r["label"] == r["method"]  # not the dense-Jacobian variants
                and (among is None or r["method"] in among)
            ]
            b = best(singles, rtol)
            if not sw or b is None:
                continue
            s = sw[0]
            t = float(s["seconds"]) / float(b["seconds"])
            f = int(s["rhs_evals"]) / max(int(b["rhs_evals"]), 1)
            out[(s["model"], rtol)] = (s["switches"], t, f, b["method"])
    return out


def interpolated_time(runs, target):
    """Time to reach error `target` or better: a run at least that accurate
    at its own time, or log-log between runs at neighbouring tolerances
    whose errors bracket it; None when neither exists."""
    import math
    pts = sorted(
        (float(r["rtol"]), float(r["error"]), float(r["seconds"]))
        for r in runs
        if r["status"] == "ok" and float(r["error"]) > 0
    )
    at_least = [t for _, e, t in pts if e <= target]
    best_t = min(at_least) if at_least else None
    for (_, e0, t0), (_, e1, t1) in zip(pts, pts[1:]):
        lo, hi = min(e0, e1), max(e0, e1)
        if not (lo <= target <= hi):
            continue
        if e0 == e1:
            t = min(t0, t1)
        else:
            w = (math.log(target) - math.log(e0)) / (math.log(e1) - math.log(e0))
            t = math.exp(math.log(t0) + w * (math.log(t1) - math.log(t0)))
        best_t = t if best_t is None else min(best_t, t)
    return best_t


def matched(directory, among):
    """[(model, rtol, pair error, ratio, against)] at the pair's accuracy."""
    out = []
    for path in sorted(glob.glob(os.path.join(directory, "*.csv"))):
        with open(path) as f:
            rows = list(csv.DictReader(f))
        singles = {}
        for r in rows:
            if (not r["method"].startswith("switching") and r["label"] == r["method"]
                    and (among is None or r["method"] in among)):
                singles.setdefault(r["method"], []).append(r)
        for s in rows:
            if s["label"] != SWITCHING or s["status"] != "ok" or float(s["error"]) <= 0:
                continue
            target = float(s["error"])
            costs = [
                (t, m) for m, runs in singles.items()
                if (t := interpolated_time(runs, target)) is not None
            ]
            if costs:
                t, m = min(costs)
                out.append((s["model"], float(s["rtol"]), target, float(s["seconds"]) / t, m))
    return out


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("dirs", nargs="+")
    ap.add_argument("--among", nargs="*", help="method labels to choose the best from")
    ap.add_argument("--goal", type=float, default=1.2)
    ap.add_argument("--matched", action="store_true", help="also compare at equal accuracy")
    ap.add_argument(
        "--changing", nargs="*", default=[],
        help="models that change character: their goal is a ratio below 1",
    )
    a = ap.parse_args()
    runs = [ratios(d, a.among) for d in a.dirs]
    last = runs[-1]
    several = len(runs) > 1
    head = "| model | rtol | switches | time ratio | rhs ratio | against |"
    print(head + (" range of time ratio |" if several else ""))
    print("| --- | --- | ---: | ---: | ---: | --- |" + (" ---: |" if several else ""))
    for key, (switches, t, f, against) in last.items():
        line = f"| {key[0]} | {key[1]:.0e} | {switches} | {t:.2f} | {f:.2f} | {against} |"
        if several:
            seen = [r[key][1] for r in runs if key in r]
            line += f" {min(seen):.2f}-{max(seen):.2f} |"
        print(line)
    if a.matched:
        print()
        print("| model | rtol | default's error | time ratio at that error | against |")
        print("| --- | --- | ---: | ---: | --- |")
        for model, rtol, err, t, m in matched(a.dirs[-1], a.among):
            print(f"| {model} | {rtol:.0e} | {err:.1e} | {t:.2f} | {m} |")
    if several:
        print()
        for rtol in sorted({k[1] for k in last}, reverse=True):
            for i, r in enumerate(runs, 1):
                at = {k[0]: v[1] for k, v in r.items() if k[1] == rtol}
                ts = list(at.values())
                met = sum(
                    t < 1 if m in a.changing else t <= a.goal for m, t in at.items()
                )
                below = sum(t < 1 for t in ts)
                missed = ", ".join(
                    f"{m} {t:.2f}" for m, t in at.items()
                    if (t >= 1 if m in a.changing else t > a.goal)
                )
                print(
                    f"rtol {rtol:.0e}, run {i}: goal met on {met} of {len(ts)}, "
                    f"below 1 on {below}, median {statistics.median(ts):.2f}; missed: {missed}"
                )


if __name__ == "__main__":
    main()
