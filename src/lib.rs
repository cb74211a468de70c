//! `recoil`: recast LHC jet + missing-momentum searches for simplified
//! dark-matter models and compare the exclusion with direct detection.
//!
//! Results are estimates from parton-level events and a parametrised
//! detector; they are no substitute for an experiment's official analysis.
//!
//! The stages, in data-flow order (a stage uses only the ones before it):
//!
//! | module | job |
//! |---|---|
//! | [`units`] | physical constants and unit conversions, each with its source |
//! | [`kinematics`] | four-momenta ([`kinematics::P4`]) |
//! | [`events`] | streaming LHEF reader, weight conventions, invisible particles |
//! | [`detector`] | parametrised detector response → reconstructed objects |
//! | [`search`] | search definitions, cut expressions, cut-flows, yields |
//! | [`stats`] | counting-experiment likelihoods and CLs limits |
//! | [`model`] | simplified s-channel mediators, widths, DM–nucleon cross-sections |
//! | [`scan`] | grids of model points, caching, sharding, contours |
//! | [`direct`] | direct-detection rates and reach |
//! | [`plot`] | SVG figures from results |

pub mod detector;
pub mod direct;
pub mod events;
pub mod kinematics;
pub mod model;
pub mod output;
pub mod plot;
pub mod scan;
pub mod search;
pub mod stats;
pub mod units;
