//! A collider exclusion boundary in the (m_χ, M) plane turned into a limit
//! curve in the DM–nucleon plane σ(m_χ), observed and expected, with the
//! confidence level carried along.
//!
//! Fed by a boundary from [`crate::scan`] (or given directly); feeds
//! [`crate::plot`] and comparisons with [`crate::direct`].

use super::{
    Couplings, Mediator, MediatorKind, ModelError, Nucleon, NucleonParams, ScatteringType,
};

/// One point of a collider exclusion boundary: at DM mass m_χ, mediator
/// masses up to the limit are excluded at the given couplings.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct BoundaryPoint {
    /// DM mass m_χ [GeV].
    pub m_dm_gev: f64,
    /// Largest excluded mediator mass, observed [GeV].
    pub m_med_limit_obs_gev: f64,
    /// Largest excluded mediator mass, expected (median) [GeV], if known.
    pub m_med_limit_exp_gev: Option<f64>,
}

/// One point of a DM–nucleon limit curve.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct CurvePoint {
    /// DM mass m_χ [GeV].
    pub m_dm_gev: f64,
    /// Observed mediator-mass limit [GeV].
    pub m_med_limit_obs_gev: f64,
    /// Observed cross-section limit [cm²].
    pub sigma_obs_cm2: f64,
    /// Expected mediator-mass limit [GeV], if given.
    pub m_med_limit_exp_gev: Option<f64>,
    /// Expected cross-section limit [cm²], if an expected boundary was given.
    pub sigma_exp_cm2: Option<f64>,
}

/// A collider limit curve in the DM–nucleon plane.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct ColliderCurve {
    /// Mediator kind.
    pub mediator: MediatorKind,
    /// Couplings at which the boundary was obtained.
    pub couplings: Couplings,
    /// SI or SD.
    pub kind: ScatteringType,
    /// Target nucleon.
    pub nucleon: Nucleon,
    /// Nucleon parameter set (name).
    pub params: &'static str,
    /// Confidence level of the collider limit (e.g. 0.95).
    pub cl: f64,
    /// A statement of what the numbers mean, for outputs.
    pub note: String,
    /// Points, in the order of the boundary.
    pub points: Vec<CurvePoint>,
}

/// Translates a collider exclusion boundary into a DM–nucleon limit curve.
///
/// For each boundary point the cross-section at (m_χ, M_limit) with the
/// given couplings is the limit: lighter mediators give larger σ and are
/// excluded, so σ above the curve is excluded (at these couplings, within
/// the simplified model).
///
/// # Formula
/// σ(m_χ) = σ_{SI/SD}(g_q, g_DM, M_limit(m_χ), μ_nχ) of
/// [`Mediator::sigma_nucleon_cm2`].
///
/// # Units
/// Masses in GeV; cross-sections in cm²; `cl` a fraction in (0, 1).
///
/// # References
/// A. Boveia et al., arXiv:1603.04156 (the translation procedure).
///
/// # Errors
/// Pseudoscalar mediators ([`ModelError::MomentumSuppressed`]); `cl`
/// outside (0, 1); a boundary point with a mass that is not finite and > 0.
pub fn collider_curve(
    mediator: MediatorKind,
    couplings: Couplings,
    nucleon: Nucleon,
    params: &NucleonParams,
    cl: f64,
    boundary: &[BoundaryPoint],
) -> Result<ColliderCurve, ModelError> {
    let kind = ScatteringType::for_mediator(mediator)?;
    if !(cl > 0.0 && cl < 1.0) {
        return Err(ModelError::InvalidParameter {
            quantity: "cl",
            rule: "in (0, 1)",
            value: cl,
            unit: "",
        });
    }
    let sigma = |index: usize, m_dm: f64, m_med: f64| -> Result<f64, ModelError> {
        let med = Mediator::new(mediator, m_med, m_dm, couplings).map_err(|e| {
            ModelError::InvalidBoundary {
                index,
                m_dm_gev: m_dm,
                message: e.to_string(),
            }
        })?;
        Ok(med.sigma_nucleon_cm2(nucleon, params)?.sigma_cm2)
    };
    let points = boundary
        .iter()
        .enumerate()
        .map(|(i, b)| {
            Ok(CurvePoint {
                m_dm_gev: b.m_dm_gev,
                m_med_limit_obs_gev: b.m_med_limit_obs_gev,
                sigma_obs_cm2: sigma(i, b.m_dm_gev, b.m_med_limit_obs_gev)?,
                m_med_limit_exp_gev: b.m_med_limit_exp_gev,
                sigma_exp_cm2: b
                    .m_med_limit_exp_gev
                    .map(|m| sigma(i, b.m_dm_gev, m))
                    .transpose()?,
            })
        })
        .collect::<Result<Vec<_>, ModelError>>()?;
    let note = format!(
        "collider limit at {:.0}% CL (CLs), {} mediator, g_q = {}, g_DM = {}; valid only \
         within this simplified model at these couplings; direct-detection limits are \
         usually quoted at 90% CL",
        cl * 100.0,
        mediator,
        couplings.g_q(),
        couplings.g_dm()
    );
    Ok(ColliderCurve {
        mediator,
        couplings,
        kind,
        nucleon,
        params: params.name,
        cl,
        note,
        points,
    })
}

/// Column names of a boundary table.
pub const BOUNDARY_COLUMNS: [&str; 3] = ["m_dm_gev", "m_med_limit_gev", "m_med_limit_exp_gev"];

/// Reads a collider exclusion boundary from CSV with a header row:
/// `m_dm_gev,m_med_limit_gev` and optionally `m_med_limit_exp_gev`
/// (`m_med_limit_obs_gev` is accepted for the observed column), masses in
/// GeV. An empty expected cell means "not known". Every row must parse;
/// `source_name` names the input in error messages.
pub fn read_boundary_csv<R: std::io::Read>(
    reader: R,
    source_name: &str,
) -> Result<Vec<BoundaryPoint>, ModelError> {
    let err = |line: u64, message: String| ModelError::BoundaryFile {
        source_name: source_name.to_string(),
        line,
        message,
    };
    let mut rdr = csv::ReaderBuilder::new()
        .trim(csv::Trim::All)
        .from_reader(reader);
    let headers = rdr.headers().map_err(|e| err(1, e.to_string()))?.clone();
    let find = |names: &[&str]| headers.iter().position(|h| names.contains(&h));
    let i_dm = find(&[BOUNDARY_COLUMNS[0]]).ok_or_else(|| {
        err(
            1,
            format!("missing column '{}' in header", BOUNDARY_COLUMNS[0]),
        )
    })?;
    let i_obs = find(&[BOUNDARY_COLUMNS[1], "m_med_limit_obs_gev"]).ok_or_else(|| {
        err(
            1,
            format!("missing column '{}' in header", BOUNDARY_COLUMNS[1]),
        )
    })?;
    let i_exp = find(&[BOUNDARY_COLUMNS[2]]);
    let mut out = Vec::new();
    for (k, rec) in rdr.records().enumerate() {
        let line = rec
            .as_ref()
            .ok()
            .and_then(|r| r.position())
            .map_or(k as u64 + 2, |p| p.line());
        let rec = rec.map_err(|e| err(line, e.to_string()))?;
        let number = |i: usize, column: &str| -> Result<f64, ModelError> {
            let cell = rec.get(i).unwrap_or("");
            cell.parse::<f64>().map_err(|_| {
                err(
                    line,
                    format!("column '{column}': '{cell}' is not a number (GeV)"),
                )
            })
        };
        let m_dm_gev = number(i_dm, BOUNDARY_COLUMNS[0])?;
        let m_med_limit_obs_gev = number(i_obs, BOUNDARY_COLUMNS[1])?;
        let m_med_limit_exp_gev = match i_exp {
            Some(i) if !rec.get(i).unwrap_or("").is_empty() => {
                Some(number(i, BOUNDARY_COLUMNS[2])?)
            }
            _ => None,
        };
        for (column, v) in [
            (BOUNDARY_COLUMNS[0], Some(m_dm_gev)),
            (BOUNDARY_COLUMNS[1], Some(m_med_limit_obs_gev)),
            (BOUNDARY_COLUMNS[2], m_med_limit_exp_gev),
        ] {
            if let Some(v) = v
                && !(v.is_finite() && v > 0.0)
            {
                return Err(err(
                    line,
                    format!("column '{column}': must be finite and > 0, got {v} GeV"),
                ));
            }
        }
        out.push(BoundaryPoint {
            m_dm_gev,
            m_med_limit_obs_gev,
            m_med_limit_exp_gev,
        });
    }
    if out.is_empty() {
        return Err(err(1, "no boundary points after the header".to_string()));
    }
    Ok(out)
}
