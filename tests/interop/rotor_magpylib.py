"""Checks coilwright's rotor field and flux linkage against magpylib.

Reference: magpylib 6.3 (PyPI; Ortner & Coliado Bandeira, SoftwareX 11,
2020): closed-form fields of homogeneously magnetised Cylinder, Cuboid and
CylinderSegment magnets. The flux through each rectangular loop is the
integral of magpylib's Bz over the rectangle by a Gauss-Legendre product
rule (numpy.polynomial.legendre), 4 panels of 8 points each way.

Input: a JSON file written by tests/suite/rotor.rs with, per rotor, its
design values (mm, T), the bottom copper height (m), our field at points
(m, T) and our flux through loops (Wb) at rotor angles (rad).
Fails (exit 1) when a field differs by more than 1e-3 of the largest field
or a flux by more than 1e-3 relative (the issue asks for 2 %).
"""
import json
import sys

import magpylib as magpy
import numpy as np


def magnets(poles, rotor, bottom):
    t = rotor["thickness"] * 1e-3
    br, gap = rotor["remanence"], rotor["gap"] * 1e-3
    rp = rotor["pitch_diameter"] * 0.5e-3
    shape = rotor["magnet"]
    col = magpy.Collection()
    for k in range(poles):
        ang = 360.0 * k / poles
        sign = 1.0 if k % 2 == 0 else -1.0
        pol = (0.0, 0.0, sign * br)
        zc = [gap + t / 2]
        if rotor["discs"] == 2:
            zc.append(bottom - gap - t / 2)
        for z in zc:
            if shape["magnet"] == "cylinder":
                d = shape["diameter"] * 1e-3
                m = magpy.magnet.Cylinder(polarization=pol, dimension=(d, t), position=(rp, 0, z))
                m.rotate_from_angax(ang, "z", anchor=0)
            elif shape["magnet"] == "block":
                m = magpy.magnet.Cuboid(
                    polarization=pol,
                    dimension=(shape["length"] * 1e-3, shape["width"] * 1e-3, t),
                    position=(rp, 0, z),
                )
                m.rotate_from_angax(ang, "z", anchor=0)
            else:
                half = shape["angle"] / 2
                m = magpy.magnet.CylinderSegment(
                    polarization=pol,
                    dimension=(
                        shape["inner_diameter"] * 0.5e-3,
                        shape["outer_diameter"] * 0.5e-3,
                        t,
                        ang - half,
                        ang + half,
                    ),
                    position=(0, 0, z),
                )
            col.add(m)
    return col


def flux(col, rect, z, theta):
    x0, y0, x1, y1 = rect
    gx, gw = np.polynomial.legendre.leggauss(8)
    def nodes(a, b):
        edges = np.linspace(a, b, 5)
        xs, ws = [], []
        for lo, hi in zip(edges[:-1], edges[1:]):
            xs.append((lo + hi) / 2 + (hi - lo) / 2 * gx)
            ws.append((hi - lo) / 2 * gw)
        return np.concatenate(xs), np.concatenate(ws)
    xs, wx = nodes(x0, x1)
    ys, wy = nodes(y0, y1)
    X, Y = np.meshgrid(xs, ys, indexing="ij")
    # The rotor turned by theta is the loop turned by -theta.
    c, s = np.cos(-theta), np.sin(-theta)
    P = np.stack([c * X - s * Y, s * X + c * Y, np.full_like(X, z)], axis=-1).reshape(-1, 3)
    bz = col.getB(P)[:, 2].reshape(X.shape)
    return float(np.einsum("i,j,ij->", wx, wy, bz))


def main():
    cases = json.load(open(sys.argv[1]))
    worst_b, worst_f = 0.0, 0.0
    for case in cases:
        col = magnets(case["poles"], case["rotor"], case["bottom"])
        pts = np.array([p["at"] for p in case["points"]])
        ours = np.array([p["b"] for p in case["points"]])
        ref = col.getB(pts)
        scale = np.abs(ref).max()
        db = np.abs(ours - ref).max() / scale
        worst_b = max(worst_b, db)
        for lp in case["loops"]:
            ref_f = flux(col, lp["rect"], lp["z"], lp["theta"])
            df = abs(lp["flux"] - ref_f) / max(abs(ref_f), 1e-12)
            worst_f = max(worst_f, df)
            print(f'{case["rotor"]["magnet"]["magnet"]:8s} theta {lp["theta"]:.1f}: ours {lp["flux"]:.6e} magpylib {ref_f:.6e} ({df:.1e})')
        print(f'{case["rotor"]["magnet"]["magnet"]:8s} field: largest difference {db:.1e} of {scale:.3f} T')
    ok = worst_b < 1e-3 and worst_f < 1e-3
    print(f"worst field {worst_b:.1e}, worst flux {worst_f:.1e}: {'ok' if ok else 'FAILED'}")
    sys.exit(0 if ok else 1)


main()
