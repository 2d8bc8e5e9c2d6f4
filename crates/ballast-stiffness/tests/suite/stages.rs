//! The free estimate from two Runge–Kutta stages at the same time point.

use ballast_stiffness::stage_estimate;
use nalgebra::{DMatrix, DVector};

use crate::common::*;

/// One step of the classical Runge–Kutta method (Kutta 1901; HNW I,
/// section II.1, Table 1.2): its stages 2 and 3 are both at `t + h/2`.
/// Returns `(Y2, Y3, k2, k3)` for `f(y) = A y`.
fn rk4_stages(a: &DMatrix<f64>, y: &DVector<f64>, h: f64) -> [DVector<f64>; 4] {
    let k1 = a * y;
    let y2 = y + &k1 * (h / 2.0);
    let k2 = a * &y2;
    let y3 = y + &k2 * (h / 2.0);
    let k3 = a * &y3;
    [y2, y3, k2, k3]
}

#[test]
fn rk4_stages_give_the_gain_along_a_squared_y() {
    // For f = A y: Y3 - Y2 = (h/2) (k2 - k1) = (h^2 / 4) A^2 y, and
    // k3 - k2 = A (Y3 - Y2), so the estimate is ||A^3 y|| / ||A^2 y||
    // exactly: two power steps for free.
    let mut rng = Rng::new(3);
    let n = 30;
    let spec: Vec<Eig> = (0..n)
        .map(|_| Eig::Real(-(10f64.powf(3.0 * rng.uniform()))))
        .collect();
    let a = similar(
        &basis(n, Basis::Orthogonal, &mut rng),
        &block_diagonal(&spec),
    );
    let rho = reference_radius(&a);
    let y = DVector::from_fn(n, |_, _| rng.normal());
    let h = 2.5 / rho; // near RK4's real stability limit 2.785
    let [y2, y3, k2, k3] = rk4_stages(&a, &y, h);
    let est = stage_estimate(k3.as_slice(), k2.as_slice(), y3.as_slice(), y2.as_slice()).unwrap();
    let a2y = &a * &a * &y;
    let expected = (&a * &a2y).norm() / a2y.norm();
    assert!(
        (est - expected).abs() < 1e-9 * expected,
        "{est} vs {expected}"
    );
    // A symmetric A: the gain is between the smallest and largest |lambda|.
    assert!(est <= rho * (1.0 + 1e-12));
    eprintln!(
        "RK4 stage estimate, n=30 symmetric: {:.1} vs rho {:.1} ({:.0}%)",
        est,
        rho,
        100.0 * est / rho
    );
}

#[test]
fn repeated_steps_at_the_stability_limit_point_the_stages_at_the_stiff_mode() {
    // Integrate y' = A y with RK4 at h = 2.5 / rho: the non-stiff modes
    // barely move while the stiff one oscillates at amplification |R(-2.5)| ~ 0.65.
    // After steps the stiff mode still dominates A^2 y, and the free
    // estimate is within 5% of rho (HNW II, section IV.2).
    let n = 10;
    let mut rng = Rng::new(5);
    let mut spec = vec![Eig::Real(-1000.0)];
    spec.extend((1..n).map(|_| Eig::Real(-(10f64.powf(1.5 * rng.uniform())))));
    let a = similar(
        &basis(n, Basis::Orthogonal, &mut rng),
        &block_diagonal(&spec),
    );
    let h = 2.5 / 1000.0;
    let mut y = DVector::from_fn(n, |_, _| rng.normal());
    for _ in 0..5 {
        let [y2, y3, k2, k3] = rk4_stages(&a, &y, h);
        let est =
            stage_estimate(k3.as_slice(), k2.as_slice(), y3.as_slice(), y2.as_slice()).unwrap();
        assert!((est - 1000.0).abs() < 50.0, "{est}");
        let k1 = &a * &y;
        let k4 = &a * (&y + &k3 * h);
        y += (k1 + k2 * 2.0 + k3 * 2.0 + k4) * (h / 6.0);
    }
}
