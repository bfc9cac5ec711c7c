#!/usr/bin/env python3
"""Vectorised numpy/scipy floors of a plantsieve catalog: the benchmark's
baseline, written for tests/bench (not the test oracle in tests/oracle).

Usage: np_floors.py CATALOG.yaml [--check SURVEY.json | --check SCREEN.csv]
                                 [--limit N] [--json OUT.json]

Computes per plant what `plantsieve screen` bases its verdict on (README
"Floors", "Screening"): Bode area, the single-point interpolation products,
the joint interpolation floor (Pick: points p_i, values e^{p_i theta}/B_z(p_i),
a generalized Hermitian eigenproblem; without delay Chen's
sqrt(1 + sigma_max^2(Qz^-1/2 Qzp Qp^-1/2)) for ||S||), the band-forced floor
with the exact roll-off tail series, the Poisson floors, the effort floor,
ms/mt overall (S + T = 1), severity = max(ln Ms/ln Ms_allowed,
ln Mt/ln Mt_allowed) (effort share when effort_allowed is given) and the
verdict (clear / marginal / redesign / not-stabilizable). Floors and
severity only: no redesign targets (the bisections of `screen`), no reports.

Vectorised over plants: roots of polynomials grouped by degree and found as
np.linalg.eigvals of stacked companion matrices; state-space poles as eigvals
of stacked `a`, zeros as roots of the numerator from the Markov parameters
(num = sum_k h_k a_{j-k}), hidden modes by batched PBH SVDs; every floor on
padded (plants x roots) arrays; Pick/Chen with batched Cholesky, triangular
solves and eigvalsh, grouped by the number of RHP roots.

Not handled (counted and reported; none occur in gen_catalog.py catalogs):
repeated RHP roots (the tool's confluent Pick; the distinct-point formula is
used), families. Timing: "load" = PyYAML (CSafeLoader when available),
"prepare" = Python loop from YAML mappings to arrays, "floors" = the
vectorised numerics; "compute" = prepare + floors. The cyclic garbage
collector is off (nothing here makes cycles; with it on, its full scans of
the loaded document doubled the YAML load time at 100k plants).
"""
import gc
import time

T_START = time.perf_counter()
gc.disable()  # no reference cycles here; the collector's full scans double the PyYAML load time

import argparse  # noqa: E402
import json  # noqa: E402
import math  # noqa: E402
import sys  # noqa: E402

import numpy as np  # noqa: E402
import yaml  # noqa: E402

T_IMPORTED = time.perf_counter()

EPS = np.finfo(float).eps
MS_ALLOWED, MT_ALLOWED = 2.0, 1.25
PBH_RTOL = 1e-9
MERGE_RTOL = 1e-6
CANCEL_RTOL = 1e-6
MARGINAL_AT = 0.8


# ---------------------------------------------------------------- input

def fl(v):
    return float(v)  # PyYAML leaves "1e5" (no dot) a string; float() takes both


def parse_roots(items):
    if items is None:
        return []
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


def freq(v):
    if isinstance(v, (int, float)):
        return float(v)
    num, _, unit = v.strip().partition(" ")
    return float(num) * (2 * math.pi if unit.strip() == "Hz" else 1.0)


def ratio(v):
    if isinstance(v, (int, float)):
        return float(v)
    num, _, unit = v.strip().partition(" ")
    return 10 ** (float(num) / 20) if unit.strip() == "dB" else float(num)


def numlist(v):
    if isinstance(v, str):
        v = v.split()
    return [fl(x) for x in v]


def matrix(v):
    if isinstance(v, str):
        return [numlist(r) for r in v.split(";")]
    return [numlist(r) for r in v]


def strip_leading(c):
    i = 0
    while i < len(c) - 1 and c[i] == 0.0:
        i += 1
    return c[i:]


class Batch:
    """Everything the numerics need, as flat lists filled by one Python loop."""

    def __init__(self):
        self.ids = []
        self.form = []            # 0 factored, 1 polynomial, 2 state space
        self.fact = []            # (index, zeros, poles, gain)
        self.poly = {}            # degree -> list of (index, 'p'|'z', monic coefficients)
        self.poly_gain = []       # (index, gain, n_origin_poles, n_origin_zeros)
        self.ss = {}              # n -> list of (index, a, b, c, d)
        self.req = []             # rows of REQ_COLS
        self.maxo = 1             # largest number of poles or zeros of a plant
        self.families = 0


REQ_COLS = ("delay", "peak_s_allowed", "peak_t_allowed", "band_edge", "band_attenuation",
            "rolloff_start", "rolloff_gain", "rolloff_slope", "effort_allowed")


def prepare(doc, limit=None):
    bt = Batch()
    defaults = doc.get("defaults") or {}
    plants = doc.get("plants") or []
    bt.families = len(doc.get("families") or [])
    if limit is not None:
        plants = plants[:limit]
    for i, e in enumerate(plants):
        if defaults:
            e = {**defaults, **e}
        bt.ids.append(str(e["id"]))
        if "numerator" in e:
            bt.form.append(1)
            num = strip_leading(numlist(e["numerator"]))
            den = strip_leading(numlist(e["denominator"]))
            oz = op = 0
            while len(num) > 1 and num[-1] == 0.0:  # exact roots at the origin
                num.pop()
                oz += 1
            while len(den) > 1 and den[-1] == 0.0:
                den.pop()
                op += 1
            bt.poly_gain.append((i, num[0] / den[0], op, oz))
            bt.maxo = max(bt.maxo, len(den) - 1 + op)
            for tag, c in (("p", den), ("z", num)):
                bt.poly.setdefault(len(c) - 1, []).append((i, tag, c))
        elif "poles" in e:
            bt.form.append(0)
            zs, ps = parse_roots(e.get("zeros")), parse_roots(e["poles"])
            bt.fact.append((i, zs, ps, fl(e["gain"])))
            bt.maxo = max(bt.maxo, len(ps), len(zs))
        else:
            bt.form.append(2)
            a = matrix(e["a"])
            bt.ss.setdefault(len(a), []).append((i, a, numlist(e["b"]), numlist(e["c"]), fl(e.get("d", 0.0))))
            bt.maxo = max(bt.maxo, len(a))
        r = [fl(e.get("delay", 0.0)), fl(e.get("peak_s_allowed", MS_ALLOWED)),
             fl(e.get("peak_t_allowed", MT_ALLOWED))]
        r.append(freq(e["band_edge"]) if e.get("band_edge") is not None else np.nan)
        r.append(ratio(e["band_attenuation"]) if e.get("band_attenuation") is not None else np.nan)
        r.append(freq(e["rolloff_start"]) if e.get("rolloff_start") is not None else np.nan)
        r.append(fl(e.get("rolloff_gain", 0.5)))
        r.append(fl(e.get("rolloff_slope", 1.0)))
        r.append(fl(e["effort_allowed"]) if e.get("effort_allowed") is not None else np.nan)
        bt.req.append(r)
    return bt


# ---------------------------------------------------------------- roots

class Roots:
    """Padded per-plant roots: poles (N, MP), zeros (N, MZ) with masks."""

    def __init__(self, n, mp, mz):
        self.P = np.zeros((n, mp), complex)
        self.pm = np.zeros((n, mp), bool)
        self.Z = np.zeros((n, mz), complex)
        self.zm = np.zeros((n, mz), bool)
        self.gain = np.zeros(n)
        self.hidden = np.zeros(n, bool)

    def put(self, which, idx, vals):
        """vals: (K, m) complex for plants idx; appended after what is there."""
        R, M = (self.P, self.pm) if which == "p" else (self.Z, self.zm)
        if vals.shape[1] == 0:
            return
        start = M[idx].sum(axis=1)
        for s in np.unique(start):
            sel = start == s
            R[idx[sel], s:s + vals.shape[1]] = vals[sel]
            M[idx[sel], s:s + vals.shape[1]] = True


def batched_roots(coefs):
    """Roots of monic-normalised polynomials (K, m+1), descending: eigvals of
    stacked companion matrices (LAPACK dgeev balances them)."""
    K, m1 = coefs.shape
    m = m1 - 1
    if m == 0:
        return np.zeros((K, 0), complex)
    c = coefs[:, 1:] / coefs[:, :1]
    comp = np.zeros((K, m, m))
    comp[:, 0, :] = -c
    if m > 1:
        comp[:, np.arange(1, m), np.arange(m - 1)] = 1.0
    return np.linalg.eigvals(comp).astype(complex)


def poly_from_roots(r):
    """(K, n) complex roots -> (K, n+1) real monic coefficients, descending."""
    K, n = r.shape
    c = np.zeros((K, n + 1), complex)
    c[:, 0] = 1.0
    for j in range(n):
        c[:, 1:j + 2] = c[:, 1:j + 2] - r[:, j:j + 1] * c[:, 0:j + 1]
    return c.real


def find_roots(bt):
    n = len(bt.ids)
    R = Roots(n, bt.maxo, bt.maxo)

    # factored: straight in (a Python loop over plants: the roots are given)
    if bt.fact:
        idx = np.array([f[0] for f in bt.fact])
        for which, col in (("p", 2), ("z", 1)):
            lens = np.array([len(f[col]) for f in bt.fact])
            for L in np.unique(lens):
                sel = np.nonzero(lens == L)[0]
                if L:
                    R.put(which, idx[sel], np.array([bt.fact[k][col] for k in sel], complex))
        R.gain[idx] = [f[3] for f in bt.fact]

    # polynomial: grouped by degree
    for deg, rows in bt.poly.items():
        idx = np.array([r[0] for r in rows])
        tags = np.array([r[1] for r in rows])
        roots = batched_roots(np.array([r[2] for r in rows]))
        for t in ("p", "z"):
            sel = tags == t
            if sel.any():
                R.put(t, idx[sel], roots[sel])
    if bt.poly_gain:
        idx = np.array([g[0] for g in bt.poly_gain])
        R.gain[idx] = [g[1] for g in bt.poly_gain]
        for col, which in ((2, "p"), (3, "z")):
            cnt = np.array([g[col] for g in bt.poly_gain])
            for c in np.unique(cnt[cnt > 0]):
                sel = cnt == c
                R.put(which, idx[sel], np.zeros((sel.sum(), c), complex))

    # state space: grouped by order
    for nn, rows in bt.ss.items():
        idx = np.array([r[0] for r in rows])
        A = np.array([r[1] for r in rows], float)
        B = np.array([r[2] for r in rows], float)
        C = np.array([r[3] for r in rows], float)
        D = np.array([r[4] for r in rows], float)
        poles = np.linalg.eigvals(A).astype(complex)
        R.put("p", idx, poles)
        # Markov parameters h_k = c a^{k-1} b and the relative degree, with the
        # tool's threshold (|h_k| > 1e-12 |b| |c| |a|_F^{k-1})
        na = np.linalg.norm(A, axis=(1, 2))
        scale = np.linalg.norm(B, axis=1) * np.linalg.norm(C, axis=1)
        h = np.zeros((len(rows), nn + 1))
        v = B.copy()
        rel = np.where(D != 0, 0, -1)
        for k in range(1, nn + 1):
            h[:, k] = np.einsum("ki,ki->k", C, v)
            hit = (rel < 0) & (np.abs(h[:, k]) > 1e-12 * scale)
            rel[hit] = k
            v = np.einsum("kij,kj->ki", A, v)
            scale = scale * np.maximum(na, np.finfo(float).tiny)
        h[:, 0] = D
        rel[rel < 0] = nn + 1  # identically zero: flagged below
        gain = h[np.arange(len(rows)), np.minimum(rel, nn)]
        R.gain[idx] = gain
        den = poly_from_roots(poles)   # a_0 .. a_n
        # numerator of G = sum_{k>=0} h_k s^{-k}: coefficient of s^{n-j} is
        # sum_{k=0..j} h_k a_{j-k}
        num = np.zeros((len(rows), nn + 1))
        for j in range(nn + 1):
            num[:, j] = sum(h[:, k] * den[:, j - k] for k in range(j + 1))
        for r in np.unique(rel):
            sel = rel == r
            if r > nn:
                R.hidden[idx[sel]] = True   # G = 0: the tool rejects these
                continue
            zr = batched_roots(num[sel][:, r:])
            R.put("z", idx[sel], zr)
        # PBH for RHP/axis eigenvalues: sigma_min/sigma_max of [a - lam I, b], [a - lam I; c]
        tol = 64 * EPS * na
        for j in range(nn):
            lam = poles[:, j]
            sel = (lam.real >= -tol) & (lam.imag >= 0)
            if not sel.any():
                continue
            Al = A[sel].astype(complex) - lam[sel, None, None] * np.eye(nn)
            mc = np.concatenate([Al, B[sel, :, None].astype(complex)], axis=2)
            mo = np.concatenate([Al, C[sel, None, :].astype(complex)], axis=1)
            sc = np.linalg.svd(mc, compute_uv=False)
            so = np.linalg.svd(mo, compute_uv=False)
            bad = (sc[:, -1] / sc[:, 0] <= PBH_RTOL) | (so[:, -1] / so[:, 0] <= PBH_RTOL)
            R.hidden[idx[sel][bad]] = True
    return R


# ---------------------------------------------------------------- floors

def pack(vals, mask):
    """Left-pack the masked entries of (N, M) into (N, m), m = max count."""
    cnt = mask.sum(axis=1)
    m = int(cnt.max()) if len(cnt) else 0
    order = np.argsort(~mask, axis=1, kind="stable")[:, :m]
    out = np.take_along_axis(vals, order, axis=1)
    om = np.arange(m)[None, :] < cnt[:, None]
    return np.where(om, out, 1.0), om, cnt


def blaschke_inv(s, sm, r, rm):
    """prod over the valid r of |s + conj r|/|s - r|, (N, S), and a flag for
    an exact coincidence (infinite floors)."""
    num = np.abs(s[:, :, None] + np.conj(r[:, None, :]))
    den = np.abs(s[:, :, None] - r[:, None, :])
    valid = sm[:, :, None] & rm[:, None, :]
    zero = valid & (den == 0)
    q = np.where(valid, num / np.where(den == 0, 1.0, den), 1.0)
    return q.prod(axis=2), zero.any(axis=(1, 2))


def gen_herm_max(Amat, Bmat):
    """Largest eigenvalue of B x = lambda A x for stacks (K, m, m), A Hermitian
    positive definite; the tool's condition estimate (max/min pivot of L)^2.
    Returns (lambda_max, cond, ok)."""
    K = Amat.shape[0]
    lam = np.full(K, np.nan)
    cond = np.full(K, np.inf)
    ok = np.zeros(K, bool)
    try:
        L = np.linalg.cholesky(Amat)
        good = np.ones(K, bool)
    except np.linalg.LinAlgError:  # some matrix not PD: one by one
        L = np.zeros_like(Amat)
        good = np.zeros(K, bool)
        for k in range(K):
            try:
                L[k] = np.linalg.cholesky(Amat[k])
                good[k] = True
            except np.linalg.LinAlgError:
                pass
    if good.any():
        Lg = L[good]
        dg = np.abs(np.diagonal(Lg, axis1=1, axis2=2).real)
        c = (dg.max(axis=1) / dg.min(axis=1)) ** 2
        X = np.linalg.solve(Lg, Bmat[good])                            # L^-1 B
        Cm = np.linalg.solve(Lg, np.conj(np.swapaxes(X, 1, 2)))         # L^-1 (L^-1 B)^H
        Cm = np.conj(np.swapaxes(Cm, 1, 2))                             # = L^-1 B L^-H
        ev = np.linalg.eigvalsh(Cm)[:, -1]
        gi = np.nonzero(good)[0]
        lam[gi] = ev
        cond[gi] = c
        ok[gi] = c < 1e14
    return lam, cond, ok


def pick_gamma(s, sm, w, cnt):
    """Nevanlinna-Pick value sqrt(lambda_max(B, A)), A_kl = 1/(conj s_k + s_l),
    B_kl = conj(w_k) w_l A_kl, grouped by the number of points."""
    N = s.shape[0]
    g = np.zeros(N)
    ok = np.ones(N, bool)
    cond = np.ones(N)
    for m in np.unique(cnt):
        if m == 0:
            continue
        sel = np.nonzero(cnt == m)[0]
        ss, ww = s[sel, :m], w[sel, :m]
        if m == 1:
            g[sel] = np.abs(ww[:, 0])
            continue
        A = 1.0 / (np.conj(ss)[:, :, None] + ss[:, None, :])
        B = np.conj(ww)[:, :, None] * ww[:, None, :] * A
        lam, c, o = gen_herm_max(A, B)
        g[sel] = np.sqrt(np.maximum(lam, 0.0))
        ok[sel] = o
        cond[sel] = c
    return g, ok, cond


def chen(z, zc, p, pc):
    """sqrt(1 + sigma_max^2(Lz^-1 Qzp Lp^-H)) grouped by (#zeros, #poles)."""
    N = z.shape[0]
    out = np.ones(N)
    ok = np.ones(N, bool)
    key = zc * 1000 + pc
    for kv in np.unique(key):
        nz, np_ = divmod(int(kv), 1000)
        if nz == 0 or np_ == 0:
            continue
        sel = np.nonzero(key == kv)[0]
        zz, pp = z[sel, :nz], p[sel, :np_]
        qz = 1.0 / (zz[:, :, None] + np.conj(zz)[:, None, :])
        qp = 1.0 / (np.conj(pp)[:, :, None] + pp[:, None, :])
        qzp = 1.0 / (zz[:, :, None] - pp[:, None, :])
        try:
            Lz = np.linalg.cholesky(qz)
            Lp = np.linalg.cholesky(qp)
        except np.linalg.LinAlgError:
            ok[sel] = False
            continue
        dz = np.abs(np.diagonal(Lz, axis1=1, axis2=2).real)
        dp = np.abs(np.diagonal(Lp, axis1=1, axis2=2).real)
        c = np.maximum((dz.max(1) / dz.min(1)) ** 2, (dp.max(1) / dp.min(1)) ** 2)
        X = np.linalg.solve(Lz, qzp)                                        # Lz^-1 Qzp
        Y = np.conj(np.swapaxes(np.linalg.solve(Lp, np.conj(np.swapaxes(X, 1, 2))), 1, 2))  # X Lp^-H
        G = np.conj(np.swapaxes(Y, 1, 2)) @ Y
        lam = np.linalg.eigvalsh(G)[:, -1]
        out[sel] = np.sqrt(1.0 + np.maximum(lam, 0.0))
        ok[sel] = c < 1e14
    return out, ok


def rolloff_tail(wh, delta, k):
    """wh sum_n delta^n/(n(n(1+k)-1)), summed as the tool does, per distinct (delta, k)."""
    out = np.zeros_like(wh)
    for d, kk in set(zip(delta.tolist(), k.tolist())):
        if not d > 0:
            continue
        s, dn = 0.0, 1.0
        for n in range(1, 100000):
            dn *= d
            t = dn / (n * (n * (1 + kk) - 1))
            s += t
            if t < 1e-17 * s:
                break
        sel = (delta == d) & (k == kk)
        out[sel] = wh[sel] * s
    return out


def band_angle(r, w):
    return np.arctan((w[:, None] - r.imag) / r.real) + np.arctan((w[:, None] + r.imag) / r.real)


def floors(bt, R):
    np.seterr(all="ignore")  # masked lanes divide by zero; they are discarded
    N = len(bt.ids)
    req = np.array(bt.req, float).reshape(N, len(REQ_COLS))
    theta, ms_allow, mt_allow, wb, eps, wh, delta, kslope, eff_allow = req.T
    tolp = 1e-9 * np.maximum(1.0, np.abs(R.P))
    tolz = 1e-9 * np.maximum(1.0, np.abs(R.Z))
    prhp = R.pm & (R.P.real > tolp)
    zrhp = R.zm & (R.Z.real > tolz)
    p, pmk, npc = pack(R.P, prhp)
    z, zmk, nzc = pack(R.Z, zrhp)

    # repeated RHP roots would need the confluent problem: count them
    def repeated(r, m):
        if r.shape[1] < 2:
            return np.zeros(N, bool)
        d = np.abs(r[:, :, None] - r[:, None, :]) <= MERGE_RTOL * np.maximum(1.0, np.abs(r[:, :, None]))
        d &= m[:, :, None] & m[:, None, :]
        d[:, np.arange(r.shape[1]), np.arange(r.shape[1])] = False
        return d.any(axis=(1, 2))
    confluent = repeated(p, pmk) | repeated(z, zmk)

    # hidden modes of rational plants: a shared RHP root (tool: within 1e-6 relative)
    pz = np.abs(z[:, :, None] - p[:, None, :]) <= CANCEL_RTOL * np.maximum(np.abs(p[:, None, :]), 1e-300)
    hidden = R.hidden | (pz & zmk[:, :, None] & pmk[:, None, :]).any(axis=(1, 2))

    f = {}
    f["bode_area"] = np.pi * np.where(pmk, p.real, 0.0).sum(axis=1)

    bz, inf1 = blaschke_inv(z, zmk, p, pmk)                 # (N, nz): |B_p(z_j)^-1|
    ms_single = np.maximum(1.0, np.where(zmk, bz, 1.0).max(axis=1, initial=1.0))
    bp, inf2 = blaschke_inv(p, pmk, z, zmk)                # (N, np): |B_z(p_i)^-1|
    bp_t = bp * np.exp(p.real * theta[:, None])
    mt_single = np.maximum(1.0, np.where(pmk, bp_t, 1.0).max(axis=1, initial=1.0))
    infinite = inf1 | inf2

    # Pick at the poles: w_i = e^{p_i theta} prod_j (p_i + conj z_j)/(p_i - z_j)
    fac = np.where(zmk[:, None, :], (p[:, :, None] + np.conj(z[:, None, :]))
                   / np.where(zmk[:, None, :], p[:, :, None] - z[:, None, :], 1.0), 1.0)
    w = np.exp(p * theta[:, None]) * fac.prod(axis=2)
    g, gok, cond = pick_gamma(p, pmk, w, npc)
    ch, chok = chen(z, nzc, p, npc)

    # The value 1 only where S or T is forced to 1 (S&P 2nd ed. 2005, ch. 5; the
    # tool's law, stated here again): T = 1 at an RHP or axis pole; S = 1 at an
    # RHP or axis zero, S -> 1 at infinity for a strictly proper or delayed
    # plant. Elsewhere 0: C = 0 gives T = 0 for a stable plant, and a biproper
    # delay-free plant with LHP zeros has ||S|| -> 0 under a high gain.
    has_p = npc > 0
    axis_p = (R.pm & (np.abs(R.P.real) <= tolp)).any(axis=1)
    axis_z = (R.zm & (np.abs(R.Z.real) <= tolz)).any(axis=1)
    rel_deg = R.pm.sum(axis=1) - R.zm.sum(axis=1)
    s_base = np.where((nzc > 0) | (rel_deg >= 1) | (theta > 0) | axis_z, 1.0, 0.0)
    mt_i = np.where(has_p, np.maximum(g, mt_single), np.where(axis_p, 1.0, 0.0))
    ms_i = np.where(has_p & (theta > 0), mt_i, s_base)
    use_chen = has_p & (theta == 0) & (nzc > 0)
    ms_i = np.where(use_chen, np.where(chok, np.maximum(ch, ms_single), ms_single), ms_i)
    fail = has_p & ~gok
    ms_i = np.where(fail, np.where(nzc > 0, ms_single, s_base), ms_i)
    mt_i = np.where(fail, mt_single, mt_i)
    ms_i = np.where(infinite, np.inf, ms_i)
    mt_i = np.where(infinite, np.inf, mt_i)
    f["ms_interpolation"], f["mt_interpolation"] = ms_i, mt_i

    # effort: Pick at the poles with values e^{p theta}/G_s(p), G_s the stable mirror
    Pall, Pm = R.P, R.pm
    Zall, Zm = R.Z, R.zm
    Pr = Pm & (Pall.real > tolp)
    pv = p[:, :, None]
    zf = np.where(Zm[:, None, :], pv - Zall[:, None, :], 1.0).prod(axis=2)
    pf = np.where(Pm[:, None, :], np.where(Pr[:, None, :], pv + np.conj(Pall[:, None, :]),
                                           pv - Pall[:, None, :]), 1.0).prod(axis=2)
    gs = R.gain[:, None] * zf / pf
    we = np.exp(p * theta[:, None]) / np.where(pmk, gs, 1.0)
    single = np.where(pmk, np.abs(we), 0.0).max(axis=1, initial=0.0)
    ge, geok, _ = pick_gamma(p, pmk, we, npc)
    eff = np.where(geok, np.maximum(ge, single), single)
    f["effort"] = np.where(~has_p, 0.0, np.where(infinite, np.inf, eff))

    # band-forced floor with the exact tail series
    band = wb > 0
    roll = wh > 0
    wbx = np.where(band, wb, 0.0)
    epsx = np.where(band, eps, 1.0)
    tail = rolloff_tail(np.where(roll, wh, 0.0), delta, kslope)
    with np.errstate(invalid="ignore", divide="ignore"):
        f["ms_band"] = np.where(roll, np.exp((f["bode_area"] + wbx * np.log(1 / epsx) - tail)
                                             / (np.where(roll, wh, 1.0) - wbx)), np.nan)
        # Poisson S at each RHP zero (one per pair)
        thz = band_angle(z, np.where(band, wb, 0.0))
        ps = (1 / epsx[:, None]) ** (thz / (np.pi - thz)) * bz ** (np.pi / (np.pi - thz))
        ps = np.where(zmk & (z.imag >= 0), ps, 0.0).max(axis=1, initial=0.0)  # no RHP zero: 0
        f["ms_poisson"] = np.where(band, np.where(infinite, np.inf, ps), np.nan)
        # Poisson T at each RHP pole (one per pair), |T| <= delta/(1-delta) beyond wh
        epst = delta / (1 - delta)
        thp = band_angle(p, np.where(roll, wh, 1.0))
        pt = (1 / epst[:, None]) ** ((np.pi - thp) / thp) * bp_t ** (np.pi / thp)
        pt = np.where(pmk & (p.imag >= 0), pt, -np.inf).max(axis=1, initial=-np.inf)
        pt = np.where(has_p, pt, 0.0)  # no RHP pole: 0
        f["mt_poisson"] = np.where(roll & (delta > 0), np.where(infinite, np.inf, pt), np.nan)

    # overall (S + T = 1); NaN (not applicable) never wins a comparison
    s_only = np.fmax(np.fmax(ms_i, f["ms_band"]), f["ms_poisson"])
    s_only = np.where(roll, np.maximum(s_only, 1.0), s_only)  # roll-off: a strictly proper loop, S -> 1
    t_only = np.fmax(mt_i, f["mt_poisson"])
    f["ms"] = np.maximum(s_only, t_only - 1.0)
    f["mt"] = np.maximum(t_only, s_only - 1.0)

    # severity and verdict (README "Screening")
    with np.errstate(invalid="ignore", divide="ignore"):
        sm = np.log(np.maximum(f["ms"], 1.0)) / np.log(ms_allow)
        st = np.log(np.maximum(f["mt"], 1.0)) / np.log(mt_allow)
        se = np.where(eff_allow > 0, np.log1p(f["effort"]) / np.log1p(eff_allow), np.nan)
    sev = np.fmax(np.maximum(sm, st), se)
    sev = np.where(infinite, np.inf, sev)
    f["severity"] = sev
    verdict = np.where(infinite | hidden | np.isinf(sev), 3,
                       np.where(sev > 1.0, 2, np.where(sev >= MARGINAL_AT, 1, 0)))
    f["verdict"] = verdict
    f["hidden"] = hidden
    f["confluent"] = confluent
    f["cond"] = cond
    return f


VERDICTS = ("clear", "marginal", "redesign", "not-stabilizable")
CHECK_KEYS = ("bode_area", "ms", "mt", "ms_interpolation", "mt_interpolation", "ms_band", "ms_poisson",
              "mt_poisson", "effort")


# ---------------------------------------------------------------- comparison

def rel(a, b):
    if a is None or b is None or (isinstance(a, float) and math.isnan(a)):
        return 0.0 if (a is None or math.isnan(a)) and (b is None or (isinstance(b, float) and math.isnan(b))) \
            else math.inf
    if math.isinf(a) or math.isinf(b):
        return 0.0 if a == b else math.inf
    m = max(abs(a), abs(b))
    return 0.0 if m < 1e-12 else abs(a - b) / m


def check(path, bt, f, rtol=1e-6):
    """Compare with `plantsieve survey --json` (floors) or a screen CSV
    report (severity, verdict). Prints mismatches; returns their count."""
    pos = {pid: i for i, pid in enumerate(bt.ids)}
    bad = values = 0
    worst = 0.0
    shown = 0

    def cmp(pid, key, tool, mine):
        nonlocal bad, values, worst, shown
        values += 1
        d = rel(mine, tool)
        if d != math.inf:
            worst = max(worst, d)
        if d > rtol:
            bad += 1
            if shown < 20:
                print("MISMATCH %s %s: tool %r, numpy %r" % (pid, key, tool, mine))
                shown += 1

    if path.endswith(".json"):
        with open(path) as fh:
            doc = json.load(fh)
        for pl in doc["plants"]:
            i = pos.get(pl["id"])
            if i is None or pl.get("error") or not pl.get("floors"):
                continue
            for k in CHECK_KEYS:
                tv = pl["floors"][k]
                if tv is None and pl["floors"].get("infinite"):
                    tv = math.inf
                cmp(pl["id"], k, tv, float(f[k][i]))
    else:
        import csv
        with open(path, newline="") as fh:
            for row in csv.DictReader(fh):
                i = pos.get(row["id"])
                if i is None:
                    continue
                sev = math.inf if row["severity_infinite"] == "true" else float(row["severity"] or "nan")
                cmp(row["id"], "severity", sev, float(f["severity"][i]))
                values += 1
                if row["verdict"] != VERDICTS[f["verdict"][i]]:
                    bad += 1
                    if shown < 20:
                        print("MISMATCH %s verdict: tool %s, numpy %s" % (row["id"], row["verdict"],
                                                                         VERDICTS[f["verdict"][i]]))
                        shown += 1
    print("check: %d values compared with %s, %d mismatches (rtol %g), worst relative difference %.3g"
          % (values, path, bad, rtol, worst))
    return bad


def main(argv):
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("catalog")
    ap.add_argument("--check", metavar="SURVEY.json|SCREEN.csv")
    ap.add_argument("--limit", type=int, help="only the first N plants (after loading all)")
    ap.add_argument("--json", metavar="OUT", help="write per-plant severity and floors")
    args = ap.parse_args(argv[1:])

    loader = getattr(yaml, "CSafeLoader", yaml.SafeLoader)
    t0 = time.perf_counter()
    with open(args.catalog) as fh:
        doc = yaml.load(fh, Loader=loader)
    t1 = time.perf_counter()
    bt = prepare(doc, args.limit)
    del doc
    t2 = time.perf_counter()
    R = find_roots(bt)
    f = floors(bt, R)
    t3 = time.perf_counter()

    n = len(bt.ids)
    counts = np.bincount(f["verdict"], minlength=4) if n else np.zeros(4, int)
    print("np_floors: %d plants from %s: floors and severity only, no redesign targets" % (n, args.catalog))
    print("np_floors: verdicts " + ", ".join("%s %d" % (v, c) for v, c in zip(VERDICTS, counts)))
    print("np_floors: forms factored %d, polynomial %d, state space %d; not handled: %d with repeated "
          "RHP roots (confluent), %d families"
          % (bt.form.count(0), bt.form.count(1), bt.form.count(2), int(f["confluent"].sum()), bt.families))
    print("np_floors: timing imports %.3f s, YAML load %.3f s (PyYAML %s), compute %.3f s "
          "(prepare %.3f s + floors %.3f s), total %.3f s"
          % (T_IMPORTED - T_START, t1 - t0, loader.__name__, t3 - t1, t2 - t1, t3 - t2, t3 - T_START))
    print("NP_TIMES imports=%.6f load=%.6f compute=%.6f prepare=%.6f floors=%.6f total=%.6f n=%d"
          % (T_IMPORTED - T_START, t1 - t0, t3 - t1, t2 - t1, t3 - t2, t3 - T_START, n))
    rc = 0
    if args.check:
        rc = 1 if check(args.check, bt, f) else 0
    if args.json:
        with open(args.json, "w") as fh:
            json.dump([{"id": bt.ids[i], "verdict": VERDICTS[f["verdict"][i]],
                        **{k: (None if not np.isfinite(f[k][i]) else float(f[k][i]))
                           for k in CHECK_KEYS + ("severity",)}} for i in range(n)], fh)
    return rc


if __name__ == "__main__":
    sys.exit(main(sys.argv))
