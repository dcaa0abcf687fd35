"""Independent check of coilwright's mutual inductance of two coils (issue 15).

Reads a JSON file with coil A's copper as straight current segments (m,
with each segment's share of the current) and coil B's turns as coaxial
rings (radius, height, signed fraction of a turn), computes the magnetic
field of A with magpylib (`magpylib.func.polyline_field`, Biot-Savart of
straight segments) on a polar grid at each of B's ring heights, and
integrates Bz over each ring's disc: the flux linkage of B per ampere in
A is the mutual inductance, M = sum_i frac_i * flux_i (Faraday; Neumann's
formula is the same quantity written as a line integral).

A different method from coilwright's (field and surface integral instead of
Neumann's double line integral or Maxwell's elliptic integrals). Prints
JSON {"mutual_h": ...}.

Usage: coupling_flux.py INPUT.json
"""

import json
import sys

import numpy as np
from magpylib.func import polyline_field


def bz_on(points, starts, ends, currents, chunk=40):
    """Bz of every segment summed at `points` (n, 3), tesla per ampere."""
    total = np.zeros(len(points))
    n = len(points)
    for k in range(0, len(starts), chunk):
        s, e, c = starts[k : k + chunk], ends[k : k + chunk], currents[k : k + chunk]
        m = len(s)
        obs = np.tile(points, (m, 1))
        b = polyline_field(
            "B",
            observers=obs,
            segments_start=np.repeat(s, n, axis=0),
            segments_end=np.repeat(e, n, axis=0),
            currents=np.repeat(c, n),
        )
        total += b[:, 2].reshape(m, n).sum(axis=0)
    return total


def main():
    data = json.load(open(sys.argv[1]))
    seg = np.array(data["segments"], dtype=float)
    starts, ends, currents = seg[:, 0:3], seg[:, 3:6], seg[:, 6]
    rings = np.array(data["rings"], dtype=float)
    rmax = rings[:, 0].max()
    # Radial nodes: Gauss-Legendre on panels between 0, the ring radii and
    # rmax, so every disc's edge is a panel edge; 48 angles (periodic
    # trapezoid, spectrally accurate for the smooth angular variation).
    edges = np.unique(np.concatenate([[0.0], rings[:, 0]]))
    gx, gw = np.polynomial.legendre.leggauss(12)
    nphi = 48
    phi = 2 * np.pi * np.arange(nphi) / nphi
    mutual = 0.0
    for z in np.unique(rings[:, 1]):
        rho, w, panel = [], [], []
        for p, (a, b) in enumerate(zip(edges[:-1], edges[1:])):
            h, c = (b - a) / 2, (b + a) / 2
            rho.extend(c + h * gx)
            w.extend(h * gw)
            panel.extend([p] * len(gx))
        rho, w, panel = np.array(rho), np.array(w), np.array(panel)
        rr, pp = np.meshgrid(rho, phi, indexing="ij")
        pts = np.stack([rr * np.cos(pp), rr * np.sin(pp), np.full(rr.shape, z)], axis=-1)
        bz = bz_on(pts.reshape(-1, 3), starts, ends, currents).reshape(rr.shape)
        # Flux through each annular panel, then cumulative to each edge.
        ring_flux = (bz.mean(axis=1) * 2 * np.pi * rho * w)
        per_panel = np.bincount(panel, weights=ring_flux, minlength=len(edges) - 1)
        cum = np.concatenate([[0.0], np.cumsum(per_panel)])
        for r, rz, frac in rings:
            if rz != z:
                continue
            i = int(np.argmin(np.abs(edges - r)))
            mutual += frac * cum[i]
    print(json.dumps({"mutual_h": mutual}))


if __name__ == "__main__":
    main()
