//! The report as an aligned text table.

use super::report::{Report, Row};

/// How a column is aligned.
#[derive(Clone, Copy, PartialEq, Eq)]
enum Align {
    Left,
    Right,
}

const COLUMNS: [(&str, Align); 13] = [
    ("method", Align::Left),
    ("rtol", Align::Right),
    ("atol", Align::Right),
    ("error", Align::Right),
    ("time [ms]", Align::Right),
    ("rhs", Align::Right),
    ("jac", Align::Right),
    ("LU", Align::Right),
    ("accepted", Align::Right),
    ("rejected", Align::Right),
    ("capped", Align::Right),
    ("switches", Align::Right),
    ("note", Align::Left),
];

/// Milliseconds with three significant digits (at least one decimal
/// below 100 ms).
pub(crate) fn millis(seconds: f64) -> String {
    let ms = seconds * 1e3;
    if !ms.is_finite() {
        "-".into()
    } else if ms >= 100.0 {
        format!("{ms:.0}")
    } else if ms >= 10.0 {
        format!("{ms:.1}")
    } else if ms >= 1.0 {
        format!("{ms:.2}")
    } else {
        format!("{ms:.3}")
    }
}

fn cells(row: &Row) -> Vec<String> {
    let s = &row.stats;
    let error = match (row.error, &row.failure) {
        (_, Some(_)) => "failed".to_string(),
        (Some(e), None) => format!("{e:.2e}"),
        (None, None) => "-".to_string(),
    };
    let note = match &row.failure {
        Some(msg) => format!("stopped at t = {:.6e}: {msg}", row.t_reached),
        None => String::new(),
    };
    vec![
        row.label.clone(),
        format!("{:.0e}", row.rtol),
        format!("{:.0e}", row.atol),
        error,
        millis(row.seconds),
        s.rhs_evals.to_string(),
        s.jacobian_evals.to_string(),
        s.factorizations.to_string(),
        s.accepted.to_string(),
        s.rejected.to_string(),
        s.stability_limited.to_string(),
        s.switches.to_string(),
        note,
    ]
}

/// Renders the header lines and the table.
pub(crate) fn render(report: &Report) -> String {
    let mut out = String::new();
    let (t0, t1) = report.span();
    out.push_str(&format!(
        "model: {} ({} equations, t from {t0} to {t1})\n",
        report.model(),
        report.dim()
    ));
    out.push_str(&format!(
        "reference at t = {}: {}\n",
        report.reference().t,
        report.reference().source
    ));
    out.push_str(&format!(
        "error = max_i |y_i - ref_i| / max(|ref_i|, {:.0e}); time = median of {} run(s) \
         (runs under {ms} ms timed in back-to-back batches of at least {ms} ms); \
         capped = steps set by the stability cap\n\n",
        report.error_floor(),
        report.repeats(),
        ms = super::runner::MIN_SAMPLE_SECONDS * 1e3
    ));
    let body: Vec<Vec<String>> = report.rows().iter().map(cells).collect();
    let mut widths: Vec<usize> = COLUMNS.iter().map(|(h, _)| h.chars().count()).collect();
    for row in &body {
        for (w, cell) in widths.iter_mut().zip(row) {
            *w = (*w).max(cell.chars().count());
        }
    }
    let header: Vec<String> = COLUMNS.iter().map(|(h, _)| h.to_string()).collect();
    push_line(&mut out, &header, &widths);
    let rule: Vec<String> = widths.iter().map(|&w| "-".repeat(w)).collect();
    push_line(&mut out, &rule, &widths);
    for row in &body {
        push_line(&mut out, row, &widths);
    }
    out
}

fn push_line(out: &mut String, cells: &[String], widths: &[usize]) {
    let mut line = String::new();
    for (i, ((cell, &w), (_, align))) in cells.iter().zip(widths).zip(COLUMNS).enumerate() {
        if i > 0 {
            line.push_str("  ");
        }
        let pad = w.saturating_sub(cell.chars().count());
        match align {
            Align::Left => {
                line.push_str(cell);
                line.push_str(&" ".repeat(pad));
            }
            Align::Right => {
                line.push_str(&" ".repeat(pad));
                line.push_str(cell);
            }
        }
    }
    out.push_str(line.trim_end());
    out.push('\n');
}
