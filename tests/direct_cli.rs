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

/// A CSV cell of a cross-section: scientific notation (`d[.ddd]e±x`, at
/// most 17 significant digits) or `inf` (formats.md).
fn is_scientific(cell: &str) -> bool {
    if cell == "inf" {
        return true;
    }
    let Some((mantissa, exponent)) = cell.split_once('e') else {
        return false;
    };
    let digits: String = mantissa.chars().filter(char::is_ascii_digit).collect();
    let lead = mantissa.split('.').next().unwrap_or("");
    lead.len() == 1
        && (1..=17).contains(&digits.len())
        && exponent.trim_start_matches('-').parse::<u32>().is_ok()
}

#[test]
fn cross_sections_are_written_in_scientific_notation() {
    let dir = tempfile::tempdir().unwrap();
    let first = dir.path().join("first.csv");
    let second = dir.path().join("second.csv");
    let lxe = example("lxe-demo.toml");
    let args = |out: &Path| {
        vec![
            "curve".to_string(),
            "--points".into(),
            "12".into(),
            "--experiment".into(),
            text(&lxe).into(),
            "--out".into(),
            text(out).into(),
        ]
    };
    let first_args = args(&first);
    let stdout = run_ok(&first_args.iter().map(String::as_str).collect::<Vec<_>>());
    let mut second_args = args(&second);
    second_args.extend(["--compare".to_string(), text(&first).into()]);
    run_ok(&second_args.iter().map(String::as_str).collect::<Vec<_>>());

    let mut rdr = csv::Reader::from_path(&second).unwrap();
    let header = rdr.headers().unwrap().clone();
    let col = |name: &str| header.iter().position(|h| h == name).unwrap();
    let rows: Vec<csv::StringRecord> = rdr.records().map(Result::unwrap).collect();
    assert_eq!(rows.len(), 12);
    for row in &rows {
        for name in [
            "sigma_cm2",
            "sigma_observed_cm2",
            "sigma_expected_cm2",
            "events_per_cm2",
            "sigma_compare_cm2",
        ] {
            let cell = &row[col(name)];
            assert!(is_scientific(cell), "{name}: {cell:?}");
        }
        // The comparison curve is this one, read back at its own masses, so
        // the shortest round-trip digits reproduce the cell exactly.
        assert_eq!(&row[col("sigma_compare_cm2")], &row[col("sigma_cm2")]);
    }
    // Human-readable table: 4 significant digits in scientific form.
    let table_row = stdout
        .lines()
        .skip_while(|l| !l.contains("σ_obs [cm²]"))
        .nth(1)
        .unwrap();
    let cells: Vec<&str> = table_row.split_whitespace().collect();
    for cell in &cells[1..] {
        assert!(
            *cell == "inf" || (is_scientific(cell) && cell.split_once('e').unwrap().0.len() == 5),
            "{table_row}"
        );
    }

    // Counts mode writes the given σ = 1e-44 cm² back as typed.
    let counts = dir.path().join("counts.csv");
    run_ok(&[
        "counts",
        "--mass-gev",
        "100",
        "--sigma-cm2",
        "1e-44",
        "--experiment",
        text(&lxe),
        "--out",
        text(&counts),
    ]);
    let csv = std::fs::read_to_string(&counts).unwrap();
    assert_eq!(csv.lines().nth(1).unwrap().split(',').nth(1), Some("1e-44"));
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
