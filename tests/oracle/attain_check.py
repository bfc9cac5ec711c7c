#!/usr/bin/env python3
"""attain_check.py - the interpolation construction of `plantsieve certify
--json` ("attained"), checked outside the tool with numpy/scipy.

For every plant record with "attained" (and within_1_percent true):
  - the floor is recomputed from the plant's roots: one real RHP pole p and
    at most one real RHP zero z give |z + p| / |z - p| (Zames and Francis,
    IEEE TAC 28(5), 1983; Stein, IEEE CSM 23(4), 2003, pole 6 and zero 26:
    1.6), a pole alone gives 1;
  - each of the two controllers closes a stable loop: the roots of
    den_P den_C + num_P num_C (numpy.roots) all have negative real parts;
  - |S| (first controller) and |T| (second) peak, on 20000 log-spaced
    frequencies refined by scipy.optimize.minimize_scalar, at the reported
    value (0.1 %), not below the floor and within 1 % of it.
Usage: attain_check.py CERTIFY_JSON MIN_PLANTS"""
import json
import math
import sys

import numpy as np
from scipy.optimize import minimize_scalar


def poly_from_roots(roots):
    p = np.array([1.0])
    for re, im in roots:
        p = np.polymul(p, [1.0, -complex(re, im)])
    return np.real_if_close(p, tol=1e6).real


def peak(fn, lo, hi):
    w = np.logspace(math.log10(lo), math.log10(hi), 20000)
    v = fn(w)
    i = int(np.argmax(v))
    a, b = w[max(i - 1, 0)], w[min(i + 1, len(w) - 1)]
    r = minimize_scalar(lambda x: -fn(np.array([math.exp(x)]))[0], bounds=(math.log(a), math.log(b)),
                        method="bounded", options={"xatol": 1e-12})
    return max(v[i], -r.fun)


def main():
    doc = json.load(open(sys.argv[1]))
    need = int(sys.argv[2])
    bad, checked = [], 0
    for rec in doc["plants"]:
        at = rec.get("attained")
        if not at:
            continue
        pl = rec["plant"]
        rhp_p = [r for r in pl["poles"] if r[0] > 0]
        rhp_z = [r for r in pl["zeros"] if r[0] > 0]
        if len(rhp_p) != 1 or len(rhp_z) > 1 or pl["delay"] != 0:
            bad.append("%s: construction reported for a plant outside its scope" % rec["id"])
            continue
        p = rhp_p[0][0]
        floor = abs(rhp_z[0][0] + p) / abs(rhp_z[0][0] - p) if rhp_z else 1.0
        if abs(floor - at["ms_floor"]) > 1e-9 * floor:
            bad.append("%s: floor %.12g, reported %.12g" % (rec["id"], floor, at["ms_floor"]))
        nP = pl["gain"] * poly_from_roots(pl["zeros"])
        dP = poly_from_roots(pl["poles"])
        scale = max([abs(complex(*r)) for r in pl["poles"] + pl["zeros"]] + [1e-3])
        for which, key in (("ms", "S"), ("mt", "T")):
            nC, dC = np.array(at[which + "_num"]), np.array(at[which + "_den"])
            char = np.polyadd(np.polymul(dP, dC), np.polymul(nP, nC))
            roots = np.roots(char)
            if not np.all(roots.real < 0):
                bad.append("%s %s: closed loop unstable, roots %s" % (rec["id"], which, roots))
                continue

            def mag(w, nC=nC, dC=dC, key=key):
                s = 1j * w
                L = np.polyval(nP, s) * np.polyval(nC, s) / (np.polyval(dP, s) * np.polyval(dC, s))
                return np.abs(1 / (1 + L) if key == "S" else L / (1 + L))

            m = peak(mag, scale * 1e-5, max(at["filter_corner"], scale) * 1e4)
            rep = at[which]
            if abs(m - rep) > 1e-3 * rep:
                bad.append("%s %s: scipy peak %.9g, reported %.9g" % (rec["id"], which, m, rep))
            if m < floor * (1 - 1e-6):
                bad.append("%s %s: peak %.9g below the floor %.9g" % (rec["id"], which, m, floor))
            if at["within_1_percent"] and m > 1.01 * floor:
                bad.append("%s %s: peak %.9g not within 1 %% of the floor %.9g" % (rec["id"], which, m, floor))
        checked += 1
        print("ok %s floor %.6g Ms %.6g Mt %.6g" % (rec["id"], floor, at["ms"], at["mt"]))
    if checked < need:
        bad.append("only %d plants with the construction (at least %d expected)" % (checked, need))
    for b in bad:
        print("FAIL: " + b)
    print("attain_check: %d plants, %d problems" % (checked, len(bad)))
    return 1 if bad else 0


if __name__ == "__main__":
    sys.exit(main())
