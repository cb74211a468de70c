//! Writing a figure: the SVG and its data table (CSV) beside it, each
//! written atomically (a temporary file in the same folder, then a rename) so
//! no partial figure is ever left behind.

use std::path::{Path, PathBuf};

use super::PlotError;

/// The files one figure wrote.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct FigureFiles {
    /// The SVG figure.
    pub svg: PathBuf,
    /// The figure's data as CSV (same name, `.csv` in place of `.svg`).
    pub csv: PathBuf,
}

/// A figure's data: a header with units in the column names and rows of cells.
#[derive(Debug, Clone, Default)]
pub(crate) struct Table {
    pub header: Vec<&'static str>,
    pub rows: Vec<Vec<String>>,
}

impl Table {
    pub fn new(header: Vec<&'static str>) -> Self {
        Table {
            header,
            rows: Vec::new(),
        }
    }

    pub fn push(&mut self, row: Vec<String>) {
        self.rows.push(row);
    }

    /// CSV text (quoting where the `csv` crate needs it).
    pub fn to_csv(&self) -> Result<String, csv::Error> {
        let mut w = csv::Writer::from_writer(Vec::new());
        w.write_record(&self.header)?;
        for r in &self.rows {
            w.write_record(r)?;
        }
        let bytes = w.into_inner().map_err(|e| e.into_error())?;
        // invariant: every cell was a Rust `String`, so the bytes are UTF-8.
        Ok(String::from_utf8(bytes).unwrap_or_default())
    }
}

/// Formats an optional number the formats.md way: `{}` or empty.
pub(crate) fn num(v: f64) -> String {
    format!("{v}")
}

/// Formats a cross-section \[cm²\] for CSV: scientific notation with the
/// shortest digits that round-trip (`6.8e-46`; `inf` for no limit).
pub(crate) fn sci(v: f64) -> String {
    format!("{v:e}")
}

/// The CSV path beside an SVG path, after checking the `.svg` extension.
pub(crate) fn paths_for(svg: &Path) -> Result<FigureFiles, PlotError> {
    let is_svg = svg
        .extension()
        .and_then(|e| e.to_str())
        .is_some_and(|e| e.eq_ignore_ascii_case("svg"));
    if !is_svg {
        return Err(PlotError::NotSvg {
            path: svg.to_path_buf(),
        });
    }
    Ok(FigureFiles {
        svg: svg.to_path_buf(),
        csv: svg.with_extension("csv"),
    })
}

/// Writes `contents` to `path` atomically ([`crate::output::write_atomic`]).
pub(crate) fn write_atomic(path: &Path, contents: &[u8]) -> Result<(), PlotError> {
    crate::output::write_atomic(path, contents).map_err(|cause| PlotError::Write {
        path: path.to_path_buf(),
        cause,
    })
}

/// Writes the SVG and the CSV of one figure.
pub(crate) fn write_figure(
    figure: &'static str,
    svg_path: &Path,
    svg: &str,
    table: &Table,
) -> Result<FigureFiles, PlotError> {
    let files = paths_for(svg_path)?;
    let csv = table.to_csv().map_err(|e| PlotError::Draw {
        figure,
        message: format!("cannot format the data table: {e}"),
    })?;
    write_atomic(&files.csv, csv.as_bytes())?;
    write_atomic(&files.svg, svg.as_bytes())?;
    Ok(files)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn csv_quotes_cells_with_commas() {
        // RFC 4180 quoting (common practice).
        let mut t = Table::new(vec!["a", "b"]);
        t.push(vec!["x,y".into(), "1".into()]);
        assert_eq!(t.to_csv().unwrap(), "a,b\n\"x,y\",1\n");
    }

    #[test]
    fn rejects_non_svg_paths() {
        assert!(matches!(
            paths_for(Path::new("fig.png")),
            Err(PlotError::NotSvg { .. })
        ));
        let f = paths_for(Path::new("out/fig.SVG")).unwrap();
        assert_eq!(f.csv, PathBuf::from("out/fig.csv"));
    }
}
