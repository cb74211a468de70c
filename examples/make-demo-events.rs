//! Writes the demo event files in `demo-events/`: an INVENTED hidden-sector
//! scenario, the "Tenebris vector portal" (a Dirac fermion χ, PDG id 52,
//! and a spin-1 vector mediator, PDG id 55, coupling to quarks), for
//! p p → mediator (→ χχ̄) + jet at √s = 13.6 TeV.
//!
//! ```text
//! cargo run --release --example make-demo-events [-- OUTPUT_DIR]
//! ```
//!
//! The events are shaped to look like parton-level samples (a falling
//! leading-jet pT spectrum above 150 GeV, the mediator line shape with the
//! width of [`recoil::model::Mediator`], harder missing momentum for heavier
//! mediators, suppressed off-shell rates) but come from a hand-made sampler,
//! not from matrix elements and parton densities. The cross-sections and
//! the scale-variation weights are invented. They exist to exercise and
//! demonstrate the tool chain; they are no physics prediction.
//!
//! Reproducible byte for byte: a fixed seed, one generator per grid point
//! seeded from (seed, point index), momenta rounded to 1 MeV, gzip with a
//! zero time stamp.

use flate2::{Compression, GzBuilder};
use rand::{RngExt, SeedableRng};
use rand_distr::StandardNormal;
use rand_pcg::Pcg64Mcg;
use recoil::kinematics::{P4, two_body_momentum};
use recoil::model::{Channel, Couplings, Mediator, MediatorKind};
use std::f64::consts::PI;
use std::io::Write;
use std::path::{Path, PathBuf};

/// Name of the invented scenario, used in file names.
const MODEL: &str = "tenebris";
/// Global seed of the demo sample.
const SEED: u64 = 20_261_202;
/// Events per grid point.
const N_EVENTS: usize = 5000;
/// Beam energy [GeV] (√s = 13.6 TeV).
const E_BEAM_GEV: f64 = 6800.0;
/// Generator-level cut on the jet pT [GeV].
const PT_MIN_GEV: f64 = 150.0;
/// Mediator masses [GeV].
const M_MED_GEV: [f64; 6] = [500.0, 1000.0, 1500.0, 2000.0, 2500.0, 3000.0];
/// DM masses [GeV].
const M_DM_GEV: [f64; 5] = [1.0, 200.0, 400.0, 800.0, 1200.0];
/// Reference couplings (the common benchmark choice, arXiv:1603.04156).
const G_Q: f64 = 0.25;
const G_DM: f64 = 1.0;
/// Half-width of the on-shell line-shape window, in units of Γ.
const WINDOW_WIDTHS: f64 = 10.0;
/// Upper reach of the off-shell continuum above threshold [GeV].
const OFF_SHELL_REACH_GEV: f64 = 3000.0;
/// Points of the line-shape table.
const N_TABLE: usize = 4096;
/// PDG ids.
const ID_DM: i32 = 52;
const ID_MED: i32 = 55;
/// Names and (μ_R, μ_F) factors of the scale-variation weights.
const SCALE_VARIATIONS: [(&str, f64, f64); 7] = [
    ("central", 1.0, 1.0),
    ("mur0.5_muf0.5", 0.5, 0.5),
    ("mur0.5_muf1", 0.5, 1.0),
    ("mur1_muf0.5", 1.0, 0.5),
    ("mur1_muf2", 1.0, 2.0),
    ("mur2_muf1", 2.0, 1.0),
    ("mur2_muf2", 2.0, 2.0),
];

/// INVENTED production cross-section of the mediator at invariant mass m,
/// after the generator-level jet cut, for g_q = 0.25 [fb]: σ ∝ exp(−2.5 m/TeV),
/// 45 fb at 2 TeV. Chosen so that M = 2 TeV with light DM gives O(20 fb),
/// near the reach of a 300 fb⁻¹ jet + p_T^miss search (from memory of the
/// trade's benchmark plots; no source).
fn sigma_prod_fb(m_gev: f64) -> f64 {
    45.0 * (-2.5 * (m_gev - 2000.0) / 1000.0).exp() * (G_Q / 0.25).powi(2)
}

/// Splits (seed, index) into an independent seed (SplitMix64 finaliser).
fn mix_seed(seed: u64, index: u64) -> u64 {
    let mut z = seed ^ index.wrapping_mul(0x9E37_79B9_7F4A_7C15);
    z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
    z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
    z ^ (z >> 31)
}

/// The mediator line shape dσ/dt in t = arctan((m² − M²)/(MΓ)), tabulated
/// on a uniform grid, with its integral (the cross-section) and an inverse
/// cumulative table for sampling m.
struct LineShape {
    m_med: f64,
    width: f64,
    t: Vec<f64>,
    cdf: Vec<f64>,
    sigma_fb: f64,
}

impl LineShape {
    /// dσ/dm² = σ_prod(m) · (1/π) · m Γ_χ(m) / ((m² − M²)² + M²Γ²), which
    /// gives σ_prod(M) · BR(χχ̄) in the narrow-width limit and
    /// ∝ g_q² g_DM² off shell; in t it is σ_prod(m) m Γ_χ(m)/(π M Γ).
    fn new(med: &Mediator) -> Self {
        let m_med = med.m_med_gev();
        let width = med.total_width_gev();
        let thr = 2.0 * med.m_dm_gev();
        let (lo, hi) = if med.is_on_shell() {
            (
                (m_med - WINDOW_WIDTHS * width).max(thr),
                m_med + WINDOW_WIDTHS * width,
            )
        } else {
            (thr, thr + OFF_SHELL_REACH_GEV)
        };
        let to_t = |m: f64| ((m * m - m_med * m_med) / (m_med * width)).atan();
        let (t_lo, t_hi) = (to_t(lo), to_t(hi));
        let density = |t: f64| {
            let m = Self::mass_at(m_med, width, t);
            sigma_prod_fb(m) * m * med.partial_width_at_gev(Channel::DarkMatter, m)
                / (PI * m_med * width)
        };
        let t: Vec<f64> = (0..N_TABLE)
            .map(|i| t_lo + (t_hi - t_lo) * i as f64 / (N_TABLE - 1) as f64)
            .collect();
        let f: Vec<f64> = t.iter().map(|&x| density(x)).collect();
        let mut cdf = vec![0.0; N_TABLE];
        for i in 1..N_TABLE {
            cdf[i] = cdf[i - 1] + 0.5 * (f[i] + f[i - 1]) * (t[i] - t[i - 1]);
        }
        let sigma_fb = cdf[N_TABLE - 1];
        Self {
            m_med,
            width,
            t,
            cdf,
            sigma_fb,
        }
    }

    fn mass_at(m_med: f64, width: f64, t: f64) -> f64 {
        (m_med * m_med + m_med * width * t.tan()).max(0.0).sqrt()
    }

    /// Samples m [GeV] by inverting the tabulated cumulative distribution.
    fn sample(&self, u: f64) -> f64 {
        let target = u * self.sigma_fb;
        let i = self
            .cdf
            .partition_point(|&c| c < target)
            .clamp(1, N_TABLE - 1);
        let (c0, c1) = (self.cdf[i - 1], self.cdf[i]);
        let frac = if c1 > c0 {
            (target - c0) / (c1 - c0)
        } else {
            0.5
        };
        let t = self.t[i - 1] + frac * (self.t[i] - self.t[i - 1]);
        Self::mass_at(self.m_med, self.width, t)
    }
}

/// Momentum components in integer MeV.
#[derive(Clone, Copy, Default)]
struct Mev {
    e: i64,
    px: i64,
    py: i64,
    pz: i64,
}

impl Mev {
    fn gev(self) -> [f64; 4] {
        [
            self.px as f64 / 1000.0,
            self.py as f64 / 1000.0,
            self.pz as f64 / 1000.0,
            self.e as f64 / 1000.0,
        ]
    }
}

fn to_mev(x_gev: f64) -> i64 {
    (x_gev * 1000.0).round() as i64
}

/// Energy [MeV] of a particle with momentum (px, py, pz) [MeV] and mass [GeV].
fn energy_mev(px: i64, py: i64, pz: i64, m_gev: f64) -> i64 {
    let p2 = (px * px + py * py + pz * pz) as f64;
    (p2 + (m_gev * 1000.0).powi(2)).sqrt().round() as i64
}

/// Samples one event at the grid point; `None` when the sampled kinematics
/// is outside the beams' reach (the caller retries).
fn sample_kinematics(rng: &mut Pcg64Mcg, med: &Mediator, m_gev: f64) -> Option<(P4, P4, P4)> {
    // Falling jet-pT spectrum (pT + a)^−6 above the cut, harder for heavier m.
    let a = 0.35 * m_gev + 60.0;
    let u: f64 = rng.random();
    let pt = (PT_MIN_GEV + a) * (1.0 - u).powf(-1.0 / 5.0) - a;
    if pt > 4000.0 {
        return None;
    }
    let sigma_y = 1.3 * (1.0 - 0.45 * (m_gev / 3000.0).min(1.5));
    let y_med: f64 = sigma_y * rng.sample::<f64, _>(StandardNormal);
    let y_jet: f64 = y_med + 1.1 * rng.sample::<f64, _>(StandardNormal);
    let phi: f64 = rng.random_range(-PI..PI);
    let mt = (m_gev * m_gev + pt * pt).sqrt();
    let med_p4 = P4::new(
        mt * y_med.cosh(),
        pt * phi.cos(),
        pt * phi.sin(),
        mt * y_med.sinh(),
    );
    let jet = P4::new(
        pt * y_jet.cosh(),
        -pt * phi.cos(),
        -pt * phi.sin(),
        pt * y_jet.sinh(),
    );
    let tot = med_p4 + jet;
    let x1 = (tot.e + tot.pz) / (2.0 * E_BEAM_GEV);
    let x2 = (tot.e - tot.pz) / (2.0 * E_BEAM_GEV);
    if !(x1 < 1.0 && x2 < 1.0) {
        return None;
    }
    // Parton-density-like suppression of large momentum fractions.
    let keep = ((1.0 - x1) * (1.0 - x2)).powi(3);
    if rng.random::<f64>() > keep {
        return None;
    }
    // Isotropic decay in the mediator frame.
    let m_dm = med.m_dm_gev();
    let p_star = two_body_momentum(m_gev, m_dm, m_dm);
    let cos_t: f64 = rng.random_range(-1.0..1.0);
    let sin_t = (1.0 - cos_t * cos_t).max(0.0).sqrt();
    let phi_d: f64 = rng.random_range(-PI..PI);
    let chi_rest = P4::new(
        (p_star * p_star + m_dm * m_dm).sqrt(),
        p_star * sin_t * phi_d.cos(),
        p_star * sin_t * phi_d.sin(),
        p_star * cos_t,
    );
    let chi = chi_rest.boost(med_p4.beta());
    Some((jet, med_p4, chi))
}

/// χ and χ̄ momenta [MeV] near (c, −jet − c) with E_tot + pz_tot even;
/// `None` when no shift of at most 3 MeV achieves it (the caller resamples).
fn chi_pair_with_even_sum(j: &Mev, c: [i64; 3], bz: i64, m_dm: f64) -> Option<(Mev, Mev)> {
    for dx in [0, 1, -1, 2, -2, 3] {
        for dz in [0, 1, -1, 2, -2, 3] {
            let (x1, y1, z1) = (c[0] + dx, c[1], c[2]);
            let (x2, y2, z2) = (-j.px - x1, -j.py - y1, bz + dz);
            let c1 = Mev {
                e: energy_mev(x1, y1, z1, m_dm),
                px: x1,
                py: y1,
                pz: z1,
            };
            let c2 = Mev {
                e: energy_mev(x2, y2, z2, m_dm),
                px: x2,
                py: y2,
                pz: z2,
            };
            if (j.e + c1.e + c2.e + j.pz + z1 + z2) % 2 == 0 {
                return Some((c1, c2));
            }
        }
    }
    None
}

fn generate_event(
    rng: &mut Pcg64Mcg,
    med: &Mediator,
    shape: &LineShape,
    xsec_pb: f64,
) -> lhef::HEPEUP {
    let m_dm = med.m_dm_gev();
    let (m_gev, jet, j, c1, c2) = loop {
        let m = shape.sample(rng.random());
        let Some((jet, med_p4, chi)) = sample_kinematics(rng, med, m) else {
            continue;
        };
        let chibar = med_p4 - chi;
        // Integer-MeV momenta with exact conservation.
        let (jx, jy, jz) = (to_mev(jet.px), to_mev(jet.py), to_mev(jet.pz));
        let j = Mev {
            e: energy_mev(jx, jy, jz, 0.0),
            px: jx,
            py: jy,
            pz: jz,
        };
        let c = [to_mev(chi.px), to_mev(chi.py), to_mev(chi.pz)];
        // Move χ and χ̄ by a few MeV (keeping the transverse balance) until
        // E_tot + pz_tot is even, so the incoming momenta are whole MeV and
        // four-momentum is conserved exactly.
        if let Some((c1, c2)) = chi_pair_with_even_sum(&j, c, to_mev(chibar.pz), m_dm) {
            break (m, jet, j, c1, c2);
        }
    };
    let v = Mev {
        e: c1.e + c2.e,
        px: c1.px + c2.px,
        py: c1.py + c2.py,
        pz: c1.pz + c2.pz,
    };
    let (e_tot, pz_tot) = (j.e + v.e, j.pz + v.pz);
    let ea = (e_tot + pz_tot) / 2;
    let eb = (e_tot - pz_tot) / 2;
    let pa = Mev {
        e: ea,
        px: 0,
        py: 0,
        pz: ea,
    };
    let pb = Mev {
        e: eb,
        px: 0,
        py: 0,
        pz: -eb,
    };

    // Flavours and colour flow: q g → q V (65 %) or q q̄ → g V (35 %).
    let flavour_u: f64 = rng.random();
    let q = match flavour_u {
        x if x < 0.45 => 2,
        x if x < 0.75 => 1,
        x if x < 0.85 => 3,
        x if x < 0.93 => 4,
        _ => 5,
    };
    let swap = rng.random::<bool>();
    let (ids, cols): ([i32; 3], [[i32; 2]; 3]) = if rng.random::<f64>() < 0.65 {
        let anti = rng.random::<f64>() < 0.3;
        let qid = if anti { -q } else { q };
        let (cq, cg, cout) = if anti {
            ([0, 501], [501, 502], [0, 502])
        } else {
            ([501, 0], [502, 501], [502, 0])
        };
        if swap {
            ([21, qid, qid], [cg, cq, cout])
        } else {
            ([qid, 21, qid], [cq, cg, cout])
        }
    } else if swap {
        ([-q, q, 21], [[0, 502], [501, 0], [501, 502]])
    } else {
        ([q, -q, 21], [[501, 0], [0, 502], [501, 502]])
    };

    let mu0 = 0.5 * ((m_gev * m_gev + jet.pt2()).sqrt() + jet.pt());
    let scale = (mu0 * 100.0).round() / 100.0;
    // One-loop α_s(μ0) with five flavours from α_s(m_Z) = 0.118.
    let b0 = (33.0 - 10.0) / (12.0 * PI);
    let alpha_s = 0.118 / (1.0 + 0.118 * b0 * (mu0 * mu0 / (91.1876f64 * 91.1876)).ln());
    let alpha_s = (alpha_s * 1e4).round() / 1e4;

    // INVENTED smooth pT-dependent scale-variation factors.
    let l = (jet.pt() / PT_MIN_GEV).ln();
    let mut info = String::from("<rwgt>\n");
    for (name, kr, kf) in SCALE_VARIATIONS {
        let f_r = 1.0 - kr.log2() * (0.10 + 0.03 * l);
        let f_f = 1.0 + kf.log2() * (0.03 - 0.02 * l);
        info.push_str(&format!(
            "<wgt id='{name}'> {:.3e} </wgt>\n",
            xsec_pb * f_r * f_f
        ));
    }
    info.push_str("</rwgt>");

    let m_mev = (m_gev * 1000.0).round() / 1000.0;
    let moms = [pa, pb, j, v, c1, c2];
    let masses = [0.0, 0.0, 0.0, m_mev, m_dm, m_dm];
    let pup: Vec<[f64; 5]> = moms
        .iter()
        .zip(masses)
        .map(|(p, m)| {
            let g = p.gev();
            [g[0], g[1], g[2], g[3], m]
        })
        .collect();
    lhef::HEPEUP {
        NUP: 6,
        IDRUP: 1,
        XWGTUP: xsec_pb,
        SCALUP: scale,
        AQEDUP: 0.007_547,
        AQCDUP: alpha_s,
        IDUP: vec![ids[0], ids[1], ids[2], ID_MED, ID_DM, -ID_DM],
        ISTUP: vec![-1, -1, 1, 2, 1, 1],
        MOTHUP: vec![[0, 0], [0, 0], [1, 2], [1, 2], [4, 4], [4, 4]],
        ICOLUP: vec![cols[0], cols[1], cols[2], [0, 0], [0, 0], [0, 0]],
        PUP: pup,
        VTIMUP: vec![0.0; 6],
        SPINUP: vec![9.0; 6],
        info,
        attr: lhef::XmlAttr::new(),
    }
}

fn header_text(med: &Mediator, xsec_pb: f64) -> String {
    format!(
        "INVENTED demo sample, not a physics prediction.\n\
         Scenario: Tenebris vector portal (invented hidden-sector model): Dirac fermion chi \
         (PDG 52), vector mediator (PDG 55) with universal quark coupling.\n\
         Process: p p -> mediator(-> chi chibar) + jet at sqrt(s) = 13.6 TeV, jet pT > {PT_MIN_GEV} GeV.\n\
         M_med = {} GeV, m_chi = {} GeV, g_q = {G_Q}, g_DM = {G_DM}, Gamma = {:.6e} GeV, \
         Gamma/M = {:.6e}, BR(chi chibar) = {:.6e}.\n\
         Invented cross-section {:.6e} pb; IDWTUP = 3, every XWGTUP equals XSECUP (pb).\n\
         Scale-variation weights are an invented smooth pT-dependent factor.\n\
         Written by: cargo run --release --example make-demo-events (seed {SEED}).",
        med.m_med_gev(),
        med.m_dm_gev(),
        med.total_width_gev(),
        med.width_over_mass(),
        med.br_dm(),
        xsec_pb
    )
}

fn initrwgt_xml() -> String {
    let mut s =
        String::from("<initrwgt>\n<weightgroup name='scale_variation' combine='envelope'>\n");
    for (name, kr, kf) in SCALE_VARIATIONS {
        s.push_str(&format!(
            "<weight id='{name}'> muR={kr} muF={kf} </weight>\n"
        ));
    }
    s.push_str("</weightgroup>\n</initrwgt>");
    s
}

/// Writes one grid point's file atomically; returns the cross-section [pb].
fn write_point(dir: &Path, index: u64, m_med: f64, m_dm: f64) -> anyhow::Result<(String, f64)> {
    let couplings = Couplings::new(G_Q, G_DM)?;
    let med = Mediator::new(MediatorKind::Vector, m_med, m_dm, couplings)?;
    let shape = LineShape::new(&med);
    // Cross-section in pb, rounded to 6 significant digits.
    let xsec_pb = {
        let x = shape.sigma_fb / 1000.0;
        let digits = 5 - x.log10().floor() as i32;
        (x * 10f64.powi(digits)).round() / 10f64.powi(digits)
    };
    let name = format!("{MODEL}_mmed{m_med}_mdm{m_dm}.lhe.gz");
    let path = dir.join(&name);
    let tmp = dir.join(format!(".{name}.tmp"));
    {
        let mut w = lhef::Writer::new(Vec::new(), "3.0")?;
        w.header(&header_text(&med, xsec_pb))?;
        let xml = lhef::XmlTree {
            prefix: None,
            namespace: None,
            namespaces: None,
            name: "header".to_string(),
            attributes: Default::default(),
            children: vec![],
            text: Some(initrwgt_xml()),
        };
        w.xml_header(&xml)?;
        w.heprup(&lhef::HEPRUP {
            IDBMUP: [2212, 2212],
            EBMUP: [E_BEAM_GEV, E_BEAM_GEV],
            PDFGUP: [0, 0],
            PDFSUP: [0, 0],
            IDWTUP: 3,
            NPRUP: 1,
            XSECUP: vec![xsec_pb],
            XERRUP: vec![0.0],
            XMAXUP: vec![xsec_pb],
            LPRUP: vec![1],
            info: "<generator name='make-demo-events' version='0.1.0'>invented demo sampler</generator>"
                .to_string(),
            attr: lhef::XmlAttr::new(),
        })?;
        let mut rng = Pcg64Mcg::seed_from_u64(mix_seed(SEED, index));
        for _ in 0..N_EVENTS {
            let ev = generate_event(&mut rng, &med, &shape, xsec_pb);
            w.hepeup(&ev)?;
        }
        w.finish()?;
        let text = w.into_inner();
        let file = std::fs::File::create(&tmp)?;
        let mut gz = GzBuilder::new().mtime(0).write(file, Compression::best());
        gz.write_all(&text)?;
        gz.finish()?.sync_all()?;
    }
    std::fs::rename(&tmp, &path)?;
    Ok((name, xsec_pb))
}

fn main() -> anyhow::Result<()> {
    let dir: PathBuf = std::env::args_os()
        .nth(1)
        .map(PathBuf::from)
        .unwrap_or_else(|| PathBuf::from("demo-events"));
    std::fs::create_dir_all(&dir)?;
    let mut csv = String::from("file,m_med_gev,m_dm_gev,g_q,g_dm,xsec_pb\n");
    let mut index = 0u64;
    for &m_med in &M_MED_GEV {
        for &m_dm in &M_DM_GEV {
            let (name, xsec_pb) = write_point(&dir, index, m_med, m_dm)?;
            csv.push_str(&format!("{name},{m_med},{m_dm},{G_Q},{G_DM},{xsec_pb}\n"));
            eprintln!("{name}: {xsec_pb:.4e} pb");
            index += 1;
        }
    }
    let tmp = dir.join(".points.csv.tmp");
    std::fs::write(&tmp, csv)?;
    std::fs::rename(&tmp, dir.join("points.csv"))?;
    Ok(())
}
