"""Independent check of the controllers that `plantsieve certify --json` reports.

For every plant whose `controller` is not null the loop L = P C is rebuilt
here from the JSON (plant gain, zeros, poles, delay; controller num/den in
descending powers of s) and checked with numpy/scipy, not with the tool's
algorithms:

  plant      where the catalog holds the plant (YAML, not a family), its
             frequency response from the catalog's own model (polynomial,
             factored or state space) equals that of the JSON plant, and the
             delays are equal: the certificate is about the catalog's plant.
  stability  without delay: the closed-loop poles, numpy.roots of
             den_P den_C + num_P num_C, all have Re < 0 (a reported controller
             is always claimed stabilizing), and the decay rate the tool
             reports is -max Re of them. With delay: a Nyquist count written
             here: arg(1 + L) along the imaginary axis, indented to the right
             around poles on the axis (integrators), closed by a large arc,
             gives Z = P - (winding), P the open-loop poles with Re > 0; Z must
             be 0. Without delay the Nyquist count is run too and must agree
             with the roots (so the count is itself checked on every loop
             without delay). No unstable pole or zero may cancel between plant
             and controller (hidden from L, unstable inside the loop).
  peaks      |S|, |T| and |C S| on a dense log grid (at least 20000 points,
             2000 a decade, from 1e-4 of the slowest scale to past 1e4 of the
             fastest and past the crossover), each local maximum refined by a
             bounded scalar search. The tool's ms, mt, effort must not be below
             that (it would understate a peak: relative 1e-6) nor above it by
             more than 1 % (|S| -> 1 at high frequency: the supremum is at
             least 1). |S| and |T| at the tool's w_ms, w_mt equal its ms, mt.
  demonstrated  every requirement, from the catalog with its defaults, holds on
             this grid: max|S| <= ms_allowed, max|T| <= mt_allowed, |L| <= delta
             (wh/w)^(1+k) for w >= wh (and the loop's relative degree >= 1+k,
             so the bound holds past the grid too), |S| <= eps on [0, wb], max
             |C S| <= effort_allowed. The tool's rolloff_ratio and band_peak are
             within 1 % of the values here.
  floors     no verified loop has a peak below a floor that holds for it (the
             interpolation and effort floors for every stabilizing controller,
             Ms and Mt floors for one meeting the roll-off and band it assumes).

Usage: certify_check.py [--min-controllers N] [--min-demonstrated M] CERTIFY_JSON CATALOG...
One line per plant checked and a summary; exit 1 on any disagreement (named
with the plant and the numbers) or when fewer than N plants have a controller
or fewer than M demonstrated plants had their requirements checked.
CSV catalogs are not read: their plants get the checks that need no catalog.
"""
import argparse
import json
import math
import sys

import numpy as np
import scipy.optimize
import yaml

PEAK_UNDER = 1e-6    # the tool's peak may not be below the one found here by more than this (relative)
PEAK_OVER = 0.01     # nor above it by more than this (the tool refines between its grid points)
REQ_SLACK = 1e-9     # a requirement holds when the value here is at most allowed * (1 + this)
FLOOR_TOL = 1e-6     # a peak may be below a floor by this much (relative) only
PLANT_RTOL = 1e-5    # JSON plant against the catalog's model, relative
PER_DECADE = 2000
MIN_POINTS = 20000
REQ_DEFAULTS = {"peak_s_allowed": 2.0, "peak_t_allowed": 1.25, "band_edge": None,
                "band_attenuation": None, "rolloff_start": None, "rolloff_gain": 0.5,
                "rolloff_slope": 1.0, "effort_allowed": None}


# ---------------------------------------------------------------- catalog

def as_list(v):
    """A YAML sequence, or a space-separated string."""
    if v is None:
        return []
    if isinstance(v, str):
        return v.split()
    return list(v)


def as_real(v):
    return float(v) if not isinstance(v, str) else float(v.strip())


def as_roots(v):
    """Real numbers and complex strings: "a+bj" (listed with its conjugate) or the pair "a+-bj"."""
    out = []
    for x in as_list(v):
        if isinstance(x, (int, float)):
            out.append(complex(x))
            continue
        s = x.replace(" ", "")
        if "+-" in s:
            re_s, im_s = s.split("+-")
            im = float(im_s.rstrip("j"))
            out += [complex(float(re_s), im), complex(float(re_s), -im)]
        else:
            out.append(complex(s))
    return out


def frequency(v):
    """rad/s: a number, "X rad/s" or "X Hz"."""
    if v is None:
        return None
    if isinstance(v, (int, float)):
        return float(v)
    s = v.strip()
    if s.endswith("rad/s"):
        return float(s[:-5])
    if s.endswith("Hz"):
        return float(s[:-2]) * 2 * math.pi
    return float(s)


def ratio(v):
    """A ratio, or a level "X dB"."""
    if v is None:
        return None
    if isinstance(v, (int, float)):
        return float(v)
    s = v.strip()
    if s.endswith("dB"):
        return 10 ** (float(s[:-2]) / 20)
    return float(s)


def read_catalogs(paths):
    """id -> (entry with the defaults applied, kind 'plant' or 'family'); families by their id."""
    plants, families = {}, {}
    for path in paths:
        if path.lower().endswith(".csv"):
            print("note: %s: CSV catalog not read (its plants get the checks that need no catalog)" % path)
            continue
        with open(path, encoding="utf-8") as f:
            doc = yaml.safe_load(f) or {}
        defaults = doc.get("defaults") or {}
        for p in doc.get("plants") or []:
            plants[str(p["id"])] = {**defaults, **p}
        for fam in doc.get("families") or []:
            families[str(fam["id"])] = {**defaults, **fam}
    return plants, families


def requirements(entry):
    e = {**REQ_DEFAULTS, **{k: v for k, v in entry.items() if k in REQ_DEFAULTS}}
    return {
        "ms": as_real(e["peak_s_allowed"]), "mt": as_real(e["peak_t_allowed"]),
        "wb": frequency(e["band_edge"]), "eps": ratio(e["band_attenuation"]),
        "wh": frequency(e["rolloff_start"]), "delta": as_real(e["rolloff_gain"]),
        "k": as_real(e["rolloff_slope"]),
        "effort": None if e["effort_allowed"] is None else as_real(e["effort_allowed"]),
    }


def catalog_response(entry, w):
    """P(jw) (without the delay) from the catalog's own model, or None when the form is unknown."""
    s = 1j * np.asarray(w, dtype=float)
    if "numerator" in entry:
        num = [as_real(x) for x in as_list(entry["numerator"])]
        den = [as_real(x) for x in as_list(entry["denominator"])]
        return np.polyval(num, s) / np.polyval(den, s)
    if "poles" in entry:
        g = as_real(entry.get("gain", 1.0))
        v = np.full(s.shape, complex(g))
        for z in as_roots(entry.get("zeros")):
            v = v * (s - z)
        for p in as_roots(entry["poles"]):
            v = v / (s - p)
        return v
    if "a" in entry:
        a = entry["a"]
        if isinstance(a, str):
            rows = [[float(x) for x in r.split()] for r in a.split(";")]
        else:
            rows = [[as_real(x) for x in as_list(r)] for r in a]
        A = np.array(rows, dtype=float)
        B = np.array([as_real(x) for x in as_list(entry["b"])])
        C = np.array([as_real(x) for x in as_list(entry["c"])])
        D = as_real(entry.get("d", 0.0))
        n = A.shape[0]
        return np.array([C @ np.linalg.solve(sk * np.eye(n) - A, B) + D for sk in s])
    return None


# ---------------------------------------------------------------- the loop

def trim(p):
    p = np.atleast_1d(np.asarray(p, dtype=float))
    nz = np.flatnonzero(p)
    return p[nz[0]:] if nz.size else np.array([0.0])


class Loop:
    def __init__(self, rec):
        pl, ct = rec["plant"], rec["controller"]
        self.gain = float(pl["gain"])
        self.zeros = np.array([complex(r, i) for r, i in pl["zeros"]], dtype=complex)
        self.poles = np.array([complex(r, i) for r, i in pl["poles"]], dtype=complex)
        self.delay = float(pl["delay"])
        self.num_c = trim(ct["num"])
        self.den_c = trim(ct["den"])
        self.czeros = np.roots(self.num_c) if self.num_c.size > 1 else np.array([], dtype=complex)
        self.cpoles = np.roots(self.den_c) if self.den_c.size > 1 else np.array([], dtype=complex)
        self.rel_degree = (len(self.poles) - len(self.zeros)) + (len(self.den_c) - len(self.num_c))

    def plant(self, s, with_delay=True):
        """P(s), factor by factor (zero over pole) so that high orders stay in range."""
        s = np.asarray(s, dtype=complex)
        v = np.full(s.shape, complex(self.gain))
        nz, npl = len(self.zeros), len(self.poles)
        for i in range(max(nz, npl)):
            if i < nz and i < npl:
                v = v * ((s - self.zeros[i]) / (s - self.poles[i]))
            elif i < nz:
                v = v * (s - self.zeros[i])
            else:
                v = v / (s - self.poles[i])
        if with_delay and self.delay > 0:
            v = v * np.exp(-s * self.delay)
        return v

    def ctrl(self, s):
        return np.polyval(self.num_c, s) / np.polyval(self.den_c, s)

    def loop(self, s, with_delay=True):
        return self.plant(s, with_delay) * self.ctrl(s)

    def scales(self, req):
        """Every frequency scale of the loop: root moduli, corners, wh, wb, 1/delay."""
        sc = [abs(r) for r in np.concatenate([self.zeros, self.poles, self.czeros, self.cpoles]) if abs(r) > 0]
        for v in (req.get("wh"), req.get("wb")) if req else ():
            if v:
                sc.append(v)
        if self.delay > 0:
            sc.append(1 / self.delay)
        return sc or [1.0]

    def closed_loop_poles(self):
        num_p = self.gain * np.real(np.poly(self.zeros)) if len(self.zeros) else np.array([self.gain])
        den_p = np.real(np.poly(self.poles)) if len(self.poles) else np.array([1.0])
        char = np.polyadd(np.polymul(den_p, self.den_c), np.polymul(num_p, self.num_c))
        return np.roots(trim(char))


# ---------------------------------------------------------------- Nyquist count

def wrapped(d):
    return (d + np.pi) % (2 * np.pi) - np.pi


def arg_change(f_of_t, t0, t1, n0, what):
    """Change of arg f along t in [t0, t1]: n0 samples, every step refined until it turns by
    less than 0.2 rad; then every step halved once more, which must not change the total
    (a step that hid a whole turn would). Returns (change, min |f|)."""
    t = np.linspace(t0, t1, n0)
    f = f_of_t(t)
    for _ in range(60):
        if not np.all(np.isfinite(f)):
            raise ValueError("%s: 1 + L is not finite on the contour" % what)
        bad = np.flatnonzero(np.abs(wrapped(np.diff(np.angle(f)))) > 0.2)
        if bad.size == 0:
            break
        tm = 0.5 * (t[bad] + t[bad + 1])
        fm = f_of_t(tm)
        t = np.insert(t, bad + 1, tm)
        f = np.insert(f, bad + 1, fm)
    else:
        raise ValueError("%s: arg(1 + L) could not be resolved" % what)
    total = float(np.sum(wrapped(np.diff(np.angle(f)))))
    tm = 0.5 * (t[:-1] + t[1:])
    fm = f_of_t(tm)
    ff = np.empty(2 * len(f) - 1, dtype=complex)
    ff[0::2], ff[1::2] = f, fm
    total2 = float(np.sum(wrapped(np.diff(np.angle(ff)))))
    if abs(total2 - total) > 1e-6:
        raise ValueError("%s: arg(1 + L) changes on halving the steps (%.6g, %.6g)" % (what, total, total2))
    return total, float(np.min(np.abs(ff)))


def nyquist_unstable(lp, lo, hi):
    """Closed-loop poles with Re >= 0 by the Nyquist criterion on the upper half of the contour
    (the lower half mirrors it: L is real): from the real axis up the imaginary axis, around
    poles on it by small half circles to their right (so they count as stable open-loop poles),
    to j W, then the large arc down to W, on which 1 + L stays near 1. Clockwise, so the closed
    contour turns arg(1 + L) by -2 pi (Z - P): Z = P - (change on the upper half) / pi."""
    opoles = np.concatenate([lp.poles, lp.cpoles])
    scale = max([abs(p) for p in opoles] + [abs(z) for z in np.concatenate([lp.zeros, lp.czeros])] + [1e-300])
    on_axis = [p for p in opoles if abs(p.real) <= 1e-12 * max(abs(p), scale)]
    p_rhp = int(sum(1 for p in opoles if p.real > 1e-12 * max(abs(p), scale)))
    roots_all = np.concatenate([opoles, lp.zeros, lp.czeros])

    def radius(w0):
        # small against the distance to every other root (and to the origin); at the origin
        # also below the grid's lowest frequency, under any slow closed-loop pole it resolves
        d = [abs(r - 1j * w0) for r in roots_all if abs(r - 1j * w0) > 1e-12 * scale]
        if w0 > 0:
            d.append(w0)
        r = 1e-6 * min(d) if d else 1e-6
        return r if w0 > 0 else min(r, 1e-3 * lo)

    f = lambda s: 1.0 + lp.loop(s)
    total, fmin = 0.0, math.inf
    # indentation centres on the positive imaginary axis (one per distinct frequency)
    centres = sorted({round(abs(p.imag), 12) for p in on_axis if p.imag >= -1e-12 * scale and abs(p) > 0})
    at_origin = any(abs(p) == 0 or abs(p) <= 1e-12 * scale for p in on_axis)
    if at_origin:
        r0 = radius(0.0)
        d, m = arg_change(lambda th: f(r0 * np.exp(1j * th)), 0.0, math.pi / 2, 400, "quarter circle at 0")
        total, fmin, w_start = total + d, min(fmin, m), r0
    else:
        w_start = 0.0
    stops = []  # axis stretches [a, b] between indentations
    a = w_start
    for wc in centres:
        if wc <= w_start:
            continue
        rc = radius(wc)
        stops.append((a, wc - rc))
        stops.append(("arc", wc, rc))
        a = wc + rc
    stops.append((a, hi))
    for st in stops:
        if st[0] == "arc":
            _, wc, rc = st
            d, m = arg_change(lambda th: f(1j * wc + rc * np.exp(1j * th)), -math.pi / 2, math.pi / 2, 400,
                              "half circle at j%.6g" % wc)
        else:
            a, b = st
            if a == 0.0:  # from the origin itself: w = 0, then log-spaced from far below every scale
                f0 = f(np.array([0.0j]))[0]
                w1 = min(lo, b * 1e-3)
                d0 = float(wrapped(np.angle(f(np.array([1j * w1]))[0]) - np.angle(f0)))
                if abs(d0) > 0.2:
                    raise ValueError("arg(1 + L) turns by %.3g rad between 0 and %.3g rad/s" % (d0, w1))
                total, fmin = total + d0, min(fmin, abs(f0))
                a = w1
            n0 = max(200, int(PER_DECADE * math.log10(b / a)))
            d, m = arg_change(lambda u: f(1j * np.exp(u)), math.log(a), math.log(b), n0,
                              "axis %.6g..%.6g rad/s" % (a, b))
        total, fmin = total + d, min(fmin, m)
    # the large arc |s| = hi, Re s >= 0: |e^{-s delay}| <= 1 there, so |L| <= |L without delay|,
    # which must stay below 0.5: 1 + L then stays in a disc around 1 and turns by the principal
    # difference of its ends only
    th = np.linspace(0.0, math.pi / 2, 2001)
    big = float(np.max(np.abs(lp.loop(hi * np.exp(1j * th), with_delay=False))))
    if not big < 0.5:
        raise ValueError("|L| reaches %.3g on the closing arc |s| = %.3g" % (big, hi))
    total += float(wrapped(np.angle(f(np.array([hi + 0j]))[0]) - np.angle(f(np.array([1j * hi]))[0])))
    z = p_rhp - total / math.pi
    if abs(z - round(z)) > 0.05:
        raise ValueError("the Nyquist count is not an integer: Z = %.4f (P = %d)" % (z, p_rhp))
    return int(round(z)), p_rhp, fmin


def unstable_cancellation(lp):
    """A plant pole with Re >= 0 at a controller zero, or a controller pole with Re >= 0 at a plant
    zero: L hides it, yet the loop is unstable inside. Returns the root or None."""
    for ps, zs in ((lp.poles, lp.czeros), (lp.cpoles, lp.zeros)):
        for p in ps:
            if p.real < 0:
                continue
            for z in zs:
                if abs(p - z) <= 1e-6 * max(1.0, abs(p)):
                    return p
    return None


# ---------------------------------------------------------------- peaks

def refined_max(fn, w, v, keep=8):
    """The largest of fn over the grid w (values v), each of the `keep` highest local maxima
    refined by a bounded search on log w between its neighbours. Returns (value, w)."""
    i_best = int(np.argmax(v))
    best, wbest = float(v[i_best]), float(w[i_best])
    inner = np.flatnonzero((v[1:-1] >= v[:-2]) & (v[1:-1] >= v[2:])) + 1
    inner = inner[np.argsort(v[inner])[::-1][:keep]]
    for i in inner:
        res = scipy.optimize.minimize_scalar(lambda x: -fn(math.exp(x)), bounds=(math.log(w[i - 1]), math.log(w[i + 1])),
                                             method="bounded", options={"xatol": 1e-12})
        if -res.fun > best:
            best, wbest = float(-res.fun), math.exp(res.x)
    return best, wbest


class Peaks:
    def __init__(self, lp, req):
        sc = lp.scales(req)
        lo = min(sc) * 1e-4
        # below every scale and into the loop's low-frequency asymptote: |L| past 1e6 (an
        # integrating loop, |T| -> 1) or L settled at its value at 0. A slow closed-loop pole
        # (a controller zero near the origin) can put a crossover far below every corner.
        for _ in range(60):
            l1, l2 = lp.loop(np.array([1j * lo, 0.1j * lo]))
            if abs(l1) > 1e6 or abs(l1 - l2) <= 1e-9 * abs(l2):
                break
            lo *= 0.1
        self.lo = lo
        hi = max(sc) * 1e4
        for _ in range(40):  # past the crossover: until the loop is well below 1
            if abs(lp.loop(np.array([1j * hi]))[0]) < 1e-4:
                break
            hi *= 10
        self.hi = hi
        n = max(MIN_POINTS, int(PER_DECADE * math.log10(hi / self.lo)))
        self.w = np.geomspace(self.lo, hi, n)
        self.l = lp.loop(1j * self.w)
        self.c = lp.ctrl(1j * self.w)
        self.lp = lp

    def s_at(self, w):
        return float(abs(1 / (1 + self.lp.loop(np.array([1j * w]))[0])))

    def t_at(self, w):
        l = self.lp.loop(np.array([1j * w]))[0]
        return float(abs(l / (1 + l)))

    def cs_at(self, w):
        l = self.lp.loop(np.array([1j * w]))[0]
        return float(abs(self.lp.ctrl(np.array([1j * w]))[0] / (1 + l)))


# ---------------------------------------------------------------- per plant

def close_to(a, b, rel):
    return abs(a - b) <= rel * max(abs(a), abs(b))


def check_plant(rec, cat_plants, cat_families):
    """Returns (line, list of problems, whether the requirements were checked)."""
    pid = rec["id"]
    bad = []
    lp = Loop(rec)
    fnd = rec["found"]
    entry, kind = cat_plants.get(pid), "plant"
    if entry is None and "[" in pid:
        entry, kind = cat_families.get(pid.split("[", 1)[0]), "family"
    req = requirements(entry) if entry is not None else None

    # the requirements the tool echoes are the catalog's
    if req is not None:
        for key, jkey in (("ms", "ms_allowed"), ("mt", "mt_allowed")):
            if not close_to(req[key], rec[jkey], 1e-12):
                bad.append("%s %.9g in the JSON, %.9g in the catalog" % (jkey, rec[jkey], req[key]))
        if "sample_rate" in entry:
            bad.append("a controller is reported for a digital loop (certify is continuous only)")

    # the plant is the catalog's
    if entry is not None and kind == "plant":
        cat_delay = as_real(entry.get("delay", 0.0))
        if not (lp.delay == cat_delay or close_to(lp.delay, cat_delay, 1e-12)):
            bad.append("delay %.9g in the JSON, %.9g in the catalog" % (lp.delay, cat_delay))
        sc = lp.scales(None)
        ws = np.geomspace(min(sc) * 0.1, max(sc) * 10, 13)
        roots = np.concatenate([lp.zeros, lp.poles])
        ws = np.array([x for x in ws if all(abs(1j * x - r) > 1e-2 * x for r in roots)])
        pc = catalog_response(entry, ws)
        if pc is not None and ws.size:
            pj = lp.plant(1j * ws, with_delay=False)
            err = np.abs(pj - pc) / np.maximum(np.abs(pc), 1e-300)
            i = int(np.argmax(err))
            if not err[i] <= PLANT_RTOL:
                bad.append("the JSON plant differs from the catalog's: P(j%.4g) %s against %s" % (ws[i], pj[i], pc[i]))

    # stability
    stab = ""
    stable_here = False
    if lp.rel_degree < 1:
        bad.append("the loop is not strictly proper (relative degree %d)" % lp.rel_degree)
        return "%s: %s" % (pid, "; ".join(bad)), bad, False
    hidden = unstable_cancellation(lp)
    if hidden is not None:
        bad.append("an unstable root %s cancels between plant and controller" % hidden)
    pk = Peaks(lp, req)
    try:
        z, p_rhp, _ = nyquist_unstable(lp, pk.lo, pk.hi)
    except ValueError as e:
        z, p_rhp = None, None
        bad.append("Nyquist count undecided: %s" % e)
    if lp.delay > 0:
        stab = "Nyquist Z=%s (P=%s)" % (z, p_rhp)
        stable_here = z == 0 and hidden is None
        if z is not None and z != 0:
            bad.append("closed loop unstable by the Nyquist count: %d closed-loop poles with Re >= 0 "
                       "(%d open-loop RHP poles); the tool reports a stabilizing controller" % (z, p_rhp))
    else:
        cl = lp.closed_loop_poles()
        maxre = float(np.max(cl.real))
        stab = "roots max Re %.4g, Nyquist Z=%s (P=%s)" % (maxre, z, p_rhp)
        stable_here = maxre < 0
        if not maxre < 0:
            bad.append("closed loop unstable: a closed-loop pole at %s; the tool reports a stabilizing controller"
                       % cl[int(np.argmax(cl.real))])
        elif z is not None and z != 0:
            bad.append("checker inconsistency: the Nyquist count gives Z = %d, the roots none" % z)
        if fnd.get("roots_checked"):
            tool = fnd.get("decay")
            tol = 1e-8 * max(1.0, float(np.max(np.abs(cl)))) + 1e-4 * abs(maxre)
            if tool is None or abs(tool - (-maxre)) > tol:
                bad.append("decay %s in the JSON, -max Re of the closed-loop poles %.9g" % (tool, -maxre))
        if fnd.get("decay") is not None and fnd.get("decay_min") is not None and not fnd["decay"] >= fnd["decay_min"]:
            bad.append("decay %.6g below decay_min %.6g" % (fnd["decay"], fnd["decay_min"]))

    # peaks, |S| -> 1 at high frequency (strictly proper loop): the supremum is at least 1
    sv = 1 / np.abs(1 + pk.l)
    tv = np.abs(pk.l / (1 + pk.l))
    cv = np.abs(pk.c / (1 + pk.l))
    ms, w_ms = refined_max(pk.s_at, pk.w, sv)
    ms = max(ms, 1.0)
    mt, w_mt = refined_max(pk.t_at, pk.w, tv)
    eff, _ = refined_max(pk.cs_at, pk.w, cv)
    for name, tool, mine in (("ms", fnd.get("ms"), ms), ("mt", fnd.get("mt"), mt), ("effort", fnd.get("effort"), eff)):
        if tool is None or not (tool >= mine * (1 - PEAK_UNDER) and tool <= mine * (1 + PEAK_OVER)):
            bad.append("%s %s in the JSON, %.9g on the grid here" % (name, tool, mine))
    for name, wkey, fn in (("ms", "w_ms", pk.s_at), ("mt", "w_mt", pk.t_at)):
        wt, tool = fnd.get(wkey), fnd.get(name)
        if wt is not None and tool is not None:
            at = fn(wt)
            if not close_to(at, tool, 1e-6):
                bad.append("%s %.9g in the JSON, but %.9g at its %s %.9g rad/s" % (name, tool, at, wkey, wt))

    # the floors law
    tolf = 1 - FLOOR_TOL
    for name, mine, fkey in (("Ms", ms, "ms_interpolation_floor"), ("Mt", mt, "mt_interpolation_floor"),
                             ("|C S|", eff, "effort_floor")):
        fl = rec.get(fkey)
        if fl is not None and not mine >= fl * tolf:
            bad.append("%s %.9g below the %s %.9g" % (name, mine, fkey, fl))

    # requirements
    line_req = ""
    req_checked = False
    rr = bp = None
    if req is not None:
        k1 = 1 + req["k"]
        if req["wh"]:
            wh = req["wh"]
            sel = pk.w >= wh
            wr = np.concatenate([[wh], pk.w[sel]])
            lr = np.abs(np.concatenate([lp.loop(np.array([1j * wh])), pk.l[sel]]))
            denom = req["delta"] * (wh / wr) ** k1
            with np.errstate(divide="ignore"):
                rv = lr / denom
            rr, _ = refined_max(lambda x: abs(lp.loop(np.array([1j * x]))[0]) / (req["delta"] * (wh / x) ** k1)
                                if x >= wh else 0.0, wr, rv)
            if lp.rel_degree == k1:  # the ratio's limit as w -> infinity
                lead = abs(lp.gain * lp.num_c[0] / lp.den_c[0])
                rr = max(rr, lead / (req["delta"] * wh ** k1) if req["delta"] > 0 else math.inf)
        if req["wb"]:
            wb = req["wb"]
            sel = pk.w <= wb
            wband = np.concatenate([pk.w[sel], [wb]])
            sband = np.concatenate([sv[sel], [pk.s_at(wb)]])
            bp, _ = refined_max(lambda x: pk.s_at(x) if x <= wb else 0.0, wband, sband)
        why = []
        if not stable_here:
            why.append("the closed loop is not stable here")
        if ms > req["ms"] * (1 + REQ_SLACK):
            why.append("max|S| %.6g above the allowed %.6g" % (ms, req["ms"]))
        if mt > req["mt"] * (1 + REQ_SLACK):
            why.append("max|T| %.6g above the allowed %.6g" % (mt, req["mt"]))
        rolloff_ok = True
        if req["wh"]:
            if lp.rel_degree < k1 - 1e-12:
                why.append("the loop falls as w^-%d, slower than the roll-off bound's w^-%.4g" % (lp.rel_degree, k1))
                rolloff_ok = False
            if not rr <= 1 + REQ_SLACK:
                why.append("|L| exceeds delta (wh/w)^(1+k) past wh %.6g by a factor %.6g" % (req["wh"], rr))
                rolloff_ok = False
        band_ok = True
        if req["wb"] and not bp <= req["eps"] * (1 + REQ_SLACK):
            why.append("|S| reaches %.6g on [0, %.6g] rad/s, above %.6g" % (bp, req["wb"], req["eps"]))
            band_ok = False
        if req["effort"] is not None and eff > req["effort"] * (1 + REQ_SLACK):
            why.append("max|C S| %.6g above the allowed %.6g" % (eff, req["effort"]))
        meets_all = not why
        if rec["outcome"] == "demonstrated":
            req_checked = True
            if not fnd.get("meets"):
                bad.append("demonstrated, yet found.meets is false")
            for w_ in why:
                bad.append("demonstrated, but %s" % w_)
            line_req = "requirements hold" if meets_all else "requirements FAIL"
        else:
            line_req = "requirements %s here" % ("hold" if meets_all else "not all met")
        # the tool's own roll-off and band values
        for name, tool, mine in (("rolloff_ratio", fnd.get("rolloff_ratio"), rr), ("band_peak", fnd.get("band_peak"), bp)):
            if mine is None:
                if tool is not None:
                    bad.append("%s %.6g in the JSON without that requirement in the catalog" % (name, tool))
            elif tool is None or not close_to(tool, mine, PEAK_OVER):
                bad.append("%s %s in the JSON, %.9g here" % (name, tool, mine))
        # the overall floors hold for a loop meeting the roll-off and band they assume
        if rolloff_ok and band_ok:
            for name, mine, fkey in (("Ms", ms, "ms_floor"), ("Mt", mt, "mt_floor")):
                fl = rec.get(fkey)
                if fl is not None and not mine >= fl * tolf:
                    bad.append("%s %.9g below the %s %.9g of a loop meeting the roll-off and band" % (name, mine, fkey, fl))
    elif rec["outcome"] == "demonstrated":
        line_req = "requirements not read (plant not in a YAML catalog)"

    line = "%-28s %-13s %-9s %s; ms %.6g/%.6g mt %.6g/%.6g (tool/here); %s" % (
        pid, rec["outcome"], rec["controller"]["structure"], stab, fnd.get("ms") or math.nan, ms,
        fnd.get("mt") or math.nan, mt, line_req)
    return line, bad, req_checked


def main():
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("--min-controllers", type=int, default=1,
                    help="fail when fewer plants than this have a controller")
    ap.add_argument("--min-demonstrated", type=int, default=0,
                    help="fail when fewer demonstrated plants than this had their requirements checked")
    ap.add_argument("certify_json")
    ap.add_argument("catalogs", nargs="+")
    a = ap.parse_args()
    with open(a.certify_json, encoding="utf-8") as f:
        doc = json.load(f)
    cat_plants, cat_families = read_catalogs(a.catalogs)
    checked = demonstrated = req_checked = 0
    failed = []
    for rec in doc["plants"]:
        if rec.get("outcome") == "demonstrated" and rec.get("controller") is None:
            failed.append(rec["id"])
            print("FAIL %s: demonstrated without a controller" % rec["id"])
            continue
        if rec.get("controller") is None:
            continue
        checked += 1
        demonstrated += rec["outcome"] == "demonstrated"
        try:
            line, bad, rc = check_plant(rec, cat_plants, cat_families)
        except Exception as e:  # a plant the checker cannot handle is a failure, never a pass
            line, bad, rc = "%s: checker error" % rec["id"], ["checker error: %r" % e], False
        req_checked += rc
        if bad:
            failed.append(rec["id"])
            print("FAIL " + line)
            for b in bad:
                print("     %s: %s" % (rec["id"], b))
        else:
            print("ok   " + line)
    print("certify_check: %d plants with a controller checked (%d demonstrated, %d with every requirement "
          "checked), %d disagree" % (checked, demonstrated, req_checked, len(failed)))
    if checked < a.min_controllers:
        print("FAIL: only %d plants have a controller, at least %d expected" % (checked, a.min_controllers))
        return 1
    if req_checked < a.min_demonstrated:
        print("FAIL: only %d demonstrated plants had their requirements checked, at least %d expected"
              % (req_checked, a.min_demonstrated))
        return 1
    if failed:
        print("FAIL: %s" % ", ".join(failed))
        return 1
    return 0


if __name__ == "__main__":
    sys.exit(main())
