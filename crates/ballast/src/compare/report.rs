//! The result of a study: one row per run, winners and cost ratios.

use super::reference::ReferenceInfo;
use crate::{Method, Stats};

/// One run of a study: a contender at one tolerance.
#[derive(Clone, Debug, PartialEq)]
pub struct Row {
    /// The contender's label (the method's name unless given).
    pub label: String,
    /// The method the contender asked for.
    pub method: Method,
    /// Relative tolerance of the run.
    pub rtol: f64,
    /// Absolute tolerance of the run.
    pub atol: f64,
    /// Achieved error at the end of the span (see
    /// [`relative_error`](super::relative_error)); `None` for a failed run
    /// or when no reference was available.
    pub error: Option<f64>,
    /// Wall time in seconds: the median over the timed repetitions (a
    /// repetition of a run under a millisecond is the mean of a batch of
    /// back-to-back runs lasting at least that long), or the time until the
    /// failure.
    pub seconds: f64,
    /// Work and decision counters (up to the failure for a failed run).
    pub stats: Stats,
    /// Time reached.
    pub t_reached: f64,
    /// The error message of a failed run.
    pub failure: Option<String>,
    /// Number of timed repetitions behind `seconds`.
    pub timed_runs: usize,
}

impl Row {
    /// Whether the run reached the end of the span.
    pub fn succeeded(&self) -> bool {
        self.failure.is_none()
    }
}

/// How [`Report::winners`] chooses the best run at a tolerance.
///
/// A run qualifies when its achieved error is at most `slack * rtol`; the
/// fastest qualifying run wins. When no run qualifies (global errors can
/// exceed the local tolerance by far on long spans), a run qualifies when
/// its error is at most `slack` times the smallest error reached at that
/// tolerance, and the fastest of those wins. Without a reference, the
/// fastest successful run wins.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct WinnerRule {
    /// How far above `rtol` the achieved (global) error may lie (default 10:
    /// tolerances bound local errors, and global errors commonly exceed them
    /// by an order of magnitude, common practice).
    pub slack: f64,
}

impl Default for WinnerRule {
    fn default() -> Self {
        Self { slack: 10.0 }
    }
}

/// Why a run was named the winner.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum WinnerBasis {
    /// Fastest among the runs whose error met `slack * rtol`.
    MetTolerance,
    /// No run met `slack * rtol`; fastest among the runs within `slack`
    /// of the smallest error reached.
    NearBest,
    /// No reference was available; fastest successful run.
    Fastest,
}

/// The best run at one tolerance.
#[derive(Clone, Debug, PartialEq)]
pub struct Winner {
    /// Relative tolerance.
    pub rtol: f64,
    /// Absolute tolerance.
    pub atol: f64,
    /// The winning contender.
    pub label: String,
    /// Its wall time (seconds).
    pub seconds: f64,
    /// Its achieved error.
    pub error: Option<f64>,
    /// Why it won.
    pub basis: WinnerBasis,
}

impl std::fmt::Display for Winner {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(
            f,
            "rtol {:.0e}: {} ({:.3} ms",
            self.rtol,
            self.label,
            self.seconds * 1e3
        )?;
        if let Some(e) = self.error {
            write!(f, ", error {e:.1e}")?;
        }
        f.write_str(match self.basis {
            WinnerBasis::MetTolerance => ")",
            WinnerBasis::NearBest => "; no run met the tolerance: fastest near the best error)",
            WinnerBasis::Fastest => "; no reference, fastest)",
        })
    }
}

/// The cost of one run relative to another at the same tolerance.
#[derive(Clone, Debug, PartialEq)]
pub struct CostRatio {
    /// The run compared against.
    pub against: String,
    /// Wall-time ratio (ours / theirs).
    pub seconds: f64,
    /// Right-hand-side-call ratio (ours / theirs).
    pub rhs: f64,
}

/// The result of a [`Study`](super::Study).
#[derive(Clone, Debug)]
pub struct Report {
    pub(crate) model: String,
    pub(crate) dim: usize,
    pub(crate) span: (f64, f64),
    pub(crate) reference: ReferenceInfo,
    pub(crate) error_floor: f64,
    pub(crate) repeats: usize,
    pub(crate) rule: WinnerRule,
    pub(crate) rows: Vec<Row>,
}

impl Report {
    /// The model's name.
    pub fn model(&self) -> &str {
        &self.model
    }

    /// Dimension of the state.
    pub fn dim(&self) -> usize {
        self.dim
    }

    /// The integrated span.
    pub fn span(&self) -> (f64, f64) {
        self.span
    }

    /// The reference the errors are measured against.
    pub fn reference(&self) -> &ReferenceInfo {
        &self.reference
    }

    /// The floor of the error measure.
    pub fn error_floor(&self) -> f64 {
        self.error_floor
    }

    /// Timed repetitions asked per run.
    pub fn repeats(&self) -> usize {
        self.repeats
    }

    /// Every run, contender by contender, tolerances in the order given.
    pub fn rows(&self) -> &[Row] {
        &self.rows
    }

    /// The contenders' labels, in order.
    pub fn labels(&self) -> Vec<&str> {
        let mut out: Vec<&str> = Vec::new();
        for r in &self.rows {
            if !out.contains(&r.label.as_str()) {
                out.push(&r.label);
            }
        }
        out
    }

    /// The distinct `(rtol, atol)` pairs, in order.
    pub fn tolerances(&self) -> Vec<(f64, f64)> {
        let mut out: Vec<(f64, f64)> = Vec::new();
        for r in &self.rows {
            if !out.contains(&(r.rtol, r.atol)) {
                out.push((r.rtol, r.atol));
            }
        }
        out
    }

    /// The row of `label` at relative tolerance `rtol`.
    pub fn row(&self, label: &str, rtol: f64) -> Option<&Row> {
        self.rows
            .iter()
            .find(|r| r.label == label && r.rtol == rtol)
    }

    /// The best run at each tolerance, by the study's [`WinnerRule`].
    pub fn winners(&self) -> Vec<Winner> {
        self.tolerances()
            .into_iter()
            .filter_map(|(rtol, atol)| {
                self.pick(
                    self.rows
                        .iter()
                        .filter(|r| r.rtol == rtol && r.atol == atol),
                )
            })
            .collect()
    }

    /// The cost of `label`'s run at `rtol` relative to the best single
    /// (non-switching) method at the same tolerance, chosen by the
    /// study's [`WinnerRule`]. `None` when either side is missing or failed.
    pub fn cost_ratio(&self, label: &str, rtol: f64) -> Option<CostRatio> {
        let ours = self.row(label, rtol).filter(|r| r.succeeded())?;
        let best = self.pick(self.rows.iter().filter(|r| {
            r.rtol == rtol
                && r.atol == ours.atol
                && r.label != label
                && !matches!(r.method, Method::Switching(_))
        }))?;
        let theirs = self.row(&best.label, rtol)?;
        Some(CostRatio {
            against: best.label,
            seconds: ours.seconds / theirs.seconds,
            rhs: ours.stats.rhs_evals as f64 / theirs.stats.rhs_evals.max(1) as f64,
        })
    }

    fn pick<'a>(&self, rows: impl Iterator<Item = &'a Row>) -> Option<Winner> {
        let ok: Vec<&Row> = rows.filter(|r| r.succeeded()).collect();
        let fastest = |v: &[&'a Row]| -> Option<&'a Row> {
            v.iter()
                .copied()
                .min_by(|a, b| a.seconds.total_cmp(&b.seconds))
        };
        let (row, basis) = if self.reference.y.is_none() {
            (fastest(&ok)?, WinnerBasis::Fastest)
        } else {
            let met: Vec<&Row> = ok
                .iter()
                .copied()
                .filter(|r| r.error.is_some_and(|e| e <= self.rule.slack * r.rtol))
                .collect();
            match fastest(&met) {
                Some(r) => (r, WinnerBasis::MetTolerance),
                None => {
                    let best = ok
                        .iter()
                        .filter_map(|r| r.error)
                        .filter(|e| e.is_finite())
                        .fold(f64::INFINITY, f64::min);
                    let near: Vec<&Row> = ok
                        .iter()
                        .copied()
                        .filter(|r| r.error.is_some_and(|e| e <= self.rule.slack * best))
                        .collect();
                    (fastest(&near)?, WinnerBasis::NearBest)
                }
            }
        };
        Some(Winner {
            rtol: row.rtol,
            atol: row.atol,
            label: row.label.clone(),
            seconds: row.seconds,
            error: row.error,
            basis,
        })
    }

    /// The aligned text table with a header naming the model, the
    /// reference and the error measure (the same text as `Display`).
    pub fn table(&self) -> String {
        super::table::render(self)
    }

    /// The rows as CSV (see [`Report::write_csv`] for the columns).
    pub fn to_csv(&self) -> String {
        super::csv::render(self)
    }

    /// Writes [`Report::to_csv`] to `path`. Columns: `model, label, method,
    /// rtol, atol, status, error, seconds, rhs_evals, jacobian_evals,
    /// factorizations, linear_solves, newton_iters, accepted, rejected,
    /// failed_attempts, stability_limited, switches, t_reached, message`.
    pub fn write_csv(&self, path: impl AsRef<std::path::Path>) -> std::io::Result<()> {
        std::fs::write(path, self.to_csv())
    }

    /// Draws the work–precision picture (log error against log time, one
    /// line per contender) as SVG to `path`.
    #[cfg(feature = "plot")]
    pub fn write_svg(
        &self,
        path: impl AsRef<std::path::Path>,
    ) -> Result<(), crate::plot::work_precision::WorkPrecisionError> {
        crate::plot::work_precision::write_svg(self, path.as_ref())
    }
}

impl std::fmt::Display for Report {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(&self.table())
    }
}
