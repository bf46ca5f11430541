#!/usr/bin/env python3
"""The plain-numpy baseline of scripts/bench: a Monte Carlo depth scan.

It does the work of `mixdepth scan --graph grid:RxC --depths 1:DEPTH
--instances N --gates haar` the way a practitioner would write it with numpy:
the state is a tensor with one axis of size 2 per qubit, each Haar-random
two-qubit gate is applied with numpy.tensordot, and at every depth the script
computes the output probabilities, the collision probability Z = sum p^2 and
the Kolmogorov-Smirnov distance of the probabilities to the Haar law
Beta(1, D-1) (sorting them). It draws its own random gates, so its numbers
agree with the Go scan only in distribution; scripts/bench times it.

Conventions as in the project's design: qubit (r, c) of an R x C grid is
r*C + c; the layers cycle through horizontal edges with c even, horizontal
with c odd, vertical with r even, vertical with r odd; qubit q is bit q of
the basis index, and a gate on (a, b) is a 4x4 matrix in the basis
2*b_a + b_b. Haar U(4) gates: QR of a complex Ginibre matrix with the phases
of R's diagonal divided out (Mezzadri 2007, Notices AMS 54, 592).

Prints one JSON document: the parameters, the elapsed seconds and, per
depth, the mean collision ratio Z/Z_H and the mean KS distance.
"""

import argparse
import json
import time

import numpy as np


def grid_layers(rows, cols):
    """The four edge classes of the layered grid schedule, empty ones dropped."""
    q = lambda r, c: r * cols + c
    classes = [
        [(q(r, c), q(r, c + 1)) for r in range(rows) for c in range(0, cols - 1, 2)],
        [(q(r, c), q(r, c + 1)) for r in range(rows) for c in range(1, cols - 1, 2)],
        [(q(r, c), q(r + 1, c)) for r in range(0, rows - 1, 2) for c in range(cols)],
        [(q(r, c), q(r + 1, c)) for r in range(1, rows - 1, 2) for c in range(cols)],
    ]
    return [c for c in classes if c]


def haar_u4(rng):
    z = (rng.standard_normal((4, 4)) + 1j * rng.standard_normal((4, 4))) / np.sqrt(2)
    q, r = np.linalg.qr(z)
    d = np.diagonal(r)
    return q * (d / np.abs(d))


def apply_gate(psi, n, a, b, g):
    """psi has axis n-1-q for qubit q (C order, qubit 0 least significant)."""
    ax_a, ax_b = n - 1 - a, n - 1 - b
    out = np.tensordot(g.reshape(2, 2, 2, 2), psi, axes=([2, 3], [ax_a, ax_b]))
    return np.moveaxis(out, [0, 1], [ax_a, ax_b])


def ks_haar(p):
    """Kolmogorov-Smirnov distance of p to Beta(1, D-1), D = len(p)."""
    d = p.size
    s = np.sort(p)
    f = -np.expm1((d - 1) * np.log1p(-s))
    i = np.arange(1, d + 1) / d
    return max(np.max(i - f), np.max(f - (i - 1.0 / d)))


def blas_info():
    """The BLAS numpy calls (tensordot multiplies through it), when
    threadpoolctl is installed; None otherwise."""
    try:
        import threadpoolctl
    except ImportError:
        return None
    return [
        {k: lib.get(k) for k in ("internal_api", "version", "architecture", "num_threads")}
        for lib in threadpoolctl.threadpool_info()
        if lib.get("user_api") == "blas"
    ]


def main():
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--rows", type=int, default=4)
    ap.add_argument("--cols", type=int, default=6)
    ap.add_argument("--depth", type=int, default=20)
    ap.add_argument("--instances", type=int, default=2)
    ap.add_argument("--seed", type=int, default=1)
    args = ap.parse_args()

    n = args.rows * args.cols
    dim = 2 ** n
    zh = 2.0 / (dim + 1)
    layers = grid_layers(args.rows, args.cols)
    rng = np.random.default_rng(args.seed)
    ratio = np.zeros(args.depth)
    ks = np.zeros(args.depth)
    start = time.perf_counter()
    for _ in range(args.instances):
        psi = np.zeros((2,) * n, dtype=np.complex128)
        psi[(0,) * n] = 1
        for depth in range(args.depth):
            for a, b in layers[depth % len(layers)]:
                psi = apply_gate(psi, n, a, b, haar_u4(rng))
            p = np.abs(np.ascontiguousarray(psi).reshape(-1)) ** 2
            ratio[depth] += np.sum(p * p) / zh
            ks[depth] += ks_haar(p)
    elapsed = time.perf_counter() - start
    print(json.dumps({
        "qubits": n, "graph": "grid:%dx%d" % (args.rows, args.cols),
        "depths": args.depth, "instances": args.instances,
        "seconds": elapsed,
        "numpy": np.__version__, "blas": blas_info(),
        "collision_ratio": list(ratio / args.instances),
        "pt_ks_mean": list(ks / args.instances),
    }))


if __name__ == "__main__":
    main()
