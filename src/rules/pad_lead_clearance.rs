//! `pad-lead-clearance`: a via or pad against the copper of the layers it
//! joins, away from its own lead.
//!
//! **What it checks.** On each layer a hole joins, the gap from its pad
//! edge to track edges is at least the profile's `min_clearance`, except
//! along the lead that ends at the hole: points of a winding closer to the
//! hole along the conductor than its pad radius plus
//! [`ADJACENT_PITCHES`](super::ADJACENT_PITCHES) `x (width + clearance)`
//! are its own connection and are left out. One violation per hole and
//! track.
//!
//! **Why it matters.** A terminal pad or via that touches a turn of its own
//! layer other than the one it feeds connects the coil's end (or a layer
//! junction) to the middle of the winding: the turns in between are
//! bypassed. Leads that run past pads (the outer lead ring, the centre
//! leads) are where this happens.
//!
//! **Example.** Terminal 1 of the sample coil moved along its ring from 90
//! to 45 degrees and 0.05 mm inwards, over layer 1's own outer lead which
//! it feeds some 8 mm further along: `pad-lead-clearance error L1 at
//! (7.230167, 7.230167): 0.050000 < 0.100000 mm [track 1, pad 0]`.

use super::context::Context;
use super::{Rule, Severity, Violation, via_clearance};

/// Stable id.
pub const ID: &str = "pad-lead-clearance";

pub(super) const RULE: Rule = Rule {
    id: ID,
    severity: Severity::Error,
    summary: "via or pad to copper of layers it joins, away from its own lead",
    limit: None,
    check,
};

pub(super) fn check(ctx: &Context, out: &mut Vec<Violation>) {
    for h in &ctx.holes {
        let exclude: Vec<(usize, f64, f64)> = h
            .ends
            .iter()
            .map(|&(path, s)| {
                let reach = ctx.paths[path].adjacent + h.diameter / 2.0;
                (path, s - reach, s + reach)
            })
            .collect();
        for &layer in &h.joins {
            via_clearance::report(ctx, h, layer, &exclude, ID, RULE.severity, out);
        }
    }
}
