//! Tests of the hierarchical triangle basis (each names its source).

use nalgebra::{DMatrix, DVector};

use super::*;
use crate::quadrature::gauss::{gauss_legendre, LineRule};
use crate::quadrature::polynomials::legendre;
use crate::quadrature::triangle::collapsed;
use crate::quadrature::TriangleRule;

fn eval_at(
    basis: &TriangleBasis,
    xi: f64,
    eta: f64,
    reversed: [bool; 3],
) -> (Vec<f64>, Vec<[f64; 2]>) {
    let mut values = vec![0.0; basis.len()];
    let mut grads = vec![[0.0; 2]; basis.len()];
    basis.eval(xi, eta, reversed, &mut values, &mut grads);
    (values, grads)
}

/// A spread of interior points (not on any symmetry line).
const INTERIOR: [[f64; 2]; 5] = [
    [0.2, 0.3],
    [0.61, 0.07],
    [0.05, 0.83],
    [1.0 / 3.0, 1.0 / 3.0],
    [0.45, 0.45],
];

/// The point at parameter s ∈ [−1, 1] on local edge e, from its first vertex (s = −1) to its second.
fn edge_point(e: usize, s: f64) -> [f64; 2] {
    let corners = [[0.0, 0.0], [1.0, 0.0], [0.0, 1.0]];
    let (a, b) = (corners[e], corners[(e + 1) % 3]);
    let (la, lb) = ((1.0 - s) / 2.0, (1.0 + s) / 2.0);
    [la * a[0] + lb * b[0], la * a[1] + lb * b[1]]
}

#[test]
fn degree_1_is_the_linear_nodal_basis_and_a_partition_of_unity() {
    // The linear Lagrange triangle (Zienkiewicz & Taylor, vol. 1, area coordinates as shape functions).
    let basis = TriangleBasis::new(1).unwrap();
    assert_eq!(basis.len(), 3);
    for [xi, eta] in INTERIOR {
        let (values, grads) = eval_at(&basis, xi, eta, [false; 3]);
        assert_eq!(values, [1.0 - xi - eta, xi, eta]);
        assert!((values.iter().sum::<f64>() - 1.0).abs() < 1e-15);
        assert_eq!(grads, [[-1.0, -1.0], [1.0, 0.0], [0.0, 1.0]]);
    }
}

#[test]
fn counts_are_p_plus_1_times_p_plus_2_over_2_split_over_vertices_edges_and_cell() {
    for p in 1..=P_MAX {
        let basis = TriangleBasis::new(p).unwrap();
        assert_eq!(basis.len(), (p + 1) * (p + 2) / 2);
        assert_eq!(3 + 3 * basis.per_edge() + basis.per_cell(), basis.len());
        assert_eq!(basis.cell_functions().end, basis.len());
        for index in 0..basis.len() {
            assert_eq!(
                basis.index(basis.mode(index)),
                Some(index),
                "p {p} index {index}"
            );
        }
    }
}

#[test]
fn each_degree_contains_the_functions_of_the_previous_degree_unchanged() {
    // Hierarchy (Szabó & Babuška 1991, §6.1): raising p only adds functions.
    for p in 2..=P_MAX {
        let (low, high) = (
            TriangleBasis::new(p - 1).unwrap(),
            TriangleBasis::new(p).unwrap(),
        );
        for [xi, eta] in INTERIOR {
            let reversed = [true, false, true];
            let (lv, lg) = eval_at(&low, xi, eta, reversed);
            let (hv, hg) = eval_at(&high, xi, eta, reversed);
            for i in 0..low.len() {
                let j = high.index(low.mode(i)).expect("mode kept");
                assert_eq!((lv[i], lg[i]), (hv[j], hg[j]), "p {p} function {i}");
            }
            assert_eq!(
                high.index(Mode::Edge {
                    edge: 0,
                    degree: p + 1
                }),
                None
            );
        }
    }
}

#[test]
fn vertex_functions_are_nodal_and_all_others_vanish_at_the_vertices() {
    let basis = TriangleBasis::new(P_MAX).unwrap();
    for (v, [xi, eta]) in [[0.0, 0.0], [1.0, 0.0], [0.0, 1.0]].into_iter().enumerate() {
        let (values, _) = eval_at(&basis, xi, eta, [true; 3]);
        for (i, &value) in values.iter().enumerate() {
            let want = if i == v { 1.0 } else { 0.0 };
            assert!(
                (value - want).abs() < 1e-14,
                "function {i} at vertex {v}: {value}"
            );
        }
    }
}

#[test]
fn edge_functions_vanish_on_the_other_edges_and_bubbles_on_the_whole_boundary() {
    let basis = TriangleBasis::new(P_MAX).unwrap();
    for e in 0..3 {
        for k in 0..=20 {
            let [xi, eta] = edge_point(e, -1.0 + 0.1 * k as f64);
            let (values, _) = eval_at(&basis, xi, eta, [false, true, false]);
            for other in (0..3).filter(|&o| o != e) {
                for i in basis.edge_functions(other) {
                    assert!(
                        values[i].abs() < 1e-14,
                        "edge {other} function {i} on edge {e}"
                    );
                }
            }
            for i in basis.cell_functions() {
                assert!(
                    values[i].abs() < 1e-14,
                    "bubble {i} on edge {e}: {}",
                    values[i]
                );
            }
        }
    }
}

/// L_k(s) = √((2k − 1)/2) ∫_{−1}^{s} P_{k−1}(x) dx (Szabó & Babuška 1991, §6.1), integrated with a
/// Gauss–Legendre rule mapped onto [−1, s] (exact: the integrand has degree k − 1).
fn integrated_legendre(k: usize, s: f64, rule: &LineRule) -> f64 {
    let half = (s + 1.0) / 2.0;
    let integral: f64 = rule
        .nodes
        .iter()
        .zip(&rule.weights)
        .map(|(&x, &w)| w * half * legendre(k - 1, -1.0 + half * (x + 1.0)).0)
        .sum();
    ((2 * k - 1) as f64 / 2.0).sqrt() * integral
}

#[test]
fn edge_traces_are_the_integrated_legendre_polynomials_and_reversal_multiplies_by_minus_1_to_the_k()
{
    let basis = TriangleBasis::new(P_MAX).unwrap();
    let rule = gauss_legendre(P_MAX).unwrap();
    for e in 0..3 {
        for step in 0..=16 {
            let s = -1.0 + 0.125 * step as f64;
            let [xi, eta] = edge_point(e, s);
            let mut reversed = [false; 3];
            let (forward, _) = eval_at(&basis, xi, eta, reversed);
            reversed[e] = true;
            let (backward, _) = eval_at(&basis, xi, eta, reversed);
            for (slot, k) in basis.edge_functions(e).zip(2..) {
                let want = integrated_legendre(k, s, &rule);
                // The closed form (P_k − P_{k−2}) / √(2(2k − 1)) (Szabó & Babuška, §6.1) agrees.
                let closed =
                    (legendre(k, s).0 - legendre(k - 2, s).0) / ((2 * (2 * k - 1)) as f64).sqrt();
                assert!((want - closed).abs() < 1e-14, "k {k} s {s}");
                assert!(
                    (forward[slot] - want).abs() < 1e-13,
                    "edge {e} k {k} s {s}: {}",
                    forward[slot]
                );
                let sign = if k.is_multiple_of(2) { 1.0 } else { -1.0 };
                assert_eq!(backward[slot], sign * forward[slot], "edge {e} k {k}");
            }
        }
    }
}

#[test]
fn reversed_edges_give_the_same_trace_from_the_neighbouring_element() {
    // Two elements share the edge v1–v2 of the reference triangle; the neighbour (v2, v1, (1, 1))
    // reaches it as its local edge 0 traversed v2 → v1. With global orientation v1 → v2, our edge 1
    // is forward and the neighbour's edge 0 reversed: the traces must agree point by point.
    let basis = TriangleBasis::new(7).unwrap();
    for step in 0..=10 {
        let s = -1.0 + 0.2 * step as f64;
        let [xi, eta] = edge_point(1, s); // from v1 to v2
        let (ours, _) = eval_at(&basis, xi, eta, [false; 3]);
        // In the neighbour, local v0 = (0, 1), v1 = (1, 0): the same point at parameter −s on its edge 0.
        let [nxi, neta] = edge_point(0, -s);
        let (theirs, _) = eval_at(&basis, nxi, neta, [true, false, false]);
        for (a, b) in basis.edge_functions(1).zip(basis.edge_functions(0)) {
            assert!((ours[a] - theirs[b]).abs() < 1e-14, "s {s}");
        }
    }
}

/// Largest residual, relative to the function's size, of the least-squares fit of every monomial
/// ξ^a η^b with a + b = `degree` by the basis of degree p, checked at points other than the fit's.
fn worst_fit_residual(p: usize, degree: usize) -> f64 {
    let basis = TriangleBasis::new(p).unwrap();
    let table = |n: usize| {
        let rule = collapsed(n).unwrap();
        let mut rows = DMatrix::zeros(rule.len(), basis.len());
        for (q, point) in rule.points.iter().enumerate() {
            let (values, _) = eval_at(&basis, point.bary[1], point.bary[2], [false, true, false]);
            rows.row_mut(q).copy_from_slice(&values);
        }
        (rule, rows)
    };
    let (fit_rule, fit) = table(p + 2);
    let (check_rule, check) = table(p + 3);
    let svd = fit.svd(true, true);
    let mut worst: f64 = 0.0;
    for a in 0..=degree {
        let b = degree - a;
        let f = |pt: &crate::quadrature::RulePoint| {
            pt.bary[1].powi(a as i32) * pt.bary[2].powi(b as i32)
        };
        let rhs = DVector::from_iterator(fit_rule.len(), fit_rule.points.iter().map(f));
        let coefficients = svd.solve(&rhs, 1e-14).unwrap();
        let want = DVector::from_iterator(check_rule.len(), check_rule.points.iter().map(f));
        let residual = (&check * coefficients - &want).amax() / want.amax();
        worst = worst.max(residual);
    }
    worst
}

#[test]
fn the_span_at_degree_p_reproduces_every_polynomial_of_total_degree_p_and_no_more() {
    // Completeness of P_p (Szabó & Babuška 1991, §6.1: the hierarchic triangle spans P_p). Lower
    // degrees are in the span of degree p by the hierarchy test, so the top degree suffices.
    // Measured: worst residual 4e-16 (p = 1) to 2.5e-15 (p = 14); a monomial of degree p + 1
    // leaves 0.44 (p = 1) halving per degree to 7e-5 (p = 14), so the second check has a margin.
    for p in 1..=P_MAX {
        let inside = worst_fit_residual(p, p);
        assert!(inside < 1e-12, "p {p}: residual {inside:e}");
        let beyond = worst_fit_residual(p, p + 1);
        assert!(beyond > 1e-6, "p {p}: degree p + 1 fitted too ({beyond:e})");
    }
}

#[test]
fn gradients_match_central_differences() {
    let basis = TriangleBasis::new(P_MAX).unwrap();
    let h = 1e-6;
    for [xi, eta] in INTERIOR {
        let reversed = [false, true, true];
        let (_, grads) = eval_at(&basis, xi, eta, reversed);
        let (xp, _) = eval_at(&basis, xi + h, eta, reversed);
        let (xm, _) = eval_at(&basis, xi - h, eta, reversed);
        let (yp, _) = eval_at(&basis, xi, eta + h, reversed);
        let (ym, _) = eval_at(&basis, xi, eta - h, reversed);
        for i in 0..basis.len() {
            let fd = [(xp[i] - xm[i]) / (2.0 * h), (yp[i] - ym[i]) / (2.0 * h)];
            for c in 0..2 {
                let scale = 1.0 + grads[i][c].abs();
                assert!(
                    (grads[i][c] - fd[c]).abs() < 1e-6 * scale,
                    "function {i} at ({xi}, {eta}): {:?} vs {fd:?}",
                    grads[i]
                );
            }
        }
    }
}

/// The reference mass matrix ∫_T φ_i φ_j (as a fraction of the area), by an exact rule.
fn mass_matrix(basis: &TriangleBasis) -> DMatrix<f64> {
    let rule = TriangleRule::exact_to(2 * basis.degree()).unwrap();
    let mut mass = DMatrix::zeros(basis.len(), basis.len());
    for point in &rule.points {
        let (values, _) = eval_at(basis, point.bary[1], point.bary[2], [false, true, false]);
        let v = DVector::from_vec(values);
        mass += point.weight * &v * v.transpose();
    }
    mass
}

fn condition(matrix: DMatrix<f64>) -> f64 {
    let eigen = matrix.symmetric_eigen().eigenvalues;
    eigen.max() / eigen.min()
}

#[test]
fn bubbles_are_orthogonal_on_the_reference_triangle() {
    // The Koornwinder–Dubiner construction (Dubiner 1991) with weights raised for (λ0λ1λ2)².
    let basis = TriangleBasis::new(10).unwrap();
    let mass = mass_matrix(&basis);
    for a in basis.cell_functions() {
        for b in basis.cell_functions().filter(|&b| b != a) {
            let cosine = mass[(a, b)] / (mass[(a, a)] * mass[(b, b)]).sqrt();
            assert!(cosine.abs() < 1e-12, "bubbles {a} {b}: {cosine:e}");
        }
    }
}

#[test]
fn mass_matrix_condition_number_stays_moderate_up_to_degree_8() {
    // Measured spectral condition numbers κ = λmax/λmin of the reference mass matrix, raw and after
    // symmetric diagonal scaling D^(−1/2) M D^(−1/2) (common practice for comparing bases):
    //   p      1    2     3       4       5       6       7       8
    //   raw    4.0  76.4  1.37e4  1.46e4  3.58e4  4.04e4  8.48e4  9.60e4
    //   scaled 4.0  62.0  229     663     1.33e3  2.62e3  4.41e3  7.25e3
    // The raw jump at p = 3 is the small norm of the first bubble (∫(λ0λ1λ2)² = A/2520 by the
    // area-coordinate formula, against A/6 for λ_i²): with only the bubbles rescaled to the vertex
    // functions' norm κ was 322 at p = 3 and 2.6e4 at p = 8 (measured once, not asserted). Scaled,
    // κ grows algebraically (about p^3.4 from p = 2 to 8), not exponentially as monomial bases do.
    // Bounds: 1.5× the measured figures, so a basis change that worsens conditioning fails here.
    let raw_bound = [4.0, 76.4, 1.37e4, 1.46e4, 3.58e4, 4.04e4, 8.48e4, 9.60e4].map(|k| 1.5 * k);
    let scaled_bound = [4.0, 62.0, 229.0, 663.0, 1.33e3, 2.62e3, 4.41e3, 7.25e3].map(|k| 1.5 * k);
    for p in 1..=8 {
        let mass = mass_matrix(&TriangleBasis::new(p).unwrap());
        let d = DMatrix::from_diagonal(&mass.diagonal().map(|x| 1.0 / x.sqrt()));
        let raw = condition(mass.clone());
        let scaled = condition(&d * &mass * &d);
        assert!(raw < raw_bound[p - 1], "p {p}: raw κ {raw:.3e}");
        assert!(scaled < scaled_bound[p - 1], "p {p}: scaled κ {scaled:.3e}");
    }
}

#[test]
fn degrees_outside_1_to_p_max_are_errors() {
    for degree in [0, P_MAX + 1] {
        let err = TriangleBasis::new(degree).unwrap_err();
        assert!(matches!(err, SolverError::ElementDegree { degree: d, max: P_MAX } if d == degree));
    }
}
