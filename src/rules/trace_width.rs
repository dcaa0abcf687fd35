//! `trace-width`: the narrowest track on each layer.
//!
//! **What it checks.** Every track on a layer is at least the profile's
//! `min_trace_width` wide. One violation per layer, at the narrowest track,
//! listing every track on the layer that is too narrow.
//!
//! **Why it matters.** Etching undercuts copper; below the maker's minimum a
//! track comes out thinner than drawn, notched or broken, which raises the
//! coil's resistance and heating or opens the coil altogether.
//!
//! **Example.** A coil drawn with 0.09 mm tracks checked against the
//! "standard" profile (0.1 mm): `trace-width error L1: 0.090000 < 0.100000 mm`.

use super::context::Context;
use super::{Item, Rule, Severity, Violation, fails};
use crate::design::LimitKey;

/// Stable id.
pub const ID: &str = "trace-width";

/// The limit: narrowest track, mm.
pub(super) const LIMIT: LimitKey = LimitKey {
    name: "min_trace_width",
    zero_allowed: false,
    doc: "narrowest track",
};

pub(super) const RULE: Rule = Rule {
    id: ID,
    severity: Severity::Error,
    summary: "narrowest copper track on each layer",
    limit: Some(LIMIT),
    check,
};

pub(super) fn check(ctx: &Context, out: &mut Vec<Violation>) {
    let req = ctx.profile.min(&LIMIT);
    for layer in 1..=ctx.layers {
        let bad: Vec<usize> = (0..ctx.layout.tracks.len())
            .filter(|&i| {
                let t = &ctx.layout.tracks[i];
                t.layer == layer && fails(t.width, req)
            })
            .collect();
        let Some(&worst) = bad.iter().min_by(|&&a, &&b| {
            ctx.layout.tracks[a]
                .width
                .total_cmp(&ctx.layout.tracks[b].width)
        }) else {
            continue;
        };
        let t = &ctx.layout.tracks[worst];
        out.push(Violation {
            rule: ID,
            severity: RULE.severity,
            measured: t.width,
            required: req,
            layer: Some(layer),
            at: t.segment.point_at(0.5),
            items: bad.iter().map(|&i| Item::Track(i)).collect(),
            message: format!(
                "{} track(s) narrower than {req} mm; the narrowest is {} mm",
                bad.len(),
                t.width
            ),
        });
    }
}
