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

// ---------------------------------------------------------------------------
// Curve mode on a scan output folder (result.json, results.csv, contours.csv).
// ---------------------------------------------------------------------------

/// Proton and neutron masses [GeV], PDG 2024 (CODATA 2018).
const M_P: f64 = 0.938_272_088_16;
const M_N: f64 = 0.939_565_420_52;
/// (ħc)² [GeV² cm²], PDG 2024 physical constants (REFERENCES §4).
const HBARC2_CM2: f64 = 3.893_793_721e-28;

fn mu(m_n: f64, m_dm: f64) -> f64 {
    m_n * m_dm / (m_n + m_dm)
}

/// REFERENCES §4 (A. Boveia et al., arXiv:1603.04156): vector mediator,
/// σ_SI = 9 g_q² g_DM² μ_nχ² / (π M⁴).
fn sigma_si_vector(g_q: f64, g_dm: f64, m_med: f64, m_dm: f64, m_n: f64) -> f64 {
    9.0 * (g_q * g_dm * mu(m_n, m_dm)).powi(2) / (std::f64::consts::PI * m_med.powi(4)) * HBARC2_CM2
}

/// REFERENCES §4 (arXiv:1603.04156): axial-vector mediator,
/// σ_SD = 3 g_q² g_DM² (Δu + Δd + Δs)² μ_nχ² / (π M⁴), Δu = 0.84,
/// Δd = −0.43, Δs = −0.09 (the sum is the same for the neutron by isospin).
fn sigma_sd_axial(g_q: f64, g_dm: f64, m_med: f64, m_dm: f64, m_n: f64) -> f64 {
    let delta: f64 = 0.84 - 0.43 - 0.09;
    3.0 * (g_q * g_dm * delta * mu(m_n, m_dm)).powi(2) / (std::f64::consts::PI * m_med.powi(4))
        * HBARC2_CM2
}

/// Contours for the hand-made folders: (level, segment, M, m_χ). Two
/// observed segments, one expected.
const CONTOURS: [(&str, u32, f64, f64); 6] = [
    ("observed", 0, 2000.0, 100.0),
    ("observed", 0, 1500.0, 300.0),
    ("observed", 1, 800.0, 10.0),
    ("observed", 1, 900.0, 50.0),
    ("expected", 0, 1800.0, 100.0),
    ("expected", 0, 1400.0, 300.0),
];

/// A scan output folder by hand: result.json with only the fields the
/// translation reads, results.csv with the points' couplings, contours.csv.
fn scan_folder(
    dir: &Path,
    mediator: &str,
    reference: (f64, f64),
    points: (f64, f64),
    contours: &[(&str, u32, f64, f64)],
) -> std::path::PathBuf {
    let d = dir.join("scan-out");
    std::fs::create_dir_all(&d).unwrap();
    std::fs::write(
        d.join("result.json"),
        format!(
            r#"{{"mediator": "{mediator}",
  "reference_couplings": {{"g_q": {}, "g_dm": {}, "g_l": 0.0}},
  "limit": {{"cl": 0.95}}}}"#,
            reference.0, reference.1
        ),
    )
    .unwrap();
    let (g_q, g_dm) = points;
    std::fs::write(
        d.join("results.csv"),
        format!(
            "point,m_med_gev,m_dm_gev,g_q,g_dm,excluded\n\
             a,1000,10,{g_q},{g_dm},true\nb,3000,10,{g_q},{g_dm},false\n"
        ),
    )
    .unwrap();
    let mut text = String::from("level,segment,m_med_gev,m_dm_gev\n");
    for (level, seg, m, d) in contours {
        text.push_str(&format!("{level},{seg},{m},{d}\n"));
    }
    std::fs::write(d.join("contours.csv"), text).unwrap();
    d
}

fn read_rows(path: &Path) -> Vec<csv::StringRecord> {
    let mut rdr = csv::Reader::from_path(path).unwrap();
    rdr.records().map(Result::unwrap).collect()
}

#[test]
fn scan_folder_curve_follows_the_published_formula() {
    let dir = tempfile::tempdir().unwrap();
    let scan = scan_folder(dir.path(), "vector", (0.25, 1.0), (0.25, 1.0), &CONTOURS);
    let out = dir.path().join("sigma.csv");
    let o = recoil(&[
        "--curve",
        scan.to_str().unwrap(),
        "--nucleon",
        "proton",
        "--out",
        out.to_str().unwrap(),
    ]);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let text = String::from_utf8(o.stdout).unwrap();
    for needle in [
        "95% CL",
        "90% CL",
        "σ_SI [cm²]",
        "vector mediator",
        "segment 1",
    ] {
        assert!(text.contains(needle), "missing {needle} in\n{text}");
    }
    let rows = read_rows(&out);
    assert_eq!(rows.len(), CONTOURS.len());
    for (row, &(level, seg, m_med, m_dm)) in rows.iter().zip(&CONTOURS) {
        // level,segment,m_dm_gev,m_med_limit_gev,nucleon,scattering,sigma_cm2,cl
        assert_eq!(&row[0], level);
        assert_eq!(row[1].parse::<u32>().unwrap(), seg, "segments kept apart");
        assert_eq!(row[2].parse::<f64>().unwrap(), m_dm);
        assert_eq!(row[3].parse::<f64>().unwrap(), m_med);
        assert_eq!(&row[4], "proton");
        assert_eq!(&row[5], "SI");
        assert_eq!(&row[7], "0.95", "the scan's CL carried along");
        let s: f64 = row[6].parse().unwrap();
        let want = sigma_si_vector(0.25, 1.0, m_med, m_dm, M_P);
        assert!(
            rel(s, want) < 1e-12,
            "{level} {m_med} {m_dm}: {s} vs {want}"
        );
    }
    // The first point is the one of curve_mode_writes_csv: Python 3.11 from
    // REFERENCES §4 gives 3.7650562941×10⁻⁴² cm².
    let s: f64 = rows[0][6].parse().unwrap();
    assert!(rel(s, 3.765_056_294_1e-42) < 1e-9, "{s}");
}

#[test]
fn scan_folder_curve_equals_the_curve_of_the_same_boundary_table() {
    let dir = tempfile::tempdir().unwrap();
    let scan = scan_folder(dir.path(), "vector", (0.25, 1.0), (0.25, 1.0), &CONTOURS);
    let from_scan = dir.path().join("scan.csv");
    // Given as the folder's result.json this time.
    let o = recoil(&[
        "--curve",
        scan.join("result.json").to_str().unwrap(),
        "--out",
        from_scan.to_str().unwrap(),
    ]);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let scan_rows = read_rows(&from_scan);
    for (level, seg) in [("observed", 0), ("observed", 1), ("expected", 0)] {
        let pts: Vec<_> = CONTOURS
            .iter()
            .filter(|c| c.0 == level && c.1 == seg)
            .collect();
        let table = dir.path().join(format!("{level}{seg}.csv"));
        let mut text = String::from("m_dm_gev,m_med_limit_gev\n");
        for (_, _, m, d) in &pts {
            text.push_str(&format!("{d},{m}\n"));
        }
        std::fs::write(&table, text).unwrap();
        let from_table = dir.path().join(format!("{level}{seg}-sigma.csv"));
        let o = recoil(&[
            "--mediator",
            "vector",
            "--gq",
            "0.25",
            "--gdm",
            "1",
            "--curve",
            table.to_str().unwrap(),
            "--out",
            from_table.to_str().unwrap(),
        ]);
        assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
        let table_rows = read_rows(&from_table);
        for nucleon in ["proton", "neutron"] {
            // Table mode: m_dm_gev,m_med_limit_obs_gev,…,nucleon,…,sigma_obs_cm2,…,cl.
            let a: Vec<(&str, &str, &str)> = table_rows
                .iter()
                .filter(|r| &r[3] == nucleon)
                .map(|r| (&r[0], &r[5], &r[7]))
                .collect();
            let b: Vec<(&str, &str, &str)> = scan_rows
                .iter()
                .filter(|r| &r[0] == level && r[1] == *seg.to_string() && &r[4] == nucleon)
                .map(|r| (&r[2], &r[6], &r[7]))
                .collect();
            assert_eq!(a.len(), pts.len());
            assert_eq!(a, b, "{level} segment {seg}, {nucleon}");
        }
    }
}

#[test]
fn scan_folder_axial_uses_sd_and_the_points_couplings() {
    // Points evaluated at g_q = 0.1 (rescaled from the reference 0.25): the
    // contours, and so the curve, are at g_q = 0.1.
    let dir = tempfile::tempdir().unwrap();
    let scan = scan_folder(dir.path(), "axial", (0.25, 1.0), (0.1, 1.0), &CONTOURS[..2]);
    let out = dir.path().join("sigma.json");
    let o = recoil(&[
        "--curve",
        scan.to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
    ]);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let text = String::from_utf8(o.stdout).unwrap();
    assert!(text.contains("rescaled from the reference"), "{text}");
    assert!(text.contains("no expected contour"), "{text}");
    let json: serde_json::Value = serde_json::from_slice(&std::fs::read(&out).unwrap()).unwrap();
    assert_eq!(json["cl"], 0.95);
    assert_eq!(json["mediator"], "axial");
    let curves = json["curves"].as_array().unwrap();
    assert_eq!(curves.len(), 2, "proton and neutron, one observed segment");
    for (curve, m_n) in curves.iter().zip([M_P, M_N]) {
        assert_eq!(curve["scattering"], "SD");
        assert_eq!(curve["level"], "observed");
        assert!(curve["note"].as_str().unwrap().contains("90% CL"));
        for (p, &(_, _, m_med, m_dm)) in curve["points"].as_array().unwrap().iter().zip(&CONTOURS) {
            let s = p["sigma_cm2"].as_f64().unwrap();
            let want = sigma_sd_axial(0.1, 1.0, m_med, m_dm, m_n);
            assert!(rel(s, want) < 1e-12, "{s} vs {want}");
        }
    }
}

#[test]
fn scan_folder_flags_must_agree_with_the_scan() {
    let dir = tempfile::tempdir().unwrap();
    let scan = scan_folder(dir.path(), "vector", (0.25, 1.0), (0.25, 1.0), &CONTOURS);
    let s = scan.to_str().unwrap();
    let out = dir.path().join("never.csv");
    for (flag, value, file) in [
        ("--mediator", "axial", "result.json"),
        ("--gq", "0.5", "results.csv"),
        ("--gdm", "0.9", "results.csv"),
        ("--cl", "0.9", "result.json"),
    ] {
        let o = recoil(&["--curve", s, flag, value, "--out", out.to_str().unwrap()]);
        assert_eq!(o.status.code(), Some(1), "{flag}");
        let err = String::from_utf8_lossy(&o.stderr);
        assert!(
            err.contains(&format!("{flag} {value} disagrees")) && err.contains(file),
            "{err}"
        );
        assert!(!out.exists(), "no output after an error");
    }
    // Agreeing flags are accepted.
    let o = recoil(&[
        "--curve",
        s,
        "--mediator",
        "vector",
        "--gq",
        "0.25",
        "--cl",
        "0.95",
    ]);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
}

// The nucleon parameter set recorded by the scan is used, and a
// disagreeing --nucleon-set is refused (the rule for every flag above).
#[test]
fn scan_folder_nucleon_set_comes_from_the_scan() {
    let dir = tempfile::tempdir().unwrap();
    let scan = scan_folder(dir.path(), "vector", (0.25, 1.0), (0.25, 1.0), &CONTOURS);
    let manifest = scan.join("result.json");
    let text = std::fs::read_to_string(&manifest).unwrap();
    std::fs::write(
        &manifest,
        text.replacen('{', r#"{"nucleon_params": "lattice2015", "#, 1),
    )
    .unwrap();
    let s = scan.to_str().unwrap();
    let o = recoil(&["--curve", s]);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let text = String::from_utf8_lossy(&o.stdout);
    assert!(text.contains("nucleon set lattice2015"), "{text}");
    let o = recoil(&["--curve", s, "--nucleon-set", "dmwg2016"]);
    assert_eq!(o.status.code(), Some(1));
    let err = String::from_utf8_lossy(&o.stderr);
    assert!(
        err.contains("--nucleon-set dmwg2016 disagrees") && err.contains("result.json"),
        "{err}"
    );
    let o = recoil(&["--curve", s, "--nucleon-set", "lattice2015"]);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
}

#[test]
fn scan_folder_bad_input_fails_cleanly() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("never.csv");
    let run = |scan: &Path| {
        let o = recoil(&[
            "--curve",
            scan.to_str().unwrap(),
            "--out",
            out.to_str().unwrap(),
        ]);
        assert_eq!(o.status.code(), Some(1));
        assert!(!out.exists(), "no output after an error");
        String::from_utf8_lossy(&o.stderr).into_owned()
    };

    // Missing contours.csv.
    let scan = scan_folder(dir.path(), "vector", (0.25, 1.0), (0.25, 1.0), &CONTOURS);
    std::fs::remove_file(scan.join("contours.csv")).unwrap();
    let err = run(&scan);
    assert!(
        err.contains("contours.csv") && err.contains("not found"),
        "{err}"
    );

    // A malformed row: line 3 (header is line 1).
    std::fs::write(
        scan.join("contours.csv"),
        "level,segment,m_med_gev,m_dm_gev\nobserved,0,2000,100\nobserved,0,abc,300\n",
    )
    .unwrap();
    let err = run(&scan);
    assert!(
        err.contains("contours.csv")
            && err.contains("line 3")
            && err.contains("m_med_gev")
            && err.contains("abc"),
        "{err}"
    );
    // A mass that is not > 0.
    std::fs::write(
        scan.join("contours.csv"),
        "level,segment,m_med_gev,m_dm_gev\nobserved,0,2000,100\nobserved,0,1500,-3\n",
    )
    .unwrap();
    let err = run(&scan);
    assert!(
        err.contains("contours.csv") && err.contains("line 3") && err.contains("m_dm_gev"),
        "{err}"
    );

    // Nothing excluded: a header without rows.
    std::fs::write(
        scan.join("contours.csv"),
        "level,segment,m_med_gev,m_dm_gev\n",
    )
    .unwrap();
    let err = run(&scan);
    assert!(
        err.contains("no exclusion contour") && err.contains("contours.csv"),
        "{err}"
    );

    // Pseudoscalar scan: momentum-suppressed, named in result.json.
    let dir2 = tempfile::tempdir().unwrap();
    let scan = scan_folder(
        dir2.path(),
        "pseudoscalar",
        (1.0, 1.0),
        (1.0, 1.0),
        &CONTOURS,
    );
    let err = run(&scan);
    assert!(
        err.contains("momentum") && err.contains("result.json"),
        "{err}"
    );

    // result.json without the confidence level.
    std::fs::write(
        scan.join("result.json"),
        r#"{"mediator": "vector", "reference_couplings": {"g_q": 1, "g_dm": 1, "g_l": 0}}"#,
    )
    .unwrap();
    let err = run(&scan);
    assert!(
        err.contains("result.json") && err.contains("missing field `limit`"),
        "{err}"
    );

    // A folder that is not a scan output.
    let empty = dir2.path().join("empty");
    std::fs::create_dir(&empty).unwrap();
    let err = run(&empty);
    assert!(
        err.contains("result.json") && err.contains("not found"),
        "{err}"
    );
}

#[test]
fn table_mode_still_needs_a_mediator() {
    let dir = tempfile::tempdir().unwrap();
    let b = dir.path().join("b.csv");
    std::fs::write(&b, "m_dm_gev,m_med_limit_gev\n10,1000\n").unwrap();
    let o = recoil(&["--curve", b.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(1));
    assert!(String::from_utf8_lossy(&o.stderr).contains("--mediator is required"));
}
