//! Step-size control for accuracy: a PI controller and the starting step.
//!
//! After a step with weighted error `err_n` from a method whose estimate is
//! `O(h^(q+1))`, the next step is
//!
//! $$ h_{n+1} = h_n \cdot \mathrm{clamp}\Big(\mathrm{safety}\;
//!    \mathrm{err}_n^{-\alpha}\,\mathrm{err}_{n-1}^{\beta}\Big),\qquad
//!    \alpha = 0.7/(q+1),\ \beta = 0.4/(q+1) $$
//!
//! (Gustafsson, ACM TOMS 20 (1994); Söderlind, ACM TOMS 29 (2003); Hairer,
//! Norsett and Wanner I, II.4). After a rejection the step only shrinks.

/// Accuracy step-size controller (proportional–integral).
#[derive(Clone, Debug)]
pub struct PiController {
    /// Safety factor on the proposed step (common practice: 0.9).
    pub safety: f64,
    /// Smallest factor per step.
    pub min_factor: f64,
    /// Largest factor per step.
    pub max_factor: f64,
    /// Proportional gain numerator (`alpha = kp / (q + 1)`).
    pub kp: f64,
    /// Integral gain numerator (`beta = ki / (q + 1)`).
    pub ki: f64,
    prev_error: f64,
    rejected_last: bool,
}

impl Default for PiController {
    fn default() -> Self {
        Self {
            safety: 0.9,
            min_factor: 0.2,
            max_factor: 10.0,
            kp: 0.7,
            ki: 0.4,
            prev_error: 1.0,
            rejected_last: false,
        }
    }
}

impl PiController {
    /// The factor by which to multiply the step after a step with weighted
    /// error `error`, for an estimate of order `q`. Call once per attempt;
    /// `accepted` says whether that attempt was accepted.
    #[inline]
    pub fn factor(&mut self, error: f64, q: usize, accepted: bool) -> f64 {
        let k = (q + 1) as f64;
        let err = error.max(1e-10);
        let f = if accepted {
            let f = self.safety * err.powf(-self.kp / k) * self.prev_error.powf(self.ki / k);
            let cap = if self.rejected_last {
                1.0
            } else {
                self.max_factor
            };
            self.prev_error = err;
            f.clamp(self.min_factor, cap)
        } else {
            // Pure elementary control after a rejection.
            (self.safety * err.powf(-1.0 / k)).clamp(self.min_factor, 0.9)
        };
        self.rejected_last = !accepted;
        f
    }

    /// Forgets the error history (after a restart or a hand-over).
    pub fn reset(&mut self) {
        self.prev_error = 1.0;
        self.rejected_last = false;
    }
}

/// Starting step size for a method of order `p` (Hairer, Norsett and Wanner I,
/// II.4, "Starting step size"): an explicit Euler probe balances the sizes of
/// `y0`, `f(t0, y0)` and the change of `f`.
///
/// `f0 = f(t0, y0)`, `f1` is scratch for `f(t0 + h0, y0 + h0 f0)` evaluated
/// by `rhs`, `y1` scratch. Returns a positive magnitude; the caller applies
/// the direction and caps it.
pub fn initial_step(
    norm: &crate::norm::ErrorNorm,
    t0: f64,
    y0: &[f64],
    f0: &[f64],
    p: usize,
    direction: f64,
    y1: &mut [f64],
    f1: &mut [f64],
    mut rhs: impl FnMut(f64, &[f64], &mut [f64]),
) -> f64 {
    let d0 = norm.rms_at(y0, y0);
    let d1 = norm.rms_at(f0, y0);
    let h0 = if d0 < 1e-5 || d1 < 1e-5 {
        1e-6
    } else {
        0.01 * d0 / d1
    };
    for i in 0..y0.len() {
        y1[i] = y0[i] + direction * h0 * f0[i];
    }
    rhs(t0 + direction * h0, y1, f1);
    for i in 0..y0.len() {
        y1[i] = f1[i] - f0[i];
    }
    let d2 = norm.rms_at(y1, y0) / h0;
    if !d2.is_finite() {
        return h0 * 1e-3;
    }
    let m = d1.max(d2);
    let h1 = if m <= 1e-15 {
        (h0 * 1e-3).max(1e-6)
    } else {
        (0.01 / m).powf(1.0 / (p as f64 + 1.0))
    };
    (100.0 * h0).min(h1)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn factor_shrinks_on_large_error_and_grows_on_small() {
        let mut c = PiController::default();
        assert!(c.factor(4.0, 4, false) < 1.0);
        assert!(
            c.factor(1e-4, 4, true) <= 1.0,
            "no growth right after a rejection"
        );
        assert!(c.factor(1e-4, 4, true) > 1.0);
        assert!(c.factor(1e-30, 4, true) <= c.max_factor);
    }
}
