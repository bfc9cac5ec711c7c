#!/usr/bin/env python3
"""Benchmark of `plantsieve certify` (figures, not a timed test): on the demo
catalog and on a generated set of plants, the best-found peak over its floor
(median and worst, Ms and Mt, over the plants whose floors bind, >= 1, and whose
controller meets the roll-off, band and effort requirements, so that it bounds), the
share of floor-passing plants demonstrated, the reasons the rest are
undecided, and the time a plant (CPU and wall, with the load average).
Goals (the certificate issue): median ratio at most 1.2 on Ms and on Mt; a
clear majority of the floor-passing demo plants demonstrated.

Usage: certify_bench.py PLANTSIEVE SRCDIR [N_GENERATED (1000)] [BUDGET (4000)]
"""
import collections
import json
import os
import resource
import statistics
import subprocess
import sys
import tempfile
import time


def run(ps, cat, budget):
    t0 = time.monotonic()
    r0 = resource.getrusage(resource.RUSAGE_CHILDREN)
    out = subprocess.run([ps, "certify", "--json", "--budget", str(budget), cat],
                         capture_output=True, text=True)
    r1 = resource.getrusage(resource.RUSAGE_CHILDREN)
    wall = time.monotonic() - t0
    cpu = (r1.ru_utime - r0.ru_utime) + (r1.ru_stime - r0.ru_stime)
    if out.returncode not in (0, 3):
        sys.exit("certify failed (%d): %s" % (out.returncode, out.stderr[:500]))
    return json.loads(out.stdout), wall, cpu


def report(name, doc, wall, cpu):
    plants = doc["plants"]
    n = len(plants)
    outcomes = collections.Counter(p["outcome"] for p in plants)
    searched = [p for p in plants if p["outcome"] in ("demonstrated", "undecided")]
    demo = outcomes["demonstrated"]
    print("%s: %d plants, budget %d: %s" % (name, n, doc["budget"],
          ", ".join("%s %d" % kv for kv in sorted(outcomes.items()))))
    print("  time: %.3f s wall, %.3f s CPU for %d plants: %.1f ms CPU a plant"
          % (wall, cpu, n, 1000 * cpu / max(n, 1)))
    ratios = {}
    for peak in ("ms", "mt"):
        # only controllers that meet the roll-off, band and effort requirements bound the best
        # achievable peak; one that misses them says nothing about the bracket
        rs = [p["found"][peak] / p[peak + "_floor"] for p in plants
              if p["controller"] and p["found"].get("upper_bound") and p[peak + "_floor"] is not None
              and p[peak + "_floor"] >= 1]
        ratios[peak] = rs
        if rs:
            print("  best found %s over its floor (%d plants whose controller meets roll-off, band and effort, "
                  "with a binding floor): "
                  "median %.3f, worst %.3f" % (peak.upper().replace("S", "s").replace("T", "t"), len(rs),
                                               statistics.median(rs), max(rs)))
    why = collections.Counter()
    for p in searched:
        if p["outcome"] == "undecided":
            w = p["found"]["why"] if p["controller"] else "no stabilizing controller found"
            kind = ("peak |S|" if w.startswith("peak |S|") else "peak |T|" if w.startswith("peak |T|")
                    else "band" if "on the band" in w else "roll-off" if "roll-off" in w
                    else "peak |C S|" if "|C S|" in w else w)
            why[kind] += 1
    if why:
        print("  undecided, by the first requirement missed: " +
              "; ".join("%s: %d" % kv for kv in why.most_common()))
    share = demo / len(searched) if searched else 0.0
    print("  demonstrated: %d of %d floor-passing plants searched (%.0f %%)" % (demo, len(searched), 100 * share))
    return ratios, share


def verdict(ok):
    return "MET" if ok else "MISS"


def main():
    if len(sys.argv) < 3:
        sys.exit(__doc__)
    ps, src = sys.argv[1], sys.argv[2]
    n_gen = int(sys.argv[3]) if len(sys.argv) > 3 else 1000
    budget = int(sys.argv[4]) if len(sys.argv) > 4 else 4000
    print("certify benchmark, load average %s" % " ".join("%.2f" % x for x in os.getloadavg()))
    doc, wall, cpu = run(ps, os.path.join(src, "catalogs", "demo-variants.yaml"), budget)
    r_demo, share_demo = report("demo catalog", doc, wall, cpu)
    with tempfile.TemporaryDirectory() as tmp:
        gen = os.path.join(tmp, "gen.yaml")
        py = "/usr/bin/python3" if os.path.exists("/usr/bin/python3") else sys.executable
        subprocess.run([py, os.path.join(src, "tests", "bench", "gen_catalog.py"), str(n_gen), gen,
                        "--seed", "3"], check=True, capture_output=True)
        doc, wall, cpu = run(ps, gen, budget)
        r_gen, _ = report("generated (gen_catalog.py seed 3)", doc, wall, cpu)
    print("targets:")
    for name, r in (("demo", r_demo), ("generated", r_gen)):
        for peak in ("ms", "mt"):
            if r[peak]:
                m = statistics.median(r[peak])
                print("  %s: median best-found %s over its floor <= 1.2: %.3f -> %s"
                      % (name, peak, m, verdict(m <= 1.2)))
    print("  demo: a clear majority (> 50 %%) of the floor-passing plants demonstrated: %.0f %% -> %s"
          % (100 * share_demo, verdict(share_demo > 0.5)))
    print("load average at the end: %s" % " ".join("%.2f" % x for x in os.getloadavg()))


if __name__ == "__main__":
    main()
