//! Finite elements: shape functions and per-element geometry.
//!
//! [`ElementGeometry`] is the one contract the weak form, assembly and post-processing read:
//! basis values and B-operators at quadrature points, for first-order ([`tri3`]) and
//! second-order isoparametric ([`tri6`]) triangles alike.

pub mod geometry;
pub mod tri3;
pub mod tri6;

pub use geometry::{ElementGeometry, Local, LocalMatrix, QuadPoint, MAX_NODES};
