//! A short tour of ballast on a scenario of our own: a stirred-tank reactor
//! warming up. The parameters are illustrative, chosen for the demo.
//!
//! A feed keeps the reactant near `c = 1`; a heater warms the tank; the
//! reaction rate `k(T) = e^T` grows with temperature. While the tank is
//! cool the problem is mild; once it is hot the reaction relaxes `c` on a
//! time scale of `1/k ~ 1e-4`, and an explicit method would be held to tiny
//! steps. The default method notices, switches to an implicit scheme, and
//! reports every decision.
//!
//!     c' = F (1 - c) - k(T) c
//!     T' = H - L T + Q k(T) c
//!
//! Run: `cargo run --release --example tour`

use std::io::Write;
use std::ops::ControlFlow;
use std::time::Instant;

use ballast::{integrate, Method, Options, Run, Solution};

const F: f64 = 1.0; // feed rate
const H: f64 = 0.8; // heater power
const L: f64 = 0.1; // heat loss coefficient
const Q: f64 = 0.2; // heat of reaction

fn reactor(_t: f64, y: &[f64], dy: &mut [f64]) {
    let (c, temp) = (y[0], y[1]);
    let k = temp.exp();
    dy[0] = F * (1.0 - c) - k * c;
    dy[1] = H - L * temp + Q * k * c;
}

fn summary(label: &str, sol: &Solution, seconds: f64) {
    let s = sol.stats();
    println!(
        "  {label:<28} {:>9} {:>8} {:>10} {:>6} {:>6} {:>8} {:>9.2}",
        s.accepted,
        s.rejected,
        s.rhs_evals,
        s.jacobian_evals,
        s.factorizations,
        s.switches,
        seconds * 1e3
    );
}

fn main() -> Result<(), ballast::Error> {
    let span = (0.0, 60.0);
    let y0 = [1.0, 0.0];
    let opts = Options::default().rtol(1e-6).atol(1e-9);

    println!("ballast tour: a stirred-tank reactor warming up (illustrative parameters)");
    println!("  c' = F(1 - c) - e^T c,  T' = H - L T + Q e^T c,  c(0) = 1, T(0) = 0, t in [0, 60]");
    println!("  rtol = 1e-6, atol = 1e-9\n");

    // 1. The default: switching between Dormand-Prince 5(4) and Radau IIA 5.
    // The first run in a process also computes the methods' stability
    // regions (once, about 15 ms); time a second run.
    let sol = integrate(reactor, span, &y0, &opts)?;
    let clock = Instant::now();
    let _ = integrate(reactor, span, &y0, &opts)?;
    let auto_time = clock.elapsed().as_secs_f64();
    let y = sol.y_final();
    println!(
        "Result at t = {}: c = {:.6e}, T = {:.6}",
        sol.t_final(),
        y[0],
        y[1]
    );
    println!(
        "  stiffness at the end: rate k(T) = e^T = {:.3e} (time scale {:.1e})",
        y[1].exp(),
        1.0 / y[1].exp()
    );
    let mid = sol.eval(5.0)?;
    println!(
        "  dense output at t = 5: c = {:.6}, T = {:.6}\n",
        mid[0], mid[1]
    );

    println!("Decisions of the default (switching) method:");
    if sol.switches().is_empty() {
        println!("  no switch");
    }
    for sw in sol.switches() {
        println!(
            "  t = {:>9.4}  {} -> {}  (h = {:.2e}, rho = {:.2e}): {}",
            sw.t, sw.from, sw.to, sw.h, sw.rho, sw.reason
        );
    }
    let s = sol.stats();
    println!(
        "  {} spectral estimates ({} right-hand-side calls), {} steps set by the stability cap\n",
        s.spectral_estimates, s.spectral_products, s.stability_limited
    );

    // 2. The same run with each scheme forced, for comparison. The explicit
    //    one is the longer run: a progress bar shows it move.
    println!(
        "  {:<28} {:>9} {:>8} {:>10} {:>6} {:>6} {:>8} {:>9}",
        "method", "accepted", "rejected", "f calls", "jac", "LU", "switches", "ms"
    );
    summary("switching (default)", &sol, auto_time);
    let clock = Instant::now();
    let radau = integrate(reactor, span, &y0, &opts.clone().method(Method::RadauIIA5))?;
    summary("Radau IIA 5 only", &radau, clock.elapsed().as_secs_f64());

    let clock = Instant::now();
    let mut shown = 0usize;
    let explicit = Run::new(
        reactor,
        span,
        &y0,
        &opts.clone().method(Method::DormandPrince54),
    )
    .observer(|info| {
        let done = ((info.t - span.0) / (span.1 - span.0) * 40.0) as usize;
        if done > shown {
            shown = done;
            eprint!("\r  [{:<40}] t = {:>5.1}", "#".repeat(done), info.t);
            let _ = std::io::stderr().flush();
        }
        ControlFlow::Continue(())
    })
    .solve()?;
    eprintln!();
    summary(
        "Dormand-Prince 5(4) only",
        &explicit,
        clock.elapsed().as_secs_f64(),
    );

    let diff = (explicit.y_final()[1] - y[1]).abs();
    println!("\nAll three agree on T(60) to {diff:.1e}.");
    println!("Results bound the local error per step; validate against cases you know.");
    Ok(())
}
