//! Search definitions: the TOML schema, its validation, and the validated
//! [`Search`] (header, object definitions, preselection, signal regions,
//! optional background covariance, optional published limits).
//!
//! Fed by a definition file written by the user; feeds the yield
//! accumulation ([`super::yields`]) and the limits ([`super::limits`]).

use std::path::{Path, PathBuf};

use nalgebra::DMatrix;
use serde::Deserialize;
use toml::Spanned;

use super::error::{SearchError, line_column};
use super::expr::{Cut, SlotTable};
use super::observables::{Acceptance, ObjectDefinitions, Observable};

/// Name reserved for the common part of the cut-flow.
pub const PRESELECTION: &str = "preselection";

/// Relative tolerance on the agreement of a covariance matrix's diagonal
/// with the regions' squared background uncertainties (rounding in
/// published tables).
pub const COVARIANCE_DIAGONAL_TOLERANCE: f64 = 0.02;

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct RawSearch {
    title: Spanned<String>,
    sqrt_s_tev: Spanned<f64>,
    lumi_ifb: Spanned<f64>,
    #[serde(default)]
    cl: Option<Spanned<f64>>,
    reference: RawReference,
    #[serde(default)]
    detector_profile: Option<String>,
    #[serde(default)]
    objects: RawObjects,
    #[serde(default)]
    preselection: Vec<Spanned<String>>,
    #[serde(default)]
    regions: Vec<RawRegion>,
    #[serde(default)]
    background_covariance: Option<RawMatrix>,
    #[serde(default)]
    background_correlation: Option<RawMatrix>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct RawReference {
    paper: String,
    #[serde(default)]
    table: Option<String>,
    #[serde(default)]
    url: Option<String>,
    #[serde(default)]
    note: Option<String>,
}

#[derive(Debug, Default, Deserialize)]
#[serde(deny_unknown_fields)]
struct RawObjects {
    jets: Option<RawAcceptance>,
    bjets: Option<RawAcceptance>,
    electrons: Option<RawAcceptance>,
    muons: Option<RawAcceptance>,
    taus: Option<RawAcceptance>,
    photons: Option<RawAcceptance>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct RawAcceptance {
    min_pt_gev: Option<Spanned<f64>>,
    max_abs_eta: Option<Spanned<f64>>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct RawRegion {
    name: Spanned<String>,
    #[serde(default)]
    cuts: Vec<Spanned<String>>,
    exclusive: bool,
    observed: Spanned<i64>,
    background: Spanned<f64>,
    background_unc: Spanned<f64>,
    #[serde(default)]
    published: Option<RawPublished>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct RawPublished {
    s95_obs: Option<Spanned<f64>>,
    s95_exp: Option<Spanned<f64>>,
    sigma_vis_obs_fb: Option<Spanned<f64>>,
    sigma_vis_exp_fb: Option<Spanned<f64>>,
    #[serde(default)]
    note: Option<String>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct RawMatrix {
    regions: Vec<Spanned<String>>,
    matrix: Spanned<Vec<Vec<f64>>>,
}

/// Where the search comes from in the literature.
#[derive(Debug, Clone, PartialEq, Eq, serde::Serialize, serde::Deserialize)]
pub struct Reference {
    /// Paper (authors or collaboration, journal or arXiv id).
    pub paper: String,
    /// Table(s) the counts come from.
    pub table: Option<String>,
    /// Link to the public material.
    pub url: Option<String>,
    /// Free note (for example "invented").
    pub note: Option<String>,
}

/// Published model-independent upper limits of one region, used to
/// validate the statistics.
#[derive(Debug, Clone, Copy, PartialEq, Default, serde::Serialize, serde::Deserialize)]
pub struct PublishedLimits {
    /// Observed upper limit on signal events.
    pub s95_obs: Option<f64>,
    /// Expected upper limit on signal events.
    pub s95_exp: Option<f64>,
    /// Observed upper limit on the visible cross-section [fb].
    pub sigma_vis_obs_fb: Option<f64>,
    /// Expected upper limit on the visible cross-section [fb].
    pub sigma_vis_exp_fb: Option<f64>,
}

/// One signal region.
#[derive(Debug, Clone, PartialEq)]
pub struct Region {
    name: String,
    cuts: Vec<Cut>,
    exclusive: bool,
    observed: u64,
    background: f64,
    background_unc: f64,
    published: Option<PublishedLimits>,
}

impl Region {
    /// Region name (unique in its search).
    pub fn name(&self) -> &str {
        &self.name
    }
    /// The region's cuts on top of the preselection, in order.
    pub fn cuts(&self) -> &[Cut] {
        &self.cuts
    }
    /// True for a region that does not overlap the other exclusive ones.
    pub fn exclusive(&self) -> bool {
        self.exclusive
    }
    /// Observed events.
    pub fn observed(&self) -> u64 {
        self.observed
    }
    /// Expected background events.
    pub fn background(&self) -> f64 {
        self.background
    }
    /// Absolute background uncertainty [events].
    pub fn background_unc(&self) -> f64 {
        self.background_unc
    }
    /// Published model-independent limits, when given.
    pub fn published(&self) -> Option<&PublishedLimits> {
        self.published.as_ref()
    }
}

/// How the background uncertainty scales in a luminosity projection.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, serde::Serialize, serde::Deserialize)]
pub enum UncertaintyScaling {
    /// σ_b ∝ L: the relative uncertainty stays fixed (systematics-dominated
    /// background, the default).
    #[default]
    Linear,
    /// σ_b ∝ √L: the relative uncertainty falls as 1/√L (uncertainty
    /// dominated by the statistics of control regions).
    Sqrt,
}

/// A projection of the search to another integrated luminosity.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct Projection {
    /// Luminosity of the definition [fb⁻¹].
    pub from_lumi_ifb: f64,
    /// Projected luminosity [fb⁻¹].
    pub to_lumi_ifb: f64,
    /// How background uncertainties were scaled.
    pub scaling: UncertaintyScaling,
}

impl Projection {
    /// Plain-words statement of what the projection did.
    pub fn describe(&self) -> String {
        let k = self.to_lumi_ifb / self.from_lumi_ifb;
        let unc = match self.scaling {
            UncertaintyScaling::Linear => {
                "background uncertainty scaled by the same factor (σ_b ∝ L, systematics-dominated)"
                    .to_string()
            }
            UncertaintyScaling::Sqrt => format!(
                "background uncertainty scaled by √{k} = {} (σ_b ∝ √L)",
                k.sqrt()
            ),
        };
        format!(
            "projected from {} fb⁻¹ to {} fb⁻¹: background scaled by {k} (b ∝ L), {unc}; \
             observed counts set to the projected background rounded to an integer \
             (a projection has no data); published limits dropped",
            self.from_lumi_ifb, self.to_lumi_ifb
        )
    }
}

/// A validated search definition. It cannot exist in an invalid state.
#[derive(Debug, Clone, PartialEq)]
pub struct Search {
    origin: String,
    title: String,
    sqrt_s_tev: f64,
    lumi_ifb: f64,
    cl: f64,
    reference: Reference,
    detector_profile: Option<PathBuf>,
    objects: ObjectDefinitions,
    preselection: Vec<Cut>,
    regions: Vec<Region>,
    slots: SlotTable,
    n_preselection_slots: usize,
    covariance: Option<DMatrix<f64>>,
    projection: Option<Projection>,
}

struct Ctx<'a> {
    origin: &'a str,
    text: &'a str,
}

impl Ctx<'_> {
    fn at(&self, offset: usize, message: impl Into<String>) -> SearchError {
        let (line, column) = line_column(self.text, offset);
        SearchError::Definition {
            origin: self.origin.to_string(),
            line,
            column,
            message: message.into(),
        }
    }

    fn check<T: Copy + PartialOrd + std::fmt::Display>(
        &self,
        key: &str,
        value: &Spanned<T>,
        ok: impl Fn(T) -> bool,
        rule: &str,
        unit: &str,
    ) -> Result<T, SearchError> {
        let v = *value.get_ref();
        if ok(v) {
            Ok(v)
        } else {
            Err(self.at(
                value.span().start,
                format!("{key} must be {rule}, got {v}{unit}"),
            ))
        }
    }

    fn cut(&self, raw: &Spanned<String>, slots: &mut SlotTable) -> Result<Cut, SearchError> {
        let text = raw.get_ref();
        Cut::parse(text, slots).map_err(|e| {
            // Offset of the character inside the file, assuming the string
            // is written without escapes.
            let start = raw.span().start;
            let quote = if self.text[start..].starts_with("\"\"\"")
                || self.text[start..].starts_with("'''")
            {
                3
            } else {
                1
            };
            let inner: usize = text.chars().take(e.position).map(char::len_utf8).sum();
            self.at(start + quote + inner, e.render(text))
        })
    }
}

fn finite_nonneg(x: f64) -> bool {
    x.is_finite() && x >= 0.0
}

impl Search {
    /// Reads and validates a definition file. A relative `detector_profile`
    /// is taken relative to the file's folder.
    pub fn from_toml_file(path: &Path) -> Result<Search, SearchError> {
        let text = std::fs::read_to_string(path).map_err(|source| SearchError::Io {
            path: path.to_path_buf(),
            source,
        })?;
        let mut search = Search::from_toml_str(&text, &path.display().to_string())?;
        if let Some(profile) = &search.detector_profile
            && profile.is_relative()
        {
            let folder = path.parent().unwrap_or_else(|| Path::new(""));
            search.detector_profile = Some(folder.join(profile));
        }
        Ok(search)
    }

    /// Parses and validates a definition; `origin` names it in errors.
    pub fn from_toml_str(text: &str, origin: &str) -> Result<Search, SearchError> {
        let ctx = Ctx { origin, text };
        let raw: RawSearch = toml::from_str(text).map_err(|e| {
            let offset = e.span().map_or(0, |s| s.start);
            ctx.at(offset, e.message().trim().to_string())
        })?;

        if raw.title.get_ref().trim().is_empty() {
            return Err(ctx.at(raw.title.span().start, "title must not be empty"));
        }
        let sqrt_s_tev = ctx.check(
            "sqrt_s_tev",
            &raw.sqrt_s_tev,
            |x| x.is_finite() && x > 0.0,
            "> 0",
            " TeV",
        )?;
        let lumi_ifb = ctx.check(
            "lumi_ifb",
            &raw.lumi_ifb,
            |x| x.is_finite() && x > 0.0,
            "> 0",
            " fb⁻¹",
        )?;
        let cl = match &raw.cl {
            Some(cl) => ctx.check("cl", cl, |x| x > 0.0 && x < 1.0, "in (0, 1)", "")?,
            None => 0.95,
        };

        let acceptance =
            |name: &str, raw: &Option<RawAcceptance>| -> Result<Acceptance, SearchError> {
                let mut acc = Acceptance::ALL;
                if let Some(raw) = raw {
                    if let Some(v) = &raw.min_pt_gev {
                        acc.min_pt_gev = ctx.check(
                            &format!("objects.{name}.min_pt_gev"),
                            v,
                            finite_nonneg,
                            "finite and ≥ 0",
                            " GeV",
                        )?;
                    }
                    if let Some(v) = &raw.max_abs_eta {
                        acc.max_abs_eta = ctx.check(
                            &format!("objects.{name}.max_abs_eta"),
                            v,
                            |x| x > 0.0,
                            "> 0",
                            "",
                        )?;
                    }
                }
                Ok(acc)
            };
        let objects = ObjectDefinitions {
            jets: acceptance("jets", &raw.objects.jets)?,
            bjets: acceptance("bjets", &raw.objects.bjets)?,
            electrons: acceptance("electrons", &raw.objects.electrons)?,
            muons: acceptance("muons", &raw.objects.muons)?,
            taus: acceptance("taus", &raw.objects.taus)?,
            photons: acceptance("photons", &raw.objects.photons)?,
        };

        let mut slots = SlotTable::default();
        let preselection = raw
            .preselection
            .iter()
            .map(|c| ctx.cut(c, &mut slots))
            .collect::<Result<Vec<_>, _>>()?;
        let n_preselection_slots = slots.observables().len();

        if raw.regions.is_empty() {
            return Err(SearchError::DefinitionGlobal {
                origin: origin.to_string(),
                message: "no signal regions: add at least one [[regions]] table".into(),
            });
        }
        let mut regions: Vec<Region> = Vec::with_capacity(raw.regions.len());
        for (i, r) in raw.regions.iter().enumerate() {
            let name = r.name.get_ref().trim().to_string();
            if name.is_empty() {
                return Err(ctx.at(r.name.span().start, "region name must not be empty"));
            }
            if name == PRESELECTION {
                return Err(ctx.at(
                    r.name.span().start,
                    format!("region name \"{PRESELECTION}\" is reserved for the common cut-flow"),
                ));
            }
            if let Some(first) = raw.regions[..i]
                .iter()
                .find(|o| o.name.get_ref().trim() == name)
            {
                let (line, _) = line_column(text, first.name.span().start);
                return Err(ctx.at(
                    r.name.span().start,
                    format!("duplicate region name \"{name}\" (first defined on line {line})"),
                ));
            }
            let observed = ctx.check("observed", &r.observed, |x| x >= 0, "≥ 0", " events")?;
            let background = ctx.check(
                "background",
                &r.background,
                finite_nonneg,
                "finite and ≥ 0",
                " events",
            )?;
            let background_unc = ctx.check(
                "background_unc",
                &r.background_unc,
                finite_nonneg,
                "finite and ≥ 0",
                " events",
            )?;
            let cuts = r
                .cuts
                .iter()
                .map(|c| ctx.cut(c, &mut slots))
                .collect::<Result<Vec<_>, _>>()?;
            let published = match &r.published {
                None => None,
                Some(p) => {
                    let _ = &p.note;
                    let get =
                        |key: &str, v: &Option<Spanned<f64>>| -> Result<Option<f64>, SearchError> {
                            v.as_ref()
                                .map(|v| {
                                    ctx.check(
                                        &format!("published.{key}"),
                                        v,
                                        |x| x.is_finite() && x > 0.0,
                                        "finite and > 0",
                                        "",
                                    )
                                })
                                .transpose()
                        };
                    Some(PublishedLimits {
                        s95_obs: get("s95_obs", &p.s95_obs)?,
                        s95_exp: get("s95_exp", &p.s95_exp)?,
                        sigma_vis_obs_fb: get("sigma_vis_obs_fb", &p.sigma_vis_obs_fb)?,
                        sigma_vis_exp_fb: get("sigma_vis_exp_fb", &p.sigma_vis_exp_fb)?,
                    })
                }
            };
            regions.push(Region {
                name,
                cuts,
                exclusive: r.exclusive,
                // invariant: checked ≥ 0 above.
                observed: u64::try_from(observed).unwrap_or(0),
                background,
                background_unc,
                published,
            });
        }

        let covariance = match (&raw.background_covariance, &raw.background_correlation) {
            (Some(_), Some(c)) => {
                return Err(ctx.at(
                    c.matrix.span().start,
                    "give either background_covariance or background_correlation, not both",
                ));
            }
            (Some(m), None) => Some(matrix(&ctx, m, &regions, false)?),
            (None, Some(m)) => Some(matrix(&ctx, m, &regions, true)?),
            (None, None) => None,
        };

        Ok(Search {
            origin: origin.to_string(),
            title: raw.title.into_inner().trim().to_string(),
            sqrt_s_tev,
            lumi_ifb,
            cl,
            reference: Reference {
                paper: raw.reference.paper,
                table: raw.reference.table,
                url: raw.reference.url,
                note: raw.reference.note,
            },
            detector_profile: raw.detector_profile.map(PathBuf::from),
            objects,
            preselection,
            regions,
            slots,
            n_preselection_slots,
            covariance,
            projection: None,
        })
    }

    /// File (or label) the definition came from.
    pub fn origin(&self) -> &str {
        &self.origin
    }
    /// Title.
    pub fn title(&self) -> &str {
        &self.title
    }
    /// Centre-of-mass energy √s [TeV].
    pub fn sqrt_s_tev(&self) -> f64 {
        self.sqrt_s_tev
    }
    /// Integrated luminosity [fb⁻¹] (after any projection).
    pub fn lumi_ifb(&self) -> f64 {
        self.lumi_ifb
    }
    /// Confidence level of the limits (default 0.95).
    pub fn cl(&self) -> f64 {
        self.cl
    }
    /// Literature reference.
    pub fn reference(&self) -> &Reference {
        &self.reference
    }
    /// Detector profile named by the definition (relative paths resolved
    /// against the definition's folder when read from a file).
    pub fn detector_profile(&self) -> Option<&Path> {
        self.detector_profile.as_deref()
    }
    /// Object definitions.
    pub fn objects(&self) -> &ObjectDefinitions {
        &self.objects
    }
    /// Common cuts, in order.
    pub fn preselection(&self) -> &[Cut] {
        &self.preselection
    }
    /// Signal regions, in definition order.
    pub fn regions(&self) -> &[Region] {
        &self.regions
    }
    /// The distinct observables the cuts use, by slot.
    pub fn observables(&self) -> &[Observable] {
        self.slots.observables()
    }
    /// Number of leading slots of [`Self::observables`] that the
    /// preselection uses (the regions use only these and the later ones).
    pub fn n_preselection_observables(&self) -> usize {
        self.n_preselection_slots
    }
    /// Indices of the exclusive regions, in definition order.
    pub fn exclusive_indices(&self) -> Vec<usize> {
        (0..self.regions.len())
            .filter(|&i| self.regions[i].exclusive)
            .collect()
    }
    /// Background covariance [events²] between the exclusive regions, in
    /// the order of [`Self::exclusive_indices`], when given.
    pub fn background_covariance(&self) -> Option<&DMatrix<f64>> {
        self.covariance.as_ref()
    }
    /// The projection applied, if any.
    pub fn projection(&self) -> Option<&Projection> {
        self.projection.as_ref()
    }

    /// The p_T^miss interval [GeV] of region `index`, from comparisons of
    /// the bare `met` with numbers in the preselection and the region's
    /// cuts; `None` on an open side.
    pub fn met_edges_gev(&self, index: usize) -> (Option<f64>, Option<f64>) {
        let Some(slot) = self
            .observables()
            .iter()
            .position(|o| *o == Observable::Met)
        else {
            return (None, None);
        };
        let mut low: Option<f64> = None;
        let mut high: Option<f64> = None;
        let region_cuts = self.regions.get(index).map_or(&[][..], |r| &r.cuts[..]);
        for cut in self.preselection.iter().chain(region_cuts) {
            let (l, h) = cut.bounds_on(slot);
            if let Some(l) = l {
                low = Some(low.map_or(l, |x| x.max(l)));
            }
            if let Some(h) = h {
                high = Some(high.map_or(h, |x| x.min(h)));
            }
        }
        (low, high)
    }

    /// The search projected to `lumi_ifb`: backgrounds scale with L, their
    /// uncertainties (and covariance) as `scaling` says, observed counts
    /// become the projected background rounded to the nearest integer, and
    /// published limits are dropped. See [`Projection::describe`].
    pub fn projected(
        &self,
        lumi_ifb: f64,
        scaling: UncertaintyScaling,
    ) -> Result<Search, SearchError> {
        if !(lumi_ifb.is_finite() && lumi_ifb > 0.0) {
            return Err(SearchError::InvalidOption(format!(
                "projected luminosity must be finite and > 0, got {lumi_ifb} fb⁻¹"
            )));
        }
        let from = self.projection.map_or(self.lumi_ifb, |p| p.from_lumi_ifb);
        let k = lumi_ifb / self.lumi_ifb;
        let k_unc = match scaling {
            UncertaintyScaling::Linear => k,
            UncertaintyScaling::Sqrt => k.sqrt(),
        };
        let mut out = self.clone();
        out.lumi_ifb = lumi_ifb;
        for r in &mut out.regions {
            r.background *= k;
            r.background_unc *= k_unc;
            // invariant: background is finite and ≥ 0, so the cast is exact
            // up to 2⁵³ and saturates beyond.
            r.observed = r.background.round() as u64;
            r.published = None;
        }
        if let Some(c) = &mut out.covariance {
            *c *= k_unc * k_unc;
        }
        out.projection = Some(Projection {
            from_lumi_ifb: from,
            to_lumi_ifb: lumi_ifb,
            scaling,
        });
        Ok(out)
    }
}

/// Validates a background covariance or correlation matrix and returns the
/// covariance [events²] over the exclusive regions in definition order.
fn matrix(
    ctx: &Ctx<'_>,
    raw: &RawMatrix,
    regions: &[Region],
    correlation: bool,
) -> Result<DMatrix<f64>, SearchError> {
    let kind = if correlation {
        "background_correlation"
    } else {
        "background_covariance"
    };
    let exclusive: Vec<usize> = (0..regions.len())
        .filter(|&i| regions[i].exclusive)
        .collect();
    // Position of each listed region among the exclusive ones.
    let mut order = Vec::with_capacity(raw.regions.len());
    for (k, name) in raw.regions.iter().enumerate() {
        let n = name.get_ref().trim();
        let Some(i) = regions.iter().position(|r| r.name == n) else {
            return Err(ctx.at(
                name.span().start,
                format!("{kind}.regions: no region named \"{n}\""),
            ));
        };
        if !regions[i].exclusive {
            return Err(ctx.at(
                name.span().start,
                format!("{kind}.regions: region \"{n}\" is not exclusive; only exclusive regions are combined"),
            ));
        }
        if raw.regions[..k].iter().any(|o| o.get_ref().trim() == n) {
            return Err(ctx.at(
                name.span().start,
                format!("{kind}.regions: region \"{n}\" listed twice"),
            ));
        }
        // invariant: i is exclusive, so it is in `exclusive`.
        order.push(exclusive.iter().position(|&e| e == i).unwrap_or(0));
    }
    let at = raw.matrix.span().start;
    if order.len() != exclusive.len() {
        return Err(ctx.at(
            at,
            format!(
                "{kind}.regions lists {} regions; it must list every exclusive region ({})",
                order.len(),
                exclusive.len()
            ),
        ));
    }
    let n = order.len();
    let rows = raw.matrix.get_ref();
    if rows.len() != n || rows.iter().any(|r| r.len() != n) {
        let shape: Vec<String> = rows.iter().map(|r| r.len().to_string()).collect();
        return Err(ctx.at(
            at,
            format!(
                "{kind}.matrix must be {n}×{n} (one row and column per listed region), got {} rows of lengths [{}]",
                rows.len(),
                shape.join(", ")
            ),
        ));
    }
    let mut m = DMatrix::<f64>::zeros(n, n);
    for a in 0..n {
        for b in 0..n {
            let v = rows[a][b];
            if !v.is_finite() {
                return Err(ctx.at(
                    at,
                    format!("{kind}.matrix[{a}][{b}] must be finite, got {v}"),
                ));
            }
            let w = rows[b][a];
            if (v - w).abs() > 1e-9 * v.abs().max(w.abs()).max(1e-300) {
                return Err(ctx.at(
                    at,
                    format!(
                        "{kind}.matrix must be symmetric: [{a}][{b}] = {v} but [{b}][{a}] = {w}"
                    ),
                ));
            }
            m[(order[a], order[b])] = v;
        }
    }
    let unc: Vec<f64> = exclusive
        .iter()
        .map(|&i| regions[i].background_unc)
        .collect();
    if correlation {
        for a in 0..n {
            for b in 0..n {
                let rho = m[(a, b)];
                if a == b && (rho - 1.0).abs() > 1e-9 {
                    return Err(ctx.at(
                        at,
                        format!(
                            "{kind}: diagonal entries must be 1, got {rho} for region \"{}\"",
                            regions[exclusive[a]].name
                        ),
                    ));
                }
                if rho.abs() > 1.0 + 1e-12 {
                    return Err(ctx.at(
                        at,
                        format!("{kind}: correlations must lie in [−1, 1], got {rho}"),
                    ));
                }
                m[(a, b)] = rho * unc[a] * unc[b];
            }
        }
    } else {
        for a in 0..n {
            let d = m[(a, a)];
            let want = unc[a] * unc[a];
            if (d - want).abs() > COVARIANCE_DIAGONAL_TOLERANCE * want.max(f64::MIN_POSITIVE) {
                return Err(ctx.at(
                    at,
                    format!(
                        "{kind}: diagonal entry of region \"{}\" is {d} events², but background_unc² = {want} events² (must agree within {} %)",
                        regions[exclusive[a]].name,
                        COVARIANCE_DIAGONAL_TOLERANCE * 100.0
                    ),
                ));
            }
        }
    }
    let eig = m.clone().symmetric_eigen();
    let max = eig.eigenvalues.iter().fold(0.0_f64, |a, &x| a.max(x.abs()));
    let min = eig.eigenvalues.iter().fold(f64::INFINITY, |a, &x| a.min(x));
    if n > 0 && min < -1e-9 * max {
        return Err(ctx.at(
            at,
            format!(
                "{kind} must be positive semi-definite; its smallest eigenvalue is {min:e} events²"
            ),
        ));
    }
    Ok(m)
}
