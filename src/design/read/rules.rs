//! `[rules]`: the rule profile and per-design overrides of its limits.

use super::super::model::RulesRequest;
use super::table::{Ctx, Sign, Table};
use std::collections::BTreeMap;

/// Reads `[rules]`: `profile` and the limit keys the reader was given.
pub(super) fn read(cx: &mut Ctx, t: &Table) -> RulesRequest {
    let profile = match cx.string(t, "profile") {
        Some("") => {
            cx.err(
                t.key("profile"),
                t.span_of("profile"),
                "must not be empty",
                Some(
                    "a built-in profile name such as \"standard\", or a path to a profile file"
                        .into(),
                ),
            );
            String::new()
        }
        Some(s) => s.to_string(),
        None => "standard".to_string(),
    };
    let mut overrides = BTreeMap::new();
    let limits = cx.limits;
    for limit in limits {
        let sign = if limit.zero_allowed {
            Sign::NonNegative
        } else {
            Sign::Positive
        };
        if let Some(mm) = cx.length(t, limit.name, sign) {
            overrides.insert(limit.name.to_string(), mm);
        }
    }
    RulesRequest { profile, overrides }
}
