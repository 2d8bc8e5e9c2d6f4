//! The work–precision picture of a [`Report`]: achieved error against wall
//! time, both on log scales, one line per contender through its
//! tolerances, as SVG.
//!
//! Points lower and further left are better: less error for less time.
//! Each line runs from the loosest tolerance to the tightest.
//! Failed runs have no point; a contender whose runs all failed is listed
//! in the legend as such.
//!
//! ```
//! use ballast::compare::Study;
//! use ballast::plot::work_precision::work_precision_svg;
//! use ballast::Method;
//! // y' = -y, y(0) = 1: y(1) = e^{-1} (closed form).
//! let report = Study::new(|_t: f64, y: &[f64], dy: &mut [f64]| dy[0] = -y[0], (0.0, 1.0), &[1.0])
//!     .methods([Method::DormandPrince54, Method::BogackiShampine32])
//!     .tolerances([1e-4, 1e-6, 1e-8])
//!     .reference(vec![(-1.0f64).exp()], "closed form")
//!     .repeats(1)
//!     .run()?;
//! let svg = work_precision_svg(&report)?;
//! assert!(svg.starts_with("<svg") && svg.contains("Dormand-Prince 5(4)"));
//! # Ok::<(), Box<dyn std::error::Error>>(())
//! ```

use std::path::Path;

use plotters::prelude::*;

use super::style::{self, failure, Look, COLOURS};
use crate::compare::Report;

/// Why the picture could not be drawn or written.
#[derive(Debug, thiserror::Error)]
#[non_exhaustive]
pub enum WorkPrecisionError {
    /// The drawing library reported an error.
    #[error("drawing the work-precision picture failed: {0}")]
    Draw(String),
    /// The file could not be written.
    #[error("writing {path} failed: {source}")]
    Write {
        /// The file.
        path: String,
        /// The underlying error.
        source: std::io::Error,
    },
}

/// Picture size in pixels.
const SIZE: (u32, u32) = (960, 640);

/// Smallest error drawn: an exact result is shown at this level.
const ERROR_FLOOR_SHOWN: f64 = 1e-17;

/// Frame and text of the chart.
const LOOK: Look = Look {
    caption: 24,
    margin: 20,
    label_areas: (60, 80),
    axis_desc: 16,
    labels: 13,
    grid: RGBColor(235, 235, 235),
    legend: SeriesLabelPosition::UpperRight,
    legend_font: 14,
    legend_background: 0.9,
};

/// One contender's points `(seconds, error)`, from the loosest tolerance
/// to the tightest.
struct Line {
    label: String,
    points: Vec<(f64, f64)>,
}

fn lines(report: &Report) -> Vec<Line> {
    report
        .labels()
        .into_iter()
        .map(|label| {
            let mut rows: Vec<_> = report
                .rows()
                .iter()
                .filter(|r| r.label == label && r.succeeded())
                .collect();
            rows.sort_by(|a, b| b.rtol.total_cmp(&a.rtol));
            let points = rows
                .into_iter()
                .filter_map(|r| {
                    let e = r.error?;
                    (e.is_finite() && r.seconds > 0.0 && r.seconds.is_finite())
                        .then(|| (r.seconds, e.max(ERROR_FLOOR_SHOWN)))
                })
                .collect();
            Line {
                label: label.to_string(),
                points,
            }
        })
        .collect()
}

/// A log range around `values` with half a decade of room on each side.
fn log_range(values: impl Iterator<Item = f64>, fallback: (f64, f64)) -> (f64, f64) {
    let (lo, hi) = values.fold((f64::INFINITY, 0.0f64), |(l, h), v| (l.min(v), h.max(v)));
    if !(lo.is_finite() && hi > 0.0) {
        return fallback;
    }
    let pad = 10f64.sqrt();
    (lo / pad, hi * pad)
}

/// The work–precision picture of `report` as an SVG document.
pub fn work_precision_svg(report: &Report) -> Result<String, WorkPrecisionError> {
    let lines = lines(report);
    let all = || lines.iter().flat_map(|l| l.points.iter());
    let x = log_range(all().map(|p| p.0), (1e-4, 1.0));
    let y = log_range(all().map(|p| p.1), (1e-12, 1.0));
    style::svg_document(SIZE, |root| {
        let title = format!("{}: work-precision", report.model());
        let (x, y) = ((x.0..x.1).log_scale(), (y.0..y.1).log_scale());
        let mut chart = style::chart(root, &LOOK, title, x, y)?;
        let x_desc = format!(
            "wall time [s] (median of {} run(s), log scale)",
            report.repeats()
        );
        let y_desc = format!(
            "error at t = {} (max relative, floor {:.0e}; log scale)",
            report.reference().t,
            report.error_floor()
        );
        style::mesh(&mut chart, &LOOK, x_desc, y_desc)
            .x_label_formatter(&|v| format!("{v:.0e}"))
            .y_label_formatter(&|v| format!("{v:.0e}"))
            .draw()
            .map_err(failure)?;
        for (i, line) in lines.iter().enumerate() {
            let colour = COLOURS[i % COLOURS.len()];
            let style = colour.stroke_width(2);
            let label = if line.points.is_empty() {
                format!("{} (no successful run)", line.label)
            } else {
                line.label.clone()
            };
            chart
                .draw_series(LineSeries::new(line.points.iter().copied(), style))
                .map_err(failure)?
                .label(label)
                .legend(move |(x, y)| PathElement::new(vec![(x, y), (x + 24, y)], style));
            let pts = line.points.iter().copied();
            match i % 3 {
                0 => chart.draw_series(pts.map(|p| Circle::new(p, 4, colour.filled()))),
                1 => chart.draw_series(pts.map(|p| TriangleMarker::new(p, 5, colour.filled()))),
                _ => chart.draw_series(pts.map(|p| Cross::new(p, 4, colour.stroke_width(2)))),
            }
            .map_err(failure)?;
        }
        style::legend(&mut chart, &LOOK)
    })
    .map_err(WorkPrecisionError::Draw)
}

/// Writes [`work_precision_svg`] to `path`.
pub fn write_svg(report: &Report, path: &Path) -> Result<(), WorkPrecisionError> {
    let svg = work_precision_svg(report)?;
    std::fs::write(path, svg).map_err(|source| WorkPrecisionError::Write {
        path: path.display().to_string(),
        source,
    })
}
