//! Prints the stability facts of every method and draws their regions.
//!
//! ```text
//! cargo run --release --example stability [-- path/to/regions.svg]
//! ```
//!
//! The table lists, per method (and per order for Adams and BDF): the
//! classical order, the real interval `[-a, 0]` and the imaginary interval
//! `[-ib, ib]` inside the region ("unbounded" when the whole axis is inside),
//! A-stability, `|R(-inf)|` and L-stability, and the A(alpha) angle. The
//! picture (default `target/stability-regions.svg`) has one panel per
//! family.

use std::time::Instant;

use ballast::stability::{self, RegionKey, StabilitySummary};
use ballast::{Complex64, Method};

fn interval(x: Option<f64>) -> String {
    match x {
        None => "unbounded".to_string(),
        Some(0.0) => "0".to_string(),
        Some(v) => format!("{v:.4}"),
    }
}

fn row(name: &str, s: &StabilitySummary) {
    let yes_no = |b: bool| if b { "yes" } else { "no" };
    let r_inf = if s.r_infinity.is_infinite() {
        "inf".to_string()
    } else {
        format!("{:.3}", s.r_infinity)
    };
    let alpha = s.a_alpha.map_or("-".to_string(), |a| format!("{a:.2}"));
    println!(
        "{:<26} {:>5} {:>10} {:>10} {:>8} {:>9} {:>8} {:>8}",
        name,
        s.order,
        interval(s.real_interval),
        interval(s.imag_interval),
        yes_no(s.a_stable),
        r_inf,
        yes_no(s.l_stable),
        alpha
    );
}

fn section(title: &str, keys: impl IntoIterator<Item = RegionKey>) {
    println!("-- {title}");
    for key in keys {
        match stability::region(key) {
            Some(r) => row(r.name(), r.summary()),
            None => println!("{:<26} (no coefficients in the library)", key.name()),
        }
    }
}

fn main() {
    let start = Instant::now();
    let all = RegionKey::all();
    let computed = all
        .iter()
        .filter(|&&k| stability::region(k).is_some())
        .count();
    let elapsed = start.elapsed();

    println!(
        "{:<26} {:>5} {:>10} {:>10} {:>8} {:>9} {:>8} {:>8}",
        "method", "order", "real", "imag", "A-stable", "|R(-inf)|", "L-stable", "A(alpha)"
    );
    let one_step = |ms: &[Method]| ms.iter().map(|&m| RegionKey::Method(m)).collect::<Vec<_>>();
    section(
        "explicit Runge-Kutta",
        one_step(&[
            Method::ForwardEuler,
            Method::Heun,
            Method::Rk4,
            Method::BogackiShampine32,
            Method::DormandPrince54,
            Method::Tsitouras54,
            Method::DormandPrince853,
        ]),
    );
    section(
        "implicit one-step",
        one_step(&[
            Method::BackwardEuler,
            Method::Trapezoid,
            Method::TrBdf2,
            Method::Esdirk43,
            Method::RadauIIA5,
            Method::Ros3p,
            Method::Rosenbrock32,
        ]),
    );
    section(
        "Adams (Method::Adams: PECE, AB(k) predicts, AM(k) corrects)",
        (1..=12).map(RegionKey::AdamsPece),
    );
    section("Adams-Bashforth", (1..=12).map(RegionKey::AdamsBashforth));
    section(
        "Adams-Moulton (corrector solved exactly)",
        (1..=12).map(RegionKey::AdamsMoulton),
    );
    section(
        "BDF (Method::Bdf uses orders 1-5)",
        (1..=6).map(RegionKey::Bdf),
    );
    println!(
        "\n{computed} regions ({} rays each) computed in {:.1} ms",
        stability::RAYS,
        elapsed.as_secs_f64() * 1e3
    );

    // The contract's example: forward Euler on lambda = -4 may step 0.5.
    let lam = Complex64::new(-4.0, 0.0);
    println!(
        "critical_step(ForwardEuler, -4) = {:?}; critical_step(Rk4, -4) = {:?}; critical_step(Adams, -4) = {:?}",
        stability::critical_step(Method::ForwardEuler, lam),
        stability::critical_step(Method::Rk4, lam),
        stability::critical_step(Method::Adams, lam),
    );

    draw();
}

#[cfg(feature = "plot")]
fn draw() {
    let path = std::env::args()
        .nth(1)
        .map(std::path::PathBuf::from)
        .unwrap_or_else(|| std::path::PathBuf::from("target/stability-regions.svg"));
    if let Some(dir) = path.parent().filter(|d| !d.as_os_str().is_empty()) {
        if let Err(e) = std::fs::create_dir_all(dir) {
            eprintln!("cannot create {}: {e}", dir.display());
            std::process::exit(1);
        }
    }
    let start = Instant::now();
    match ballast::plot::regions::stability_regions_svg(&path) {
        Ok(()) => println!(
            "stability regions written to {} ({:.2} s)",
            path.display(),
            start.elapsed().as_secs_f64()
        ),
        Err(e) => {
            eprintln!("{e}");
            std::process::exit(1);
        }
    }
}

#[cfg(not(feature = "plot"))]
fn draw() {
    println!("(built without the `plot` feature: no picture)");
}
