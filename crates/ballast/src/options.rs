//! Run settings: tolerances, method, step limits, output.

use ballast_core::{Atol, ImplicitOptions, JacobianSource, Method, Structure};
use ballast_switch::SwitchThresholds;

/// Which states the [`Solution`](crate::Solution) keeps.
#[derive(Clone, Debug, PartialEq, Default)]
pub enum Output {
    /// Every accepted step, with dense output over the whole span (default).
    #[default]
    Steps,
    /// Only the states at these times (interpolated from dense output);
    /// memory does not grow with the number of steps.
    At(Vec<f64>),
    /// Only the final state; memory stays flat for any number of steps.
    Final,
}

/// Settings of a run. Build with [`Options::default`] and the chained setters.
///
/// ```
/// use ballast::{Method, Options};
/// let opts = Options::default().rtol(1e-8).atol(1e-12).method(Method::RadauIIA5);
/// assert_eq!(opts.get_rtol(), 1e-8);
/// ```
#[derive(Clone, Debug, PartialEq)]
pub struct Options {
    pub(crate) rtol: f64,
    pub(crate) atol: Atol,
    pub(crate) method: Method,
    pub(crate) fixed_step: Option<f64>,
    pub(crate) first_step: Option<f64>,
    pub(crate) max_step: Option<f64>,
    pub(crate) min_step: f64,
    pub(crate) max_steps: usize,
    pub(crate) output: Output,
    pub(crate) implicit: ImplicitOptions,
    pub(crate) stability_cap: bool,
    pub(crate) switching: SwitchThresholds,
    pub(crate) breakpoints: Vec<f64>,
}

impl Default for Options {
    fn default() -> Self {
        Self {
            rtol: 1e-6,
            atol: Atol::Scalar(1e-9),
            method: Method::default(),
            fixed_step: None,
            first_step: None,
            max_step: None,
            min_step: 0.0,
            max_steps: 1_000_000,
            output: Output::Steps,
            implicit: ImplicitOptions::default(),
            stability_cap: true,
            switching: SwitchThresholds::default(),
            breakpoints: Vec::new(),
        }
    }
}

impl Options {
    /// The smallest relative tolerance a run accepts: 100 ulps of 1. Below
    /// it rounding errors alone exceed the tolerance and the step size
    /// would shrink until the step budget runs out.
    pub const MIN_RTOL: f64 = 100.0 * f64::EPSILON;

    /// Relative tolerance (default `1e-6`; at least [`Options::MIN_RTOL`]).
    pub fn rtol(mut self, rtol: f64) -> Self {
        self.rtol = rtol;
        self
    }

    /// Absolute tolerance for every component (default `1e-9`).
    pub fn atol(mut self, atol: f64) -> Self {
        self.atol = Atol::Scalar(atol);
        self
    }

    /// One absolute tolerance per component.
    pub fn atol_per_component(mut self, atol: Vec<f64>) -> Self {
        self.atol = Atol::Vector(atol);
        self
    }

    /// The method (default: switching between Dormand–Prince 5(4) and Radau IIA 5).
    pub fn method(mut self, method: Method) -> Self {
        self.method = method;
        self
    }

    /// Take steps of exactly this size (the last one shortened to land on
    /// the end); no error control. Required by methods without an error estimate.
    pub fn fixed_step(mut self, h: f64) -> Self {
        self.fixed_step = Some(h);
        self
    }

    /// First step size (default: chosen automatically).
    pub fn first_step(mut self, h: f64) -> Self {
        self.first_step = Some(h);
        self
    }

    /// Largest step size (default: the length of the span).
    pub fn max_step(mut self, h: f64) -> Self {
        self.max_step = Some(h);
        self
    }

    /// Smallest step size before the run fails (default: a few ulps of `t`).
    pub fn min_step(mut self, h: f64) -> Self {
        self.min_step = h;
        self
    }

    /// Most steps, accepted and rejected (default one million).
    pub fn max_steps(mut self, n: usize) -> Self {
        self.max_steps = n;
        self
    }

    /// Which states to keep (default: every step with dense output).
    pub fn output(mut self, output: Output) -> Self {
        self.output = output;
        self
    }

    /// Keep only the states at these times.
    pub fn output_at(self, times: Vec<f64>) -> Self {
        self.output(Output::At(times))
    }

    /// Where implicit schemes get the Jacobian (default: analytic if given, else finite differences).
    pub fn jacobian(mut self, source: JacobianSource) -> Self {
        self.implicit.jacobian = source;
        self
    }

    /// Declares the Jacobian's structure, overriding the system's own declaration.
    pub fn jacobian_structure(mut self, structure: Structure) -> Self {
        self.implicit.structure = Some(structure);
        self
    }

    /// Cap on Newton iterations per step.
    pub fn max_newton_iters(mut self, n: usize) -> Self {
        self.implicit.max_newton_iters = n;
        self
    }

    /// Newton contraction rate above which an implicit scheme evaluates a
    /// new Jacobian at the next step (default `1e-3`, common practice:
    /// a fresh Jacobian whenever Newton is not converging very fast). Raise
    /// it towards `0.1` when Jacobians are expensive (finite differences on
    /// a large system): fewer Jacobians and factorisations, a few more
    /// Newton iterations. Must lie in `(0, 1]`.
    pub fn jacobian_refresh_rate(mut self, rate: f64) -> Self {
        self.implicit.jacobian_refresh_rate = rate;
        self
    }

    /// Turns the stability cap of explicit schemes on (default) or off.
    pub fn stability_cap(mut self, on: bool) -> Self {
        self.stability_cap = on;
        self
    }

    /// Thresholds of the switching controller.
    pub fn switching(mut self, thresholds: SwitchThresholds) -> Self {
        self.switching = thresholds;
        self
    }

    /// Times the integrator must step onto exactly (known discontinuities
    /// of the forcing); the scheme restarts there (multistep at low order).
    ///
    /// The step before a breakpoint ends one float short of it and the
    /// scheme restarts one float past it, so no stage evaluates `f` at the
    /// breakpoint itself: a forcing that jumps there is seen from the
    /// correct side whichever side it assigns to the breakpoint. The output
    /// reports the breakpoint's own time. Breakpoints outside the span, on
    /// its ends, or within two floats of another are ignored.
    ///
    /// ```
    /// use ballast::{integrate, Options};
    /// // y' = -y + H(t - 1), y(0) = 1; closed form after the jump:
    /// // y = 1 + (e^{-1} - 1) e^{-(t - 1)}.
    /// let f = |t: f64, y: &[f64], dy: &mut [f64]| dy[0] = -y[0] + if t >= 1.0 { 1.0 } else { 0.0 };
    /// let sol = integrate(f, (0.0, 2.0), &[1.0],
    ///     &Options::default().rtol(1e-8).atol(1e-10).breakpoints(vec![1.0]))?;
    /// assert!(sol.times().contains(&1.0));
    /// let exact = 1.0 + ((-1.0f64).exp() - 1.0) * (-1.0f64).exp();
    /// assert!((sol.y_final()[0] - exact).abs() < 1e-6);
    /// # Ok::<(), ballast::Error>(())
    /// ```
    pub fn breakpoints(mut self, times: Vec<f64>) -> Self {
        self.breakpoints = times;
        self
    }

    /// The relative tolerance.
    pub fn get_rtol(&self) -> f64 {
        self.rtol
    }

    /// The absolute tolerance.
    pub fn get_atol(&self) -> &Atol {
        &self.atol
    }

    /// The method.
    pub fn get_method(&self) -> Method {
        self.method
    }

    /// The output mode.
    pub fn get_output(&self) -> &Output {
        &self.output
    }
}
