//! The p = 1 hp element matrix against the closed-form axisymmetric linear-element matrix.
//!
//! With B(φ) = (−∂φ/∂z, ∂φ/∂r + φ/r) and dV = 2π r dA (crate documentation), for the vertex
//! functions λ_a of a straight triangle T of area A and vertex radii r_0, r_1, r_2:
//!
//! ```text
//!   K_ab = ν 2π ∫_T [ r ∇λ_a·∇λ_b + ∂_r λ_a λ_b + λ_a ∂_r λ_b + λ_a λ_b / r ] dA
//!        = ν 2π [ A r̄ ∇λ_a·∇λ_b + (A/3)(∂_r λ_a + ∂_r λ_b) + 2A I_ab ],
//! ```
//! since ∇λ is constant, ∫_T r dA = A r̄ (r̄ the vertex mean) and ∫_T λ_b dA = A/3; I_ab is the
//! integral of λ_a λ_b / (Σ r_i λ_i) over the unit simplex {λ_1, λ_2 ≥ 0, λ_1 + λ_2 ≤ 1}.
//! The Hermite–Genocchi formula (K. E. Atkinson, *An Introduction to Numerical Analysis*, 2nd
//! ed., Wiley 1989, Theorem 3.3 [theorem number from memory]) gives a divided difference as a
//! simplex integral, g[x_0, …, x_n] = ∫_{Δ_n} g⁽ⁿ⁾(Σ t_i x_i) dt; merging two coordinates of
//! Δ_{n+1} at one repeated node into one leaves the weight λ of that coordinate (the fibre is a
//! segment of length λ; three merged give λ²/2). So with g⁽⁴⁾(x) = 1/x, i.e.
//! g(x) = x³ ln x/6 − 11x³/36:
//!
//! ```text
//!   I_ab = g[r_0, r_1, r_2, r_a, r_b] (a ≠ b),   I_aa = 2 g[r_0, r_1, r_2, r_a, r_a],
//! ```
//! divided differences with repeated nodes taken as g⁽ᵏ⁾/k! (exact; no quadrature anywhere).
//! The gradients come from the cyclic formula ∇λ_i = (z_j − z_k, r_k − r_j)/(2A).

use super::*;
use crate::hp::basis::TriangleBasis;
use crate::hp::model::rule_degree;
use crate::quadrature::TriangleRule;

/// g and its derivatives up to the 4th, g⁽⁴⁾(x) = 1/x.
fn g(k: usize, x: f64) -> f64 {
    match k {
        0 => x.powi(3) * x.ln() / 6.0 - 11.0 * x.powi(3) / 36.0,
        1 => x * x * x.ln() / 2.0 - 0.75 * x * x,
        2 => x * x.ln() - x,
        3 => x.ln(),
        4 => 1.0 / x,
        _ => unreachable!("only up to the 4th derivative"),
    }
}

/// The divided difference of `f` (f(k, x) = k-th derivative) on sorted `nodes`.
fn divided(nodes: &[f64], f: &dyn Fn(usize, f64) -> f64) -> f64 {
    let n = nodes.len() - 1;
    let (first, last) = (nodes[0], nodes[n]);
    if first == last {
        let factorial: f64 = (1..=n).map(|i| i as f64).product();
        return f(n, first) / factorial;
    }
    (divided(&nodes[1..], f) - divided(&nodes[..n], f)) / (last - first)
}

/// ∫ over the unit simplex of λ_a λ_b h(Σ r_i λ_i), for h = f's 4th derivative.
fn simplex_integral(r: [f64; 3], a: usize, b: usize, f: &dyn Fn(usize, f64) -> f64) -> f64 {
    let mut nodes = vec![r[0], r[1], r[2], r[a], r[b]];
    nodes.sort_by(f64::total_cmp);
    let weight = if a == b { 2.0 } else { 1.0 };
    weight * divided(&nodes, f)
}

/// The closed-form matrix above for the counter-clockwise triangle `c` and reluctivity `nu`.
fn closed_form(c: [[f64; 2]; 3], nu: f64) -> [[f64; 3]; 3] {
    let area = 0.5
        * ((c[1][0] - c[0][0]) * (c[2][1] - c[0][1]) - (c[2][0] - c[0][0]) * (c[1][1] - c[0][1]));
    let grad: Vec<[f64; 2]> = (0..3)
        .map(|i| {
            let (j, k) = ((i + 1) % 3, (i + 2) % 3);
            [
                (c[j][1] - c[k][1]) / (2.0 * area),
                (c[k][0] - c[j][0]) / (2.0 * area),
            ]
        })
        .collect();
    let r = [c[0][0], c[1][0], c[2][0]];
    let r_mean = (r[0] + r[1] + r[2]) / 3.0;
    let mut k = [[0.0; 3]; 3];
    for a in 0..3 {
        for b in 0..3 {
            let dot = grad[a][0] * grad[b][0] + grad[a][1] * grad[b][1];
            k[a][b] = nu
                * 2.0
                * std::f64::consts::PI
                * (area * r_mean * dot
                    + area / 3.0 * (grad[a][0] + grad[b][0])
                    + 2.0 * area * simplex_integral(r, a, b, &g));
        }
    }
    k
}

/// The hp kernel's p = 1 matrix (all three vertex functions) at a rule exact to `degree`, by
/// both entry points.
fn kernel(c: [[f64; 2]; 3], nu: f64, degree: usize) -> [nalgebra::DMatrix<f64>; 2] {
    let map = ElementMap::new(c, [None; 3], 0).unwrap();
    let basis = TriangleBasis::new(1).unwrap();
    let rule = TriangleRule::exact_to(degree).unwrap();
    let tab = Tabulation::new(&basis, &rule.points, [false; 3]);
    [
        ElementPoints::new(&map, &tab, &[0, 1, 2]).stiffness(|_| nu),
        element_system(&map, &tab, &[0, 1, 2], nu, 0.0, 0.0).k,
    ]
}

/// Largest entry difference relative to the largest entry of `want`.
fn rel_diff(got: &nalgebra::DMatrix<f64>, want: &[[f64; 3]; 3]) -> f64 {
    let scale = want.iter().flatten().fold(0.0f64, |m, x| m.max(x.abs()));
    let mut worst = 0.0f64;
    for a in 0..3 {
        for b in 0..3 {
            worst = worst.max((got[(a, b)] - want[a][b]).abs() / scale);
        }
    }
    worst
}

#[test]
fn the_simplex_integrals_reproduce_the_polynomial_moments() {
    // With g⁽⁴⁾ = 1 (g = x⁴/24) the formula must give ∫ λ_a λ_b over the unit simplex:
    // 1/24 for a ≠ b, 1/12 for a = b (∫ λ_1^i λ_2^j λ_3^k = i! j! k!/(i + j + k + 2)!).
    let quartic = |k: usize, x: f64| match k {
        0 => x.powi(4) / 24.0,
        1 => x.powi(3) / 6.0,
        2 => x * x / 2.0,
        3 => x,
        _ => 1.0,
    };
    let r = [0.020, 0.026, 0.022];
    for a in 0..3 {
        for b in 0..3 {
            let want = if a == b { 1.0 / 12.0 } else { 1.0 / 24.0 };
            let got = simplex_integral(r, a, b, &quartic);
            assert!((got - want).abs() < 1e-9 * want, "({a}, {b}): {got}");
        }
    }
}

#[test]
fn the_p1_element_matrix_is_the_closed_form_axisymmetric_linear_element() {
    // A straight triangle off the axis (r from 20 to 26 mm, about 6 mm across), ν of μr = 100.
    let c = [[0.020, 0.010], [0.026, 0.012], [0.022, 0.016]];
    let nu = 1.0 / (4e-7 * std::f64::consts::PI * 100.0);
    let want = closed_form(c, nu);
    // At a rule of degree 40 the 1/r term is integrated to rounding (measured: 7e-14 of the
    // largest entry; the λ_a λ_b / r term alone is of relative size ~(h/r)²/12 ≈ 1e-2,
    // estimated, so leaving it out would fail by orders of magnitude).
    for k in kernel(c, nu, 40) {
        let d = rel_diff(&k, &want);
        println!("rule of degree 40: {d:.1e}");
        assert!(d < 1e-12, "{d:e}: {k} vs {want:?}");
    }
    // At the model's own rule for p = 1 (degree 2p + 2 = 4) the λ_a λ_b / r term is not a
    // polynomial: the difference is its quadrature error (measured 2.3e-8 at h/r ≈ 0.3; it
    // falls fast with h/r, so on meshes it is far below the discretisation error).
    let degree = rule_degree(1, false);
    for k in kernel(c, nu, degree) {
        let d = rel_diff(&k, &want);
        println!("rule of degree {degree}: {d:.1e}");
        assert!(d < 7e-8, "{d:e}");
    }
}
