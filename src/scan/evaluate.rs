//! The physics of one scan point: events → detector → search yields
//! (cached) → coupling rescaling → limits.
//!
//! Fed by [`crate::events`], [`crate::detector`], [`crate::search`],
//! [`crate::model`] and [`crate::stats`]; driven by [`super::run`].

use super::ScanError;
use super::plan::{ScanPlan, ScanPoint};
use super::run::{PointContext, PointEvaluator, PointOutcome};

/// Evaluates the points of a plan with the search and detector it names.
#[derive(Debug)]
pub struct PlanEvaluator {
    _private: (),
}

impl PlanEvaluator {
    /// Reads and validates the search definition and the detector profile
    /// of `plan`. Needs the search stage, which this build does not have
    /// yet: always an error.
    pub fn new(plan: &ScanPlan) -> Result<Self, ScanError> {
        Err(ScanError::Plan(format!(
            "{}: evaluating points needs the search stage, which is not part of this build yet",
            plan.path.display()
        )))
    }
}

impl PointEvaluator for PlanEvaluator {
    fn evaluate(
        &self,
        _point: &ScanPoint,
        _ctx: &PointContext<'_>,
    ) -> Result<PointOutcome, String> {
        Err("the search stage is not part of this build yet".into())
    }
}
