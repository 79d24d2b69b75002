#!/usr/bin/env python3
"""Compares two snapshot directories written by snapshot.sh number by number.

Usage: compare.py BEFORE AFTER [--rel 1e-9]. Every number in every summary.json of BEFORE must be in AFTER at the
same path and agree to the relative tolerance (absolute below 1e-300); keys present on one side only, strings that
differ and timing or version entries (paths containing 'seconds', 'timing', 'version', 'statistics', 'rhs') are
listed separately. Exit status 1 when a number differs or a run is missing. With --errors, each run's pivot
quantities (A_s, n_s, alpha_s, r, n_t) are also printed with their change against the sum of the two runs' reported
errors (summary.json `errors`); a change beyond that sum counts as a failure, a change within it does not."""
import json, math, os, sys

SKIP = ("seconds", "timing", "version", "statistics", "rhs", "wall", "workers", "created")

def walk(node, path, out):
    if isinstance(node, dict):
        for k, v in node.items():
            walk(v, f"{path}.{k}" if path else k, out)
    elif isinstance(node, list):
        for i, v in enumerate(node):
            walk(v, f"{path}[{i}]", out)
    else:
        out[path] = node

def main():
    errors_mode = "--errors" in sys.argv
    args = [a for a in sys.argv[1:] if not a.startswith("--")]
    rel = float(sys.argv[sys.argv.index("--rel") + 1]) if "--rel" in sys.argv else 1e-9
    if "--rel" in sys.argv:
        args.remove(sys.argv[sys.argv.index("--rel") + 1])
    before, after = args
    bad = 0
    for name in sorted(os.listdir(before)):
        a_path = os.path.join(after, name)
        if not os.path.exists(a_path):
            print(f"{name}: missing after"); bad += 1; continue
        if not name.endswith(".json"):
            continue
        b, a = {}, {}
        bj, aj = json.load(open(os.path.join(before, name))), json.load(open(a_path))
        walk(bj, "", b)
        walk(aj, "", a)
        worst = 0.0
        within = set()
        if errors_mode:
            for q in ("A_s", "n_s", "alpha_s", "r", "n_t"):
                bv, av = bj.get(q), aj.get(q)
                be, ae = (bj.get("errors") or {}).get(q), (aj.get("errors") or {}).get(q)
                if not all(isinstance(x, (int, float)) for x in (bv, av, be, ae)):
                    continue
                d, e = abs(av - bv), be + ae
                ok = d <= e
                print(f"{name}: {q}: {bv!r} -> {av!r}: change {d:.2e} {'within' if ok else 'BEYOND'} the errors {e:.2e} (rel change {d / max(abs(bv), 1e-300):.1e})")
                if ok:
                    within.add(q)
                else:
                    bad += 1
        for key, bv in b.items():
            if any(s in key.lower() for s in SKIP):
                continue
            if key not in a:
                print(f"{name}: {key} missing after"); continue
            av = a[key]
            if isinstance(bv, (int, float)) and not isinstance(bv, bool) and isinstance(av, (int, float)):
                if bv == av:
                    continue
                d = abs(av - bv) / max(abs(bv), abs(av), 1e-300)
                worst = max(worst, d)
                if d > rel and key in within:
                    continue
                if d > rel:
                    print(f"{name}: {key}: {bv!r} -> {av!r} (rel {d:.2e})"); bad += 1
            elif bv != av:
                print(f"{name}: {key}: {bv!r} -> {av!r}")
        for key in a.keys() - b.keys():
            if not any(s in key.lower() for s in SKIP):
                print(f"{name}: {key} new after")
        print(f"{name}: worst relative change {worst:.2e}")
    sys.exit(1 if bad else 0)

main()
