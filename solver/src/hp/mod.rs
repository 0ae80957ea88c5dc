//! The high-order (hp) finite-element space on triangles: the hierarchical H1 basis on the
//! reference triangle and its tables at quadrature points. Conventions (reference triangle, edge
//! numbering and orientation, order of the local functions) are stated in [`basis`].

pub mod basis;
pub mod tabulation;

pub use basis::{Mode, TriangleBasis, P_MAX};
pub use tabulation::Tabulation;
