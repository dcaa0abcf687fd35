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
use super::{Item, RuleInfo, Severity, Violation, fails};

/// Stable id.
pub const ID: &str = "trace-width";

pub(super) const INFO: RuleInfo = RuleInfo {
    id: ID,
    severity: Severity::Error,
    summary: "narrowest copper track on each layer",
};

pub(super) fn check(ctx: &Context, out: &mut Vec<Violation>) {
    let req = ctx.profile.min_trace_width;
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
            severity: INFO.severity,
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
