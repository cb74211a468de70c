//! Test events for the detector tests and benchmark: particle lines, an
//! event with two incoming gluons, and signal-like events (1–3 partons,
//! sometimes a lepton or photon, two invisible particles) built from a
//! deterministic stream. Test data only, never check values.

#![allow(dead_code)]

use recoil::events::{Event, Particle};
use recoil::kinematics::P4;

/// A particle line with the given id, status and four-momentum.
pub fn particle(id: i32, status: i32, p4: P4) -> Particle {
    Particle {
        id,
        status,
        mothers: [0, 0],
        colour: [0, 0],
        p4,
        mass_gev: p4.m().max(0.0),
        lifetime_mm: 0.0,
        spin: 9.0,
    }
}

/// An event with two incoming gluons along the beam and the given
/// final-state particles.
pub fn event(finals: &[(i32, P4)]) -> Event {
    let mut particles = vec![
        particle(21, -1, P4::new(3000.0, 0.0, 0.0, 3000.0)),
        particle(21, -1, P4::new(2000.0, 0.0, 0.0, -2000.0)),
    ];
    particles.extend(finals.iter().map(|&(id, p4)| particle(id, 1, p4)));
    Event {
        weight: 0.5,
        weights: vec![0.5, 0.6, 0.4],
        particles,
        ..Event::default()
    }
}

/// A deterministic stream of pseudo-random numbers for building test events
/// (a 64-bit LCG, Knuth MMIX constants; test data only).
pub struct TestStream(pub u64);
impl TestStream {
    pub fn next(&mut self) -> f64 {
        self.0 = self
            .0
            .wrapping_mul(6_364_136_223_846_793_005)
            .wrapping_add(1_442_695_040_888_963_407);
        (self.0 >> 11) as f64 / (1u64 << 53) as f64
    }
}

/// A signal-like event: 1–3 partons (one may be a b or c), sometimes a
/// lepton or photon, and two invisible particles balancing the visible pT.
pub fn signal_like(s: &mut TestStream) -> Event {
    let mut finals = Vec::new();
    let n_partons = 1 + (s.next() * 3.0) as usize;
    for _ in 0..n_partons {
        let id = [21, 1, 2, 5, 4][(s.next() * 5.0) as usize];
        let p4 = P4::from_pt_eta_phi_m(
            30.0 + 400.0 * s.next(),
            5.0 * s.next() - 2.5,
            std::f64::consts::TAU * s.next() - std::f64::consts::PI,
            0.0,
        );
        finals.push((id, p4));
    }
    if s.next() < 0.3 {
        let id = [11, -11, 13, -13, 22, 15][(s.next() * 6.0) as usize];
        finals.push((
            id,
            P4::from_pt_eta_phi_m(
                5.0 + 100.0 * s.next(),
                5.0 * s.next() - 2.5,
                6.0 * s.next() - 3.0,
                0.0,
            ),
        ));
    }
    let vis: P4 = finals.iter().map(|f| f.1).sum();
    let f = 0.3 + 0.4 * s.next();
    let chi1 = P4::new(0.0, -f * vis.px, -f * vis.py, 100.0 * s.next());
    let chi2 = P4::new(
        0.0,
        -(1.0 - f) * vis.px,
        -(1.0 - f) * vis.py,
        -100.0 * s.next(),
    );
    for chi in [chi1, chi2] {
        let p4 = P4::from_p3_m(chi.p3(), 50.0);
        finals.push((52, p4));
    }
    event(&finals)
}
