//! The stepping loop allocates nothing after start-up (issue 2, item 7).
//!
//! This test binary installs a counting global allocator (through the
//! `allocation-counter` dev-dependency), so it lives apart from the other
//! tests and benches.

use ballast::{integrate, Method, Options, Output};
use ballast_core::{Atol, ErrorNorm};
use ballast_switch::{ControlConfig, Controller};

/// The counter sees every thread's allocations: run one measurement at a time.
static SERIAL: std::sync::Mutex<()> = std::sync::Mutex::new(());

fn lorenz(_t: f64, y: &[f64], dy: &mut [f64]) {
    dy[0] = 10.0 * (y[1] - y[0]);
    dy[1] = y[0] * (28.0 - y[2]) - y[1];
    dy[2] = y[0] * y[1] - 8.0 / 3.0 * y[2];
}

/// After the controller is set up, a thousand accepted Dormand–Prince 5(4)
/// steps (with the stability monitor on) perform zero heap allocations.
#[test]
fn dormand_prince_steps_allocate_nothing() {
    let _guard = SERIAL.lock().unwrap_or_else(|e| e.into_inner());
    let cfg = ControlConfig {
        method: Method::DormandPrince54,
        ..ControlConfig::default()
    };
    let norm = ErrorNorm::new(1e-8, Atol::Scalar(1e-10), 3);
    let mut ctl = Controller::new(lorenz, 0.0, &[-8.0, 8.0, 27.0], 1e6, norm, cfg).unwrap();
    ctl.step(1e6).unwrap();
    let info = allocation_counter::measure(|| {
        for _ in 0..1000 {
            ctl.step(1e6).unwrap();
        }
    });
    // The counter works: a single Vec is seen.
    let probe = allocation_counter::measure(|| drop(std::hint::black_box(vec![1u8; 16])));
    assert!(probe.count_total >= 1);
    assert_eq!(
        info.count_total, 0,
        "allocations in the stepping loop: {info:?}"
    );
    assert!(ctl.stats().accepted >= 1000);
}

/// With final-state output, the allocations of a whole `integrate()` call
/// do not grow with the number of steps: memory stays flat.
#[test]
fn final_output_memory_is_flat() {
    let _guard = SERIAL.lock().unwrap_or_else(|e| e.into_inner());
    let count = |t_end: f64| {
        let opts = Options::default()
            .rtol(1e-8)
            .atol(1e-10)
            .method(Method::DormandPrince54)
            .output(Output::Final);
        let mut steps = 0;
        let info = allocation_counter::measure(|| {
            let sol = integrate(lorenz, (0.0, t_end), &[-8.0, 8.0, 27.0], &opts).unwrap();
            steps = sol.stats().accepted;
        });
        (info.count_total, info.bytes_max, steps)
    };
    // The first run also fills the once-computed stability-region cache.
    count(1.0);
    let (a_short, b_short, s_short) = count(1.0);
    let (a_long, b_long, s_long) = count(100.0);
    assert!(
        s_long > 50 * s_short.max(1) / 2,
        "{s_short} vs {s_long} steps"
    );
    assert_eq!(
        a_short, a_long,
        "allocation count grew with the number of steps"
    );
    assert_eq!(b_short, b_long, "peak memory grew with the number of steps");
}
