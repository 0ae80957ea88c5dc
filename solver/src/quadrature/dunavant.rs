//! Dunavant's symmetric rules on the triangle (D. A. Dunavant, "High degree efficient symmetrical
//! Gaussian quadrature rules for the triangle", Int. J. Numer. Meth. Eng. 21, 1129–1148, 1985).
//! Kept as constants because the first- and second-order elements index them directly.

use super::RulePoint;

/// Dunavant's 7-point rule, exact for polynomials of degree 5
/// (D. A. Dunavant, Int. J. Numer. Meth. Eng. 21, 1129–1148, 1985, Table for p = 5).
///
/// Degree 5 integrates the polynomial parts of the first-order kernel exactly (degree ≤ 2 with the
/// 2πr weight) and leaves ample accuracy for the bounded non-polynomial v·w/r term.
pub const DUNAVANT_5: [RulePoint; 7] = {
    const A1: f64 = 0.059_715_871_789_770;
    const B1: f64 = 0.470_142_064_105_115;
    const A2: f64 = 0.797_426_985_353_087;
    const B2: f64 = 0.101_286_507_323_456;
    const W0: f64 = 0.225;
    const W1: f64 = 0.132_394_152_788_506;
    const W2: f64 = 0.125_939_180_544_827;
    const T: f64 = 1.0 / 3.0;
    [
        RulePoint {
            bary: [T, T, T],
            weight: W0,
        },
        RulePoint {
            bary: [A1, B1, B1],
            weight: W1,
        },
        RulePoint {
            bary: [B1, A1, B1],
            weight: W1,
        },
        RulePoint {
            bary: [B1, B1, A1],
            weight: W1,
        },
        RulePoint {
            bary: [A2, B2, B2],
            weight: W2,
        },
        RulePoint {
            bary: [B2, A2, B2],
            weight: W2,
        },
        RulePoint {
            bary: [B2, B2, A2],
            weight: W2,
        },
    ]
};

/// Dunavant's 12-point rule, exact for polynomials of degree 6 (Dunavant 1985, p = 6), for
/// second-order elements: their stiffness integrands are degree 3 with the 2πr weight plus
/// the bounded v·w/r term, and curved (isoparametric) elements add a smooth rational factor.
pub const DUNAVANT_6: [RulePoint; 12] = {
    const A: f64 = 0.249_286_745_170_910;
    const WA: f64 = 0.116_786_275_726_379;
    const B: f64 = 0.063_089_014_491_502;
    const WB: f64 = 0.050_844_906_370_207;
    const C0: f64 = 0.053_145_049_844_817;
    const C1: f64 = 0.310_352_451_033_784;
    const C2: f64 = 0.636_502_499_121_399;
    const WC: f64 = 0.082_851_075_618_374;
    const fn p(bary: [f64; 3], weight: f64) -> RulePoint {
        RulePoint { bary, weight }
    }
    [
        p([1.0 - 2.0 * A, A, A], WA),
        p([A, 1.0 - 2.0 * A, A], WA),
        p([A, A, 1.0 - 2.0 * A], WA),
        p([1.0 - 2.0 * B, B, B], WB),
        p([B, 1.0 - 2.0 * B, B], WB),
        p([B, B, 1.0 - 2.0 * B], WB),
        p([C0, C1, C2], WC),
        p([C0, C2, C1], WC),
        p([C1, C0, C2], WC),
        p([C1, C2, C0], WC),
        p([C2, C0, C1], WC),
        p([C2, C1, C0], WC),
    ]
};

#[cfg(test)]
mod tests {
    use super::*;

    /// ∫ over the unit reference triangle of λ0^a λ1^b λ2^c = 2·a! b! c! / (a+b+c+2)! · area
    /// (the standard barycentric monomial formula, e.g. Zienkiewicz & Taylor, The Finite Element
    /// Method, Vol. 1, eq. for area coordinates).
    fn exact(a: u32, b: u32, c: u32) -> f64 {
        let f = |n: u32| (1..=n).map(|k| k as f64).product::<f64>();
        2.0 * f(a) * f(b) * f(c) / f(a + b + c + 2)
    }

    fn check(rule: &[RulePoint], degree: u32) {
        for a in 0..=degree {
            for b in 0..=(degree - a) {
                for c in 0..=(degree - a - b) {
                    let q: f64 = rule
                        .iter()
                        .map(|p| {
                            p.weight
                                * p.bary[0].powi(a as i32)
                                * p.bary[1].powi(b as i32)
                                * p.bary[2].powi(c as i32)
                        })
                        .sum();
                    assert!((q - exact(a, b, c)).abs() < 1e-14, "{a} {b} {c}: {q}");
                }
            }
        }
    }

    #[test]
    fn dunavant_5_integrates_all_monomials_up_to_degree_5_exactly() {
        check(&DUNAVANT_5, 5);
    }

    #[test]
    fn dunavant_6_integrates_all_monomials_up_to_degree_6_exactly() {
        check(&DUNAVANT_6, 6);
    }
}
