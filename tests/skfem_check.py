"""Outside check of gatehold's capacitances with scikit-fem (a general-purpose
finite-element library, PyPI `scikit-fem`): the Laplace problem of one
gate-spacer-plug geometry, solved with quadratic triangles, gives the
gate-to-plug capacitance per unit depth in units of eps0.

Geometry (nm; x along the channel, y up from the silicon surface, which is
a grounded plane at y = 0):
  plug metal   0 <= x <= XP, 0 <= y <= H        (potential 0)
  spacer       XP <= x <= XG, 0 <= y <= H       (eps_spacer)
  gate oxide   XG <= x <= XE, 0 <= y <= TOX     (eps_ox)
  gate metal   XG <= x <= XE, TOX <= y <= H     (potential 1)
Zero normal field on the top face y = H (spacer) and on x = XE (oxide; the
mid-gate symmetry plane). The charge on the plug comes from the reaction
of the assembled stiffness matrix at the plug's boundary nodes
(the weak-form flux, exact for the discrete solution).

Usage: python3 skfem_check.py XP XG XE TOX H EPS_SPACER EPS_OX
Prints one JSON object: {"c_gc_over_eps0": ..., "library": ..., "version": ...}
Exit 3 when scikit-fem is missing (the Rust caller skips unless CI is set).
"""
import json
import sys

try:
    import numpy as np
    import skfem
    from skfem import Basis, BilinearForm, ElementTriP2, MeshTri, asm, condense, solve
    from skfem.helpers import dot, grad
except ImportError as e:  # pragma: no cover
    print(f"scikit-fem not importable: {e}", file=sys.stderr)
    sys.exit(3)

xp, xg, xe, tox, h, eps_sp, eps_ox = (float(a) for a in sys.argv[1:8])


def lines(a, b, step):
    n = max(2, int(round((b - a) / step)))
    return np.linspace(a, b, n + 1)


def graded(a, b, corner, fine, coarse):
    """Points from a to b, fine near `corner` (geometric growth), at most `coarse` apart."""
    pts = {a, b}
    for c in corner:
        for sgn in (-1.0, 1.0):
            d, s = 0.0, fine
            while True:
                d += s
                x = c + sgn * d
                if x <= a or x >= b:
                    break
                pts.add(x)
                s = min(s * 1.25, coarse)
    xs = np.array(sorted(pts))
    out = [xs[0]]
    for x in xs[1:]:
        gap = x - out[-1]
        k = int(np.ceil(gap / coarse))
        for i in range(1, k + 1):
            out.append(out[-1] + gap / k) if i < k else out.append(x)
    return np.unique(np.round(np.array(out), 12))


fine, coarse = 0.01, 0.5
# One tensor mesh over the dielectric's bounding box, then the metal cut out.
xs = graded(xp, xe, [xp, xg], fine, coarse)
ys = graded(0.0, h, [0.0, tox], fine, coarse)
mesh = MeshTri.init_tensor(xs, ys)
cx, cy = mesh.p[:, mesh.t].mean(axis=1)
in_gate = (cx > xg) & (cy > tox)
mesh = mesh.remove_elements(np.nonzero(in_gate)[0])
cx, cy = mesh.p[:, mesh.t].mean(axis=1)
eps_elem = np.where(cx < xg, eps_sp, eps_ox)

basis = Basis(mesh, ElementTriP2())
eps0_basis = basis.with_element(skfem.ElementTriP0())
eps_field = eps0_basis.interpolate(eps_elem)


@BilinearForm
def laplace(u, v, w):
    return w.eps * dot(grad(u), grad(v))


K = asm(laplace, basis, eps=eps_field)
tol = 1e-9
x, y = basis.doflocs
on_plug = np.abs(x - xp) < tol
on_ground = np.abs(y) < tol
on_gate = ((np.abs(x - xg) < tol) & (y >= tox - tol)) | ((np.abs(y - tox) < tol) & (x >= xg - tol))
u = np.zeros(basis.N)
u[on_gate] = 1.0
fixed = np.nonzero(on_plug | on_ground | on_gate)[0]
u = solve(*condense(K, np.zeros(basis.N), x=u, D=fixed))
reaction = K @ u
# Charge on the plug (units eps0 * V per unit depth): the reaction at its
# nodes that are not also on another electrode (the corner (XP, 0) touches
# the grounded plane, at the same potential 0: its reaction is shared; count
# it with the plug, as gatehold counts its corner node with the plug).
q_plug = reaction[on_plug].sum()
print(json.dumps({
    "c_gc_over_eps0": -float(q_plug),
    "library": "scikit-fem",
    "version": skfem.__version__,
    "dofs": int(basis.N),
}))
