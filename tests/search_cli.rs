//! `recoil recast` on bad input: one clear message naming the file, the
//! place and the rule, exit code 1, and nothing read from the event files.

use std::process::Command;

const DEMO: &str = concat!(
    env!("CARGO_MANIFEST_DIR"),
    "/recasts/searches/demo-jet-met.toml"
);

fn recast(args: &[&str]) -> (i32, String) {
    let out = Command::new(env!("CARGO_BIN_EXE_recoil"))
        .arg("recast")
        .args(args)
        .output()
        .unwrap();
    (
        out.status.code().unwrap_or(-1),
        String::from_utf8_lossy(&out.stderr).into_owned(),
    )
}

#[test]
fn bad_cut_is_reported_with_file_line_and_column() {
    let dir = tempfile::tempdir().unwrap();
    let text = std::fs::read_to_string(DEMO).unwrap().replacen(
        "\"n_jets <= 4\"",
        "\"n_jets <= 4 and\"",
        1,
    );
    let path = dir.path().join("bad.toml");
    std::fs::write(&path, &text).unwrap();
    let events = dir.path().join("events.lhe");
    std::fs::write(&events, "").unwrap();
    let (code, err) = recast(&["--search", path.to_str().unwrap(), events.to_str().unwrap()]);
    assert_eq!(code, 1, "{err}");
    // The cut is on the line of `"n_jets <= 4 and",`; the error is at the
    // end of its text (character 16).
    let line = text
        .lines()
        .position(|l| l.contains("n_jets <= 4 and"))
        .unwrap()
        + 1;
    assert!(err.contains(&format!("bad.toml:{line}:")), "{err}");
    assert!(err.contains("at character 16"), "{err}");
    assert_eq!(err.matches("recoil: error").count(), 1, "{err}");
}

#[test]
fn bad_options_fail_before_reading_events() {
    let cases: [(&[&str], &str); 5] = [
        (
            &["--method", "bayes"],
            "--method must be asymptotic, exact or toys",
        ),
        (
            &["--lumi-ifb=-3"],
            "projected luminosity must be finite and > 0",
        ),
        (&["--xsec-pb", "nan"], "--xsec-pb must be finite"),
        (&["--detector-variation", "resolution=x"], "is not a number"),
        (
            &["--detector", "/nonexistent/profile.toml"],
            "/nonexistent/profile.toml",
        ),
    ];
    for (extra, want) in cases {
        let mut args = vec!["--search", DEMO];
        args.extend_from_slice(extra);
        args.push("/nonexistent/events.lhe");
        let (code, err) = recast(&args);
        assert_eq!(code, 1, "{extra:?}: {err}");
        assert!(err.contains(want), "{extra:?}: {err}");
    }
}

#[test]
fn missing_event_file_is_named() {
    // The detector profile must load first; use the search's own when the
    // detector stage provides it, otherwise the profile error is the answer.
    let (code, err) = recast(&["--search", DEMO, "/nonexistent/events.lhe"]);
    assert_eq!(code, 1, "{err}");
    assert!(
        err.contains("/nonexistent/events.lhe") || err.contains("detector profile"),
        "{err}"
    );
}
