//! Search definitions (regions, cuts, observed counts, background
//! estimates), cut evaluation, cut-flows, signal yields and the limits of a
//! search for one sample.
//!
//! Fed by [`crate::detector`] (reconstructed events) and a definition file;
//! feeds [`crate::stats`] (region counts) and [`crate::scan`].
//!
//! | file | job |
//! |---|---|
//! | `definition.rs` | TOML schema, validation, [`Search`], projections |
//! | `expr.rs` | cut expression parser and evaluator ([`Cut`]) |
//! | `observables.rs` | the one registry of observables ([`observables::REGISTRY`]) |
//! | `yields.rs` | [`YieldAccumulator`], [`SampleYields`], [`run_sample`] |
//! | `cutflow.rs` | [`Cutflow`] |
//! | `formats.rs` | column names of the `recast --out` files |
//! | `limits.rs` | [`search_limits`], [`model_independent_limits`] |

pub mod cutflow;
pub mod definition;
pub mod error;
pub mod expr;
pub mod formats;
pub mod limits;
pub mod observables;
pub mod yields;

pub use cutflow::{Cutflow, CutflowStep};
pub use definition::{
    PRESELECTION, Projection, PublishedLimits, Reference, Region, Search, UncertaintyScaling,
};
pub use error::SearchError;
pub use expr::{Cut, ExprError};
pub use limits::{
    ModelIndependentLimit, RegionLimit, SearchLimits, model_independent_limits, search_limits,
};
pub use observables::{Acceptance, ObjectDefinitions, Observable};
pub use yields::{
    Bin, Distribution, EventOrigin, RegionYield, SampleYields, TruthInfo, YieldAccumulator,
    run_sample,
};
