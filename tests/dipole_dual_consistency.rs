//! The dual solution of the moment functional used by the adaptive indicator is right.
//!
//! Source: for a linear core the magnetisation moment is a linear functional of the nodal
//! potential, m_core = gᵀa with g_i = ∫(ν0 − ν)B_z(φ_i) dV, and the dual z = K⁻¹g gives the same
//! number from the load, zᵀf = gᵀK⁻¹f = gᵀa (the adjoint identity behind dual-weighted error
//! estimation; Becker & Rannacher, Acta Numerica 10, 1, 2001, §2). Tolerance 1e-9 (rounding of
//! two sparse solves).

use axicore::case::parse_case;
use axicore::pipeline::discretise;
use axicore_solver::post::{dipole, indicator};
use axicore_solver::{assembly, Model};

#[test]
fn dual_of_the_moment_functional_reproduces_the_core_moment_from_the_load() {
    let case = parse_case(
        &axicore::EXAMPLE_CASE
            .replace("material = \"nickel-iron-80\"", "mu_r = 2000")
            .replace("fineness = 1.0", "fineness = 0.5"),
        "dual test",
    )
    .unwrap();
    let d = discretise(&case).unwrap();
    let model = Model::new(d.problem).unwrap();
    let op = model.linear_operator().unwrap();
    let sol = op.solve_problem();
    let j = model.problem_currents();
    let core: f64 = dipole::source_moments(&model, &sol, &j)
        .iter()
        .map(|p| p.magnetization)
        .sum();
    let z = indicator::dipole_dual(&model, &sol)
        .unwrap()
        .expect("a magnetic core");
    let zero = vec![0.0; model.mesh().nodes.len()];
    let no_magnets = vec![0.0; model.mesh().triangles.len()];
    let f = assembly::rhs(
        model.mesh(),
        model.geometry(),
        model.dofs(),
        &j,
        &no_magnets,
        &zero,
        0.0,
        |_, _| 0.0,
    );
    let from_dual: f64 = model
        .dofs()
        .free_nodes
        .iter()
        .zip(&f)
        .map(|(&n, fi)| z.a[n as usize] * fi)
        .sum();
    assert!(
        (from_dual - core).abs() <= 1e-9 * core.abs(),
        "zᵀf = {from_dual} vs m_core = {core}"
    );
}
