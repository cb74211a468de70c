//! `recoil scan` and `recoil merge` as a user runs them: the real binary on
//! the demo events (a six-point subset for the run-control tests, the whole
//! demo grid once).

use std::path::{Path, PathBuf};
use std::process::{Command, Output, Stdio};
use std::time::{Duration, Instant};

fn repo(p: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join(p)
}

fn recoil(args: &[&str], cwd: &Path) -> Output {
    Command::new(env!("CARGO_BIN_EXE_recoil"))
        .args(args)
        .current_dir(cwd)
        .output()
        .expect("run recoil")
}

fn ok(args: &[&str], cwd: &Path) -> String {
    let o = recoil(args, cwd);
    assert!(o.status.success(), "{args:?}: {}", stderr(&o));
    String::from_utf8_lossy(&o.stdout).into_owned()
}

fn stderr(o: &Output) -> String {
    String::from_utf8_lossy(&o.stderr).into_owned()
}

fn read(p: &Path) -> Vec<u8> {
    std::fs::read(p).unwrap_or_else(|e| panic!("{}: {e}", p.display()))
}

/// Asserts that two output folders hold byte-identical result files.
fn same_outputs(a: &Path, b: &Path, what: &str) {
    for f in ["results.csv", "contours.csv", "dm_nucleon.csv"] {
        assert_eq!(read(&a.join(f)), read(&b.join(f)), "{f}: {what}");
    }
}

/// The demo points used by the run-control tests (a light and a heavy
/// mediator, on and off shell).
const SUBSET: [(u32, u32); 6] = [
    (500, 1),
    (1000, 200),
    (1500, 1200),
    (2000, 1),
    (2500, 400),
    (3000, 800),
];

/// A plan in `dir` over [`SUBSET`] of the demo events, with the demo search
/// and profile, and the given extra top-level keys.
fn subset_plan(dir: &Path, extra: &str) -> PathBuf {
    let mut csv = String::from("files,m_med_gev,m_dm_gev,g_q,g_dm\n");
    for (m, d) in SUBSET {
        let f = repo(&format!("demo-events/tenebris_mmed{m}_mdm{d}.lhe.gz"));
        csv.push_str(&format!("{},{m},{d},0.25,1\n", f.display()));
    }
    std::fs::write(dir.join("points.csv"), csv).unwrap();
    let plan = dir.join("plan.toml");
    std::fs::write(
        &plan,
        format!(
            "search = {:?}\npoints = \"points.csv\"\nseed = 3\n{extra}\n[detector]\nprofile = \
             {:?}\n[model]\nmediator = \"vector\"\ng_q = 0.25\ng_dm = 1.0\n\
             [dm_nucleon]\nfigures = false\n",
            repo("recasts/searches/demo-jet-met.toml"),
            repo("recasts/detectors/generic-13tev.toml"),
        ),
    )
    .unwrap();
    plan
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

#[test]
fn threads_cache_shards_and_merge_on_real_events() {
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    let plan = subset_plan(d, "cache = \"cache\"");
    let plan = plan.to_str().unwrap();

    // One thread, cache filled.
    let out1 = ok(&["scan", plan, "--threads", "1", "--out", "one"], d);
    assert!(
        out1.contains("6 evaluated (0 from the yield cache)"),
        "{out1}"
    );
    // Two threads, every yield from the cache: no event read, same table.
    let out2 = ok(&["scan", plan, "--threads", "2", "--out", "two"], d);
    assert!(
        out2.contains("6 evaluated (6 from the yield cache)"),
        "{out2}"
    );
    assert!(out2.contains(" 0 events read"), "{out2}");
    // Two threads without the cache: events read again, same table.
    ok(
        &[
            "scan",
            plan,
            "--threads",
            "2",
            "--no-cache",
            "--out",
            "nocache",
        ],
        d,
    );
    same_outputs(&d.join("one"), &d.join("two"), "1 vs 2 threads");
    same_outputs(&d.join("one"), &d.join("nocache"), "cache vs events");

    // Three shards merged equal the single run, bit for bit.
    let mut shards = Vec::new();
    for i in 0..3 {
        let name = format!("shard{i}");
        ok(
            &[
                "scan",
                plan,
                "--shard",
                &format!("{i}/3"),
                "--no-cache",
                "--out",
                &name,
            ],
            d,
        );
        shards.push(name);
    }
    let mut args = vec!["merge"];
    args.extend(shards.iter().map(String::as_str));
    args.extend(["--out", "merged"]);
    ok(&args, d);
    same_outputs(
        &d.join("one"),
        &d.join("merged"),
        "merged shards vs one run",
    );
}

#[test]
fn a_killed_scan_resumes_to_the_uninterrupted_result() {
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    let plan = subset_plan(d, "");
    let plan = plan.to_str().unwrap();
    ok(
        &[
            "scan",
            plan,
            "--threads",
            "1",
            "--no-cache",
            "--out",
            "full",
        ],
        d,
    );

    // Kill the scan once it has finished some but not all points.
    let mut child = Command::new(env!("CARGO_BIN_EXE_recoil"))
        .args([
            "scan",
            plan,
            "--threads",
            "1",
            "--no-cache",
            "--out",
            "killed",
        ])
        .current_dir(d)
        .stdout(Stdio::null())
        .stderr(Stdio::null())
        .spawn()
        .unwrap();
    let points = d.join("killed/points");
    let start = Instant::now();
    // Finished points: result files, not the temporary files of a write.
    let finished = |p: &Path| {
        std::fs::read_dir(p)
            .map(|r| {
                r.filter_map(Result::ok)
                    .filter(|e| {
                        let n = e.file_name().to_string_lossy().into_owned();
                        n.ends_with(".json") && !n.starts_with('.')
                    })
                    .count()
            })
            .unwrap_or(0)
    };
    while finished(&points) < 2 && start.elapsed() < Duration::from_secs(120) {
        if child.try_wait().unwrap().is_some() {
            break;
        }
        std::thread::sleep(Duration::from_millis(5));
    }
    child.kill().ok();
    child.wait().unwrap();
    let kept = finished(&points);
    assert!(kept >= 2, "the scan was killed before finishing two points");
    if kept < SUBSET.len() {
        assert!(
            !d.join("killed/result.json").exists(),
            "a killed scan is not complete"
        );
    }

    let again = ok(
        &[
            "scan",
            plan,
            "--threads",
            "1",
            "--no-cache",
            "--out",
            "killed",
        ],
        d,
    );
    assert!(again.contains(&format!("{kept} resumed")), "{again}");
    same_outputs(
        &d.join("full"),
        &d.join("killed"),
        "resumed vs uninterrupted",
    );
}

#[test]
fn couplings_away_from_the_reference_rescale_the_signal() {
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    let plan = subset_plan(d, "[stats]\nregions = \"combined\"");
    // One off-shell demo file (M = 500 GeV < 2 m_χ = 800 GeV) at the
    // reference couplings and at twice g_q.
    let f = repo("demo-events/tenebris_mmed500_mdm400.lhe.gz");
    std::fs::write(
        d.join("points.csv"),
        format!(
            "files,m_med_gev,m_dm_gev,g_q,g_dm\n{f},500,400,0.25,1\n{f},500,400,0.5,1\n",
            f = f.display()
        ),
    )
    .unwrap();
    ok(&["scan", plan.to_str().unwrap(), "--out", "o"], d);
    let text = String::from_utf8(read(&d.join("o/results.csv"))).unwrap();
    let s: Vec<f64> = text
        .lines()
        .skip(1)
        .map(|l| l.split(',').nth(7).unwrap().parse().unwrap())
        .collect();
    // Off shell the rate scales as (g_q g_DM)² (the propagator is far from
    // its pole; Abercrombie et al., arXiv:1507.00966): doubling g_q gives 4.
    assert!((s[1] / s[0] - 4.0).abs() < 1e-9, "{s:?}");
}
