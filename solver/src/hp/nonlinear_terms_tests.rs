use super::*;
use crate::hp::basis::TriangleBasis;
use crate::hp::curve::Curve;
use crate::hp::kernel::element_system;
use crate::material::SaturationLaw;
use crate::quadrature::TriangleRule;

/// A straight element off the axis and one with a circular edge (radius 50 mm), m.
fn maps() -> Vec<ElementMap> {
    let on = |t: f64| [0.05 * t.cos(), 0.05 * t.sin()];
    vec![
        ElementMap::new([[0.02, 0.01], [0.05, 0.0], [0.03, 0.04]], [None; 3], 0).unwrap(),
        ElementMap::new(
            [[0.01, 0.0], on(-0.3), on(0.4)],
            [
                None,
                Some(Curve::Circle {
                    centre: [0.0, 0.0],
                    radius: 0.05,
                }),
                None,
            ],
            1,
        )
        .unwrap(),
    ]
}

/// The basis of degree p (edges 1 reversed, so the sign flips are exercised) at a rule well
/// above the integrands' polynomial degree, every function active.
fn table(p: usize) -> (Tabulation, Vec<usize>) {
    let basis = TriangleBasis::new(p).unwrap();
    let rule = TriangleRule::exact_to(2 * p + 6).unwrap();
    let tab = Tabulation::new(&basis, &rule.points, [false, true, false]);
    (tab, (0..basis.len()).collect())
}

/// Coefficients giving a field near the arctangent law's knee (|B| ≈ 1 T): the uniform-field
/// potential B r/2 on the vertices plus deterministic perturbations on every function.
fn coefficients(map: &ElementMap, n: usize) -> Vec<f64> {
    (0..n)
        .map(|a| {
            let wobble = 2e-3 * ((a as f64 * 1.7 + 0.3).sin());
            if a < 3 {
                let v = [[0.0, 0.0], [1.0, 0.0], [0.0, 1.0]][a];
                0.35 * map.position(v[0], v[1])[0] + wobble
            } else {
                wobble
            }
        })
        .collect()
}

#[test]
fn the_tangent_is_the_derivative_of_the_residual_at_every_degree() {
    // Central differences of R along each unit direction against the columns of T, p = 1…8,
    // on a straight and a curved element, arctangent law (Js 1.5 T, μri 1000) near its knee,
    // with background, current and the full (ν_d ≠ ν) tangent.
    let mat = Material::Saturable(
        SaturationLaw::Arctan {
            js: 1.5,
            mu_ri: 1000.0,
        }
        .into(),
    );
    let drive = ElementDrive {
        b0: 0.4,
        j: 2e6,
        j0: 0.0,
        material: &mat,
    };
    for map in maps() {
        for p in 1..=8 {
            let (tab, active) = table(p);
            let u = coefficients(&map, active.len());
            let (_, k) = residual_and_tangent(&map, &tab, &active, &u, &drive, Tangent::Newton);
            let k = k.unwrap();
            let scale = k.amax();
            let h = 1e-7;
            let mut worst: f64 = 0.0;
            for b in 0..active.len() {
                let mut up = u.clone();
                let mut down = u.clone();
                up[b] += h;
                down[b] -= h;
                let rp = residual_and_tangent(&map, &tab, &active, &up, &drive, Tangent::None).0;
                let rm = residual_and_tangent(&map, &tab, &active, &down, &drive, Tangent::None).0;
                for a in 0..active.len() {
                    let fd = (rp[a] - rm[a]) / (2.0 * h);
                    worst = worst.max((fd - k[(a, b)]).abs() / scale);
                }
            }
            // Measured: at most 1.1e-8 (p = 8; central differences: h²·R''' and round-off/h);
            // |B| ≈ 1.1 T at the knee, where ν_d is several times ν.
            assert!(worst < 5e-8, "p = {p}: worst {worst:e}");
            assert!((&k - k.transpose()).amax() <= 1e-12 * scale, "p = {p}");
        }
    }
}

#[test]
fn a_linear_material_gives_the_linear_kernel_residual() {
    // For a linear law R = K u − f with the linear kernel's K and f (s = ν J0 − (ν − ν0) B0),
    // and the tangent is K: the Newton path solves the same equations as solve_linear.
    let mat = Material::Linear { mu_r: 250.0 };
    let nu = mat.nu(0.0);
    let (b0, j, j0) = (0.02, 3e5, 0.1);
    let drive = ElementDrive {
        b0,
        j,
        j0,
        material: &mat,
    };
    let s = nu * j0 - (nu - 1.0 / MU0) * b0;
    for map in maps() {
        for p in [1, 3, 6] {
            let (tab, active) = table(p);
            let u = coefficients(&map, active.len());
            let lin = element_system(&map, &tab, &active, nu, j, s);
            let (r, k) = residual_and_tangent(&map, &tab, &active, &u, &drive, Tangent::Newton);
            let k = k.unwrap();
            let want = &lin.k * DVector::from_vec(u.clone()) - &lin.f;
            let scale = lin
                .f
                .amax()
                .max((&lin.k * DVector::from_vec(u.clone())).amax());
            assert!((&r - &want).amax() <= 1e-12 * scale, "p = {p}: residual");
            assert!(
                (&k - &lin.k).amax() <= 1e-12 * lin.k.amax(),
                "p = {p}: matrix"
            );
        }
    }
}

#[test]
fn the_source_moment_of_a_linear_element_is_its_magnetisation_integral() {
    // ∫ M_z dV = (ν0 − ν) ∫ B_z dV + ν J0 V for a linear law, with ∫ B_z dV = u·∫B_z(φ) dV + B0 V
    // from the linear kernel's integrals; plus J ∫ (r/2) dV.
    let mat = Material::Linear { mu_r: 40.0 };
    let nu = mat.nu(0.0);
    let (b0, j, j0) = (0.05, 1e5, 0.2);
    let drive = ElementDrive {
        b0,
        j,
        j0,
        material: &mat,
    };
    for map in maps() {
        let (tab, active) = table(4);
        let u = coefficients(&map, active.len());
        let lin = element_system(&map, &tab, &active, nu, j, 0.0);
        let bz_mean = lin.bz.dot(&DVector::from_vec(u.clone())) + b0 * lin.volume;
        let want = j * lin.half_r + (1.0 / MU0 - nu) * bz_mean + nu * j0 * lin.volume;
        let got = source_moment(&map, &tab, &active, &u, &drive);
        assert!((got - want).abs() <= 1e-12 * want.abs(), "{got} vs {want}");
    }
}
