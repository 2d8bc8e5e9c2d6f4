//! Events located inside steps: a bouncing ball and a harmonic oscillator
//! against their closed forms, direction filters, several events in one
//! step, terminal events, backwards runs.

use std::f64::consts::PI;

use ballast::{Direction, Event, Method, Options, Run, StopReason};

/// Free fall with gravity `G` (state: height, velocity).
const G: f64 = 9.81;

fn free_fall(_t: f64, y: &[f64], dy: &mut [f64]) {
    dy[0] = y[1];
    dy[1] = -G;
}

/// A ball dropped from `h0` at rest bounces with coefficient of
/// restitution `e`. Closed form (free fall): the first impact is at
/// `sqrt(2 h0 / g)` with speed `v0 = sqrt(2 g h0)`; after the k-th impact
/// the ball leaves at `e^k v0` and flies `2 e^k v0 / g` until the next.
/// Each flight is a run ended by a terminal event at height zero (falling);
/// the next run starts from the event's state with the velocity reversed
/// and damped. Impact times must match to 1e-10 relative.
fn bouncing_ball(method: Method) {
    let (h0, e): (f64, f64) = (10.0, 0.8);
    let v0 = (2.0 * G * h0).sqrt();
    let opts = Options::default().rtol(1e-12).atol(1e-12).method(method);
    let mut state = vec![h0, 0.0];
    let mut t = 0.0;
    let mut expected = (2.0 * h0 / G).sqrt();
    for k in 1..=6 {
        let (sol, reason) = Run::new(free_fall, (t, t + 100.0), &state, &opts)
            .event(
                Event::new(|_t: f64, y: &[f64]| y[0])
                    .direction(Direction::Falling)
                    .terminal(),
            )
            .solve_with_reason()
            .unwrap();
        assert_eq!(reason, StopReason::TerminalEvent(0), "{method}, bounce {k}");
        let ev = sol.events().last().unwrap();
        assert!(ev.terminal && !ev.rising && ev.index == 0);
        assert_eq!(sol.t_final(), ev.t);
        assert_eq!(sol.y_final(), ev.y.as_slice());
        let rel = (ev.t - expected).abs() / expected;
        assert!(
            rel < 1e-10,
            "{method}: impact {k} at {} vs closed form {expected} (rel {rel:e})",
            ev.t
        );
        // Speed at impact: e^(k-1) v0 (closed form).
        let speed = e.powi(k - 1) * v0;
        assert!(
            (ev.y[1] + speed).abs() < 1e-9 * speed,
            "{method}: {}",
            ev.y[1]
        );
        expected += 2.0 * e.powi(k) * v0 / G;
        t = ev.t;
        state = vec![ev.y[0], -e * ev.y[1]];
    }
}

#[test]
fn bouncing_ball_dormand_prince_54() {
    bouncing_ball(Method::DormandPrince54);
}

#[test]
fn bouncing_ball_dormand_prince_853() {
    bouncing_ball(Method::DormandPrince853);
}

#[test]
fn bouncing_ball_default_switching() {
    bouncing_ball(Method::default());
}

#[test]
fn bouncing_ball_radau() {
    bouncing_ball(Method::RadauIIA5);
}

const OMEGA: f64 = 3.0;

fn oscillator(_t: f64, y: &[f64], dy: &mut [f64]) {
    dy[0] = y[1];
    dy[1] = -OMEGA * OMEGA * y[0];
}

/// Zeros of `cos(omega t)` in `[0, t_end]`: `(k + 1/2) pi / omega`; the
/// ones with even `k` are falling, odd `k` rising (closed form).
fn cosine_zeros(t_end: f64) -> Vec<(f64, bool)> {
    (0..)
        .map(|k| ((k as f64 + 0.5) * PI / OMEGA, k % 2 == 1))
        .take_while(|&(t, _)| t <= t_end)
        .collect()
}

/// y'' = -omega^2 y, y(0) = 1, y'(0) = 0: y = cos(omega t). Rising and
/// falling zero crossings, as two non-terminal events, come out at the
/// closed-form times, each with its own index, in time order.
#[test]
fn oscillator_zero_crossings_rising_and_falling() {
    let rtol = 1e-10;
    for method in [
        Method::DormandPrince54,
        Method::DormandPrince853,
        Method::RadauIIA5,
        Method::Adams,
        Method::Bdf,
        Method::default(),
    ] {
        let opts = Options::default().rtol(rtol).atol(1e-12).method(method);
        let (sol, reason) = Run::new(oscillator, (0.0, 10.0), &[1.0, 0.0], &opts)
            .event(Event::new(|_t: f64, y: &[f64]| y[0]).direction(Direction::Rising))
            .event(Event::new(|_t: f64, y: &[f64]| y[0]).direction(Direction::Falling))
            .solve_with_reason()
            .unwrap();
        assert_eq!(reason, StopReason::ReachedEnd);
        assert_eq!(sol.t_final(), 10.0);
        let zeros = cosine_zeros(10.0);
        assert_eq!(zeros.len(), 10);
        assert_eq!(sol.events().len(), zeros.len(), "{method}");
        // Global error within 100 x the tolerance; BDF's numerical damping
        // of the oscillation costs it more over ten periods (measured 370 x).
        let slack = if method == Method::Bdf { 1000.0 } else { 100.0 };
        for (ev, &(t, rising)) in sol.events().iter().zip(&zeros) {
            assert_eq!(ev.rising, rising);
            assert_eq!(ev.index, if rising { 0 } else { 1 });
            assert!(!ev.terminal);
            // Time error ~ state error / |y'| with |y'| = omega at a zero.
            assert!((ev.t - t).abs() < slack * rtol, "{method}: {} vs {t}", ev.t);
            assert!(ev.y[0].abs() < slack * rtol, "{method}: y = {}", ev.y[0]);
            let slope = -OMEGA * (OMEGA * t).sin();
            assert!(
                (ev.y[1] - slope).abs() < slack * rtol * OMEGA,
                "{method}: y' = {} vs {slope}",
                ev.y[1]
            );
        }
    }
}

/// One event with `Direction::Either` sees every zero; the same problem run
/// backwards from the closed-form state at t = 10 sees them in reverse, and
/// "rising" is judged in the direction of integration.
#[test]
fn either_direction_and_backwards() {
    let opts = Options::default()
        .rtol(1e-10)
        .atol(1e-12)
        .method(Method::DormandPrince54);
    let zeros = cosine_zeros(10.0);
    let sol = Run::new(oscillator, (0.0, 10.0), &[1.0, 0.0], &opts)
        .event(Event::new(|_t: f64, y: &[f64]| y[0]))
        .solve()
        .unwrap();
    let times: Vec<f64> = sol.events().iter().map(|e| e.t).collect();
    assert_eq!(times.len(), zeros.len());
    for (t, &(z, rising)) in times.iter().zip(&zeros) {
        assert!((t - z).abs() < 1e-8);
        let ev = sol.events().iter().find(|e| e.t == *t).unwrap();
        assert_eq!(ev.rising, rising);
    }
    // Backwards from y(10) = (cos 30, -3 sin 30) (closed form).
    let y10 = [(OMEGA * 10.0).cos(), -OMEGA * (OMEGA * 10.0).sin()];
    let back = Run::new(oscillator, (10.0, 0.0), &y10, &opts)
        .event(Event::new(|_t: f64, y: &[f64]| y[0]).direction(Direction::Rising))
        .solve()
        .unwrap();
    // Going back in time, y rises through zero where it fell going forwards.
    let expected: Vec<f64> = zeros.iter().rev().filter(|z| !z.1).map(|z| z.0).collect();
    let got: Vec<f64> = back.events().iter().map(|e| e.t).collect();
    assert_eq!(got.len(), expected.len());
    for (g, e) in got.iter().zip(&expected) {
        assert!((g - e).abs() < 1e-8, "{g} vs {e}");
    }
    assert!(back.events().iter().all(|e| e.rising));
}

/// y' = 1, y(0) = 0 (closed form y = t): Dormand–Prince integrates it
/// exactly, so its steps grow large and three events with roots at 0.6,
/// 0.6001 and 0.6002 fall in one step. Added in scrambled order, they come
/// out in time order; the terminal one (at 0.6001) ends the run there, so
/// the one after it in the same step is not reported.
#[test]
fn several_events_in_one_step_in_time_order() {
    let opts = Options::default()
        .rtol(1e-6)
        .atol(1e-9)
        .method(Method::DormandPrince54);
    let ramp = |_t: f64, _y: &[f64], dy: &mut [f64]| dy[0] = 1.0;
    let (sol, reason) = Run::new(ramp, (0.0, 1.0), &[0.0], &opts)
        .event(Event::new(|_t: f64, y: &[f64]| y[0] - 0.6002))
        .event(Event::new(|_t: f64, y: &[f64]| y[0] - 0.6001).terminal())
        .event(Event::new(|_t: f64, y: &[f64]| y[0] - 0.6))
        .solve_with_reason()
        .unwrap();
    assert_eq!(reason, StopReason::TerminalEvent(1));
    let evs = sol.events();
    assert_eq!(evs.iter().map(|e| e.index).collect::<Vec<_>>(), vec![2, 1]);
    assert!((evs[0].t - 0.6).abs() < 1e-12 && (evs[1].t - 0.6001).abs() < 1e-12);
    assert!((sol.t_final() - 0.6001).abs() < 1e-12);
    // The three roots were inside one step: no step ended between 0.6 and 0.6002
    // before the event stopped the run.
    let times = sol.times();
    let before = times[times.len() - 2];
    assert!(before < 0.6, "a step ended at {before}");
    // Without the terminal event all three appear, still in time order.
    let sol = Run::new(ramp, (0.0, 1.0), &[0.0], &opts)
        .event(Event::new(|_t: f64, y: &[f64]| y[0] - 0.6002))
        .event(Event::new(|_t: f64, y: &[f64]| y[0] - 0.6001))
        .event(Event::new(|_t: f64, y: &[f64]| y[0] - 0.6))
        .solve()
        .unwrap();
    let order: Vec<usize> = sol.events().iter().map(|e| e.index).collect();
    assert_eq!(order, vec![2, 1, 0]);
    assert!(!sol.times().iter().any(|&t| t > 0.6 && t < 0.6002));
}

/// Events may borrow from the caller; a time tolerance coarsens the root.
#[test]
fn borrowed_threshold_and_time_tolerance() {
    let threshold = 0.5;
    let opts = Options::default()
        .rtol(1e-10)
        .atol(1e-12)
        .method(Method::DormandPrince54);
    // y' = -y, y(0) = 1: y = e^{-t} crosses 1/2 at ln 2 (closed form).
    let decay = |_t: f64, y: &[f64], dy: &mut [f64]| dy[0] = -y[0];
    for tol in [0.0, 1e-3] {
        let sol = Run::new(decay, (0.0, 2.0), &[1.0], &opts)
            .event(
                Event::new(|_t: f64, y: &[f64]| y[0] - threshold)
                    .terminal()
                    .time_tolerance(tol),
            )
            .solve()
            .unwrap();
        let err = sol.t_final() - std::f64::consts::LN_2;
        // The root is never reported early, and within the tolerance
        // (plus the integration error, ~1e-10).
        assert!(err > -1e-9 && err <= tol + 1e-9, "tol {tol}: error {err:e}");
        assert!(sol.y_final()[0] <= threshold + 1e-9);
    }
}

/// A terminal event at the very start (g = 0 at t0) does not fire: the run
/// goes on until the next sign change.
#[test]
fn zero_at_the_start_is_not_an_event() {
    let opts = Options::default()
        .rtol(1e-10)
        .atol(1e-12)
        .method(Method::DormandPrince54);
    // y = sin(omega t) from y(0) = 0: next zero at pi / omega (closed form).
    let (sol, reason) = Run::new(oscillator, (0.0, 10.0), &[0.0, OMEGA], &opts)
        .event(Event::new(|_t: f64, y: &[f64]| y[0]).terminal())
        .solve_with_reason()
        .unwrap();
    assert_eq!(reason, StopReason::TerminalEvent(0));
    assert!((sol.t_final() - PI / OMEGA).abs() < 1e-8);
    assert!(!sol.events()[0].rising);
}
