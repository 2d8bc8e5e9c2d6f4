//! The per-step observer: sees every accepted step in order, with the
//! counters, and can end the run early.

use std::cell::Cell;
use std::ops::ControlFlow;

use ballast::{Direction, Event, Method, Options, Run, StopReason};

fn decay(_t: f64, y: &[f64], dy: &mut [f64]) {
    dy[0] = -y[0];
}

/// The observer is called once per accepted step, with increasing t, the
/// state of that step (closed form e^{-t}) and counters that grow by one
/// accepted step per call; returning Continue lets the run reach the end.
#[test]
fn observer_sees_every_step_in_order() {
    for method in [
        Method::DormandPrince54,
        Method::RadauIIA5,
        Method::default(),
    ] {
        let opts = Options::default().rtol(1e-8).atol(1e-12).method(method);
        let mut seen: Vec<(f64, usize)> = Vec::new();
        let mut worst = 0.0f64;
        let (sol, reason) = Run::new(decay, (0.0, 3.0), &[1.0], &opts)
            .observer(|info| {
                seen.push((info.t, info.stats.accepted));
                worst = worst.max((info.y[0] - (-info.t).exp()).abs());
                assert!(info.h > 0.0);
                ControlFlow::Continue(())
            })
            .solve_with_reason()
            .unwrap();
        assert_eq!(reason, StopReason::ReachedEnd);
        assert_eq!(seen.len(), sol.stats().accepted, "{method}");
        assert!(seen
            .windows(2)
            .all(|w| w[1].0 > w[0].0 && w[1].1 == w[0].1 + 1));
        assert_eq!(seen[0].1, 1);
        assert_eq!(seen.last().unwrap().0, 3.0);
        // Closed form e^{-t}; 100 x the tolerance.
        assert!(worst < 1e-6, "{method}: {worst:e}");
        // The stored steps are the observed ones.
        let stored: Vec<f64> = sol.times()[1..].to_vec();
        let observed: Vec<f64> = seen.iter().map(|s| s.0).collect();
        assert_eq!(stored, observed);
    }
}

/// Returning Break after ten steps ends the run successfully at the tenth
/// step: ObserverStopped, t_final is the time the observer saw last.
#[test]
fn observer_stops_the_run_early() {
    let opts = Options::default()
        .rtol(1e-8)
        .atol(1e-12)
        .method(Method::DormandPrince54);
    let last_t = Cell::new(f64::NAN);
    let mut calls = 0usize;
    let (sol, reason) = Run::new(decay, (0.0, 100.0), &[1.0], &opts)
        .observer(|info| {
            calls += 1;
            last_t.set(info.t);
            if calls == 10 {
                ControlFlow::Break(())
            } else {
                ControlFlow::Continue(())
            }
        })
        .solve_with_reason()
        .unwrap();
    assert_eq!(reason, StopReason::ObserverStopped);
    assert_eq!(calls, 10);
    assert_eq!(sol.stats().accepted, 10);
    assert_eq!(sol.t_final(), last_t.get());
    assert!(sol.t_final() < 100.0);
    assert_eq!(*sol.times().last().unwrap(), sol.t_final());
    assert!((sol.y_final()[0] - (-sol.t_final()).exp()).abs() < 1e-7);
    // Dense output is available up to where the run stopped, not beyond.
    assert!(sol.eval(0.5 * sol.t_final()).is_ok());
    assert!(sol.eval(sol.t_final() * 1.5 + 1.0).is_err());
}

/// Backwards, the observer sees decreasing t; with a terminal event it is
/// called for the event's step with the event's time and state.
#[test]
fn observer_backwards_and_with_a_terminal_event() {
    let opts = Options::default()
        .rtol(1e-10)
        .atol(1e-12)
        .method(Method::DormandPrince54);
    let mut ts = Vec::new();
    // y' = -y backwards from y(2) = e^{-2}: y = e^{-t} rises to 1/2 at
    // t = ln 2 (closed form), where the terminal event stops the run.
    let sol = Run::new(decay, (2.0, 0.0), &[(-2.0f64).exp()], &opts)
        .event(
            Event::new(|_t: f64, y: &[f64]| y[0] - 0.5)
                .direction(Direction::Rising)
                .terminal(),
        )
        .observer(|info| {
            ts.push((info.t, info.y[0]));
            ControlFlow::Continue(())
        })
        .solve()
        .unwrap();
    assert!(ts.windows(2).all(|w| w[1].0 < w[0].0));
    let (t_last, y_last) = *ts.last().unwrap();
    assert_eq!(t_last, sol.t_final());
    assert!((t_last - std::f64::consts::LN_2).abs() < 1e-9);
    assert!((y_last - 0.5).abs() < 1e-9);
}
