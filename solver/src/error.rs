//! Errors of the solver crate.

/// What can go wrong while setting up or solving a field problem.
#[derive(Debug, thiserror::Error)]
pub enum SolverError {
    /// A triangle references a node that does not exist.
    #[error("triangle {triangle} references node {node}, but the mesh has {nodes} nodes")]
    BadNodeIndex {
        /// Triangle index.
        triangle: usize,
        /// Offending node index.
        node: u32,
        /// Number of nodes.
        nodes: usize,
    },
    /// A triangle has zero or negative area (must be counter-clockwise in (r, z)).
    #[error("triangle {triangle} is degenerate or clockwise (signed area {area:e} m²)")]
    BadTriangle {
        /// Triangle index.
        triangle: usize,
        /// Signed area in m².
        area: f64,
    },
    /// A node lies at r < 0.
    #[error("node {node} lies at r = {r:e} m < 0")]
    NegativeRadius {
        /// Node index.
        node: usize,
        /// Its radius in m.
        r: f64,
    },
    /// A region tag has no properties.
    #[error("region tag {tag} is used by the mesh but has no material")]
    MissingRegion {
        /// Region tag.
        tag: u32,
    },
    /// A material parameter is out of range.
    #[error("invalid material: {0}")]
    BadMaterial(String),
    /// A region with a prescribed polarization has a saturating material.
    #[error("a region with a prescribed polarization must have a linear material (its recoil permeability)")]
    PolarizedNonlinear,
    /// Nothing is free to solve for.
    #[error("every node is fixed: nothing to solve")]
    NoUnknowns,
    /// The system matrix was not positive definite (should not happen for valid input).
    #[error("the system matrix is not positive definite ({0})")]
    NotPositiveDefinite(String),
    /// The sparse factorisation failed for another reason (memory).
    #[error("sparse factorisation failed: {0}")]
    Factorization(String),
    /// A point or line probe lies outside the mesh.
    #[error("point (r = {r} m, z = {z} m) lies outside the meshed region")]
    OutsideMesh {
        /// Radius in m.
        r: f64,
        /// Axial position in m.
        z: f64,
    },
    /// The nonlinear iteration did not reach its tolerances.
    #[error(
        "Newton iteration did not converge: relative residual {residual:.3e} after {iterations} iterations ({reason}); residuals {}",
        history.iter().map(|r| format!("{r:.1e}")).collect::<Vec<_>>().join(" → ")
    )]
    NotConverged {
        /// Newton iterations done.
        iterations: usize,
        /// Last relative residual.
        residual: f64,
        /// Why it stopped.
        reason: StopReason,
        /// Relative residual before each iteration and at the end.
        history: Vec<f64>,
    },
    /// No quadrature rule exists for what was asked.
    #[error(transparent)]
    Quadrature(#[from] crate::quadrature::QuadratureError),
    /// An element's polynomial degree is outside the supported range.
    #[error("polynomial degree {degree} is not supported: the element degree must be 1 to {max}")]
    ElementDegree {
        /// The degree asked for.
        degree: usize,
        /// The highest degree supported.
        max: usize,
    },
    /// Writing an output file failed.
    #[error("cannot write {path}: {reason}")]
    Write {
        /// File path.
        path: String,
        /// What went wrong.
        reason: String,
    },
}

/// Why a nonlinear iteration stopped without converging.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum StopReason {
    /// The iteration budget was spent.
    IterationLimit {
        /// The user's iteration limit.
        limit: usize,
        /// Iterations of abandoned attempts before a restart, counted against the limit.
        before_restart: usize,
    },
    /// The residual became NaN or infinite.
    NonFiniteResidual,
}

impl std::fmt::Display for StopReason {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            Self::IterationLimit {
                limit,
                before_restart: 0,
            } => write!(f, "iteration limit {limit} reached"),
            Self::IterationLimit {
                limit,
                before_restart,
            } => write!(
                f,
                "iteration limit {limit} reached (counting {before_restart} before the restart \
                 from the first-order field)"
            ),
            Self::NonFiniteResidual => write!(f, "the residual is not finite"),
        }
    }
}
