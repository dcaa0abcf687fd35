//! The design file: parsing, units and validation into a [`Design`].
//!
//! [`parse`] reads the TOML text of a design file and returns a validated
//! [`Design`] or every problem found as [`SpecErrors`], each naming its
//! dotted key (`coil.trace_width`) and the byte span in the text.

mod design;
mod error;
mod parse;
pub mod units;

pub use design::*;
pub use error::{SpecError, SpecErrors, line_col};
pub use parse::{DEFAULT_CURRENT_A, MAX_SIZE_MM, MAX_TURNS, nearest, parse};
