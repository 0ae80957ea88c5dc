//! Studies: many independent solves of one case with some keys varied. Each point is a pure
//! function of its modified case, so points can run in any order, on any thread or machine.

pub mod demag;
pub mod demag_hp;
pub mod grid;
pub mod sweep;
pub mod sweep_file;
