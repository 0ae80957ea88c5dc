//! Axisymmetric magnetostatics in the azimuthal vector potential A_φ(r, z).
//!
//! # The weak form
//!
//! With B = ∇ × (A_φ e_φ) the field components are
//! B_r = −∂A/∂z and B_z = ∂A/∂r + A/r. The law is H = ν (B − J0 e_z): ν the reluctivity
//! (ν(|B|) for a saturating material) and J0 = μ0 M0 the prescribed polarization of a
//! permanent magnet (zero elsewhere; a magnet's law is linear, B = μ0 μr H + J0 e_z with its
//! recoil permeability μr). Ampère's law ∇ × H = J_φ e_φ, tested with v e_φ and integrated
//! over the full revolution (dV = 2π r dr dz), reads
//!
//! ```text
//!   ∫ ν [ B_r(A) B_r(v) + B_z(A) B_z(v) ] dV  =  ∫ J_φ v dV  +  ∫ ν J0 B_z(v) dV
//!                                                                     for all v with v = 0 on Γ_D
//! ```
//!
//! The magnet's term is the weak form of its equivalent surface current: J0 is uniform in a
//! region, so ∇ × (ν J0 e_z) = 0 inside, and integrating by parts leaves the current
//! K = (ν J0 e_z) × n on the region's boundary (K = M0 × n for μr = 1). As a volume integral it
//! needs no surface quadrature and holds for any element shape.
//!
//! A = 0 on the axis r = 0 (symmetry) and A = A_D on the outer arc. Every integrand is bounded
//! at the axis: the test functions that survive vanish there, so v/r stays finite and quadrature
//! points (all strictly inside elements) never see r = 0. No 1/r factor appears in the matrix and
//! no axis "regularisation" is needed.
//!
//! Convention: every quadrature weight already contains 2π r (the full revolution), so element
//! integrals are true volume integrals in m³ and energies come out in joules.
//!
//! # Module map
//! - [`mesh`]: the triangle mesh the solver reads (nodes, triangles, region tags).
//! - [`element`]: shape functions and per-element geometry with quadrature points.
//! - [`quadrature`]: quadrature rules by degree (triangle and Gauss on a line).
//! - [`hp`]: the high-order (hp) element space: hierarchical basis on the reference triangle.
//! - [`material`]: linear and saturating laws H(|B|).
//! - [`dofs`], [`pattern`], [`weak_form`], [`assembly`]: from mesh to sparse system.
//! - [`cholesky`]: the sparse direct solve (faer).
//! - [`quadratic`]: second-order meshes (mid-edge nodes on curved outlines).
//! - [`problem`], [`solve`]: what to solve and the linear solve.
//! - [`nonlinear`]: Newton's method for saturating materials.
//! - [`exterior`]: the exact exterior (exterior multipole energy).
//! - [`field`], [`locate`], [`recover`]: the solved field, evaluation at points, patch recovery.
//! - [`post`]: dipole moment, energy, flux linkage, probes, core peak field.
//! - [`export`]: VTK output.
//! - [`hp`]: the high-order (hp) space under construction: geometry maps, degrees of freedom.
#![forbid(unsafe_code)]
#![warn(missing_docs)]
// Element kernels index local nodes a, b as the formulas do; iterator chains would hide them.
#![allow(clippy::needless_range_loop)]

pub mod adjacency;
pub mod assembly;
pub mod cholesky;
pub mod constants;
pub mod dofs;
pub mod element;
pub mod error;
pub mod export;
pub mod exterior;
pub mod field;
pub mod hp;
pub mod locate;
pub mod material;
pub mod mesh;
pub mod nonlinear;
pub mod pattern;
pub mod post;
pub mod problem;
pub mod quadratic;
pub mod quadrature;
pub mod recover;
pub mod solution;
pub mod solve;
pub mod weak_form;

pub use constants::MU0;
pub use error::SolverError;
pub use material::Material;
pub use mesh::FeMesh;
pub use nonlinear::{NewtonReport, NewtonSettings};
pub use problem::{Excitation, Problem, RegionProps};
pub use solution::{PointField, Solution};
pub use solve::{LinearOperator, Model};
