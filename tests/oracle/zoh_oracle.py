"""Oracle for tests/unit/test_discrete.c (hold discretisation). Independent of
plantsieve's code; seeded, so every run gives the same cases. Coefficients are
DESCENDING powers.

  zoh_oracle.py random N
      N random continuous plants and their hold equivalents by
      scipy.signal.cont2discrete(method='zoh'), one per line:
        h | num... | den... | zr zi Hr Hi (3 points) | pole_re pole_im ...
      H = Cd (zI - Ad)^-1 Bd + Dd of the held realisation at the points
      (tf2ss, then cont2discrete); poles are the eigenvalues of Ad.

  zoh_oracle.py step
      Plants with whole and fractional input delays and their sampled step
      responses y(k h - theta), the continuous response integrated by
      scipy.integrate.solve_ivp (DOP853, rtol 1e-12) from a tf2ss realisation,
      zero before the delay. One per line:
        h theta K | num... | den... | y_0 ... y_{K-1}
"""
import sys
import numpy as np
from scipy import signal
from scipy.integrate import solve_ivp


def fmt(xs):
    return " ".join(repr(float(x)) for x in xs)


def random_roots(rng, n, lo, hi):
    r = []
    while len(r) < n:
        if n - len(r) >= 2 and rng.random() < 0.5:
            re, im = rng.uniform(lo, hi), rng.uniform(0.3, 4.0)
            r += [complex(re, im), complex(re, -im)]
        else:
            r.append(complex(rng.uniform(lo, hi), 0.0))
    return r


def random_cases(count):
    rng = np.random.default_rng(20261204)
    points = [complex(1.37, 0.42), complex(-0.83, 1.19), complex(2.41, -0.57)]
    for k in range(count):
        n = 1 + k % 6                      # orders 1..6
        nz = int(rng.integers(0, n + 1))   # relative degree 0..n
        den = np.real(np.poly(random_roots(rng, n, -3.0, 1.5)))
        num = np.real(np.poly(random_roots(rng, nz, -4.0, 4.0))) if nz else np.array([1.0])
        num = num * rng.choice([-1.0, 1.0]) * rng.uniform(0.5, 3.0)
        h = rng.uniform(0.02, 0.6)
        # Held in state space (the transfer-function route of cont2discrete
        # expands numd by ss2tf, whose rounding swamps small values of H).
        Ad, Bd, Cd, Dd, _ = signal.cont2discrete(signal.tf2ss(num, den), h, method='zoh')
        vals = []
        for z in points:
            H = (Cd @ np.linalg.solve(z * np.eye(Ad.shape[0]) - Ad, Bd))[0, 0] + Dd[0, 0]
            vals += [z.real, z.imag, H.real, H.imag]
        poles = np.linalg.eigvals(Ad)
        sys.stdout.write("%r | %s | %s | %s | %s\n" % (
            h, fmt(num), fmt(den), fmt(vals),
            " ".join("%r %r" % (float(p.real), float(p.imag)) for p in poles)))


def step_cases():
    # (num, den, h, theta): high-entropy values; whole, fractional, both, and a
    # biproper plant whose feedthrough jumps at the delayed instant.
    cases = [
        ([2.385], [1.0, 0.71], 0.137, 0.0),
        ([2.385], [1.0, 0.71], 0.137, 3 * 0.137),
        ([2.385], [1.0, 0.71], 0.137, 0.3 * 0.137),
        ([2.385], [1.0, 0.71], 0.137, 0.83 * 0.137),
        ([1.3, 0.47], [1.0, 1.1, 4.93, 0.0], 0.0913, 2.41 * 0.0913),
        ([-0.62, 1.9], [1.0, -0.58, 3.7], 0.217, 1.0 * 0.217),
        ([-0.62, 1.9], [1.0, -0.58, 3.7], 0.217, 0.57 * 0.217),
        ([0.7, 2.2, 0.9], [1.0, 3.1, 2.6], 0.0777, 1.35 * 0.0777),
        ([3.3], [1.0, 2.9, 3.55, 1.62], 0.181, 4.17 * 0.181),
    ]
    K = 40
    for num, den, h, theta in cases:
        A, B, C, D = signal.tf2ss(num, den)
        t = np.arange(K) * h - theta
        pos = t[t > 0]
        y = np.zeros(K)
        if pos.size:
            sol = solve_ivp(lambda _t, x: A @ x + B[:, 0], (0.0, pos[-1]), np.zeros(A.shape[0]),
                            method='DOP853', rtol=1e-12, atol=1e-14, t_eval=pos)
            assert sol.success
            ys = (C @ sol.y)[0] + D[0, 0]
            y[t > 0] = ys
        # At t = 0 exactly (whole-sample delay) the hold has just applied the step: y = D.
        y[np.abs(t) < 1e-12 * h] = D[0, 0]
        sys.stdout.write("%r %r %d | %s | %s | %s\n" % (h, theta, K, fmt(num), fmt(den), fmt(y)))


if __name__ == "__main__":
    if sys.argv[1] == "random":
        random_cases(int(sys.argv[2]))
    else:
        step_cases()
