//! Comparing methods on your own model: achieved error against work.
//!
//! A [`Study`] runs every contender (a [`Method`], or a label with its own
//! [`Options`]) at every tolerance on one model, measures the error at the
//! end of the span against a reference, counts the work, times each run
//! (median of a few repetitions) and returns a [`Report`]. The report
//! prints as an aligned text table ([`Report::table`], also its `Display`),
//! writes CSV ([`Report::to_csv`]) and, with the `plot` feature, draws a
//! work–precision picture ([`Report::write_svg`]). It names the fastest
//! adequate run per tolerance ([`Report::winners`]) and the cost of one
//! contender relative to the best single method ([`Report::cost_ratio`]).
//!
//! A run that fails (an input error, a step-size collapse, a step budget
//! exhausted, even a panic inside the right-hand side) becomes a row with
//! its error message and the counters up to the failure; it never ends the
//! study.
//!
//! The model must be re-creatable: [`Study::new`] clones it for every run,
//! [`Study::from_fn`] calls a constructor.
//!
//! ```
//! use ballast::compare::Study;
//! use ballast::Method;
//! // y' = -y, y(0) = 1 on [0, 1]: y(1) = e^{-1} (closed form).
//! let decay = |_t: f64, y: &[f64], dy: &mut [f64]| dy[0] = -y[0];
//! let report = Study::new(decay, (0.0, 1.0), &[1.0])
//!     .name("decay")
//!     .methods([Method::DormandPrince54, Method::BogackiShampine32])
//!     .tolerances([1e-4, 1e-8])
//!     .reference(vec![(-1.0f64).exp()], "closed form e^{-t}")
//!     .repeats(1)
//!     .run()?;
//! assert_eq!(report.rows().len(), 4);
//! assert!(report.rows().iter().all(|r| r.error.unwrap() < 1e-3));
//! println!("{report}");
//! # Ok::<(), ballast::compare::StudyError>(())
//! ```

mod csv;
mod reference;
mod report;
mod runner;
mod table;
#[cfg(test)]
mod tests;

pub use reference::{relative_error, ReferenceInfo};
pub use report::{CostRatio, Report, Row, Winner, WinnerBasis, WinnerRule};

use crate::{Method, Options, System};

/// Why a study could not start. Failures of single runs are not errors of
/// the study: they appear as rows of the [`Report`].
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum StudyError {
    /// No method or contender was added.
    #[error("the study has no contenders: add methods with .method() or .contender()")]
    NoContenders,
    /// No tolerance was given.
    #[error("the study has no tolerances: give some with .tolerances()")]
    NoTolerances,
    /// A tolerance is zero, negative or not finite.
    #[error("tolerance {name} = {value} must be positive and finite")]
    InvalidTolerance {
        /// `"rtol"`, `"atol"`, `"atol ratio"` or `"error floor"`.
        name: &'static str,
        /// The offending value.
        value: f64,
    },
    /// Zero repetitions were asked for.
    #[error("repeats must be at least 1")]
    NoRepeats,
    /// Two contenders have the same label.
    #[error("two contenders are labelled {0:?}; labels must be distinct")]
    DuplicateLabel(String),
    /// The supplied reference does not match the state.
    #[error("the reference has {got} components, the state has {expected}")]
    ReferenceLength {
        /// State dimension.
        expected: usize,
        /// Reference length.
        got: usize,
    },
    /// The supplied reference contains NaN or infinity.
    #[error("reference component {0} is not finite")]
    NonFiniteReference(usize),
}

/// What a contender runs with.
#[derive(Clone, Debug)]
enum Plan {
    /// A method with the study's base options.
    Method(Method),
    /// Options of its own (tolerances and output are still the study's).
    Custom(Box<Options>),
}

#[derive(Clone, Debug)]
struct Contender {
    label: String,
    plan: Plan,
}

/// How the tolerances of the runs are given.
#[derive(Clone, Debug)]
enum Tolerances {
    /// Relative tolerances; `atol = ratio * rtol`.
    Relative(Vec<f64>),
    /// Explicit `(rtol, atol)` pairs.
    Pairs(Vec<(f64, f64)>),
}

/// Where the reference solution comes from.
#[derive(Clone, Debug)]
pub(crate) enum ReferenceSpec {
    /// A tighter run of a high-order method, chosen automatically.
    Auto,
    /// Supplied by the caller, with a note on its provenance.
    Given { y: Vec<f64>, source: String },
    /// A run of this method at these tolerances.
    Run {
        method: Method,
        rtol: f64,
        atol: f64,
    },
}

type Factory<'m, S> = Box<dyn Fn() -> S + 'm>;

/// A comparison of methods on one model. Build it, then [`run`](Study::run).
///
/// Defaults: tolerances must be given; `atol = 1e-3 * rtol`; three timed
/// repetitions per run (the median is reported; a run under a millisecond
/// is repeated back to back within each repetition and its mean time
/// taken); the reference is computed
/// automatically (see [`Study::reference_run`]); the error is measured as
/// [`relative_error`] with the floor set to the smallest `atol` of the study.
pub struct Study<'m, S> {
    make: Factory<'m, S>,
    name: String,
    span: (f64, f64),
    y0: Vec<f64>,
    base: Options,
    contenders: Vec<Contender>,
    tolerances: Option<Tolerances>,
    atol_ratio: f64,
    repeats: usize,
    reference: ReferenceSpec,
    floor: Option<f64>,
    rule: WinnerRule,
}

impl<S> std::fmt::Debug for Study<'_, S> {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.debug_struct("Study")
            .field("name", &self.name)
            .field("span", &self.span)
            .field("dim", &self.y0.len())
            .field("contenders", &self.contenders)
            .field("tolerances", &self.tolerances)
            .field("repeats", &self.repeats)
            .finish()
    }
}

impl<'m, S: System + Clone + 'm> Study<'m, S> {
    /// A study of `model` over `span` from `y0`; every run gets a clone of `model`.
    pub fn new(model: S, span: (f64, f64), y0: &[f64]) -> Self {
        Self::from_fn(move || model.clone(), span, y0)
    }
}

impl<'m, S: System> Study<'m, S> {
    /// A study whose runs each get a fresh model from `make`.
    pub fn from_fn(make: impl Fn() -> S + 'm, span: (f64, f64), y0: &[f64]) -> Self {
        Self {
            make: Box::new(make),
            name: "model".into(),
            span,
            y0: y0.to_vec(),
            base: Options::default(),
            contenders: Vec::new(),
            tolerances: None,
            atol_ratio: 1e-3,
            repeats: 3,
            reference: ReferenceSpec::Auto,
            floor: None,
            rule: WinnerRule::default(),
        }
    }

    /// The model's name, shown in the report.
    pub fn name(mut self, name: &str) -> Self {
        self.name = name.into();
        self
    }

    /// Options every [`method`](Study::method) contender starts from (step
    /// limits, Jacobian settings, ...). Tolerances and output mode are set
    /// by the study.
    pub fn base_options(mut self, options: Options) -> Self {
        self.base = options;
        self
    }

    /// Adds `method`, run with the base options, labelled by its name.
    pub fn method(mut self, method: Method) -> Self {
        self.contenders.push(Contender {
            label: method.name().to_string(),
            plan: Plan::Method(method),
        });
        self
    }

    /// Adds several methods.
    pub fn methods(self, methods: impl IntoIterator<Item = Method>) -> Self {
        methods.into_iter().fold(self, Study::method)
    }

    /// Adds a contender with options of its own, e.g. a method with a
    /// different Jacobian structure. Its tolerances and output mode are
    /// replaced by the study's.
    pub fn contender(mut self, label: &str, options: Options) -> Self {
        self.contenders.push(Contender {
            label: label.into(),
            plan: Plan::Custom(Box::new(options)),
        });
        self
    }

    /// The relative tolerances to run at; `atol = ratio * rtol` (see
    /// [`atol_ratio`](Study::atol_ratio)).
    pub fn tolerances(mut self, rtols: impl IntoIterator<Item = f64>) -> Self {
        self.tolerances = Some(Tolerances::Relative(rtols.into_iter().collect()));
        self
    }

    /// Explicit `(rtol, atol)` pairs to run at.
    pub fn tolerance_pairs(mut self, pairs: impl IntoIterator<Item = (f64, f64)>) -> Self {
        self.tolerances = Some(Tolerances::Pairs(pairs.into_iter().collect()));
        self
    }

    /// `atol / rtol` for [`tolerances`](Study::tolerances) (default `1e-3`).
    pub fn atol_ratio(mut self, ratio: f64) -> Self {
        self.atol_ratio = ratio;
        self
    }

    /// Timed repetitions per run (default 3; the median time is reported).
    /// A failed run is not repeated.
    pub fn repeats(mut self, n: usize) -> Self {
        self.repeats = n;
        self
    }

    /// Uses `y` as the reference state at the end of the span; `source`
    /// says where it comes from and is printed in the report.
    pub fn reference(mut self, y: Vec<f64>, source: &str) -> Self {
        self.reference = ReferenceSpec::Given {
            y,
            source: source.into(),
        };
        self
    }

    /// Computes the reference with `method` at `(rtol, atol)`.
    ///
    /// Without this or [`reference`](Study::reference), the study tries in
    /// turn Dormand–Prince 8(5,3) (with a step budget), Radau IIA 5 and the
    /// switching default, at tolerances a thousand times tighter than the
    /// tightest of the study (no tighter than `rtol = 1e-13`), and states in
    /// the report which one it used.
    pub fn reference_run(mut self, method: Method, rtol: f64, atol: f64) -> Self {
        self.reference = ReferenceSpec::Run { method, rtol, atol };
        self
    }

    /// Components of the reference smaller than `floor` are measured
    /// absolutely, scaled by `floor` (see [`relative_error`]).
    pub fn error_floor(mut self, floor: f64) -> Self {
        self.floor = Some(floor);
        self
    }

    /// How [`Report::winners`] picks the best run per tolerance.
    pub fn winner_rule(mut self, rule: WinnerRule) -> Self {
        self.rule = rule;
        self
    }

    fn pairs(&self) -> Result<Vec<(f64, f64)>, StudyError> {
        let pairs: Vec<(f64, f64)> = match &self.tolerances {
            None => return Err(StudyError::NoTolerances),
            Some(Tolerances::Relative(r)) => {
                check_positive("atol ratio", self.atol_ratio)?;
                r.iter().map(|&r| (r, r * self.atol_ratio)).collect()
            }
            Some(Tolerances::Pairs(p)) => p.clone(),
        };
        if pairs.is_empty() {
            return Err(StudyError::NoTolerances);
        }
        for &(r, a) in &pairs {
            check_positive("rtol", r)?;
            check_positive("atol", a)?;
        }
        Ok(pairs)
    }

    fn check(&self) -> Result<Vec<(f64, f64)>, StudyError> {
        if self.contenders.is_empty() {
            return Err(StudyError::NoContenders);
        }
        if self.repeats == 0 {
            return Err(StudyError::NoRepeats);
        }
        for (i, c) in self.contenders.iter().enumerate() {
            if self.contenders[..i].iter().any(|d| d.label == c.label) {
                return Err(StudyError::DuplicateLabel(c.label.clone()));
            }
        }
        if let Some(f) = self.floor {
            if !(f >= 0.0 && f.is_finite()) {
                return Err(StudyError::InvalidTolerance {
                    name: "error floor",
                    value: f,
                });
            }
        }
        if let ReferenceSpec::Given { y, .. } = &self.reference {
            if y.len() != self.y0.len() {
                return Err(StudyError::ReferenceLength {
                    expected: self.y0.len(),
                    got: y.len(),
                });
            }
            if let Some(i) = y.iter().position(|v| !v.is_finite()) {
                return Err(StudyError::NonFiniteReference(i));
            }
        }
        self.pairs()
    }

    /// Runs every contender at every tolerance and returns the report.
    ///
    /// Repetitions are interleaved (all runs once, then all again, ...) so
    /// that a change in machine load affects every contender alike.
    pub fn run(self) -> Result<Report, StudyError> {
        let pairs = self.check()?;
        let floor = self
            .floor
            .unwrap_or_else(|| pairs.iter().map(|p| p.1).fold(f64::INFINITY, f64::min));
        let reference = reference::resolve(
            &self.reference,
            &*self.make,
            self.span,
            &self.y0,
            &self.base,
            &pairs,
        );
        let mut jobs = Vec::new();
        for c in &self.contenders {
            for &(rtol, atol) in &pairs {
                let options = match &c.plan {
                    Plan::Method(m) => self.base.clone().method(*m),
                    Plan::Custom(o) => (**o).clone(),
                };
                jobs.push(runner::Job {
                    label: c.label.clone(),
                    rtol,
                    atol,
                    options: options.rtol(rtol).atol(atol),
                });
            }
        }
        let rows = runner::measure_all(
            &*self.make,
            self.span,
            &self.y0,
            &jobs,
            self.repeats,
            reference.y.as_deref(),
            floor,
        );
        Ok(Report {
            model: self.name,
            dim: self.y0.len(),
            span: self.span,
            reference,
            error_floor: floor,
            repeats: self.repeats,
            rule: self.rule,
            rows,
        })
    }
}

fn check_positive(name: &'static str, value: f64) -> Result<(), StudyError> {
    if value > 0.0 && value.is_finite() {
        Ok(())
    } else {
        Err(StudyError::InvalidTolerance { name, value })
    }
}
