//! Engineering analysis of a layout: resistance, inductance, field, force on
//! a magnet, heating and bending.
//!
//! (Skeleton: the analysis lands with the analysis issue.)

use crate::geometry::Layout;
use crate::spec::Design;
use serde::Serialize;

/// Results of the analysis (SI units in the field names).
#[derive(Debug, Clone, PartialEq, Serialize, Default)]
pub struct Analysis {
    /// Total conductor length, mm.
    pub trace_length_mm: f64,
}

/// Analyses a layout.
pub fn analyse(_design: &Design, layout: &Layout) -> Analysis {
    Analysis {
        trace_length_mm: layout.track_length(),
    }
}
