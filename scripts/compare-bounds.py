#!/usr/bin/env python3
"""Compare two directories of `qbound audit --format json` reports node by
node: ideal range, actual range, error bound. Prints, per file, how many
nodes are identical, tighter or looser in the second directory, with the
largest relative change. Exact values are compared as fractions."""
import json
import sys
from fractions import Fraction
from pathlib import Path


def fr(e):
    return Fraction(e["exact"])


def main(old_dir, new_dir):
    worst_loose = Fraction(0)
    for old in sorted(Path(old_dir).glob("*.json")):
        new = Path(new_dir) / old.name
        a = json.loads(old.read_text())
        b = json.loads(new.read_text())
        same = tighter = looser = 0
        notes = []
        for na, nb in zip(a["nodes"], b["nodes"]):
            for key in ("ideal_range", "actual_range", "error"):
                lo_a, hi_a = fr(na[key]["lo"]), fr(na[key]["hi"])
                lo_b, hi_b = fr(nb[key]["lo"]), fr(nb[key]["hi"])
                if (lo_a, hi_a) == (lo_b, hi_b):
                    same += 1
                    continue
                scale = max(abs(lo_a), abs(hi_a)) or Fraction(1)
                wider = max(lo_a - lo_b, hi_b - hi_a)
                if lo_b >= lo_a and hi_b <= hi_a:
                    tighter += 1
                    notes.append(f"  {na['label']} {key}: [{float(lo_a):.6g}, {float(hi_a):.6g}] -> [{float(lo_b):.6g}, {float(hi_b):.6g}]")
                else:
                    looser += 1
                    worst_loose = max(worst_loose, wider / scale)
                    notes.append(f"  LOOSER {na['label']} {key}: by {float(wider / scale):.3g} relative")
        print(f"{old.stem}: {same} identical, {tighter} tighter, {looser} looser")
        for n in notes:
            print(n)
    print(f"largest relative loosening: {float(worst_loose):.3g}")


if __name__ == "__main__":
    main(sys.argv[1], sys.argv[2])
