//! Violations grouped for people and scripts: one entry per rule, severity,
//! layer and the holes or outline involved, however many places along the
//! tracks break the rule. A spiral whose turns are too close breaks the
//! clearance rule at hundreds of places along one track; listed one by one
//! they bury everything else, grouped they read as one problem with its
//! worst place, its extent and its count.

use super::{Item, Severity, Violation};
use crate::geometry::Point;
use serde::Serialize;

/// Violations of one rule along one track (or at one set of holes).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ViolationGroup {
    /// Stable rule id.
    pub rule: &'static str,
    /// Error or warning.
    pub severity: Severity,
    /// Copper layer, `None` for holes and whole-board rules.
    pub layer: Option<u8>,
    /// The worst violation of the group (largest shortfall; first on ties).
    pub worst: Violation,
    /// Lower-left corner of the box around every place, mm.
    pub extent_min: Point,
    /// Upper-right corner of the box around every place, mm.
    pub extent_max: Point,
    /// Every violation of the group, in check order.
    pub members: Vec<Violation>,
}

impl ViolationGroup {
    /// How many places break the rule.
    pub fn count(&self) -> usize {
        self.members.len()
    }
}

/// What makes two violations one group: rule, severity, layer and the items
/// that are not tracks (a via, a pad, the outline). Tracks on one layer are
/// one conductor, so places along them share a group.
fn key(v: &Violation) -> (&'static str, Severity, Option<u8>, Vec<Item>) {
    let mut fixed: Vec<Item> = v
        .items
        .iter()
        .copied()
        .filter(|i| !matches!(i, Item::Track(_)))
        .collect();
    fixed.sort();
    (v.rule, v.severity, v.layer, fixed)
}

/// Groups violations (already sorted by [`super::sort`]); groups keep the
/// order of their first member.
pub fn group(violations: &[Violation]) -> Vec<ViolationGroup> {
    let mut out: Vec<ViolationGroup> = Vec::new();
    let mut keys = Vec::new();
    for v in violations {
        let k = key(v);
        match keys.iter().position(|x| *x == k) {
            Some(i) => {
                let g = &mut out[i];
                if v.shortfall() > g.worst.shortfall() {
                    g.worst = v.clone();
                }
                g.extent_min = Point::new(g.extent_min.x.min(v.at.x), g.extent_min.y.min(v.at.y));
                g.extent_max = Point::new(g.extent_max.x.max(v.at.x), g.extent_max.y.max(v.at.y));
                g.members.push(v.clone());
            }
            None => {
                keys.push(k);
                out.push(ViolationGroup {
                    rule: v.rule,
                    severity: v.severity,
                    layer: v.layer,
                    worst: v.clone(),
                    extent_min: v.at,
                    extent_max: v.at,
                    members: vec![v.clone()],
                });
            }
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    fn v(rule: &'static str, layer: u8, x: f64, measured: f64, items: Vec<Item>) -> Violation {
        Violation {
            rule,
            severity: Severity::Error,
            measured,
            required: 0.1,
            layer: Some(layer),
            at: Point::new(x, 0.0),
            items,
            message: String::new(),
        }
    }

    #[test]
    fn places_along_one_track_are_one_group_with_the_worst_and_extent() {
        let list = vec![
            v(
                "clearance",
                1,
                0.0,
                0.08,
                vec![Item::Track(1), Item::Track(5)],
            ),
            v(
                "clearance",
                1,
                2.0,
                0.05,
                vec![Item::Track(2), Item::Track(6)],
            ),
            v(
                "clearance",
                1,
                -1.0,
                0.09,
                vec![Item::Track(3), Item::Track(7)],
            ),
            v(
                "clearance",
                2,
                0.0,
                0.08,
                vec![Item::Track(9), Item::Track(12)],
            ),
            v(
                "via-clearance",
                1,
                0.0,
                0.08,
                vec![Item::Via(0), Item::Track(1)],
            ),
            v(
                "via-clearance",
                1,
                0.5,
                0.07,
                vec![Item::Via(0), Item::Track(2)],
            ),
            v(
                "via-clearance",
                1,
                0.0,
                0.08,
                vec![Item::Via(1), Item::Track(1)],
            ),
        ];
        let g = group(&list);
        assert_eq!(g.len(), 4);
        assert_eq!(g[0].count(), 3);
        assert_eq!(g[0].worst.measured, 0.05);
        assert_eq!((g[0].extent_min.x, g[0].extent_max.x), (-1.0, 2.0));
        assert_eq!(g[1].layer, Some(2));
        assert_eq!(g[2].count(), 2);
        assert_eq!(g[3].count(), 1);
        let total: usize = g.iter().map(ViolationGroup::count).sum();
        assert_eq!(total, list.len());
    }
}
