"""Independent oracle for the floors of `plantsieve survey --json`.

Checks every value under `floors` (bode_area, ms, mt, ms_interpolation,
mt_interpolation, ms_band, ms_poisson, mt_poisson, effort, limiting, window)
and the echoed requirements, recomputed here with numpy/scipy from the
formulas in docs/method.md "Floors" and the limits reference sheet, not from plantsieve's
C code. The plants are read from the catalog itself (PyYAML), roots found with
numpy.roots / scipy eigenvalues; without PyYAML the inputs (poles, zeros,
gain, delay, requirements; never the floors) are taken from the tool's JSON.

Usage: floors_oracle.py CATALOG SURVEY_JSON
Prints one line per mismatch and a summary line; exit 1 on any mismatch.
"""
import cmath
import json
import math
import sys

import numpy as np
import scipy.integrate
import scipy.linalg

RTOL = 1e-6          # relative tolerance of the comparison
ATOL = 1e-12         # values this small on both sides count as equal (exact zeros)
NA = None            # "not applicable" (JSON null)
REQ_DEFAULTS = {"peak_s_allowed": 2.0, "peak_t_allowed": 1.25, "band_edge": NA,
                "band_attenuation": NA, "rolloff_start": NA, "rolloff_gain": 0.5,
                "rolloff_slope": 1.0, "effort_allowed": NA}
FLOOR_KEYS = ("bode_area", "ms", "mt", "ms_interpolation", "mt_interpolation", "ms_band",
              "ms_poisson", "mt_poisson", "effort")


# ---------------------------------------------------------------- catalog input

def parse_complex_list(items):
    """Real numbers and complex strings: "a+bj" (listed with its conjugate) or the pair "a+-bj"."""
    if isinstance(items, str):
        items = items.split()
    out = []
    for v in items:
        if isinstance(v, (int, float)):
            out.append(complex(v))
            continue
        s = v.replace(" ", "")
        if "+-" in s:
            re_s, im_s = s.split("+-")
            im = float(im_s.rstrip("j"))
            out += [complex(float(re_s), im), complex(float(re_s), -im)]
        else:
            out.append(complex(s))
    return out


def parse_frequency(v):
    """rad/s as a number, "X rad/s" or "X Hz"."""
    if isinstance(v, (int, float)):
        return float(v)
    num, _, unit = v.strip().partition(" ")
    return float(num) * (2 * math.pi if unit.strip() == "Hz" else 1.0)


def parse_ratio(v):
    """A ratio as a number, or a level "X dB" = 10^(X/20)."""
    if isinstance(v, (int, float)):
        return float(v)
    num, _, unit = v.strip().partition(" ")
    return 10 ** (float(num) / 20) if unit.strip() == "dB" else float(num)


def strip_leading_zeros(c):
    c = [float(x) for x in c]
    while len(c) > 1 and c[0] == 0.0:
        c.pop(0)
    return c


def zpk_polynomial(num, den):
    num, den = strip_leading_zeros(num), strip_leading_zeros(den)
    zeros = list(np.roots(num)) if len(num) > 1 else []
    poles = list(np.roots(den)) if len(den) > 1 else []
    return zeros, poles, num[0] / den[0]


def zpk_state_space(a, b, c, d):
    """Poles: eig(a). Zeros: finite generalized eigenvalues of the pencil
    [[a, b], [c, d]] - s [[I, 0], [0, 0]]. Gain: first non-zero Markov parameter."""
    a = np.array(a, float)
    b = np.array(b, float).reshape(-1, 1)
    c = np.array(c, float).reshape(1, -1)
    n = a.shape[0]
    poles = list(scipy.linalg.eigvals(a))
    m = np.block([[a, b], [c, np.array([[d]])]])
    e = np.zeros((n + 1, n + 1))
    e[:n, :n] = np.eye(n)
    ev = scipy.linalg.eigvals(m, e)
    zeros = [z for z in ev if np.isfinite(z) and abs(z) < 1e12]
    markov = [float(d)] + [float(c @ np.linalg.matrix_power(a, k) @ b) for k in range(n)]
    scale = max(abs(x) for x in markov) or 1.0
    gain = next(x for x in markov if abs(x) > 1e-12 * scale)
    return zeros, poles, gain


def requirements_from(entry):
    req = dict(REQ_DEFAULTS)
    for key in req:
        if key in entry and entry[key] is not None:
            v = entry[key]
            if key in ("band_edge", "rolloff_start"):
                req[key] = parse_frequency(v)
            elif key == "band_attenuation":
                req[key] = parse_ratio(v)
            else:
                req[key] = float(v)
    return req


def plant_from_entry(entry):
    if "numerator" in entry:
        zeros, poles, gain = zpk_polynomial(entry["numerator"], entry["denominator"])
    elif "poles" in entry:
        zeros = parse_complex_list(entry.get("zeros") or [])
        poles = parse_complex_list(entry["poles"])
        gain = float(entry["gain"])
    else:
        zeros, poles, gain = zpk_state_space(entry["a"], entry["b"], entry["c"], entry.get("d", 0.0))
    return {"id": entry["id"], "zeros": zeros, "poles": poles, "gain": gain,
            "delay": float(entry.get("delay", 0.0)), "req": requirements_from(entry)}


def plants_from_catalog(path):
    import yaml  # only when available; see plants_from_json
    with open(path) as f:
        doc = yaml.safe_load(f)
    defaults = doc.get("defaults") or {}
    return [plant_from_entry({**defaults, **e}) for e in doc["plants"]]


def plants_from_json(doc):
    """Fallback without PyYAML: the tool's inputs (roots with multiplicity,
    gain, delay, requirements), never its floors."""
    out = []
    for p in doc["plants"]:
        req = dict(REQ_DEFAULTS)
        req.update({k: v for k, v in p["requirements"].items() if k in req})
        out.append({"id": p["id"], "zeros": [complex(*z) for z in p["zeros"]],
                    "poles": [complex(*q) for q in p["poles"]], "gain": p["gain"],
                    "delay": p["delay"], "req": req})
    return out


# ---------------------------------------------------------------- root classes

def is_rhp(r):
    return r.real > 1e-9 * max(1.0, abs(r))


def is_axis(r):
    return abs(r.real) <= 1e-9 * max(1.0, abs(r))


def is_complex(r):
    return abs(r.imag) > 1e-9 * max(1.0, abs(r))


def upper_half(roots):
    """One representative per real root or complex pair."""
    return [r for r in roots if not is_complex(r) or r.imag > 0]


def split_rhp(plant):
    p = [r for r in plant["poles"] if is_rhp(r)]
    z = [r for r in plant["zeros"] if is_rhp(r)]
    return np.array(p, complex), np.array(z, complex)


# ---------------------------------------------------------------- the floors

def bode_area(p):
    """F = pi sum Re p (Bode 1945; Freudenberg & Looze, IEEE TAC 30(6), 1985)."""
    return math.pi * float(np.sum(p.real))


def blaschke_inv(s, roots):
    """|B(s)^-1| = prod |s + conj r| / |s - r| over the given RHP roots."""
    return float(np.prod([abs(s + np.conj(r)) / abs(s - r) for r in roots])) if len(roots) else 1.0


def ms_single(z, p):
    """max_j prod_i |z_j + conj p_i|/|z_j - p_i| (S&P 2nd ed. 2005, ch. 5)."""
    return max([blaschke_inv(zj, p) for zj in z], default=1.0)


def mt_single(z, p, theta):
    """max_i e^{Re p_i theta} prod_j |conj z_j + p_i|/|z_j - p_i| (S&P 2nd ed. 2005, ch. 5)."""
    return max([math.exp(pi.real * theta) * blaschke_inv(pi, z) for pi in p], default=1.0)


def pick_gamma(s, w):
    """Nevanlinna-Pick minimum norm: sqrt(lambda_max(B, A)),
    A_kl = 1/(conj s_k + s_l), B_kl = conj(w_k) w_l A_kl (DFT 1992, "Model Matching")."""
    if len(s) == 0:
        return None
    a = 1.0 / (np.conj(s)[:, None] + s[None, :])
    b = np.conj(w)[:, None] * w[None, :] * a
    lam = scipy.linalg.eigh(b, a, eigvals_only=True)
    return math.sqrt(max(lam[-1], 0.0))


def pick_values_t(z, p, theta):
    """w_i = e^{p_i theta} prod_j (p_i + conj z_j)/(p_i - z_j)."""
    return np.array([cmath.exp(pi * theta) * np.prod([(pi + np.conj(zj)) / (pi - zj) for zj in z])
                     for pi in p], complex)


def inv_sqrt_hermitian(q):
    root = np.asarray(scipy.linalg.sqrtm(q), dtype=complex)  # sqrtm may return complex256
    return np.linalg.inv(root)


def chen_floor(z, p):
    """sqrt(1 + sigma_max^2(Qz^-1/2 Qzp Qp^-1/2)) (J. Chen, IEEE TAC 45(6), 2000)."""
    if len(z) == 0 or len(p) == 0:
        return 1.0
    qz = 1.0 / (z[:, None] + np.conj(z)[None, :])
    qp = 1.0 / (np.conj(p)[:, None] + p[None, :])
    qzp = 1.0 / (z[:, None] - p[None, :])
    m = inv_sqrt_hermitian(qz) @ qzp @ inv_sqrt_hermitian(qp)
    return math.sqrt(1.0 + scipy.linalg.svdvals(m)[0] ** 2)


def interpolation_floors(plant, z, p, theta):
    """(floor on ||S||, floor on ||T||). With an RHP pole and an RHP zero or a
    delay, the joint tight floor of both: Chen without delay, Pick with delay.
    Otherwise each is 1 where S or T is forced to 1 and 0 where nothing forces
    it (S&P 2nd ed. 2005, ch. 5): T(p) = 1 at an RHP pole and at a pole on the
    imaginary axis; S = 1 at an RHP or axis zero, S -> 1 at infinity for a
    strictly proper or delayed plant. A stable plant has C = 0 (T = 0); a
    biproper delay-free plant with LHP zeros only has ||S|| -> 0 under a high
    gain (same law as the tool's; this comment states it, the code is apart)."""
    if len(p) and (theta > 0 or len(z)):
        g = pick_gamma(p, pick_values_t(z, p, theta)) if theta > 0 else chen_floor(z, p)
        return g, g
    rel_degree = len(plant["poles"]) - len(plant["zeros"])
    s_one = len(z) or rel_degree >= 1 or theta > 0 or any(is_axis(r) for r in plant["zeros"])
    t_one = len(p) or any(is_axis(r) for r in plant["poles"])
    return (1.0 if s_one else 0.0), (1.0 if t_one else 0.0)


def rolloff_tail(wh, delta, k):
    """I = integral_{wh}^inf -ln(1 - delta (wh/w)^(1+k)) dw by quadrature, not the series.
    With t = (wh/w)^(1+k): I = wh/(1+k) integral_0^1 g(t) t^(-1/(1+k)) dt,
    g(t) = -ln(1 - delta t)/t smooth; the endpoint singularity goes to QUADPACK's
    algebraic weight (QAWS), which stays accurate for small k and delta near 1."""
    if delta == 0.0:
        return 0.0
    g = lambda t: -math.log1p(-delta * t) / t if t > 0 else delta
    val, _ = scipy.integrate.quad(g, 0.0, 1.0, weight="alg", wvar=(-1.0 / (1 + k), 0.0),
                                  epsabs=0.0, epsrel=1e-13, limit=200)
    return wh / (1 + k) * val


def ms_band(F, req):
    """exp([F + wb ln(1/eps) - I]/(wh - wb)) (DFT 1992, "Design Constraints";
    delta = 0: Stein 2003). No band: wb = 0."""
    wh = req["rolloff_start"]
    if wh is None:
        return NA
    wb, eps = req["band_edge"], req["band_attenuation"]
    band = 0.0 if wb is None or eps is None else wb * math.log(1.0 / eps)
    wb = 0.0 if wb is None or eps is None else wb
    tail = rolloff_tail(wh, req["rolloff_gain"], req["rolloff_slope"])
    return math.exp((F + band - tail) / (wh - wb))


def weighted_length(r, w):
    """Theta = atan((w - y)/x) + atan((w + y)/x) for r = x + jy."""
    return math.atan((w - r.imag) / r.real) + math.atan((w + r.imag) / r.real)


def ms_poisson(z, p, req):
    """max over RHP zeros (one per pair) of (1/eps)^{Th/(pi-Th)} |B_p(z)^-1|^{pi/(pi-Th)}
    (Freudenberg & Looze 1985)."""
    wb, eps = req["band_edge"], req["band_attenuation"]
    if wb is None or eps is None:
        return NA
    vals = []
    for zj in upper_half(z):
        th = weighted_length(zj, wb)
        vals.append((1 / eps) ** (th / (math.pi - th)) * blaschke_inv(zj, p) ** (math.pi / (math.pi - th)))
    return max(vals, default=0.0)  # no RHP zero: no Poisson constraint (0, no floor)


def mt_poisson(z, p, theta, req):
    """max over RHP poles (one per pair) of (1/eps_T)^{(pi-Th)/Th} (|B_z(p)^-1| e^{x theta})^{pi/Th},
    eps_T = delta/(1 - delta) beyond wh (Freudenberg & Looze 1985)."""
    wh, delta = req["rolloff_start"], req["rolloff_gain"]
    if wh is None or delta == 0.0:
        return NA
    eps_t = delta / (1 - delta)
    vals = []
    for pi in upper_half(p):
        th = weighted_length(pi, wh)
        vals.append((1 / eps_t) ** ((math.pi - th) / th)
                    * (blaschke_inv(pi, z) * math.exp(pi.real * theta)) ** (math.pi / th))
    return max(vals, default=0.0)  # no RHP pole: no Poisson constraint (0, no floor)


def stable_mirror_at(plant, s):
    """G_s(s) = P(s) prod_i (s - p_i)/(s + conj p_i): each RHP pole mirrored, no delay."""
    g = plant["gain"] * np.prod([s - zj for zj in plant["zeros"]])
    for q in plant["poles"]:
        g /= (s + np.conj(q)) if is_rhp(q) else (s - q)
    return g


def effort_floor(plant, p):
    """Pick value with points p_i, values e^{p_i theta}/G_s(p_i) (S&P 2nd ed. ch. 5; Glover 1986)."""
    if len(p) == 0:
        return 0.0
    w = np.array([cmath.exp(pi * plant["delay"]) / stable_mirror_at(plant, pi) for pi in p], complex)
    return pick_gamma(p, w)


def window(z, p, theta, req):
    """Rules of thumb (S&P ch. 5): above 2p (|p| complex), below z/2 (|z| complex),
    1/theta and w_h. Upper edge None = unbounded."""
    lo = max([abs(r) if is_complex(r) else 2 * r.real for r in p], default=0.0)
    caps = [abs(r) if is_complex(r) else r.real / 2 for r in z]
    if theta > 0:
        caps.append(1.0 / theta)
    if req["rolloff_start"] is not None:
        caps.append(req["rolloff_start"])
    hi = min(caps) if caps else None
    return {"crossover_min": lo, "crossover_max": hi, "open": hi is None or lo < hi}


def overall(f, req):
    """ms, mt with ||S|| >= ||T|| - 1 and the converse; the names that may set ms.
    A roll-off requirement makes the loop strictly proper: S -> 1, so ||S|| >= 1."""
    s_direct = {"interpolation": f["ms_interpolation"], "band": f["ms_band"], "poisson": f["ms_poisson"]}
    t_direct = [f["mt_interpolation"], f["mt_poisson"]]
    s_vals = [v for v in s_direct.values() if v is not None]
    t_vals = [v for v in t_direct if v is not None]
    s_direct["complementary"] = max(t_vals) - 1
    rolloff = [1.0] if req["rolloff_start"] is not None else []
    ms = max([v for v in s_direct.values() if v is not None] + rolloff)
    mt = max(t_vals + [v - 1 for v in s_vals])
    names = {k for k, v in s_direct.items() if v is not None and v > 1 + 1e-12 and close(v, ms)}
    return ms, mt, names or {"none"}


def oracle_floors(plant):
    p, z = split_rhp(plant)
    theta, req = plant["delay"], plant["req"]
    f = {"bode_area": bode_area(p)}
    f["ms_interpolation"], f["mt_interpolation"] = interpolation_floors(plant, z, p, theta)
    f["ms_band"] = ms_band(f["bode_area"], req)
    f["ms_poisson"] = ms_poisson(z, p, req)
    f["mt_poisson"] = mt_poisson(z, p, theta, req)
    f["effort"] = effort_floor(plant, p)
    f["ms"], f["mt"], f["limiting"] = overall(f, req)
    f["window"] = window(z, p, theta, req)
    self_check(plant["id"], z, p, theta, f)
    return f


def self_check(pid, z, p, theta, f):
    """Internal consistency of the oracle: each floor >= its single-point
    products (where there is a point), and without delay Chen equals Pick at
    the poles with values 1/B_z(p)."""
    if len(z) and f["ms_interpolation"] < ms_single(z, p) * (1 - 1e-9):
        raise AssertionError("%s: Ms floor %r below a single-point product" % (pid, f["ms_interpolation"]))
    if len(p) and f["mt_interpolation"] < mt_single(z, p, theta) * (1 - 1e-9):
        raise AssertionError("%s: Mt floor %r below a single-point product" % (pid, f["mt_interpolation"]))
    j = f["mt_interpolation"]
    if theta == 0 and len(p):
        g = pick_gamma(p, pick_values_t(z, p, 0.0))
        if not close(g, j):
            raise AssertionError("%s: Chen %r != Pick %r" % (pid, j, g))


# ---------------------------------------------------------------- comparison

def rel_diff(a, b):
    if max(abs(a), abs(b)) < ATOL:
        return 0.0
    return abs(a - b) / max(abs(a), abs(b))


def close(a, b):
    return rel_diff(a, b) <= RTOL


class Compare:
    def __init__(self):
        self.values = 0
        self.worst = 0.0
        self.mismatches = 0

    def bad(self, pid, key, tool, want):
        self.mismatches += 1
        print("MISMATCH %s %s: tool %r, oracle %r" % (pid, key, tool, want))

    def number(self, pid, key, tool, want):
        self.values += 1
        if tool is None or want is None:
            if tool is not want:
                self.bad(pid, key, tool, want)
            return
        d = rel_diff(tool, want)
        self.worst = max(self.worst, d)
        if d > RTOL:
            self.bad(pid, key, tool, "%r (relative difference %.3g)" % (want, d))

    def exact(self, pid, key, tool, allowed):
        self.values += 1
        if tool not in allowed:
            self.bad(pid, key, tool, sorted(allowed))


def compare_plant(cmp, pid, tool, want, req):
    tf = tool["floors"]
    for key in FLOOR_KEYS:
        cmp.number(pid, key, tf[key], want[key])
    cmp.exact(pid, "limiting", tf["limiting"], want["limiting"])
    for key in ("crossover_min", "crossover_max"):
        cmp.number(pid, "window." + key, tf["window"][key], want["window"][key])
    cmp.exact(pid, "window.open", tf["window"]["open"], {want["window"]["open"]})
    for key, v in req.items():
        cmp.number(pid, "requirements." + key, tool["requirements"][key], v)


def load_plants(catalog, doc):
    try:
        return plants_from_catalog(catalog), "catalog (PyYAML)"
    except ImportError:
        return plants_from_json(doc), "tool JSON inputs (no PyYAML)"


def main(argv):
    if len(argv) != 3:
        sys.stderr.write("usage: floors_oracle.py CATALOG SURVEY_JSON\n")
        return 2
    with open(argv[2]) as f:
        doc = json.load(f)
    plants, source = load_plants(argv[1], doc)
    tools = {p["id"]: p for p in doc["plants"]}
    cmp = Compare()
    for plant in plants:
        tool = tools.get(plant["id"])
        if tool is None or tool.get("error") or not tool.get("floors"):
            cmp.bad(plant["id"], "entry", tool and tool.get("error"), "analysed plant with floors")
            continue
        compare_plant(cmp, plant["id"], tool, oracle_floors(plant), plant["req"])
    if len(tools) != len(plants):
        cmp.bad("-", "plant count", len(tools), len(plants))
    print("oracle: %d plants, %d values compared, worst relative difference %.3g (inputs from %s)"
          % (len(plants), cmp.values, cmp.worst, source))
    return 1 if cmp.mismatches else 0


if __name__ == "__main__":
    sys.exit(main(sys.argv))
