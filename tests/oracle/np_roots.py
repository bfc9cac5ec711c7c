"""Oracle for tests/unit/test_roots.c: random real polynomials and their roots
by numpy.roots (LAPACK eigenvalues of the companion matrix). Independent of
plantsieve's code. Output, one polynomial per line:
  degree c0 ... cn | re0 im0 re1 im1 ...
coefficients in DESCENDING powers. Seeded: the same run every time."""
import sys
import numpy as np

rng = np.random.default_rng(20261202)
count = int(sys.argv[1]) if len(sys.argv) > 1 else 60
for k in range(count):
    deg = 2 + k % 19                       # orders 2..20
    # Roots drawn in the plane (some complex pairs), then expanded: this gives
    # well-separated roots whose values numpy recovers accurately.
    roots = []
    while len(roots) < deg:
        if deg - len(roots) >= 2 and rng.random() < 0.5:
            re, im = rng.uniform(-3, 3), rng.uniform(0.2, 3)
            roots += [complex(re, im), complex(re, -im)]
        else:
            roots.append(complex(rng.uniform(-3, 3), 0.0))
    c = np.real(np.poly(roots)) * rng.uniform(0.5, 4.0)
    r = np.roots(c)
    sys.stdout.write("%d %s | %s\n" % (
        deg, " ".join(repr(float(x)) for x in c),
        " ".join("%r %r" % (float(z.real), float(z.imag)) for z in r)))
