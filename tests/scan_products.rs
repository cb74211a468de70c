//! Whole-scan products: the collider curve in the DM–nucleon plane from the
//! contours, the direct-detection and imported curves, `dm_nucleon.csv`
//! and the figures.

use std::path::{Path, PathBuf};

use recoil::scan::contour::{Contour, ContourLevel};
use recoil::scan::plan::PointCouplings;
use recoil::scan::products::PlanProducts;
use recoil::scan::run::ScanProducts;
use recoil::scan::{PointResult, ScanPlan};

fn repo(p: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join(p)
}

/// A plan in `dir` using the shipped demo search and generic profile.
fn plan_in(dir: &Path, mediator: &str, extra: &str) -> ScanPlan {
    std::fs::write(dir.join("a.lhe"), "x").unwrap();
    std::fs::write(
        dir.join("points.csv"),
        "files,m_med_gev,m_dm_gev,g_q,g_dm\na.lhe,1000,1,0.25,1\n",
    )
    .unwrap();
    let search = repo("recasts/searches/demo-jet-met.toml");
    let detector = repo("recasts/detectors/generic-13tev.toml");
    std::fs::write(
        dir.join("plan.toml"),
        format!(
            "search = {search:?}\npoints = \"points.csv\"\n{extra}\n[detector]\nprofile = \
             {detector:?}\n[model]\nmediator = \"{mediator}\"\ng_q = 0.25\ng_dm = 1.0\n"
        ),
    )
    .unwrap();
    ScanPlan::from_toml_file(&dir.join("plan.toml")).unwrap()
}

fn row(m_med: f64, m_dm: f64) -> PointResult {
    PointResult {
        index: 0,
        label: "p".into(),
        m_med_gev: m_med,
        m_dm_gev: m_dm,
        couplings: PointCouplings {
            g_q: 0.25,
            g_dm: 1.0,
            g_l: 0.0,
        },
        width_over_mass: 0.05,
        best_region: "r".into(),
        signal_events: 1.0,
        signal_mc_stat: 0.1,
        cls_mu1: 0.5,
        mu_up_obs: 0.5,
        mu_up_exp: [0.5; 5],
        warnings: vec![],
        events_read: 0,
        yields_from_cache: false,
        fingerprint: String::new(),
    }
}

#[test]
fn collider_curve_follows_the_vector_si_formula() {
    let dir = tempfile::tempdir().unwrap();
    let plan = plan_in(dir.path(), "vector", "");
    let products = PlanProducts::new(&plan).unwrap();
    let contours = vec![Contour {
        level: ContourLevel::Observed,
        segments: vec![vec![[1000.0, 1000.0], [2000.0, 10.0]]],
    }];
    let rows = vec![row(1000.0, 1.0)];
    products.write(&plan, &rows, &contours, dir.path()).unwrap();
    let text = std::fs::read_to_string(dir.path().join("dm_nucleon.csv")).unwrap();
    let lines: Vec<&str> = text.lines().collect();
    assert_eq!(lines[0], "curve,source,cl,interaction,m_dm_gev,sigma_cm2");
    assert_eq!(lines.len(), 3, "{text}");
    // σ_SI = 6.9718×10⁻⁴¹ cm² (g_q g_DM/0.25)² (1 TeV/M)⁴ (μ_nχ/1 GeV)²
    // (REFERENCES.md §4, Boveia et al. arXiv:1603.04156; prefactor computed
    // there), μ_nχ with the proton mass 0.938272 GeV (PDG 2024).
    let m_p = 0.938_272_088_16;
    for (line, (m_med, m_dm)) in lines[1..]
        .iter()
        .zip([(1000.0f64, 1000.0f64), (2000.0, 10.0)])
    {
        let cells: Vec<&str> = line.split(',').collect();
        assert_eq!(&cells[1..4], ["collider", "0.95", "SI"]);
        assert_eq!(cells[4].parse::<f64>().unwrap(), m_dm);
        let mu = m_p * m_dm / (m_p + m_dm);
        let expected = 6.9718e-41 * (1000.0 / m_med).powi(4) * mu * mu;
        let got: f64 = cells[5].parse().unwrap();
        assert!((got / expected - 1.0).abs() < 1e-4, "{got} vs {expected}");
    }
    assert!(dir.path().join("exclusion.svg").exists());
    assert!(dir.path().join("dm_nucleon_SI.svg").exists());
}

#[test]
fn axial_mediator_gives_proton_and_neutron_sd_curves() {
    let dir = tempfile::tempdir().unwrap();
    let plan = plan_in(dir.path(), "axial", "[dm_nucleon]\nfigures = false\n");
    let products = PlanProducts::new(&plan).unwrap();
    let contours = vec![Contour {
        level: ContourLevel::Expected,
        segments: vec![vec![[1000.0, 1000.0]]],
    }];
    products
        .write(&plan, &[row(1000.0, 1.0)], &contours, dir.path())
        .unwrap();
    let text = std::fs::read_to_string(dir.path().join("dm_nucleon.csv")).unwrap();
    // σ_SD = 2.3797×10⁻⁴² cm² × (μ/1 GeV)² at M = 1 TeV with Δu+Δd+Δs =
    // 0.32 (REFERENCES.md §4, computed there), for the proton.
    let m_p = 0.938_272_088_16;
    let mu = m_p * 1000.0 / (m_p + 1000.0);
    let sd_p: f64 = text
        .lines()
        .find(|l| l.contains(",SD-p,"))
        .and_then(|l| l.rsplit(',').next())
        .unwrap()
        .parse()
        .unwrap();
    assert!((sd_p / (2.3797e-42 * mu * mu) - 1.0).abs() < 1e-3, "{sd_p}");
    assert!(text.lines().any(|l| l.contains(",SD-n,")), "{text}");
    assert!(
        !dir.path().join("exclusion.svg").exists(),
        "figures = false"
    );
}

#[test]
fn pseudoscalar_gives_no_collider_curve_and_says_why() {
    let dir = tempfile::tempdir().unwrap();
    let plan = plan_in(
        dir.path(),
        "pseudoscalar",
        "[dm_nucleon]\nfigures = false\n",
    );
    let products = PlanProducts::new(&plan).unwrap();
    let contours = vec![Contour {
        level: ContourLevel::Observed,
        segments: vec![vec![[1000.0, 100.0]]],
    }];
    let w = products
        .write(&plan, &[row(1000.0, 1.0)], &contours, dir.path())
        .unwrap();
    assert!(w.iter().any(|w| w.contains("momentum-suppressed")), "{w:?}");
    let text = std::fs::read_to_string(dir.path().join("dm_nucleon.csv")).unwrap();
    assert_eq!(text.lines().count(), 1, "header only: {text}");
}

#[test]
fn imported_curves_are_carried_over_and_bad_names_refused() {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(
        dir.path().join("ext.csv"),
        "m_dm_gev,sigma_cm2\n10,1e-45\n100,2e-46\n",
    )
    .unwrap();
    let plan = plan_in(
        dir.path(),
        "vector",
        "[dm_nucleon]\nfigures = false\n[[imported]]\nfile = \"ext.csv\"\nlabel = \"external\"\ncl = 0.9\ninteraction = \"SI\"\n",
    );
    let products = PlanProducts::new(&plan).unwrap();
    products
        .write(&plan, &[row(1000.0, 1.0)], &[], dir.path())
        .unwrap();
    let text = std::fs::read_to_string(dir.path().join("dm_nucleon.csv")).unwrap();
    let ext: Vec<Vec<&str>> = text
        .lines()
        .filter(|l| l.starts_with("external,"))
        .map(|l| l.split(',').collect())
        .collect();
    assert_eq!(ext.len(), 2, "{text}");
    assert_eq!(&ext[0][1..5], ["imported", "0.9", "SI", "10"]);
    assert_eq!(ext[0][5].parse::<f64>().unwrap(), 1e-45);

    let dir = tempfile::tempdir().unwrap();
    let plan = plan_in(
        dir.path(),
        "vector",
        "[dm_nucleon]\nnucleon_params = \"nonsense\"\n",
    );
    let msg = PlanProducts::new(&plan).unwrap_err().to_string();
    assert!(msg.contains("nonsense"), "{msg}");
}
