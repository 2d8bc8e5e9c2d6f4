//! Closed-form and handbook checks of the stability analysis. The source
//! of every expected value is named beside it.
use super::*;
use num_complex::Complex64;

fn c(re: f64, im: f64) -> Complex64 {
    Complex64::new(re, im)
}

fn summary(key: RegionKey) -> StabilitySummary {
    *region(key).unwrap().summary()
}

fn method(m: Method) -> StabilitySummary {
    summary(RegionKey::Method(m))
}

#[test]
fn forward_euler_critical_step_is_two_over_lambda() {
    // Closed form: R(z) = 1 + z, |1 + z| <= 1 is the disc of radius 1 about -1.
    for lam in [-4.0, -1.0, -0.3, -250.0, -1e6] {
        let h = critical_step(Method::ForwardEuler, c(lam, 0.0)).unwrap();
        let want = 2.0 / lam.abs();
        assert!(
            (h - want).abs() <= 1e-12 * want,
            "lambda {lam}: {h} vs {want}"
        );
    }
    // The DESIGN.md contract: Some(0.5) for lambda = -4.
    let h = critical_step(Method::ForwardEuler, c(-4.0, 0.0)).unwrap();
    assert!((h - 0.5).abs() < 1e-12);
    // Closed form off the axis: the disc reaches r(theta) = -2 cos(theta).
    for theta in [2.0f64, 2.5, 3.0, 3.5, 4.0] {
        let lam = Complex64::from_polar(3.0, theta);
        let h = critical_step(Method::ForwardEuler, lam).unwrap();
        let want = -2.0 * theta.cos() / 3.0;
        assert!((h - want).abs() < 1e-11, "theta {theta}: {h} vs {want}");
    }
}

#[test]
fn stability_functions_match_closed_forms() {
    // Closed forms: forward Euler 1 + z, backward Euler 1/(1 - z), trapezoid
    // (1 + z/2)/(1 - z/2), RK4 the degree-4 Taylor polynomial of e^z.
    let pts = [c(-0.7, 0.3), c(-2.0, -1.5), c(0.4, 2.0), c(-10.0, 0.0)];
    for z in pts {
        let one = c(1.0, 0.0);
        let cases: [(Method, Complex64); 4] = [
            (Method::ForwardEuler, one + z),
            (Method::BackwardEuler, one / (one - z)),
            (Method::Trapezoid, (one + z / 2.0) / (one - z / 2.0)),
            (
                Method::Rk4,
                one + z + z * z / 2.0 + z * z * z / 6.0 + z * z * z * z / 24.0,
            ),
        ];
        for (m, want) in cases {
            let f = one_step_function(m).unwrap();
            let got = f.eval(z).unwrap();
            assert!(
                (got - want).norm() < 1e-13 * want.norm().max(1.0),
                "{m:?} at {z}"
            );
            // The rational form used for the regions agrees with the solve.
            let rat = f.rational().unwrap();
            assert!((rat.modulus(z) - want.norm()).abs() < 1e-12 * want.norm().max(1.0));
        }
    }
}

#[test]
fn rational_form_agrees_with_linear_solve_for_every_one_step_method() {
    // Internal consistency: R = P/Q (Faddeev–LeVerrier / products) against
    // 1 + z b^T (I - zA)^{-1} 1 by Gaussian elimination.
    for &m in ONE_STEP {
        let Some(f) = one_step_function(m) else {
            continue;
        };
        let rat = f.rational().unwrap();
        // Far from 0 the terms of R cancel (|R(-20-7i)| ~ 5e5 for DP853): relative 1e-9.
        for z in [c(-0.5, 0.5), c(-3.0, 1.0), c(-20.0, -7.0), c(1.5, 0.2)] {
            let a = f.eval(z).unwrap().norm();
            let b = rat.modulus(z);
            assert!(
                (a - b).abs() <= 1e-9 * a.max(1.0),
                "{m:?} at {z}: {a} vs {b}"
            );
        }
    }
}

#[test]
fn backward_euler_and_trapezoid() {
    // Closed forms (HW II, IV.3): both A-stable; backward Euler L-stable
    // (R(-inf) = 0), the trapezoid not (R(-inf) = -1).
    let be = method(Method::BackwardEuler);
    let tr = method(Method::Trapezoid);
    assert!(be.a_stable && be.l_stable && be.r_infinity < 1e-14);
    assert!(tr.a_stable && !tr.l_stable && (tr.r_infinity - 1.0).abs() < 1e-14);
    assert_eq!(critical_step(Method::BackwardEuler, c(-1e8, 3e7)), None);
    assert_eq!(critical_step(Method::Trapezoid, c(0.0, -5.0)), None);
    // The trapezoid's region is exactly the closed left half-plane.
    let reg = method_region(Method::Trapezoid).unwrap();
    for i in -20..=20 {
        for j in -20..=20 {
            let z = c(i as f64 * 0.73, j as f64 * 1.1);
            assert_eq!(reg.contains(z), z.re <= 0.0, "trapezoid at {z}");
        }
    }
    for y in [0.1, 1.0, 10.0, 1e4] {
        let r = reg.function().eval(c(0.0, y)).unwrap().norm();
        assert!((r - 1.0).abs() < 1e-14, "|R(iy)| = 1 on the axis");
        assert!(reg.contains(c(-1e-9, y)) && !reg.contains(c(1e-3 * (1.0 + y * y), y)));
    }
}

#[test]
fn rk4_intervals() {
    // Handbook, from memory of HNW I (IV.2, Fig. 2.1) and Butcher (2016,
    // section 23): real interval about 2.785. Closed form for the imaginary
    // interval: |R(iy)|^2 = 1 - y^6/72 + y^8/576, so b = 2 sqrt(2).
    let s = method(Method::Rk4);
    assert!((s.real_interval.unwrap() - 2.785).abs() < 5e-4);
    assert!((s.imag_interval.unwrap() - 8f64.sqrt()).abs() < 1e-9);
    assert!(!s.a_stable && s.r_infinity.is_infinite() && s.a_alpha.is_none());
    // Exact on the real axis: critical_step agrees with the interval.
    let h = critical_step(Method::Rk4, c(-10.0, 0.0)).unwrap();
    assert!((h - s.real_interval.unwrap() / 10.0).abs() < 1e-12);
}

#[test]
fn explicit_intervals_from_memory() {
    // From memory of HW II (IV.2) / HNW I (IV.2): forward Euler and Heun
    // reach -2 on the real axis and no imaginary interval; Bogacki–Shampine
    // (same R as any 3-stage order-3 method) reaches about -2.51 and
    // sqrt(3) on the imaginary axis (|R(iy)|^2 = 1 - y^4/12 + y^6/36, closed form).
    for m in [Method::ForwardEuler, Method::Heun] {
        let s = method(m);
        assert!((s.real_interval.unwrap() - 2.0).abs() < 1e-12);
        assert_eq!(s.imag_interval, Some(0.0));
    }
    let s = method(Method::BogackiShampine32);
    assert!((s.real_interval.unwrap() - 2.5127).abs() < 1e-3);
    assert!((s.imag_interval.unwrap() - 3f64.sqrt()).abs() < 1e-9);
    // Dormand–Prince 5(4): real interval about 3.3 (from memory of HNW I, IV.2).
    let s = method(Method::DormandPrince54);
    assert!((s.real_interval.unwrap() - 3.3).abs() < 0.02);
}

#[test]
fn adams_bashforth_real_intervals() {
    // Handbook, from memory of HW II, V.1 (and HNW I, III.3): AB1..AB4 reach
    // 2, 1, 6/11, 3/10 on the negative real axis.
    let want = [2.0, 1.0, 6.0 / 11.0, 3.0 / 10.0];
    for (k, w) in (1..=4).zip(want) {
        let s = summary(RegionKey::AdamsBashforth(k));
        assert!(
            (s.real_interval.unwrap() - w).abs() < 1e-10,
            "AB{k}: {:?}",
            s.real_interval
        );
        assert!(s.explicit && !s.a_stable);
    }
    // From memory of HW II, V.1: AB3 has an imaginary interval of about 0.72, AB4 about 0.43.
    assert!((summary(RegionKey::AdamsBashforth(3)).imag_interval.unwrap() - 0.72).abs() < 0.01);
    assert!((summary(RegionKey::AdamsBashforth(4)).imag_interval.unwrap() - 0.43).abs() < 0.01);
}

#[test]
fn adams_moulton_real_intervals() {
    // From memory of HNW I, III.3: Adams–Moulton of orders 3 and 4 reach 6
    // and 3 on the real axis; orders 1 and 2 (backward Euler, trapezoid)
    // are A-stable.
    assert!((summary(RegionKey::AdamsMoulton(3)).real_interval.unwrap() - 6.0).abs() < 1e-9);
    assert!((summary(RegionKey::AdamsMoulton(4)).real_interval.unwrap() - 3.0).abs() < 1e-9);
    assert!(summary(RegionKey::AdamsMoulton(1)).a_stable);
    assert!(summary(RegionKey::AdamsMoulton(2)).a_stable);
}

#[test]
fn bdf_stability_angles() {
    // Handbook, from memory of HW II, V.2 (Table 2.3): BDF1 and BDF2
    // A-stable; BDF3..6 A(alpha) with alpha = 86.03, 73.35, 51.84, 17.84 degrees.
    for k in 1..=2 {
        let s = summary(RegionKey::Bdf(k));
        assert!(s.a_stable, "BDF{k}");
        assert_eq!(s.a_alpha, Some(90.0));
    }
    for (k, alpha) in (3..=6).zip([86.03, 73.35, 51.84, 17.84]) {
        let s = summary(RegionKey::Bdf(k));
        assert!(!s.a_stable, "BDF{k} is not A-stable");
        assert!(
            s.real_interval.is_none(),
            "BDF{k} contains the negative real axis"
        );
        let got = s.a_alpha.unwrap();
        assert!((got - alpha).abs() < 0.01, "BDF{k}: alpha {got} vs {alpha}");
    }
    // Inside the sector no limit; on a ray outside it (near the imaginary
    // axis) a finite one, for BDF3..6 at least.
    let lam = Complex64::from_polar(1.0, PI_HALF + 0.02);
    for k in 3..=6 {
        assert_eq!(critical_step_for(RegionKey::Bdf(k), c(-1.0, 0.1)), None);
        assert!(
            critical_step_for(RegionKey::Bdf(k), lam).is_some(),
            "BDF{k}"
        );
    }
}

const PI_HALF: f64 = std::f64::consts::FRAC_PI_2;

#[test]
fn implicit_one_step_methods() {
    // HW II, IV.5 (Table 5.6 and Theorem 5.?; from memory): Radau IIA
    // (3 stages) is A-stable and L-stable.
    let s = method(Method::RadauIIA5);
    assert!(s.a_stable && s.l_stable);
    // Hosea and Shampine (1996): TR-BDF2 with gamma = 2 - sqrt(2) is L-stable.
    let s = method(Method::TrBdf2);
    assert!(s.a_stable && s.l_stable);
    // Kennedy and Carpenter (2016): ESDIRK4(3)6L[2]SA is L-stable ("L" in the name).
    let s = method(Method::Esdirk43);
    assert!(s.a_stable && s.l_stable);
    // Lang and Verwer (2001), from memory: ROS3P is A-stable, not L-stable,
    // with |R(-inf)| = sqrt(3) - 1 = 0.732.
    let s = method(Method::Ros3p);
    assert!(s.a_stable && !s.l_stable);
    assert!(
        (s.r_infinity - (3f64.sqrt() - 1.0)).abs() < 1e-10,
        "{}",
        s.r_infinity
    );
    // Sandu et al. (1997): the four-stage Rosenbrock 3(2) is L-stable;
    // R(z) = 8 (z^3 - 6z + 6) / (3 (z - 2)^4) (derived in implicit::tableau).
    let s = method(Method::Rosenbrock32);
    assert!(s.a_stable && s.l_stable);
    assert!(s.r_infinity.abs() < 1e-8, "{}", s.r_infinity);
    for m in [
        Method::TrBdf2,
        Method::Esdirk43,
        Method::RadauIIA5,
        Method::Ros3p,
        Method::Rosenbrock32,
    ] {
        assert_eq!(critical_step(m, c(-1e9, 1e3)), None, "{m:?}");
    }
}

#[test]
fn critical_step_conventions() {
    // Documented conventions (see critical_step_for).
    let m = Method::Rk4;
    assert_eq!(critical_step(m, c(0.0, 0.0)), None);
    assert_eq!(critical_step(m, c(1.0, 0.5)), None); // growing mode
    assert_eq!(critical_step(m, c(f64::NAN, 0.0)), None);
    assert_eq!(critical_step(m, c(f64::NEG_INFINITY, 0.0)), Some(0.0));
    assert_eq!(critical_step(Method::ForwardEuler, c(0.0, 3.0)), Some(0.0));
    assert_eq!(critical_step(Method::default(), c(-1.0, 0.0)), None);
    // Scaling: the critical step scales with 1/|lambda|.
    let a = critical_step(m, c(-1.0, 1.0)).unwrap();
    let b = critical_step(m, c(-100.0, 100.0)).unwrap();
    assert!((a - 100.0 * b).abs() < 1e-12 * a);
    // Margin: 1 at the critical step.
    let lam = c(-3.0, 2.0);
    let hc = critical_step(m, lam).unwrap();
    assert!((stability_margin(m, hc, lam) - 1.0).abs() < 1e-12);
    assert!((stability_margin(m, 0.5 * hc, lam) - 0.5).abs() < 1e-12);
    assert_eq!(stability_margin(Method::BackwardEuler, 1.0, lam), 0.0);
    // Adams: the most restrictive order; per order through critical_step_for_order.
    let lam = c(-1.0, 0.0);
    let all: Vec<f64> = (1..=12)
        .map(|k| critical_step_for_order(Method::Adams, k, lam).unwrap())
        .collect();
    let min = all.iter().copied().fold(f64::INFINITY, f64::min);
    assert_eq!(critical_step(Method::Adams, lam), Some(min));
    assert_eq!(critical_step_for_order(Method::Bdf, 2, lam), None);
    assert_eq!(critical_step(Method::Bdf, lam), None);
    assert!(critical_step_for_order(Method::Adams, 13, lam).is_none());
}

#[test]
fn interpolated_reach_is_close_to_exact() {
    // Between tabulated rays, reach() interpolates; compare with the exact
    // value for forward Euler (closed form r = -2 cos(theta)).
    let reg = method_region(Method::ForwardEuler).unwrap();
    for k in 0..50 {
        let theta = PI_HALF + 0.3 + k as f64 * 0.05;
        let want = -2.0 * theta.cos();
        let got = reg.reach(theta).unwrap();
        assert!(
            got <= want * (1.0 + 1e-12) && got >= want * (1.0 - 2e-5),
            "theta {theta}: {got} vs {want}"
        );
        let exact = reg.reach_exact(Complex64::from_polar(1.0, theta)).unwrap();
        assert!((exact - want).abs() < 1e-11);
    }
    assert_eq!(reg.tabulated().len(), RAYS);
}

#[test]
fn every_region_is_computed_and_consistent() {
    for key in RegionKey::all() {
        // Every method of the library has its region.
        let reg = region(key).unwrap_or_else(|| panic!("no region for {key:?}"));
        let s = reg.summary();
        // Explicit methods have bounded regions: finite real interval, not A-stable.
        if s.explicit {
            assert!(s.real_interval.is_some() && !s.a_stable, "{key:?}");
        }
        // L-stable implies A-stable; A-stable implies no axis limits.
        assert!(!s.l_stable || s.a_stable);
        if s.a_stable {
            assert!(s.real_interval.is_none() && s.imag_interval.is_none());
        }
        // The tabulated real-axis ray agrees with the exact interval.
        let mid = reg.tabulated()[(RAYS - 1) / 2];
        match s.real_interval {
            Some(r) => assert!(
                (mid - r).abs() <= 1e-6 * r.max(1e-3),
                "{key:?}: {mid} vs {r}"
            ),
            None => assert!(mid.is_infinite()),
        }
    }
}

#[test]
fn one_step_list_is_single_without_the_multistep_families() {
    assert_eq!(ONE_STEP.len(), 14);
    assert!(ONE_STEP
        .iter()
        .all(|m| !matches!(m, Method::Adams | Method::Bdf | Method::Switching(_))));
}

/// Rays computed one at a time when a cap asks for them agree bit for bit
/// with a fresh region tabulated all at once (the ray computation depends
/// only on the ray), for one-step and multistep regions.
#[test]
fn lazily_computed_rays_equal_the_full_table() {
    for key in [
        RegionKey::Method(Method::DormandPrince54),
        RegionKey::Method(Method::Esdirk43),
        RegionKey::AdamsPece(4),
        RegionKey::Bdf(4),
    ] {
        let (f, order) = key.function().unwrap();
        let lazy = Region::new(key.name(), f.clone(), order);
        let full = Region::new(key.name(), f, order).tabulated();
        for theta in [PI_HALF + 0.01, 2.0, 2.5, std::f64::consts::PI, 3.9, 4.7] {
            let x = (theta - PI_HALF) / (std::f64::consts::PI / (RAYS - 1) as f64);
            let j = (x.floor() as usize).min(RAYS - 2);
            let got = lazy.reach(theta);
            let (r0, r1) = (full[j], full[j + 1]);
            // The same interpolation rule on the full table.
            let f = x - j as f64;
            let lo = r0.min(r1);
            let want = if lo.is_finite() && r0.max(r1) <= 1.02 * lo {
                r0 + f * (r1 - r0)
            } else {
                lo
            };
            assert_eq!(got, want.is_finite().then_some(want), "{key:?} at {theta}");
        }
        assert_eq!(lazy.tabulated(), full, "{key:?}");
    }
}
