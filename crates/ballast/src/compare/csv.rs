//! The report as comma-separated values, one line per run.
//!
//! Numbers are written in full precision (Rust's shortest round-trip
//! form); text fields are quoted when they contain a comma, a quote or a
//! line break (quotes doubled, RFC 4180).

use super::report::Report;

/// The column names, in order.
pub(crate) const HEADER: [&str; 20] = [
    "model",
    "label",
    "method",
    "rtol",
    "atol",
    "status",
    "error",
    "seconds",
    "rhs_evals",
    "jacobian_evals",
    "factorizations",
    "linear_solves",
    "newton_iters",
    "accepted",
    "rejected",
    "failed_attempts",
    "stability_limited",
    "switches",
    "t_reached",
    "message",
];

fn quote(field: &str) -> String {
    if field.contains([',', '"', '\n', '\r']) {
        format!("\"{}\"", field.replace('"', "\"\""))
    } else {
        field.to_string()
    }
}

/// Renders the header line and one line per row.
pub(crate) fn render(report: &Report) -> String {
    let mut out = HEADER.join(",");
    out.push('\n');
    for r in report.rows() {
        let s = &r.stats;
        let fields = [
            quote(report.model()),
            quote(&r.label),
            quote(r.method.name()),
            r.rtol.to_string(),
            r.atol.to_string(),
            if r.succeeded() { "ok" } else { "failed" }.to_string(),
            r.error.map(|e| e.to_string()).unwrap_or_default(),
            r.seconds.to_string(),
            s.rhs_evals.to_string(),
            s.jacobian_evals.to_string(),
            s.factorizations.to_string(),
            s.linear_solves.to_string(),
            s.newton_iters.to_string(),
            s.accepted.to_string(),
            s.rejected.to_string(),
            s.failed_attempts.to_string(),
            s.stability_limited.to_string(),
            s.switches.to_string(),
            r.t_reached.to_string(),
            quote(r.failure.as_deref().unwrap_or("")),
        ];
        out.push_str(&fields.join(","));
        out.push('\n');
    }
    out
}
