//! Tests of the comparison: a closed-form problem, failures as rows, CSV
//! columns, table alignment, study validation.

use super::csv::HEADER;
use super::*;
use crate::{Method, Options};

/// The harmonic oscillator `y1' = y2, y2' = -y1`, `y(0) = (1, 0)`:
/// `y(t) = (cos t, -sin t)` (closed form).
fn oscillator(_t: f64, y: &[f64], dy: &mut [f64]) {
    dy[0] = y[1];
    dy[1] = -y[0];
}

fn exact(t: f64) -> Vec<f64> {
    vec![t.cos(), -t.sin()]
}

const T1: f64 = 3.0;
const METHODS: [Method; 2] = [Method::DormandPrince54, Method::BogackiShampine32];

/// The oscillator as a plain function pointer (`Clone`, nameable).
type Rhs = fn(f64, &[f64], &mut [f64]);

fn study() -> Study<'static, Rhs> {
    Study::new(oscillator as Rhs, (0.0, T1), &[1.0, 0.0])
        .name("oscillator")
        .methods(METHODS)
        .tolerances([1e-4, 1e-8])
        .reference(exact(T1), "closed form (cos t, -sin t)")
        .repeats(2)
}

/// Splits one CSV line into fields, honouring quotes (RFC 4180).
fn csv_fields(line: &str) -> Vec<String> {
    let mut fields = vec![String::new()];
    let mut quoted = false;
    let mut chars = line.chars().peekable();
    while let Some(c) = chars.next() {
        match (c, quoted) {
            ('"', true) if chars.peek() == Some(&'"') => {
                chars.next();
                fields.last_mut().unwrap().push('"');
            }
            ('"', _) => quoted = !quoted,
            (',', false) => fields.push(String::new()),
            (c, _) => fields.last_mut().unwrap().push(c),
        }
    }
    fields
}

#[test]
fn errors_fall_with_tolerance_and_meet_it() {
    let report = study().run().unwrap();
    assert_eq!(report.rows().len(), 4);
    assert_eq!(report.labels(), vec![METHODS[0].name(), METHODS[1].name()]);
    for m in METHODS {
        let loose = report.row(m.name(), 1e-4).unwrap();
        let tight = report.row(m.name(), 1e-8).unwrap();
        assert!(loose.succeeded() && tight.succeeded());
        let (el, et) = (loose.error.unwrap(), tight.error.unwrap());
        // Against the closed form: within ten times the requested rtol
        // (the winner rule's default slack), and a thousand times smaller
        // for a tolerance ten thousand times tighter.
        assert!(el <= 10.0 * 1e-4, "{m}: error {el:e} at rtol 1e-4");
        assert!(et <= 10.0 * 1e-8, "{m}: error {et:e} at rtol 1e-8");
        assert!(et < el * 1e-3, "{m}: {el:e} -> {et:e}");
        assert!(tight.stats.rhs_evals > loose.stats.rhs_evals);
        assert!(tight.stats.accepted > loose.stats.accepted);
        assert_eq!(tight.timed_runs, 2);
        assert!(tight.seconds > 0.0);
        assert_eq!(tight.t_reached, T1);
    }
    let winners = report.winners();
    assert_eq!(winners.len(), 2);
    for w in &winners {
        assert_eq!(w.basis, WinnerBasis::MetTolerance);
        assert!(METHODS.iter().any(|m| m.name() == w.label));
    }
}

#[test]
fn failing_runs_become_rows() {
    let report = study()
        // The step budget runs out long before t = 3.
        .contender(
            "step budget 3",
            Options::default()
                .method(Method::DormandPrince54)
                .max_steps(3),
        )
        // Forward Euler has no error estimate: an input error.
        .method(Method::ForwardEuler)
        .run()
        .unwrap();
    assert_eq!(report.rows().len(), 8);
    for rtol in [1e-4, 1e-8] {
        let budget = report.row("step budget 3", rtol).unwrap();
        assert!(!budget.succeeded());
        assert!(budget.error.is_none());
        assert!(budget
            .failure
            .as_deref()
            .unwrap()
            .contains("maximum number of steps"));
        assert!(budget.t_reached > 0.0 && budget.t_reached < T1);
        assert!(budget.stats.accepted + budget.stats.rejected <= 3);
        assert!(budget.stats.rhs_evals > 0);
        assert_eq!(budget.timed_runs, 1, "a failed run is not repeated");
        let euler = report.row(Method::ForwardEuler.name(), rtol).unwrap();
        assert!(euler.failure.as_deref().unwrap().contains("fixed step"));
        assert_eq!(euler.t_reached, 0.0);
        // The good runs are untouched by the failures.
        assert!(report.row(METHODS[0].name(), rtol).unwrap().succeeded());
    }
    let table = report.table();
    assert!(table.contains("failed"));
    assert!(table.contains("maximum number of steps"));
    // Winners ignore failed runs.
    assert!(report
        .winners()
        .iter()
        .all(|w| METHODS.iter().any(|m| m.name() == w.label)));
}

#[test]
fn a_panicking_model_is_a_failed_row() {
    let report = Study::new(
        |t: f64, y: &[f64], dy: &mut [f64]| {
            assert!(t < 0.5, "model breaks down at t = {t}");
            dy[0] = -y[0];
        },
        (0.0, 1.0),
        &[1.0],
    )
    .method(Method::DormandPrince54)
    .tolerances([1e-6])
    .reference(vec![(-1.0f64).exp()], "closed form e^{-t}")
    .repeats(1)
    .run()
    .unwrap();
    let row = &report.rows()[0];
    let msg = row.failure.as_deref().unwrap();
    assert!(
        msg.starts_with("panicked") && msg.contains("breaks down"),
        "{msg}"
    );
}

#[test]
fn csv_has_the_columns_and_one_line_per_run() {
    let report = study()
        .contender(
            "budget, \"three\"",
            Options::default()
                .method(Method::DormandPrince54)
                .max_steps(3),
        )
        .run()
        .unwrap();
    let csv = report.to_csv();
    let lines: Vec<&str> = csv.lines().collect();
    assert_eq!(lines.len(), 1 + report.rows().len());
    assert_eq!(csv_fields(lines[0]), HEADER.to_vec());
    for (line, row) in lines[1..].iter().zip(report.rows()) {
        let f = csv_fields(line);
        assert_eq!(f.len(), HEADER.len(), "{line}");
        assert_eq!(f[0], "oscillator");
        assert_eq!(f[1], row.label);
        assert_eq!(f[3].parse::<f64>().unwrap(), row.rtol);
        assert_eq!(f[5], if row.succeeded() { "ok" } else { "failed" });
        match row.error {
            Some(e) => assert_eq!(f[6].parse::<f64>().unwrap(), e),
            None => assert!(f[6].is_empty()),
        }
        assert_eq!(f[8].parse::<usize>().unwrap(), row.stats.rhs_evals);
        assert_eq!(f[19], row.failure.clone().unwrap_or_default());
    }
    assert!(lines
        .iter()
        .any(|l| l.contains("\"budget, \"\"three\"\"\"")));
}

#[test]
fn table_columns_line_up() {
    let report = study()
        .contender(
            "a much longer label than the others",
            Options::default().method(Method::DormandPrince54),
        )
        .run()
        .unwrap();
    let table = report.table();
    let lines: Vec<&str> = table
        .lines()
        .skip_while(|l| !l.starts_with("method"))
        .collect();
    assert_eq!(lines.len(), 2 + report.rows().len());
    let header = lines[0];
    // Every right-aligned column ends where its header ends.
    for name in ["rtol", "error", "time [ms]", "rhs", "accepted", "switches"] {
        let end = header.find(name).unwrap() + name.len();
        for line in &lines[1..] {
            let bytes = line.as_bytes();
            assert!(bytes[end - 1] != b' ', "column {name} in {line:?}");
            assert!(
                end == bytes.len() || bytes[end] == b' ',
                "column {name} in {line:?}"
            );
        }
    }
    assert!(table.contains("closed form (cos t, -sin t)"));
    assert_eq!(format!("{report}"), table);
}

#[test]
fn the_reference_is_computed_when_not_given() {
    let report = Study::new(oscillator, (0.0, T1), &[1.0, 0.0])
        .method(Method::DormandPrince54)
        .tolerances([1e-6])
        .repeats(1)
        .run()
        .unwrap();
    let reference = report.reference();
    assert!(
        reference.source.starts_with("computed:"),
        "{}",
        reference.source
    );
    // A run at rtol 1e-9 against the closed form.
    let y = reference.y.as_ref().unwrap();
    assert!(relative_error(y, &exact(T1), 1e-9) < 1e-7);
    assert!(report.rows()[0].error.unwrap() < 1e-4);
}

#[test]
fn cost_ratio_compares_with_the_best_single_method() {
    let report = study().method(Method::default()).run().unwrap();
    let ratio = report.cost_ratio(Method::default().name(), 1e-8).unwrap();
    assert!(METHODS.iter().any(|m| m.name() == ratio.against));
    let ours = report.row(Method::default().name(), 1e-8).unwrap();
    let theirs = report.row(&ratio.against, 1e-8).unwrap();
    assert_eq!(
        ratio.rhs,
        ours.stats.rhs_evals as f64 / theirs.stats.rhs_evals as f64
    );
    assert!(report.cost_ratio("no such label", 1e-8).is_none());
}

#[test]
fn bad_studies_are_refused() {
    let empty = Study::new(oscillator, (0.0, 1.0), &[1.0, 0.0]).tolerances([1e-6]);
    assert_eq!(empty.run().unwrap_err(), StudyError::NoContenders);
    let no_tol = Study::new(oscillator, (0.0, 1.0), &[1.0, 0.0]).method(Method::Rk4);
    assert_eq!(no_tol.run().unwrap_err(), StudyError::NoTolerances);
    let twice = study().method(Method::DormandPrince54);
    assert!(matches!(
        twice.run().unwrap_err(),
        StudyError::DuplicateLabel(_)
    ));
    let short = study().reference(vec![1.0], "too short");
    assert!(matches!(
        short.run().unwrap_err(),
        StudyError::ReferenceLength {
            expected: 2,
            got: 1
        }
    ));
    let negative = study().tolerances([1e-6, -1.0]);
    assert!(matches!(
        negative.run().unwrap_err(),
        StudyError::InvalidTolerance { name: "rtol", .. }
    ));
    assert_eq!(study().repeats(0).run().unwrap_err(), StudyError::NoRepeats);
}

/// A row with only what the winner rule reads (the rule is pure selection
/// logic, so made-up figures are the right test input here).
fn row(label: &str, method: Method, error: f64, seconds: f64) -> Row {
    Row {
        label: label.into(),
        method,
        rtol: 1e-6,
        atol: 1e-9,
        error: Some(error),
        seconds,
        stats: crate::Stats {
            rhs_evals: (seconds * 1e6) as usize,
            ..Default::default()
        },
        t_reached: 1.0,
        failure: None,
        timed_runs: 1,
    }
}

fn synthetic(rows: Vec<Row>) -> Report {
    Report {
        model: "selection".into(),
        dim: 1,
        span: (0.0, 1.0),
        reference: ReferenceInfo {
            t: 1.0,
            y: Some(vec![0.0]),
            source: "made up for the selection rule".into(),
        },
        error_floor: 1e-9,
        repeats: 1,
        rule: WinnerRule::default(),
        rows,
    }
}

#[test]
fn the_winner_is_the_fastest_adequate_run() {
    // Two runs meet 10 x rtol = 1e-5: the faster of them wins, not the
    // fastest overall (which is far less accurate).
    let r = synthetic(vec![
        row("sloppy", Method::DormandPrince54, 1e-3, 0.001),
        row("slow", Method::RadauIIA5, 1e-7, 0.009),
        row("good", Method::Bdf, 5e-6, 0.004),
        row("switch", Method::default(), 2e-6, 0.006),
    ]);
    let w = &r.winners()[0];
    assert_eq!(
        (w.label.as_str(), w.basis),
        ("good", WinnerBasis::MetTolerance)
    );
    let c = r.cost_ratio("switch", 1e-6).unwrap();
    assert_eq!(c.against, "good");
    assert!((c.seconds - 1.5).abs() < 1e-12 && (c.rhs - 1.5).abs() < 1e-12);
    // No run meets 1e-5: the fastest within 10 x the best error (1e-4) wins.
    let r = synthetic(vec![
        row("a", Method::DormandPrince54, 5e-4, 0.001),
        row("b", Method::Tsitouras54, 1e-4, 0.003),
        row("c", Method::Adams, 5e-3, 0.0005),
    ]);
    let w = &r.winners()[0];
    assert_eq!((w.label.as_str(), w.basis), ("a", WinnerBasis::NearBest));
}

#[cfg(feature = "plot")]
#[test]
fn the_picture_has_axes_a_legend_and_a_line_per_method() {
    let report = study()
        .method(Method::ForwardEuler) // fails: listed, no line
        .run()
        .unwrap();
    let svg = crate::plot::work_precision::work_precision_svg(&report).unwrap();
    assert!(svg.starts_with("<svg"));
    assert!(svg.contains("wall time [s]"));
    assert!(svg.contains("error at t = 3"));
    for m in METHODS {
        assert!(svg.contains(m.name()), "legend entry {m}");
    }
    assert!(svg.contains("forward Euler (no successful run)"));
    // One data line per successful method (two points each) in its colour.
    for colour in ["#0072B2", "#D55E00"] {
        let lines = svg
            .lines()
            .filter(|l| l.contains("<polyline") && l.contains(colour))
            .count();
        assert!(
            lines >= 2,
            "colour {colour}: {lines} polylines (line + legend)"
        );
    }
}

/// A run well under a millisecond is timed in batches: each repetition
/// runs the model back to back until a millisecond has passed, and the row
/// keeps the mean time of one run. (The first repetition also pays the
/// process's one-time work, such as the stability region: the median of
/// three leaves it out.)
#[test]
fn short_runs_are_timed_in_batches() {
    use std::cell::Cell;
    let made = Cell::new(0usize);
    let make = || {
        made.set(made.get() + 1);
        oscillator as Rhs
    };
    let options = Options::default()
        .method(Method::DormandPrince54)
        .rtol(1e-4)
        .atol(1e-7);
    let job = runner::Job {
        label: "DP5(4)".into(),
        rtol: 1e-4,
        atol: 1e-7,
        options,
    };
    let rows = runner::measure_all(
        &make,
        (0.0, T1),
        &[1.0, 0.0],
        &[job],
        3,
        Some(&exact(T1)),
        1e-7,
    );
    let row = &rows[0];
    assert!(row.failure.is_none(), "{:?}", row.failure);
    assert_eq!(row.timed_runs, 3);
    assert!(
        row.seconds < runner::MIN_SAMPLE_SECONDS,
        "mean of one run: {} s",
        row.seconds
    );
    assert!(made.get() > 4, "{} runs: no batching", made.get());
}
