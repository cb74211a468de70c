//! `recoil direct` run as a real binary on the shipped (invented) example
//! experiments.

use std::path::{Path, PathBuf};
use std::process::{Command, Output};

use recoil::direct::{Experiment, Interaction, PoissonMethod, poisson_upper_limit, read_curve_csv};

/// Runs `recoil direct ARGS…`.
fn run(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_recoil"))
        .arg("direct")
        .args(args)
        .output()
        .unwrap()
}

/// Runs `recoil direct ARGS…`, requires success, returns stdout.
fn run_ok(args: &[&str]) -> String {
    let o = run(args);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    String::from_utf8(o.stdout).unwrap()
}

fn example(name: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("recasts/experiments")
        .join(name)
}

fn text(path: &Path) -> &str {
    path.to_str().unwrap()
}

#[test]
fn curve_mode_writes_a_readable_curve() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("lxe.csv");
    let lxe = example("lxe-demo.toml");
    let stdout = run_ok(&[
        "curve",
        "--points",
        "40",
        "--mass-min-gev",
        "5",
        "--experiment",
        text(&lxe),
        "--out",
        text(&out),
    ]);
    assert!(
        stdout.contains("σ_obs [cm²]") && stdout.contains("90 % CL"),
        "{stdout}"
    );
    let csv = std::fs::read_to_string(&out).unwrap();
    assert!(csv.starts_with("m_dm_gev,sigma_cm2,expected_counts_at_sigma,"));
    let curve = read_curve_csv(&out).unwrap();
    assert_eq!(curve.len(), 40);
    // Only the output file is left in the folder (atomic write).
    assert_eq!(std::fs::read_dir(dir.path()).unwrap().count(), 1);
    // Every point carries the classical 90 % limit for n = 3, b = 3.4:
    // s_up = 3.2808 events (computed with scipy 1.17.1, brentq on poisson.cdf).
    let s_up = poisson_upper_limit(3, 3.4, 0.9, PoissonMethod::Classical).unwrap();
    assert!((s_up - 3.2808).abs() < 1e-4);
    let exp = Experiment::from_toml_file(&lxe).unwrap();
    for (m, sigma) in curve.iter().step_by(7) {
        let n = exp.expected_counts(*m, *sigma, Interaction::Si).unwrap();
        assert!((n - s_up).abs() < 1e-9 * s_up, "m {m}: {n}");
    }
}

#[test]
fn counts_and_spectrum_modes_run() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("counts.csv");
    let ge = example("cryo-ge-demo.toml");
    run_ok(&[
        "counts",
        "--mass-gev",
        "10,100",
        "--sigma-cm2",
        "1e-44",
        "--experiment",
        text(&ge),
        "--out",
        text(&out),
    ]);
    assert_eq!(std::fs::read_to_string(&out).unwrap().lines().count(), 3);
    let out = dir.path().join("spectrum.csv");
    run_ok(&[
        "spectrum",
        "--target",
        "xenon",
        "--mass-gev",
        "100",
        "--points",
        "11",
        "--out",
        text(&out),
    ]);
    let csv = std::fs::read_to_string(&out).unwrap();
    assert!(csv.starts_with("e_kev,dr_de_per_kg_day_kev,"));
    // Xenon, m = 100 GeV, σ = 1e-45 cm², E = 10 keV: 2.37607674e-5 per kg
    // day keV (computed with scipy 1.17.1, see tests/direct.rs).
    let row = csv.lines().nth(2).unwrap();
    let rate: f64 = row.split(',').nth(1).unwrap().parse().unwrap();
    assert!((rate / 2.376_076_74e-5 - 1.0).abs() < 1e-6, "{row}");
}

#[test]
fn bad_input_fails_with_one_clear_message() {
    let stderr = |o: &Output| String::from_utf8_lossy(&o.stderr).into_owned();
    let o = run(&["spectrum", "--target", "kryptonite", "--mass-gev", "10"]);
    assert_eq!(o.status.code(), Some(1));
    assert!(
        stderr(&o).contains("kryptonite") && stderr(&o).contains("xenon"),
        "{}",
        stderr(&o)
    );

    let o = run(&["curve", "--experiment", "/nonexistent/x.toml"]);
    assert_eq!(o.status.code(), Some(1));
    assert!(stderr(&o).contains("/nonexistent/x.toml"));

    // Mass grid checked before the experiment file is opened.
    let o = run(&[
        "curve",
        "--mass-min-gev=-1",
        "--experiment",
        "/nonexistent/x.toml",
    ]);
    assert!(
        stderr(&o).contains("mass grid") && !stderr(&o).contains("x.toml"),
        "{}",
        stderr(&o)
    );

    let lxe = example("lxe-demo.toml");
    let o = run(&[
        "counts",
        "--mass-gev",
        "10",
        "--interaction",
        "SD-q",
        "--experiment",
        text(&lxe),
    ]);
    assert_eq!(o.status.code(), Some(2));
    assert!(stderr(&o).contains("SD-q"));
}

#[test]
fn experiment_from_flags_matches_the_zero_background_limit() {
    // n = 0, b = 0 at 90 % CL: s_up = 2.3026 events (PDG Statistics review,
    // REFERENCES.md §1); the table line prints it.
    let stdout = run_ok(&[
        "curve",
        "--target",
        "germanium",
        "--exposure-kg-day",
        "100",
        "--threshold-kev",
        "5",
        "--upper-kev",
        "100",
        "--points",
        "3",
        "--mass-min-gev",
        "10",
        "--mass-max-gev",
        "1000",
    ]);
    assert!(stdout.contains("s_up = 2.3026 events"), "{stdout}");
    let o = run(&[
        "counts",
        "--target",
        "germanium",
        "--exposure-kg-day=-3",
        "--threshold-kev",
        "5",
        "--upper-kev",
        "40",
        "--mass-gev",
        "10",
    ]);
    assert_eq!(o.status.code(), Some(1));
    let err = String::from_utf8_lossy(&o.stderr);
    assert!(
        err.contains("exposure must be finite and > 0, got -3 kg·day"),
        "{err}"
    );
}
