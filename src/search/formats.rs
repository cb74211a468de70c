//! Column names of the files `recoil recast --out DIR` writes (the shared
//! formats contract with the plot and scan stages), in file order. Readers
//! of these files can use the same lists.

/// Columns of `yields.csv`: one row per region.
pub const YIELDS_COLUMNS: [&str; 21] = [
    "region",
    "inclusive",
    "met_low_gev",
    "met_high_gev",
    "signal_events",
    "signal_mc_stat",
    "signal_var_low",
    "signal_var_high",
    "efficiency",
    "background",
    "background_unc",
    "observed",
    "cls_mu1",
    "mu_up_obs",
    "mu_up_exp",
    "mu_up_exp_m1",
    "mu_up_exp_p1",
    "s95_obs",
    "s95_exp",
    "sigma_vis_up_obs_fb",
    "sigma_vis_up_exp_fb",
];

/// Columns of `cutflow.csv`: one row per cut-flow step.
pub const CUTFLOW_COLUMNS: [&str; 7] = [
    "region",
    "step",
    "cut",
    "raw_events",
    "weighted_events",
    "efficiency_cumulative",
    "efficiency_step",
];

/// Columns of `distributions.csv`: one row per bin.
pub const DISTRIBUTIONS_COLUMNS: [&str; 6] = [
    "observable",
    "level",
    "bin_low_gev",
    "bin_high_gev",
    "events",
    "mc_stat",
];
