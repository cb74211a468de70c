//! `recoil translate` run as a real binary on real files.

use std::path::Path;
use std::process::Command;

fn recoil(args: &[&str]) -> std::process::Output {
    Command::new(env!("CARGO_BIN_EXE_recoil"))
        .arg("translate")
        .args(args)
        .output()
        .expect("run recoil")
}

fn rel(a: f64, b: f64) -> f64 {
    ((a - b) / b).abs()
}

#[test]
fn point_mode_prints_widths_and_sigma_and_writes_json() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("point.json");
    let o = recoil(&[
        "--mediator",
        "axial",
        "--gq",
        "0.25",
        "--gdm",
        "1",
        "--mmed",
        "2000",
        "--mdm",
        "100",
        "--out",
        out.to_str().unwrap(),
    ]);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let text = String::from_utf8(o.stdout).unwrap();
    for needle in [
        "Γ [GeV]",
        "Γ/M",
        "BR(χχ̄)",
        "σ [cm²]",
        "σ_SD",
        "narrow-width",
    ] {
        assert!(text.contains(needle), "missing {needle} in\n{text}");
    }
    let json: serde_json::Value = serde_json::from_slice(&std::fs::read(&out).unwrap()).unwrap();
    // Computed with Python 3.11 from REFERENCES §4 (σ_SD, dmwg2016 set,
    // PDG 2024 proton mass): 1.2851392151×10⁻⁴³ cm².
    let sd = json["cross_sections"][0]["sigma_cm2"].as_f64().unwrap();
    assert!(rel(sd, 1.285_139_215_1e-43) < 1e-9, "{sd}");
    assert_eq!(json["cross_sections"][0]["kind"], "SD");
    assert_eq!(json["regime"], "on-shell");
    // Γ/M below the published ≲ 0.06 for the benchmark couplings
    // (arXiv:1507.00966, REFERENCES §3).
    assert!(json["width_over_mass"].as_f64().unwrap() < 0.06);
}

#[test]
fn wide_mediator_warns() {
    let o = recoil(&[
        "--mediator",
        "vector",
        "--gq",
        "1",
        "--gdm",
        "1",
        "--mmed",
        "1000",
        "--mdm",
        "1",
    ]);
    assert!(o.status.success());
    let text = String::from_utf8(o.stdout).unwrap();
    assert!(text.contains("warning: Γ/M"), "{text}");
}

#[test]
fn pseudoscalar_point_gives_no_number_and_curve_is_refused() {
    let o = recoil(&[
        "--mediator",
        "pseudoscalar",
        "--gq",
        "1",
        "--mmed",
        "500",
        "--mdm",
        "10",
    ]);
    assert!(o.status.success());
    let text = String::from_utf8(o.stdout).unwrap();
    assert!(
        text.contains("momentum transfer") && !text.contains("σ [cm²]"),
        "{text}"
    );
    let dir = tempfile::tempdir().unwrap();
    let b = dir.path().join("b.csv");
    std::fs::write(&b, "m_dm_gev,m_med_limit_gev\n10,1000\n").unwrap();
    let o = recoil(&["--mediator", "ps", "--curve", b.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(1));
    assert!(String::from_utf8_lossy(&o.stderr).contains("momentum"));
}

#[test]
fn curve_mode_writes_csv() {
    let dir = tempfile::tempdir().unwrap();
    let b = dir.path().join("boundary.csv");
    std::fs::write(
        &b,
        "m_dm_gev,m_med_limit_gev,m_med_limit_exp_gev\n100,2000,1800\n300,1500,\n",
    )
    .unwrap();
    let out = dir.path().join("sigma.csv");
    let o = recoil(&[
        "--mediator",
        "vector",
        "--curve",
        b.to_str().unwrap(),
        "--nucleon",
        "proton",
        "--out",
        out.to_str().unwrap(),
    ]);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let text = String::from_utf8(o.stdout).unwrap();
    assert!(
        text.contains("95% CL") && text.contains("σ_SI,obs [cm²]"),
        "{text}"
    );
    let mut rdr = csv::Reader::from_path(&out).unwrap();
    let rows: Vec<csv::StringRecord> = rdr.records().map(Result::unwrap).collect();
    assert_eq!(rows.len(), 2);
    assert_eq!(&rows[0][3], "proton");
    assert_eq!(&rows[0][7], "0.95");
    // Computed with Python 3.11 from REFERENCES §4: vector, g_q = 0.25,
    // g_DM = 1, M = 2000 GeV, m_χ = 100 GeV, proton: 3.7650562941×10⁻⁴² cm².
    let s: f64 = rows[0][5].parse().unwrap();
    assert!(rel(s, 3.765_056_294_1e-42) < 1e-9, "{s}");
    // Written in scientific notation (formats.md), and the table shows the
    // same value to 4 significant digits.
    assert!(rows[0][5].ends_with("e-42"), "{}", &rows[0][5]);
    assert!(text.contains(" 3.765e-42 "), "{text}");
    assert_eq!(&rows[1][6], "", "no expected limit given");
}

#[test]
fn bad_input_fails_cleanly_without_output() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("never.csv");
    let b = dir.path().join("bad.csv");
    std::fs::write(&b, "m_dm_gev,m_med_limit_gev\n1,2000\n5,abc\n").unwrap();
    let o = recoil(&[
        "--mediator",
        "vector",
        "--curve",
        b.to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(1));
    let err = String::from_utf8_lossy(&o.stderr);
    assert!(
        err.contains("bad.csv") && err.contains("line 3") && err.contains("abc"),
        "{err}"
    );
    assert!(!Path::new(&out).exists(), "no output after an error");

    let o = recoil(&["--mediator", "tensor", "--mmed", "1000", "--mdm", "1"]);
    assert_eq!(o.status.code(), Some(1));
    assert!(String::from_utf8_lossy(&o.stderr).contains("unknown mediator type 'tensor'"));

    for (flag, value) in [("--mmed", "-5"), ("--mdm", "0")] {
        let mut args = vec!["--mediator", "vector", "--mmed", "1000", "--mdm", "1"];
        let i = args.iter().position(|a| *a == flag).unwrap();
        args[i + 1] = value;
        let o = recoil(&args);
        assert_eq!(o.status.code(), Some(1), "{flag} {value}");
        let err = String::from_utf8_lossy(&o.stderr);
        assert!(
            err.contains("must be finite and > 0") && err.contains("GeV"),
            "{err}"
        );
    }
    let o = recoil(&[
        "--mediator",
        "vector",
        "--gq",
        "-0.1",
        "--mmed",
        "1000",
        "--mdm",
        "1",
    ]);
    assert_eq!(o.status.code(), Some(1));
    assert!(String::from_utf8_lossy(&o.stderr).contains("g_q"));
}
