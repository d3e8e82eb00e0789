"""Reference values of e^A for seeded random matrices, computed with mpmath at high precision.

Writes expm_reference.json next to this script. Matrix entries are short decimals, so the
double that JSON.parse produces is exactly the double Python's float() produces, and mpmath
works from that exact binary value. Each exponential is computed twice (Taylor with scaling
and squaring, and Pade), at 60 significant digits; the script refuses to write the file if
the two disagree beyond 1e-40 relative, so the committed numbers are correct to far more than
double precision.

Run: python3 make_expm_reference.py   (needs mpmath; numpy/scipy are not used)
"""
import json
import os
import random
import sys

import mpmath

SEED = 20240517
DIGITS = 60


def to_decimal(x, sig=6):
    return float(f"{x:.{sig}g}")


def random_dense(rng, n, spread):
    return [[to_decimal(rng.gauss(0, spread)) for _ in range(n)] for _ in range(n)]


def stiff_similar(rng, n, rates):
    """S * diag(rates) * S^-1 with a random well-conditioned S, rounded to short decimals:
    the rounding makes it a nearby matrix with the same stiffness, which is all we need."""
    while True:
        S = mpmath.matrix([[rng.uniform(-1, 1) + (2 if i == j else 0) for j in range(n)] for i in range(n)])
        if abs(mpmath.det(S)) > 0.5:
            break
    D = mpmath.diag(rates)
    M = S * D * S ** -1
    return [[to_decimal(float(M[i, j]), 8) for j in range(n)] for i in range(n)]


def upper_nonnormal(rng, n, diag_scale, off_scale):
    return [[to_decimal(rng.gauss(0, diag_scale)) if i == j else (to_decimal(rng.gauss(0, off_scale)) if j > i else 0.0)
             for j in range(n)] for i in range(n)]


def cases(rng):
    out = []
    for k in range(12):
        n = rng.randint(2, 8)
        out.append(("dense", random_dense(rng, n, rng.choice([0.01, 0.3, 1.0, 3.0]))))
    for k in range(4):
        out.append(("dense-large-norm", random_dense(rng, rng.randint(3, 6), 6.0)))
    for rates in ([-1, -1e3], [-1, -100, -1e4], [-0.5, -50, -5e3, -2e4], [-2, -2e2, -2e4, -1, -10]):
        out.append(("stiff", stiff_similar(rng, len(rates), rates)))
    for k in range(4):
        out.append(("upper-nonnormal", upper_nonnormal(rng, rng.randint(2, 6), 1.0, 10.0 ** rng.randint(2, 6))))
    out.append(("dense-12", random_dense(rng, 12, 0.5)))
    return out


def expm_checked(A):
    M = mpmath.matrix(A)
    E1 = mpmath.expm(M, method="taylor")
    E2 = mpmath.expm(M, method="pade")
    diff = mpmath.mnorm(E1 - E2, "f") / mpmath.mnorm(E1, "f")
    if diff > mpmath.mpf("1e-40"):
        sys.exit(f"taylor and pade disagree by {diff}; raise DIGITS")
    return E1, diff


def main():
    mpmath.mp.dps = DIGITS
    rng = random.Random(SEED)
    records = []
    for kind, A in cases(rng):
        E, diff = expm_checked(A)
        n = len(A)
        records.append({
            "kind": kind,
            "A": A,
            # 17 significant digits round-trip a double; the reference is far more accurate.
            "expA": [[float(mpmath.nstr(E[i, j], 25)) for j in range(n)] for i in range(n)],
            "methodAgreement": float(diff),
        })
    doc = {
        "description": "e^A for seeded random matrices (dense, stiff, strongly non-normal), mpmath at high precision",
        "generator": "test/reference/make_expm_reference.py",
        "seed": SEED,
        "digits": DIGITS,
        "versions": {"python": sys.version.split()[0], "mpmath": mpmath.__version__},
        "cases": records,
    }
    path = os.path.join(os.path.dirname(os.path.abspath(__file__)), "expm_reference.json")
    with open(path, "w") as fh:
        json.dump(doc, fh, indent=1)
    print(f"wrote {len(records)} cases")


if __name__ == "__main__":
    main()
