//! Every analytic Jacobian against central differences (relative 1e-6).

use crate::check::jacobian_error;
use crate::{
    all, Arenstorf, Brusselator, Flame, Hires, Kepler, LinearSpectrum, Lorenz, Oregonator,
    Pleiades, ProtheroRobinson, Robertson, StiffnessRamp, VanDerPol, VanDerPolMu,
};
use ballast_core::System;

const TOL: f64 = 1e-6;

/// A deterministic perturbation of `y` by a few per cent.
fn perturbed(y: &[f64], seed: u64) -> Vec<f64> {
    let mut s = seed
        .wrapping_mul(6364136223846793005)
        .wrapping_add(1442695040888963407);
    y.iter()
        .map(|&v| {
            s = s
                .wrapping_mul(6364136223846793005)
                .wrapping_add(1442695040888963407);
            let u = (s >> 11) as f64 / (1u64 << 53) as f64 - 0.5; // in [-0.5, 0.5)
            v + 0.05 * u * v.abs().max(0.1)
        })
        .collect()
}

fn assert_jacobian<S: System + ?Sized>(sys: &mut S, name: &str, t: f64, y: &[f64]) {
    let e = jacobian_error(sys, t, y).unwrap_or_else(|| panic!("{name}: no analytic Jacobian"));
    assert!(
        e.error < TOL,
        "{name} at t = {t}: Jacobian entry ({}, {}) off by {:e}",
        e.row,
        e.col,
        e.error
    );
}

#[test]
fn registry_jacobians_match_finite_differences() {
    for case in all() {
        let mut sys = case.system.clone();
        let (t0, t1) = case.span;
        assert_jacobian(&mut sys, case.name, t0, &case.y0);
        assert_jacobian(&mut sys, case.name, t0, &perturbed(&case.y0, 1));
        for (t, y) in &case.reference.interior {
            assert_jacobian(&mut sys, case.name, *t, y);
            assert_jacobian(&mut sys, case.name, *t, &perturbed(y, 2));
        }
        assert_jacobian(&mut sys, case.name, t1, &case.reference.y);
        assert_jacobian(
            &mut sys,
            case.name,
            0.5 * (t0 + t1),
            &perturbed(&case.reference.y, 3),
        );
    }
}

#[test]
fn parameterised_jacobians_match_finite_differences() {
    let y4 = [0.3, -0.7, 0.2, 1.1];
    assert_jacobian(&mut Arenstorf, "arenstorf", 0.0, &y4);
    assert_jacobian(&mut Kepler::new(0.9), "kepler 0.9", 0.0, &y4);
    assert_jacobian(
        &mut Kepler::new(0.0),
        "kepler 0",
        0.0,
        &Kepler::new(0.0).exact(1.0),
    );
    let mut lor = Lorenz {
        sigma: 3.0,
        r: 5.0,
        b: 0.5,
    };
    assert_jacobian(&mut lor, "lorenz", 0.0, &[1.0, -2.0, 3.0]);
    assert_jacobian(
        &mut Pleiades,
        "pleiades",
        0.0,
        &perturbed(&Pleiades.initial_value(), 9),
    );
    assert_jacobian(
        &mut Robertson::default(),
        "robertson",
        0.0,
        &[0.5, 1e-5, 0.5],
    );
    assert_jacobian(&mut Hires, "hires", 0.0, &perturbed(&[0.1; 8], 4));
    assert_jacobian(&mut Oregonator, "oregonator", 0.0, &[3.0, 0.5, 20.0]);
    for eps in [1e-6, 1e-2, 1.0] {
        assert_jacobian(&mut VanDerPol::new(eps), "vdp", 0.0, &[1.5, -0.4]);
    }
    for mu in [1.0, 1000.0] {
        assert_jacobian(&mut VanDerPolMu::new(mu), "vdp-mu", 0.0, &[-1.2, 0.3]);
    }
    for n in [1, 2, 3, 17] {
        let mut b = Brusselator::new(n);
        let y = perturbed(&b.initial_value(), n as u64);
        assert_jacobian(&mut b, "brusselator", 0.0, &y);
    }
    for lambda in [-1.0, -1e6, 2.0] {
        assert_jacobian(&mut ProtheroRobinson::new(lambda), "pr", 0.3, &[0.7]);
    }
    let mut ramp = StiffnessRamp::new(1e3, 2.0);
    for t in [0.0, 1.0, 2.0] {
        assert_jacobian(&mut ramp, "ramp", t, &[0.4]);
    }
    for delta in [0.5, 1e-2, 1e-4] {
        let mut f = Flame::new(delta);
        for y in [delta, 0.3, 2.0 / 3.0, 1.0] {
            assert_jacobian(&mut f, "flame", 0.0, &[y]);
        }
    }
    let mut lin = LinearSpectrum::new(&[-3.0], &[(-1.0, 7.0), (-0.25, 0.5)]);
    assert_jacobian(&mut lin, "linear", 0.0, &[1.0, 2.0, 3.0, 4.0, 5.0]);
}

#[test]
fn a_wrong_jacobian_or_hidden_entry_is_caught() {
    use ballast_core::{Structure, WithJacobian};
    let mut wrong = WithJacobian::new(
        |_t: f64, y: &[f64], dy: &mut [f64]| {
            dy[0] = y[0] * y[1];
            dy[1] = -y[0];
        },
        |_t: f64, y: &[f64], jac: &mut ballast_core::Jacobian| {
            jac.set(0, 0, y[1]);
            jac.set(0, 1, 1.01 * y[0]);
            jac.set(1, 0, -1.0);
        },
    );
    assert!(jacobian_error(&mut wrong, 0.0, &[1.0, 2.0]).unwrap().error > 1e-3);
    // A tridiagonal structure declared on the (pentadiagonal) Brusselator hides entries.
    struct Narrow(Brusselator);
    impl System for Narrow {
        fn rhs(&mut self, t: f64, y: &[f64], dy: &mut [f64]) {
            self.0.rhs(t, y, dy)
        }
        fn jacobian(&mut self, t: f64, y: &[f64], jac: &mut ballast_core::Jacobian) -> bool {
            self.0.jacobian(t, y, jac)
        }
        fn structure(&self) -> Structure {
            Structure::Banded { lower: 1, upper: 1 }
        }
    }
    let b = Brusselator::new(4);
    let y = b.initial_value();
    assert!(jacobian_error(&mut Narrow(b), 0.0, &y).unwrap().error > 0.1);
    let mut closure = |_t: f64, y: &[f64], dy: &mut [f64]| dy[0] = y[0];
    assert!(jacobian_error(&mut closure, 0.0, &[1.0]).is_none());
}
