//! Cores with a prescribed uniform axial magnetization M0 (permanent magnets, `[core]
//! magnetization`): the law B = μ0 μr H + μ0 M0 e_z, μr the recoil permeability.
//!
//! Sources, cited beside each check:
//! * Uniformly magnetised sphere: J. D. Jackson, *Classical Electrodynamics*, 3rd ed., §5.10
//!   [section number from memory]: B_in = (2/3) μ0 M0, H_in = −M0/3, moment M0·V.
//! * Any ellipsoid magnetised uniformly has the uniform interior field H_in = −N·M with the
//!   demagnetizing factor N of J. A. Osborn, Phys. Rev. 67, 351 (1945) (references.md §2).
//! * Uniformly magnetised rods (χ = 0): the magnetometric and fluxmetric factors Nm, Nf in
//!   closed form (Moskowitz & Della Torre, IEEE Trans. Magn. 2, 1966; Chen, Brug & Goldfarb,
//!   IEEE Trans. Magn. 27(4), 3601, 1991; references.md §1), evaluated by
//!   `reference::rod_nm_chi0` / `rod_nf_chi0`. The FE route is the one references.md §1
//!   prescribes: Nm = 1 − ⟨B_z⟩_vol/(μ0 M0), Nf = 1 − ⟨B_z⟩_mid/(μ0 M0).
//!
//! Measured (second order): the sphere's ⟨B_z⟩ at fineness 1 / 2 / 4: 9.4e-5 / 8.5e-6 /
//! 2.8e-7; the spheroid's N at fineness 1 / 2 / 3: 6.4e-5 / 1.3e-5 / 3.4e-6; the rods' Nm and
//! Nf at fineness 1 within 2.1e-4 and 5.4e-4, at fineness 2 within 2.4e-5 and 3.9e-5.

mod common;

use axicore_formulas as reference;
use std::f64::consts::PI;

use axicore::case::parse_case;
use axicore::pipeline::{discretise, RunOptions};
use axicore_solver::export::region_points::RegionPoints;
use axicore_solver::export::vtk::{field_grid, MapLabels};
use axicore_solver::export::vtu::{DataArray, Values};
use axicore_solver::{Excitation, Model, NewtonSettings};
use common::{rel, solve};

/// M0 of every body here, A/m (about a sintered NdFeB magnet's; any value would do).
const M0: f64 = 1e6;

/// A core `shape` (the case-file lines) with magnetization M0, recoil `mu_r`, at `fineness`.
fn magnet(shape: &str, mu_r: f64, fineness: f64) -> String {
    format!(
        "title = \"magnet\"\n[core]\n{shape}\nmagnetization = \"{M0} A/m\"\nmu_r = {mu_r}\n\
         [mesh]\nfineness = {fineness}\n"
    )
}

const SPHERE: &str = "shape = \"sphere\"\ndiameter = \"20 mm\"";

#[test]
fn uniformly_magnetized_sphere_matches_jackson() {
    // Jackson §5.10 [from memory]: B_in = (2/3) μ0 M0, H_in = −M0/3, m = M0 V.
    let out = solve(
        &magnet(SPHERE, 1.0, 4.0),
        &RunOptions {
            points: vec![[0.0, 0.0], [0.005, 0.003]],
            ..Default::default()
        },
    );
    let r = &out.report;
    let c = r.core.as_ref().unwrap();
    let j0 = reference::MU0 * M0;
    // With μr = 1, M = J0/μ0 exactly: the source route is M0 times the meshed volume.
    assert!(
        rel(r.dipole_moment_Am2, M0 * c.volume_m3) < 1e-9,
        "{} vs {}",
        r.dipole_moment_Am2,
        M0 * c.volume_m3
    );
    let v = 4.0 / 3.0 * PI * 0.010f64.powi(3);
    assert!(rel(r.dipole_moment_Am2, M0 * v) < 1e-6, "curved outline");
    assert!(
        rel(r.dipole_check_Am2, M0 * v) < 1e-4,
        "field route {} vs {}",
        r.dipole_check_Am2,
        M0 * v
    );
    assert!(
        rel(c.average_b_z_T, 2.0 / 3.0 * j0) < 1e-5,
        "⟨B_z⟩ {} vs {}",
        c.average_b_z_T,
        2.0 / 3.0 * j0
    );
    for p in &r.points {
        assert!(
            rel(p.h_z_A_per_m, -M0 / 3.0) < 1e-5,
            "H_z {}",
            p.h_z_A_per_m
        );
        assert!(p.h_r_A_per_m.abs() < 1e-5 * M0, "H_r {}", p.h_r_A_per_m);
    }
    // Energy (solver/src/post/energy.rs): W = (μ0/2)∫|H|² over all space. With no free
    // currents ∫ B·H dV = 0 over all space, so W = −(μ0/2)∫ M·H dV = (μ0/2) N M0² V with
    // H_in = −N M0 (Osborn 1945), N = 1/3: W = (μ0/6) M0² V.
    let w = reference::MU0 / 6.0 * M0 * M0 * v;
    assert!(rel(r.energy_J, w) < 1e-5, "energy {} vs {w}", r.energy_J);
    // A magnet alone applies no field and has no winding: these figures are absent, not NaN.
    assert!(r.moment_gain.is_none() && r.inductance_H.is_none());
    assert!(c.apparent_permeability.is_none() && c.effective_demagnetizing_factor.is_none());
    assert_eq!(c.prescribed_magnetization_A_per_m, Some(M0));
    assert_eq!(c.recoil_mu_r, Some(1.0));
}

#[test]
fn sphere_with_recoil_permeability_matches_the_demagnetized_magnetization() {
    // Jackson §5.10 [from memory], Osborn 1945: H_in = −N M with N = 1/3, and the law
    // M = M0 + χ H_in (χ = μr − 1) give M = M0/(1 + N χ), uniform, so m = M V.
    let mu_r = 3.0;
    let out = solve(&magnet(SPHERE, mu_r, 4.0), &RunOptions::default());
    let r = &out.report;
    let v = 4.0 / 3.0 * PI * 0.010f64.powi(3);
    let m_in = M0 / (1.0 + (mu_r - 1.0) / 3.0);
    assert!(
        rel(r.dipole_moment_Am2, m_in * v) < 1e-5,
        "{} vs {}",
        r.dipole_moment_Am2,
        m_in * v
    );
    // Energy: μ0 μr |H_in|²/2 inside plus the dipole field's μ0 m²/(12π a³) outside (Jackson
    // §5.6, the field of a dipole): W = μ0 M² V (μr/18 + 1/9).
    let w = reference::MU0 * m_in * m_in * v * (mu_r / 18.0 + 1.0 / 9.0);
    assert!(rel(r.energy_J, w) < 1e-5, "energy {} vs {w}", r.energy_J);
}

#[test]
fn uniformly_magnetized_prolate_spheroid_has_osborns_interior_field() {
    // Osborn 1945 (references.md §2, check #7): axis ratio 10, N = 0.0202859; the interior
    // field of a uniformly magnetised ellipsoid is H = −N M0, so ⟨H_z⟩ = ⟨B_z⟩/μ0 − M0.
    let out = solve(
        &magnet(
            "shape = \"spheroid\"\nlength = \"100 mm\"\ndiameter = \"10 mm\"",
            1.0,
            3.0,
        ),
        &RunOptions::default(),
    );
    let n = reference::prolate_demag_factor(10.0);
    assert!(rel(n, 0.0202859) < 1e-5);
    let c = out.report.core.as_ref().unwrap();
    let h_avg = c.average_b_z_T / reference::MU0 - M0;
    let n_fe = -h_avg / M0;
    assert!(rel(n_fe, n) < 1e-5, "N {n_fe} vs Osborn {n}");
}

/// Nm and Nf of a uniformly magnetised rod of length/diameter `gamma` at `fineness`.
fn rod_factors(gamma: f64, fineness: f64) -> (f64, f64) {
    let d = 0.010;
    let shape = format!(
        "shape = \"rod\"\nlength = \"{} mm\"\ndiameter = \"{} mm\"",
        gamma * d * 1e3,
        d * 1e3
    );
    let out = solve(
        &magnet(&shape, 1.0, fineness),
        &RunOptions {
            keep_field: true,
            ..Default::default()
        },
    );
    let j0 = reference::MU0 * M0;
    let nm = 1.0 - out.report.core.as_ref().unwrap().average_b_z_T / j0;
    // The flux through the mid-plane disc is 2πR·A_φ(R, 0) (Stokes), exact for the discrete
    // field too; no background, so the reaction potential is the whole of A.
    let r = 0.5 * d;
    let a = out.field.as_ref().unwrap().reaction_a_at([r, 0.0]).unwrap();
    let nf = 1.0 - 2.0 * PI * r * a / (PI * r * r) / j0;
    (nm, nf)
}

#[test]
fn uniformly_magnetized_rods_match_the_closed_form_demagnetizing_factors() {
    // references.md §1 (Moskowitz & Della Torre 1966; Chen, Brug & Goldfarb 1991): Nm and Nf
    // of χ = 0 rods. The default mesh within 1e-3; fineness 2 within the 1e-4 the
    // demagnetization study needs (measured: module documentation).
    for gamma in [0.5, 1.0, 2.0, 5.0, 10.0] {
        let (wm, wf) = (reference::rod_nm_chi0(gamma), reference::rod_nf_chi0(gamma));
        for (fineness, tol) in [(1.0, 1e-3), (2.0, 1e-4)] {
            let (nm, nf) = rod_factors(gamma, fineness);
            assert!(
                rel(nm, wm) < tol,
                "γ = {gamma}, fineness {fineness}: Nm {nm} vs {wm}"
            );
            assert!(
                rel(nf, wf) < tol,
                "γ = {gamma}, fineness {fineness}: Nf {nf} vs {wf}"
            );
        }
    }
    // references.md §7 check #8 for the closed forms themselves.
    assert!(rel(reference::rod_nm_chi0(10.0), 0.041193) < 1e-5);
    assert!(rel(reference::rod_nf_chi0(10.0), 0.0049265) < 1e-5);
}

/// A rod magnet (recoil μr 1.05) inside a winding, with `magnetization` and `current` given.
fn magnet_in_winding(magnetization: f64, current: f64) -> String {
    format!(
        r#"
title = "magnet in a winding"
[core]
shape = "rod"
length = "40 mm"
diameter = "8 mm"
magnetization = "{magnetization} A/m"
mu_r = 1.05
[[winding]]
turns = 200
current = "{current} A"
inner_radius = "5 mm"
outer_radius = "6 mm"
length = "30 mm"
[mesh]
fineness = 0.5
"#
    )
}

#[test]
fn magnet_and_winding_superpose_in_a_linear_recoil_core() {
    // Linearity of the law B = μ0 μr H + J0 (superposition; no outside source needed): the
    // same mesh and basis in all three runs, so the sums hold to rounding.
    let run = |m: f64, i: f64| solve(&magnet_in_winding(m, i), &RunOptions::default()).report;
    let both = run(8e5, 2.0);
    let magnet = run(8e5, 0.0);
    let winding = run(0.0, 2.0);
    assert_eq!(both.nodes, winding.nodes);
    let m_sum = magnet.dipole_moment_Am2 + winding.dipole_moment_Am2;
    assert!(
        rel(both.dipole_moment_Am2, m_sum) < 1e-9,
        "{} vs {m_sum}",
        both.dipole_moment_Am2
    );
    let (wb, wm, ww) = (&both.windings[0], &magnet.windings[0], &winding.windings[0]);
    assert!(rel(wb.flux_linkage_Wb, wm.flux_linkage_Wb + ww.flux_linkage_Wb) < 1e-9);
    // The winding's own figures leave the magnet out: its own flux linkage, moment gain and
    // inductance are those of the unmagnetized core.
    assert!(rel(wb.own_flux_linkage_Wb, ww.flux_linkage_Wb) < 1e-9);
    assert!(rel(both.moment_gain.unwrap(), winding.moment_gain.unwrap()) < 1e-9);
    assert!(rel(both.inductance_H.unwrap(), winding.inductance_H.unwrap()) < 1e-12);
    assert!(magnet.moment_gain.is_none());
}

#[test]
fn newton_residual_and_linear_solve_pose_the_same_magnet_problem() {
    // No outside source: the linear right-hand side and the Newton residual (solver
    // `weak_form`, `nonlinear/terms.rs`) must give one field for the same excitation.
    let case = parse_case(&magnet(SPHERE, 1.05, 0.5), "magnet").unwrap();
    let model = Model::new(discretise(&case).unwrap().problem).unwrap();
    let linear = model.linear_operator().unwrap().solve_problem();
    let (currents, polarizations) = (model.problem_currents(), model.problem_polarizations());
    let a_fixed = model.fixed_values();
    let exc = Excitation {
        currents: &currents,
        polarizations: &polarizations,
        a_fixed: &a_fixed,
        b0: 0.0,
    };
    let (newton, _) = model
        .solve_nonlinear(exc, None, &NewtonSettings::default())
        .unwrap();
    let scale = linear.a.iter().fold(0.0f64, |m, a| m.max(a.abs()));
    assert!(scale > 0.0);
    for (x, y) in linear.a.iter().zip(&newton.a) {
        assert!((x - y).abs() < 1e-9 * scale, "{x} vs {y}");
    }
}

fn floats<'a>(arrays: &'a [DataArray], name: &str) -> &'a [f64] {
    match &arrays.iter().find(|a| a.name == name).expect(name).values {
        Values::F64(v) => v,
        _ => panic!("{name} is not a float array"),
    }
}

#[test]
fn map_of_a_uniformly_magnetized_sphere_holds_its_magnetization_and_field() {
    // Jackson §5.10 [from memory]: inside H = −M0/3; M = B/μ0 − H = M0 exactly for recoil
    // permeability 1 (the law itself), 0 in air. Point H is (B − J0)/μ0 of the recovered B,
    // so its error against H_in is twice B's against B_in (the VTK sphere test allows 1 % and
    // 3 % of B_in inside and on the surface): 2e-2 and 5e-2 of M0/3 here, measured 1.1e-2
    // and 2.1e-2 at fineness 1.
    let case = parse_case(&magnet(SPHERE, 1.0, 1.0), "magnet").unwrap();
    let model = Model::new(discretise(&case).unwrap().problem).unwrap();
    let sol = model.linear_operator().unwrap().solve_problem();
    let mesh = model.mesh();
    let labels = MapLabels {
        title: case.title.clone(),
        region_names: vec!["air".into(), "core".into()],
        extra: Vec::new(),
    };
    let j = vec![0.0; mesh.triangles.len()];
    let grid = field_grid(&model, &sol, &j, 0.9, &labels).unwrap();
    let m = floats(&grid.cell_data, "M_A_per_m");
    for e in 0..mesh.triangles.len() {
        let want = if mesh.tags[e] == 1 { M0 } else { 0.0 };
        assert!((m[3 * e + 1] - want).abs() <= 1e-9 * M0 && m[3 * e].abs() <= 1e-9 * M0);
    }
    let (h, mu) = (
        floats(&grid.point_data, "H_A_per_m"),
        floats(&grid.point_data, "mu_r"),
    );
    let rp = RegionPoints::new(mesh);
    let (mut inside, mut worst_in, mut worst_surface) = (0, 0.0f64, 0.0f64);
    for p in 0..rp.len() {
        let [r, z] = grid.points[p];
        assert!((mu[p] - 1.0).abs() < 1e-12);
        if rp.tag[p] == 1 {
            let hp = &h[3 * p..3 * p + 2];
            let off = (hp[1] + M0 / 3.0).abs().max(hp[0].abs()) / (M0 / 3.0);
            if (r.hypot(z) - 0.010).abs() < 1e-9 {
                worst_surface = worst_surface.max(off);
            } else {
                inside += 1;
                worst_in = worst_in.max(off);
            }
        }
    }
    assert!(inside > 20, "{inside} interior core points");
    assert!(worst_in < 2e-2, "interior H off by {worst_in:.2e} of M0/3");
    assert!(
        worst_surface < 5e-2,
        "surface H off by {worst_surface:.2e} of M0/3"
    );
}
