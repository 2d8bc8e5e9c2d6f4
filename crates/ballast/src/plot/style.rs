//! What the pictures share: the palette, the SVG document on a white
//! ground, the chart frame (caption, margins, label areas, mesh with axis
//! descriptions and a light grid), the legend box, and drawing errors as
//! text (the drawing library's error types depend on the backend).

use std::fmt::Debug;

use plotters::chart::MeshStyle;
use plotters::coord::ranged1d::{AsRangedCoord, Ranged, ValueFormatter};
use plotters::coord::{CoordTranslate, Shift};
use plotters::prelude::*;

/// The font family of every text.
pub(crate) const FONT: &str = "sans-serif";

/// Line colours: the Okabe–Ito palette (chosen to stay distinct for
/// readers with colour-vision deficiencies; common practice), then a grey
/// and a dark red.
pub(crate) const COLOURS: [RGBColor; 10] = [
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

/// Text sizes, frame and legend of one kind of chart.
pub(crate) struct Look {
    /// Caption font size.
    pub(crate) caption: u32,
    /// Margin around the chart, pixels.
    pub(crate) margin: u32,
    /// Sizes of the x and y label areas, pixels.
    pub(crate) label_areas: (u32, u32),
    /// Font size of the axis descriptions.
    pub(crate) axis_desc: u32,
    /// Font size of the tick labels.
    pub(crate) labels: u32,
    /// Colour of the light grid lines.
    pub(crate) grid: RGBColor,
    /// Where the legend goes.
    pub(crate) legend: SeriesLabelPosition,
    /// Font size of the legend.
    pub(crate) legend_font: u32,
    /// Opacity of the legend's white background.
    pub(crate) legend_background: f64,
}

/// A drawing error as text.
pub(crate) fn failure<E: Debug>(e: E) -> String {
    format!("{e:?}")
}

/// An SVG document of `size` pixels on white, with what `draw` puts on it.
pub(crate) fn svg_document(
    size: (u32, u32),
    draw: impl FnOnce(&DrawingArea<SVGBackend<'_>, Shift>) -> Result<(), String>,
) -> Result<String, String> {
    let mut svg = String::new();
    {
        let root = SVGBackend::with_string(&mut svg, size).into_drawing_area();
        root.fill(&WHITE).map_err(failure)?;
        draw(&root)?;
        root.present().map_err(failure)?;
    }
    Ok(svg)
}

/// A chart on `area` over the coordinates `X` by `Y`.
type Chart<'a, DB, X, Y> = ChartContext<
    'a,
    DB,
    Cartesian2d<<X as AsRangedCoord>::CoordDescType, <Y as AsRangedCoord>::CoordDescType>,
>;

/// A chart over `x` and `y` on `area`, captioned and framed by `look`.
pub(crate) fn chart<'a, DB: DrawingBackend, X: AsRangedCoord, Y: AsRangedCoord>(
    area: &'a DrawingArea<DB, Shift>,
    look: &Look,
    caption: impl AsRef<str>,
    x: X,
    y: Y,
) -> Result<Chart<'a, DB, X, Y>, String> {
    ChartBuilder::on(area)
        .caption(caption, (FONT, look.caption))
        .margin(look.margin)
        .x_label_area_size(look.label_areas.0)
        .y_label_area_size(look.label_areas.1)
        .build_cartesian_2d(x, y)
        .map_err(failure)
}

/// The mesh of `chart` with axis descriptions, fonts and grid of `look`,
/// ready for more settings or `draw()`.
pub(crate) fn mesh<'a, 'b, DB, X, Y, XT, YT>(
    chart: &'b mut ChartContext<'a, DB, Cartesian2d<X, Y>>,
    look: &Look,
    x_desc: impl Into<String>,
    y_desc: impl Into<String>,
) -> MeshStyle<'a, 'b, X, Y, DB>
where
    DB: DrawingBackend,
    X: Ranged<ValueType = XT> + ValueFormatter<XT>,
    Y: Ranged<ValueType = YT> + ValueFormatter<YT>,
{
    let mut mesh = chart.configure_mesh();
    mesh.x_desc(x_desc)
        .y_desc(y_desc)
        .axis_desc_style((FONT, look.axis_desc))
        .label_style((FONT, look.labels))
        .light_line_style(look.grid);
    mesh
}

/// Draws the legend of `chart`'s labelled series, placed and styled by `look`.
pub(crate) fn legend<'a, DB: DrawingBackend + 'a, CT: CoordTranslate>(
    chart: &mut ChartContext<'a, DB, CT>,
    look: &Look,
) -> Result<(), String> {
    chart
        .configure_series_labels()
        .position(look.legend.clone())
        .background_style(WHITE.mix(look.legend_background))
        .border_style(BLACK)
        .label_font((FONT, look.legend_font))
        .draw()
        .map_err(failure)
}
