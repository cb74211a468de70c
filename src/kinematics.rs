//! Four-momenta and the kinematic quantities every later stage is built on.
//!
//! Fed by nothing; the event reader ([`crate::events`]) fills [`P4`] values
//! from particle lines, the detector smears them and the search computes its
//! observables from them. Conventions (common practice at hadron colliders):
//! the beam axis is z, energies and momenta are in GeV, angles in radians,
//! metric signature (+, −, −, −).

use nalgebra::Vector3;
use std::ops::{Add, AddAssign, Neg, Sub, SubAssign};

/// A four-momentum (E, px, py, pz), all in GeV.
#[derive(Debug, Clone, Copy, PartialEq, Default, serde::Serialize, serde::Deserialize)]
pub struct P4 {
    /// Energy E [GeV].
    pub e: f64,
    /// Momentum component along x [GeV].
    pub px: f64,
    /// Momentum component along y [GeV].
    pub py: f64,
    /// Momentum component along the beam axis z [GeV].
    pub pz: f64,
}

/// Pseudorapidity returned for a momentum exactly along the beam axis.
///
/// η diverges for θ → 0, π; a particle with pT = 0 and pz ≠ 0 gets
/// ±`ETA_BEAM_AXIS`, which lies outside every detector acceptance, and a
/// particle at rest gets 0. (Common practice, no source.)
pub const ETA_BEAM_AXIS: f64 = 1.0e10;

impl P4 {
    /// Builds a four-momentum from its components [GeV].
    pub const fn new(e: f64, px: f64, py: f64, pz: f64) -> Self {
        Self { e, px, py, pz }
    }

    /// Builds a four-momentum from transverse momentum, pseudorapidity,
    /// azimuth and mass.
    ///
    /// # Formula
    /// px = pT cos φ, py = pT sin φ, pz = pT sinh η, E = √(|p|² + m²).
    ///
    /// # Units
    /// `pt_gev`, `m_gev` in GeV; `eta` dimensionless; `phi` in radians.
    pub fn from_pt_eta_phi_m(pt_gev: f64, eta: f64, phi: f64, m_gev: f64) -> Self {
        let px = pt_gev * phi.cos();
        let py = pt_gev * phi.sin();
        let pz = pt_gev * eta.sinh();
        let p2 = px * px + py * py + pz * pz;
        Self::new((p2 + m_gev * m_gev).sqrt(), px, py, pz)
    }

    /// Builds a four-momentum from a three-momentum [GeV] and a mass [GeV].
    pub fn from_p3_m(p: Vector3<f64>, m_gev: f64) -> Self {
        Self::new((p.norm_squared() + m_gev * m_gev).sqrt(), p.x, p.y, p.z)
    }

    /// The three-momentum (px, py, pz) [GeV].
    pub fn p3(&self) -> Vector3<f64> {
        Vector3::new(self.px, self.py, self.pz)
    }

    /// Transverse momentum pT = √(px² + py²) [GeV], by
    /// [`transverse_magnitude`].
    pub fn pt(&self) -> f64 {
        transverse_magnitude([self.px, self.py])
    }

    /// Squared transverse momentum pT² [GeV²].
    pub fn pt2(&self) -> f64 {
        self.px * self.px + self.py * self.py
    }

    /// Magnitude of the three-momentum |p| [GeV].
    pub fn p(&self) -> f64 {
        (self.px * self.px + self.py * self.py + self.pz * self.pz).sqrt()
    }

    /// Transverse energy E_T = E · pT/|p| [GeV] (0 for a particle at rest).
    pub fn et(&self) -> f64 {
        let p = self.p();
        if p > 0.0 { self.e * self.pt() / p } else { 0.0 }
    }

    /// Pseudorapidity η = −ln tan(θ/2) = asinh(pz/pT), by
    /// [`abs_eta_of`] with the sign of pz.
    ///
    /// Along the beam axis (pT = 0) it returns ±[`ETA_BEAM_AXIS`] with the
    /// sign of pz, and 0 for a particle at rest.
    pub fn eta(&self) -> f64 {
        let pt = self.pt();
        if pt > 0.0 {
            abs_eta_of(pt, self.pz).copysign(self.pz)
        } else if self.pz > 0.0 {
            ETA_BEAM_AXIS
        } else if self.pz < 0.0 {
            -ETA_BEAM_AXIS
        } else {
            0.0
        }
    }

    /// |η|, the absolute pseudorapidity.
    pub fn abs_eta(&self) -> f64 {
        self.eta().abs()
    }

    /// Rapidity y = ½ ln((E + pz)/(E − pz)).
    ///
    /// Computed as atanh(pz/E); for |pz| ≥ E (a massless particle along the
    /// beam, or rounding) it returns ±∞ with the sign of pz; 0 when E = 0.
    pub fn rapidity(&self) -> f64 {
        if self.e <= 0.0 {
            return 0.0;
        }
        let r = self.pz / self.e;
        if r >= 1.0 {
            f64::INFINITY
        } else if r <= -1.0 {
            f64::NEG_INFINITY
        } else {
            r.atanh()
        }
    }

    /// Azimuth φ = atan2(py, px) in (−π, π] radians (0 when pT = 0).
    pub fn phi(&self) -> f64 {
        let phi = self.py.atan2(self.px);
        // atan2 returns −π for (−0, negative x); map it into (−π, π].
        if phi <= -std::f64::consts::PI {
            std::f64::consts::PI
        } else {
            phi
        }
    }

    /// Invariant mass squared m² = E² − |p|² [GeV²]; negative for a
    /// space-like vector (which rounding can produce for massless inputs).
    pub fn m2(&self) -> f64 {
        self.e * self.e - (self.px * self.px + self.py * self.py + self.pz * self.pz)
    }

    /// Invariant mass m [GeV].
    ///
    /// For a space-like vector (m² < 0, usually rounding of a massless
    /// particle) it returns −√(−m²), the common convention that keeps the
    /// size of the violation visible instead of hiding it as 0 or NaN.
    pub fn m(&self) -> f64 {
        let m2 = self.m2();
        if m2 >= 0.0 { m2.sqrt() } else { -(-m2).sqrt() }
    }

    /// Velocity β = p/E of the frame in which this momentum is at rest.
    /// Returns the zero vector when E = 0.
    pub fn beta(&self) -> Vector3<f64> {
        if self.e == 0.0 {
            Vector3::zeros()
        } else {
            self.p3() / self.e
        }
    }

    /// Lorentz boost by the velocity `beta` (|β| < 1, in units of c).
    ///
    /// # Formula
    /// With γ = 1/√(1 − β²) and the active convention (the result is the
    /// momentum seen by an observer moving with −β):
    /// E' = γ(E + β·p), p' = p + [(γ − 1)(β·p)/β² + γE] β.
    ///
    /// # References
    /// J. D. Jackson, *Classical Electrodynamics*, 3rd ed., Eq. (11.19).
    ///
    /// A boost with |β| ≥ 1 is unphysical; the result then contains
    /// non-finite numbers.
    pub fn boost(&self, beta: Vector3<f64>) -> Self {
        let b2 = beta.norm_squared();
        if b2 == 0.0 {
            return *self;
        }
        let gamma = 1.0 / (1.0 - b2).sqrt();
        let p = self.p3();
        let bp = beta.dot(&p);
        let e = gamma * (self.e + bp);
        let p_new = p + beta * ((gamma - 1.0) * bp / b2 + gamma * self.e);
        Self::new(e, p_new.x, p_new.y, p_new.z)
    }

    /// This momentum seen in the rest frame of `frame` (a time-like P4):
    /// the boost by −β(frame). Boosting a P4 to its own rest frame gives
    /// (m, 0, 0, 0) up to rounding.
    pub fn to_rest_frame_of(&self, frame: &P4) -> Self {
        self.boost(-frame.beta())
    }

    /// Azimuthal separation |Δφ| in [0, π] radians, by
    /// [`delta_phi_between`] of the transverse momenta.
    pub fn delta_phi(&self, other: &P4) -> f64 {
        delta_phi_between([self.px, self.py], [other.px, other.py])
    }

    /// Angular distance ΔR = √(Δη² + Δφ²) using pseudorapidity.
    pub fn delta_r(&self, other: &P4) -> f64 {
        let deta = self.eta() - other.eta();
        let dphi = self.delta_phi(other);
        (deta * deta + dphi * dphi).sqrt()
    }

    /// True when every component is finite.
    pub fn is_finite(&self) -> bool {
        self.e.is_finite() && self.px.is_finite() && self.py.is_finite() && self.pz.is_finite()
    }

    /// Scales all four components by `factor` (for energy smearing at
    /// fixed direction and fixed m/E).
    pub fn scaled(&self, factor: f64) -> Self {
        Self::new(
            self.e * factor,
            self.px * factor,
            self.py * factor,
            self.pz * factor,
        )
    }
}

/// Magnitude √(x² + y²) of a transverse vector [x, y], in the unit of its
/// components (GeV for pT and p_T^miss).
///
/// The plain square root, as in [`P4::p`]: at collider scales the squares
/// neither overflow nor underflow, and `hypot`'s guard against that costs
/// several times a square root on every call (it was 4 % of a recast).
#[inline]
pub fn transverse_magnitude([x, y]: [f64; 2]) -> f64 {
    (x * x + y * y).sqrt()
}

/// The azimuthal angle between two transverse vectors [rad], in [0, π]:
/// |φ_a − φ_b| without computing either azimuth.
///
/// # Formula
/// Δφ = atan2(|a × b|, a · b) with a × b = a_x b_y − a_y b_x and
/// a · b = a_x b_x + a_y b_y (common practice: accurate at every angle,
/// unlike acos of the normalised dot product near 0 and π). A zero vector
/// counts as pointing along +x, as [`P4::phi`] gives it φ = 0.
#[inline]
pub fn delta_phi_between(a: [f64; 2], b: [f64; 2]) -> f64 {
    let along_x = |v: [f64; 2]| if v == [0.0, 0.0] { [1.0, 0.0] } else { v };
    let ([ax, ay], [bx, by]) = (along_x(a), along_x(b));
    (ax * by - ay * bx).abs().atan2(ax * bx + ay * by)
}

/// |η| = asinh(|pz|/pT) of a momentum with transverse momentum `pt` > 0
/// and longitudinal component `pz` (same units).
///
/// # Formula
/// |η| = −ln tan(θ/2) = asinh(|pz|/pT) = ln((|p| + |pz|)/pT) (the
/// definition of pseudorapidity, common practice)
/// = ln_1p((|pz| + pz²/(|p| + pT))/pT), with
/// |p| = √(pT² + pz²) and |p| − pT written as pz²/(|p| + pT) (no
/// cancellation), so that small |η| keep their relative precision. One
/// square root and `ln_1p`: std's `asinh` also calls `hypot`, whose guard
/// against overflow costs several square roots (the squares cannot
/// overflow at collider scales).
#[inline]
pub fn abs_eta_of(pt: f64, pz: f64) -> f64 {
    let apz = pz.abs();
    let p = (pt * pt + apz * apz).sqrt();
    ((apz + apz * apz / (p + pt)) / pt).ln_1p()
}

/// |φ₁ − φ₂| wrapped into [0, π] radians.
pub fn delta_phi(phi1: f64, phi2: f64) -> f64 {
    let two_pi = 2.0 * std::f64::consts::PI;
    let mut d = (phi1 - phi2).abs() % two_pi;
    if d > std::f64::consts::PI {
        d = two_pi - d;
    }
    d
}

/// Momentum of either daughter in the rest frame of a two-body decay
/// M → m₁ m₂.
///
/// # Formula
/// p* = √λ(M², m₁², m₂²) / (2M), with the Källén function
/// λ(a, b, c) = a² + b² + c² − 2ab − 2ac − 2bc.
///
/// # Units
/// All masses and the result in GeV. Returns 0 at or below threshold.
///
/// # References
/// PDG Review of Particle Physics, "Kinematics", Eq. (49.17) (edition 2024).
pub fn two_body_momentum(m_gev: f64, m1_gev: f64, m2_gev: f64) -> f64 {
    if m_gev <= 0.0 {
        return 0.0;
    }
    let l = kallen(m_gev * m_gev, m1_gev * m1_gev, m2_gev * m2_gev);
    if l <= 0.0 {
        0.0
    } else {
        l.sqrt() / (2.0 * m_gev)
    }
}

/// Källén triangle function λ(a, b, c) = a² + b² + c² − 2ab − 2ac − 2bc.
pub fn kallen(a: f64, b: f64, c: f64) -> f64 {
    a * a + b * b + c * c - 2.0 * (a * b + a * c + b * c)
}

impl Add for P4 {
    type Output = P4;
    fn add(self, o: P4) -> P4 {
        P4::new(self.e + o.e, self.px + o.px, self.py + o.py, self.pz + o.pz)
    }
}

impl Sub for P4 {
    type Output = P4;
    fn sub(self, o: P4) -> P4 {
        P4::new(self.e - o.e, self.px - o.px, self.py - o.py, self.pz - o.pz)
    }
}

impl Neg for P4 {
    type Output = P4;
    fn neg(self) -> P4 {
        P4::new(-self.e, -self.px, -self.py, -self.pz)
    }
}

impl AddAssign for P4 {
    fn add_assign(&mut self, o: P4) {
        *self = *self + o;
    }
}

impl SubAssign for P4 {
    fn sub_assign(&mut self, o: P4) {
        *self = *self - o;
    }
}

impl std::iter::Sum for P4 {
    fn sum<I: Iterator<Item = P4>>(iter: I) -> P4 {
        iter.fold(P4::default(), |a, b| a + b)
    }
}

impl<'a> std::iter::Sum<&'a P4> for P4 {
    fn sum<I: Iterator<Item = &'a P4>>(iter: I) -> P4 {
        iter.fold(P4::default(), |a, b| a + *b)
    }
}
