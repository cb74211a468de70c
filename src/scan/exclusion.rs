//! A scan's exclusion contours in the DM–nucleon plane: the one translation
//! of contour polylines into σ(m_χ) (used by the scan's own products and by
//! `recoil translate`), and the reading back of a finished scan folder
//! (`result.json`, `results.csv`, `contours.csv`) for that translation.
//!
//! Fed by [`super::contour`] (or the files it writes) and [`crate::model`];
//! the files are read with the figure stage's readers ([`crate::plot::data`]),
//! so every rule on them is stated once.

use std::path::{Path, PathBuf};

use serde::Deserialize;

use super::ScanError;
use super::contour::{Contour, ContourLevel};
use super::output::ShardRecord;
use super::plan::{MediatorKind, PointCouplings};
use crate::model::{
    self, BoundaryPoint, ColliderCurve, Couplings, ModelError, Nucleon, NucleonParams,
    ScatteringType,
};
use crate::plot;

/// One polyline of an exclusion contour translated into the DM–nucleon
/// plane.
#[derive(Debug, Clone, PartialEq)]
pub struct ContourCurve {
    /// Which limit the contour traces.
    pub level: ContourLevel,
    /// Index of the polyline within its level (0-based, in order).
    pub segment: usize,
    /// Number of polylines of that level.
    pub n_segments: usize,
    /// σ(m_χ) along the polyline, in its order. Each point's
    /// `m_med_limit_obs_gev` is the contour's mediator mass and
    /// `sigma_obs_cm2` the cross-section there, whatever the level (a
    /// contour is one boundary); the expected fields are empty.
    pub curve: ColliderCurve,
}

/// Translates exclusion contours into the DM–nucleon plane: each polyline
/// of each level, point by point, with [`model::collider_curve`] at
/// `couplings`, for each of `nucleons`. Order: nucleon, then level (as in
/// `contours`), then polyline.
///
/// # Formula
/// σ(m_χ) = σ_{SI/SD}(g_q, g_DM, M, μ_nχ) at every contour point (M, m_χ);
/// see [`model::collider_curve`].
///
/// # References
/// A. Boveia et al., arXiv:1603.04156 (the translation procedure).
///
/// # Errors
/// A pseudoscalar mediator ([`ModelError::MomentumSuppressed`], also when
/// there is no contour); `cl` outside (0, 1); a contour point with a mass
/// that is not finite and > 0.
pub fn translate_contours(
    mediator: MediatorKind,
    couplings: Couplings,
    nucleons: &[Nucleon],
    params: &NucleonParams,
    cl: f64,
    contours: &[Contour],
) -> Result<Vec<ContourCurve>, ModelError> {
    ScatteringType::for_mediator(mediator)?;
    let mut out = Vec::new();
    for &nucleon in nucleons {
        for contour in contours {
            for (segment, line) in contour.segments.iter().enumerate() {
                let boundary: Vec<BoundaryPoint> = line
                    .iter()
                    .map(|&[m_med, m_dm]| BoundaryPoint {
                        m_dm_gev: m_dm,
                        m_med_limit_obs_gev: m_med,
                        m_med_limit_exp_gev: None,
                    })
                    .collect();
                let curve =
                    model::collider_curve(mediator, couplings, nucleon, params, cl, &boundary)?;
                out.push(ContourCurve {
                    level: contour.level,
                    segment,
                    n_segments: contour.segments.len(),
                    curve,
                });
            }
        }
    }
    Ok(out)
}

/// The fields of `result.json` the translation needs (the rest of the
/// manifest is not required, so a hand-made file may hold only these).
#[derive(Debug, Deserialize)]
struct ManifestModel {
    mediator: MediatorKind,
    reference_couplings: PointCouplings,
    limit: ManifestLimit,
    #[serde(default)]
    shard: Option<ShardRecord>,
    #[serde(default)]
    nucleon_params: Option<String>,
}

#[derive(Debug, Deserialize)]
struct ManifestLimit {
    cl: f64,
}

/// A finished scan's exclusion, read back from its output folder.
#[derive(Debug, Clone, PartialEq)]
pub struct ScanExclusion {
    /// The output folder.
    pub dir: PathBuf,
    /// Its `result.json` (as given, or in the folder).
    pub manifest: PathBuf,
    /// Mediator type (`result.json`: `mediator`).
    pub mediator: MediatorKind,
    /// Couplings the events were generated with (`result.json`:
    /// `reference_couplings`).
    pub reference: PointCouplings,
    /// Couplings at which the points were evaluated, so the couplings of
    /// the contours: g_q and g_DM from `results.csv` (one set for all
    /// points), g_ℓ from the reference (`results.csv` does not list it; it
    /// does not enter σ_SI or σ_SD).
    pub couplings: PointCouplings,
    /// Confidence level of the limits (`result.json`: `limit.cl`).
    pub cl: f64,
    /// Nucleon parameter set the scan translated with (`result.json`:
    /// `nucleon_params`; absent in folders written before it was recorded).
    pub nucleon_params: Option<String>,
    /// Number of points in `results.csv`.
    pub n_points: usize,
    /// Number of those excluded (μ_up,obs < 1).
    pub n_excluded: usize,
    /// The contours of `contours.csv`, one per level in
    /// [`ContourLevel::ALL`] order (a level without a line has no
    /// segments); polylines numbered within each level in file order.
    pub contours: Vec<Contour>,
}

impl ScanExclusion {
    /// Whether `path` names a scan output rather than a boundary table: a
    /// folder, or a `.json` file (the folder's `result.json`).
    pub fn is_scan_path(path: &Path) -> bool {
        path.is_dir()
            || path
                .extension()
                .and_then(|e| e.to_str())
                .is_some_and(|e| e.eq_ignore_ascii_case("json"))
    }

    /// Reads a scan output folder, given as the folder or as its
    /// `result.json`: the mediator, the reference couplings and the
    /// confidence level from `result.json`, the points' couplings from
    /// `results.csv`, the contours from `contours.csv` (all three beside each
    /// other).
    ///
    /// # Errors
    /// A missing or unreadable file; a `result.json` without one of the
    /// fields (named) or with a confidence level outside (0, 1); points with
    /// different couplings; a malformed `contours.csv` row (file, line and
    /// column named).
    pub fn read(path: &Path) -> Result<Self, ScanError> {
        let (dir, manifest_path) = if path.is_dir() {
            (path.to_path_buf(), path.join("result.json"))
        } else {
            let dir = match path.parent() {
                Some(p) if !p.as_os_str().is_empty() => p.to_path_buf(),
                _ => PathBuf::from("."),
            };
            (dir, path.to_path_buf())
        };
        let bad = |message: String| ScanError::Output {
            path: manifest_path.clone(),
            message,
        };
        let text = std::fs::read_to_string(&manifest_path).map_err(|e| {
            if e.kind() == std::io::ErrorKind::NotFound {
                bad(
                    "not found: not a finished scan output folder (the scan writes \
                     result.json last)"
                        .into(),
                )
            } else {
                ScanError::io(&manifest_path, e)
            }
        })?;
        let m: ManifestModel =
            serde_json::from_str(&text).map_err(|e| bad(format!("not a scan result file: {e}")))?;
        if !(m.limit.cl > 0.0 && m.limit.cl < 1.0) {
            return Err(bad(format!(
                "field limit.cl: must be in (0, 1), got {}",
                m.limit.cl
            )));
        }

        let results_path = dir.join("results.csv");
        let rows = plot::data::read_scan_results(&results_path)?;
        // invariant: read_scan_results refuses a table without rows.
        let first = &rows[0];
        if let Some(r) = rows
            .iter()
            .find(|r| r.g_q != first.g_q || r.g_dm != first.g_dm)
        {
            return Err(ScanError::Output {
                path: results_path,
                message: format!(
                    "points {} (g_q = {}, g_dm = {}) and {} (g_q = {}, g_dm = {}) have \
                     different couplings; contours and their translation need one set",
                    first.point, first.g_q, first.g_dm, r.point, r.g_q, r.g_dm
                ),
            });
        }
        let couplings = PointCouplings {
            g_q: first.g_q,
            g_dm: first.g_dm,
            g_l: m.reference_couplings.g_l,
        };

        let contours_path = dir.join("contours.csv");
        if !contours_path.exists() {
            let why = match m.shard {
                Some(s) if s.count > 1 => format!(
                    "this folder holds shard {} of {}; merge the shards first, the merged \
                     folder has the contours",
                    s.index + 1,
                    s.count
                ),
                _ => "a scan writes it beside results.csv for a whole scan".to_string(),
            };
            return Err(ScanError::Output {
                path: contours_path,
                message: format!("not found ({why})"),
            });
        }
        let lines = plot::data::read_contours(&contours_path)?;
        let contours = ContourLevel::ALL
            .into_iter()
            .map(|level| Contour {
                level,
                segments: lines
                    .iter()
                    .filter(|l| ContourLevel::from_name(l.level.as_str()) == Some(level))
                    .map(|l| l.points.iter().map(|&(m, d)| [m, d]).collect())
                    .collect(),
            })
            .collect();
        Ok(Self {
            dir,
            manifest: manifest_path,
            mediator: m.mediator,
            reference: m.reference_couplings,
            couplings,
            cl: m.limit.cl,
            nucleon_params: m.nucleon_params.filter(|n| !n.is_empty()),
            n_points: rows.len(),
            n_excluded: rows.iter().filter(|r| r.point_masses.excluded).count(),
            contours,
        })
    }

    /// The contours' couplings as the model stage's type.
    ///
    /// # Errors
    /// Couplings that break the model's rules (named).
    pub fn model_couplings(&self) -> Result<Couplings, ModelError> {
        let c = &self.couplings;
        Couplings::with_leptons(c.g_q, c.g_dm, c.g_l)
    }

    /// Whether no level has a contour line.
    pub fn is_empty(&self) -> bool {
        self.contours.iter().all(|c| c.segments.is_empty())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn folder(contours: &str) -> tempfile::TempDir {
        let dir = tempfile::tempdir().unwrap();
        let d = dir.path();
        std::fs::write(
            d.join("result.json"),
            r#"{"mediator": "vector", "limit": {"cl": 0.95},
                "reference_couplings": {"g_q": 0.25, "g_dm": 1.0, "g_l": 0.0}}"#,
        )
        .unwrap();
        std::fs::write(
            d.join("results.csv"),
            "point,m_med_gev,m_dm_gev,g_q,g_dm,excluded\na,1000,1,0.25,1,true\n",
        )
        .unwrap();
        std::fs::write(d.join("contours.csv"), contours).unwrap();
        dir
    }

    #[test]
    fn levels_are_grouped_and_segments_kept_in_file_order() {
        let dir = folder(
            "level,segment,m_med_gev,m_dm_gev\nexpected,0,900,5\nobserved,0,1000,1\n\
             observed,0,1100,2\nobserved,1,700,3\nexpected,0,950,6\n",
        );
        let s = ScanExclusion::read(dir.path()).unwrap();
        assert_eq!(s.mediator, MediatorKind::Vector);
        assert_eq!((s.cl, s.n_points, s.n_excluded), (0.95, 1, 1));
        let levels: Vec<_> = s.contours.iter().map(|c| c.level).collect();
        assert_eq!(levels, ContourLevel::ALL);
        assert_eq!(
            s.contours[0].segments,
            vec![vec![[1000.0, 1.0], [1100.0, 2.0]], vec![[700.0, 3.0]]]
        );
        assert_eq!(
            s.contours[1].segments,
            vec![vec![[900.0, 5.0], [950.0, 6.0]]]
        );
        assert!(s.contours[2].segments.is_empty() && !s.is_empty());
    }

    #[test]
    fn pseudoscalar_is_refused_even_without_contours() {
        // REFERENCES §4: pseudoscalar DM–nucleon scattering is
        // momentum-suppressed; say so rather than give a number.
        let e = translate_contours(
            MediatorKind::Pseudoscalar,
            Couplings::new(1.0, 1.0).unwrap(),
            &Nucleon::BOTH,
            &NucleonParams::DMWG2016,
            0.95,
            &[],
        )
        .unwrap_err();
        assert!(matches!(e, ModelError::MomentumSuppressed), "{e}");
    }
}
