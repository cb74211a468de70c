//! Whole-scan products of a plan: the collider limit curve in the
//! (m_χ, σ_DM–nucleon) plane beside direct-detection curves
//! (`dm_nucleon.csv`), and the figures.
//!
//! Fed by the scan's contours, [`crate::model`] and [`crate::direct`].

use std::path::Path;

use super::ScanError;
use super::contour::Contour;
use super::output::PointResult;
use super::plan::ScanPlan;
use super::run::ScanProducts;

/// The products a plan asks for.
#[derive(Debug)]
pub struct PlanProducts {
    _private: (),
}

impl PlanProducts {
    /// Prepares the products of `plan`.
    pub fn new(_plan: &ScanPlan) -> Result<Self, ScanError> {
        Ok(Self { _private: () })
    }
}

impl ScanProducts for PlanProducts {
    fn write(
        &self,
        _plan: &ScanPlan,
        _rows: &[PointResult],
        _contours: &[Contour],
        _out: &Path,
    ) -> Result<Vec<String>, ScanError> {
        Ok(vec![
            "dm_nucleon.csv not written: the model and direct-detection stages are not part of \
             this build yet"
                .into(),
        ])
    }
}
