"""Independent finite-element check of coilwright's fin (issue 13).

Reads a `coilwright report --json` file, rebuilds the clamped fin as an
Euler-Bernoulli beam from the laminate's section profile the report gives
(`fin.section`: EI and mass per length along the fin), with the tip mass at
`load_at`, and computes with numpy/scipy (scipy.linalg.eigh, generalized
symmetric eigenproblem) the first natural frequency and the stiffness at the
load point. A different discretisation from coilwright's own: 600 elements,
EI and mass taken at element midpoints by linear interpolation of the
profile. Prints JSON; exits 1 when either differs from the report by more
than 2 %.

Usage: fin_beam.py REPORT.json
"""

import json
import warnings
import sys

import numpy as np
from scipy.linalg import eigh, solve


def beam(x_nodes, ei_of, mu_of, load_at, tip):
    n = len(x_nodes)
    dofs = 2 * n
    k = np.zeros((dofs, dofs))
    m = np.zeros((dofs, dofs))
    for e in range(n - 1):
        a, b = x_nodes[e], x_nodes[e + 1]
        h = b - a
        mid = (a + b) / 2
        ei, mu = ei_of(mid), mu_of(mid)
        ke = ei / h**3 * np.array(
            [
                [12, 6 * h, -12, 6 * h],
                [6 * h, 4 * h * h, -6 * h, 2 * h * h],
                [-12, -6 * h, 12, -6 * h],
                [6 * h, 2 * h * h, -6 * h, 4 * h * h],
            ]
        )
        me = mu * h / 420 * np.array(
            [
                [156, 22 * h, 54, -13 * h],
                [22 * h, 4 * h * h, 13 * h, -3 * h * h],
                [54, 13 * h, 156, -22 * h],
                [-13 * h, -3 * h * h, -22 * h, 4 * h * h],
            ]
        )
        idx = [2 * e, 2 * e + 1, 2 * e + 2, 2 * e + 3]
        k[np.ix_(idx, idx)] += ke
        m[np.ix_(idx, idx)] += me
    j = int(np.argmin(np.abs(x_nodes - load_at)))
    m[2 * j, 2 * j] += tip
    free = np.arange(2, dofs)  # clamp: w and theta at x = 0
    kf, mf = k[np.ix_(free, free)], m[np.ix_(free, free)]
    lam = eigh(kf, mf, eigvals_only=True, subset_by_index=[0, 0])[0]
    f = np.zeros(len(free))
    f[2 * j - 2] = 1.0
    u = solve(kf, f, assume_a="pos")
    return np.sqrt(lam) / (2 * np.pi), 1.0 / u[2 * j - 2]


def main():
    # Rotations and deflections in one matrix make it badly scaled, not
    # badly posed: the solve is checked against the report to 2 %.
    warnings.simplefilter("ignore")
    rep = json.load(open(sys.argv[1]))
    fin = rep["fin"]
    inputs = rep["inputs"]["fin"]
    length = inputs["free_length"] * 1e-3
    load_at = inputs["load_at"] * 1e-3
    xs = np.array([p["x_mm"] for p in fin["section"]]) * 1e-3
    ei = np.array([p["ei_n_m2"] for p in fin["section"]])
    mu = np.array([p["mass_kg_per_m"] for p in fin["section"]])
    # Nodes: 600 elements, one node exactly at the load point.
    n1 = max(2, int(round(600 * load_at / length)))
    nodes = list(np.linspace(0.0, load_at, n1 + 1))
    if length - load_at > 1e-12:
        n2 = max(2, 600 - n1)
        nodes += list(np.linspace(load_at, length, n2 + 1)[1:])
    nodes = np.array(nodes)
    f1, k = beam(
        nodes,
        lambda x: np.interp(x, xs, ei),
        lambda x: np.interp(x, xs, mu),
        load_at,
        fin["tip_mass_kg"],
    )
    out = {
        "resonance_hz": f1,
        "stiffness_n_per_m": k,
        "report_resonance_hz": rep["fin_resonance_hz"],
        "report_stiffness_n_per_m": rep["fin_stiffness_n_per_m"],
    }
    out["resonance_rel"] = abs(f1 / rep["fin_resonance_hz"] - 1)
    out["stiffness_rel"] = abs(k / rep["fin_stiffness_n_per_m"] - 1)
    print(json.dumps(out))
    if out["resonance_rel"] > 0.02 or out["stiffness_rel"] > 0.02:
        sys.exit(1)


if __name__ == "__main__":
    main()
