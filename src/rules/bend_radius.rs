//! `bend-radius`: a requested flex bend against the finished thickness.
//!
//! **What it checks.** For a flexible board with a requested bend
//! (`design.stackup.bend`), the bend radius is at least the minimum for the
//! finished thickness ([`finished_thickness`]): 10 x the thickness for one
//! and two copper layers, 20 x for more layers, 100 x for dynamic (repeated)
//! bending. These are the ratios commonly quoted from IPC-2223 (common
//! practice, no single source). A warning: the maker and the application
//! decide.
//!
//! **Why it matters.** Copper on the outside of a tight bend is stretched
//! beyond its fatigue limit: it cracks at once or after some cycles, and a
//! crack across a turn opens the coil.
//!
//! **Example.** A four-layer flex coil 0.365 mm thick bent once to a 3 mm
//! radius needs 20 x 0.365 = 7.3 mm:
//! `bend-radius warning all ...: 3.000000 < 7.300000 mm []`.

use super::context::Context;
use super::{RuleInfo, Severity, Violation, fails};
use crate::design::{BendKind, BoardKind, Stackup};
use crate::geometry::Point;

/// Stable id.
pub const ID: &str = "bend-radius";

pub(super) const INFO: RuleInfo = RuleInfo {
    id: ID,
    severity: Severity::Warning,
    summary: "requested flex bend radius against the finished thickness",
};

/// Finished thickness of the board, mm: all copper, all dielectric and the
/// cover (coverlay or solder mask) on both faces.
pub fn finished_thickness(stackup: &Stackup) -> f64 {
    stackup.copper.iter().sum::<f64>()
        + stackup.dielectric.iter().sum::<f64>()
        + 2.0 * stackup.cover
}

/// Smallest bend radius as a multiple of the finished thickness: 10 for one
/// and two copper layers, 20 for more, 100 for dynamic bending, whatever the
/// layer count. Ratios commonly quoted from IPC-2223 (common practice, no
/// single source).
pub fn bend_ratio(copper_layers: usize, kind: BendKind) -> f64 {
    match kind {
        BendKind::Dynamic => 100.0,
        BendKind::Static if copper_layers <= 2 => 10.0,
        BendKind::Static => 20.0,
    }
}

/// Smallest bend radius of a stack-up, mm: [`bend_ratio`] x
/// [`finished_thickness`].
pub fn min_bend_radius(stackup: &Stackup, kind: BendKind) -> f64 {
    bend_ratio(stackup.copper.len(), kind) * finished_thickness(stackup)
}

pub(super) fn check(ctx: &Context, out: &mut Vec<Violation>) {
    let s = &ctx.design.stackup;
    let (BoardKind::Flex, Some(bend)) = (s.kind, s.bend) else {
        return;
    };
    let t = finished_thickness(s);
    let ratio = bend_ratio(s.copper.len(), bend.kind);
    let required = ratio * t;
    if fails(bend.radius, required) {
        let kind = match bend.kind {
            BendKind::Static => "static",
            BendKind::Dynamic => "dynamic",
        };
        out.push(Violation {
            rule: ID,
            severity: INFO.severity,
            measured: bend.radius,
            required,
            layer: None,
            at: Point::ORIGIN,
            items: vec![],
            message: format!(
                "{kind} bend radius {} mm is below {ratio} x the finished thickness {t:.4} mm",
                bend.radius
            ),
        });
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::design::Design;

    #[test]
    fn thickness_and_ratios() {
        // Sample: 4 x 35 um copper, 3 x 50 um polyimide, 2 x 37.5 um cover.
        let s = Design::sample().stackup;
        assert!((finished_thickness(&s) - 0.365).abs() < 1e-12);
        // Check values of the ratios [T], REFERENCES.md: 0.1 mm -> 1 mm, 0.2 mm -> 2 mm.
        assert_eq!(bend_ratio(1, BendKind::Static) * 0.1, 1.0);
        assert_eq!(bend_ratio(2, BendKind::Static) * 0.2, 2.0);
        assert_eq!(bend_ratio(4, BendKind::Static), 20.0);
        assert_eq!(bend_ratio(1, BendKind::Dynamic), 100.0);
        assert!((min_bend_radius(&s, BendKind::Static) - 7.3).abs() < 1e-12);
    }
}
