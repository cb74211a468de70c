//! Every figure of an output folder in one call: what `recoil scan` and
//! `recoil recast` use to write their figures next to their tables, in a
//! `figures/` subfolder (so a figure's CSV never overwrites a result table).

use std::path::{Path, PathBuf};

use super::dm_nucleon::Interaction;
use super::{FigureFiles, Labels, PlotError, data};

/// Subfolder of an output folder that receives the figures.
pub const FIGURES_DIR: &str = "figures";

fn figures_dir(dir: &Path) -> Result<PathBuf, PlotError> {
    let out = dir.join(FIGURES_DIR);
    std::fs::create_dir_all(&out).map_err(|cause| PlotError::Write {
        path: out.clone(),
        cause,
    })?;
    Ok(out)
}

/// Writes the figures of a scan folder: `figures/exclusion.svg` from
/// `results.csv` and `contours.csv`, and, when `dm_nucleon.csv` exists,
/// `figures/dm_nucleon.svg` (one file per cross-section,
/// `dm_nucleon_SI.svg`, `dm_nucleon_SD-p.svg`, … when it holds several).
/// Couplings missing from `labels` are taken from `results.csv` when every
/// point shares them.
pub fn scan_figures(dir: &Path, labels: &Labels) -> Result<Vec<FigureFiles>, PlotError> {
    let (exclusion, couplings) = data::read_scan_exclusion(dir)?;
    let mut labels = labels.clone();
    if labels.couplings.is_none() {
        labels.couplings = couplings;
    }
    let out = figures_dir(dir)?;
    let mut files = vec![super::exclusion_figure(
        &exclusion,
        &labels,
        &out.join("exclusion.svg"),
    )?];
    let dmn = dir.join("dm_nucleon.csv");
    if dmn.exists() {
        let curves = data::read_dm_nucleon(&dmn)?;
        let mut kinds: Vec<Interaction> = Vec::new();
        for c in &curves {
            if !kinds.contains(&c.interaction) {
                kinds.push(c.interaction);
            }
        }
        for &k in &kinds {
            let these: Vec<_> = curves
                .iter()
                .filter(|c| c.interaction == k)
                .cloned()
                .collect();
            let name = if kinds.len() == 1 {
                "dm_nucleon.svg".to_string()
            } else {
                format!("dm_nucleon_{}.svg", k.as_str())
            };
            files.push(super::dm_nucleon_figure(&these, &labels, &out.join(name))?);
        }
    }
    Ok(files)
}

/// Writes the figures of a recast folder: `figures/distributions.svg`
/// (with the per-region panel) from `distributions.csv` and `yields.csv`,
/// and `figures/cutflow.svg` from `cutflow.csv`.
pub fn recast_figures(dir: &Path, labels: &Labels) -> Result<Vec<FigureFiles>, PlotError> {
    let dist = data::read_recast_distributions(dir, true)?;
    let cut = data::read_cutflow(&dir.join("cutflow.csv"))?;
    let out = figures_dir(dir)?;
    Ok(vec![
        super::distributions_figure(&dist, labels, &out.join("distributions.svg"))?,
        super::cutflow_figure(&cut, labels, &out.join("cutflow.svg"))?,
    ])
}
