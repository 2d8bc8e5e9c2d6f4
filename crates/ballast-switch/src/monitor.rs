//! The stiffness monitor: when to estimate the dominant eigenvalue, and the
//! stability cap that follows from it.
//!
//! The full estimate is a warm-started power iteration on finite-difference
//! Jacobian–vector products `(f(t, y + e v) - f(t, y)) / e` (one `f` call
//! each; Sommeijer, Shampine and Verwer 1998). It runs at the start, every
//! `estimate_interval` accepted steps, and at once when the free estimate
//! from the explicit stages (Hairer and Wanner II, IV.2) moves by more than
//! `stage_change_trigger`, or after repeated rejections.

use std::time::Instant;

use ballast_core::stability::{self, Region};
use ballast_core::{Method, Problem, SchemeState, System};
use ballast_stiffness::{PowerOptions, SpectralEstimator};
use num_complex::Complex64;

use crate::config::SwitchThresholds;
use crate::controller::ControlStats;

/// Products allowed for one estimate. A warm start usually needs 3–6; a
/// cold start on a Jacobian with a slowly decaying spectrum more (common practice).
const MAX_PRODUCTS: usize = 40;

/// Relative accuracy asked of the estimate: the cap uses `0.9` of the reach,
/// so an estimate within a few percent keeps steps inside the region.
const ESTIMATE_TOL: f64 = 1e-2;

/// Accuracy asked while the steps stay below `FAR_FRACTION` of the reach:
/// an estimate 10% off (or even several times off) cannot put such a step
/// outside the region, and a warm start meets it in two or three products.
const FAR_ESTIMATE_TOL: f64 = 1e-1;

/// Rejections in a row that trigger a fresh estimate (the stiffness may have grown).
const REJECTIONS_TO_ESTIMATE: usize = 2;

/// When the steps stay far inside the stability region (below
/// `FAR_FRACTION` of the reach), the interval between full estimates
/// doubles, up to `MAX_INTERVAL_FACTOR` times the configured one, and a
/// move of the stage estimate that keeps `h * s` below this fraction does
/// not call for a full estimate: the stiffness would have to grow five-fold
/// before such a step left the region, and the stage check (every
/// `STAGE_CHECK_EVERY` steps) or the rejections see that growth first. A
/// non-stiff run then pays almost nothing for being watched.
const FAR_FRACTION: f64 = 0.2;
const MAX_INTERVAL_FACTOR: usize = 16;

/// The free stage estimate is looked at every this many accepted steps: it
/// costs a pass over the stages, small but not nothing on a cheap system
/// (5% of a Dormand–Prince 5(4) run on Lorenz when looked at every 4 steps).
const STAGE_CHECK_EVERY: usize = 4;

/// The same while the steps stay below `FAR_FRACTION` of the reach, where a
/// stiffness growth must exceed five-fold to matter.
const STAGE_CHECK_EVERY_FAR: usize = 16;
const _: () =
    assert!(STAGE_CHECK_EVERY.is_power_of_two() && STAGE_CHECK_EVERY_FAR.is_power_of_two());

/// The latest spectral estimate.
#[derive(Clone, Copy, Debug, PartialEq)]
pub(crate) struct Spectrum {
    /// Spectral radius (on the safe side when the iteration did not converge).
    pub rho: f64,
    /// Dominant eigenvalue estimate.
    pub lambda: Complex64,
}

pub(crate) struct Monitor {
    estimator: SpectralEstimator,
    /// Power-iteration options near the boundary, and far inside the region.
    opts: PowerOptions,
    opts_far: PowerOptions,
    /// The last step stayed below `FAR_FRACTION` of the reach.
    far: bool,
    /// The point of the estimate `y`, then `f(t, y)`, in one allocation.
    point: Vec<f64>,
    latest: Option<Spectrum>,
    steps_since: usize,
    stage_ref: Option<f64>,
    rejections: usize,
    /// Current multiple of the configured estimate interval.
    stretch: usize,
    /// Real-axis reach of the region in use (0 when unknown).
    reach: f64,
    /// Seconds per right-hand-side call, measured during estimates.
    pub(crate) seconds_per_rhs: Option<f64>,
}

impl Monitor {
    pub(crate) fn new(n: usize) -> Self {
        Self {
            estimator: SpectralEstimator::new(n),
            opts: PowerOptions::default()
                .tol(ESTIMATE_TOL)
                .max_products(MAX_PRODUCTS),
            opts_far: PowerOptions::default()
                .tol(FAR_ESTIMATE_TOL)
                .max_products(MAX_PRODUCTS),
            far: false,
            point: vec![0.0; 2 * n],
            latest: None,
            steps_since: 0,
            stage_ref: None,
            rejections: 0,
            stretch: 1,
            reach: 0.0,
            seconds_per_rhs: None,
        }
    }

    pub(crate) fn latest(&self) -> Option<Spectrum> {
        self.latest
    }

    /// Accepted steps since the latest full estimate.
    pub(crate) fn age(&self) -> usize {
        self.steps_since
    }

    /// Whether a full estimate is due after an accepted step of `scheme`
    /// (asked after every step: the common answer, no, is decided inline).
    #[inline]
    pub(crate) fn due(&self, scheme: &dyn SchemeState, th: &SwitchThresholds) -> bool {
        if self.latest.is_none() || self.steps_since >= th.estimate_interval * self.stretch {
            return true;
        }
        if self.rejections >= REJECTIONS_TO_ESTIMATE {
            return true;
        }
        let every = if self.far {
            STAGE_CHECK_EVERY_FAR
        } else {
            STAGE_CHECK_EVERY
        };
        // Both intervals are powers of two: a mask, not a division.
        if self.steps_since & (every - 1) != 0 {
            return false;
        }
        self.stage_estimate_moved(scheme, th)
    }

    /// Whether the free stage estimate moved enough to call for a full one.
    fn stage_estimate_moved(&self, scheme: &dyn SchemeState, th: &SwitchThresholds) -> bool {
        // A change of the stage estimate by the trigger fraction calls for a
        // full estimate when the old or the new value matters for the step
        // (reaches a noticeable fraction of the region along the real axis).
        let h = (scheme.t() - scheme.t_prev()).abs();
        match (scheme.stage_spectral_estimate(), self.stage_ref) {
            (Some(s), Some(r)) if r > 0.0 => {
                (s - r).abs() > th.stage_change_trigger * r
                    && s.max(r) * h >= FAR_FRACTION * self.reach
            }
            _ => false,
        }
    }

    /// Records the real-axis reach of the explicit region in use.
    pub(crate) fn set_reach(&mut self, reach: f64) {
        self.reach = reach;
    }

    /// Adapts the estimate interval to how far inside the region the
    /// steps are: `fraction = |h| rho / r(theta)`.
    pub(crate) fn note_margin(&mut self, fraction: f64) {
        self.far = fraction < FAR_FRACTION;
        self.stretch = if self.far {
            (self.stretch * 2).min(MAX_INTERVAL_FACTOR)
        } else {
            1
        };
    }

    pub(crate) fn note_accept(&mut self) {
        self.steps_since += 1;
        self.rejections = 0;
    }

    pub(crate) fn note_reject(&mut self) {
        self.rejections += 1;
    }

    /// Back to the configured interval (after a switch or a capped step).
    pub(crate) fn watch_closely(&mut self) {
        self.stretch = 1;
        self.far = false;
    }

    /// Runs the power iteration at the scheme's current state.
    pub(crate) fn estimate<S: System>(
        &mut self,
        p: &mut Problem<S>,
        scheme: &dyn SchemeState,
        stats: &mut ControlStats,
    ) {
        let stage = scheme.stage_spectral_estimate();
        self.estimate_at(p, scheme.t(), scheme.y(), scheme.dydt(), stage, stats);
    }

    /// Runs the power iteration at `(t, y)`, with the slope `f(t, y)` when
    /// known (else one call evaluates it) and the stage estimate there.
    pub(crate) fn estimate_at<S: System>(
        &mut self,
        p: &mut Problem<S>,
        t: f64,
        y: &[f64],
        slope: Option<&[f64]>,
        stage: Option<f64>,
        stats: &mut ControlStats,
    ) {
        let (yc, fy) = self.point.split_at_mut(y.len());
        yc.copy_from_slice(y);
        match slope {
            Some(f) => fy.copy_from_slice(f),
            None => p.rhs(t, yc, fy),
        }
        let clock = Instant::now();
        let f = |v: &[f64], out: &mut [f64]| p.rhs(t, v, out);
        let opts = if self.far { &self.opts_far } else { &self.opts };
        let (yc, fy) = self.point.split_at(y.len());
        let Ok(est) = self.estimator.estimate_fd(f, yc, fy, opts) else {
            return;
        };
        let elapsed = clock.elapsed().as_secs_f64();
        stats.spectral_estimates += 1;
        stats.spectral_products += est.products;
        if est.products > 0 {
            let per = elapsed / est.products as f64;
            self.seconds_per_rhs = Some(match self.seconds_per_rhs {
                Some(old) => 0.5 * (old + per),
                None => per,
            });
        }
        self.steps_since = 0;
        self.rejections = 0;
        self.stage_ref = stage;
        if est.radius.is_finite() {
            self.latest = Some(Spectrum {
                rho: est.radius,
                lambda: if est.eigenvalue.norm() > 0.0 {
                    est.eigenvalue * (est.radius / est.eigenvalue.norm())
                } else {
                    Complex64::new(-est.radius, 0.0)
                },
            });
        }
    }
}

/// The stability region a scheme is using now (the current order's, for
/// variable-order schemes).
pub(crate) fn current_region(method: Method, order: usize) -> Option<&'static Region> {
    match method {
        Method::Adams => stability::adams_pece(order),
        Method::Bdf => stability::bdf(order),
        m => stability::method_region(m),
    }
}

/// The largest step keeping `h lambda` inside `region` along the ray of
/// `lambda`: `r(theta) / |lambda|`, from the tabulated rays (no allocation).
/// `None` when that ray has no limit or `lambda` grows (`Re > 0`).
pub(crate) fn critical_step(region: &Region, s: Spectrum) -> Option<f64> {
    if s.rho <= 0.0 || s.lambda.re > 0.0 {
        return None;
    }
    let theta = s
        .lambda
        .im
        .atan2(s.lambda.re)
        .rem_euclid(2.0 * std::f64::consts::PI);
    region.reach(theta).map(|r| r / s.rho)
}
