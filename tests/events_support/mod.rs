//! Writes LHEF files for the event-reader tests and benchmarks: p p → V
//! (→ χ χ̄) + jet with exact momentum conservation, in the fixed scientific
//! notation of common LHEF writers. Generated data for tests of the reader
//! only (its numbers are never used as physics check values).

#![allow(dead_code)]

use rand::{RngExt, SeedableRng};
use recoil::kinematics::P4;
use std::io::Write;

/// What to write.
#[derive(Debug, Clone)]
pub struct Spec {
    pub version: &'static str,
    pub n_events: usize,
    pub idwtup: i32,
    /// (LPRUP, XSECUP [pb], XERRUP [pb]); events cycle through the processes.
    pub processes: Vec<(i32, f64, f64)>,
    /// Event weight for the first process (others use the same magnitude).
    pub weight: f64,
    /// Every `negative_every`-th event gets a negative weight (0: none).
    pub negative_every: usize,
    /// Names of `<rwgt>` weights declared in `<initrwgt>` (empty: none).
    pub weight_names: Vec<String>,
    pub seed: u64,
    /// Write `</LesHouchesEvents>` at the end.
    pub end_tag: bool,
}

impl Default for Spec {
    fn default() -> Self {
        Self {
            version: "3.0",
            n_events: 100,
            idwtup: 3,
            processes: vec![(1, 1.25, 0.01)],
            weight: 1.25,
            negative_every: 0,
            weight_names: Vec::new(),
            seed: 7,
            end_tag: true,
        }
    }
}

/// Fixed scientific notation with 10 decimals and a signed two-digit
/// exponent, e.g. `+1.2345678901e+03`.
pub fn sci(v: f64) -> String {
    let s = format!("{:+.10e}", v);
    let (m, e) = s.split_once('e').expect("formatted with an exponent");
    let e: i32 = e.parse().expect("integer exponent");
    format!("{m}e{}{:02}", if e < 0 { '-' } else { '+' }, e.abs())
}

fn two_body(m: f64, m1: f64, m2: f64) -> f64 {
    let l = (m * m - (m1 + m2).powi(2)) * (m * m - (m1 - m2).powi(2));
    l.max(0.0).sqrt() / (2.0 * m)
}

/// (IDUP, ISTUP, MOTHUP, ICOLUP, momentum, mass [GeV]) of one particle line.
type ParticleRow = (i32, i32, [u32; 2], [i32; 2], P4, f64);

/// Writes the file described by `spec` to `out`.
pub fn write_lhef(spec: &Spec, out: &mut impl Write) -> std::io::Result<()> {
    let mut rng = rand_pcg::Pcg64::seed_from_u64(spec.seed);
    writeln!(out, "<LesHouchesEvents version=\"{}\">", spec.version)?;
    writeln!(out, "<header>")?;
    writeln!(out, "<!-- generated for the reader tests -->")?;
    if !spec.weight_names.is_empty() {
        writeln!(out, "<initrwgt>")?;
        writeln!(out, "<weightgroup name='scale'>")?;
        for n in &spec.weight_names {
            writeln!(out, "<weight id='{n}'> variation {n} </weight>")?;
        }
        writeln!(out, "</weightgroup>")?;
        writeln!(out, "</initrwgt>")?;
    }
    writeln!(out, "</header>")?;
    writeln!(out, "<init>")?;
    writeln!(
        out,
        "2212 2212 {} {} 0 0 303600 303600 {} {}",
        sci(6800.0),
        sci(6800.0),
        spec.idwtup,
        spec.processes.len()
    )?;
    for &(id, xs, err) in &spec.processes {
        writeln!(
            out,
            "{} {} {} {id}",
            sci(xs),
            sci(err),
            sci(spec.weight.abs())
        )?;
    }
    writeln!(out, "</init>")?;
    let m_v = 1000.0;
    let m_chi = 10.0;
    for i in 0..spec.n_events {
        let (pid, _, _) = spec.processes[i % spec.processes.len()];
        let mut w = spec.weight;
        if spec.negative_every > 0 && i % spec.negative_every == 0 {
            w = -w;
        }
        // Jet recoiling against the mediator in the transverse plane.
        let u: f64 = rng.random();
        let pt = 100.0 / (1.0 - 0.9 * u); // falling spectrum from 100 GeV
        let phi = (rng.random::<f64>() * 2.0 - 1.0) * std::f64::consts::PI;
        let eta_j = rng.random::<f64>() * 5.0 - 2.5;
        let jet = P4::from_pt_eta_phi_m(pt, eta_j, phi, 0.0);
        let pz_v = (rng.random::<f64>() * 2.0 - 1.0) * 1500.0;
        let v = P4::from_p3_m(nalgebra::Vector3::new(-jet.px, -jet.py, pz_v), m_v);
        // V → χ χ̄ isotropic in the V rest frame.
        let p = two_body(m_v, m_chi, m_chi);
        let ct = rng.random::<f64>() * 2.0 - 1.0;
        let st = (1.0 - ct * ct).sqrt();
        let ph = rng.random::<f64>() * 2.0 * std::f64::consts::PI;
        let d = nalgebra::Vector3::new(p * st * ph.cos(), p * st * ph.sin(), p * ct);
        let c1 = P4::from_p3_m(d, m_chi).boost(v.beta());
        let c2 = P4::from_p3_m(-d, m_chi).boost(v.beta());
        let tot = jet + v;
        let a = P4::new((tot.e + tot.pz) / 2.0, 0.0, 0.0, (tot.e + tot.pz) / 2.0);
        let b = P4::new((tot.e - tot.pz) / 2.0, 0.0, 0.0, -(tot.e - tot.pz) / 2.0);
        writeln!(out, "<event>")?;
        writeln!(
            out,
            " 6 {pid} {} {} {} {}",
            sci(w),
            sci(pt),
            sci(7.546771e-3),
            sci(0.1180)
        )?;
        let lines: [ParticleRow; 6] = [
            (21, -1, [0, 0], [501, 502], a, 0.0),
            (2, -1, [0, 0], [503, 0], b, 0.0),
            (2, 1, [1, 2], [501, 0], jet, 0.0),
            (55, 2, [1, 2], [0, 0], v, m_v),
            (52, 1, [4, 4], [0, 0], c1, m_chi),
            (-52, 1, [4, 4], [0, 0], c2, m_chi),
        ];
        for (id, st, mo, co, p, m) in lines {
            writeln!(
                out,
                "{id:>9} {st:>2} {:>4} {:>4} {:>4} {:>4} {} {} {} {} {} {} {}",
                mo[0],
                mo[1],
                co[0],
                co[1],
                sci(p.px),
                sci(p.py),
                sci(p.pz),
                sci(p.e),
                sci(m),
                sci(0.0),
                sci(9.0)
            )?;
        }
        if !spec.weight_names.is_empty() {
            writeln!(out, "<rwgt>")?;
            for (k, n) in spec.weight_names.iter().enumerate() {
                writeln!(
                    out,
                    "<wgt id='{n}'> {} </wgt>",
                    sci(w * (0.9 + 0.05 * k as f64))
                )?;
            }
            writeln!(out, "</rwgt>")?;
        }
        writeln!(out, "</event>")?;
    }
    if spec.end_tag {
        writeln!(out, "</LesHouchesEvents>")?;
    }
    Ok(())
}

/// The file as a string.
pub fn lhef_string(spec: &Spec) -> String {
    let mut v = Vec::new();
    write_lhef(spec, &mut v).expect("writing to memory");
    String::from_utf8(v).expect("ASCII output")
}

/// gzip-compresses `data`.
pub fn gzip(data: &[u8]) -> Vec<u8> {
    let mut e = flate2::write::GzEncoder::new(Vec::new(), flate2::Compression::fast());
    e.write_all(data).expect("compressing to memory");
    e.finish().expect("compressing to memory")
}
