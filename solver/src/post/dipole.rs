//! Magnetic dipole moment, by two independent routes.
//!
//! 1. **Sources**: m = ∫ (r/2) J_φ dV + ∫ M_z dV, the moment of the currents plus the moment
//!    of the magnetisation M = B/μ0 − H (Jackson, *Classical Electrodynamics*, 3rd ed., eq. 5.54
//!    and §5.8–5.9 for magnetised matter). With dV = 2πr dA the current part is ∫ π r² J dA.
//!    H = ν (B − J0 e_z) includes a magnet's polarization J0, so a magnet of recoil
//!    permeability 1 contributes exactly (J0/μ0)·V, whatever the field.
//! 2. **Field**: for all sources inside a ball of radius R_s, ∫_ball B dV = (2/3) μ0 m (Jackson
//!    §5.6, eq. 5.62). The ball integral of B_z reduces to a line integral of A on its surface:
//!    ∫_ball B_z dV = 2π R_s² ∫_0^π A(R_s sinθ, R_s cosθ) sin²θ dθ. A uniform background field
//!    B0 contributes B0·V_ball. When the mesh is truncated by A = B0 r/2 on a sphere of radius
//!    R_o (a flux-excluding shell for the body's own field), the shell adds the image field
//!    −μ0 m/(2π R_o³), uniform inside, so the ball integral is (2/3)μ0 m (1 − (R_s/R_o)³)
//!    (image of a dipole in a sphere with B_n = 0; only the l = 1 image is non-zero at the
//!    centre, so this holds for any source layout).

use crate::constants::MU0;
use crate::error::SolverError;
use crate::locate::Locator;
use crate::solution::Solution;
use crate::solve::Model;

/// Moment contributions of one region tag, in A·m².
#[derive(Debug, Clone, Copy, Default, PartialEq)]
pub struct RegionMoment {
    /// From the region's currents: ∫ (r/2) J dV.
    pub current: f64,
    /// From the region's magnetisation: ∫ M_z dV.
    pub magnetization: f64,
}

/// Axial moment contributions per region tag (index = tag).
pub fn source_moments(model: &Model, sol: &Solution, j_elem: &[f64]) -> Vec<RegionMoment> {
    let mesh = model.mesh();
    let mut out = vec![RegionMoment::default(); mesh.tag_count()];
    for (e, g) in model.geometry().iter().enumerate() {
        let tag = mesh.tags[e] as usize;
        let props = model.element_props(e);
        let (mut mc, mut mm) = (0.0, 0.0);
        for q in &g.qp {
            mc += 0.5 * q.r * j_elem[e] * q.dv; // (r/2) J dV
            let b = sol.b_q(model, e, q);
            mm += props.magnetization(b)[1] * q.dv; // M_z dV = (B_z/μ0 − H_z) dV
        }
        out[tag].current += mc;
        out[tag].magnetization += mm;
    }
    out
}

/// Small-signal moment dm of a linearised response `delta` (fields per unit of the driving
/// currents `j_elem`, A/m²) about the operating point `at`: dM = dB/μ0 − dH with the
/// differential law dH = ν dB + (ν_d − ν)(b̂·dB) b̂ at the operating field B' = |B'| b̂,
/// B' = B − J0 e_z (a magnet's constant J0 drops out of dH; its law is linear anyway).
pub fn incremental_moment(model: &Model, at: &Solution, delta: &Solution, j_elem: &[f64]) -> f64 {
    let mut m = 0.0;
    for (e, g) in model.geometry().iter().enumerate() {
        let props = model.element_props(e);
        let mat = &props.material;
        for q in &g.qp {
            m += 0.5 * q.r * j_elem[e] * q.dv;
            if !mat.is_magnetic() {
                continue;
            }
            let b = props.law_b(at.b_q(model, e, q));
            let db = delta.b_q(model, e, q);
            let bm = b[0].hypot(b[1]);
            let nu = mat.nu(bm);
            let mut dh_z = nu * db[1];
            if bm > 0.0 {
                let along = (b[0] * db[0] + b[1] * db[1]) / bm;
                dh_z += (mat.nu_diff(bm) - nu) * along * b[1] / bm;
            }
            m += (db[1] / MU0 - dh_z) * q.dv;
        }
    }
    m
}

/// The moment from the ball identity on a sphere of radius `radius` centred at the origin.
///
/// `b0` is the uniform background B_z in T; `truncation_radius` is the radius of the outer
/// sphere where A = B0 r/2 is imposed (None for an unbounded exterior). The sphere must
/// enclose every current and every magnetised region, and lie inside the mesh.
pub fn ball_moment(
    model: &Model,
    sol: &Solution,
    locator: &Locator,
    radius: f64,
    b0: f64,
    truncation_radius: Option<f64>,
) -> Result<f64, SolverError> {
    // Composite 4-point Gauss–Legendre in θ; A is piecewise linear along the arc so many
    // short panels beat one high-order rule.
    const GL4: [(f64, f64); 4] = [
        (-0.861_136_311_594_052_6, 0.347_854_845_137_453_9),
        (-0.339_981_043_584_856_3, 0.652_145_154_862_546_1),
        (0.339_981_043_584_856_3, 0.652_145_154_862_546_1),
        (0.861_136_311_594_052_6, 0.347_854_845_137_453_9),
    ];
    let panels = 1024;
    let h = std::f64::consts::PI / panels as f64;
    let mut integral = 0.0;
    for k in 0..panels {
        let mid = (k as f64 + 0.5) * h;
        for (x, w) in GL4 {
            let th = mid + 0.5 * h * x;
            let p = [radius * th.sin(), radius * th.cos()];
            let (_, a, _) = sol.b_at_point(model, locator, p)?;
            integral += 0.5 * h * w * a * th.sin().powi(2);
        }
    }
    let ball_bz = 2.0 * std::f64::consts::PI * radius * radius * integral;
    let volume = 4.0 / 3.0 * std::f64::consts::PI * radius.powi(3);
    let shell = truncation_radius.map_or(1.0, |ro| 1.0 - (radius / ro).powi(3));
    Ok(1.5 * (ball_bz - b0 * volume) / (MU0 * shell))
}
