//! Breakpoints: the run steps onto a known discontinuity of the forcing
//! exactly and restarts the scheme there.

use ballast::{integrate, Method, Options, Output};

/// y' = -y + H(t - 1), y(0) = 1, with the unit step H. Closed form:
/// y = e^{-t} for t <= 1, y = 1 + (e^{-1} - 1) e^{-(t - 1)} after.
fn exact(t: f64) -> f64 {
    if t <= 1.0 {
        (-t).exp()
    } else {
        1.0 + ((-1.0f64).exp() - 1.0) * (-(t - 1.0)).exp()
    }
}

/// The forcing, with the jump assigned to the right (`t >= 1`) or to the
/// left (`t > 1`) of the breakpoint: both must work.
fn forced(right_continuous: bool) -> impl FnMut(f64, &[f64], &mut [f64]) + Copy {
    move |t: f64, y: &[f64], dy: &mut [f64]| {
        let on = if right_continuous { t >= 1.0 } else { t > 1.0 };
        dy[0] = -y[0] + if on { 1.0 } else { 0.0 };
    }
}

/// With the breakpoint the run has t = 1 among its steps exactly, rejects
/// fewer steps than without it, and matches the closed form on both sides.
#[test]
fn jump_in_the_forcing() {
    let (rtol, atol) = (1e-8, 1e-10);
    for method in [
        Method::DormandPrince54,
        Method::DormandPrince853,
        Method::RadauIIA5,
        Method::Bdf,
        Method::Adams,
        Method::default(),
    ] {
        for right in [true, false] {
            let opts = Options::default().rtol(rtol).atol(atol).method(method);
            let plain = integrate(forced(right), (0.0, 3.0), &[1.0], &opts).unwrap();
            let with = integrate(
                forced(right),
                (0.0, 3.0),
                &[1.0],
                &opts.clone().breakpoints(vec![1.0]),
            )
            .unwrap();
            assert!(with.times().contains(&1.0), "{method}");
            assert!(!plain.times().contains(&1.0), "{method}");
            let (r_with, r_plain) = (with.stats().rejected, plain.stats().rejected);
            assert!(
                r_with < r_plain,
                "{method} (right-continuous {right}): {r_with} rejections with the breakpoint, {r_plain} without"
            );
            assert_eq!(with.stats().failed_attempts, 0, "{method}");
            // Closed form on both sides, within 100 x the tolerance.
            for t in [0.3, 0.9, 1.0, 1.2, 2.0, 3.0] {
                let y = with.eval(t).unwrap()[0];
                let err = (y - exact(t)).abs() / (atol + rtol * exact(t).abs());
                assert!(err < 100.0, "{method}: y({t}) = {y}, error {err:.1} x tol");
            }
            let i = with.times().iter().position(|&t| t == 1.0).unwrap();
            assert!((with.state(i).unwrap()[0] - exact(1.0)).abs() < 100.0 * rtol);
        }
    }
}

/// Two jumps (forcing 1 on [1, 2), then 0 again), backwards in time, with
/// output at requested times including the breakpoints.
#[test]
fn two_jumps_backwards_with_requested_output() {
    // y' = -y + P(t), P = 1 on [1, 2), else 0; closed form forwards from
    // y(0) = 1: e^{-t}; then 1 + (e^{-1} - 1) e^{-(t-1)}; after t = 2,
    // y(2) e^{-(t-2)}.
    let y1 = (-1.0f64).exp();
    let y2 = 1.0 + (y1 - 1.0) * (-1.0f64).exp();
    let exact = |t: f64| {
        if t <= 1.0 {
            (-t).exp()
        } else if t <= 2.0 {
            1.0 + (y1 - 1.0) * (-(t - 1.0)).exp()
        } else {
            y2 * (-(t - 2.0)).exp()
        }
    };
    let pulse = |t: f64, y: &[f64], dy: &mut [f64]| {
        dy[0] = -y[0] + if (1.0..2.0).contains(&t) { 1.0 } else { 0.0 };
    };
    let (rtol, atol) = (1e-9, 1e-12);
    let at = vec![3.0, 2.5, 2.0, 1.5, 1.0, 0.5, 0.0];
    let opts = Options::default()
        .rtol(rtol)
        .atol(atol)
        .method(Method::DormandPrince54)
        .breakpoints(vec![2.0, 1.0])
        .output(Output::At(at.clone()));
    let sol = integrate(pulse, (3.0, 0.0), &[exact(3.0)], &opts).unwrap();
    assert_eq!(sol.times(), at.as_slice());
    for (t, y) in sol.iter() {
        let err = (y[0] - exact(t)).abs() / (atol + rtol * exact(t).abs());
        assert!(err < 100.0, "y({t}) = {} vs {}", y[0], exact(t));
    }
    assert_eq!(sol.stats().rejected, 0);
}

/// Breakpoints outside the span or on its ends change nothing.
#[test]
fn breakpoints_outside_the_span_are_ignored() {
    let opts = Options::default()
        .rtol(1e-8)
        .atol(1e-10)
        .method(Method::DormandPrince54);
    let decay = |_t: f64, y: &[f64], dy: &mut [f64]| dy[0] = -y[0];
    let a = integrate(decay, (0.0, 2.0), &[1.0], &opts).unwrap();
    let b = integrate(
        decay,
        (0.0, 2.0),
        &[1.0],
        &opts.clone().breakpoints(vec![-1.0, 0.0, 2.0, 5.0]),
    )
    .unwrap();
    assert_eq!(a.times(), b.times());
    assert_eq!(a.y_final(), b.y_final());
}
