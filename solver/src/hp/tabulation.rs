//! Values and reference gradients of a basis at every point of a quadrature rule, computed once
//! per (degree, edge orientations, rule) and reused by every element that shares them.

use super::basis::TriangleBasis;
use crate::quadrature::RulePoint;

/// The basis tabulated at the points of one rule, point-major.
#[derive(Debug, Clone)]
pub struct Tabulation {
    functions: usize,
    reversed: [bool; 3],
    /// Reference coordinates (ξ, η) of each point.
    points: Vec<[f64; 2]>,
    /// Weights as fractions of the reference area.
    weights: Vec<f64>,
    values: Vec<f64>,
    grads: Vec<[f64; 2]>,
}

impl Tabulation {
    /// Tabulates `basis` with the edge orientations `reversed` at every point of `rule`.
    pub fn new(basis: &TriangleBasis, rule: &[RulePoint], reversed: [bool; 3]) -> Self {
        let functions = basis.len();
        let mut values = vec![0.0; functions * rule.len()];
        let mut grads = vec![[0.0; 2]; functions * rule.len()];
        for (q, point) in rule.iter().enumerate() {
            let range = q * functions..(q + 1) * functions;
            let [_, xi, eta] = point.bary;
            basis.eval(
                xi,
                eta,
                reversed,
                &mut values[range.clone()],
                &mut grads[range],
            );
        }
        Self {
            functions,
            reversed,
            points: rule.iter().map(|p| [p.bary[1], p.bary[2]]).collect(),
            weights: rule.iter().map(|p| p.weight).collect(),
            values,
            grads,
        }
    }

    /// Number of local functions per point.
    pub fn functions(&self) -> usize {
        self.functions
    }

    /// Number of quadrature points.
    pub fn points(&self) -> usize {
        self.points.len()
    }

    /// The edge orientations the table was made for.
    pub fn reversed(&self) -> [bool; 3] {
        self.reversed
    }

    /// Reference coordinates (ξ, η) of point `q`.
    pub fn point(&self, q: usize) -> [f64; 2] {
        self.points[q]
    }

    /// Weight of point `q` as a fraction of the reference area (the weights sum to 1).
    pub fn weight(&self, q: usize) -> f64 {
        self.weights[q]
    }

    /// Values of all local functions at point `q`.
    pub fn values(&self, q: usize) -> &[f64] {
        &self.values[q * self.functions..(q + 1) * self.functions]
    }

    /// Reference gradients (∂/∂ξ, ∂/∂η) of all local functions at point `q`.
    pub fn grads(&self, q: usize) -> &[[f64; 2]] {
        &self.grads[q * self.functions..(q + 1) * self.functions]
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::quadrature::TriangleRule;

    #[test]
    fn tables_hold_what_eval_gives_at_each_rule_point() {
        let basis = TriangleBasis::new(5).unwrap();
        let rule = TriangleRule::exact_to(10).unwrap();
        let reversed = [false, true, true];
        let table = Tabulation::new(&basis, &rule.points, reversed);
        assert_eq!((table.points(), table.functions()), (rule.len(), 21));
        assert_eq!(table.reversed(), reversed);
        let mut values = vec![0.0; basis.len()];
        let mut grads = vec![[0.0; 2]; basis.len()];
        for (q, p) in rule.points.iter().enumerate() {
            assert_eq!(table.point(q), [p.bary[1], p.bary[2]]);
            assert_eq!(table.weight(q), p.weight);
            basis.eval(p.bary[1], p.bary[2], reversed, &mut values, &mut grads);
            assert_eq!(table.values(q), &values[..]);
            assert_eq!(table.grads(q), &grads[..]);
        }
    }

    #[test]
    fn a_table_integrates_the_vertex_functions_to_a_third_of_the_area() {
        // ∫_T λ_i dA = A/3 (Zienkiewicz & Taylor, area-coordinate formula with a = 1).
        let basis = TriangleBasis::new(2).unwrap();
        let rule = TriangleRule::exact_to(2).unwrap();
        let table = Tabulation::new(&basis, &rule.points, [false; 3]);
        for v in 0..3 {
            let integral: f64 = (0..table.points())
                .map(|q| table.weight(q) * table.values(q)[v])
                .sum();
            assert!((integral - 1.0 / 3.0).abs() < 1e-15);
        }
    }
}
