//! `recoil limit` run as a real binary on real files.

use std::process::Command;

fn recoil() -> Command {
    Command::new(env!("CARGO_BIN_EXE_recoil"))
}

#[test]
fn single_region_exact_prints_ln20() {
    // n = 0: s_up = ln 20 = 2.9957 events (REFERENCES.md §1).
    let out = recoil()
        .args([
            "limit",
            "--observed",
            "0",
            "--background",
            "3",
            "--background-unc",
            "0",
        ])
        .args(["--method", "exact"])
        .output()
        .unwrap();
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let text = String::from_utf8(out.stdout).unwrap();
    assert!(text.contains("2.9957"), "{text}");
    assert!(
        text.contains("S95 obs [ev]") && text.contains("exact"),
        "{text}"
    );
}

#[test]
fn discovery_significance_in_table() {
    // s = 50, b = 100: Z_A = 4.6518, Z with σ_b = 7: 3.72 (REFERENCES.md §2).
    let out = recoil()
        .args(["limit", "--observed", "100", "--background", "100"])
        .args(["--background-unc", "7", "--signal", "50"])
        .output()
        .unwrap();
    assert!(out.status.success());
    let text = String::from_utf8(out.stdout).unwrap();
    assert!(
        text.contains("Z_A [σ]") && text.contains("4.652") && text.contains("3.72"),
        "{text}"
    );
}

#[test]
fn regions_with_covariance_write_json() {
    let dir = tempfile::tempdir().unwrap();
    let regions = dir.path().join("regions.csv");
    let cov = dir.path().join("cov.csv");
    let json = dir.path().join("out.json");
    std::fs::write(
        &regions,
        "name,observed,background,background_unc,signal,signal_unc\nA,20,20,4,5,0\nB,20,20,4,5,0\n",
    )
    .unwrap();
    std::fs::write(&cov, "A,B\n16,0\n0,16\n").unwrap();
    let out = recoil()
        .args(["limit", "--regions"])
        .arg(&regions)
        .arg("--covariance")
        .arg(&cov)
        .arg("--out")
        .arg(&json)
        .output()
        .unwrap();
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let v: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(&json).unwrap()).unwrap();
    assert_eq!(v["limits"].as_array().unwrap().len(), 2);
    // Two identical independent regions: the combination is stronger than
    // either alone (common practice, no source).
    let single = v["limits"][0]["limit"]["mu_up_expected"][2]
        .as_f64()
        .unwrap();
    let comb = v["combined"]["limit"]["mu_up_expected"][2]
        .as_f64()
        .unwrap();
    assert!(comb < single);
    assert_eq!(v["best_expected_region"], "A");
    // No temporary file left behind.
    assert_eq!(std::fs::read_dir(dir.path()).unwrap().count(), 3);
}

#[test]
fn bad_inputs_fail_with_one_message() {
    let out = recoil()
        .args([
            "limit",
            "--observed",
            "3",
            "--background",
            "-2",
            "--background-unc",
            "1",
        ])
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(1));
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(
        err.contains("background [events] must be finite and ≥ 0, got -2"),
        "{err}"
    );

    let dir = tempfile::tempdir().unwrap();
    let regions = dir.path().join("regions.csv");
    std::fs::write(
        &regions,
        "name,observed,background,background_unc,signal,signal_unc\nA,x,20,4,5,0\n",
    )
    .unwrap();
    let out = recoil()
        .args(["limit", "--regions"])
        .arg(&regions)
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(1));
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(err.contains("line 2: column observed"), "{err}");

    let cov = dir.path().join("cov.csv");
    std::fs::write(
        &regions,
        "name,observed,background,background_unc,signal,signal_unc\nA,1,2,1,1,0\nB,1,2,1,1,0\n",
    )
    .unwrap();
    std::fs::write(&cov, "1,2\n2,1\n").unwrap();
    let out = recoil()
        .args(["limit", "--regions"])
        .arg(&regions)
        .arg("--covariance")
        .arg(&cov)
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(1));
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(err.contains("not positive semi-definite"), "{err}");
}
