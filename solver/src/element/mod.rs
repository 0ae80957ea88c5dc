//! Finite elements: shape functions and per-element geometry.
//!
//! Only the 3-node triangle exists so far; higher order plugs in beside it with the same
//! [`ElementGeometry`] contract (values and physical gradients at quadrature points).

pub mod tri3;

pub use tri3::{ElementGeometry, QuadPoint};
