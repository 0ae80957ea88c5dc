//! Saturating sphere in a uniform field by the hp model: Newton's method with p-continuation.
//!
//! Source: an ellipsoid of an isotropic single-valued material in a uniform field H0 is
//! magnetised uniformly, its interior field solving H_in + N·M(H_in) = H0 on the
//! demagnetizing load line (references.md §2, "nonlinear ellipsoid"; the sphere, N = 1/3, is
//! Jackson, *Classical Electrodynamics*, 3rd ed., §5.10–5.11 [section numbers from memory]);
//! the arctangent law's check values are references.md §7 check #9 (J = 1.447696 T at
//! μ0H0 = 0.5 T for Js = 1.5 T, μri = 1000), evaluated here by the scalar root
//! (`axicore_formulas::nonlinear_ellipsoid_h_in`). The moment is then m = V·M(H_in).

use axicore::case::parse_case;
use axicore::hp_geometry::discretise_hp;
use axicore_formulas as reference;
use axicore_solver::hp::adapt::raise_degree;
use axicore_solver::hp::curved_edges::CurvedEdge;
use axicore_solver::hp::HpModel;
use axicore_solver::problem::Problem;
use axicore_solver::NewtonSettings;

const JS: f64 = 1.5;
const MU_RI: f64 = 1000.0;
const A: f64 = 0.010;

fn sphere(b0_t: f64, law: &str) -> (Problem, Vec<CurvedEdge>) {
    let toml = format!(
        r#"
[core]
shape = "sphere"
diameter = "20 mm"
{law}
[background]
b_axial = "{b0_t} T"
[mesh]
fineness = 1
"#
    );
    let case = parse_case(&toml, "test case").unwrap_or_else(|e| panic!("{e}"));
    discretise_hp(&case).unwrap_or_else(|e| panic!("{e}"))
}

fn arctan_law() -> String {
    format!("[core.law]\nkind = \"arctan\"\nsaturation = \"{JS} T\"\ninitial_mu_r = {MU_RI}")
}

/// The exact moment of the arctangent sphere at μ0H0 = `b0_t`, A·m².
fn exact_moment(b0_t: f64) -> f64 {
    let m_of_h = |h: f64| reference::arctan_law_j(h, JS, MU_RI) / reference::MU0;
    let h_in = reference::nonlinear_ellipsoid_h_in(b0_t / reference::MU0, 1.0 / 3.0, m_of_h);
    4.0 / 3.0 * std::f64::consts::PI * A.powi(3) * m_of_h(h_in)
}

#[test]
fn explore() {
    for b0 in [0.1, 0.5, 1.0] {
        let (problem, curved) = sphere(b0, &arctan_law());
        let want = exact_moment(b0);
        let nt = problem.mesh.triangles.len();
        let mut prev: Option<(HpModel, axicore_solver::hp::HpSolution)> = None;
        for p in 1..=8u32 {
            let model = HpModel::new(problem.clone(), &vec![p; nt], curved.clone()).unwrap();
            let cold = model.solve_nonlinear(&NewtonSettings::default(), None).map(|r| r.1.iterations);
            let (sol, rep) = model
                .solve_nonlinear(&NewtonSettings::default(), prev.as_ref().map(|(m, s)| (m, s)))
                .unwrap();
            let ext = model.exterior_moment(&sol).unwrap();
            println!(
                "B0 {b0} p {p}: eq {} it {} (cold {:?}) ext {:.2e} src {:.2e}",
                model.equations(),
                rep.iterations,
                cold,
                (ext - want) / want,
                (sol.source_moment - want) / want
            );
            prev = Some((model, sol));
        }
    }
}
