//! Post-processing: quantities a designer reads off a solved field.

pub mod dipole;
pub mod energy;
pub mod flux;
pub mod indicator;
pub mod peak;
pub mod probe;
pub mod saturation;
