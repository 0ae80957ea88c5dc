//! High-order (hp) finite elements: the geometry of an element apart from its polynomial space.
//!
//! Conventions (reference triangle, local edges, orientation, local order) are those of the
//! shared plan for issue 13; each file states the ones it relies on.

pub mod curve;
pub mod curved_edges;
pub mod dofs;
pub mod map;
