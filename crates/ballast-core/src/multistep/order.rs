//! Order and step selection for the Nordsieck multistep schemes.
//!
//! After a step at order `q` the local errors of orders `q - 1`, `q` and
//! `q + 1` are estimated (see [`super::coefficients`]); the step each
//! order would allow is
//!
//! $$ \eta_k = \frac{1}{b_k\, \mathrm{err}_k^{1/(k+1)}}, $$
//!
//! with bias factors `b = 1.3, 1.2, 1.4` for `q - 1, q, q + 1`: a small
//! preference for staying at the current order and a reluctance to raise
//! it, whose estimate is the least reliable (common practice, values of
//! the kind used since Gear's codes; Hairer, Norsett and Wanner I, III.7).
//! The order with the largest `eta` wins.
//!
//! Stability of the variable-step formulas: changing the step by rescaling
//! the Nordsieck array is an interpolation of the history, stable when the
//! step ratios stay bounded and changes are not too frequent (Hairer,
//! Norsett and Wanner I, III.5 and III.6). So, common practice:
//!
//! * after any change of step or order, `q + 1` steps are taken at that
//!   step and order before another change is considered (the history is
//!   then again made of the formula's own equally spaced values);
//! * a change is made only when it gains enough (`eta >= min_gain`) or must
//!   shrink (`eta < 1`); while waiting, only a shrink the error asks for
//!   (`eta_q < 0.9`) is made — it would otherwise come as a rejection;
//! * the ratio is kept in `[0.2, max_growth]`, with `max_growth = 2` from
//!   order 2 on and `10` at order 1 (a one-step formula, stable for any
//!   ratio; this lets the start-up from a small step grow quickly).
//!
//! After a rejection the step shrinks (`eta_q` capped at `0.9`) and the
//! order drops when the lower order allows a larger step. Rejections are
//! counted until `q + 1` steps in a row succeed: a second one lowers the
//! order by force (a history spoilt by an unstable mode — a step outside
//! the stability region, or steps changed too often — does not recover by
//! shrinking the step alone), a third restarts at order 1.

/// Estimated local errors (weighted RMS) at the neighbouring orders.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Estimates {
    /// Order `q - 1` (none at order 1).
    pub lower: Option<f64>,
    /// Order `q`.
    pub current: f64,
    /// Order `q + 1` (none at the maximum order or without a previous
    /// correction at this order).
    pub higher: Option<f64>,
}

/// What to do next: the order and the step factor.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Decision {
    /// Order of the next step.
    pub order: usize,
    /// Factor on the step just attempted.
    pub factor: f64,
}

/// The order-selection state of one scheme.
#[derive(Clone, Debug)]
pub struct OrderSelector {
    max_order: usize,
    fixed: Option<usize>,
    /// Accepted steps still to take before a change is considered.
    wait: usize,
    /// Rejections since the last `q + 1` successful steps in a row.
    rejections: usize,
    /// Successful steps in a row.
    calm: usize,
    /// Smallest gain worth a step increase.
    pub min_gain: f64,
    /// Largest step ratio from order 2 on.
    pub max_growth: f64,
}

/// Bias factors for orders `q - 1`, `q`, `q + 1` (common practice).
const BIAS: [f64; 3] = [1.3, 1.2, 1.4];
/// Largest ratio at order 1.
const FIRST_ORDER_GROWTH: f64 = 10.0;
/// Smallest ratio.
const MIN_RATIO: f64 = 0.2;
/// While waiting, shrink when the current order's `eta` is below this.
const WAIT_SHRINK: f64 = 0.9;

fn eta(err: f64, k: usize, bias: f64) -> f64 {
    1.0 / (bias * err.max(1e-16).powf(1.0 / (k + 1) as f64))
}

impl OrderSelector {
    /// A selector for orders `1..=max_order`, optionally pinned to one order.
    pub fn new(max_order: usize, fixed: Option<usize>, min_gain: f64) -> Self {
        Self {
            max_order,
            fixed,
            wait: 2,
            rejections: 0,
            calm: 0,
            min_gain,
            max_growth: 2.0,
        }
    }

    /// The pinned order, if any.
    pub fn fixed(&self) -> Option<usize> {
        self.fixed
    }

    /// Pins the order (or releases it with `None`).
    pub fn set_fixed(&mut self, fixed: Option<usize>) {
        self.fixed = fixed;
    }

    /// Largest order.
    pub fn max_order(&self) -> usize {
        self.max_order
    }

    /// Sets the largest order.
    pub fn set_max_order(&mut self, q: usize) {
        self.max_order = q;
    }

    /// Forgets everything (start or restart at order `q`).
    pub fn restart(&mut self, q: usize) {
        self.wait = q + 1;
        self.rejections = 0;
        self.calm = 0;
    }

    /// Notes an outside change of the step by the ratio `r` (the
    /// controller's caps or end-point clipping): a large one restarts the
    /// waiting period.
    pub fn outside_change(&mut self, r: f64, q: usize) {
        if !(0.8..=1.25).contains(&r) {
            self.wait = self.wait.max(q + 1);
        }
    }

    /// The decision after a successful step at order `q`.
    pub fn on_success(&self, q: usize, e: &Estimates) -> Decision {
        let growth = if q == 1 {
            FIRST_ORDER_GROWTH
        } else {
            self.max_growth
        };
        let keep = Decision {
            order: q,
            factor: 1.0,
        };
        if let Some(qf) = self.fixed.filter(|&qf| qf > q) {
            // Climbing to a pinned order: one order per step.
            let f = if self.wait > 0 {
                1.0
            } else {
                eta(e.current, q, BIAS[1]).clamp(MIN_RATIO, growth)
            };
            return Decision {
                order: (q + 1).min(qf),
                factor: f,
            };
        }
        if self.wait > 0 {
            // Waiting forbids increases and order changes, not a decrease
            // that the error already asks for: the next step would likely
            // be rejected, which changes the step anyway.
            let f = eta(e.current, q, BIAS[1]);
            return if f < WAIT_SHRINK {
                Decision {
                    order: q,
                    factor: f.max(MIN_RATIO),
                }
            } else {
                keep
            };
        }
        let mut best = Decision {
            order: q,
            factor: eta(e.current, q, BIAS[1]),
        };
        if self.fixed.is_none() {
            if let Some(lo) = e.lower {
                let f = eta(lo, q - 1, BIAS[0]);
                if f > best.factor {
                    best = Decision {
                        order: q - 1,
                        factor: f,
                    };
                }
            }
            if let Some(hi) = e.higher.filter(|_| q < self.max_order) {
                let f = eta(hi, q + 1, BIAS[2]);
                if f > best.factor {
                    best = Decision {
                        order: q + 1,
                        factor: f,
                    };
                }
            }
        }
        if best.factor < 1.0 {
            best.factor = best.factor.max(MIN_RATIO);
            best
        } else if best.factor >= self.min_gain {
            best.factor = best.factor.min(growth);
            best
        } else if best.order != q {
            best.factor = 1.0;
            best
        } else {
            keep
        }
    }

    /// The decision after a rejected step at order `q`.
    pub fn on_failure(&self, q: usize, e: &Estimates) -> Decision {
        let free = self.fixed.is_none() && q > 1;
        if free && self.rejections >= 2 {
            return Decision {
                order: 1,
                factor: 0.25,
            };
        }
        let mut best = Decision {
            order: q,
            factor: eta(e.current, q, BIAS[1]),
        };
        if free {
            let f = e.lower.map_or(0.0, |lo| eta(lo, q - 1, BIAS[0]));
            if f > best.factor || self.rejections >= 1 {
                best = Decision {
                    order: q - 1,
                    factor: f.max(best.factor),
                };
            }
        }
        let cap = if self.rejections >= 1 { 0.5 } else { 0.9 };
        best.factor = best.factor.clamp(MIN_RATIO * 0.5, cap);
        best
    }

    /// Records an accepted step that led to `d` from order `q`.
    pub fn accepted(&mut self, q: usize, d: &Decision) {
        self.calm += 1;
        if self.calm > q {
            self.rejections = 0;
        }
        if d.order != q || d.factor != 1.0 {
            self.wait = d.order + 1;
        } else {
            self.wait = self.wait.saturating_sub(1);
        }
    }

    /// Records a rejected step (or a failed attempt) that led to order `q`.
    pub fn rejected(&mut self, q: usize) {
        self.rejections += 1;
        self.calm = 0;
        self.wait = q + 1;
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn waits_then_picks_the_order_with_the_largest_step() {
        let mut s = OrderSelector::new(5, None, 1.2);
        let e = Estimates {
            lower: Some(1e-2),
            current: 1e-3,
            higher: Some(1e-8),
        };
        assert_eq!(s.on_success(3, &e).factor, 1.0, "waiting after the start");
        s.wait = 0;
        let d = s.on_success(3, &e);
        assert_eq!(d.order, 4);
        assert_eq!(d.factor, 2.0, "growth capped");
        s.accepted(3, &d);
        assert_eq!(s.wait, 5);
    }

    #[test]
    fn waiting_still_shrinks_when_the_error_asks() {
        let s = OrderSelector::new(5, None, 1.2);
        let near = Estimates {
            lower: None,
            current: 0.9,
            higher: None,
        };
        let d = s.on_success(5, &near);
        assert!(s.wait > 0 && d.order == 5 && d.factor < 0.9, "{d:?}");
        let fine = Estimates {
            current: 0.05,
            ..near
        };
        assert_eq!(s.on_success(5, &fine).factor, 1.0);
    }

    #[test]
    fn failure_shrinks_and_may_lower_the_order() {
        let mut s = OrderSelector::new(5, None, 1.2);
        let e = Estimates {
            lower: Some(0.5),
            current: 30.0,
            higher: None,
        };
        let d = s.on_failure(3, &e);
        assert_eq!(d.order, 2);
        assert!(d.factor <= 0.9);
        s.rejected(2);
        s.rejected(2);
        assert_eq!(s.on_failure(2, &e).order, 1);
    }

    #[test]
    fn a_pinned_order_never_changes() {
        let mut s = OrderSelector::new(5, Some(3), 1.2);
        s.wait = 0;
        let e = Estimates {
            lower: Some(1e-9),
            current: 1e-3,
            higher: Some(1e-12),
        };
        assert_eq!(s.on_success(3, &e).order, 3);
        assert_eq!(s.on_failure(3, &e).order, 3);
    }
}
