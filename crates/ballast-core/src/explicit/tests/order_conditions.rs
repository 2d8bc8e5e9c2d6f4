//! Order conditions (Butcher 2016, section 3; Hairer, Norsett and Wanner I,
//! II.2 and II.6): the weights of every method, its embedded estimate and
//! its continuous extension satisfy the conditions of every rooted tree up
//! to the published order, and fail at least one condition one order
//! higher, so these tests can fail.

use super::trees::{elementary_weight, stage_vectors, trees_up_to, Tree};
use super::{dop, dop853_rows, TABLEAUX};

/// Residuals below this hold: the coefficients carry about 16 digits and
/// the largest of them (Dormand–Prince 8(5,3)) reach a few hundred.
const HOLDS: f64 = 1e-12;
/// A residual above this is a violated condition, far from round-off.
const FAILS: f64 = 1e-7;

/// Largest residual `|sum_i w_i Phi_i(t) - target(t)|` over the trees of
/// each order `1..=max`, index `order - 1`.
fn residuals(
    trees: &[Tree],
    phi: &[Vec<f64>],
    w: &[f64],
    max: usize,
    target: impl Fn(&Tree) -> f64,
) -> Vec<f64> {
    let mut r = vec![0.0f64; max];
    for (t, p) in trees.iter().zip(phi) {
        if t.order <= max {
            let d = (elementary_weight(w, p) - target(t)).abs();
            r[t.order - 1] = r[t.order - 1].max(d);
        }
    }
    r
}

/// Asserts the residuals vanish up to `order` and some condition of order `order + 1` fails.
fn assert_order(what: &str, r: &[f64], order: usize) {
    let held = r[..order].iter().fold(0.0f64, |m, &x| m.max(x));
    println!(
        "{what}: residual <= {held:.1e} up to order {order}, {:.1e} at order {}",
        r[order],
        order + 1
    );
    for (k, &res) in r.iter().enumerate().take(order) {
        assert!(res < HOLDS, "{what}: order-{} residual {res:e}", k + 1);
    }
    assert!(
        r[order] > FAILS,
        "{what}: order-{} conditions hold too (residual {:e}); the order is higher than claimed",
        order + 1,
        r[order]
    );
}

/// `b_i(theta)` of monomial weight rows `theta^1..theta^d`.
fn weights_at(rows: &[&[f64]], theta: f64) -> Vec<f64> {
    rows.iter()
        .map(|w| w.iter().rev().fold(0.0, |acc, &c| (acc + c) * theta))
        .collect()
}

#[test]
fn nodes_are_row_sums_and_fsal_rows_equal_weights() {
    // c_i = sum_j a_ij (Hairer, Norsett and Wanner I, II.1, eq. (1.9)).
    for tab in TABLEAUX {
        for (i, row) in tab.a.iter().enumerate() {
            let s: f64 = row.iter().sum();
            assert!((s - tab.c[i]).abs() < 1e-13, "{:?} row {i}", tab.method);
        }
        if tab.fsal {
            assert_eq!(tab.a[tab.stages() - 1], &tab.b[..tab.stages() - 1]);
            assert_eq!(tab.b[tab.stages() - 1], 0.0);
        }
    }
    for (i, row) in dop::A.iter().enumerate() {
        let s: f64 = row.iter().sum();
        assert!(
            (s - dop::C[i]).abs() < 1e-13,
            "Dormand–Prince 8(5,3) row {i}: {s} vs {}",
            dop::C[i]
        );
    }
}

#[test]
fn weights_have_the_published_order() {
    let trees = trees_up_to(7);
    for tab in TABLEAUX {
        let phi = stage_vectors(&trees, tab.a);
        let r = residuals(&trees, &phi, tab.b, tab.order + 1, |t| 1.0 / t.gamma);
        assert_order(tab.method.name(), &r, tab.order);
    }
}

#[test]
fn embedded_estimates_have_the_published_order() {
    // e = b - bhat: sum_i e_i Phi_i(t) = 0 for rho(t) <= order of bhat.
    let trees = trees_up_to(6);
    for tab in TABLEAUX {
        if let Some(e) = tab.e {
            let phi = stage_vectors(&trees, tab.a);
            let r = residuals(&trees, &phi, e, tab.error_order + 1, |_| 0.0);
            assert_order(tab.method.name(), &r, tab.error_order);
        }
    }
}

#[test]
fn continuous_extensions_have_order_four() {
    // Dense output of order 4 for Dormand–Prince 5(4) (Hairer, Norsett and
    // Wanner I, II.6) and Tsitouras 5(4) (Tsitouras 2011).
    let trees = trees_up_to(5);
    for tab in TABLEAUX {
        let Some(rows) = tab.dense else { continue };
        let phi = stage_vectors(&trees, tab.a);
        for theta in [0.1, 0.3, 0.5, 0.8, 1.0] {
            let w = weights_at(rows, theta);
            let r = residuals(&trees, &phi, &w, 5, |t| {
                theta.powi(t.order as i32) / t.gamma
            });
            let what = format!("{} dense at theta = {theta}", tab.method.name());
            if theta < 1.0 {
                assert_order(&what, &r, 4);
            } else {
                // At theta = 1 the extension is the step itself, order 5.
                assert!(r.iter().all(|&x| x < HOLDS), "{what}: {r:?}");
                for (wi, bi) in w.iter().zip(tab.b) {
                    assert!(
                        (wi - bi).abs() < 1e-14,
                        "{what}: b_i(1) = {wi} vs b_i = {bi}"
                    );
                }
            }
        }
    }
}

#[test]
fn dop853_weights_have_order_eight() {
    // Prince and Dormand 1981; Hairer, Norsett and Wanner I, II.10.
    let trees = trees_up_to(9);
    let phi = stage_vectors(&trees, dop853_rows());
    let r = residuals(&trees, &phi, &dop::B, 9, |t| 1.0 / t.gamma);
    assert_order("Dormand–Prince 8(5,3) b", &r, 8);
}

#[test]
fn dop853_embedded_estimates_have_orders_five_and_three() {
    // Hairer, Norsett and Wanner I, II.10: b - bhat5 and b - bhat3.
    let trees = trees_up_to(6);
    let phi = stage_vectors(&trees, dop853_rows());
    let r5 = residuals(&trees, &phi, &dop::E5, 6, |_| 0.0);
    assert_order("Dormand–Prince 8(5,3) e5", &r5, 5);
    let r3 = residuals(&trees, &phi, &dop::E3, 4, |_| 0.0);
    assert_order("Dormand–Prince 8(5,3) e3", &r3, 3);
}

#[test]
fn dop853_dense_output_has_order_seven() {
    // Hairer, Norsett and Wanner I, II.6: continuous extension of order 7
    // over all 16 stages.
    let trees = trees_up_to(8);
    let phi = stage_vectors(&trees, &dop::A);
    let rows: Vec<&[f64]> = dop::DENSE.iter().map(|r| r.as_slice()).collect();
    for theta in [0.1, 0.3, 0.5, 0.8, 1.0] {
        let w = weights_at(&rows, theta);
        let r = residuals(&trees, &phi, &w, 8, |t| {
            theta.powi(t.order as i32) / t.gamma
        });
        let what = format!("Dormand–Prince 8(5,3) dense at theta = {theta}");
        if theta < 1.0 {
            assert_order(&what, &r, 7);
        } else {
            assert!(r.iter().all(|&x| x < HOLDS), "{what}: {r:?}");
        }
    }
}
