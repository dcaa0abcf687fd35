"""Independent 2-D finite-element checks of coilwright's frequency physics
(issue 15), with scikit-fem (P2 triangles on a tensor mesh graded towards
the copper's surfaces; scipy's sparse direct solver).

Reads one JSON object on standard input:

  {"skin": [{"aspect": a, "x": x, "ours": [skin, across, along]}, ...],
   "pairs": [{"w": w, "s": s, "t": t, "er": er, "ours": C_per_m}, ...],
   "facing": [{"w": w, "h": h, "t": t, "er": er, "ours": C_per_m}, ...],
   "array": [{"w": w, "s": s, "t": t, "er": er, "n": n, "ours": E_per_m}, ...],
   "sections": [{"traces": [[x0, x1, y0, y1, volt], ...], "slab": h or null,
                 "er": er, "ours": E_per_m}, ...]}

* skin: one rectangular conductor (thickness 1, width `aspect`, rho = 1,
  mu0 = 1, omega = 2 x^2, so x = t / delta) in a large box (A = 0 on its
  edge): the current-diffusion equation -lap A = J, J = -j omega A + E in
  the copper with the total current fixed (E a free constant), gives
  R_ac / R_dc; the same conductor in a uniform outside field (reaction
  potential zero on the box) gives the eddy loss over rho H^2 for a field
  across the thickness and along the width.
* pairs: two coplanar traces (width w, gap s, thickness t, metres) on a
  dielectric of permittivity er filling the half space below their lower
  face, air above; +1/2 and -1/2 volt; C = 2 W / V^2 per metre.
* facing: two traces of width w on top of each other, h apart, in a
  dielectric layer of er that fills the gap across the whole box; air
  elsewhere.
* array: n coplanar traces with voltages -1/2, ..., 1/2 in equal steps (a
  winding's linear voltage; no ground), energy per metre.
* sections: any traces (metres, volts) on a dielectric of er: with "slab"
  h the dielectric fills |y| < h/2 (two copper layers on its faces, air
  beyond), without it the half space y < 0; energy per metre.

Prints JSON with the finite-element values beside ours; exits 1 when a
skin value differs by more than 5 % or a capacitance or energy by more
than 10 %.

Usage: section_fem.py < cases.json
"""

import json
import sys

import numpy as np
from scipy.sparse.linalg import spsolve, splu
from skfem import Basis, BilinearForm, ElementTriP2, LinearForm, MeshTri
from skfem.helpers import dot, grad

EPS0 = 8.8541878188e-12


def graded(edges, fine, far, grow=1.3):
    """Coordinates through every value in `edges`, cells at most `fine`
    next to them and growing by `grow` away from them, out to +-far."""
    pts = set()
    key = sorted(set(edges) | {-far, far})
    for a, b in zip(key[:-1], key[1:]):
        # Grow from both ends towards the middle.
        left, right = [a], [b]
        h = fine
        while left[-1] + h < right[-1] - h:
            left.append(left[-1] + h)
            right.append(right[-1] - h)
            h *= grow
        pts.update(left)
        pts.update(right)
    return np.array(sorted(pts))


def mesh_for(xs, ys):
    return MeshTri.init_tensor(xs, ys)


def skin_case(aspect, x):
    delta = 1.0 / x
    fine = min(delta / 4.0, 0.05)
    box = 10.0 * max(aspect, 1.0)
    xs = graded([-aspect / 2, aspect / 2, 0.0], fine, box)
    ys = graded([-0.5, 0.5, 0.0], fine, box)
    m = mesh_for(xs, ys)
    basis = Basis(m, ElementTriP2())
    inside = lambda X, Y: (np.abs(X) < aspect / 2 + 1e-12) & (np.abs(Y) < 0.5 + 1e-12)

    @BilinearForm
    def lap(u, v, w):
        return dot(grad(u), grad(v))

    @BilinearForm
    def mass_c(u, v, w):
        return u * v * inside(w.x[0], w.x[1])

    @LinearForm
    def one_c(v, w):
        return v * inside(w.x[0], w.x[1])

    @LinearForm
    def xa(v, w):
        return v * w.x[0] * inside(w.x[0], w.x[1])

    @LinearForm
    def ya(v, w):
        return v * w.x[1] * inside(w.x[0], w.x[1])

    K = lap.assemble(basis).tocsr()
    M = mass_c.assemble(basis).tocsr()
    b = one_c.assemble(basis)
    omega = 2.0 * x * x
    free = basis.complement_dofs(basis.get_dofs())
    Kf = K[free][:, free]
    Mf = M[free][:, free]
    bf = b[free]
    Z = splu((Kf + 1j * omega * Mf).tocsc(), permc_spec="MMD_AT_PLUS_A")
    area = aspect * 1.0
    # Skin: Z A = E b and -j w b^T A + area E = 1, so A = E y with
    # Z y = b and E = 1 / (area - j w b^T y).
    y = Z.solve(bf.astype(complex))
    e0 = 1.0 / (area - 1j * omega * (bf @ y))
    A = np.zeros(basis.N, dtype=complex)
    A[free] = e0 * y
    # Loss = int |-j w A + E|^2 over the copper = w^2 A^H M A - 2 Re(...) + |E|^2 area.
    jwA = 1j * omega * A
    loss = np.real(
        np.conj(jwA) @ (M @ jwA) - 2 * np.real(np.conj(e0) * (b @ jwA)) + abs(e0) ** 2 * area
    )
    skin = loss / (1.0 / area)
    out = [float(skin)]
    # Eddy loss in a unit outside field: A_ext = -x (field across the
    # thickness) or +y (along the width); A = A_ext + A_r, A_r = 0 on the box.
    for load, sign in ((xa, -1.0), (ya, 1.0)):
        f = load.assemble(basis)
        rhs = -1j * omega * sign * f[free]
        ar = Z.solve(rhs)
        Ar = np.zeros(basis.N, dtype=complex)
        Ar[free] = ar
        # int |w (A_ext + A_r)|^2 = w^2 (int A_ext^2 + 2 Re int A_ext A_r + A_r^H M A_r)
        ext2 = aspect**3 / 12.0 if sign < 0 else aspect / 12.0
        cross = np.real(sign * (f @ Ar))
        loss = omega**2 * (ext2 + 2 * cross + np.real(np.conj(Ar) @ (M @ Ar)))
        out.append(float(loss))
    return out


def electrostatic(traces, er_region, box, fine):
    """traces: list of (x0, x1, y0, y1, volt) in metres; er_region(X, Y)
    gives the relative permittivity. Returns the energy per metre, J/m."""
    xe = [v for t in traces for v in t[:2]]
    ye = [v for t in traces for v in t[2:4]] + [0.0]
    xs = graded(xe, fine, box)
    ys = graded(ye, fine, box)
    m = mesh_for(xs, ys)
    basis = Basis(m, ElementTriP2())

    @BilinearForm
    def lap(u, v, w):
        return er_region(w.x[0], w.x[1]) * dot(grad(u), grad(v))

    K = lap.assemble(basis).tocsr()
    X, Y = basis.doflocs
    phi = np.zeros(basis.N)
    fixed = np.zeros(basis.N, dtype=bool)
    tol = 1e-12
    for x0, x1, y0, y1, volt in traces:
        sel = (X >= x0 - tol) & (X <= x1 + tol) & (Y >= y0 - tol) & (Y <= y1 + tol)
        phi[sel] = volt
        fixed |= sel
    bnd = basis.get_dofs().flatten()
    fixed[bnd] = True  # phi = 0 far away
    free = np.where(~fixed)[0]
    fix = np.where(fixed)[0]
    rhs = -K[free][:, fix] @ phi[fix]
    phi[free] = splu(K[free][:, free].tocsc(), permc_spec="MMD_AT_PLUS_A").solve(rhs)
    return 0.5 * EPS0 * float(phi @ (K @ phi))


def pair_case(w, s, t, er):
    size = 2 * w + s
    traces = [(-s / 2 - w, -s / 2, 0.0, t, 0.5), (s / 2, s / 2 + w, 0.0, t, -0.5)]
    er_region = lambda X, Y: np.where(Y < 0.0, er, 1.0)
    energy = electrostatic(traces, er_region, 40 * size, min(s, t, w) / 6)
    return 2 * energy


def facing_case(w, h, t, er):
    traces = [(-w / 2, w / 2, h / 2, h / 2 + t, 0.5), (-w / 2, w / 2, -h / 2 - t, -h / 2, -0.5)]
    er_region = lambda X, Y: np.where(np.abs(Y) < h / 2, er, 1.0)
    energy = electrostatic(traces, er_region, 40 * (w + h), min(h, t, w) / 6)
    return 2 * energy


def array_case(w, s, t, er, n):
    p = w + s
    traces = [(k * p - w / 2, k * p + w / 2, 0.0, t, k / (n - 1) - 0.5) for k in range(n)]
    er_region = lambda X, Y: np.where(Y < 0.0, er, 1.0)
    # Shift the middle to x = 0 is not needed: the box is wide.
    energy = electrostatic(traces, er_region, 40 * n * p, min(s, t, w) / 6)
    return energy


def section_case(traces, slab, er):
    if slab is None:
        er_region = lambda X, Y: np.where(Y < 0.0, er, 1.0)
    else:
        er_region = lambda X, Y: np.where(np.abs(Y) < slab / 2, er, 1.0)
    xs = [v for t in traces for v in t[:2]]
    dims = [t[1] - t[0] for t in traces] + [t[3] - t[2] for t in traces]
    gaps = [b - a for a, b in zip(sorted(set(xs))[:-1], sorted(set(xs))[1:])]
    fine = min(dims + gaps + ([slab] if slab else [])) / 6
    box = 40 * (max(xs) - min(xs) + (slab or 0.0))
    return electrostatic([tuple(t) for t in traces], er_region, box, fine)


def main():
    cases = json.load(sys.stdin)
    report = {"skin": [], "pairs": [], "facing": [], "array": [], "sections": []}
    bad = []
    for c in cases.get("skin", []):
        fem = skin_case(c["aspect"], c["x"])
        rel = [o / f - 1.0 for o, f in zip(c["ours"], fem)]
        report["skin"].append({**c, "fem": fem, "relative": rel})
        if any(abs(r) > 0.05 for r in rel):
            bad.append(("skin", c, fem))
    cases_by = (
        ("pairs", pair_case),
        ("facing", facing_case),
        ("array", array_case),
        ("sections", section_case),
    )
    for name, fn in cases_by:
        for c in cases.get(name, []):
            args = {k: v for k, v in c.items() if k != "ours"}
            fem = fn(**args)
            rel = c["ours"] / fem - 1.0
            report[name].append({**c, "fem": fem, "relative": rel})
            if abs(rel) > 0.10:
                bad.append((name, c, fem))
    print(json.dumps(report, indent=1))
    if bad:
        print("outside tolerance:", bad, file=sys.stderr)
        sys.exit(1)


if __name__ == "__main__":
    main()
