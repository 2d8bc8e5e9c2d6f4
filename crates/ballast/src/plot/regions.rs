//! The stability regions of every method as one SVG picture: one panel
//! per family (explicit Runge–Kutta; implicit one-step; Adams–Bashforth;
//! Adams–Moulton; the Adams PECE scheme; BDF), each region shaded where
//! the method is stable and outlined by its boundary, with axes and a legend.
//!
//! Membership is sampled on a grid of the complex plane (`|R(z)| <= 1` for
//! one-step methods, the root condition for multistep ones, through
//! [`Region::contains`]); the outline is the marching-squares contour of
//! that grid.
//!
//! ```no_run
//! use std::path::Path;
//! ballast::plot::regions::stability_regions_svg(Path::new("target/stability-regions.svg"))?;
//! # Ok::<(), ballast::plot::regions::PlotError>(())
//! ```

use std::collections::HashMap;
use std::path::Path;

use ballast_core::stability::{self, Region, RegionKey};
use ballast_core::Method;
use num_complex::Complex64;
use plotters::prelude::*;

use super::style::{self, failure, Look, COLOURS, FONT};

/// Why the picture could not be drawn or written.
#[derive(Debug, thiserror::Error)]
#[non_exhaustive]
pub enum PlotError {
    /// The drawing library reported an error.
    #[error("drawing the stability regions failed: {0}")]
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

/// Picture size in pixels (three panels across, two down).
const SIZE: (u32, u32) = (1560, 1080);
/// Grid cells per axis for sampling each region.
const GRID: usize = 240;

/// Frame and text of one panel.
const PANEL: Look = Look {
    caption: 20,
    margin: 12,
    label_areas: (40, 50),
    axis_desc: 14,
    labels: 12,
    grid: RGBColor(238, 238, 238),
    legend: SeriesLabelPosition::UpperLeft,
    legend_font: 12,
    legend_background: 0.85,
};

/// One panel: a title, the window in the complex plane, the regions.
struct Panel {
    title: &'static str,
    re: (f64, f64),
    im: (f64, f64),
    keys: Vec<RegionKey>,
}

fn panels() -> Vec<Panel> {
    let methods = |ms: &[Method]| ms.iter().map(|&m| RegionKey::Method(m)).collect::<Vec<_>>();
    vec![
        Panel {
            title: "Explicit Runge-Kutta",
            re: (-7.0, 2.0),
            im: (-6.5, 6.5),
            keys: methods(&[
                Method::ForwardEuler,
                Method::Heun,
                Method::BogackiShampine32,
                Method::Rk4,
                Method::DormandPrince54,
                Method::Tsitouras54,
                Method::DormandPrince853,
            ]),
        },
        Panel {
            title: "Implicit one-step (A-stable: all of Re z <= 0)",
            re: (-5.0, 15.0),
            im: (-10.0, 10.0),
            keys: methods(&[
                Method::BackwardEuler,
                Method::Trapezoid,
                Method::TrBdf2,
                Method::Esdirk43,
                Method::RadauIIA5,
                Method::Ros3p,
                Method::Rosenbrock32,
            ]),
        },
        Panel {
            title: "Adams-Bashforth, orders 1-6",
            re: (-2.4, 0.6),
            im: (-1.5, 1.5),
            keys: (1..=6).map(RegionKey::AdamsBashforth).collect(),
        },
        Panel {
            title: "Adams-Moulton, orders 3-6",
            re: (-7.0, 1.0),
            im: (-4.0, 4.0),
            keys: (3..=6).map(RegionKey::AdamsMoulton).collect(),
        },
        Panel {
            title: "Adams PECE (the Adams scheme), orders 1-6",
            re: (-2.4, 0.6),
            im: (-1.5, 1.5),
            keys: (1..=6).map(RegionKey::AdamsPece).collect(),
        },
        Panel {
            title: "BDF, orders 1-6 (stable outside the curves)",
            re: (-12.0, 36.0),
            im: (-24.0, 24.0),
            keys: (1..=6).map(RegionKey::Bdf).collect(),
        },
    ]
}

/// Membership of the region on the grid: `inside[j * (GRID + 1) + i]` at
/// `re.0 + i dx`, `im.0 + j dy`.
struct Sampled {
    inside: Vec<bool>,
    x0: f64,
    y0: f64,
    dx: f64,
    dy: f64,
}

impl Sampled {
    fn new(region: &Region, re: (f64, f64), im: (f64, f64)) -> Sampled {
        let n = GRID + 1;
        let dx = (re.1 - re.0) / GRID as f64;
        let dy = (im.1 - im.0) / GRID as f64;
        let inside = (0..n * n)
            .map(|k| {
                let (i, j) = (k % n, k / n);
                region.contains(Complex64::new(re.0 + i as f64 * dx, im.0 + j as f64 * dy))
            })
            .collect();
        Sampled {
            inside,
            x0: re.0,
            y0: im.0,
            dx,
            dy,
        }
    }

    fn at(&self, i: usize, j: usize) -> bool {
        self.inside[j * (GRID + 1) + i]
    }

    /// Runs of stable points along every other row, as rectangles.
    fn fill_rects(&self) -> Vec<[(f64, f64); 2]> {
        let mut rects = Vec::new();
        for j in (0..=GRID).step_by(2) {
            let mut i = 0;
            while i <= GRID {
                if !self.at(i, j) {
                    i += 1;
                    continue;
                }
                let start = i;
                while i <= GRID && self.at(i, j) {
                    i += 1;
                }
                let x = |k: f64| self.x0 + k * self.dx;
                let y = |k: f64| self.y0 + k * self.dy;
                let (ylo, yhi) = (
                    y(j as f64 - 1.0).max(self.y0),
                    y(j as f64 + 1.0).min(y(GRID as f64)),
                );
                rects.push([
                    (x(start as f64 - 0.5).max(self.x0), ylo),
                    (x(i as f64 - 0.5).min(x(GRID as f64)), yhi),
                ]);
            }
        }
        rects
    }

    /// The boundary as polylines: marching squares on the membership grid,
    /// segments joining edge midpoints, chained through shared edges.
    fn contours(&self) -> Vec<Vec<(f64, f64)>> {
        // Edge ids: horizontal (i, j)-(i+1, j) and vertical (i, j)-(i, j+1).
        let n = GRID + 1;
        let h = |i: usize, j: usize| 2 * (j * n + i);
        let v = |i: usize, j: usize| 2 * (j * n + i) + 1;
        let mut segs: Vec<(usize, usize)> = Vec::new();
        for j in 0..GRID {
            for i in 0..GRID {
                let case = (self.at(i, j) as u8)
                    | (self.at(i + 1, j) as u8) << 1
                    | (self.at(i + 1, j + 1) as u8) << 2
                    | (self.at(i, j + 1) as u8) << 3;
                let (b, r, t, l) = (h(i, j), v(i + 1, j), h(i, j + 1), v(i, j));
                match case {
                    1 | 14 => segs.push((l, b)),
                    2 | 13 => segs.push((b, r)),
                    3 | 12 => segs.push((l, r)),
                    4 | 11 => segs.push((r, t)),
                    6 | 9 => segs.push((b, t)),
                    7 | 8 => segs.push((l, t)),
                    5 => segs.extend([(l, t), (b, r)]),
                    10 => segs.extend([(l, b), (r, t)]),
                    _ => {}
                }
            }
        }
        let point = |e: usize| {
            let (k, vertical) = (e / 2, e % 2 == 1);
            let (i, j) = ((k % n) as f64, (k / n) as f64);
            let (i, j) = if vertical { (i, j + 0.5) } else { (i + 0.5, j) };
            (self.x0 + i * self.dx, self.y0 + j * self.dy)
        };
        let mut by_edge: HashMap<usize, Vec<usize>> = HashMap::new();
        for (s, &(a, b)) in segs.iter().enumerate() {
            by_edge.entry(a).or_default().push(s);
            by_edge.entry(b).or_default().push(s);
        }
        let mut used = vec![false; segs.len()];
        let mut lines = Vec::new();
        for start in 0..segs.len() {
            if used[start] {
                continue;
            }
            used[start] = true;
            let mut chain = vec![segs[start].0, segs[start].1];
            // Extend forward from the last edge, then backward from the first.
            for _ in 0..2 {
                loop {
                    let end = chain[chain.len() - 1];
                    let next = by_edge[&end].iter().copied().find(|&s| !used[s]);
                    let Some(s) = next else { break };
                    used[s] = true;
                    let (a, b) = segs[s];
                    chain.push(if a == end { b } else { a });
                }
                chain.reverse();
            }
            lines.push(chain.into_iter().map(point).collect());
        }
        lines
    }
}

fn draw_panel<DB: DrawingBackend>(
    area: &DrawingArea<DB, plotters::coord::Shift>,
    panel: &Panel,
) -> Result<(), String> {
    let (re, im) = (panel.re.0..panel.re.1, panel.im.0..panel.im.1);
    let mut chart = style::chart(area, &PANEL, panel.title, re, im)?;
    style::mesh(&mut chart, &PANEL, "Re z", "Im z")
        .draw()
        .map_err(failure)?;
    // The axes of the complex plane.
    let axis = BLACK.mix(0.6).stroke_width(1);
    chart
        .draw_series([
            PathElement::new(vec![(panel.re.0, 0.0), (panel.re.1, 0.0)], axis),
            PathElement::new(vec![(0.0, panel.im.0), (0.0, panel.im.1)], axis),
        ])
        .map_err(failure)?;
    for (k, key) in panel.keys.iter().enumerate() {
        let Some(region) = stability::region(*key) else {
            continue;
        };
        let colour = COLOURS[k % COLOURS.len()];
        let sampled = Sampled::new(region, panel.re, panel.im);
        let fill = colour.mix(0.10).filled();
        chart
            .draw_series(
                sampled
                    .fill_rects()
                    .into_iter()
                    .map(|r| Rectangle::new(r, fill)),
            )
            .map_err(failure)?;
        let line = colour.stroke_width(2);
        chart
            .draw_series(
                sampled
                    .contours()
                    .into_iter()
                    .map(|c| PathElement::new(c, line)),
            )
            .map_err(failure)?
            .label(region.name().to_string())
            .legend(move |(x, y)| {
                Rectangle::new([(x, y - 5), (x + 18, y + 5)], colour.mix(0.5).filled())
            });
    }
    style::legend(&mut chart, &PANEL)
}

/// The picture of every method's stability region as an SVG document.
pub fn stability_regions_svg_string() -> Result<String, PlotError> {
    style::svg_document(SIZE, |root| {
        let title =
            "Stability regions: shaded where the method is stable for y' = lambda y, z = h lambda";
        let root = root.titled(title, (FONT, 24)).map_err(failure)?;
        for (area, panel) in root.split_evenly((2, 3)).iter().zip(panels()) {
            draw_panel(area, &panel)?;
        }
        Ok(())
    })
    .map_err(PlotError::Draw)
}

/// Writes [`stability_regions_svg_string`] to `path`.
pub fn stability_regions_svg(path: &Path) -> Result<(), PlotError> {
    let svg = stability_regions_svg_string()?;
    std::fs::write(path, svg).map_err(|source| PlotError::Write {
        path: path.display().to_string(),
        source,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn forward_euler_disc_is_sampled_and_outlined() {
        // Closed form: forward Euler is stable on the disc |z + 1| <= 1.
        let region = stability::method_region(Method::ForwardEuler).unwrap();
        let s = Sampled::new(region, (-2.5, 0.5), (-1.5, 1.5));
        let contours = s.contours();
        assert_eq!(contours.len(), 1, "one closed curve");
        for &(x, y) in &contours[0] {
            let r = ((x + 1.0).powi(2) + y * y).sqrt();
            assert!((r - 1.0).abs() < 0.03, "contour point at distance {r}");
        }
        let area: f64 = s
            .fill_rects()
            .iter()
            .map(|[a, b]| (b.0 - a.0) * (b.1 - a.1))
            .sum();
        assert!((area - std::f64::consts::PI).abs() < 0.1, "area {area}");
    }
}
