//! End to end: the README's first command, `recoil scan demo-events/scan.toml`,
//! on the committed demo events with the fixed seed of the plan.

use std::path::Path;
use std::process::Command;

#[test]
fn demo_scan_reproduces_its_stored_key_numbers() {
    let repo = Path::new(env!("CARGO_MANIFEST_DIR"));
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("demo-out");
    let o = Command::new(env!("CARGO_BIN_EXE_recoil"))
        .args(["scan", "demo-events/scan.toml", "--out"])
        .arg(&out)
        .current_dir(repo)
        .output()
        .unwrap();
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));

    let text = std::fs::read_to_string(out.join("results.csv")).unwrap();
    let rows: Vec<Vec<&str>> = text
        .lines()
        .skip(1)
        .map(|l| l.split(',').collect())
        .collect();
    // Every point of the demo generator's table is in the scan.
    let demo = std::fs::read_to_string(repo.join("demo-events/points.csv")).unwrap();
    assert_eq!(rows.len(), demo.lines().count() - 1);
    assert_eq!(rows.len(), 30);

    let row = |label: &str| {
        rows.iter()
            .find(|r| r[0] == label)
            .unwrap_or_else(|| panic!("no row {label}"))
    };
    // Γ/M of the vector mediator at M = 1 TeV, m_χ = 1 GeV, g_q = 0.25,
    // g_DM = 1: 0.0563 (REFERENCES.md §3, computed with m_t = 172.5 GeV).
    let w: f64 = row("M1000_m1")[5].parse().unwrap();
    assert!((w - 0.0563).abs() < 5e-4, "Γ/M = {w}");

    // Stored from a run of this code on the committed demo events (seed 1,
    // asymptotic CLs): a regression check, not a physics reference. Columns:
    // best region, signal events, μ_up obs, median expected μ_up.
    let stored = [
        (
            "M500_m1",
            "I300",
            341946.5490000002,
            0.2187264212659459,
            0.16803098010685746,
        ),
        (
            "M1500_m400",
            "I1000",
            1736.705460000177,
            0.504710789949074,
            0.49477522229491955,
        ),
        (
            "M2000_m1",
            "E1200_inf",
            257.48039999997343,
            1.1851362661107552,
            1.5675772644667576,
        ),
        (
            "M3000_m1200",
            "I1000",
            77.68176000000983,
            11.04622460665359,
            10.832764899251353,
        ),
    ];
    for (label, region, s, obs, exp) in stored {
        let r = row(label);
        assert_eq!(r[6], region, "{label}");
        for (col, want) in [(7, s), (10, obs), (13, exp)] {
            let got: f64 = r[col].parse().unwrap();
            assert!(
                (got / want - 1.0).abs() < 1e-9,
                "{label} column {col}: {got} vs {want}"
            );
        }
    }

    for f in [
        "contours.csv",
        "dm_nucleon.csv",
        "result.json",
        "exclusion.svg",
    ] {
        assert!(out.join(f).exists(), "{f}");
    }
    let json: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(out.join("result.json")).unwrap()).unwrap();
    assert_eq!(json["input_files"].as_array().unwrap().len(), 30);
    assert_eq!(json["seed"], 1);
}
