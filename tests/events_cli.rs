//! `recoil inspect` run as a real binary on generated files.

mod events_support;

use events_support::{Spec, gzip, lhef_string};
use std::process::Command;

fn recoil() -> Command {
    Command::new(env!("CARGO_BIN_EXE_recoil"))
}

/// Runs `recoil inspect ARGS… --out JSON FILE`, asserts success and returns
/// the JSON report.
fn inspect_json(
    args: &[&str],
    json: &std::path::Path,
    file: &std::path::Path,
) -> serde_json::Value {
    let out = recoil()
        .arg("inspect")
        .args(args)
        .arg("--out")
        .arg(json)
        .arg(file)
        .output()
        .expect("run");
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    serde_json::from_slice(&std::fs::read(json).expect("json written")).expect("valid JSON")
}

#[test]
fn inspect_table_and_json() {
    let dir = tempfile::tempdir().expect("temp dir");
    let text = lhef_string(&Spec {
        n_events: 200,
        weight_names: vec!["1001".into(), "1002".into()],
        ..Default::default()
    });
    let a = dir.path().join("a.lhe");
    let b = dir.path().join("b.lhe.gz");
    std::fs::write(&a, &text).expect("write");
    std::fs::write(&b, gzip(text.as_bytes())).expect("write");
    let json = dir.path().join("report.json");
    let out = recoil()
        .arg("inspect")
        .args([&a, &b])
        .arg("--out")
        .arg(&json)
        .output()
        .expect("run");
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let table = String::from_utf8(out.stdout).expect("utf-8");
    assert!(table.contains("events                 400"), "{table}");
    assert!(table.contains("√s [GeV]"), "{table}");
    assert!(table.contains("independent runs"), "{table}");
    assert!(
        table.contains("weight variations      2: 1001, 1002"),
        "{table}"
    );
    let v: serde_json::Value =
        serde_json::from_slice(&std::fs::read(&json).expect("json written")).expect("valid JSON");
    assert_eq!(v["summary"]["n_events"], 400);
    assert_eq!(v["info"]["files"][1]["gzip"], true);
    // Each event has one χ (52) and one χ̄ (−52) in the final state.
    let ids = v["census"]["final_state_ids"].as_array().expect("census");
    assert!(ids.iter().any(|e| e[0] == 52 && e[1] == 400), "{ids:?}");
    // Default combination: mean of two equal files = XSECUP = 1.25 pb.
    let xs = v["summary"]["xsec_pb"].as_f64().expect("number");
    assert!((xs - 1.25).abs() < 1e-12, "{xs}");
    // No temporary file is left beside the output.
    let left: Vec<_> = std::fs::read_dir(dir.path()).expect("dir").collect();
    assert_eq!(left.len(), 3);
}

#[test]
fn inspect_options() {
    let dir = tempfile::tempdir().expect("temp dir");
    let a = dir.path().join("a.lhe");
    std::fs::write(&a, lhef_string(&Spec::default())).expect("write");
    let json = dir.path().join("r.json");
    // Only neutrinos invisible: the χ pair no longer makes missing pT.
    let v = inspect_json(
        &["--invisible", "12,14,16", "--combine", "processes"],
        &json,
        &a,
    );
    assert_eq!(v["census"]["truth_met_gev"]["max"], 0.0);
    assert_eq!(v["summary"]["combination"], "SeparateProcesses");
    assert_eq!(v["info"]["invisible_ids"], serde_json::json!([12, 14, 16]));
    // Extending the default set keeps 52.
    let v = inspect_json(&["--also-invisible", "-55"], &json, &a);
    let ids = v["info"]["invisible_ids"].as_array().expect("ids");
    assert!(ids.contains(&serde_json::json!(52)) && ids.contains(&serde_json::json!(55)));
}

#[test]
fn inspect_errors() {
    let dir = tempfile::tempdir().expect("temp dir");
    let bad = dir.path().join("broken.lhe");
    std::fs::write(&bad, "<LesHouchesEvents version=\"9.9\">\n").expect("write");
    let out = recoil().arg("inspect").arg(&bad).output().expect("run");
    assert_eq!(out.status.code(), Some(1));
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(
        err.contains("broken.lhe: line 1: unsupported LHEF version '9.9'"),
        "{err}"
    );
    // A bad flag fails before any file is read.
    let out = recoil()
        .args(["inspect", "--invisible", "x", "/nonexistent.lhe"])
        .output()
        .expect("run");
    assert_eq!(out.status.code(), Some(2));
    let out = recoil()
        .args(["inspect", "/nonexistent.lhe"])
        .output()
        .expect("run");
    assert_eq!(out.status.code(), Some(1));
    assert!(String::from_utf8_lossy(&out.stderr).contains("/nonexistent.lhe"));
}
