//! The design file: reading, units and validation.
//!
//! [`read`] reads the TOML text of a design file and returns a validated
//! [`DesignRequest`] or every problem found as [`DesignErrors`], each naming
//! its dotted key (`coil.trace_width`) and the byte span in the text. The
//! coil's sizes are resolved and the copper built by
//! [`crate::pipeline::parse`], which returns the [`Design`] every later
//! stage takes (and maps problems found there back to keys of the file).
//!
//! Every key a design file may hold is listed once, in the key registry
//! ([`keys::KEYS`]); the `[rules]` limit keys come from the rule registry
//! and are handed to [`read`].
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
//! let request = coilwright::design::read(text, &[]).unwrap();
//! assert!((request.coil.clearance - 0.1016).abs() < 1e-12);
//! assert_eq!(request.coil.inner_diameter, None);
//!
//! let bad = text.replace("layers = 2", "layers = 40");
//! let errors = coilwright::design::read(&bad, &[]).unwrap_err();
//! let e = errors.first();
//! assert_eq!(e.key, "coil.layers");
//! assert_eq!(e.line_col(&bad), Some((7, 10)));
//! ```

pub mod edit;
mod error;
pub mod keys;
mod model;
mod read;
mod spans;
mod templates;
pub mod units;
pub mod winding;

pub use error::{DesignError, DesignErrors, line_col};
pub use keys::{Key, LimitKey};
pub use model::*;
pub use read::read;
pub use read::{DEFAULT_CURRENT_A, DEFAULT_DAMPING_RATIO, MAX_SIZE_MM, MAX_TURNS};
pub use spans::KeySpans;
pub use templates::{Template, templates};
