//! Triangle rules by degree of exactness: Dunavant's where they are exact enough and smaller,
//! otherwise the collapsed (conical product) Gauss–Jacobi rule of any degree.
//!
//! The collapsed rule maps the unit square onto the triangle, η = t, ξ = s (1 − t), whose Jacobian
//! 1 − t vanishes on the collapsed edge (Duffy's transformation; the conical product rules of
//! Stroud, Approximate Calculation of Multiple Integrals, 1971; Karniadakis & Sherwin, Spectral/hp
//! Element Methods for CFD, 2005, §4.1, section number from memory). Gauss–Legendre in s and
//! Gauss–Jacobi with α = 1, β = 0 in t absorb that Jacobian into the weight: a monomial ξ^a η^b
//! becomes s^a · (1 − t)^a t^b times the weight (1 − t), degree a in s and a + b in t, so
//! n = ⌊d/2⌋ + 1 points per direction are exact to total degree d. Every point is strictly inside
//! (s, t ∈ (0, 1)), as the axisymmetric integrands (v/r) need.

use super::dunavant::{DUNAVANT_5, DUNAVANT_6};
use super::gauss::{gauss_jacobi, gauss_legendre};
use super::{QuadratureError, RulePoint};

/// Highest total degree a triangle rule is provided for (and tested at): twice the highest
/// element degree planned (2·16) with room for the 2πr weight and curved-element factors.
pub const MAX_TRIANGLE_DEGREE: usize = 40;

/// A quadrature rule on the reference triangle in barycentric form.
#[derive(Debug, Clone)]
pub struct TriangleRule {
    /// Highest total degree integrated exactly (at least the degree asked for).
    pub degree: usize,
    /// Points with weights as fractions of the area (summing to 1).
    pub points: Vec<RulePoint>,
}

impl TriangleRule {
    /// The rule with the fewest points that is exact to total degree `degree`.
    pub fn exact_to(degree: usize) -> Result<Self, QuadratureError> {
        if degree > MAX_TRIANGLE_DEGREE {
            return Err(QuadratureError::DegreeTooHigh {
                shape: "triangle",
                degree,
                max: MAX_TRIANGLE_DEGREE,
            });
        }
        let collapsed_points = (degree / 2 + 1).pow(2);
        let symmetric: [(usize, &[RulePoint]); 2] = [(5, &DUNAVANT_5), (6, &DUNAVANT_6)];
        if let Some(&(exact, points)) = symmetric
            .iter()
            .filter(|(exact, points)| *exact >= degree && points.len() < collapsed_points)
            .min_by_key(|(_, points)| points.len())
        {
            return Ok(Self {
                degree: exact,
                points: points.to_vec(),
            });
        }
        collapsed(degree / 2 + 1)
    }

    /// Number of points.
    pub fn len(&self) -> usize {
        self.points.len()
    }

    /// Always false: a rule has at least one point.
    pub fn is_empty(&self) -> bool {
        self.points.is_empty()
    }
}

/// The collapsed Gauss–Jacobi rule with n points per direction (n², exact to degree 2n − 1).
pub fn collapsed(n: usize) -> Result<TriangleRule, QuadratureError> {
    let legendre = gauss_legendre(n)?;
    let jacobi = gauss_jacobi(n, 1, 0)?;
    let mut points = Vec::with_capacity(n * n);
    for (&y, &wy) in jacobi.nodes.iter().zip(&jacobi.weights) {
        let t = 0.5 * (1.0 + y);
        for (&x, &wx) in legendre.nodes.iter().zip(&legendre.weights) {
            let s = 0.5 * (1.0 + x);
            // ∫_T f dξdη = ∫∫ f (1 − t) ds dt = (1/2)(1/4) Σ wx wy f; the area is 1/2, so the
            // weight as a fraction of it is wx wy / 4 (Σ wx = 2, Σ wy = ∫(1 − y)dy = 2).
            points.push(RulePoint {
                bary: [(1.0 - s) * (1.0 - t), s * (1.0 - t), t],
                weight: 0.25 * wx * wy,
            });
        }
    }
    Ok(TriangleRule {
        degree: 2 * n - 1,
        points,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    /// ∫_T ξ^a η^b dξ dη = a! b! / (a + b + 2)! over the unit triangle (the Dirichlet integral;
    /// Zienkiewicz & Taylor, The Finite Element Method, vol. 1, area-coordinate formula), as a
    /// fraction of the area 1/2.
    fn exact_fraction(a: usize, b: usize) -> f64 {
        // a! b! / (a+b+2)! = 1 / ((a+b+2)(a+b+1) C(a+b, a)), computed without overflow.
        let binom: f64 = (1..=a).map(|k| (b + k) as f64 / k as f64).product();
        2.0 / ((a + b + 2) as f64 * (a + b + 1) as f64 * binom)
    }

    /// Largest relative error over all monomials ξ^a η^b with a + b ≤ degree.
    fn worst_monomial_error(rule: &TriangleRule, degree: usize) -> f64 {
        let mut worst: f64 = 0.0;
        for a in 0..=degree {
            for b in 0..=(degree - a) {
                let q: f64 = rule
                    .points
                    .iter()
                    .map(|p| p.weight * p.bary[1].powi(a as i32) * p.bary[2].powi(b as i32))
                    .sum();
                let want = exact_fraction(a, b);
                worst = worst.max((q - want).abs() / want);
            }
        }
        worst
    }

    #[test]
    fn every_rule_up_to_the_maximum_integrates_all_monomials_of_its_degree() {
        // Measured worst relative error per rule: ≤ 4.4e-15 for Dunavant's 7 points (its constants
        // are printed to 15 digits), 7.8e-15 for its 12 points, 1e-15 to 6.7e-15 for the collapsed
        // rules up to d = 40 (441 points).
        for degree in 0..=MAX_TRIANGLE_DEGREE {
            let rule = TriangleRule::exact_to(degree).unwrap();
            assert!(rule.degree >= degree);
            let err = worst_monomial_error(&rule, degree);
            assert!(err < 1e-14, "degree {degree}: relative error {err:e}");
        }
    }

    #[test]
    fn collapsed_rules_are_exact_to_2n_minus_1_and_not_beyond() {
        for n in 1..=6 {
            let rule = collapsed(n).unwrap();
            assert!(worst_monomial_error(&rule, 2 * n - 1) < 1e-14, "n {n}");
            assert!(worst_monomial_error(&rule, 2 * n) > 1e-8, "n {n}");
        }
    }

    #[test]
    fn rules_have_positive_weights_summing_to_one_and_points_strictly_inside() {
        for degree in 0..=MAX_TRIANGLE_DEGREE {
            let rule = TriangleRule::exact_to(degree).unwrap();
            let total: f64 = rule.points.iter().map(|p| p.weight).sum();
            assert!((total - 1.0).abs() < 1e-14, "degree {degree}: Σw = {total}");
            for p in &rule.points {
                assert!(p.weight > 0.0);
                assert!(p.bary.iter().all(|&l| l > 0.0 && l < 1.0));
                assert!((p.bary.iter().sum::<f64>() - 1.0).abs() < 1e-15);
            }
        }
    }

    #[test]
    fn the_smaller_rule_is_chosen_where_dunavant_is_exact_enough() {
        // Collapsed rules have 1, 4, 9, 16 points for d = 0–1, 2–3, 4–5, 6–7.
        let counts: Vec<usize> = (0..=8)
            .map(|d| TriangleRule::exact_to(d).unwrap().len())
            .collect();
        assert_eq!(counts, [1, 1, 4, 4, 7, 7, 12, 16, 25]);
    }

    #[test]
    fn a_degree_above_the_maximum_is_an_error_not_a_panic() {
        let err = TriangleRule::exact_to(MAX_TRIANGLE_DEGREE + 1).unwrap_err();
        assert_eq!(
            err,
            QuadratureError::DegreeTooHigh {
                shape: "triangle",
                degree: MAX_TRIANGLE_DEGREE + 1,
                max: MAX_TRIANGLE_DEGREE
            }
        );
        let solver_error: crate::SolverError = err.into();
        assert!(
            solver_error.to_string().contains("degree 41"),
            "{solver_error}"
        );
    }
}
