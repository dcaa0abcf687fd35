//! The rule check from the command line: a design that breaks a fab rule
//! is reported (table, JSON, SVG overlay) and cannot be built.

use super::common::coilwright;

/// 0.09 mm tracks under the standard profile's 0.1 mm minimum.
const NARROW: &str = r#"
name = "narrow"
[coil]
outer_diameter = "12mm"
turns = 10
trace_width = "0.09mm"
clearance = "0.12mm"
layers = 2
[rules]
profile = "standard"
"#;

#[test]
fn violations_block_build_and_show_in_table_json_and_svg() {
    let dir = tempfile::tempdir().unwrap();
    let spec = dir.path().join("narrow.toml");
    std::fs::write(&spec, NARROW).unwrap();
    let spec = spec.to_str().unwrap();

    let (code, out, err) = coilwright(&["check", spec]);
    assert_eq!(code, 1, "{out}{err}");
    assert!(out.contains("trace-width"), "{out}");

    let (code, out, _) = coilwright(&["check", spec, "--json"]);
    assert_eq!(code, 1);
    let v: serde_json::Value = serde_json::from_str(&out).unwrap();
    let first = &v["violations"][0];
    assert_eq!(first["rule"], "trace-width");
    assert_eq!(first["severity"], "error");
    assert!((first["measured"].as_f64().unwrap() - 0.09).abs() < 1e-9);
    assert!((first["required"].as_f64().unwrap() - 0.1).abs() < 1e-9);
    assert!(first["x"].is_f64() && first["y"].is_f64());

    let svg = dir.path().join("overlay.svg");
    let (code, _, _) = coilwright(&["check", spec, "--svg", svg.to_str().unwrap()]);
    assert_eq!(code, 1);
    let text = std::fs::read_to_string(&svg).unwrap();
    assert!(text.contains(r#"class="violation""#) && text.contains("trace-width"));

    let out_dir = dir.path().join("out");
    let (code, _, err) = coilwright(&["build", spec, "-o", out_dir.to_str().unwrap()]);
    assert_eq!(code, 1, "{err}");
    assert!(!out_dir.exists(), "build wrote output despite violations");

    // A per-design override accepts the narrower track: now it builds.
    let relaxed = NARROW.replace(
        "profile = \"standard\"",
        "profile = \"standard\"\nmin_trace_width = \"0.09mm\"",
    );
    let spec2 = dir.path().join("relaxed.toml");
    std::fs::write(&spec2, relaxed).unwrap();
    let (code, out, err) = coilwright(&[
        "build",
        spec2.to_str().unwrap(),
        "-o",
        out_dir.to_str().unwrap(),
    ]);
    assert_eq!(code, 0, "{out}{err}");
    assert!(out_dir.join("manifest.json").exists());
}

#[test]
fn unknown_profile_names_the_key_and_suggests() {
    let dir = tempfile::tempdir().unwrap();
    let spec = dir.path().join("p.toml");
    std::fs::write(&spec, NARROW.replace("\"standard\"", "\"standrd\"")).unwrap();
    let (code, _, err) = coilwright(&["check", spec.to_str().unwrap()]);
    assert_eq!(code, 2);
    assert!(err.contains("rules.profile"), "{err}");
    assert!(err.contains("standard"), "{err}");
}

#[test]
fn profile_from_a_file_next_to_the_design() {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(
        dir.path().join("myfab.toml"),
        "min_trace_width = 0.08\nmin_clearance = 0.08\nmin_drill = 0.2\nmin_annular_ring = 0.1\nmin_hole_spacing = 0.25\nmin_edge_clearance = 0.3\n",
    )
    .unwrap();
    let spec = dir.path().join("d.toml");
    std::fs::write(&spec, NARROW.replace("\"standard\"", "\"myfab.toml\"")).unwrap();
    let (code, out, err) = coilwright(&["check", spec.to_str().unwrap()]);
    assert_eq!(code, 0, "{out}{err}");
}

/// Turns 0.07 mm apart break the clearance rule at many places along each
/// layer's track: the table lists one row per rule and layer (worst place,
/// count, extent), the JSON one entry per group with every location, the
/// overlay one mark per group.
#[test]
fn many_clearance_problems_are_grouped() {
    let dir = tempfile::tempdir().unwrap();
    let spec = dir.path().join("tight.toml");
    std::fs::write(
        &spec,
        "name = \"tight\"\n[coil]\nouter_diameter = \"16mm\"\nturns = 20\n\
         trace_width = \"0.1mm\"\nclearance = \"0.07mm\"\nlayers = 2\n",
    )
    .unwrap();
    let spec = spec.to_str().unwrap();
    let (code, out, err) = coilwright(&["check", spec]);
    assert_eq!(code, 1, "{out}{err}");
    insta::assert_snapshot!("grouped_check_table", out);

    let (_, out, _) = coilwright(&["check", spec, "--json"]);
    let v: serde_json::Value = serde_json::from_str(&out).unwrap();
    let list = v["violations"].as_array().unwrap();
    let clearance: Vec<_> = list.iter().filter(|g| g["rule"] == "clearance").collect();
    assert_eq!(clearance.len(), 2, "one group per layer");
    for g in &clearance {
        let n = g["count"].as_u64().unwrap();
        assert!(n > 10, "{g}");
        assert_eq!(g["locations"].as_array().unwrap().len() as u64, n);
        for k in [
            "rule", "severity", "measured", "required", "layer", "x", "y",
        ] {
            assert!(!g[k].is_null(), "{k} missing in {g}");
        }
    }

    let svg = dir.path().join("tight.svg");
    coilwright(&["check", spec, "--svg", svg.to_str().unwrap()]);
    let text = std::fs::read_to_string(&svg).unwrap();
    assert_eq!(text.matches(r#"class="violation""#).count(), list.len());
}
