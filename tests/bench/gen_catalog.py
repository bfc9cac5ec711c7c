#!/usr/bin/env python3
"""Generate a synthetic plant catalog for the plantsieve benchmark.

Usage: gen_catalog.py N OUT.{yaml,yml,csv} [--seed S] [--csv ALSO.csv]

N plants with ids b0 .. b<N-1>, model orders 2..8, a mix meant to look like a
real screening batch:
  * about 30 % with one or two real RHP poles (0.4 .. 12 rad/s), the rest stable
    (some with an integrator at s = 0);
  * about 15 % with one real RHP zero (1.5 .. 80 rad/s, kept >= 30 % away
    from every RHP pole);
  * lightly to well damped complex pairs (written "re+-imj"), real LHP roots;
  * about 30 % with a delay (1 .. 40 ms), about 20 % with a disturbance band
    (band_edge 0.3 .. 4 rad/s, band_attenuation -20 dB or 0.2), about 10 %
    with their own rolloff_start ("25 Hz", 100 or 150 rad/s);
  * forms: about 65 % factored (zeros/poles/gain), 25 % polynomial
    (numerator/denominator, descending powers), 10 % state space (a/b/c/d:
    a cascade of first- and second-order sections, see realise(); orders
    2..6, LHP poles up to 60 rad/s, relative degree 1..3; --ss-stress makes
    them like the rest: orders 2..8, poles to 300 rad/s, relative degree to 8).
The YAML catalog carries `defaults` with rolloff_start 60 rad/s (so the
band-forced and Poisson-T floors apply to every plant) and delay 0; the CSV
has no defaults, so those values are written into every row.

Deterministic for a seed, and prefix-stable: the first M plants of an
N-plant catalog (M <= N, same seed) are the M-plant catalog. Uses only the
standard library, numpy and scipy (for the state-space realisations).
"""
import argparse
import math
import random
import sys

import numpy as np
import scipy.linalg

DEFAULT_ROLLOFF = 60.0


def logu(rng, lo, hi):
    return math.exp(rng.uniform(math.log(lo), math.log(hi)))


def fnum(x, digits=6):
    """A decimal that the catalog readers (and PyYAML via float()) accept."""
    s = "%.*g" % (digits, x)
    return "0" if s in ("-0", "0") else s


def fpair(c, digits=6):
    return "%s+-%sj" % (fnum(c.real, digits), fnum(abs(c.imag), digits))


# ---------------------------------------------------------------- plant spec

def gen_roots_lhp(rng, count, lo, hi, allow_complex=True):
    """`count` LHP roots (complex pairs count 2), as a list of real floats and
    complex numbers with Im > 0 (one representative per pair)."""
    out = []
    left = count
    while left > 0:
        if allow_complex and left >= 2 and rng.random() < 0.45:
            wn = logu(rng, lo, hi)
            zeta = rng.uniform(0.03, 0.7)
            out.append(complex(-zeta * wn, wn * math.sqrt(1 - zeta * zeta)))
            left -= 2
        else:
            out.append(-logu(rng, lo, hi))
            left -= 1
    return out


def gen_plant(rng, i, ss_stress=False):
    u = rng.random()
    form = "factored" if u < 0.65 else "polynomial" if u < 0.90 else "ss"
    ss_tame = form == "ss" and not ss_stress
    n = rng.randint(2, 6 if ss_tame else 8)
    lhp_hi = 100.0 if form == "polynomial" else 60.0 if ss_tame else 300.0

    poles = []  # reals and complex (Im > 0) representatives
    n_rhp = 0
    if rng.random() < 0.30:
        n_rhp = 1 if rng.random() < 0.7 else 2
        p1 = logu(rng, 0.4, 12.0)
        poles.append(p1)
        if n_rhp == 2:
            p2 = p1 * rng.uniform(1.6, 3.0) if rng.random() < 0.5 else p1 / rng.uniform(1.6, 3.0)
            poles.append(p2)
    rest = n - n_rhp
    if rest >= 1 and rng.random() < 0.12:
        poles.append(0.0)
        rest -= 1
    poles += gen_roots_lhp(rng, rest, 0.5, lhp_hi)

    # zeros: strictly proper; at most min(3, n - 1), about half the plants
    # none; state space (tame): relative degree 1..3
    zeros = []
    if ss_tame:
        nz = rng.randint(max(1, n - 3), n - 1)
        rhp_zero = rng.random() < 0.15
    else:
        nz = 0 if rng.random() < 0.5 else rng.randint(1, min(3, n - 1))
        rhp_zero = nz > 0 and rng.random() < 0.30  # 0.5 * 0.3 = 15 % with an RHP zero
    if rhp_zero:
        rhp_p = [p for p in poles if isinstance(p, float) and p > 0]
        while True:
            z = logu(rng, 1.5, 80.0)
            if all(abs(z - p) > 0.3 * p for p in rhp_p):
                break
        zeros.append(z)
        nz -= 1
    zeros += gen_roots_lhp(rng, nz, 0.5, lhp_hi)

    gain = logu(rng, 0.1, 1e4) * (1 if rng.random() < 0.8 else -1)
    plant = {"id": "b%d" % i, "form": form, "poles": poles, "zeros": zeros, "gain": gain}
    if rng.random() < 0.30:
        plant["delay"] = logu(rng, 0.001, 0.04)
    if rng.random() < 0.20:
        plant["band_edge"] = logu(rng, 0.3, 4.0)
        plant["band_attenuation"] = "-20 dB" if rng.random() < 0.5 else "0.2"
    if rng.random() < 0.10:
        plant["rolloff_start"] = rng.choice(["25 Hz", "100", "150"])
    return plant


def expand(roots):
    """All roots as complex numbers (pairs expanded)."""
    out = []
    for r in roots:
        if isinstance(r, complex):
            out += [r, r.conjugate()]
        else:
            out.append(complex(r))
    return out


def poly_desc(roots, k=1.0):
    c = np.real(np.poly(np.array(expand(roots)))) if roots else np.array([1.0])
    return k * c


def realise(pl):
    """Cascade (series) realisation of k prod(s - z)/prod(s - p): the poles
    grouped into second-order sections (a complex pair, or two real poles)
    and at most one first-order section, each zero (real, or a pair on a
    second-order section) put on a section with room for it, every section in
    controllable canonical form, the gain on the last output. A lower block
    triangular `a` such as a chain of physical subsystems gives; it keeps the
    zeros well conditioned (a modal realisation rotated by a random
    similarity did not: its pencil gives spurious finite zeros)."""
    pairs = [r for r in pl["poles"] if isinstance(r, complex)]
    reals = [r for r in pl["poles"] if not isinstance(r, complex)]
    dens = [[1.0, -2 * p.real, abs(p) ** 2] for p in pairs]
    while len(reals) >= 2:
        p1, p2 = reals.pop(), reals.pop()
        dens.append([1.0, -(p1 + p2), p1 * p2])
    if reals:
        dens.append([1.0, -reals.pop()])
    nums = [[1.0] for _ in dens]
    room = [len(d) - 1 for d in dens]
    zpairs = [z for z in pl["zeros"] if isinstance(z, complex)]
    zreals = [z for z in pl["zeros"] if not isinstance(z, complex)]
    for z in zpairs:
        j = next(j for j in range(len(dens)) if room[j] == 2)
        nums[j] = list(np.polymul(nums[j], [1.0, -2 * z.real, abs(z) ** 2]))
        room[j] = 0
    for z in zreals:
        j = next(j for j in range(len(dens)) if room[j] >= 1)
        nums[j] = list(np.polymul(nums[j], [1.0, -z]))
        room[j] -= 1
    # Physical units: each section gets a unit-order gain (|den| over |num| at
    # the lowest non-zero power), times an equal share of what is left of the
    # plant gain (its sign on the last section), so no coupling is tiny.
    low = lambda cs: next(abs(x) for x in cs[::-1] if x != 0)
    gs = [low(den) / low(num) for num, den in zip(nums, dens)]
    share = (abs(pl["gain"]) / math.prod(gs)) ** (1.0 / len(gs))
    gs = [g * share for g in gs]
    gs[-1] *= math.copysign(1.0, pl["gain"])
    a = b = c = None
    d = 1.0
    for num, den, g in zip(nums, dens, gs):
        m = len(den) - 1
        num = [0.0] * (m + 1 - len(num)) + list(num)       # same length as den
        num = [g * x for x in num]
        ds = num[0]                                          # feed-through of the section
        rest = [num[i] - ds * den[i] for i in range(1, m + 1)]  # strictly proper part
        As = np.zeros((m, m))
        As[:-1, 1:] = np.eye(m - 1)
        As[-1, :] = [-x for x in den[:0:-1]]
        Bs = np.zeros(m)
        Bs[-1] = 1.0
        Cs = np.array(rest[::-1])
        if m == 2 and den[2] != 0:  # scale the states: [[0, w], [-+w, -a1]]
            w = math.sqrt(abs(den[2]))
            As[0, 1] = w
            As[1, 0] /= w
            Cs[0] /= w
        if a is None:
            a, b, c, d = As, Bs, Cs, ds
        else:  # series: first (a, b, c, d), then (As, Bs, Cs, ds)
            n1 = a.shape[0]
            A = np.zeros((n1 + m, n1 + m))
            A[:n1, :n1] = a
            A[n1:, :n1] = np.outer(Bs, c)
            A[n1:, n1:] = As
            b = np.concatenate([b, Bs * d])
            c = np.concatenate([ds * c, Cs])
            a, d = A, ds * d
    # Diagonal (power-of-two) balancing of [[a, b], [c, d]] with the last
    # scaling fixed to 1: a similarity, so the plant is unchanged, but a
    # badly scaled chain would make the PBH tests see near-uncontrollable modes.
    n = a.shape[0]
    m = np.zeros((n + 1, n + 1))
    m[:n, :n], m[:n, n], m[n, :n], m[n, n] = a, b, c, d
    _, (scale, _) = scipy.linalg.matrix_balance(m, permute=False, separate=True)
    s = scale[:n] / scale[n]
    return a * s[None, :] / s[:, None], b / s, c * s, d


# ---------------------------------------------------------------- writers

def model_fields(pl):
    """(field, YAML text, CSV text) for the model of one plant."""
    if pl["form"] == "factored":
        def lst(roots):
            return [fpair(r) if isinstance(r, complex) else fnum(r) for r in roots]
        zs, ps = lst(pl["zeros"]), lst(pl["poles"])
        ystr = lambda xs: "[" + ", ".join('"%s"' % x if "j" in x else x for x in xs) + "]"
        return [("zeros", ystr(zs), " ".join(zs)), ("poles", ystr(ps), " ".join(ps)),
                ("gain", fnum(pl["gain"]), fnum(pl["gain"]))]
    if pl["form"] == "polynomial":
        num = [fnum(x, 10) for x in poly_desc(pl["zeros"], pl["gain"])]
        den = [fnum(x, 10) for x in poly_desc(pl["poles"])]
        return [("numerator", "[" + ", ".join(num) + "]", " ".join(num)),
                ("denominator", "[" + ", ".join(den) + "]", " ".join(den))]
    a, b, c, d = realise(pl)
    rows = [[fnum(x, 12) for x in row] for row in a]
    bs = [fnum(x, 12) for x in b]
    cs = [fnum(x, 12) for x in c]
    return [("a", "[" + ", ".join("[" + ", ".join(r) + "]" for r in rows) + "]",
             "; ".join(" ".join(r) for r in rows)),
            ("b", "[" + ", ".join(bs) + "]", " ".join(bs)),
            ("c", "[" + ", ".join(cs) + "]", " ".join(cs)),
            ("d", fnum(d, 12), fnum(d, 12))]


def note_of(pl):
    n = len(expand(pl["poles"]))
    rp = sum(1 for p in pl["poles"] if isinstance(p, float) and p > 0)
    rz = sum(1 for z in pl["zeros"] if isinstance(z, float) and z > 0)
    return "synthetic order %d, %d RHP poles, %d RHP zeros" % (n, rp, rz)


class YamlOut:
    def __init__(self, f, n, seed):
        self.f = f
        f.write("# plantsieve benchmark catalog: %d synthetic plants, seed %d (tests/bench/gen_catalog.py)\n"
                % (n, seed))
        f.write('catalog: "benchmark, %d plants, seed %d"\n' % (n, seed))
        f.write("defaults:\n  delay: 0.0\n  rolloff_start: %s\nplants:\n" % fnum(DEFAULT_ROLLOFF))

    def plant(self, pl):
        w = ["  - id: %s\n" % pl["id"], '    note: "%s"\n' % note_of(pl)]
        for key, ytext, _ in model_fields(pl):
            w.append("    %s: %s\n" % (key, ytext))
        if "delay" in pl:
            w.append("    delay: %s\n" % fnum(pl["delay"]))
        if "band_edge" in pl:
            w.append("    band_edge: %s\n" % fnum(pl["band_edge"]))
            att = pl["band_attenuation"]
            w.append("    band_attenuation: %s\n" % ('"%s"' % att if " " in att else att))
        if "rolloff_start" in pl:
            r = pl["rolloff_start"]
            w.append("    rolloff_start: %s\n" % ('"%s"' % r if " " in r else r))
        self.f.write("".join(w))


CSV_COLUMNS = ["id", "note", "numerator", "denominator", "zeros", "poles", "gain", "a", "b", "c", "d",
               "delay", "band_edge", "band_attenuation", "rolloff_start"]


class CsvOut:
    def __init__(self, f, n, seed):
        self.f = f
        f.write(",".join(CSV_COLUMNS) + "\n")

    def plant(self, pl):
        row = dict.fromkeys(CSV_COLUMNS, "")
        row["id"] = pl["id"]
        row["note"] = '"%s"' % note_of(pl)
        for key, _, ctext in model_fields(pl):
            row[key] = ctext
        row["delay"] = fnum(pl.get("delay", 0.0))
        if "band_edge" in pl:
            row["band_edge"] = fnum(pl["band_edge"])
            row["band_attenuation"] = pl["band_attenuation"]
        row["rolloff_start"] = pl.get("rolloff_start", fnum(DEFAULT_ROLLOFF))
        self.f.write(",".join(row[k] for k in CSV_COLUMNS) + "\n")


def writer_for(path):
    low = path.lower()
    if low.endswith(".csv"):
        return CsvOut
    if low.endswith(".yaml") or low.endswith(".yml"):
        return YamlOut
    raise SystemExit("gen_catalog.py: OUT must end in .yaml, .yml or .csv: %s" % path)


def main(argv):
    ap = argparse.ArgumentParser(description="synthetic plantsieve catalog for the benchmark")
    ap.add_argument("n", type=int, help="number of plants")
    ap.add_argument("out", help="output catalog (.yaml, .yml or .csv)")
    ap.add_argument("--seed", type=int, default=1, help="random seed (default 1)")
    ap.add_argument("--csv", metavar="ALSO.csv", help="also write the same plants as CSV")
    ap.add_argument("--ss-stress", action="store_true",
                    help="state-space plants like the others (orders to 8, poles to 300 rad/s, "
                         "relative degree to 8) instead of orders 2..6, poles to 60 rad/s, "
                         "relative degree 1..3")
    args = ap.parse_args(argv[1:])
    if args.n < 0:
        raise SystemExit("gen_catalog.py: N must be >= 0")
    rng = random.Random(args.seed)
    files, outs = [], []
    for path in [args.out] + ([args.csv] if args.csv else []):
        cls = writer_for(path)
        f = open(path, "w", buffering=1 << 20)
        files.append(f)
        outs.append(cls(f, args.n, args.seed))
    for i in range(args.n):
        pl = gen_plant(rng, i, args.ss_stress)
        for o in outs:
            o.plant(pl)
    for f in files:
        f.close()
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv))
