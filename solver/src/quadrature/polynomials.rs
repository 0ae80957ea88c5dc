//! Jacobi polynomials P_n^(α,β) (Legendre for α = β = 0) by their three-term recurrence, in the
//! scaled form t^n P_n(u/t) that the triangle's bubble functions need.
//!
//! The recurrence is Abramowitz & Stegun, Handbook of Mathematical Functions (1964), 22.7.1,
//! which for α = β = 0 is the Legendre recurrence A&S 22.7.10,
//! (n + 1) P_{n+1} = (2n + 1) x P_n − n P_{n−1}. Derivatives follow by differentiating the
//! recurrence itself, so no formula divides by 1 − x² (which vanishes at the ends).

/// Rolling evaluation of one Jacobi family, degree by degree: S_n(u, t) = t^n P_n^(α,β)(u/t) and
/// its partial derivatives. With t = 1 this is P_n(u) and dP_n/du.
///
/// The scaled form is a polynomial in (u, t) (multiply the recurrence by t^n), so it stays finite
/// where t = 0, the corner of the triangle at which the collapsed coordinate u/t is undefined.
#[derive(Debug, Clone)]
pub struct ScaledJacobi {
    alpha: f64,
    beta: f64,
    u: f64,
    t: f64,
    degree: usize,
    /// (value, ∂/∂u, ∂/∂t) at the current degree n.
    current: [f64; 3],
    /// The same at degree n − 1 (zero while n = 0).
    previous: [f64; 3],
}

impl ScaledJacobi {
    /// Starts the family with weight (1 − x)^α (1 + x)^β at degree 0, at the point (u, t).
    pub fn new(alpha: f64, beta: f64, u: f64, t: f64) -> Self {
        Self {
            alpha,
            beta,
            u,
            t,
            degree: 0,
            current: [1.0, 0.0, 0.0],
            previous: [0.0; 3],
        }
    }

    /// The degree n of the current value.
    pub fn degree(&self) -> usize {
        self.degree
    }

    /// S_n(u, t).
    pub fn value(&self) -> f64 {
        self.current[0]
    }

    /// ∂S_n/∂u (dP_n/dx when t = 1).
    pub fn du(&self) -> f64 {
        self.current[1]
    }

    /// ∂S_n/∂t.
    pub fn dt(&self) -> f64 {
        self.current[2]
    }

    /// Moves to degree n + 1.
    pub fn advance(&mut self) {
        let n = (self.degree + 1) as f64;
        let (a, b) = (self.alpha, self.beta);
        let (u, t) = (self.u, self.t);
        let [p1, p1u, p1t] = self.current;
        let [p2, p2u, p2t] = self.previous;
        // a_n S_n = (b_n u + c_n t) S_{n−1} − d_n t² S_{n−2}  (A&S 22.7.1 times t^n).
        let (an, bn, cn, dn) = if self.degree == 0 {
            // P_1 = ½[(α − β) + (α + β + 2) x]; the general coefficients are 0/0 at n = 1 when α + β = 0.
            (2.0, a + b + 2.0, a - b, 0.0)
        } else {
            let s = 2.0 * n + a + b;
            (
                2.0 * n * (n + a + b) * (s - 2.0),
                (s - 1.0) * s * (s - 2.0),
                (s - 1.0) * (a * a - b * b),
                2.0 * (n + a - 1.0) * (n + b - 1.0) * s,
            )
        };
        let lin = bn * u + cn * t;
        let value = (lin * p1 - dn * t * t * p2) / an;
        let du = (bn * p1 + lin * p1u - dn * t * t * p2u) / an;
        let dt = (cn * p1 + lin * p1t - dn * (2.0 * t * p2 + t * t * p2t)) / an;
        self.previous = self.current;
        self.current = [value, du, dt];
        self.degree += 1;
    }
}

/// P_n^(α,β)(x) and its derivative.
pub fn jacobi(n: usize, alpha: f64, beta: f64, x: f64) -> (f64, f64) {
    let mut family = ScaledJacobi::new(alpha, beta, x, 1.0);
    for _ in 0..n {
        family.advance();
    }
    (family.value(), family.du())
}

/// The Legendre polynomial P_n(x) and its derivative.
pub fn legendre(n: usize, x: f64) -> (f64, f64) {
    jacobi(n, 0.0, 0.0, x)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn binomial(n: f64, k: usize) -> f64 {
        (0..k).map(|i| (n - i as f64) / (i + 1) as f64).product()
    }

    /// The explicit sum P_n^(α,β)(x) = Σ_s C(n+α, n−s) C(n+β, s) ((x−1)/2)^s ((x+1)/2)^(n−s)
    /// (A&S 22.3.2; equation number from memory, the sum is also Szegő, Orthogonal Polynomials, (4.3.2)).
    fn explicit_jacobi(n: usize, a: f64, b: f64, x: f64) -> f64 {
        (0..=n)
            .map(|s| {
                binomial(n as f64 + a, n - s)
                    * binomial(n as f64 + b, s)
                    * ((x - 1.0) / 2.0).powi(s as i32)
                    * ((x + 1.0) / 2.0).powi((n - s) as i32)
            })
            .sum()
    }

    #[test]
    fn legendre_recurrence_matches_the_closed_forms_of_low_degree() {
        // P_2..P_5 as listed in A&S Table 22.9 (table number from memory; the same forms follow from
        // Rodrigues' formula).
        let closed: [fn(f64) -> f64; 4] = [
            |x| (3.0 * x * x - 1.0) / 2.0,
            |x| (5.0 * x.powi(3) - 3.0 * x) / 2.0,
            |x| (35.0 * x.powi(4) - 30.0 * x * x + 3.0) / 8.0,
            |x| (63.0 * x.powi(5) - 70.0 * x.powi(3) + 15.0 * x) / 8.0,
        ];
        for (k, f) in closed.iter().enumerate() {
            for i in 0..=20 {
                let x = -1.0 + 0.1 * i as f64;
                assert!(
                    (legendre(k + 2, x).0 - f(x)).abs() < 1e-14,
                    "P_{} at {x}",
                    k + 2
                );
            }
        }
    }

    #[test]
    fn jacobi_recurrence_matches_the_explicit_sum() {
        for &(a, b) in &[(0.0, 0.0), (1.0, 0.0), (1.0, 1.0), (2.0, 2.0), (9.0, 2.0)] {
            for n in 0..=12 {
                for i in 0..=16 {
                    let x = -1.0 + 0.125 * i as f64;
                    let want = explicit_jacobi(n, a, b, x);
                    let got = jacobi(n, a, b, x).0;
                    assert!(
                        (got - want).abs() < 1e-11 * want.abs().max(1.0),
                        "α {a} β {b} n {n} x {x}: {got} vs {want}"
                    );
                }
            }
        }
    }

    #[test]
    fn derivatives_by_recurrence_match_central_differences() {
        let h = 1e-6;
        for &(a, b) in &[(0.0, 0.0), (1.0, 1.0), (7.0, 2.0)] {
            for n in 0..=10 {
                for &(u, t) in &[(0.3, 0.8), (-0.55, 0.6), (0.05, 0.1)] {
                    let at = |u: f64, t: f64| {
                        let mut f = ScaledJacobi::new(a, b, u, t);
                        (0..n).for_each(|_| f.advance());
                        f
                    };
                    let f = at(u, t);
                    let du = (at(u + h, t).value() - at(u - h, t).value()) / (2.0 * h);
                    let dt = (at(u, t + h).value() - at(u, t - h).value()) / (2.0 * h);
                    let scale = 1.0 + f.du().abs() + f.dt().abs();
                    assert!((f.du() - du).abs() < 1e-6 * scale, "∂u α {a} n {n}");
                    assert!((f.dt() - dt).abs() < 1e-6 * scale, "∂t α {a} n {n}");
                }
            }
        }
    }

    #[test]
    fn scaled_form_is_t_to_the_n_times_the_polynomial_at_u_over_t() {
        for n in 0..=9 {
            let (u, t) = (0.21, 0.37);
            let mut f = ScaledJacobi::new(2.0, 2.0, u, t);
            (0..n).for_each(|_| f.advance());
            let want = t.powi(n as i32) * jacobi(n, 2.0, 2.0, u / t).0;
            assert!(
                (f.value() - want).abs() < 1e-13 * want.abs().max(1e-3),
                "n {n}"
            );
        }
    }
}
