//! The best switch in hindsight: a bound on what any switching rule can
//! gain on a model.
//!
//! ```text
//! cargo run --release --example handoff -- stiffness-ramp
//!     [--rtol 1e-6] [--pair radau|bdf] [--at 0.5,1,1.5,...] [--repeats 200]
//! ```
//!
//! The model is integrated in two pieces: the pair's explicit scheme from
//! `t0` to `t_s`, then its implicit scheme from there to the end, started
//! afresh from the first piece's final state. The cost of the cheapest
//! `t_s` bounds the cost of a run that switches once, whatever rule picks
//! the switch time: it pays no monitor and no wrong trial. (It is an
//! estimate, not a strict bound, when the real switch passes more than a
//! state: the multistep pair hands its Nordsieck history to BDF, which here
//! restarts at order 1 instead.) Each single scheme over the whole span is
//! timed beside it, and the switching pair itself. Times are the best of
//! `--repeats` runs, the contenders interleaved so that load touches all
//! alike; errors are against the model's reference (its source printed).

use std::time::Instant;

use ballast::{integrate, Method, Options, Output, SwitchPair};
use ballast_models::Case;

struct Settings {
    rtol: f64,
    pair: SwitchPair,
    at: Vec<f64>,
    repeats: usize,
}

fn parse(args: &[String]) -> Result<(String, Settings), String> {
    let mut s = Settings {
        rtol: 1e-6,
        pair: SwitchPair::DormandPrinceRadau,
        at: Vec::new(),
        repeats: 200,
    };
    let mut name = None;
    let mut rest = args.iter();
    while let Some(flag) = rest.next() {
        if !flag.starts_with("--") {
            name = Some(flag.clone());
            continue;
        }
        let v = rest.next().ok_or_else(|| format!("{flag} needs a value"))?;
        let bad = |e: &dyn std::fmt::Display| format!("{flag} {v}: {e}");
        match flag.as_str() {
            "--rtol" => s.rtol = v.parse().map_err(|e| bad(&e))?,
            "--repeats" => s.repeats = v.parse().map_err(|e| bad(&e))?,
            "--pair" => {
                s.pair = match v.as_str() {
                    "radau" => SwitchPair::DormandPrinceRadau,
                    "bdf" => SwitchPair::AdamsBdf,
                    _ => return Err(bad(&"radau or bdf")),
                }
            }
            "--at" => {
                s.at = v
                    .split(',')
                    .map(|x| x.trim().parse().map_err(|e| bad(&e)))
                    .collect::<Result<_, _>>()?;
            }
            _ => return Err(format!("unknown option {flag}")),
        }
    }
    let name = name.ok_or("name a model (see `cargo run --example compare`)")?;
    Ok((name, s))
}

/// The two schemes of a pair: explicit, implicit.
fn halves(pair: SwitchPair) -> (Method, Method) {
    match pair {
        SwitchPair::DormandPrinceRadau => (Method::DormandPrince54, Method::RadauIIA5),
        SwitchPair::AdamsBdf => (Method::Adams, Method::Bdf),
    }
}

/// One contender: a sequence of (method, end time) pieces from `t0`.
struct Plan {
    label: String,
    pieces: Vec<(Method, f64)>,
    best: f64,
    error: f64,
    failed: Option<String>,
}

impl Plan {
    fn new(label: String, pieces: Vec<(Method, f64)>) -> Self {
        Self {
            label,
            pieces,
            best: f64::INFINITY,
            error: f64::NAN,
            failed: None,
        }
    }

    /// Runs the pieces once; returns the final state.
    fn run(&self, case: &Case, rtol: f64) -> Result<Vec<f64>, String> {
        let (mut t, mut y) = (case.span.0, case.y0.clone());
        for &(method, end) in &self.pieces {
            let opts = Options::default()
                .method(method)
                .rtol(rtol)
                .atol(1e-3 * rtol)
                .output(Output::Final)
                .max_steps(200_000);
            let sol = integrate(case.system.clone(), (t, end), &y, &opts)
                .map_err(|e| format!("{} on [{t}, {end}]: {e}", method.name()))?;
            (t, y) = (sol.t_final(), sol.y_final().to_vec());
        }
        Ok(y)
    }

    fn time(&mut self, case: &Case, rtol: f64) {
        if self.failed.is_some() {
            return;
        }
        let clock = Instant::now();
        match self.run(case, rtol) {
            Ok(y) => {
                self.best = self.best.min(clock.elapsed().as_secs_f64());
                self.error = case.reference.relative_error(&y);
            }
            Err(e) => self.failed = Some(e),
        }
    }
}

fn main() {
    let args: Vec<String> = std::env::args().skip(1).collect();
    let (name, s) = match parse(&args) {
        Ok(v) => v,
        Err(e) => {
            eprintln!("handoff: {e}");
            std::process::exit(2);
        }
    };
    let Some(case) = ballast_models::get(&name) else {
        eprintln!("handoff: no model named {name}");
        std::process::exit(2);
    };
    let (t0, t1) = case.span;
    let at = if s.at.is_empty() {
        (1..10).map(|k| t0 + (t1 - t0) * k as f64 / 10.0).collect()
    } else {
        s.at.clone()
    };
    if let Some(bad) = at.iter().find(|&&t| !(t > t0 && t < t1)) {
        eprintln!("handoff: --at {bad} is not inside the span ({t0}, {t1})");
        std::process::exit(2);
    }
    let (explicit, implicit) = halves(s.pair);
    let pair = Method::Switching(s.pair);
    let mut plans = vec![
        Plan::new(pair.name().to_string(), vec![(pair, t1)]),
        Plan::new(explicit.name().to_string(), vec![(explicit, t1)]),
        Plan::new(implicit.name().to_string(), vec![(implicit, t1)]),
    ];
    if s.pair == SwitchPair::DormandPrinceRadau {
        plans.push(Plan::new("BDF".to_string(), vec![(Method::Bdf, t1)]));
    }
    for &ts in &at {
        plans.push(Plan::new(
            format!("hand-off at t = {ts}"),
            vec![(explicit, ts), (implicit, t1)],
        ));
    }
    for _ in 0..s.repeats.max(1) {
        for p in plans.iter_mut() {
            p.time(&case, s.rtol);
        }
    }

    println!("{}: {}", case.name, case.description);
    println!("reference: {}", case.reference.source);
    println!(
        "rtol {:e}, atol {:e}; best of {} runs each\n",
        s.rtol,
        1e-3 * s.rtol,
        s.repeats.max(1)
    );
    println!("{:<32} {:>11} {:>10}", "run", "time [us]", "error");
    for p in &plans {
        match &p.failed {
            Some(e) => println!("{:<32} failed: {e}", p.label),
            None => println!("{:<32} {:>11.1} {:>10.2e}", p.label, p.best * 1e6, p.error),
        }
    }
    let single = plans[1..]
        .iter()
        .filter(|p| p.failed.is_none() && !p.label.starts_with("hand-off"))
        .min_by(|a, b| a.best.total_cmp(&b.best));
    let handoff = plans
        .iter()
        .filter(|p| p.failed.is_none() && p.label.starts_with("hand-off"))
        .min_by(|a, b| a.best.total_cmp(&b.best));
    if let (Some(single), Some(handoff)) = (single, handoff) {
        println!(
            "\nbest hand-off / best single ({}): {:.2}; the switching pair / best single: {:.2}",
            single.label,
            handoff.best / single.best,
            plans[0].best / single.best
        );
    }
}
