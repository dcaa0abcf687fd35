//! coilwright: printed-circuit coils from a design file to fab-ready files.
//!
//! Data flows one way through pure stages: [`design`] (design file to a
//! validated [`design::DesignRequest`]), [`pipeline`] (sizes resolved: a
//! [`design::Design`] that builds), [`geometry`] (copper on every layer as a
//! [`geometry::Board`]), [`rules`] (fab rule check on the layout),
//! [`physics`] (resistance, inductance, field, force, heating, bending) and
//! [`export`] (Gerber, Excellon, job file, KiCad, SVG, report). Only the
//! command-line front end (the `coilwright` binary, not part of the
//! library) touches the file system. [`numeric`] holds the root finding,
//! quadrature and elliptic integrals that geometry and physics share.
//!
//! # Example: from a design file to fab files
//!
//! ```
//! use coilwright::{export, geometry, physics, pipeline, rules};
//!
//! let design = pipeline::parse(r#"
//!     name = "doc-coil"
//!     [coil]
//!     outer_diameter = "12mm"
//!     turns = 8
//!     trace_width = "0.15mm"
//!     clearance = "0.15mm"
//!     layers = 2
//!     [drive]
//!     current = "0.2A"
//! "#).expect("a valid design");
//! let layout = geometry::build(&design).expect("parse already built it once");
//! let profile = rules::Profile::builtin("standard").unwrap();
//! let violations = rules::check(&design, &layout, &profile);
//! assert!(rules::is_clean(&violations));
//! let analysis = physics::analyse(&design, &layout).unwrap();
//! assert!(analysis.resistance.total_ohm_20c > 0.0);
//! let files = export::bundle(&design, &layout, &analysis).unwrap();
//! assert!(files.iter().any(|f| f.path.ends_with("-L1-copper-top.gbr")));
//! assert!(files.iter().any(|f| f.path == "manifest.json"));
//! ```
#![warn(missing_docs)]
// The only exception is physics' SIMD module (vector paths of the field
// and inductance sums), which allows it for itself.
#![deny(unsafe_code)]

pub mod design;
pub mod explore;
pub mod export;
pub mod geometry;
pub mod numeric;
pub mod physics;
pub mod pipeline;
pub mod rules;
pub mod suggest;
