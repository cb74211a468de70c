//! Shards for batch systems and their merge.
//!
//! `--shard i/n` (0 ≤ i < n) takes the points whose table index k has
//! k mod n = i: a deterministic subset that depends only on the table, and
//! that spreads neighbouring (similar-cost) points over the shards. Each
//! shard writes its own output folder; [`merge_shards`] checks that the
//! folders come from the same plan and code version and together hold every
//! point exactly once, then writes the same files a single run would.

use std::path::{Path, PathBuf};
use std::str::FromStr;

use super::ScanError;
use super::atomic::ensure_dir;
use super::output::{PointResult, ScanManifest, ShardRecord, read_point, write_point};
use super::plan::ScanPlan;
use super::run::{ScanProducts, write_outputs};

/// One of `count` deterministic subsets of a plan's points.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Shard {
    index: usize,
    count: usize,
}

impl Shard {
    /// The whole scan (shard 0/1).
    pub const WHOLE: Self = Self { index: 0, count: 1 };

    /// Shard `index` of `count` (requires 0 ≤ index < count).
    pub fn new(index: usize, count: usize) -> Result<Self, ScanError> {
        if count == 0 || index >= count {
            return Err(ScanError::Shard(format!(
                "shard {index}/{count}: the index must be in 0..{count} (0-based) and the count >= 1"
            )));
        }
        Ok(Self { index, count })
    }

    /// Shard index (0-based).
    pub fn index(&self) -> usize {
        self.index
    }

    /// Number of shards.
    pub fn count(&self) -> usize {
        self.count
    }

    /// Whether the point of table index `point` belongs to this shard.
    pub fn contains(&self, point: usize) -> bool {
        point % self.count == self.index
    }
}

impl Default for Shard {
    fn default() -> Self {
        Self::WHOLE
    }
}

impl FromStr for Shard {
    type Err = ScanError;

    /// Parses `i/n`.
    fn from_str(s: &str) -> Result<Self, ScanError> {
        let bad = || {
            ScanError::Shard(format!(
                "shard \"{s}\": expected i/n with 0 <= i < n, e.g. 0/4 (0-based index)"
            ))
        };
        let (i, n) = s.split_once('/').ok_or_else(bad)?;
        let i = i.trim().parse().map_err(|_| bad())?;
        let n = n.trim().parse().map_err(|_| bad())?;
        Self::new(i, n)
    }
}

impl std::fmt::Display for Shard {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(f, "{}/{}", self.index, self.count)
    }
}

/// What a merge produced.
#[derive(Debug, Clone, PartialEq)]
pub struct MergeSummary {
    /// The merged results, in table order.
    pub rows: Vec<PointResult>,
    /// Number of shard folders merged.
    pub shards: usize,
    /// Warnings recorded in `result.json`.
    pub warnings: Vec<String>,
}

/// Merges the output folders of the shards of one scan into `out`.
///
/// Refuses folders of different plans or code versions, a plan changed
/// since the shards ran, a shard given twice or missing, an incomplete shard
/// (no `result.json`), and point files that do not match their shard's
/// record.
pub fn merge_shards(
    dirs: &[PathBuf],
    out: &Path,
    products: &dyn ScanProducts,
) -> Result<MergeSummary, ScanError> {
    let Some(first_dir) = dirs.first() else {
        return Err(ScanError::Merge("merge: no shard folders given".into()));
    };
    let manifests: Vec<ScanManifest> = dirs
        .iter()
        .map(|d| {
            ScanManifest::read(d).map_err(|e| {
                ScanError::Merge(format!(
                    "{}: not a finished scan output (is the shard complete?): {e}",
                    d.display()
                ))
            })
        })
        .collect::<Result<_, _>>()?;
    let first = &manifests[0];
    let version = super::code_version();
    for (d, m) in dirs.iter().zip(&manifests) {
        if m.version != version {
            return Err(ScanError::Merge(format!(
                "{}: written by {}, but this is {version}; re-run the shard",
                d.display(),
                m.version
            )));
        }
        if m.plan_fingerprint != first.plan_fingerprint {
            return Err(ScanError::Merge(format!(
                "{}: from another plan than {} (plan fingerprints {} and {})",
                d.display(),
                first_dir.display(),
                short(&m.plan_fingerprint),
                short(&first.plan_fingerprint)
            )));
        }
        if m.shard.count != first.shard.count {
            return Err(ScanError::Merge(format!(
                "{}: shard {}/{} does not match shard {}/{} of {}",
                d.display(),
                m.shard.index,
                m.shard.count,
                first.shard.index,
                first.shard.count,
                first_dir.display()
            )));
        }
    }
    let n = first.shard.count;
    let mut owner: Vec<Option<&PathBuf>> = vec![None; n];
    for (d, m) in dirs.iter().zip(&manifests) {
        if let Some(prev) = owner[m.shard.index].replace(d) {
            return Err(ScanError::Merge(format!(
                "shard {}/{n} given twice: {} and {}",
                m.shard.index,
                prev.display(),
                d.display()
            )));
        }
    }
    if let Some(missing) = owner.iter().position(Option::is_none) {
        return Err(ScanError::Merge(format!(
            "shard {missing}/{n} is missing (give all {n} shard folders)"
        )));
    }

    let plan = ScanPlan::from_toml_file(&first.plan).map_err(|e| {
        ScanError::Merge(format!(
            "cannot re-read the plan {} of the shards: {e}",
            first.plan.display()
        ))
    })?;
    if plan.plan_fingerprint != first.plan_fingerprint {
        return Err(ScanError::Merge(format!(
            "{}: the plan or its inputs changed since the shards ran; re-run them",
            first.plan.display()
        )));
    }

    let mut rows: Vec<PointResult> = Vec::with_capacity(first.n_points_total);
    let mut input_files = Vec::new();
    for (d, m) in dirs.iter().zip(&manifests) {
        for (&index, fp) in m.points.iter().zip(&m.point_fingerprints) {
            let row = read_point(d, index)?.ok_or_else(|| {
                ScanError::Merge(format!(
                    "{}: result of point {index} is missing",
                    d.display()
                ))
            })?;
            if &row.fingerprint != fp {
                return Err(ScanError::Merge(format!(
                    "{}: result of point {index} does not belong to this shard's run",
                    d.display()
                )));
            }
            rows.push(row);
        }
        input_files.extend(m.input_files.iter().cloned());
    }
    rows.sort_by_key(|r| r.index);
    input_files.sort_by_key(|f| f.point);
    let complete =
        rows.len() == plan.points.len() && rows.iter().enumerate().all(|(k, r)| r.index == k);
    if !complete {
        return Err(ScanError::Merge(format!(
            "the shards hold {} results for the plan's {} points",
            rows.len(),
            plan.points.len()
        )));
    }

    ensure_dir(out)?;
    for r in &rows {
        write_point(out, r)?;
    }
    let mut manifest = ScanManifest::new(
        &plan,
        ShardRecord { index: 0, count: 1 },
        rows.iter().map(|r| r.index).collect(),
        rows.iter().map(|r| r.fingerprint.clone()).collect(),
        manifests.iter().all(|m| m.cache_used),
        input_files,
    );
    manifest.merged_from = dirs.to_vec();
    let (_, warnings) = write_outputs(&plan, manifest, &rows, products, out)?;
    Ok(MergeSummary {
        rows,
        shards: dirs.len(),
        warnings,
    })
}

fn short(fp: &str) -> &str {
    fp.get(..12).unwrap_or(fp)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn parses_and_validates() {
        let s: Shard = "2/5".parse().unwrap();
        assert_eq!((s.index(), s.count()), (2, 5));
        assert_eq!(s.to_string(), "2/5");
        for bad in ["5/5", "1/0", "a/3", "3", "-1/3", ""] {
            assert!(bad.parse::<Shard>().is_err(), "{bad}");
        }
    }

    #[test]
    fn shards_partition_the_points() {
        let n = 4;
        for k in 0..50 {
            let owners = (0..n)
                .filter(|&i| Shard::new(i, n).unwrap().contains(k))
                .count();
            assert_eq!(owners, 1);
        }
    }
}
