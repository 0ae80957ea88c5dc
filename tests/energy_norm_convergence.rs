//! First-order elements converge like h, second-order ones like h², in the energy norm, on an
//! analytic solution.
//!
//! Source: the permeable sphere in a uniform field (Jackson, *Classical Electrodynamics*, 3rd
//! ed., §5.11 [section number from memory]): inside B = 3μr/(μr + 2)·B0 e_z; outside B0 e_z
//! plus the field of the dipole m = 4πa³(μr − 1)/(μr + 2)·H0. The energy-norm error (∫ ν |B_h − B|² dV)^½ of conforming
//! first-order elements is O(h) for such a smooth solution (Ciarlet, *The Finite Element Method
//! for Elliptic Problems*, 1978, Theorem 3.2.2), i.e. O(N^(−1/2)) in the number of unknowns N
//! on quasi-uniformly refined meshes. Sketch: μr = 10 (a moderate jump, so the field outside
//! matters as much as inside), a = 10 mm, B0 = 1 mT, fineness 1, 2, 4, the exact exterior.
//! The fitted slope of log(error) against log(N) must lie in −0.5 ± 0.15 for first order and
//! −1 ± 0.15 for second order (fineness 1, 2, 4 each; second-order elements are twice the size
//! of first-order ones at the same fineness).

use axicore::case::parse_case;
use axicore::pipeline::discretise;
use axicore_solver::Model;

const MU0: f64 = 4.0e-7 * std::f64::consts::PI;

fn exact_b(r: f64, z: f64, a: f64, mu_r: f64, b0: f64) -> [f64; 2] {
    let rr = r.hypot(z);
    if rr < a {
        return [0.0, 3.0 * mu_r / (mu_r + 2.0) * b0];
    }
    let m = 4.0 * std::f64::consts::PI * a.powi(3) * (mu_r - 1.0) / (mu_r + 2.0) * b0 / MU0;
    let c = MU0 * m / (4.0 * std::f64::consts::PI);
    [
        c * 3.0 * z * r / rr.powi(5),
        b0 + c * (3.0 * z * z / (rr * rr) - 1.0) / rr.powi(3),
    ]
}

/// (unknowns, energy-norm error) at fineness `f` and element order `order`.
fn error_at(f: f64, order: usize) -> (usize, f64) {
    let (a, mu_r, b0) = (0.010, 10.0, 1e-3);
    let case = parse_case(
        &format!(
            "[core]\nshape = \"sphere\"\ndiameter = \"20 mm\"\nmu_r = {mu_r}\n[background]\nb_axial = \"1 mT\"\n[mesh]\nfineness = {f}\norder = {order}\n"
        ),
        "energy norm",
    )
    .unwrap();
    let model = Model::new(discretise(&case).unwrap().problem).unwrap();
    let sol = model.linear_operator().unwrap().solve_problem();
    let mut e2 = 0.0;
    for (e, g) in model.geometry().iter().enumerate() {
        let nu = model.material(e).nu(0.0);
        for q in &g.qp {
            let bh = sol.b_q(&model, e, q);
            let b = exact_b(q.r, q.z, a, mu_r, b0);
            e2 += nu * ((bh[0] - b[0]).powi(2) + (bh[1] - b[1]).powi(2)) * q.dv;
        }
    }
    (model.unknowns(), e2.sqrt())
}

/// Least-squares slope of ln(error) against ln(N) over the finenesses `fs`.
fn slope(fs: &[f64], order: usize) -> (f64, Vec<(f64, f64)>) {
    let pts: Vec<(f64, f64)> = fs
        .iter()
        .map(|&f| {
            let (n, e) = error_at(f, order);
            ((n as f64).ln(), e.ln())
        })
        .collect();
    let k = pts.len() as f64;
    let (sx, sy) = pts.iter().fold((0.0, 0.0), |s, p| (s.0 + p.0, s.1 + p.1));
    let (mx, my) = (sx / k, sy / k);
    let slope = pts.iter().map(|p| (p.0 - mx) * (p.1 - my)).sum::<f64>()
        / pts.iter().map(|p| (p.0 - mx).powi(2)).sum::<f64>();
    (slope, pts)
}

#[test]
fn energy_norm_error_of_first_order_elements_falls_like_h() {
    let (slope, pts) = slope(&[1.0, 2.0, 4.0], 1);
    eprintln!("order 1: energy-norm error against unknowns: slope {slope:.3} ({pts:?})");
    assert!(
        (-0.65..=-0.35).contains(&slope),
        "slope {slope} (points {pts:?})"
    );
}

/// O(h²) = O(N^(−1)) for second-order elements (Ciarlet 1978, Thm 3.2.2 with k = 2), with
/// isoparametric curved edges on the sphere (Ciarlet 1978 §4.4 keeps the order).
#[test]
fn energy_norm_error_of_second_order_elements_falls_like_h_squared() {
    let (slope, pts) = slope(&[1.0, 2.0, 4.0], 2);
    eprintln!("order 2: energy-norm error against unknowns: slope {slope:.3} ({pts:?})");
    assert!(
        (-1.15..=-0.85).contains(&slope),
        "slope {slope} (points {pts:?})"
    );
}
