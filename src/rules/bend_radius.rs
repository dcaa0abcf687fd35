//! `bend-radius`: a requested flex bend against the finished thickness.
//!
//! **What it checks.** For a flexible board with a requested bend
//! (`design.stackup.bend`), the bend radius is at least the minimum for the
//! finished thickness ([`Stackup::finished_thickness`]): 10 x the thickness for one
//! and two copper layers, 20 x for more layers, 100 x for dynamic (repeated)
//! bending. These are the ratios commonly quoted from IPC-2223 (common
//! practice, no single source). A warning: the maker and the application
//! decide. A `[tail]` bends with the same stack-up, so this covers it; its
//! stiffened end must not bend at all (the report says where it starts).
//!
//! **Why it matters.** Copper on the outside of a tight bend is stretched
//! beyond its fatigue limit: it cracks at once or after some cycles, and a
//! crack across a turn opens the coil.
//!
//! **Example.** A four-layer flex coil 0.365 mm thick bent once to a 3 mm
//! radius needs 20 x 0.365 = 7.3 mm:
//! `bend-radius warning all ...: 3.000000 < 7.300000 mm []`.

use super::context::Context;
use super::{Rule, Severity, Violation, fails};
use crate::design::{BendKind, BoardKind};
use crate::geometry::Point;

/// Stable id.
pub const ID: &str = "bend-radius";

pub(super) const RULE: Rule = Rule {
    id: ID,
    severity: Severity::Warning,
    summary: "requested flex bend radius against the finished thickness",
    limit: None,
    check,
};

pub(super) fn check(ctx: &Context, out: &mut Vec<Violation>) {
    let s = &ctx.design.stackup;
    let (BoardKind::Flex, Some(bend)) = (s.kind, s.bend) else {
        return;
    };
    let t = s.finished_thickness();
    let ratio = bend.kind.ratio(s.copper.len());
    let required = ratio * t;
    if fails(bend.radius, required) {
        let kind = match bend.kind {
            BendKind::Static => "static",
            BendKind::Dynamic => "dynamic",
        };
        out.push(Violation {
            rule: ID,
            severity: RULE.severity,
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
        assert!((s.finished_thickness() - 0.365).abs() < 1e-12);
        // Check values of the ratios [T], REFERENCES.md: 0.1 mm -> 1 mm, 0.2 mm -> 2 mm.
        assert_eq!(BendKind::Static.ratio(1) * 0.1, 1.0);
        assert_eq!(BendKind::Static.ratio(2) * 0.2, 2.0);
        assert_eq!(BendKind::Static.ratio(4), 20.0);
        assert_eq!(BendKind::Dynamic.ratio(1), 100.0);
        assert!((s.min_bend_radius(BendKind::Static) - 7.3).abs() < 1e-12);
    }
}
