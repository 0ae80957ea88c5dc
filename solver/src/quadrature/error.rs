//! Errors of the quadrature rules.

/// Why no quadrature rule could be built.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum QuadratureError {
    /// No rule of the asked degree of exactness is provided.
    #[error("no {shape} quadrature rule is exact to degree {degree}: the highest supported degree is {max}")]
    DegreeTooHigh {
        /// "triangle" or "line".
        shape: &'static str,
        /// The degree asked for.
        degree: usize,
        /// The highest degree provided.
        max: usize,
    },
    /// A Gauss rule was asked with no points or with more than are provided.
    #[error("a Gauss rule needs 1 to {max} points, {points} were asked")]
    PointCount {
        /// Points asked for.
        points: usize,
        /// Most points provided.
        max: usize,
    },
    /// Newton's iteration for a Gauss node stalled (not seen for the supported point counts and
    /// weights; reported rather than returning an inexact rule).
    #[error("the Gauss–Jacobi node {node} of {points} (α = {alpha}, β = {beta}) did not converge")]
    NodeNotConverged {
        /// Index of the node.
        node: usize,
        /// Points of the rule.
        points: usize,
        /// Exponent of (1 − x) in the weight.
        alpha: u32,
        /// Exponent of (1 + x) in the weight.
        beta: u32,
    },
}
