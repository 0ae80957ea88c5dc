//! High-order (hp) finite elements on triangles: the hierarchical H1 basis and its tables at
//! quadrature points, exact curved geometry, the degrees of freedom, the element integrals,
//! static condensation, the exact exterior at any degree, and the hp model that solves.
//!
//! Conventions (reference triangle, edge numbering and orientation, order of the local
//! functions) are stated in [`basis`] and [`dofs`].

pub mod adapt;
pub mod basis;
pub mod condense;
pub mod curve;
pub mod curved_edges;
pub mod dofs;
pub mod evaluate;
pub mod exterior;
pub mod kernel;
mod knee;
pub mod locate;
pub mod map;
pub mod model;
pub mod nonlinear;
pub mod nonlinear_terms;
pub mod prolong;
pub mod sample;
pub mod tabulation;

pub use basis::{Mode, TriangleBasis, P_MAX};
pub use model::{HpModel, HpSolution};
pub use tabulation::Tabulation;
