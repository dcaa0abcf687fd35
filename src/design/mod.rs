//! The design file: parsing, units and validation into a [`Design`].
//!
//! [`parse`] reads the TOML text of a design file and returns a validated
//! [`Design`] or every problem found as [`DesignErrors`], each naming its
//! dotted key (`coil.trace_width`) and the byte span in the text.
//!
//! ```
//! let text = r#"
//! [coil]
//! outer_diameter = "12mm"
//! turns = 15
//! trace_width = "0.1mm"
//! clearance = "4mil"
//! layers = 2
//! "#;
//! let design = coilwright::design::parse(text).unwrap();
//! assert!((design.coil.clearance - 0.1016).abs() < 1e-12);
//! let layout = coilwright::geometry::build(&design).unwrap();
//! assert_eq!(layout.layers, 2);
//!
//! let bad = text.replace("layers = 2", "layers = 40");
//! let errors = coilwright::design::parse(&bad).unwrap_err();
//! let e = errors.first();
//! assert_eq!(e.key, "coil.layers");
//! assert_eq!(e.line_col(&bad), Some((7, 10)));
//! ```

mod error;
mod model;
mod parse;
mod templates;
pub mod units;

pub use error::{DesignError, DesignErrors, line_col};
pub use model::*;
pub use parse::{DEFAULT_CURRENT_A, MAX_SIZE_MM, MAX_TURNS, nearest, parse, parse_and_build};
pub use templates::{Template, templates};
