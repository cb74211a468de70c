//! Scan stage: plan validation, the driver (threads, resume, cache), shards
//! and merge, and contours, tested with a stand-in evaluator whose μ_up is
//! an analytic function of the masses.

use std::path::{Path, PathBuf};
use std::sync::atomic::{AtomicUsize, Ordering};

use recoil::scan::cache::CacheLookup;
use recoil::scan::run::NoProducts;
use recoil::scan::{
    CacheKeyBuilder, PointContext, PointEvaluator, PointOutcome, PointResult, RunOptions,
    ScanError, ScanPlan, ScanPoint, Shard, exclusion_contours, merge_shards, run_scan,
};

const MEDS: [f64; 7] = [300.0, 500.0, 800.0, 1200.0, 1800.0, 2500.0, 3500.0];
const DMS: [f64; 5] = [1.0, 100.0, 300.0, 600.0, 900.0];

/// Mass reach of the analytic field: μ_up = 1 on M = m_lim(m_χ) =
/// 2500 GeV / √(1 + (m_χ / 800 GeV)²).
fn m_lim(m_dm: f64) -> f64 {
    2500.0 / (1.0 + (m_dm / 800.0).powi(2)).sqrt()
}

/// Analytic stand-in for μ_up(obs): (M / M_lim(m_χ))⁴.
fn mu_field(m_med: f64, m_dm: f64) -> f64 {
    (m_med / m_lim(m_dm)).powi(4)
}

/// Writes a plan folder: plan.toml, points.csv, one event file per point,
/// and stand-in search and detector files (the plan only hashes them).
fn write_plan(dir: &Path, extra_toml: &str) -> PathBuf {
    std::fs::create_dir_all(dir.join("events")).unwrap();
    std::fs::write(dir.join("search.toml"), "# stand-in search\n").unwrap();
    std::fs::write(dir.join("detector.toml"), "# stand-in detector\n").unwrap();
    let mut csv = String::from("file,m_med_gev,m_dm_gev,g_q,g_dm,xsec_pb\n");
    for m in MEDS {
        for d in DMS {
            let f = format!("events/p_{m}_{d}.lhe");
            std::fs::write(dir.join(&f), format!("<LesHouchesEvents> {m} {d}\n")).unwrap();
            csv.push_str(&format!("{f},{m},{d},0.25,1,{}\n", 1.0 / m));
        }
    }
    std::fs::write(dir.join("points.csv"), csv).unwrap();
    let plan = dir.join("plan.toml");
    std::fs::write(
        &plan,
        format!(
            "title = \"test scan\"\nsearch = \"search.toml\"\npoints = \"points.csv\"\n\
             seed = 7\n{extra_toml}\n[detector]\nprofile = \"detector.toml\"\n\n\
             [model]\nmediator = \"vector\"\ng_q = 0.25\ng_dm = 1.0\n"
        ),
    )
    .unwrap();
    plan
}

/// Stand-in evaluator: "reads" the event files (counts them as events),
/// caches a yield keyed by the file contents, and returns μ_up from
/// [`mu_field`] scaled by the coupling ratio.
#[derive(Default)]
struct FakeEvaluator {
    reads: AtomicUsize,
    calls: AtomicUsize,
    /// Points (table index) that fail, to simulate an interrupted run.
    fail: Vec<usize>,
}

impl PointEvaluator for FakeEvaluator {
    fn evaluate(&self, point: &ScanPoint, ctx: &PointContext<'_>) -> Result<PointOutcome, String> {
        self.calls.fetch_add(1, Ordering::SeqCst);
        if self.fail.contains(&point.index) {
            return Err("interrupted".into());
        }
        let mut key = CacheKeyBuilder::new("fake yields").u64("seed", ctx.plan.seed);
        for h in ctx.file_hashes {
            key = key.bytes("file", &h.0);
        }
        let key = key.finish();
        let cached = ctx.cache.and_then(|c| match c.get::<f64>(&key) {
            CacheLookup::Hit(v) => Some(v),
            _ => None,
        });
        let (signal, events_read, from_cache) = match cached {
            Some(s) => (s, 0, true),
            None => {
                self.reads.fetch_add(1, Ordering::SeqCst);
                for f in &point.files {
                    std::fs::read(f).map_err(|e| e.to_string())?;
                }
                let s = 10.0 / mu_field(point.m_med_gev, point.m_dm_gev);
                if let Some(c) = ctx.cache {
                    c.put(&key, &s).map_err(|e| e.to_string())?;
                }
                (s, 100, false)
            }
        };
        let scale = (point.couplings.g_q / ctx.plan.reference.g_q).powi(2);
        let mu = 10.0 / (signal * scale);
        Ok(PointOutcome {
            width_over_mass: 0.05,
            best_region: "met_500_600".into(),
            signal_events: signal * scale,
            signal_mc_stat: (signal * scale).sqrt(),
            cls_mu1: (-1.0 / mu).exp(),
            mu_up_obs: mu,
            mu_up_exp: [0.5 * mu, 0.7 * mu, mu, 1.4 * mu, 2.0 * mu],
            warnings: vec![],
            events_read,
            yields_from_cache: from_cache,
        })
    }
}

fn opts(out: &Path) -> RunOptions {
    RunOptions {
        out: out.to_path_buf(),
        shard: Shard::WHOLE,
        threads: Some(1),
        use_cache: true,
    }
}

/// Runs the plan with a fresh stand-in evaluator.
fn run_fake(plan: &ScanPlan, o: &RunOptions) -> recoil::scan::ScanSummary {
    run_scan(plan, &FakeEvaluator::default(), &NoProducts, o, None).unwrap()
}

fn read(p: &Path) -> Vec<u8> {
    std::fs::read(p).unwrap_or_else(|e| panic!("{}: {e}", p.display()))
}

#[test]
fn plan_reads_the_table_and_resolves_paths_against_the_plan_folder() {
    let dir = tempfile::tempdir().unwrap();
    let plan = ScanPlan::from_toml_file(&write_plan(dir.path(), "")).unwrap();
    assert_eq!(plan.points.len(), MEDS.len() * DMS.len());
    let p = &plan.points[6];
    assert_eq!((p.m_med_gev, p.m_dm_gev, p.line), (500.0, 100.0, 8));
    assert_eq!(p.files, vec![dir.path().join("events/p_500_100.lhe")]);
    assert_eq!(p.label, "M500_m100");
    assert_eq!(plan.search, dir.path().join("search.toml"));
    assert_eq!(plan.seed, 7);
}

/// Writes a plan whose table is `csv` and returns the error message.
fn plan_error(csv: &str, toml_extra: &str) -> String {
    let dir = tempfile::tempdir().unwrap();
    let plan = write_plan(dir.path(), toml_extra);
    std::fs::write(dir.path().join("points.csv"), csv).unwrap();
    std::fs::write(dir.path().join("a.lhe"), "x").unwrap();
    std::fs::write(dir.path().join("b.lhe"), "y").unwrap();
    match ScanPlan::from_toml_file(&plan) {
        Ok(_) => panic!("plan accepted:\n{csv}"),
        Err(e) => e.to_string(),
    }
}

#[test]
fn bad_tables_fail_with_file_line_and_rule() {
    let cases: [(&str, &[&str]); 8] = [
        (
            "files,m_med_gev,m_dm_gev,g_q,g_dm\na.lhe,1000,1,0.25,1\nmissing.lhe,1000,2,0.25,1\n",
            &["points.csv", "line 3", "missing.lhe", "no such file"],
        ),
        (
            "files,m_med_gev,m_dm_gev,g_q,g_dm\na.lhe,1000,1,0.25,1\nb.lhe,1000,1,0.25,1\n",
            &["line 3", "repeats the point of line 2"],
        ),
        (
            "files,m_med_gev,m_dm_gev,g_q,g_dm,mass\na.lhe,1000,1,0.25,1,3\n",
            &["line 1", "unknown column \"mass\""],
        ),
        (
            "files,m_med_gev,m_dm_gev,g_q,g_dm\na.lhe,-5,1,0.25,1\n",
            &["line 2", "m_med_gev", "> 0 in GeV", "-5"],
        ),
        (
            "files,m_med_gev,m_dm_gev,g_q,g_dm\na.lhe,1000,1,nan,1\n",
            &["line 2", "g_q", "nan"],
        ),
        (
            "files,m_med_gev,m_dm_gev,g_q\na.lhe,1000,1,0.25\n",
            &["missing column \"g_dm\""],
        ),
        (
            "files,m_med_gev,m_dm_gev,g_q,g_dm\na.lhe;;b.lhe,1000,1,0.25,1\n",
            &["line 2", "empty file name"],
        ),
        (
            "files,m_med_gev,m_dm_gev,g_q,g_dm,xsec_pb\na.lhe,1000,1,0.25,1,0\n",
            &["line 2", "xsec_pb", "> 0 in pb"],
        ),
    ];
    for (csv, needles) in cases {
        let msg = plan_error(csv, "");
        for n in needles {
            assert!(msg.contains(n), "message {msg:?} lacks {n:?}");
        }
    }
}

#[test]
fn several_files_per_point_are_accepted() {
    let dir = tempfile::tempdir().unwrap();
    let plan = write_plan(dir.path(), "");
    std::fs::write(dir.path().join("a.lhe"), "x").unwrap();
    std::fs::write(dir.path().join("b.lhe"), "y").unwrap();
    std::fs::write(
        dir.path().join("points.csv"),
        "files,m_med_gev,m_dm_gev,g_q,g_dm,label\na.lhe; b.lhe,1000,1,0.25,1,first\n",
    )
    .unwrap();
    let plan = ScanPlan::from_toml_file(&plan).unwrap();
    assert_eq!(plan.points[0].files.len(), 2);
    assert_eq!(plan.points[0].label, "first");
}

#[test]
fn bad_plan_keys_fail_with_line() {
    let dir = tempfile::tempdir().unwrap();
    let plan = write_plan(dir.path(), "colour = \"red\"");
    let msg = ScanPlan::from_toml_file(&plan).unwrap_err().to_string();
    assert!(
        msg.contains("plan.toml") && msg.contains("line 5") && msg.contains("colour"),
        "{msg}"
    );

    let dir = tempfile::tempdir().unwrap();
    let plan = write_plan(dir.path(), "[stats]\ncl = 1.5\n");
    let msg = ScanPlan::from_toml_file(&plan).unwrap_err().to_string();
    assert!(
        msg.contains("[stats] cl must be in (0, 1), got 1.5"),
        "{msg}"
    );

    let dir = tempfile::tempdir().unwrap();
    let plan = write_plan(dir.path(), "");
    std::fs::remove_file(dir.path().join("search.toml")).unwrap();
    let msg = ScanPlan::from_toml_file(&plan).unwrap_err().to_string();
    assert!(
        msg.contains("search = \"search.toml\": no such file"),
        "{msg}"
    );
}

#[test]
fn one_and_two_threads_give_identical_files() {
    let dir = tempfile::tempdir().unwrap();
    let plan = ScanPlan::from_toml_file(&write_plan(dir.path(), "")).unwrap();
    let mut outs = Vec::new();
    for threads in [1, 2] {
        let out = dir.path().join(format!("out{threads}"));
        let mut o = opts(&out);
        o.threads = Some(threads);
        run_fake(&plan, &o);
        outs.push(out);
    }
    for f in ["results.csv", "contours.csv"] {
        assert_eq!(read(&outs[0].join(f)), read(&outs[1].join(f)), "{f}");
    }
}

#[test]
fn shards_merged_equal_one_run_bit_for_bit() {
    let dir = tempfile::tempdir().unwrap();
    let plan_path = write_plan(dir.path(), "");
    let plan = ScanPlan::from_toml_file(&plan_path).unwrap();
    let full = dir.path().join("full");
    run_fake(&plan, &opts(&full));

    let n = 3;
    let mut shard_dirs = Vec::new();
    for i in 0..n {
        let out = dir.path().join(format!("shard{i}"));
        let mut o = opts(&out);
        o.shard = Shard::new(i, n).unwrap();
        let s = run_fake(&plan, &o);
        assert!(s.rows.iter().all(|r| r.index % n == i));
        assert!(
            !out.join("contours.csv").exists(),
            "a shard has no contours"
        );
        shard_dirs.push(out);
    }
    // Given in any order.
    shard_dirs.reverse();
    let merged = dir.path().join("merged");
    merge_shards(&shard_dirs, &merged, &NoProducts).unwrap();
    for f in ["results.csv", "contours.csv"] {
        assert_eq!(read(&full.join(f)), read(&merged.join(f)), "{f}");
    }

    // Missing and repeated shards are refused.
    let msg = merge_shards(&shard_dirs[..2], &dir.path().join("m2"), &NoProducts)
        .unwrap_err()
        .to_string();
    assert!(msg.contains("is missing"), "{msg}");
    let twice = vec![
        shard_dirs[0].clone(),
        shard_dirs[0].clone(),
        shard_dirs[1].clone(),
    ];
    let msg = merge_shards(&twice, &dir.path().join("m3"), &NoProducts)
        .unwrap_err()
        .to_string();
    assert!(msg.contains("given twice"), "{msg}");
}

#[test]
fn merge_refuses_mixed_plans() {
    let dir = tempfile::tempdir().unwrap();
    let a = ScanPlan::from_toml_file(&write_plan(&dir.path().join("a"), "")).unwrap();
    let b = ScanPlan::from_toml_file(&write_plan(
        &dir.path().join("b"),
        "extra_invisible = [1000012]",
    ))
    .unwrap();
    let mut dirs = Vec::new();
    for (i, plan) in [&a, &b].into_iter().enumerate() {
        let out = dir.path().join(format!("s{i}"));
        let mut o = opts(&out);
        o.shard = Shard::new(i, 2).unwrap();
        run_fake(plan, &o);
        dirs.push(out);
    }
    let err = merge_shards(&dirs, &dir.path().join("m"), &NoProducts).unwrap_err();
    assert!(matches!(err, ScanError::Merge(_)));
    assert!(err.to_string().contains("another plan"), "{err}");
}

#[test]
fn resume_keeps_finished_points_and_equals_an_uninterrupted_run() {
    let dir = tempfile::tempdir().unwrap();
    let plan = ScanPlan::from_toml_file(&write_plan(dir.path(), "")).unwrap();
    let full = dir.path().join("full");
    run_fake(&plan, &opts(&full));

    let out = dir.path().join("out");
    let failing = FakeEvaluator {
        fail: vec![3, 17, 30],
        ..Default::default()
    };
    let err = run_scan(&plan, &failing, &NoProducts, &opts(&out), None).unwrap_err();
    assert!(
        err.to_string().contains("point 3"),
        "first failure in table order: {err}"
    );
    assert!(
        !out.join("result.json").exists(),
        "an interrupted run is not complete"
    );

    let again = FakeEvaluator::default();
    let s = run_scan(&plan, &again, &NoProducts, &opts(&out), None).unwrap();
    assert_eq!(
        again.calls.load(Ordering::SeqCst),
        3,
        "only the unfinished points run"
    );
    assert_eq!((s.resumed, s.evaluated), (plan.points.len() - 3, 3));
    for f in ["results.csv", "contours.csv"] {
        assert_eq!(read(&full.join(f)), read(&out.join(f)), "{f}");
    }

    // A changed input invalidates the stored result of that point only.
    std::fs::write(&plan.points[5].files[0], "changed").unwrap();
    let third = FakeEvaluator::default();
    run_scan(&plan, &third, &NoProducts, &opts(&out), None).unwrap();
    assert_eq!(third.calls.load(Ordering::SeqCst), 1);
}

#[test]
fn cached_yields_are_reused_without_reading_events() {
    let dir = tempfile::tempdir().unwrap();
    let plan = ScanPlan::from_toml_file(&write_plan(dir.path(), "cache = \"cache\"")).unwrap();
    let first = FakeEvaluator::default();
    let s1 = run_scan(
        &plan,
        &first,
        &NoProducts,
        &opts(&dir.path().join("o1")),
        None,
    )
    .unwrap();
    assert_eq!(first.reads.load(Ordering::SeqCst), plan.points.len());
    assert_eq!(s1.from_cache, 0);

    // A fresh output folder (no resume) with the shared cache: no reads.
    let second = FakeEvaluator::default();
    let s2 = run_scan(
        &plan,
        &second,
        &NoProducts,
        &opts(&dir.path().join("o2")),
        None,
    )
    .unwrap();
    assert_eq!(second.reads.load(Ordering::SeqCst), 0);
    assert_eq!((s2.from_cache, s2.events_read), (plan.points.len(), 0));
    assert_eq!(
        read(&dir.path().join("o1/results.csv")),
        read(&dir.path().join("o2/results.csv"))
    );

    // Without the cache every point reads its events again.
    let third = FakeEvaluator::default();
    let mut o = opts(&dir.path().join("o3"));
    o.use_cache = false;
    run_scan(&plan, &third, &NoProducts, &o, None).unwrap();
    assert_eq!(third.reads.load(Ordering::SeqCst), plan.points.len());
}

/// Builds scan rows on a grid from the analytic field.
fn rows_on(meds: &[f64], dms: &[f64]) -> Vec<PointResult> {
    let mut rows = Vec::new();
    for &d in dms {
        for &m in meds {
            let mu = mu_field(m, d);
            rows.push(PointResult {
                index: rows.len(),
                label: format!("M{m}_m{d}"),
                m_med_gev: m,
                m_dm_gev: d,
                couplings: recoil::scan::plan::PointCouplings {
                    g_q: 0.25,
                    g_dm: 1.0,
                    g_l: 0.0,
                },
                width_over_mass: 0.05,
                best_region: "r".into(),
                signal_events: 1.0,
                signal_mc_stat: 0.1,
                cls_mu1: 0.5,
                mu_up_obs: mu,
                mu_up_exp: [mu; 5],
                warnings: vec![],
                events_read: 0,
                yields_from_cache: false,
                fingerprint: String::new(),
            });
        }
    }
    rows
}

fn geomspace(a: f64, b: f64, n: usize) -> Vec<f64> {
    (0..n)
        .map(|k| (a.ln() + (b.ln() - a.ln()) * k as f64 / (n - 1) as f64).exp())
        .collect()
}

#[test]
fn traced_contour_follows_the_analytic_curve() {
    // μ_up = (M / M_lim(m_χ))⁴ with M_lim = 2500 GeV / √(1 + (m_χ/800 GeV)²):
    // the μ_up = 1 curve is M = M_lim(m_χ) exactly (analytic, no source).
    // In log space ln μ = 4 (x − g(y)), x = ln M, y = ln m_χ, g = ln M_lim,
    // |g''| ≤ 1/2. Linear interpolation along an edge of log-step h moves a
    // crossing by at most h²·max|g''|/8 = h²/16 in ln M (the standard
    // linear-interpolation error bound); tolerance 1.1 × that.
    let mut errors = Vec::new();
    for n in [12, 24, 48] {
        let meds = geomspace(300.0, 4000.0, n);
        let dms = geomspace(1.0, 1200.0, n);
        let h = (4000.0f64 / 300.0).ln().max(1200.0f64.ln()) / (n - 1) as f64;
        let contours = exclusion_contours(&rows_on(&meds, &dms)).unwrap();
        let obs = &contours[0];
        assert_eq!(obs.segments.len(), 1, "one open curve");
        let line = &obs.segments[0];
        let worst = line
            .iter()
            .map(|[m, d]| (m / m_lim(*d)).ln().abs())
            .fold(0.0f64, f64::max);
        let tol = 1.1 * h * h / 16.0;
        assert!(worst < tol, "n = {n}: worst |Δ ln M| {worst} > {tol}");
        errors.push(worst);
        // It runs from the lower to the upper m_χ edge of the grid.
        let ends = [line[0][1], line[line.len() - 1][1]];
        let lo = ends[0].min(ends[1]);
        let hi = ends[0].max(ends[1]);
        assert!(
            (lo - 1.0).abs() < 1e-9 && (hi - 1200.0).abs() < 1e-9,
            "{ends:?}"
        );
    }
    // Second order: halving the step divides the error by about 4.
    for w in errors.windows(2) {
        assert!(w[0] / w[1] > 3.0, "{errors:?}");
    }
}

#[test]
fn contours_csv_has_every_level() {
    let dir = tempfile::tempdir().unwrap();
    let plan = ScanPlan::from_toml_file(&write_plan(dir.path(), "")).unwrap();
    let out = dir.path().join("o");
    run_fake(&plan, &opts(&out));
    let text = String::from_utf8(read(&out.join("contours.csv"))).unwrap();
    assert!(text.starts_with("level,segment,m_med_gev,m_dm_gev\n"));
    for level in ["observed,", "expected,", "expected_m1,", "expected_p1,"] {
        assert!(text.lines().any(|l| l.starts_with(level)), "{level}");
    }
    let json: serde_json::Value = serde_json::from_slice(&read(&out.join("result.json"))).unwrap();
    assert_eq!(json["n_points_total"], 35);
    assert_eq!(json["seed"], 7);
}
