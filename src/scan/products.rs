//! Whole-scan products of a plan: the collider limit curves in the
//! (m_χ, σ_DM–nucleon) plane, translated from the exclusion contours by the
//! model stage, beside direct-detection curves (computed by the direct stage
//! or imported), all in `dm_nucleon.csv`; and the figures (exclusion plane
//! and DM–nucleon plane, SVG with their data beside them).
//!
//! Fed by the scan's contours, [`crate::model`], [`crate::direct`] and
//! [`crate::plot`]. This is the one place where the scan uses the stages
//! listed after it: they are independent of the collider chain, and the
//! comparison is what the scan is for.

use std::path::Path;

use super::ScanError;
use super::atomic::write_atomic;
use super::contour::{Contour, ContourLevel};
use super::exclusion::translate_contours;
use super::output::PointResult;
use super::plan::{MediatorKind, ScanPlan};
use super::run::ScanProducts;
use crate::direct::{self, Experiment};
use crate::model::{self, Nucleon, NucleonParams};
use crate::plot::{self, Curve, CurveSource, Interaction};
use crate::search::Search;

/// The products a plan asks for, with every input read and validated.
#[derive(Debug)]
pub struct PlanProducts {
    mediator: MediatorKind,
    params: NucleonParams,
    cl: f64,
    experiments: Vec<(String, Experiment)>,
    imported: Vec<Curve>,
    masses_gev: Vec<f64>,
    figures: bool,
    title: String,
    sqrt_s_tev: f64,
    lumi_ifb: f64,
}

/// DM–nucleon interactions a mediator's collider limit translates into,
/// with the nucleon of each.
fn interactions(kind: MediatorKind) -> &'static [(Interaction, Nucleon)] {
    match kind {
        MediatorKind::Vector | MediatorKind::Scalar => {
            &[(Interaction::SpinIndependent, Nucleon::Proton)]
        }
        MediatorKind::Axial => &[
            (Interaction::SpinDependentProton, Nucleon::Proton),
            (Interaction::SpinDependentNeutron, Nucleon::Neutron),
        ],
        MediatorKind::Pseudoscalar => &[],
    }
}

fn direct_interaction(i: Interaction) -> direct::Interaction {
    match i {
        Interaction::SpinIndependent => direct::Interaction::Si,
        Interaction::SpinDependentProton => direct::Interaction::SdProton,
        Interaction::SpinDependentNeutron => direct::Interaction::SdNeutron,
    }
}

impl PlanProducts {
    /// Reads the experiments and imported curves of `plan` and checks the
    /// nucleon parameter set (no event is read).
    pub fn new(plan: &ScanPlan) -> Result<Self, ScanError> {
        let at =
            |e: &dyn std::fmt::Display| ScanError::Plan(format!("{}: {e}", plan.path.display()));
        let params = NucleonParams::by_name(&plan.dm_nucleon.nucleon_params).map_err(|e| at(&e))?;
        let experiments = plan
            .direct
            .iter()
            .map(|d| {
                Ok((
                    d.label.clone(),
                    Experiment::from_toml_file(&d.experiment).map_err(|e| at(&e))?,
                ))
            })
            .collect::<Result<_, ScanError>>()?;
        let imported = plan
            .imported
            .iter()
            .map(|c| {
                let interaction = Interaction::parse(&c.interaction).ok_or_else(|| {
                    at(&format!(
                        "[[imported]] {}: unknown interaction {}",
                        c.label, c.interaction
                    ))
                })?;
                let points = direct::read_curve_csv(&c.file).map_err(|e| at(&e))?;
                Ok(Curve {
                    label: c.label.clone(),
                    source: CurveSource::Imported,
                    cl: c.cl,
                    interaction,
                    points,
                })
            })
            .collect::<Result<_, ScanError>>()?;
        let o = &plan.dm_nucleon;
        let masses_gev =
            direct::log_mass_grid(o.m_min_gev, o.m_max_gev, o.n_masses).map_err(|e| at(&e))?;
        let search = Search::from_toml_file(&plan.search).map_err(|e| at(&e))?;
        Ok(Self {
            mediator: plan.mediator,
            params,
            cl: plan.limit.cl,
            experiments,
            imported,
            masses_gev,
            figures: o.figures,
            title: search.title().to_string(),
            sqrt_s_tev: search.sqrt_s_tev(),
            lumi_ifb: search.lumi_ifb(),
        })
    }

    /// The collider curves: each contour polyline translated point by point
    /// into σ(m_χ) at the scan's couplings ([`translate_contours`], which
    /// `recoil translate` also uses on a finished folder).
    fn collider_curves(
        &self,
        rows: &[PointResult],
        contours: &[Contour],
        warnings: &mut Vec<String>,
    ) -> Result<Vec<Curve>, ScanError> {
        let Some(first) = rows.first() else {
            return Ok(Vec::new());
        };
        if self.mediator == MediatorKind::Pseudoscalar {
            warnings.push(
                "no collider curve in the DM–nucleon plane: pseudoscalar exchange is \
                 momentum-suppressed in DM–nucleon scattering"
                    .into(),
            );
            return Ok(Vec::new());
        }
        let c = &first.couplings;
        let couplings = model::Couplings::with_leptons(c.g_q, c.g_dm, c.g_l)
            .map_err(|e| ScanError::Contour(e.to_string()))?;
        let mut curves = Vec::new();
        for &(interaction, nucleon) in interactions(self.mediator) {
            let translated = translate_contours(
                self.mediator,
                couplings,
                &[nucleon],
                &self.params,
                self.cl,
                contours,
            )
            .map_err(|e| ScanError::Contour(e.to_string()))?;
            for t in translated {
                let name = match t.level {
                    ContourLevel::Observed => "collider observed",
                    ContourLevel::Expected => "collider expected",
                    ContourLevel::ExpectedM1 => "collider expected −1σ",
                    ContourLevel::ExpectedP1 => "collider expected +1σ",
                };
                let label = if t.n_segments > 1 {
                    format!("{name} ({}) {}", t.segment + 1, interaction.as_str())
                } else {
                    format!("{name} {}", interaction.as_str())
                };
                curves.push(Curve {
                    label,
                    source: CurveSource::Collider,
                    cl: self.cl,
                    interaction,
                    points: t
                        .curve
                        .points
                        .iter()
                        .map(|p| (p.m_dm_gev, p.sigma_obs_cm2))
                        .collect(),
                });
            }
        }
        Ok(curves)
    }

    /// Observed and median expected direct-detection curves for the
    /// interactions of the collider curves (SI when there are none).
    fn direct_curves(&self) -> Result<Vec<Curve>, ScanError> {
        let mut wanted: Vec<Interaction> =
            interactions(self.mediator).iter().map(|p| p.0).collect();
        if wanted.is_empty() {
            wanted.push(Interaction::SpinIndependent);
        }
        let mut curves = Vec::new();
        for (label, exp) in &self.experiments {
            for &interaction in &wanted {
                for kind in [
                    direct::LimitKind::Observed,
                    direct::LimitKind::MedianExpected,
                ] {
                    let points = direct::limit_curve_points(
                        exp,
                        &self.masses_gev,
                        direct_interaction(interaction),
                        kind,
                    )
                    .map_err(|e| ScanError::Plan(format!("direct-detection curve {label}: {e}")))?;
                    curves.push(Curve {
                        label: format!("{label} {} {}", kind.label(), interaction.as_str()),
                        source: CurveSource::Direct,
                        cl: exp.cl(),
                        interaction,
                        points: points.iter().map(|p| (p.m_dm_gev, p.sigma_cm2)).collect(),
                    });
                }
            }
        }
        Ok(curves)
    }

    fn labels(&self, rows: &[PointResult]) -> plot::Labels {
        plot::Labels {
            title: Some(self.title.clone()),
            mediator: Some(self.mediator.name().to_string()),
            couplings: rows
                .first()
                .map(|r| format!("g_q = {}, g_χ = {}", r.couplings.g_q, r.couplings.g_dm)),
            sqrt_s_tev: Some(self.sqrt_s_tev),
            lumi_ifb: Some(self.lumi_ifb),
            collider_cl: self.cl,
            notes: Vec::new(),
        }
    }

    fn draw(
        &self,
        rows: &[PointResult],
        contours: &[Contour],
        curves: &[Curve],
        out: &Path,
        warnings: &mut Vec<String>,
    ) {
        let labels = self.labels(rows);
        let data = plot::ExclusionData {
            points: rows
                .iter()
                .map(|r| plot::ScanPoint {
                    m_med_gev: r.m_med_gev,
                    m_dm_gev: r.m_dm_gev,
                    excluded: r.excluded(),
                })
                .collect(),
            contours: contours
                .iter()
                .flat_map(|c| {
                    let level = plot::ContourLevel::parse(c.level.name());
                    c.segments.iter().filter_map(move |s| {
                        Some(plot::ContourLine {
                            level: level?,
                            points: s.iter().map(|p| (p[0], p[1])).collect(),
                        })
                    })
                })
                .collect(),
        };
        if let Err(e) = plot::exclusion_figure(&data, &labels, &out.join("exclusion.svg")) {
            warnings.push(format!("exclusion figure not drawn: {e}"));
        }
        for interaction in [
            Interaction::SpinIndependent,
            Interaction::SpinDependentProton,
            Interaction::SpinDependentNeutron,
        ] {
            let these: Vec<Curve> = curves
                .iter()
                .filter(|c| c.interaction == interaction)
                .cloned()
                .collect();
            if these.is_empty() {
                continue;
            }
            let path = out.join(format!("dm_nucleon_{}.svg", interaction.as_str()));
            if let Err(e) = plot::dm_nucleon_figure(&these, &labels, &path) {
                warnings.push(format!("{} not drawn: {e}", path.display()));
            }
        }
    }
}

impl ScanProducts for PlanProducts {
    fn write(
        &self,
        _plan: &ScanPlan,
        rows: &[PointResult],
        contours: &[Contour],
        out: &Path,
    ) -> Result<Vec<String>, ScanError> {
        let mut warnings = Vec::new();
        let mut curves = self.collider_curves(rows, contours, &mut warnings)?;
        curves.extend(self.direct_curves()?);
        curves.extend(self.imported.iter().cloned());
        let path = out.join("dm_nucleon.csv");
        // The plot stage's long format, so the file and the figure's data agree.
        let text = plot::dm_nucleon::dm_nucleon_table(&curves)
            .to_csv()
            .map_err(|e| ScanError::Output {
                path: path.clone(),
                message: e.to_string(),
            })?;
        write_atomic(&path, text.as_bytes())?;
        if self.figures {
            self.draw(rows, contours, &curves, out, &mut warnings);
        }
        Ok(warnings)
    }
}
