//! Compares methods on a published test problem: achieved error against work.
//!
//! ```text
//! cargo run --release --example compare                  # lists the models
//! cargo run --release --example compare -- robertson     # one model
//! cargo run --release --example compare -- all           # every model, then a summary
//!     [--rtol 1e-4,1e-6,1e-8] [--repeats 5] [--out target/compare] [--own-reference]
//!     [--jacobian-refresh-rate 1e-3,0.03,..]
//! ```
//!
//! For each model it runs every sensible method (and the switching
//! default) at each tolerance, measures the error at the end of the span
//! against the model's reference solution (its source is printed), prints
//! the table, names the fastest adequate run per tolerance, gives the cost
//! of the switching default relative to the best single method, and for a
//! banded model the cost of the banded Jacobian relative to a dense one.
//! It writes `work-precision-<model>.svg` and `<model>.csv` to the output
//! directory. With `--own-reference` the reference is not the model's but
//! computed by the study (a much tighter run of a high-order method, named
//! in the output), as it would be for a model of your own. With
//! `--jacobian-refresh-rate r` every contender runs with
//! `Options::jacobian_refresh_rate(r)` (the Newton contraction rate above
//! which the implicit one-step schemes evaluate a new Jacobian; default
//! 1e-3); each further rate of the list adds a variant of every contender
//! the rate affects (Radau IIA 5, the diagonally implicit schemes, the
//! default pair), labelled `[refresh r]`, run side by side with the rest:
//! how that trade of Jacobians against iterations falls on a model.

#[allow(dead_code)] // `lineup::short` serves the benches
mod lineup;

use std::path::PathBuf;

use ballast::compare::{Report, Study};
use ballast::{Method, SwitchPair};
use ballast_models::Case;

use lineup::DENSE_SUFFIX;

struct Settings {
    rtols: Vec<f64>,
    repeats: usize,
    out: PathBuf,
    /// Compute the reference with a tighter run instead of using the model's.
    own_reference: bool,
    /// `Options::jacobian_refresh_rate` for every contender (the first),
    /// and for variants of those it affects (the others).
    refresh_rates: Vec<f64>,
}

fn parse(args: &[String]) -> Result<(Vec<String>, Settings), String> {
    let mut s = Settings {
        rtols: vec![1e-4, 1e-6, 1e-8],
        repeats: 5,
        out: PathBuf::from("target/compare"),
        own_reference: false,
        refresh_rates: Vec::new(),
    };
    let mut names = Vec::new();
    let mut it = args.iter();
    while let Some(a) = it.next() {
        let mut value = |flag: &str| {
            it.next()
                .cloned()
                .ok_or_else(|| format!("{flag} needs a value"))
        };
        match a.as_str() {
            "--rtol" => {
                s.rtols = value("--rtol")?
                    .split(',')
                    .map(|v| {
                        v.trim()
                            .parse::<f64>()
                            .map_err(|e| format!("--rtol {v}: {e}"))
                    })
                    .collect::<Result<_, _>>()?;
            }
            "--repeats" => {
                s.repeats = value("--repeats")?
                    .parse()
                    .map_err(|e| format!("--repeats: {e}"))?;
            }
            "--out" => s.out = PathBuf::from(value("--out")?),
            "--own-reference" => s.own_reference = true,
            "--jacobian-refresh-rate" => {
                s.refresh_rates = value("--jacobian-refresh-rate")?
                    .split(',')
                    .map(|v| match v.trim().parse::<f64>() {
                        Ok(r) if r > 0.0 && r <= 1.0 => Ok(r),
                        Ok(_) => Err(format!("--jacobian-refresh-rate {v}: must lie in (0, 1]")),
                        Err(e) => Err(format!("--jacobian-refresh-rate {v}: {e}")),
                    })
                    .collect::<Result<_, _>>()?;
            }
            flag if flag.starts_with("--") => return Err(format!("unknown option {flag}")),
            name => names.push(name.to_string()),
        }
    }
    Ok((names, s))
}

fn list() {
    println!("usage: cargo run --release --example compare -- <model>|all");
    println!("       [--rtol a,b,..] [--repeats n] [--out dir] [--own-reference]");
    println!("       [--jacobian-refresh-rate r,..]\n");
    println!("models:");
    for case in ballast_models::all() {
        println!(
            "  {:<18} {:>5} eq.  {:<9} {}",
            case.name,
            case.dim(),
            format!("{:?}", case.character),
            case.description
        );
    }
}

/// One model's study, printed and written out.
fn study(case: &Case, s: &Settings) -> Result<Report, String> {
    let entries = lineup::entries(case, &lineup::full(case.character));
    let floor = if case.reference.floor > 0.0 {
        case.reference.floor
    } else {
        // Smallest atol of the study (atol = 1e-3 rtol, the study's default).
        s.rtols.iter().fold(f64::INFINITY, |m, &r| m.min(r)) * 1e-3
    };
    let source = format!(
        "{} (trusted to {} digits)",
        case.reference.source, case.reference.digits
    );
    let mut study = Study::new(case.system.clone(), case.span, &case.y0)
        .name(case.name)
        .tolerances(s.rtols.iter().copied())
        .repeats(s.repeats)
        .error_floor(floor);
    if !s.own_reference {
        study = study.reference(case.reference.y.clone(), &source);
    }
    for e in entries {
        let Some((&first, others)) = s.refresh_rates.split_first() else {
            study = study.contender(&e.label, e.options);
            continue;
        };
        study = study.contender(&e.label, e.options.clone().jacobian_refresh_rate(first));
        // Dense-Jacobian variants are slow and need no second rate.
        if refresh_rate_applies(e.options.get_method()) && !e.label.ends_with(DENSE_SUFFIX) {
            for &r in others {
                let label = format!("{} [refresh {r}]", e.label);
                study = study.contender(&label, e.options.clone().jacobian_refresh_rate(r));
            }
        }
    }
    let report = study.run().map_err(|e| e.to_string())?;
    println!("{}: {}\n", case.name, case.description);
    println!("{report}");
    println!("winners (fastest run with error <= 10 x rtol; if none, fastest within 10 x the best error):");
    for w in report.winners() {
        println!("  {w}");
    }
    let trusted = 10f64.powf(-case.reference.digits);
    if !s.own_reference
        && report
            .rows()
            .iter()
            .any(|r| r.error.is_some_and(|e| e < trusted))
    {
        println!("  (errors below {trusted:.0e} are below the reference's trusted digits)");
    }
    println!();
    std::fs::create_dir_all(&s.out).map_err(|e| format!("{}: {e}", s.out.display()))?;
    let csv = s.out.join(format!("{}.csv", case.name));
    report.write_csv(&csv).map_err(|e| e.to_string())?;
    println!("wrote {}", csv.display());
    #[cfg(feature = "plot")]
    {
        let svg = s.out.join(format!("work-precision-{}.svg", case.name));
        report.write_svg(&svg).map_err(|e| e.to_string())?;
        println!("wrote {}", svg.display());
    }
    println!();
    Ok(report)
}

/// Whether `Options::jacobian_refresh_rate` changes what `method` does:
/// Radau IIA 5, the diagonally implicit schemes and the pair built on
/// Radau IIA 5 keep a Jacobian while Newton contracts fast; Rosenbrock
/// schemes evaluate one every step and BDF keeps its own rule.
fn refresh_rate_applies(method: Method) -> bool {
    matches!(
        method,
        Method::RadauIIA5
            | Method::Esdirk43
            | Method::TrBdf2
            | Method::BackwardEuler
            | Method::Trapezoid
            | Method::Switching(SwitchPair::DormandPrinceRadau)
    )
}

/// A ratio with two significant digits.
fn ratio(x: f64) -> String {
    if x >= 0.1 {
        format!("{x:.2}")
    } else {
        format!("{x:.1e}")
    }
}

/// Summary lines of one report: switching default vs the best single
/// method, and banded vs dense Jacobians where both ran.
fn ratios(report: &Report) -> Vec<String> {
    let switching = Method::Switching(SwitchPair::DormandPrinceRadau).name();
    let mut lines = Vec::new();
    for (rtol, _) in report.tolerances() {
        let best = report
            .winners()
            .into_iter()
            .find(|w| w.rtol == rtol)
            .map_or("-".to_string(), |w| w.label);
        let (time, rhs, against) = match report.cost_ratio(switching, rtol) {
            Some(c) => (ratio(c.seconds), ratio(c.rhs), c.against),
            None => ("-".into(), "-".into(), "-".into()),
        };
        let mut banded = Vec::new();
        for label in [Method::RadauIIA5.name(), switching] {
            let dense = format!("{label}{DENSE_SUFFIX}");
            if let (Some(b), Some(d)) = (report.row(label, rtol), report.row(&dense, rtol)) {
                if b.succeeded() && d.succeeded() {
                    banded.push(format!(
                        "{label}: banded/dense time {}, rhs {}",
                        ratio(b.seconds / d.seconds),
                        ratio(b.stats.rhs_evals as f64 / d.stats.rhs_evals.max(1) as f64)
                    ));
                }
            }
        }
        lines.push(format!(
            "| {} | {rtol:.0e} | {time} | {rhs} | {against} | {best} | {} |",
            report.model(),
            if banded.is_empty() {
                "-".into()
            } else {
                banded.join("; ")
            }
        ));
    }
    lines
}

fn main() {
    let args: Vec<String> = std::env::args().skip(1).collect();
    let (names, settings) = match parse(&args) {
        Ok(p) => p,
        Err(e) => {
            eprintln!("error: {e}\n");
            list();
            std::process::exit(2);
        }
    };
    if names.is_empty() {
        list();
        return;
    }
    let cases: Vec<Case> = if names.iter().any(|n| n == "all") {
        ballast_models::all()
    } else {
        let mut v = Vec::new();
        for n in &names {
            match ballast_models::get(n) {
                Some(c) => v.push(c),
                None => {
                    eprintln!("error: no model named {n:?}\n");
                    list();
                    std::process::exit(2);
                }
            }
        }
        v
    };
    let mut summary = Vec::new();
    for case in &cases {
        match study(case, &settings) {
            Ok(report) => summary.extend(ratios(&report)),
            Err(e) => {
                eprintln!("{}: {e}", case.name);
                std::process::exit(1);
            }
        }
    }
    println!("summary: switching default vs best single method at the same tolerance");
    println!("| model | rtol | time ratio | rhs ratio | best single | overall winner | banded vs dense |");
    println!("| --- | --- | --- | --- | --- | --- | --- |");
    for line in summary {
        println!("{line}");
    }
}
