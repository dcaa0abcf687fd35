//! `coilwright check SPEC [--json]`: validate the design file and check the
//! generated copper against the fab rules.

use super::pipeline;
use super::{Exit, Failure, print_out};
use coilwright::physics::{Analysis, Caution};
use coilwright::rules::{Severity, Violation, group};
use serde_json::json;
use std::path::Path;

/// Runs `check`.
pub fn run(spec: &Path, json: bool, svg: Option<&Path>, force: bool) -> Result<Exit, Failure> {
    if let Some(file) = svg
        && file.exists()
        && !force
    {
        return Err(
            anyhow::anyhow!("{} exists; pass --force to replace it", file.display()).into(),
        );
    }
    let checked = match pipeline::check(spec) {
        Ok(c) => c,
        Err(Failure::Spec { path, text, errors }) if json => {
            // Scripts get the problems as data too; people get them on stderr.
            let list: Vec<_> = errors
                .errors
                .iter()
                .map(|e| {
                    let (line, column) = e.line_col(&text).unzip();
                    json!({"key": e.key, "line": line, "column": column,
                           "message": e.message, "help": e.help})
                })
                .collect();
            let doc = json!({"errors": list, "violations": []});
            print_out(&format!("{}\n", serde_json::to_string_pretty(&doc)?))?;
            return Err(Failure::Spec { path, text, errors });
        }
        Err(f) => return Err(f),
    };
    // The design's own limits (max_temperature at the drive) are checked
    // with the rules: exceeding them is a problem of the design.
    let analysis = pipeline::limits(&checked)?;
    let cautions = &analysis.cautions;
    let over_limits = cautions.iter().any(Caution::is_limit);
    if json {
        let mut doc = violations_json(&checked.violations);
        doc["limits"] = cautions_json(cautions.iter().filter(|c| c.is_limit()));
        doc["advice"] = cautions_json(cautions.iter().filter(|c| !c.is_limit()));
        print_out(&format!("{}\n", serde_json::to_string_pretty(&doc)?))?;
    } else {
        let l = &checked.layout;
        let mut s = violations_table(&checked.violations);
        s.push_str(&limits_text(&analysis));
        if checked.violations.is_empty() && !over_limits {
            s.push_str(&format!(
                "ok: {} is valid, passes the \"{}\" rules and stays within its own limits ({}, {} turns per layer, {}, {:.0} C at the drive of {:.0} C allowed)\n",
                spec.display(),
                checked.loaded.design.rules.profile,
                plural(l.layers as usize, "layer"),
                coilwright::design::turns_text(l.turns),
                plural(l.vias.len(), "via"),
                analysis.thermal.temperature_c.unwrap_or(f64::NAN),
                checked.loaded.design.drive.max_temperature
            ));
        }
        print_out(&s)?;
    }
    if let Some(file) = svg {
        let doc = coilwright::export::svg::preview(
            &checked.layout,
            coilwright::export::svg::View::Stack,
            &checked.violations,
        );
        super::report::write_file(file, doc.as_bytes(), force)?;
    }
    Ok(if checked.has_errors() || over_limits {
        Exit::Violations
    } else {
        Exit::Ok
    })
}

fn severity_name(s: Severity) -> &'static str {
    match s {
        Severity::Error => "error",
        Severity::Warning => "warning",
    }
}

/// `{"violations":[{rule, severity, measured, required, layer, x, y, items,
/// message, count, extent, locations}]}`: one entry per group of
/// violations ([`coilwright::rules::group`]); `measured`, `x`, `y`, `items`
/// and `message` are those of the group's worst place, `locations` every
/// place with what was measured there.
pub fn violations_json(violations: &[Violation]) -> serde_json::Value {
    let list: Vec<_> = group(violations)
        .iter()
        .map(|g| {
            let v = &g.worst;
            json!({
                "rule": v.rule,
                "severity": severity_name(v.severity),
                "measured": v.measured,
                "required": v.required,
                "layer": v.layer,
                "x": v.at.x,
                "y": v.at.y,
                "items": v.items,
                "message": v.message,
                "count": g.count(),
                "extent": {"x_min": g.extent_min.x, "y_min": g.extent_min.y,
                           "x_max": g.extent_max.x, "y_max": g.extent_max.y},
                "locations": g.members.iter()
                    .map(|m| json!({"x": m.at.x, "y": m.at.y, "measured": m.measured}))
                    .collect::<Vec<_>>(),
            })
        })
        .collect();
    json!({ "violations": list })
}

/// A plain-text table of violations, one row per group (the worst place,
/// how many places, and their extent), plus a count line; empty for none.
pub fn violations_table(violations: &[Violation]) -> String {
    if violations.is_empty() {
        return String::new();
    }
    let groups = group(violations);
    let header = [
        "rule",
        "severity",
        "layer",
        "x mm",
        "y mm",
        "measured mm",
        "required mm",
        "places",
        "message",
    ];
    let rows: Vec<[String; 9]> = groups
        .iter()
        .map(|g| {
            let v = &g.worst;
            let message = if g.count() > 1 {
                format!(
                    "{} (worst of {} places from ({}, {}) to ({}, {}) mm)",
                    v.message,
                    g.count(),
                    fixed(g.extent_min.x, 3),
                    fixed(g.extent_min.y, 3),
                    fixed(g.extent_max.x, 3),
                    fixed(g.extent_max.y, 3)
                )
            } else {
                v.message.clone()
            };
            [
                v.rule.to_string(),
                severity_name(v.severity).to_string(),
                v.layer.map_or("all".into(), |l| l.to_string()),
                fixed(v.at.x, 3),
                fixed(v.at.y, 3),
                fixed(v.measured, 4),
                fixed(v.required, 4),
                g.count().to_string(),
                message,
            ]
        })
        .collect();
    let mut width = header.map(str::len);
    for r in &rows {
        for (w, c) in width.iter_mut().zip(r) {
            *w = (*w).max(c.chars().count());
        }
    }
    let line = |cells: &[String]| {
        let mut s = String::new();
        for (i, (c, w)) in cells.iter().zip(width).enumerate() {
            if i + 1 == cells.len() {
                s.push_str(c);
            } else if (3..8).contains(&i) {
                s.push_str(&format!("{c:>w$}  "));
            } else {
                s.push_str(&format!("{c:<w$}  "));
            }
        }
        s.trim_end().to_string() + "\n"
    };
    let mut out = line(&header.map(String::from));
    for r in &rows {
        out.push_str(&line(r));
    }
    let count = |sev: Severity, what: &str| {
        let gs: Vec<_> = groups.iter().filter(|g| g.severity == sev).collect();
        let places: usize = gs.iter().map(|g| g.count()).sum();
        if places == gs.len() {
            format!("{} {what}(s)", gs.len())
        } else {
            format!("{} {what}(s) at {places} places", gs.len())
        }
    };
    out.push_str(&format!(
        "{}, {}\n",
        count(Severity::Error, "error"),
        count(Severity::Warning, "warning")
    ));
    out
}

/// Cautions as JSON: `[{"id", "message"}]`.
pub(super) fn cautions_json<'a>(cautions: impl Iterator<Item = &'a Caution>) -> serde_json::Value {
    cautions
        .map(|c| json!({"id": c.id(), "message": c.to_string()}))
        .collect()
}

/// The design's own limits that the prediction exceeds (errors, listed
/// with the rule problems, with the largest drive that stays within them),
/// then advice; empty when there is neither.
pub fn limits_text(analysis: &Analysis) -> String {
    let cautions = &analysis.cautions;
    let mut s = String::new();
    for c in cautions.iter().filter(|c| c.is_limit()) {
        s.push_str(&format!(
            "limit exceeded ({}): {c}; at most {:.3} A / {:.3} V stays within it\n",
            c.id(),
            analysis.thermal.max_current_a,
            analysis.thermal.max_voltage_v
        ));
    }
    for c in cautions.iter().filter(|c| !c.is_limit()) {
        s.push_str(&format!("advice ({}): {c}\n", c.id()));
    }
    s
}

/// `v` with `decimals` decimals, never "-0.000".
fn fixed(v: f64, decimals: usize) -> String {
    let s = format!("{v:.decimals$}");
    if s.starts_with('-') && s[1..].chars().all(|c| c == '0' || c == '.') {
        s[1..].to_string()
    } else {
        s
    }
}

/// "1 via", "3 vias".
pub fn plural(n: usize, word: &str) -> String {
    if n == 1 {
        format!("{n} {word}")
    } else {
        format!("{n} {word}s")
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use coilwright::geometry::Point;
    use coilwright::rules::Item;

    fn v(severity: Severity) -> Violation {
        Violation {
            rule: "clearance",
            severity,
            measured: 0.08,
            required: 0.1,
            layer: Some(2),
            at: Point::new(1.5, -2.25),
            items: vec![Item::Track(3), Item::Via(0)],
            message: "turns too close".into(),
        }
    }

    #[test]
    fn table_lists_every_column_and_counts() {
        let t = violations_table(&[v(Severity::Error), v(Severity::Warning)]);
        let lines: Vec<&str> = t.lines().collect();
        assert!(lines[0].starts_with("rule"));
        assert!(lines[1].contains("clearance") && lines[1].contains("error"));
        assert!(lines[1].contains("1.500") && lines[1].contains("-2.250"));
        assert!(lines[1].contains("0.0800") && lines[1].contains("0.1000"));
        assert!(lines[1].ends_with("turns too close"));
        assert_eq!(lines[3], "1 error(s), 1 warning(s)");
        assert!(lines[0].contains("places"));
        assert_eq!(violations_table(&[]), "");
    }

    #[test]
    fn json_has_the_fixed_fields() {
        let j = violations_json(&[v(Severity::Warning)]);
        let x = &j["violations"][0];
        assert_eq!(x["rule"], "clearance");
        assert_eq!(x["severity"], "warning");
        assert_eq!(x["layer"], 2);
        assert_eq!(x["x"], 1.5);
        assert_eq!(x["y"], -2.25);
        assert_eq!(x["measured"], 0.08);
        assert_eq!(x["required"], 0.1);
        assert_eq!(x["items"][0]["kind"], "track");
        assert_eq!(x["message"], "turns too close");
        assert_eq!(x["count"], 1);
        assert_eq!(x["locations"][0]["x"], 1.5);
    }

    #[test]
    fn places_along_one_track_are_one_row() {
        let mut a = v(Severity::Error);
        a.items = vec![Item::Track(3), Item::Track(9)];
        let mut b = a.clone();
        b.at = Point::new(-4.0, 1.0);
        b.measured = 0.07;
        b.items = vec![Item::Track(4), Item::Track(10)];
        let t = violations_table(&[a.clone(), b.clone()]);
        let lines: Vec<&str> = t.lines().collect();
        assert_eq!(lines.len(), 3, "{t}");
        assert!(
            lines[1].contains("0.0700") && lines[1].contains("worst of 2 places"),
            "{t}"
        );
        assert_eq!(lines[2], "1 error(s) at 2 places, 0 warning(s)");
        let j = violations_json(&[a, b]);
        assert_eq!(j["violations"].as_array().unwrap().len(), 1);
        assert_eq!(j["violations"][0]["count"], 2);
        assert_eq!(j["violations"][0]["measured"], 0.07);
        assert_eq!(j["violations"][0]["x"], -4.0);
        assert_eq!(j["violations"][0]["locations"].as_array().unwrap().len(), 2);
    }
}
