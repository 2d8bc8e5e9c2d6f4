//! The registry: every model by name, with its standard data and reference.

use crate::reference::{self, Computed};
use crate::{
    Arenstorf, Brusselator, Flame, Hires, Kepler, LinearSpectrum, Lorenz, Oregonator, Pleiades,
    ProtheroRobinson, Robertson, StiffnessRamp, VanDerPol, VanDerPolMu,
};
use ballast_core::{Jacobian, Structure, System};

/// Whether a problem is stiff on its standard span.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum Character {
    /// An explicit method with error control is the right tool throughout.
    NonStiff,
    /// Stability, not accuracy, limits explicit methods over most of the span.
    Stiff,
    /// Non-stiff in one part of the span and stiff in another.
    Changing,
}

/// A reference solution: the state at the end of the span (and at a few
/// interior times), where it comes from and how far it is trusted.
#[derive(Clone, Debug, PartialEq)]
pub struct Reference {
    /// The time of [`Reference::y`]: the end of the case's span.
    pub t: f64,
    /// The reference state at `t`.
    pub y: Vec<f64>,
    /// Further reference states `(t, y)` inside the span, in increasing `t`.
    pub interior: Vec<(f64, Vec<f64>)>,
    /// Provenance: closed form, or the script and its agreement figures.
    pub source: &'static str,
    /// Significant digits trusted, componentwise relative (see [`Reference::floor`]).
    pub digits: f64,
    /// Components of magnitude below `floor` are measured absolutely
    /// (`|y_i - r_i| / floor`); 0 means purely relative.
    pub floor: f64,
}

impl Reference {
    fn from_computed(c: &Computed) -> Self {
        let last = c.times.len() - 1;
        Self {
            t: c.times[last],
            y: c.states[last].to_vec(),
            interior: c.times[..last]
                .iter()
                .zip(&c.states[..last])
                .map(|(&t, y)| (t, y.to_vec()))
                .collect(),
            source: c.source,
            digits: c.digits,
            floor: c.floor,
        }
    }

    fn closed(
        t: f64,
        interior: &[f64],
        exact: impl Fn(f64) -> Vec<f64>,
        source: &'static str,
        digits: f64,
    ) -> Self {
        Self {
            t,
            y: exact(t),
            interior: interior.iter().map(|&s| (s, exact(s))).collect(),
            source,
            digits,
            floor: 0.0,
        }
    }

    /// `max_i |y_i - r_i| / max(|r_i|, floor)` against the state at `t`
    /// (the measure of the Bari test set when `floor` is 0).
    pub fn relative_error(&self, y: &[f64]) -> f64 {
        relative_error(y, &self.y, self.floor)
    }

    /// Significant correct digits of `y` at `t`: `-log10` of
    /// [`Reference::relative_error`] (infinite when exact).
    pub fn correct_digits(&self, y: &[f64]) -> f64 {
        -self.relative_error(y).log10()
    }

    /// The reference state at time `t`, if `t` is the end or one of the
    /// interior times.
    pub fn at(&self, t: f64) -> Option<&[f64]> {
        if t == self.t {
            return Some(&self.y);
        }
        self.interior
            .iter()
            .find(|(s, _)| *s == t)
            .map(|(_, y)| y.as_slice())
    }
}

pub(crate) fn relative_error(y: &[f64], r: &[f64], floor: f64) -> f64 {
    y.iter()
        .zip(r)
        .map(|(a, b)| (a - b).abs() / b.abs().max(floor).max(f64::MIN_POSITIVE))
        .fold(0.0, f64::max)
}

/// One of the models of this crate, as a single type (enum dispatch, no
/// boxing): it implements [`System`] by delegation.
#[derive(Clone, Debug, PartialEq)]
pub enum Model {
    /// See [`Arenstorf`].
    Arenstorf(Arenstorf),
    /// See [`Pleiades`].
    Pleiades(Pleiades),
    /// See [`Lorenz`].
    Lorenz(Lorenz),
    /// See [`Kepler`].
    Kepler(Kepler),
    /// See [`Robertson`].
    Robertson(Robertson),
    /// See [`Hires`].
    Hires(Hires),
    /// See [`VanDerPol`].
    VanDerPol(VanDerPol),
    /// See [`VanDerPolMu`].
    VanDerPolMu(VanDerPolMu),
    /// See [`Oregonator`].
    Oregonator(Oregonator),
    /// See [`Brusselator`].
    Brusselator(Brusselator),
    /// See [`ProtheroRobinson`].
    ProtheroRobinson(ProtheroRobinson),
    /// See [`LinearSpectrum`].
    LinearSpectrum(LinearSpectrum),
    /// See [`Flame`].
    Flame(Flame),
    /// See [`StiffnessRamp`].
    StiffnessRamp(StiffnessRamp),
}

/// Applies `$body` to the model inside every variant.
macro_rules! dispatch {
    ($self:expr, $m:ident => $body:expr) => {
        match $self {
            Model::Arenstorf($m) => $body,
            Model::Pleiades($m) => $body,
            Model::Lorenz($m) => $body,
            Model::Kepler($m) => $body,
            Model::Robertson($m) => $body,
            Model::Hires($m) => $body,
            Model::VanDerPol($m) => $body,
            Model::VanDerPolMu($m) => $body,
            Model::Oregonator($m) => $body,
            Model::Brusselator($m) => $body,
            Model::ProtheroRobinson($m) => $body,
            Model::LinearSpectrum($m) => $body,
            Model::Flame($m) => $body,
            Model::StiffnessRamp($m) => $body,
        }
    };
}

impl Model {
    /// Dimension of the system.
    pub fn dim(&self) -> usize {
        dispatch!(self, m => m.dim())
    }
}

impl System for Model {
    #[inline]
    fn rhs(&mut self, t: f64, y: &[f64], dydt: &mut [f64]) {
        dispatch!(self, m => m.rhs(t, y, dydt))
    }

    fn jacobian(&mut self, t: f64, y: &[f64], jac: &mut Jacobian) -> bool {
        dispatch!(self, m => m.jacobian(t, y, jac))
    }

    fn structure(&self) -> Structure {
        dispatch!(self, m => m.structure())
    }
}

/// A test problem ready to run: the system, its standard span and initial
/// value, and a reference solution.
#[derive(Clone, Debug)]
pub struct Case {
    /// Registry name, e.g. `"robertson-long"`.
    pub name: &'static str,
    /// One line: what the problem is and where it is published.
    pub description: &'static str,
    /// The right-hand side with its Jacobian.
    pub system: Model,
    /// The standard time span `(t0, t1)`.
    pub span: (f64, f64),
    /// The initial value at `span.0`.
    pub y0: Vec<f64>,
    /// The reference solution at `span.1` (and at interior times).
    pub reference: Reference,
    /// Non-stiff, stiff or changing on the span.
    pub character: Character,
}

impl Case {
    /// Dimension of the system.
    pub fn dim(&self) -> usize {
        self.y0.len()
    }

    /// True for [`Character::Stiff`] and [`Character::Changing`].
    pub fn is_stiff(&self) -> bool {
        self.character != Character::NonStiff
    }
}

const NAMES: &[&str] = &[
    "arenstorf",
    "pleiades",
    "lorenz",
    "kepler",
    "robertson",
    "robertson-long",
    "hires",
    "vanderpol",
    "vanderpol-mu1000",
    "oregonator",
    "brusselator",
    "brusselator-500",
    "prothero-robinson",
    "linear-real",
    "linear-complex",
    "flame",
    "stiffness-ramp",
];

/// The names of every registered case, non-stiff first.
pub fn names() -> &'static [&'static str] {
    NAMES
}

/// Every registered case, in the order of [`names`].
pub fn all() -> Vec<Case> {
    NAMES.iter().filter_map(|n| get(n)).collect()
}

fn computed(
    name: &'static str,
    description: &'static str,
    system: Model,
    y0: Vec<f64>,
    data: &Computed,
    character: Character,
) -> Case {
    Case {
        name,
        description,
        system,
        span: (0.0, data.times[data.times.len() - 1]),
        y0,
        reference: Reference::from_computed(data),
        character,
    }
}

/// The real-spectrum linear case: eigenvalues `-0.5, -2, -100, -1e4`.
pub(crate) fn linear_real() -> LinearSpectrum {
    LinearSpectrum::new(&[-0.5, -2.0, -100.0, -10000.0], &[])
}

/// The complex-pair linear case: eigenvalues `-0.5, -2, -100 ± 1000 i`.
pub(crate) fn linear_complex() -> LinearSpectrum {
    LinearSpectrum::new(&[-0.5, -2.0], &[(-100.0, 1000.0)])
}

/// The case registered under `name`, or `None`.
pub fn get(name: &str) -> Option<Case> {
    use Character::*;
    let case = match name {
        "arenstorf" => computed(
            "arenstorf",
            "Arenstorf orbit, restricted three-body problem, one period (HNW I, II.0)",
            Model::Arenstorf(Arenstorf),
            Arenstorf.initial_value(),
            &reference::ARENSTORF,
            NonStiff,
        ),
        "pleiades" => computed(
            "pleiades",
            "Pleiades, 7 bodies in the plane, 28 equations, [0, 3] (HNW I, II.10; Bari test set)",
            Model::Pleiades(Pleiades),
            Pleiades.initial_value(),
            &reference::PLEIADES,
            NonStiff,
        ),
        "lorenz" => computed(
            "lorenz",
            "Lorenz equations, sigma 10, r 28, b 8/3, y0 (-8, 8, 27), [0, 16] (HNW I)",
            Model::Lorenz(Lorenz::default()),
            Lorenz::default().initial_value(),
            &reference::LORENZ,
            NonStiff,
        ),
        "kepler" => {
            let k = Kepler::new(0.5);
            let exact = k.clone();
            Case {
                name: "kepler",
                description: "Kepler two-body orbit, eccentricity 0.5, [0, 20] (about 3.2 periods)",
                y0: k.initial_value(),
                system: Model::Kepler(k),
                span: (0.0, 20.0),
                reference: Reference::closed(
                    20.0,
                    &[5.0, 10.0, 15.0],
                    move |t| exact.exact(t),
                    "closed form through Kepler's equation (Newton in f64), checked against mpmath in tools/reference/models.py",
                    14.0,
                ),
                character: NonStiff,
            }
        }
        "robertson" => computed(
            "robertson",
            "Robertson chemical kinetics, [0, 40] (HNW II, IV.1)",
            Model::Robertson(Robertson::default()),
            Robertson::default().initial_value(),
            &reference::ROBERTSON,
            Stiff,
        ),
        "robertson-long" => computed(
            "robertson-long",
            "Robertson chemical kinetics, [0, 1e11] (Bari test set)",
            Model::Robertson(Robertson::default()),
            Robertson::default().initial_value(),
            &reference::ROBERTSON_LONG,
            Stiff,
        ),
        "hires" => computed(
            "hires",
            "HIRES, plant physiology, 8 equations, [0, 321.8122] (Bari test set; HNW II, IV.10)",
            Model::Hires(Hires),
            Hires.initial_value(),
            &reference::HIRES,
            Stiff,
        ),
        "vanderpol" => computed(
            "vanderpol",
            "Van der Pol, eps = 1e-6, y0 (2, 0), [0, 2] (Bari test set; HNW II, IV.1)",
            Model::VanDerPol(VanDerPol::new(1e-6)),
            VanDerPol::new(1e-6).initial_value(),
            &reference::VANDERPOL,
            Stiff,
        ),
        "vanderpol-mu1000" => computed(
            "vanderpol-mu1000",
            "Van der Pol, mu = 1000, y0 (2, 0), [0, 3000] (HNW II, IV.1)",
            Model::VanDerPolMu(VanDerPolMu::new(1000.0)),
            VanDerPolMu::new(1000.0).initial_value(),
            &reference::VANDERPOL_MU1000,
            Stiff,
        ),
        "oregonator" => computed(
            "oregonator",
            "Oregonator, Belousov-Zhabotinskii reaction, [0, 360] (HNW II, IV.10)",
            Model::Oregonator(Oregonator),
            Oregonator.initial_value(),
            &reference::OREGONATOR,
            Stiff,
        ),
        "brusselator" => computed(
            "brusselator",
            "1D Brusselator by the method of lines, N = 40 (80 equations, banded), [0, 10] (HNW II, IV.1)",
            Model::Brusselator(Brusselator::new(40)),
            Brusselator::new(40).initial_value(),
            &reference::BRUSSELATOR,
            Stiff,
        ),
        "brusselator-500" => computed(
            "brusselator-500",
            "1D Brusselator by the method of lines, N = 500 (1000 equations, banded), [0, 10] (HNW II, IV.1)",
            Model::Brusselator(Brusselator::new(500)),
            Brusselator::new(500).initial_value(),
            &reference::BRUSSELATOR_500,
            Stiff,
        ),
        "prothero-robinson" => {
            let p = ProtheroRobinson::new(-1e6);
            let exact = p.clone();
            Case {
                name: "prothero-robinson",
                description: "Prothero-Robinson y' = lambda (y - sin t) + cos t, lambda = -1e6, [0, 10]",
                y0: p.initial_value(),
                system: Model::ProtheroRobinson(p),
                span: (0.0, 10.0),
                reference: Reference::closed(
                    10.0,
                    &[1.0, 5.0],
                    move |t| exact.exact(t),
                    "closed form y = sin t",
                    15.0,
                ),
                character: Stiff,
            }
        }
        "linear-real" | "linear-complex" => {
            let (name, description, lin) = if name == "linear-real" {
                (
                    "linear-real",
                    "y' = A y, A = Q B Q with eigenvalues -0.5, -2, -100, -1e4, [0, 10]",
                    linear_real(),
                )
            } else {
                (
                    "linear-complex",
                    "y' = A y, A = Q B Q with eigenvalues -0.5, -2, -100 +- 1000i, [0, 10]",
                    linear_complex(),
                )
            };
            let exact = lin.clone();
            Case {
                name,
                description,
                y0: lin.initial_value(),
                system: Model::LinearSpectrum(lin),
                span: (0.0, 10.0),
                reference: Reference::closed(
                    10.0,
                    &[0.01, 1.0],
                    move |t| exact.exact(t),
                    "closed form Q exp(B t) Q y0 from the eigen-decomposition, checked against mpmath expm in tools/reference/models.py",
                    14.0,
                ),
                character: Stiff,
            }
        }
        "flame" => {
            let f = Flame::new(1e-4);
            let exact = f.clone();
            Case {
                name: "flame",
                description: "Flame propagation y' = y^2 - y^3, delta = 1e-4, [0, 2/delta] (O'Malley 1991)",
                y0: f.initial_value(),
                span: f.span(),
                system: Model::Flame(f),
                reference: Reference::closed(
                    2e4,
                    &[5e3, 1e4, 1.01e4, 1.1e4],
                    move |t| exact.exact(t),
                    "closed form 1/(W0(a e^(a-t)) + 1), a = 1/delta - 1, via the Wright omega function in f64; checked against mpmath in tools/reference/models.py",
                    12.0,
                ),
                character: Changing,
            }
        }
        "stiffness-ramp" => {
            let r = StiffnessRamp::new(1e6, 10.0);
            let exact = r.clone();
            Case {
                name: "stiffness-ramp",
                description: "y' = lambda(t) (y - cos t) - sin t, lambda from -1 to -1e6 over [0, 10]",
                y0: r.initial_value(),
                system: Model::StiffnessRamp(r),
                span: (0.0, 10.0),
                reference: Reference::closed(
                    10.0,
                    &[2.0, 5.0, 8.0],
                    move |t| exact.exact(t),
                    "closed form y = cos t",
                    15.0,
                ),
                character: Changing,
            }
        }
        _ => return None,
    };
    Some(case)
}
