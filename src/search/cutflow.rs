//! Cut-flows: the sequence of cuts of the preselection and of every region,
//! with raw and weighted counts and efficiencies.
//!
//! Filled by [`super::yields`]; printed and written by the `recast` command.

/// One step of a cut-flow.
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct CutflowStep {
    /// The cut as written (`all events` for step 0, `preselection` for the
    /// whole common part in a region's cut-flow).
    pub cut: String,
    /// Number of Monte Carlo events passing (unweighted).
    pub raw_events: u64,
    /// Expected events passing at the search luminosity.
    pub events: f64,
    /// Monte Carlo statistical uncertainty √Σw² of `events`.
    pub mc_stat: f64,
}

/// The cut-flow of the preselection or of one region.
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct Cutflow {
    /// `preselection` or the region name.
    pub name: String,
    /// Steps; step 0 is all events.
    pub steps: Vec<CutflowStep>,
}

impl Cutflow {
    /// Fraction of all events passing up to step `i` (weighted); 0 when no
    /// events were expected at step 0.
    pub fn efficiency_cumulative(&self, i: usize) -> f64 {
        ratio(self.steps.get(i), self.steps.first())
    }

    /// Fraction of the events of step `i − 1` passing step `i` (weighted);
    /// 1 for step 0; 0 when the previous step expected no events.
    pub fn efficiency_step(&self, i: usize) -> f64 {
        if i == 0 {
            return 1.0;
        }
        ratio(self.steps.get(i), self.steps.get(i - 1))
    }
}

fn ratio(num: Option<&CutflowStep>, den: Option<&CutflowStep>) -> f64 {
    match (num, den) {
        (Some(n), Some(d)) if d.events != 0.0 => n.events / d.events,
        _ => 0.0,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn efficiencies_are_ratios_of_weighted_counts() {
        let step = |events| CutflowStep {
            cut: String::new(),
            raw_events: 0,
            events,
            mc_stat: 0.0,
        };
        let flow = Cutflow {
            name: "x".into(),
            steps: vec![step(200.0), step(50.0), step(10.0), step(0.0), step(0.0)],
        };
        // Hand-computed: 50/200, 10/200; 10/50.
        assert_eq!(flow.efficiency_cumulative(1), 0.25);
        assert_eq!(flow.efficiency_cumulative(2), 0.05);
        assert_eq!(flow.efficiency_step(2), 0.2);
        assert_eq!(flow.efficiency_step(4), 0.0);
        assert_eq!(flow.efficiency_step(0), 1.0);
    }
}
