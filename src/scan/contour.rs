//! Exclusion contours: level sets μ_up = 1 on the (M, m_χ) grid, traced with
//! marching squares.
//!
//! The field is interpolated in log space: coordinates x = ln M, y = ln m_χ,
//! value f = ln μ_up, linear along every grid edge (the bilinear interpolant
//! of each cell restricted to its edges). Saddle cells are resolved with the
//! asymptotic decider, i.e. by the sign of the bilinear interpolant at its
//! saddle point, so the traced topology is that of the bilinear surface.
//! Cells with a missing corner (no point, or a non-numeric μ_up) are left
//! out, so contours end there as they end at the grid edge. Crossing points
//! are stitched into polylines through the grid edges they lie on: open
//! polylines run from one end on the boundary (or a hole) to the other,
//! closed ones repeat their first point at the end.
//!
//! # References
//! - W. E. Lorensen, H. E. Cline, "Marching cubes", Computer Graphics 21(4)
//!   (1987) 163 (the cell-by-cell method; squares are its 2-D case).
//! - G. M. Nielson, B. Hamann, "The asymptotic decider: resolving the
//!   ambiguity in marching cubes", Proc. IEEE Visualization '91, 83
//!   (saddle value (f₀₀f₁₁ − f₁₀f₀₁)/(f₀₀ + f₁₁ − f₁₀ − f₀₁)).

use std::collections::BTreeMap;

use super::ScanError;
use super::output::PointResult;

/// Values of a field on a rectilinear grid.
#[derive(Debug, Clone, PartialEq)]
pub struct Grid {
    /// Node abscissae, strictly increasing.
    pub x: Vec<f64>,
    /// Node ordinates, strictly increasing.
    pub y: Vec<f64>,
    /// Values, row by row: `values[j * x.len() + i]` is at (x\[i\], y\[j\]).
    /// NaN marks a missing node.
    pub values: Vec<f64>,
}

impl Grid {
    /// Validates the grid shape.
    pub fn new(x: Vec<f64>, y: Vec<f64>, values: Vec<f64>) -> Result<Self, ScanError> {
        for (name, axis) in [("x", &x), ("y", &y)] {
            if axis.len() < 2 {
                return Err(ScanError::Contour(format!(
                    "contour grid: axis {name} needs at least 2 nodes, got {}",
                    axis.len()
                )));
            }
            if !axis.iter().all(|v| v.is_finite()) || axis.windows(2).any(|w| w[0] >= w[1]) {
                return Err(ScanError::Contour(format!(
                    "contour grid: axis {name} must be finite and strictly increasing"
                )));
            }
        }
        if values.len() != x.len() * y.len() {
            return Err(ScanError::Contour(format!(
                "contour grid: {} values for {}×{} nodes",
                values.len(),
                x.len(),
                y.len()
            )));
        }
        Ok(Self { x, y, values })
    }

    fn at(&self, i: usize, j: usize) -> f64 {
        self.values[j * self.x.len() + i]
    }
}

/// A grid edge: horizontal from node (i, j) to (i+1, j), or vertical from
/// (i, j) to (i, j+1). Ordered, so stitching is deterministic.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord)]
enum Edge {
    H(usize, usize),
    V(usize, usize),
}

/// Traces the level set `value = level` of `grid`; returns polylines of
/// (x, y) points. A node is "above" when its value is ≥ `level`.
pub fn trace_level(grid: &Grid, level: f64) -> Vec<Vec<[f64; 2]>> {
    let nx = grid.x.len();
    let ny = grid.y.len();
    let a = |i: usize, j: usize| grid.at(i, j) - level;
    let crossing = |e: Edge| -> [f64; 2] {
        let ((i0, j0), (i1, j1)) = match e {
            Edge::H(i, j) => ((i, j), (i + 1, j)),
            Edge::V(i, j) => ((i, j), (i, j + 1)),
        };
        let (fa, fb) = (a(i0, j0), a(i1, j1));
        // The two ends lie on opposite sides, so fa − fb ≠ 0.
        let t = fa / (fa - fb);
        [
            grid.x[i0] + t * (grid.x[i1] - grid.x[i0]),
            grid.y[j0] + t * (grid.y[j1] - grid.y[j0]),
        ]
    };

    let mut segments: Vec<[Edge; 2]> = Vec::new();
    for j in 0..ny - 1 {
        for i in 0..nx - 1 {
            let c = [a(i, j), a(i + 1, j), a(i + 1, j + 1), a(i, j + 1)];
            if c.iter().any(|v| v.is_nan()) {
                continue;
            }
            let up = c.map(|v| v >= 0.0);
            let bottom = Edge::H(i, j);
            let right = Edge::V(i + 1, j);
            let top = Edge::H(i, j + 1);
            let left = Edge::V(i, j);
            // Corner k lies between edges corner_edges[k].
            let corner_edges = [[left, bottom], [bottom, right], [right, top], [top, left]];
            let crossed: Vec<Edge> = [
                (up[0] != up[1], bottom),
                (up[1] != up[2], right),
                (up[2] != up[3], top),
                (up[3] != up[0], left),
            ]
            .into_iter()
            .filter_map(|(x, e)| x.then_some(e))
            .collect();
            match crossed.len() {
                2 => segments.push([crossed[0], crossed[1]]),
                4 => {
                    // Saddle: corners 0, 2 on one side, 1, 3 on the other.
                    let saddle = (c[0] * c[2] - c[1] * c[3]) / (c[0] + c[2] - c[1] - c[3]);
                    let centre_up = saddle >= 0.0;
                    for k in 0..4 {
                        if up[k] != centre_up {
                            segments.push(corner_edges[k]);
                        }
                    }
                }
                _ => {}
            }
        }
    }

    let mut incident: BTreeMap<Edge, Vec<usize>> = BTreeMap::new();
    for (s, seg) in segments.iter().enumerate() {
        for e in seg {
            incident.entry(*e).or_default().push(s);
        }
    }
    let mut used = vec![false; segments.len()];
    let mut lines = Vec::new();
    let walk = |start: Edge, first: usize, used: &mut Vec<bool>| {
        let mut line = vec![crossing(start)];
        let (mut edge, mut seg) = (start, first);
        loop {
            used[seg] = true;
            let [e0, e1] = segments[seg];
            edge = if e0 == edge { e1 } else { e0 };
            line.push(crossing(edge));
            match incident[&edge].iter().find(|&&s| !used[s]) {
                Some(&s) => seg = s,
                None => break,
            }
        }
        line
    };
    // Open polylines first, from their smallest end edge.
    for (edge, segs) in &incident {
        if segs.len() == 1 && !used[segs[0]] {
            lines.push(walk(*edge, segs[0], &mut used));
        }
    }
    // Then closed loops.
    for s in 0..segments.len() {
        if !used[s] {
            lines.push(walk(segments[s][0], s, &mut used));
        }
    }
    lines
}

/// The four exclusion contours of a scan.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum ContourLevel {
    /// Observed μ_up = 1.
    Observed,
    /// Median expected μ_up = 1.
    Expected,
    /// Expected μ_up at −1σ equal to 1.
    ExpectedM1,
    /// Expected μ_up at +1σ equal to 1.
    ExpectedP1,
}

impl ContourLevel {
    /// All levels, in the order they are written.
    pub const ALL: [Self; 4] = [
        Self::Observed,
        Self::Expected,
        Self::ExpectedM1,
        Self::ExpectedP1,
    ];

    /// Name in `contours.csv`.
    pub fn name(self) -> &'static str {
        match self {
            Self::Observed => "observed",
            Self::Expected => "expected",
            Self::ExpectedM1 => "expected_m1",
            Self::ExpectedP1 => "expected_p1",
        }
    }

    /// The level named `name` in `contours.csv`.
    pub fn from_name(name: &str) -> Option<Self> {
        Self::ALL.into_iter().find(|l| l.name() == name)
    }

    /// The point's upper limit on μ for this level.
    pub fn mu(self, r: &PointResult) -> f64 {
        match self {
            Self::Observed => r.mu_up_obs,
            Self::Expected => r.mu_up_exp[2],
            Self::ExpectedM1 => r.mu_up_exp[1],
            Self::ExpectedP1 => r.mu_up_exp[3],
        }
    }
}

/// One exclusion contour: polylines of (M [GeV], m_χ [GeV]).
#[derive(Debug, Clone, PartialEq)]
pub struct Contour {
    /// Which limit.
    pub level: ContourLevel,
    /// Polylines, each a list of (m_med_gev, m_dm_gev) in order.
    pub segments: Vec<Vec<[f64; 2]>>,
}

/// Limits on μ are clamped to [1/`MU_CLAMP`, `MU_CLAMP`] before taking the
/// logarithm, so a point without sensitivity (μ_up = ∞) still takes part in
/// the interpolation; the clamp only moves a crossing next to such a point
/// (by at most ln 1/ln `MU_CLAMP` of the cell between μ_up = 1 and it).
pub const MU_CLAMP: f64 = 1e3;

/// Exclusion contours μ_up = 1 of scan results on the (M, m_χ) grid formed
/// by the distinct masses of `rows` (nodes without a point are missing).
/// All rows must share their couplings; fewer than two distinct masses on
/// either axis give no grid and an error.
pub fn exclusion_contours(rows: &[PointResult]) -> Result<Vec<Contour>, ScanError> {
    if let Some(first) = rows.first()
        && let Some(r) = rows.iter().find(|r| r.couplings != first.couplings)
    {
        return Err(ScanError::Contour(format!(
            "contours need one coupling set, but points {} and {} have different couplings",
            first.label, r.label
        )));
    }
    let axis = |f: fn(&PointResult) -> f64| -> Vec<f64> {
        let mut v: Vec<f64> = rows.iter().map(f).collect();
        v.sort_by(f64::total_cmp);
        v.dedup();
        v
    };
    let ms = axis(|r| r.m_med_gev);
    let ds = axis(|r| r.m_dm_gev);
    let x: Vec<f64> = ms.iter().map(|v| v.ln()).collect();
    let y: Vec<f64> = ds.iter().map(|v| v.ln()).collect();
    let mut out = Vec::new();
    for level in ContourLevel::ALL {
        let mut values = vec![f64::NAN; ms.len() * ds.len()];
        for r in rows {
            // invariant: the axes hold every row's masses.
            let i = ms.binary_search_by(|v| v.total_cmp(&r.m_med_gev)).unwrap();
            let j = ds.binary_search_by(|v| v.total_cmp(&r.m_dm_gev)).unwrap();
            let mu = level.mu(r);
            values[j * ms.len() + i] = if mu.is_nan() {
                f64::NAN
            } else {
                mu.clamp(1.0 / MU_CLAMP, MU_CLAMP).ln()
            };
        }
        let grid = Grid::new(x.clone(), y.clone(), values)?;
        let segments = trace_level(&grid, 0.0)
            .into_iter()
            .map(|line| line.into_iter().map(|[a, b]| [a.exp(), b.exp()]).collect())
            .collect();
        out.push(Contour { level, segments });
    }
    Ok(out)
}

/// `contours.csv` text: level, segment, m_med_gev, m_dm_gev (segments
/// numbered from 0 within each level).
pub fn contours_csv(contours: &[Contour]) -> Result<Vec<u8>, csv::Error> {
    let mut w = csv::Writer::from_writer(Vec::new());
    w.write_record(["level", "segment", "m_med_gev", "m_dm_gev"])?;
    for c in contours {
        for (s, line) in c.segments.iter().enumerate() {
            for [m, d] in line {
                w.write_record([
                    c.level.name().to_string(),
                    s.to_string(),
                    m.to_string(),
                    d.to_string(),
                ])?;
            }
        }
    }
    w.into_inner().map_err(|e| e.into_error().into())
}

#[cfg(test)]
mod tests {
    use super::*;

    fn grid_from(x: Vec<f64>, y: Vec<f64>, f: impl Fn(f64, f64) -> f64) -> Grid {
        let mut v = Vec::new();
        for &yj in &y {
            for &xi in &x {
                v.push(f(xi, yj));
            }
        }
        Grid::new(x, y, v).unwrap()
    }

    fn linspace(a: f64, b: f64, n: usize) -> Vec<f64> {
        (0..n)
            .map(|k| a + (b - a) * k as f64 / (n - 1) as f64)
            .collect()
    }

    #[test]
    fn linear_field_is_traced_exactly() {
        // f = x + 2y − 1: linear interpolation is exact, so every crossing
        // lies on the line (analytic, no source needed).
        let g = grid_from(linspace(-1.0, 1.0, 7), linspace(-1.0, 1.0, 5), |x, y| {
            x + 2.0 * y - 1.0
        });
        let lines = trace_level(&g, 0.0);
        assert_eq!(lines.len(), 1);
        for [x, y] in &lines[0] {
            assert!((x + 2.0 * y - 1.0).abs() < 1e-12);
        }
        // Open at the boundary: both ends on the grid edge.
        for p in [lines[0][0], *lines[0].last().unwrap()] {
            let on_edge = p[0].abs() > 1.0 - 1e-12 || p[1].abs() > 1.0 - 1e-12;
            assert!(on_edge, "{p:?}");
        }
    }

    #[test]
    fn circle_is_a_closed_loop() {
        let g = grid_from(linspace(-2.0, 2.0, 41), linspace(-2.0, 2.0, 41), |x, y| {
            x * x + y * y - 1.0
        });
        let lines = trace_level(&g, 0.0);
        assert_eq!(lines.len(), 1);
        let l = &lines[0];
        assert_eq!(l.first(), l.last());
        // Grid step h = 0.1: linear interpolation of r² − 1 along an edge
        // errs by at most h²·f''/8 = h²/4 in f, i.e. about h²/8 = 0.00125 in
        // r (analytic bound, no source); tolerance twice that.
        for [x, y] in l {
            assert!(((x * x + y * y).sqrt() - 1.0).abs() < 0.0025);
        }
        assert!(l.len() > 40);
    }

    #[test]
    fn saddle_follows_the_bilinear_interpolant() {
        // One cell, corners (0,0)=2, (1,0)=−1, (1,1)=1, (0,1)=−1. The
        // bilinear saddle value is (2·1 − (−1)(−1))/(2+1+1+1) = 0.2 > 0, so
        // the two high corners connect through the centre and the level set
        // cuts off the low corners (1,0) and (0,1) (Nielson & Hamann 1991).
        let g = Grid::new(vec![0.0, 1.0], vec![0.0, 1.0], vec![2.0, -1.0, -1.0, 1.0]).unwrap();
        let lines = trace_level(&g, 0.0);
        assert_eq!(lines.len(), 2);
        for l in &lines {
            assert_eq!(l.len(), 2);
            let near_10 = l.iter().all(|p| p[0] > 0.5 - 1e-12 && p[1] < 0.5 + 1e-12);
            let near_01 = l.iter().all(|p| p[0] < 0.5 + 1e-12 && p[1] > 0.5 - 1e-12);
            assert!(near_10 || near_01, "{l:?}");
        }
        // Same sides, corners (0,0)=1, (1,0)=−2, (1,1)=1, (0,1)=−2: saddle
        // value (1 − 4)/(1+1+2+2) = −0.5 < 0, so the low corners connect and
        // the high corners (0,0) and (1,1) are cut off.
        let g = Grid::new(vec![0.0, 1.0], vec![0.0, 1.0], vec![1.0, -2.0, -2.0, 1.0]).unwrap();
        let lines = trace_level(&g, 0.0);
        assert_eq!(lines.len(), 2);
        for l in &lines {
            let near_00 = l.iter().all(|p| p[0] < 0.5 + 1e-12 && p[1] < 0.5 + 1e-12);
            let near_11 = l.iter().all(|p| p[0] > 0.5 - 1e-12 && p[1] > 0.5 - 1e-12);
            assert!(near_00 || near_11, "{l:?}");
        }
    }

    #[test]
    fn missing_nodes_end_contours() {
        let mut g = grid_from(linspace(0.0, 4.0, 5), linspace(0.0, 4.0, 5), |x, _| x - 2.5);
        g.values[2 * 5 + 2] = f64::NAN;
        let lines = trace_level(&g, 0.0);
        // The cells around the missing node drop out: two pieces remain.
        assert_eq!(lines.len(), 2);
        for l in &lines {
            for [x, _] in l {
                assert!((x - 2.5).abs() < 1e-12);
            }
        }
    }

    #[test]
    fn bad_grids_are_refused() {
        assert!(Grid::new(vec![0.0], vec![0.0, 1.0], vec![0.0, 0.0]).is_err());
        assert!(Grid::new(vec![1.0, 0.0], vec![0.0, 1.0], vec![0.0; 4]).is_err());
        assert!(Grid::new(vec![0.0, 1.0], vec![0.0, 1.0], vec![0.0; 3]).is_err());
    }
}
