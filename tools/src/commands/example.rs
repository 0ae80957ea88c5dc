//! `axicore example`: print the built-in case file, a template for new cases.

use super::failure::EXIT_OK;
use super::{emit, Failure};
use crate::EXAMPLE_CASE;

/// Prints the built-in example case.
pub fn example() -> Result<u8, Failure> {
    emit(EXAMPLE_CASE);
    Ok(EXIT_OK)
}
