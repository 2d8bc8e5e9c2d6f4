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

/// Line colours (the Okabe–Ito palette, chosen to stay distinct for
/// readers with colour-vision deficiencies; common practice), then greys.
const COLOURS: [RGBColor; 10] = [
    RGBColor(0, 114, 178),
    RGBColor(213, 94, 0),
    RGBColor(0, 158, 115),
    RGBColor(204, 121, 167),
    RGBColor(230, 159, 0),
    RGBColor(86, 180, 233),
    RGBColor(0, 0, 0),
    RGBColor(240, 228, 66),
    RGBColor(120, 120, 120),
    RGBColor(170, 60, 60),
];

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

fn draw_err<E: std::fmt::Debug>(e: E) -> WorkPrecisionError {
    WorkPrecisionError::Draw(format!("{e:?}"))
}

/// The work–precision picture of `report` as an SVG document.
pub fn work_precision_svg(report: &Report) -> Result<String, WorkPrecisionError> {
    let lines = lines(report);
    let all = || lines.iter().flat_map(|l| l.points.iter());
    let x = log_range(all().map(|p| p.0), (1e-4, 1.0));
    let y = log_range(all().map(|p| p.1), (1e-12, 1.0));
    let mut svg = String::new();
    {
        let root = SVGBackend::with_string(&mut svg, SIZE).into_drawing_area();
        root.fill(&WHITE).map_err(draw_err)?;
        let title = format!("{}: work-precision", report.model());
        let mut chart = ChartBuilder::on(&root)
            .caption(title, ("sans-serif", 24))
            .margin(20)
            .x_label_area_size(60)
            .y_label_area_size(80)
            .build_cartesian_2d((x.0..x.1).log_scale(), (y.0..y.1).log_scale())
            .map_err(draw_err)?;
        let x_desc = format!(
            "wall time [s] (median of {} run(s), log scale)",
            report.repeats()
        );
        let y_desc = format!(
            "error at t = {} (max relative, floor {:.0e}; log scale)",
            report.reference().t,
            report.error_floor()
        );
        chart
            .configure_mesh()
            .x_desc(x_desc)
            .y_desc(y_desc)
            .axis_desc_style(("sans-serif", 16))
            .label_style(("sans-serif", 13))
            .x_label_formatter(&|v| format!("{v:.0e}"))
            .y_label_formatter(&|v| format!("{v:.0e}"))
            .light_line_style(RGBColor(235, 235, 235))
            .draw()
            .map_err(draw_err)?;
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
                .map_err(draw_err)?
                .label(label)
                .legend(move |(x, y)| PathElement::new(vec![(x, y), (x + 24, y)], style));
            let pts = line.points.iter().copied();
            match i % 3 {
                0 => chart.draw_series(pts.map(|p| Circle::new(p, 4, colour.filled()))),
                1 => chart.draw_series(pts.map(|p| TriangleMarker::new(p, 5, colour.filled()))),
                _ => chart.draw_series(pts.map(|p| Cross::new(p, 4, colour.stroke_width(2)))),
            }
            .map_err(draw_err)?;
        }
        chart
            .configure_series_labels()
            .position(SeriesLabelPosition::UpperRight)
            .background_style(WHITE.mix(0.9))
            .border_style(BLACK)
            .label_font(("sans-serif", 14))
            .draw()
            .map_err(draw_err)?;
        root.present().map_err(draw_err)?;
    }
    Ok(svg)
}

/// Writes [`work_precision_svg`] to `path`.
pub fn write_svg(report: &Report, path: &Path) -> Result<(), WorkPrecisionError> {
    let svg = work_precision_svg(report)?;
    std::fs::write(path, svg).map_err(|source| WorkPrecisionError::Write {
        path: path.display().to_string(),
        source,
    })
}
