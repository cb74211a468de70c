//! The committed demo event files (`demo-events/`) parse with the `lhef`
//! crate's reader, conserve four-momentum in every event, carry the
//! scale-variation weights they announce and match `points.csv`.
//!
//! The files are invented (see `demo-events/README.md`); these tests check
//! the format and the kinematic invariants, not physics values.

use flate2::read::GzDecoder;
use std::collections::BTreeSet;
use std::io::BufReader;
use std::path::{Path, PathBuf};

/// Largest allowed |Σ p_in − Σ p_out| per component [GeV]: the momenta are
/// whole MeV and balance exactly, so only floating-point rounding of the
/// decimal values remains (≈ 10⁻¹² GeV). Common practice, no source.
const CONSERVATION_TOL_GEV: f64 = 1e-6;

/// Names of the scale-variation weights the generator announces.
const WEIGHT_IDS: [&str; 7] = [
    "central",
    "mur0.5_muf0.5",
    "mur0.5_muf1",
    "mur1_muf0.5",
    "mur1_muf2",
    "mur2_muf1",
    "mur2_muf2",
];

struct Point {
    file: String,
    m_med_gev: f64,
    m_dm_gev: f64,
    xsec_pb: f64,
}

fn demo_dir() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("demo-events")
}

fn points() -> Vec<Point> {
    let mut rdr = csv::Reader::from_path(demo_dir().join("points.csv")).expect("points.csv");
    assert_eq!(
        rdr.headers().expect("header").iter().collect::<Vec<_>>(),
        ["file", "m_med_gev", "m_dm_gev", "g_q", "g_dm", "xsec_pb"]
    );
    rdr.records()
        .map(|r| {
            let r = r.expect("record");
            let num = |i: usize| r[i].parse::<f64>().expect("number");
            assert_eq!((num(3), num(4)), (0.25, 1.0), "reference couplings");
            Point {
                file: r[0].to_string(),
                m_med_gev: num(1),
                m_dm_gev: num(2),
                xsec_pb: num(5),
            }
        })
        .collect()
}

#[test]
fn grid_is_full_and_rectangular() {
    let pts = points();
    let meds: BTreeSet<u64> = pts.iter().map(|p| p.m_med_gev as u64).collect();
    let dms: BTreeSet<u64> = pts.iter().map(|p| p.m_dm_gev as u64).collect();
    assert_eq!(
        meds.into_iter().collect::<Vec<_>>(),
        [500, 1000, 1500, 2000, 2500, 3000]
    );
    assert_eq!(
        dms.into_iter().collect::<Vec<_>>(),
        [1, 200, 400, 800, 1200]
    );
    assert_eq!(pts.len(), 30);
    let total: u64 = pts
        .iter()
        .map(|p| {
            std::fs::metadata(demo_dir().join(&p.file))
                .expect("file")
                .len()
        })
        .sum();
    assert!(
        total <= 25_000_000,
        "demo files are {total} bytes, limit 25 MB"
    );
}

#[test]
fn off_shell_points_are_suppressed() {
    // Invariant of the scenario: at fixed M the rate falls by more than an
    // order of magnitude once 2 m_χ > M (common practice, no source).
    let pts = points();
    for on in pts.iter().filter(|p| p.m_dm_gev == 1.0) {
        for off in pts
            .iter()
            .filter(|p| p.m_med_gev == on.m_med_gev && 2.0 * p.m_dm_gev > p.m_med_gev)
        {
            assert!(
                off.xsec_pb < 0.1 * on.xsec_pb,
                "{}: {} pb vs on-shell {} pb",
                off.file,
                off.xsec_pb,
                on.xsec_pb
            );
        }
    }
}

fn wgt_ids(info: &str) -> Vec<&str> {
    info.match_indices("<wgt id='")
        .filter_map(|(i, m)| {
            let rest = &info[i + m.len()..];
            rest.find('\'').map(|end| &rest[..end])
        })
        .collect()
}

#[test]
fn every_event_parses_and_conserves_four_momentum() {
    for p in points() {
        let path = demo_dir().join(&p.file);
        let file = std::fs::File::open(&path).expect("open demo file");
        let mut reader = lhef::Reader::new(BufReader::new(GzDecoder::new(BufReader::new(file))))
            .unwrap_or_else(|e| panic!("{}: {e}", p.file));
        assert_eq!(reader.version(), "3.0", "{}", p.file);
        let run = reader.heprup().clone();
        assert_eq!(run.IDBMUP, [2212, 2212]);
        assert_eq!(run.EBMUP, [6800.0, 6800.0], "√s = 13.6 TeV");
        assert_eq!(run.IDWTUP, 3);
        assert_eq!(
            run.XSECUP,
            vec![p.xsec_pb],
            "{}: XSECUP vs points.csv",
            p.file
        );
        // The parsed <initrwgt> tree, through its Debug form (the xml tree
        // type belongs to the reader's own dependency).
        let header = format!("{:?}", reader.xml_header());
        assert!(header.contains("initrwgt"), "{}: no <initrwgt>", p.file);
        for id in WEIGHT_IDS {
            assert!(
                header.contains(&format!("{{\"id\": \"{id}\"}}")),
                "{}: weight {id} not announced",
                p.file
            );
        }
        let mut n = 0usize;
        while let Some(ev) = reader
            .hepeup()
            .unwrap_or_else(|e| panic!("{}: event {}: {e}", p.file, n + 1))
        {
            n += 1;
            assert_eq!(ev.NUP, 6, "{}: event {n}", p.file);
            assert_eq!(ev.XWGTUP, p.xsec_pb, "{}: event {n}", p.file);
            let mut balance = [0.0f64; 4];
            for (i, (&status, pup)) in ev.ISTUP.iter().zip(&ev.PUP).enumerate() {
                let sign = match status {
                    -1 => -1.0,
                    1 => 1.0,
                    2 => 0.0,
                    s => panic!("{}: event {n}: particle {i}: status {s}", p.file),
                };
                for (b, x) in balance.iter_mut().zip(&pup[..4]) {
                    *b += sign * x;
                }
                if status == -1 {
                    assert_eq!((pup[0], pup[1]), (0.0, 0.0), "incoming along z");
                    assert!(pup[3] <= 6800.0, "parton energy above the beam");
                }
            }
            for (k, b) in balance.iter().enumerate() {
                assert!(
                    b.abs() < CONSERVATION_TOL_GEV,
                    "{}: event {n}: component {k} unbalanced by {b} GeV",
                    p.file
                );
            }
            assert_eq!(&ev.IDUP[3..], [55, 52, -52], "{}: event {n}", p.file);
            assert_eq!(wgt_ids(&ev.info), WEIGHT_IDS, "{}: event {n}", p.file);
            // The χχ̄ pair is above threshold.
            let pair: Vec<f64> = (0..4).map(|k| ev.PUP[4][k] + ev.PUP[5][k]).collect();
            let m2 = pair[3] * pair[3] - pair[0] * pair[0] - pair[1] * pair[1] - pair[2] * pair[2];
            assert!(
                m2.sqrt() >= 2.0 * p.m_dm_gev - 0.01,
                "{}: event {n}",
                p.file
            );
        }
        assert_eq!(n, 5000, "{}", p.file);
    }
}
