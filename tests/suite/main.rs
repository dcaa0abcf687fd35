//! The integration tests: one test binary, one module per subject.
//!
//! Where a new test goes:
//! - `cli`, `cli_rules`, `sweep`: run the built binary (bad input exits 2 and
//!   names its key, overwrite protection, JSON outputs, exit codes);
//! - `designs`: every template and example parses and builds;
//! - `keys`: README's key table lists exactly the registered design keys;
//! - `outputs`: SHA-256 of everything `build` writes for every example and
//!   template (the guard for refactoring; bless deliberate changes);
//! - `export_gerber`, `svg_golden`: golden files (insta snapshots in
//!   `snapshots/`) and parsed-back exporter output;
//! - `geometry_props`, `geometry_sanity`, `rules_props`, `rules`: property
//!   tests and rule fixtures; `arrays`: many coils on one board (rule check,
//!   phase chains and senses);
//! - `ac`: the coil at frequency (section response and capacitance against
//!   scikit-fem, the report's frequency keys);
//! - `physics_reference`, `physics_magpylib`, `magpylib_rerun`, `motion`,
//!   `coupling` (two coils, `couple`):
//!   checks against outside truth, the source named beside each value
//!   (`motion`: waveforms, heating over time, the fin; `rotor`: a rotor's
//!   field and flux linkage against magpylib);
//! - `interop`: our files read by KiCad, gerbv, gerbonara, pygerber and
//!   shapely (needs `tests/interop/setup.sh`);
//! - `serve`: the workbench's request guard over plain HTTP, and the
//!   browser test (chromium + Selenium, needs `tests/interop/setup.sh`).
//!
//! Shared helpers live in `common` (the binary runner, profiles) and
//! `reference_designs` (the designs the reference checks use).

mod common;
mod reference_designs;

mod ac;
mod arrays;
mod cli;
mod cli_rules;
mod coupling;
mod designs;
mod export_gerber;
mod geometry_props;
mod geometry_sanity;
mod interop;
mod keys;
mod magpylib_rerun;
mod motion;
mod outputs;
mod physics_magpylib;
mod physics_reference;
mod rotor;
mod rules;
mod rules_props;
mod serve;
mod svg_golden;
mod sweep;
