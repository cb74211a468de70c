//! Identification efficiencies: a constant or a pT × |η| table, and the
//! accept-or-reject draw.
//!
//! Used by [`crate::detector::Detector`].

use rand::Rng;

use super::profile::EfficiencyTable;

/// Index of the bin of `x` among increasing `edges`, extended flat: values
/// below the first edge fall in bin 0, values at or above the last edge in
/// the last bin. `edges` has at least two entries in a valid profile; with
/// fewer it returns 0.
fn bin_index(edges: &[f64], x: f64) -> usize {
    let n_bins = edges.len().saturating_sub(1);
    // Number of inner edges at or below x.
    let inner = edges.get(1..n_bins).unwrap_or(&[]);
    inner.iter().take_while(|&&e| x >= e).count()
}

impl EfficiencyTable {
    /// Efficiency for an object of transverse momentum `pt_gev` [GeV] and
    /// pseudorapidity magnitude `abs_eta`. Outside the table the nearest
    /// bin is used. A malformed table (only possible by editing a
    /// validated profile) gives 0.
    pub fn lookup(&self, pt_gev: f64, abs_eta: f64) -> f64 {
        let i = bin_index(&self.pt_edges_gev, pt_gev);
        let j = bin_index(&self.abs_eta_edges, abs_eta);
        self.values
            .get(i)
            .and_then(|row| row.get(j))
            .copied()
            .unwrap_or(0.0)
    }
}

/// A uniform number in [0, 1) from the top 53 bits of one 64-bit draw.
pub fn uniform<G: Rng + ?Sized>(rng: &mut G) -> f64 {
    (rng.next_u64() >> 11) as f64 * (1.0 / (1u64 << 53) as f64)
}

/// True with probability `p`. Draws a number only when 0 < p < 1, so full
/// and zero efficiencies consume no randomness.
pub fn pass<G: Rng + ?Sized>(p: f64, rng: &mut G) -> bool {
    if p >= 1.0 {
        true
    } else if p > 0.0 {
        uniform(rng) < p
    } else {
        false
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn table_lookup_with_flat_extension() {
        let t = EfficiencyTable {
            pt_edges_gev: vec![10.0, 20.0, 50.0],
            abs_eta_edges: vec![0.0, 1.5, 2.5],
            values: vec![vec![0.1, 0.2], vec![0.3, 0.4]],
        };
        assert_eq!(t.lookup(5.0, 0.1), 0.1);
        assert_eq!(t.lookup(15.0, 2.0), 0.2);
        assert_eq!(t.lookup(20.0, 1.5), 0.4);
        assert_eq!(t.lookup(1.0e4, 9.0), 0.4);
        assert_eq!(t.lookup(30.0, 0.0), 0.3);
    }

    #[test]
    fn uniform_is_in_unit_interval() {
        struct Max;
        impl rand::TryRng for Max {
            type Error = core::convert::Infallible;
            fn try_next_u32(&mut self) -> Result<u32, Self::Error> {
                Ok(u32::MAX)
            }
            fn try_next_u64(&mut self) -> Result<u64, Self::Error> {
                Ok(u64::MAX)
            }
            fn try_fill_bytes(&mut self, d: &mut [u8]) -> Result<(), Self::Error> {
                d.fill(0xff);
                Ok(())
            }
        }
        let u = uniform(&mut Max);
        assert!(u < 1.0 && u > 0.999_999);
    }
}
