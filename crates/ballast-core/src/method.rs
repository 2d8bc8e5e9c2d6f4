//! The names of the methods, and what is known of each before a run.

use std::fmt;

/// Which pair of schemes the switching controller alternates between.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, Default)]
pub enum SwitchPair {
    /// Dormand–Prince 5(4) (explicit) with Radau IIA of order 5 (implicit).
    #[default]
    DormandPrinceRadau,
    /// Adams predictor–corrector (explicit) with BDF (implicit).
    AdamsBdf,
}

/// An integration method. Published methods keep their usual names.
///
/// `Method::default()` is the switching controller with its default pair.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
#[non_exhaustive]
pub enum Method {
    /// Forward Euler, order 1, fixed step only.
    ForwardEuler,
    /// Heun's method (explicit trapezoid), order 2, fixed step only.
    Heun,
    /// The classical fourth-order Runge–Kutta method, fixed step only.
    Rk4,
    /// Bogacki–Shampine 3(2), FSAL (Bogacki and Shampine 1989).
    BogackiShampine32,
    /// Dormand–Prince 5(4), FSAL (Dormand and Prince 1980).
    DormandPrince54,
    /// Tsitouras 5(4), FSAL (Tsitouras 2011).
    Tsitouras54,
    /// Dormand–Prince 8(5,3) (Prince and Dormand 1981; Hairer, Norsett and Wanner I, II.10).
    DormandPrince853,
    /// Backward Euler, order 1, L-stable.
    BackwardEuler,
    /// The trapezoidal rule, order 2, A-stable, not L-stable.
    Trapezoid,
    /// TR-BDF2, order 2, L-stable (Bank et al. 1985; Hosea and Shampine 1996).
    TrBdf2,
    /// An L-stable ESDIRK 4(3) pair (Kennedy and Carpenter 2016).
    Esdirk43,
    /// Radau IIA, 3 stages, order 5, L-stable (Hairer and Wanner II, IV.8).
    RadauIIA5,
    /// ROS3P, a third-order Rosenbrock method, A-stable (Lang and Verwer
    /// 2001). Its error estimate vanishes on linear problems; prefer
    /// [`Method::Rosenbrock32`] unless order 3 on parabolic problems matters.
    Ros3p,
    /// A four-stage Rosenbrock method of order 3(2), L-stable and stiffly
    /// accurate (Sandu et al. 1997, who call it RODAS3).
    Rosenbrock32,
    /// Variable-order, variable-step Adams predictor–corrector (orders 1–12).
    Adams,
    /// Variable-order, variable-step BDF (orders 1–5).
    Bdf,
    /// Run-time switching between an explicit and an implicit scheme.
    Switching(SwitchPair),
}

impl Default for Method {
    fn default() -> Self {
        Method::Switching(SwitchPair::default())
    }
}

impl Method {
    /// Every single (non-switching) method, in a stable order: the one-step
    /// methods first, the two multistep families (Adams, BDF) last.
    pub const SINGLE: [Method; 16] = [
        Method::ForwardEuler,
        Method::Heun,
        Method::Rk4,
        Method::BogackiShampine32,
        Method::DormandPrince54,
        Method::Tsitouras54,
        Method::DormandPrince853,
        Method::BackwardEuler,
        Method::Trapezoid,
        Method::TrBdf2,
        Method::Esdirk43,
        Method::RadauIIA5,
        Method::Ros3p,
        Method::Rosenbrock32,
        Method::Adams,
        Method::Bdf,
    ];

    /// A short human-readable name.
    pub fn name(self) -> &'static str {
        match self {
            Method::ForwardEuler => "forward Euler",
            Method::Heun => "Heun",
            Method::Rk4 => "RK4",
            Method::BogackiShampine32 => "Bogacki-Shampine 3(2)",
            Method::DormandPrince54 => "Dormand-Prince 5(4)",
            Method::Tsitouras54 => "Tsitouras 5(4)",
            Method::DormandPrince853 => "Dormand-Prince 8(5,3)",
            Method::BackwardEuler => "backward Euler",
            Method::Trapezoid => "trapezoid",
            Method::TrBdf2 => "TR-BDF2",
            Method::Esdirk43 => "ESDIRK 4(3)",
            Method::RadauIIA5 => "Radau IIA 5",
            Method::Ros3p => "ROS3P",
            Method::Rosenbrock32 => "Rosenbrock 3(2)",
            Method::Adams => "Adams",
            Method::Bdf => "BDF",
            Method::Switching(SwitchPair::DormandPrinceRadau) => "switching DP5/Radau IIA",
            Method::Switching(SwitchPair::AdamsBdf) => "switching Adams/BDF",
        }
    }

    /// Whether the method is explicit (no linear systems to solve).
    pub fn is_explicit(self) -> bool {
        matches!(
            self,
            Method::ForwardEuler
                | Method::Heun
                | Method::Rk4
                | Method::BogackiShampine32
                | Method::DormandPrince54
                | Method::Tsitouras54
                | Method::DormandPrince853
                | Method::Adams
        )
    }

    /// Whether the method has no error estimate and must be run with a fixed step.
    pub fn needs_fixed_step(self) -> bool {
        matches!(self, Method::ForwardEuler | Method::Heun | Method::Rk4)
    }

    /// The classical order of the propagated solution (the maximum order
    /// for variable-order methods; `None` for switching).
    pub fn order(self) -> Option<usize> {
        Some(match self {
            Method::ForwardEuler | Method::BackwardEuler => 1,
            Method::Heun | Method::Trapezoid | Method::TrBdf2 => 2,
            Method::BogackiShampine32 | Method::Ros3p | Method::Rosenbrock32 => 3,
            Method::Rk4 | Method::Esdirk43 => 4,
            Method::DormandPrince54 | Method::Tsitouras54 | Method::RadauIIA5 => 5,
            Method::DormandPrince853 => 8,
            Method::Adams => 12,
            Method::Bdf => 5,
            Method::Switching(_) => return None,
        })
    }
}

impl fmt::Display for Method {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.name())
    }
}
