//! Gauss rules on [−1, 1]: Gauss–Legendre (weight 1) and Gauss–Jacobi (weight (1 − x)^α (1 + x)^β),
//! n points exact for polynomials of degree 2n − 1 (times the weight).
//!
//! Nodes are the zeros of P_n^(α,β), found by Newton's method with polynomial deflation from
//! Chebyshev–Gauss starting points (Karniadakis & Sherwin, Spectral/hp Element Methods for CFD, 2nd
//! ed. 2005, appendix B; section from memory); the deflation keeps each Newton run from falling
//! back onto a zero already found, so no bracketing is needed. Weights are the Christoffel numbers
//! w_i = C / ((1 − x_i²) P_n'(x_i)²), with C = 2 for Legendre (Abramowitz & Stegun 25.4.29) and
//! C = 2^(α+β+1) Γ(n+α+1) Γ(n+β+1) / (Γ(n+α+β+1) n!) in general (Karniadakis & Sherwin, appendix B,
//! from memory; the exactness tests below check both constants).

use super::polynomials::jacobi;
use super::QuadratureError;

/// Most points of a Gauss rule: 64 points integrate degree 127, far beyond what the elements need,
/// and the tests cover every count up to it.
pub const MAX_LINE_POINTS: usize = 64;

/// A rule on [−1, 1]: nodes in ascending order and their weights.
#[derive(Debug, Clone, PartialEq)]
pub struct LineRule {
    /// Nodes in (−1, 1), ascending.
    pub nodes: Vec<f64>,
    /// Weights (positive), summing to the integral of the weight function.
    pub weights: Vec<f64>,
}

impl LineRule {
    /// Number of points.
    pub fn len(&self) -> usize {
        self.nodes.len()
    }

    /// Always false: a rule has at least one point.
    pub fn is_empty(&self) -> bool {
        self.nodes.is_empty()
    }

    /// The highest polynomial degree integrated exactly (times the weight): 2n − 1.
    pub fn degree(&self) -> usize {
        2 * self.len() - 1
    }
}

/// The n-point Gauss–Legendre rule, exact for polynomials of degree 2n − 1.
pub fn gauss_legendre(points: usize) -> Result<LineRule, QuadratureError> {
    gauss_jacobi(points, 0, 0)
}

/// The Gauss–Legendre rule with the fewest points that is exact to `degree`.
pub fn line_rule(degree: usize) -> Result<LineRule, QuadratureError> {
    let max = 2 * MAX_LINE_POINTS - 1;
    if degree > max {
        return Err(QuadratureError::DegreeTooHigh {
            shape: "line",
            degree,
            max,
        });
    }
    gauss_legendre(degree / 2 + 1)
}

/// The n-point Gauss–Jacobi rule for the weight (1 − x)^α (1 + x)^β, exact for the weight times
/// any polynomial of degree 2n − 1. Integer exponents keep the weight constant a ratio of
/// factorials (the gamma function is not in Rust's standard library).
pub fn gauss_jacobi(points: usize, alpha: u32, beta: u32) -> Result<LineRule, QuadratureError> {
    if points == 0 || points > MAX_LINE_POINTS {
        return Err(QuadratureError::PointCount {
            points,
            max: MAX_LINE_POINTS,
        });
    }
    let (a, b) = (f64::from(alpha), f64::from(beta));
    let n = points;
    let mut nodes: Vec<f64> = Vec::with_capacity(n);
    for k in 0..n {
        // Chebyshev–Gauss point as the start, averaged with the previous zero (appendix B):
        // the zeros interlace, so the mean lies between the last zero found and the next one.
        let mut x = -((2 * k + 1) as f64 * std::f64::consts::PI / (2 * n) as f64).cos();
        if let Some(&last) = nodes.last() {
            x = 0.5 * (x + last);
        }
        let mut converged = false;
        for _ in 0..100 {
            let (p, dp) = jacobi(n, a, b, x);
            let deflation: f64 = nodes.iter().map(|&z| 1.0 / (x - z)).sum();
            let step = -p / (dp - deflation * p);
            x += step;
            if step.abs() <= 1e-15 {
                converged = true;
                break;
            }
        }
        if !(converged && x > -1.0 && x < 1.0) {
            return Err(QuadratureError::NodeNotConverged {
                node: k,
                points: n,
                alpha,
                beta,
            });
        }
        nodes.push(x);
    }
    nodes.sort_by(f64::total_cmp);
    // C = 2^(α+β+1) (n+α)! (n+β)! / ((n+α+β)! n!) = 2^(α+β+1) Π_{k=1..α} (n+k) / (n+β+k).
    let constant = 2f64.powi((alpha + beta + 1) as i32)
        * (1..=alpha)
            .map(|k| (n as f64 + f64::from(k)) / (n as f64 + b + f64::from(k)))
            .product::<f64>();
    let weights = nodes
        .iter()
        .map(|&x| {
            let dp = jacobi(n, a, b, x).1;
            constant / ((1.0 - x * x) * dp * dp)
        })
        .collect();
    Ok(LineRule { nodes, weights })
}

#[cfg(test)]
mod tests {
    use super::*;

    /// ∫_{−1}^{1} x^m dx = (1 + (−1)^m) / (m + 1) (elementary).
    fn moment(m: usize) -> f64 {
        if m.is_multiple_of(2) {
            2.0 / (m + 1) as f64
        } else {
            0.0
        }
    }

    fn integrate(rule: &LineRule, f: impl Fn(f64) -> f64) -> f64 {
        rule.nodes
            .iter()
            .zip(&rule.weights)
            .map(|(&x, &w)| w * f(x))
            .sum()
    }

    #[test]
    fn gauss_legendre_integrates_x_to_the_k_exactly_up_to_2n_minus_1() {
        for n in 1..=MAX_LINE_POINTS {
            let rule = gauss_legendre(n).unwrap();
            assert_eq!(rule.degree(), 2 * n - 1);
            for m in 0..=rule.degree() {
                let q = integrate(&rule, |x| x.powi(m as i32));
                // Scale of the terms: the odd moments cancel to 0 from terms of size up to 2.
                assert!(
                    (q - moment(m)).abs() < 1e-14 * 2.0_f64.max(moment(m)) * 4.0,
                    "n {n} x^{m}: {q}"
                );
            }
        }
    }

    #[test]
    fn gauss_legendre_error_at_degree_2n_is_the_published_remainder() {
        // Guards the exactness claim from the other side: x^(2n) is integrated with the error
        // R_n = 2^(2n+1) (n!)^4 / ((2n + 1) ((2n)!)^3) · f^(2n) (A&S 25.4.29), f^(2n) = (2n)!.
        for n in 1..=10 {
            let rule = gauss_legendre(n).unwrap();
            let error = moment(2 * n) - integrate(&rule, |x| x.powi(2 * n as i32));
            let fact = |k: usize| (1..=k).map(|i| i as f64).product::<f64>();
            let remainder = 2f64.powi(2 * n as i32 + 1) * fact(n).powi(4)
                / ((2 * n + 1) as f64 * fact(2 * n).powi(2));
            assert!(
                (error - remainder).abs() < 1e-6 * remainder,
                "n {n}: {error:e} vs {remainder:e}"
            );
        }
    }

    #[test]
    fn gauss_legendre_matches_the_tabulated_three_point_rule() {
        // A&S Table 25.4: n = 3, nodes 0, ±√(3/5), weights 8/9, 5/9.
        let rule = gauss_legendre(3).unwrap();
        let s = (0.6f64).sqrt();
        for (got, want) in rule.nodes.iter().zip([-s, 0.0, s]) {
            assert!((got - want).abs() < 1e-15);
        }
        for (got, want) in rule.weights.iter().zip([5.0 / 9.0, 8.0 / 9.0, 5.0 / 9.0]) {
            assert!((got - want).abs() < 1e-15);
        }
    }

    #[test]
    fn gauss_jacobi_1_0_integrates_the_weight_times_x_to_the_k_up_to_2n_minus_1() {
        // ∫ (1 − x) x^m dx = moment(m) − moment(m + 1).
        for n in 1..=32 {
            let rule = gauss_jacobi(n, 1, 0).unwrap();
            for m in 0..=rule.degree() {
                let want = moment(m) - moment(m + 1);
                let q = integrate(&rule, |x| x.powi(m as i32));
                assert!((q - want).abs() < 4e-14, "n {n} x^{m}: {q} vs {want}");
            }
        }
    }

    #[test]
    fn gauss_rules_have_positive_weights_and_nodes_strictly_inside() {
        for &(a, b) in &[(0, 0), (1, 0), (2, 1)] {
            for n in 1..=MAX_LINE_POINTS {
                let rule = gauss_jacobi(n, a, b).unwrap();
                assert!(rule.weights.iter().all(|&w| w > 0.0));
                assert!(rule.nodes.windows(2).all(|p| p[0] < p[1]));
                assert!(rule.nodes.iter().all(|&x| x > -1.0 && x < 1.0));
            }
        }
    }

    #[test]
    fn point_counts_outside_the_supported_range_are_errors() {
        assert_eq!(
            gauss_legendre(0),
            Err(QuadratureError::PointCount {
                points: 0,
                max: MAX_LINE_POINTS
            })
        );
        assert!(matches!(
            gauss_jacobi(MAX_LINE_POINTS + 1, 1, 0),
            Err(QuadratureError::PointCount { .. })
        ));
        assert!(matches!(
            line_rule(2 * MAX_LINE_POINTS),
            Err(QuadratureError::DegreeTooHigh { shape: "line", .. })
        ));
        assert_eq!(
            line_rule(2 * MAX_LINE_POINTS - 1).unwrap().len(),
            MAX_LINE_POINTS
        );
    }
}
