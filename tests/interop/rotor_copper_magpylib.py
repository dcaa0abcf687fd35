"""Flux of a rotor through one layer of real coil copper, against magpylib.

Reference: magpylib 6.3 (PyPI; Ortner & Coliado Bandeira, SoftwareX 11,
2020), closed-form field of homogeneously magnetised Cylinder magnets. The
flux through the closed polygon (the layer's spiral and lead, closed by a
chord) is the integral of Bz times the polygon's winding number over a
fine grid (cell midpoints, 400 x 400 over its bounding box): the flux
through each turn, counted as many times as the copper encircles it.

Input: JSON from tests/suite/rotor.rs: the rotor (poles, magnets in mm
and T), the layer height z (m), the polygon (m), rotor angles (rad) and our
flux (Wb). Fails (exit 1) when any differs by more than 2e-3.
"""
import json
import sys

import magpylib as magpy
import numpy as np


def winding(path, X, Y):
    """Winding number of the closed polygon `path` about each grid point."""
    w = np.zeros(X.shape)
    P = np.asarray(path)
    Q = np.roll(P, -1, axis=0)
    for (ax, ay), (bx, by) in zip(P, Q):
        a = np.arctan2(ay - Y, ax - X)
        b = np.arctan2(by - Y, bx - X)
        d = b - a
        d = (d + np.pi) % (2 * np.pi) - np.pi
        w += d
    return np.rint(w / (2 * np.pi))


def main():
    case = json.load(open(sys.argv[1]))
    r = case["rotor"]
    poles, t = case["poles"], r["thickness"] * 1e-3
    rp, gap, br = r["pitch_diameter"] * 0.5e-3, r["gap"] * 1e-3, r["remanence"]
    d = r["magnet"]["diameter"] * 1e-3
    path = np.array(case["path"])
    lo, hi = path.min(axis=0), path.max(axis=0)
    n = 400
    xs = lo[0] + (np.arange(n) + 0.5) * (hi[0] - lo[0]) / n
    ys = lo[1] + (np.arange(n) + 0.5) * (hi[1] - lo[1]) / n
    X, Y = np.meshgrid(xs, ys, indexing="ij")
    dA = (hi[0] - lo[0]) * (hi[1] - lo[1]) / n / n
    W = winding(path, X, Y)
    inside = W != 0
    worst = 0.0
    for theta, ours in zip(case["thetas"], case["ours"]):
        col = magpy.Collection()
        for k in range(poles):
            sign = 1.0 if k % 2 == 0 else -1.0
            m = magpy.magnet.Cylinder(
                polarization=(0, 0, sign * br), dimension=(d, t), position=(rp, 0, gap + t / 2)
            )
            m.rotate_from_angax(360.0 * k / poles + np.degrees(theta), "z", anchor=0)
            col.add(m)
        pts = np.stack([X[inside], Y[inside], np.full(inside.sum(), case["z"])], axis=-1)
        bz = col.getB(pts)[:, 2]
        ref = float(np.sum(bz * W[inside]) * dA)
        diff = abs(ours / ref - 1)
        worst = max(worst, diff)
        print(f"theta {theta:.2f}: ours {ours:.6e} Wb, magpylib {ref:.6e} Wb ({diff:.1e})")
    print("ok" if worst < 2e-3 else "FAILED")
    sys.exit(0 if worst < 2e-3 else 1)


main()
