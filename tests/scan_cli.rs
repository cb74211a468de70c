//! `recoil scan` and `recoil merge` as a user runs them: the real binary.

use std::path::Path;
use std::process::{Command, Output};

fn recoil(args: &[&str], cwd: &Path) -> Output {
    Command::new(env!("CARGO_BIN_EXE_recoil"))
        .args(args)
        .current_dir(cwd)
        .output()
        .expect("run recoil")
}

fn stderr(o: &Output) -> String {
    String::from_utf8_lossy(&o.stderr).into_owned()
}

#[test]
fn bad_arguments_fail_fast_with_one_message() {
    let dir = tempfile::tempdir().unwrap();
    let cases: [(&[&str], &str); 4] = [
        (&["scan", "plan.toml", "--shard", "4/4"], "--shard"),
        (
            &["scan", "plan.toml", "--threads", "0"],
            "--threads must be >= 1",
        ),
        (&["scan", "missing.toml"], "missing.toml"),
        (
            &["merge", "nowhere", "--out", "m"],
            "not a finished scan output",
        ),
    ];
    for (args, needle) in cases {
        let o = recoil(args, dir.path());
        assert_eq!(o.status.code(), Some(1), "{args:?}: {}", stderr(&o));
        let e = stderr(&o);
        assert!(e.contains(needle), "{args:?}: {e}");
        assert_eq!(
            e.lines().filter(|l| l.starts_with("recoil: error")).count(),
            1,
            "{e}"
        );
    }
}
