#!/usr/bin/env python3
"""Switching default / best single method, per model and tolerance, from the
CSV files the `compare` example writes (`--out DIR`).

    python3 tools/results/ratios.py DIR                 # best of every single method run
    python3 tools/results/ratios.py DIR --among "Dormand-Prince 5(4)" "Radau IIA 5" BDF

"Best" follows the example's winner rule: the fastest run whose error is at
most 10 x rtol or, when no run reaches that, the fastest run within 10 x the
smallest error reached. Prints a Markdown table: time ratio, right-hand-side
call ratio, the method compared against, and the switches of the default.
"""
import argparse
import csv
import glob
import os

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


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("dir")
    ap.add_argument("--among", nargs="*", help="method labels to choose the best from")
    a = ap.parse_args()
    print("| model | rtol | switches | time ratio | rhs ratio | against |")
    print("| --- | --- | ---: | ---: | ---: | --- |")
    order = []
    for path in sorted(glob.glob(os.path.join(a.dir, "*.csv"))):
        with open(path) as f:
            order.append(list(csv.DictReader(f)))
    for rows in order:
        for rtol in sorted({float(r["rtol"]) for r in rows}, reverse=True):
            at = [r for r in rows if float(r["rtol"]) == rtol]
            sw = [r for r in at if r["label"] == SWITCHING and r["status"] == "ok"]
            singles = [
                r for r in at
                if not r["method"].startswith("switching")
                and r["label"] == r["method"]  # not the dense-Jacobian variants
                and (a.among is None or r["method"] in a.among)
            ]
            b = best(singles, rtol)
            if not sw or b is None:
                continue
            s = sw[0]
            t = float(s["seconds"]) / float(b["seconds"])
            f = int(s["rhs_evals"]) / max(int(b["rhs_evals"]), 1)
            print(f"| {s['model']} | {rtol:.0e} | {s['switches']} | {t:.2f} | {f:.2f} | {b['method']} |")


if __name__ == "__main__":
    main()
