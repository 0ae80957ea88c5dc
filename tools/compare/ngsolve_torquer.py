"""The torquer case of issue 13 scripted with NGSolve (a general-purpose finite-element library).

Geometry (lengths in mm inside this file): a linear rod r < 4, |z| < 35, mu_r 5000; a winding
4.5 < r < 5.5, |z| < 30, 1200 turns at 50 mA (1 A/mm^2); free space beyond.

Formulation (our choice, written from the library's documented Python API): the unknown is
u = A_phi / r. With A = r u the flux density is B_r = -r du/dz, B_z = (1/r) d(r A)/dr =
2u + r du/dr, so the r-weighted energy (1/2) int nu |B|^2 r dr dz has no 1/r anywhere, u is
smooth (even in r) on the axis, and no axis condition is needed: the integrand is a polynomial
on straight elements and is integrated exactly (bonus quadrature order for the r^3 weight).

Far boundary: the meshed region is a half disc rho < R0 (rho^2 = r^2 + z^2), curved to order p.
Outside it, A = sum_n a_n (R0/rho)^(n+1) P_n^1(cos theta); the exterior energy adds, per mode n,
k_n l_n(A) l_n(A') with l_n(A) = int_0^pi A(R0, theta) P_n^1(cos theta) sin theta d theta and
k_n = nu0 R0 (2n + 1) / (2 (n + 1)) (per radian of azimuth), derived from B_theta = n A / R0 on
the sphere for mode n. Modes n = 1, 3, ..., N_ODD (the case is symmetric in z, so even modes
carry only discretisation noise; the script measures the truncation). The rank-K term is added
to the factorised sparse matrix by the Woodbury identity (K extra solves on the condensed system).

Moment: the exterior dipole coefficient, m = 3 pi R0^2 l_1(A) / mu0 (A_phi = mu0 m sin(theta) /
(4 pi rho^2) outside), checked against m_winding + int M_z dV (the volume route).
"""

import contextlib
import math
import time

import numpy as np
from netgen.geom2d import SplineGeometry
import ngsolve as ngs

MU0 = 4e-7 * math.pi
CORE_R, CORE_HALF = 4.0, 35.0
WIND_R1, WIND_R2, WIND_HALF = 4.5, 5.5, 30.0
MU_R = 5000.0
TURNS, CURRENT = 1200, 0.05
J_MM2 = TURNS * CURRENT / ((WIND_R2 - WIND_R1) * 2 * WIND_HALF)  # A/mm^2
# Winding moment (1/2) int r x J dV = pi J L (r2^3 - r1^3) / 3, in SI.
WINDING_MOMENT = (
    math.pi * J_MM2 * 1e6 * (2 * WIND_HALF * 1e-3) * ((WIND_R2 * 1e-3) ** 3 - (WIND_R1 * 1e-3) ** 3) / 3
)

# Base meshes: element sizes (mm) in the air, the core and the winding.
BASES = {
    "coarse": dict(air=30.0, core=4.0, winding=1.0),
    "medium": dict(air=15.0, core=2.0, winding=0.5),
}


def geometry(radius, base):
    """Half disc rho < radius with core and winding; corners of both marked for hp refinement."""
    g = SplineGeometry()

    def pt(r, z, hp=0):
        return g.AppendPoint(r, z, hpref=hp)

    a0, a1, a2, a3 = pt(0, -radius), pt(0, -CORE_HALF), pt(0, CORE_HALF), pt(0, radius)
    c1, c2 = pt(CORE_R, -CORE_HALF, 1), pt(CORE_R, CORE_HALF, 1)
    w1, w2 = pt(WIND_R1, -WIND_HALF, 1), pt(WIND_R2, -WIND_HALF, 1)
    w3, w4 = pt(WIND_R2, WIND_HALF, 1), pt(WIND_R1, WIND_HALF, 1)
    q1, q2, q3 = pt(radius, -radius), pt(radius, 0), pt(radius, radius)
    # domains: 1 core, 2 winding, 3 air (left/right seen walking along each segment)
    g.Append(["line", a0, a1], leftdomain=0, rightdomain=3, bc="axis")
    g.Append(["line", a1, a2], leftdomain=0, rightdomain=1, bc="axis")
    g.Append(["line", a2, a3], leftdomain=0, rightdomain=3, bc="axis")
    for s, e in ((a1, c1), (c1, c2), (c2, a2)):
        g.Append(["line", s, e], leftdomain=1, rightdomain=3)
    for s, e in ((w1, w2), (w2, w3), (w3, w4), (w4, w1)):
        g.Append(["line", s, e], leftdomain=2, rightdomain=3)
    g.Append(["spline3", a3, q3, q2], leftdomain=0, rightdomain=3, bc="far")
    g.Append(["spline3", q2, q1, a0], leftdomain=0, rightdomain=3, bc="far")
    g.SetMaterial(1, "core")
    g.SetMaterial(2, "winding")
    g.SetMaterial(3, "air")
    g.SetDomainMaxH(1, base["core"])
    g.SetDomainMaxH(2, base["winding"])
    return g


def legendre_derivative(n, t):
    """P_n'(t) as a coefficient function, by P'_{k+1} = P'_{k-1} + (2k + 1) P_k."""
    p = [ngs.CoefficientFunction(1.0), t]
    dp = [ngs.CoefficientFunction(0.0), ngs.CoefficientFunction(1.0)]
    for k in range(1, n):
        p.append(((2 * k + 1) * t * p[k] - k * p[k - 1]) / (k + 1))
        dp.append(dp[k - 1] + (2 * k + 1) * p[k])
    return dp[n]


def solve(p, levels, factor, base="coarse", radius=105.0, n_odd=11, volume_check=False, threads=True):
    """One complete run: mesh, hp grading, assembly, solve, moment. Returns a dict (SI moment)."""
    g = geometry(radius, BASES[base])
    mesh = ngs.Mesh(g.GenerateMesh(maxh=BASES[base]["air"]))
    if levels > 0:
        mesh.RefineHP(levels, factor)
    mesh.Curve(max(p, 2))
    fes = ngs.H1(mesh, order=p)
    u, v = fes.TnT()
    r, z = ngs.x, ngs.y
    nu = mesh.MaterialCF({"core": 1.0 / MU_R}, default=1.0)  # mu0 * nu
    a = ngs.BilinearForm(fes, symmetric=True, condense=True)
    a += (
        nu
        * (r * r * ngs.grad(u)[1] * ngs.grad(v)[1] + (r * ngs.grad(u)[0] + 2 * u) * (r * ngs.grad(v)[0] + 2 * v))
        * r
        * ngs.dx(bonus_intorder=3)
    )
    f = ngs.LinearForm(fes)
    f += MU0 * J_MM2 * r * r * v * ngs.dx(definedon=mesh.Materials("winding"), bonus_intorder=3)
    modes = list(range(1, n_odd + 1, 2))
    ells = []
    for n in modes:
        ell = ngs.LinearForm(fes)
        # l_n(A) with A = r u on rho = R0: sin^2(theta) P_n'(cos theta) d theta, d theta = ds / R0
        ell += (r * v) * (r / radius) ** 2 * legendre_derivative(n, z / radius) / radius * ngs.ds(
            definedon=mesh.Boundaries("far"), bonus_intorder=n + 3
        )
        ells.append(ell)
    with ngs.TaskManager() if threads else contextlib.nullcontext():
        a.Assemble()
        f.Assemble()
        for ell in ells:
            ell.Assemble()
        inv = a.mat.Inverse(fes.FreeDofs(True), inverse="sparsecholesky")
        rhs = f.vec.CreateVector()
        rhs.data = f.vec
        rhs.data += a.harmonic_extension_trans * rhs
        y0 = rhs.CreateVector()
        y0.data = inv * rhs
        zs = []
        for ell in ells:  # boundary functionals live on the condensed (skeleton) unknowns
            zk = ell.vec.CreateVector()
            zk.data = inv * ell.vec
            zs.append(zk)
    k = len(modes)
    gram = np.array([[ngs.InnerProduct(ells[i].vec, zs[j]) for j in range(k)] for i in range(k)])
    kappa = np.array([radius * (2 * n + 1) / (2 * (n + 1)) for n in modes])  # mu0 * k_n (mm)
    uy = np.array([ngs.InnerProduct(ell.vec, y0) for ell in ells])
    coef = np.linalg.solve(np.diag(1.0 / kappa) + gram, uy)
    ell1 = uy[0] - gram[0] @ coef
    moment = 3 * math.pi * (radius * 1e-3) ** 2 * ell1 / MU0
    out = dict(moment=moment, ndof=fes.ndof, condensed=int(sum(fes.FreeDofs(True))), elements=mesh.ne)
    if volume_check:
        x = y0.CreateVector()
        x.data = y0
        for j in range(k):
            x.data -= coef[j] * zs[j]
        x.data += a.harmonic_extension * x
        x.data += a.inner_solve * f.vec
        gf = ngs.GridFunction(fes)
        gf.vec.data = x
        bz = 2 * gf + r * ngs.grad(gf)[0]
        core = ngs.Integrate(bz * r, mesh, definedon=mesh.Materials("core"), order=2 * p + 4)
        out["moment_volume"] = WINDING_MOMENT + (MU_R - 1) / MU_R / MU0 * 2 * math.pi * 1e-6 * core
    return out


def timed(setup, runs):
    """Best wall time of `runs` complete runs (mesh + assembly + solve + moment) in this process."""
    best, result = math.inf, None
    for _ in range(runs):
        t0 = time.perf_counter()
        result = solve(**setup)
        best = min(best, time.perf_counter() - t0)
    return best, result
