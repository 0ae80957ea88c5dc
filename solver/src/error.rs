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
    /// A start for p-continuation that does not fit the model (another mesh, or a solution
    /// of another model).
    #[error("p-continuation: {0}")]
    BadStart(String),
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
    /// An element's cell (bubble) block is not positive definite, so it cannot be condensed.
    #[error(
        "element {element}: its cell unknowns cannot be condensed (block not positive definite)"
    )]
    CellCondensation {
        /// Triangle index.
        element: usize,
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
    /// A geometry map of an element folds: det J ≤ 0 at one of its check points.
    #[error("element {element}: its geometry map folds (det J = {det:e} at ξ = {xi}, η = {eta})")]
    FoldedElement {
        /// Element index.
        element: usize,
        /// The offending Jacobian determinant, m².
        det: f64,
        /// Reference coordinate ξ of the check point.
        xi: f64,
        /// Reference coordinate η of the check point.
        eta: f64,
    },
    /// An edge declared on an exact curve has an end point off that curve.
    #[error("element {element}, edge {edge}: end point (r = {r} m, z = {z} m) is off its curve (relative level {off:e})")]
    EdgeOffCurve {
        /// Element index.
        element: usize,
        /// Local edge (0, 1 or 2).
        edge: usize,
        /// Radius of the end point, m.
        r: f64,
        /// Axial position of the end point, m.
        z: f64,
        /// Its relative level (0 on the curve).
        off: f64,
    },
    /// A curved edge cannot be mapped (bad curve data, or an arc of half a turn or more).
    #[error("element {element}, edge {edge}: {reason}")]
    BadCurvedEdge {
        /// Element index.
        element: usize,
        /// Local edge (0, 1 or 2; 3 or more when the declaration itself is out of range).
        edge: usize,
        /// What is wrong.
        reason: String,
    },
    /// A polynomial degree per element is missing or out of range.
    #[error("element {element}: polynomial degree {degree} is not in 1..={max}")]
    BadDegree {
        /// Element index (the number of elements when the list is too short).
        element: usize,
        /// The degree given (0 when missing).
        degree: u32,
        /// Largest degree accepted.
        max: u32,
    },
    /// An edge is shared by more than two triangles (the mesh is not a surface).
    #[error("edge {a}–{b} is shared by {count} triangles (at most 2 allowed)")]
    NonManifoldEdge {
        /// Lower vertex of the edge.
        a: u32,
        /// Higher vertex of the edge.
        b: u32,
        /// Number of triangles sharing it.
        count: usize,
    },
    /// A vertex or edge named as fixed is not part of the hp space.
    #[error("fixed {what} {index} is not part of the hp space")]
    NotInSpace {
        /// "vertex" or "edge".
        what: &'static str,
        /// The node or edge index given.
        index: usize,
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
