//! Exponential convergence of the hp model (hierarchical elements of degree p on exact curved
//! geometry, cell unknowns condensed, the exact exterior at every p) on bodies with a closed
//! form: the error of the dipole moment falls by a roughly constant factor per degree.
//!
//! Sources:
//! - Sphere: J. D. Jackson, *Classical Electrodynamics*, 3rd ed., §5.11 [section number from
//!   memory]: m = 4π a³ (μr − 1)/(μr + 2)·H0 (references.md §7 check #6).
//! - Spheroid: J. A. Osborn, Phys. Rev. 67, 351 (1945), the prolate factor N; m = V χ H0/(1 + χN)
//!   (references.md §2, §7 check #7).
//! - Air-core winding: the moment of a uniform azimuthal current density J over the ring
//!   a1 < r < a2, |z| < ℓ/2, m = ∫ π r² J dA = N I π (a1² + a1 a2 + a2²)/3 (elementary
//!   integral); read here from the exterior's dipole coefficient, it checks the exterior
//!   operator at every degree.

use axicore::case::parse_case;
use axicore::hp_geometry::discretise_hp;
use axicore_formulas as reference;
use axicore_solver::hp::HpModel;

/// Relative errors of the exterior's and the sources' moment against `want`, per degree.
fn moment_errors(toml: &str, want: f64, degrees: std::ops::RangeInclusive<u32>) -> Vec<[f64; 2]> {
    let case = parse_case(toml, "test case").unwrap_or_else(|e| panic!("{e}"));
    let (problem, curved) = discretise_hp(&case).unwrap_or_else(|e| panic!("{e}"));
    let nt = problem.mesh.triangles.len();
    degrees
        .map(|p| {
            let model = HpModel::new(problem.clone(), &vec![p; nt], curved.clone()).unwrap();
            let sol = model.solve_linear().unwrap();
            let ext = model.exterior_moment(&sol).unwrap();
            let src = model.source_moment(&sol).unwrap();
            println!(
                "p {p}: {} equations, exterior {:.3e}, sources {:.3e}",
                model.equations(),
                (ext - want) / want,
                (src - want) / want
            );
            [(ext - want) / want, (src - want) / want]
        })
        .collect()
}

/// Least-squares slope of log10|error| against p.
fn log_slope(errors: &[f64]) -> f64 {
    let n = errors.len() as f64;
    let ys: Vec<f64> = errors.iter().map(|e| e.abs().log10()).collect();
    let xm = (n - 1.0) / 2.0;
    let ym = ys.iter().sum::<f64>() / n;
    let (mut sxy, mut sxx) = (0.0, 0.0);
    for (i, y) in ys.iter().enumerate() {
        sxy += (i as f64 - xm) * (y - ym);
        sxx += (i as f64 - xm).powi(2);
    }
    sxy / sxx
}

#[test]
fn sphere_moment_error_falls_exponentially_with_the_degree() {
    // μr = 1000, a = 10 mm, B0 = 1 mT, fineness 1 (1517 equations at p = 2).
    // Measured: p = 2…6: 6.5e-5, 2.3e-7, 8.0e-10, 2.8e-12, 1.8e-14 (both routes).
    let toml = r#"
[core]
shape = "sphere"
diameter = "20 mm"
mu_r = 1000
[background]
b_axial = "1 mT"
[mesh]
fineness = 1
"#;
    let want = reference::sphere_dipole(0.010, 1000.0, 1e-3 / reference::MU0);
    let errs = moment_errors(toml, want, 2..=6);
    let ext: Vec<f64> = errs.iter().map(|e| e[0]).collect();
    // A straight line in log(error) against p: every step gains at least a factor 50, the
    // fitted slope is steeper than −2 decades per degree, and p = 6 reaches 1e-12.
    for w in ext.windows(2) {
        assert!(w[1].abs() < w[0].abs() / 50.0, "{ext:?}");
    }
    assert!(
        log_slope(&ext) < -2.0,
        "slope {} of {ext:?}",
        log_slope(&ext)
    );
    assert!(ext[4].abs() < 1e-12, "{ext:?}");
    // The two routes agree to the error itself.
    for e in &errs {
        assert!((e[0] - e[1]).abs() <= 0.05 * e[0].abs() + 1e-14, "{e:?}");
    }
}

#[test]
fn spheroid_moment_error_falls_exponentially_with_the_degree() {
    // Prolate spheroid of axis ratio 5 (50 mm × 10 mm), μr = 100, B0 = 1 mT along the axis:
    // the outline is an ellipse, mapped exactly by the blended elements. Measured at fineness 1:
    // p = 2…6: 1.2e-4, 5.0e-7, 4.1e-9, 5.5e-11, 9.1e-13.
    let toml = r#"
[core]
shape = "spheroid"
length = "50 mm"
diameter = "10 mm"
mu_r = 100
[background]
b_axial = "1 mT"
[mesh]
fineness = 1
"#;
    let n = reference::prolate_demag_factor(5.0);
    let volume = std::f64::consts::PI / 6.0 * 0.010 * 0.010 * 0.050;
    let want = reference::ellipsoid_dipole(volume, 99.0, n, 1e-3 / reference::MU0);
    let errs = moment_errors(toml, want, 2..=6);
    let ext: Vec<f64> = errs.iter().map(|e| e[0]).collect();
    for w in ext.windows(2) {
        assert!(w[1].abs() < w[0].abs() / 10.0, "{ext:?}");
    }
    assert!(
        log_slope(&ext) < -1.5,
        "slope {} of {ext:?}",
        log_slope(&ext)
    );
    assert!(ext[4].abs() < 1e-10, "{ext:?}");
}

#[test]
fn exterior_dipole_coefficient_gives_the_winding_moment_at_every_degree() {
    // Thick air-core winding (references.md §7 checks #4/#5 geometry): a1 = 10 mm, a2 = 20 mm,
    // ℓ = 100 mm, N I = 1000 A. Without magnetic material the moment is the closed form, and
    // the exterior's n = 1 coefficient converges to it with the degree like the field (measured
    // on this coarse mesh: p = 1…5: 7.6e-5, 7.8e-10, 9e-13, 5e-15, 3e-15); the sources' moment
    // is exact at every p.
    let toml = r#"
[[winding]]
turns = 1000
current = "1 A"
inner_radius = "10 mm"
outer_radius = "20 mm"
length = "100 mm"
[mesh]
fineness = 0.25
"#;
    let (a1, a2) = (0.010f64, 0.020f64);
    let want = 1000.0 * std::f64::consts::PI * (a1 * a1 + a1 * a2 + a2 * a2) / 3.0;
    let errs = moment_errors(toml, want, 1..=5);
    for e in &errs {
        assert!(e[1].abs() < 1e-13, "{e:?}");
    }
    assert!(
        errs[1][0].abs() < 1e-8 && errs[4][0].abs() < 1e-13,
        "{errs:?}"
    );
}
