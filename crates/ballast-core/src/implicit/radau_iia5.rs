//! Radau IIA of order 5 (three stages), implemented as Hairer and Wanner
//! describe (Solving ODEs II, IV.8).
//!
//! The stage increments `Z = h (A ⊗ I) F(Z)` are solved by simplified
//! Newton on `W = (T^{-1} ⊗ I) Z`, where `T^{-1} A^{-1} T` is block
//! diagonal with a real eigenvalue `gamma` and a block for the complex pair
//! `alpha ± i beta`. Each iteration then needs one real `n × n` solve with
//! `gamma/h I - J` and one complex `n × n` solve with `(alpha + i beta)/h I - J`,
//! instead of a `3n × 3n` system. The error estimate is the embedded
//! order-3 formula filtered by `(gamma/h I - J)^{-1}` (eq. (8.19)–(8.20)),
//! refiltered through `f(t_n, y_n + err)` on the first step and after a
//! rejection; dense output is the collocation polynomial, which also
//! predicts the next step's stages (after a failed iteration too: the
//! polynomial of the last accepted step still holds, and a zero start at
//! half the step costs more iterations than it saves). The factorisations
//! are kept while `h / h_factored` is in `[1, 1.2)` and Newton contracted
//! fast. An analytic Jacobian is taken at the step's end time, `J(t_n + h,
//! y_n)` instead of `J(t_n, y_n)`: the same on an autonomous system, and
//! on a time-dependent one the time of the last stage, which is the new
//! solution (the method is stiffly accurate), so the iteration matrix is
//! exact for it on a linear problem. On the stiffness ramp of
//! `ballast-models` (`lambda(t)` growing 15 % across a step) that cut the
//! right-hand-side calls from 1088 to 731 at rtol 1e-6 and from 2592 to
//! 2120 at 1e-8, all errors below 1e-10; of the stages' times, 0.8 h saved
//! 5 % more calls, 0.65 h (the middle stage) 7 % fewer. Finite-difference Jacobians stay at `t_n`, where `f(t_n, y_n)`
//! is in hand. A step whose iteration contracted at rate `theta` limits the next
//! step to `target / theta` times its size, `target` being the rate that
//! would converge in `TARGET_ITERS` iterations from a start as far off as
//! this step's.

use std::sync::OnceLock;

use super::iteration::IterationMatrix;
use super::radau_constants::RadauConstants;
use super::tableau::RADAU_IIA_5;
use crate::endpoints::Endpoints;
use crate::method::Method;
use crate::newton::{NewtonControl, NewtonStatus};
use crate::norm::ErrorNorm;
use crate::options::ImplicitOptions;
use crate::problem::Problem;
use crate::scheme::{Attempt, Scheme, SchemeState, StepFailure};
use crate::system::{Structure, System};
use num_complex::Complex64;

/// Newton rate below which the factorisation may be kept (Hairer and
/// Wanner II, IV.8 keep it when the Jacobian is kept).
const FAST_RATE: f64 = 0.1;

/// Newton iterations the next step aims at. The contraction rate grows
/// about in proportion to the step (the Jacobian, frozen at the step's
/// start, drifts from the true one across the step), and an iteration that
/// contracts too slowly fails the convergence forecast and costs a halved
/// step. The next step is limited to the rate at which a start as far off
/// as the last one converges in this many iterations
/// ([`NewtonControl::rate_for`]; between `RATE_BOUNDS`), so the limit
/// tightens with the tolerance. Measured (rtol 1e-6 / 1e-8), failed
/// attempts and right-hand-side calls: on the stiffness ramp of
/// `ballast-models` none / 19 and 41 failures, 1321 / 3107 calls; this rule
/// 0 / 0 failures, 1088 / 2592 calls. A fixed target rate of 0.1 did as well
/// on the ramp (944 / 2517 calls) but cost the `tour` example's reactor 8 %
/// more calls; a fixed 0.2 left 25 failures at 1e-8. Other stiff models
/// of `ballast-models`: the same calls or up to 6 % fewer (HIRES at 1e-8:
/// 1 % more). The limit applies only when the iteration matrix was exact
/// for the step (fresh Jacobian, factorised for this `h`); otherwise the
/// rate reflects the matrix's age (an oscillator at rtol 1e-10 lost
/// accuracy when steps were limited for that).
const TARGET_ITERS: usize = 4;

/// Bounds on the targeted contraction rate.
const RATE_BOUNDS: (f64, f64) = (0.05, 0.5);

/// The growth limit never shrinks an accepted step below this factor (the
/// accuracy rule and the failure response handle larger cuts).
const MIN_RATE_FACTOR: f64 = 0.5;

/// The Radau IIA 5 scheme.
#[derive(Debug)]
pub struct RadauIia5 {
    k: RadauConstants,
    n: usize,
    /// The end points of the last step; the slope `f(t, y)` is `f0`.
    ends: Endpoints,
    f0: Vec<f64>,
    h: f64,
    z: [Vec<f64>; 3],
    w: [Vec<f64>; 3],
    fz: [Vec<f64>; 3],
    cont: [Vec<f64>; 3],
    y_new: Vec<f64>,
    res: Vec<f64>,
    tmp: Vec<f64>,
    /// Error weights at the step's start, for the Newton increments.
    wt: Vec<f64>,
    cres: Vec<Complex64>,
    iter: IterationMatrix,
    newton: NewtonControl,
    last_theta: f64,
    first: bool,
    rejected_last: bool,
}

fn three(n: usize) -> [Vec<f64>; 3] {
    [vec![0.0; n], vec![0.0; n], vec![0.0; n]]
}

/// The transformation constants of Radau IIA 5, computed once per process
/// (an eigen-decomposition of `A^{-1}`: a few microseconds, which a short
/// run of the switching pair would otherwise pay for its standby scheme).
fn constants() -> &'static Option<RadauConstants> {
    static CONSTANTS: OnceLock<Option<RadauConstants>> = OnceLock::new();
    CONSTANTS.get_or_init(|| {
        let tab = &RADAU_IIA_5;
        let a: [[f64; 3]; 3] = std::array::from_fn(|i| std::array::from_fn(|j| tab.a[i][j]));
        let b = [tab.b[0], tab.b[1], tab.b[2]];
        let c = [tab.c[0], tab.c[1], tab.c[2]];
        RadauConstants::new(&a, &b, &c)
    })
}

impl RadauIia5 {
    /// A scheme for a system of dimension `n` whose Jacobian has `structure`.
    pub fn new(n: usize, structure: &Structure, opts: &ImplicitOptions) -> Result<Self, String> {
        let k = constants()
            .clone()
            .ok_or("Radau IIA constants are degenerate")?;
        Ok(Self {
            k,
            n,
            ends: Endpoints::new(n),
            f0: vec![0.0; n],
            h: 0.0,
            z: three(n),
            w: three(n),
            fz: three(n),
            cont: three(n),
            y_new: vec![0.0; n],
            res: vec![0.0; n],
            tmp: vec![0.0; n],
            wt: vec![0.0; n],
            cres: vec![Complex64::new(0.0, 0.0); n],
            iter: IterationMatrix::new(n, structure, opts, true)?,
            newton: NewtonControl::new(opts.max_newton_iters),
            last_theta: 1.0,
            first: true,
            rejected_last: false,
        })
    }

    /// The transformation constants in use.
    pub fn constants(&self) -> &RadauConstants {
        &self.k
    }

    fn fail<S: System>(&mut self, p: &mut Problem<S>) -> StepFailure {
        p.counters.newton_failures += 1;
        self.iter.after_failure();
        self.newton.reset();
        StepFailure::NewtonFailed
    }

    /// Stage predictor: the last collocation polynomial extrapolated, or zero.
    fn predict(&mut self, h: f64) {
        let t = &self.k.tinv;
        let ends = &self.ends;
        if ends.h_last != 0.0 && !self.first {
            for l in 0..3 {
                let th = 1.0 + self.k.c[l] * h / ends.h_last;
                for m in 0..self.n {
                    let u = ends.y_prev[m]
                        + th * (self.cont[0][m] + th * (self.cont[1][m] + th * self.cont[2][m]));
                    self.z[l][m] = u - ends.y[m];
                }
            }
        } else {
            for z in self.z.iter_mut() {
                z.fill(0.0);
            }
        }
        for m in 0..self.n {
            let (z0, z1, z2) = (self.z[0][m], self.z[1][m], self.z[2][m]);
            for k in 0..3 {
                self.w[k][m] = t[k][0] * z0 + t[k][1] * z1 + t[k][2] * z2;
            }
        }
    }

    fn newton_solve<S: System>(
        &mut self,
        p: &mut Problem<S>,
        h: f64,
        norm: &ErrorNorm,
    ) -> Result<(), StepFailure> {
        let (g, al, be) = (self.k.gamma, self.k.alpha, self.k.beta);
        let ti = self.k.tinv;
        self.newton.begin();
        loop {
            for l in 0..3 {
                for ((u, y), z) in self.tmp.iter_mut().zip(&self.ends.y).zip(&self.z[l]) {
                    *u = y + z;
                }
                p.rhs(self.ends.t + self.k.c[l] * h, &self.tmp, &mut self.fz[l]);
            }
            p.counters.newton_iters += 1;
            // The vectors as slices of one length, so the loops below run
            // without bounds checks or reloads of the vectors' addresses.
            let n = self.n;
            let [fz0, fz1, fz2] = &self.fz;
            let (fz0, fz1, fz2) = (&fz0[..n], &fz1[..n], &fz2[..n]);
            {
                let [w0, w1, w2] = &self.w;
                let (w0, w1, w2) = (&w0[..n], &w1[..n], &w2[..n]);
                let (res, cres) = (&mut self.res[..n], &mut self.cres[..n]);
                for m in 0..n {
                    let (f0, f1, f2) = (fz0[m], fz1[m], fz2[m]);
                    let g0 = ti[0][0] * f0 + ti[0][1] * f1 + ti[0][2] * f2;
                    let g1 = ti[1][0] * f0 + ti[1][1] * f1 + ti[1][2] * f2;
                    let g2 = ti[2][0] * f0 + ti[2][1] * f1 + ti[2][2] * f2;
                    let (w0, w1, w2) = (w0[m], w1[m], w2[m]);
                    res[m] = g0 - g * w0 / h;
                    cres[m] =
                        Complex64::new(g1 - (al * w1 - be * w2) / h, g2 - (be * w1 + al * w2) / h);
                }
            }
            self.iter.solve_both(p, &mut self.res, &mut self.cres);
            // One pass: the update of W and Z = (T ⊗ I) W, and the three
            // increments' norms (weights of this step's start) side by side.
            let t = &self.k.t;
            let mut sums = [0.0; 3];
            let [w0, w1, w2] = &mut self.w;
            let (w0, w1, w2) = (&mut w0[..n], &mut w1[..n], &mut w2[..n]);
            let [z0, z1, z2] = &mut self.z;
            let (z0, z1, z2) = (&mut z0[..n], &mut z1[..n], &mut z2[..n]);
            let (res, cres, wts) = (&self.res[..n], &self.cres[..n], &self.wt[..n]);
            for m in 0..n {
                let dw = [res[m], cres[m].re, cres[m].im];
                let wt = wts[m];
                w0[m] += dw[0];
                w1[m] += dw[1];
                w2[m] += dw[2];
                for k in 0..3 {
                    let q = dw[k] / wt;
                    sums[k] += q * q;
                }
                let (a, b, c) = (w0[m], w1[m], w2[m]);
                z0[m] = t[0][0] * a + t[0][1] * b + t[0][2] * c;
                z1[m] = t[1][0] * a + t[1][1] * b + t[1][2] * c;
                z2[m] = t[2][0] * a + t[2][1] * b + t[2][2] * c;
            }
            let [d0, d1, d2] = sums.map(|s| norm.rms_of_sum(s));
            let dn = ((d0 * d0 + d1 * d1 + d2 * d2) / 3.0).sqrt();
            match self.newton.update(dn) {
                NewtonStatus::Converged => return Ok(()),
                NewtonStatus::Continue => {}
                NewtonStatus::Diverged | NewtonStatus::TooSlow => return Err(self.fail(p)),
            }
        }
    }

    /// `res = (gamma/h I - J)^{-1} (f + sum dd_l Z_l / h)` and its norm.
    fn filtered_error<S: System>(
        &mut self,
        p: &mut Problem<S>,
        h: f64,
        norm: &ErrorNorm,
        use_tmp: bool,
    ) -> f64 {
        let (dd, n) = (self.k.dd, self.n);
        let f = if use_tmp {
            &self.tmp[..n]
        } else {
            &self.f0[..n]
        };
        let [z0, z1, z2] = &self.z;
        let (z0, z1, z2) = (&z0[..n], &z1[..n], &z2[..n]);
        for (m, r) in self.res[..n].iter_mut().enumerate() {
            *r = f[m] + (dd[0] * z0[m] + dd[1] * z1[m] + dd[2] * z2[m]) / h;
        }
        self.iter.solve_real(p, &mut self.res);
        norm.rms(&self.res, &self.ends.y, &self.y_new)
    }
}

impl SchemeState for RadauIia5 {
    fn method(&self) -> Method {
        Method::RadauIIA5
    }
    fn order(&self) -> usize {
        5
    }
    fn error_order(&self) -> usize {
        3
    }
    fn is_implicit(&self) -> bool {
        true
    }
    fn t(&self) -> f64 {
        self.ends.t
    }
    fn y(&self) -> &[f64] {
        &self.ends.y
    }
    fn dydt(&self) -> Option<&[f64]> {
        self.ends.dydt(&self.f0)
    }
    fn t_prev(&self) -> f64 {
        self.ends.t_prev
    }
    fn interpolate(&self, t: f64, out: &mut [f64]) {
        let Some(th) = self.ends.step_fraction(t, out) else {
            return;
        };
        for m in 0..self.n {
            out[m] = self.ends.y_prev[m]
                + th * (self.cont[0][m] + th * (self.cont[1][m] + th * self.cont[2][m]));
        }
    }
    fn dense_degree(&self) -> usize {
        3
    }
    fn dense_coefficients(&self, coeffs: &mut [f64]) {
        let n = self.n;
        coeffs[..n].copy_from_slice(&self.ends.y_prev);
        for k in 0..3 {
            coeffs[(k + 1) * n..(k + 2) * n].copy_from_slice(&self.cont[k]);
        }
    }
}

impl<S: System> Scheme<S> for RadauIia5 {
    fn start_with(
        &mut self,
        p: &mut Problem<S>,
        t: f64,
        y: &[f64],
        slope: Option<&[f64]>,
    ) -> Result<(), StepFailure> {
        for c in self.cont.iter_mut() {
            c.fill(0.0);
        }
        self.first = true;
        self.rejected_last = false;
        self.last_theta = 1.0;
        self.iter.restart();
        self.newton.reset();
        self.ends.start(p, t, y, slope, &mut self.f0)
    }

    fn attempt(
        &mut self,
        p: &mut Problem<S>,
        h: f64,
        norm: &ErrorNorm,
    ) -> Result<Attempt, StepFailure> {
        self.ends.ensure_f(p, &mut self.f0);
        self.h = h;
        self.iter
            .ensure_jacobian(p, self.ends.t, h, &self.ends.y, &self.f0)?;
        if self.last_theta >= FAST_RATE || self.rejected_last {
            self.iter.drop_factorisation();
        }
        let (g, al, be) = (self.k.gamma, self.k.alpha, self.k.beta);
        let h_fact = self.iter.factor(
            p,
            h,
            true,
            |hh| g / hh,
            |hh| Complex64::new(al / hh, be / hh),
        );
        // The iteration matrix is exact for this step (its Jacobian from
        // this step's start, its factorisation for this `h`): then the
        // contraction rate measures the Jacobian's drift across the step.
        let exact = match h_fact {
            Err(e) => {
                self.iter.after_failure();
                return Err(e);
            }
            Ok(hf) => hf == h && self.iter.is_fresh(),
        };
        self.newton.set_tolerance(norm.rtol());
        norm.weights(&self.ends.y, &mut self.wt);
        self.predict(h);
        self.newton_solve(p, h, norm)?;
        for m in 0..self.n {
            self.y_new[m] = self.ends.y[m] + self.z[2][m];
        }
        let mut error = self.filtered_error(p, h, norm, false);
        if error >= 1.0 && (self.first || self.rejected_last) && error.is_finite() {
            for m in 0..self.n {
                self.tmp[m] = self.ends.y[m] + self.res[m];
            }
            let y1 = std::mem::take(&mut self.tmp);
            let mut f1 = std::mem::take(&mut self.fz[0]);
            p.rhs(self.ends.t, &y1, &mut f1);
            self.tmp = f1;
            self.fz[0] = y1;
            error = self.filtered_error(p, h, norm, true);
        }
        if error.is_finite() {
            let attempt = Attempt::with_error(error);
            let theta = self.newton.theta();
            let target = self
                .newton
                .rate_for(TARGET_ITERS)
                .clamp(RATE_BOUNDS.0, RATE_BOUNDS.1);
            // Below half the target the limit would allow more than the
            // accuracy rule's usual growth anyway. With a kept Jacobian or
            // factorisation the rate measures their age instead, which a
            // refresh, not a shorter step, cures.
            Ok(if exact && theta > 0.5 * target {
                attempt.limited_to((target / theta).max(MIN_RATE_FACTOR))
            } else {
                attempt
            })
        } else {
            self.iter.after_failure();
            Err(StepFailure::NonFinite)
        }
    }

    fn accept(&mut self, p: &mut Problem<S>) {
        let vi = self.k.vinv;
        for m in 0..self.n {
            let (z0, z1, z2) = (self.z[0][m], self.z[1][m], self.z[2][m]);
            for k in 0..3 {
                self.cont[k][m] = vi[k][0] * z0 + vi[k][1] * z1 + vi[k][2] * z2;
            }
        }
        self.ends.advance(self.h, &mut self.y_new);
        p.rhs(self.ends.t, &self.ends.y, &mut self.f0);
        self.last_theta = self.newton.theta();
        self.iter.after_accept(self.last_theta);
        self.first = false;
        self.rejected_last = false;
    }

    fn reject(&mut self) {
        self.rejected_last = true;
        self.iter.after_reject();
    }
}
