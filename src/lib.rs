//! coilwright: printed-circuit coils from a design file to fab-ready files.
//!
//! Data flows one way through pure stages: [`spec`] (design file to a
//! validated [`spec::Design`]), [`geometry`] (copper on every layer as a
//! [`geometry::Layout`]), [`rules`] (fab rule check on the layout),
//! [`physics`] (resistance, inductance, field, force, heating, bending) and
//! [`export`] (Gerber, Excellon, job file, KiCad, SVG, report). Only the
//! command-line front end ([`cli`]) touches the file system.
#![warn(missing_docs)]

pub mod cli;
pub mod explore;
pub mod export;
pub mod geometry;
pub mod physics;
pub mod rules;
pub mod spec;
