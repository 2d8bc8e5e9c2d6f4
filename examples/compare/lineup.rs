//! Which methods are worth comparing on a model of a given character.
//!
//! Shared by the `compare` example and the `models` bench (which includes
//! this file by path), so both measure the same contenders with the same
//! settings.

use ballast::{Method, Options, Structure, SwitchPair, System};
use ballast_models::{Case, Character};

/// Step budget of every run: enough for any sensible method on these
/// models at `rtol >= 1e-10`, small enough that an explicit method held by
/// its stability limit on a stiff model fails in seconds, not hours.
pub const STEP_BUDGET: usize = 200_000;

/// A contender: its label and its options (tolerances are set per run).
pub struct Entry {
    /// Label in tables, pictures and bench names.
    pub label: String,
    /// Method and settings.
    pub options: Options,
}

fn entry(method: Method) -> Entry {
    Entry {
        label: method.name().to_string(),
        options: Options::default().method(method).max_steps(STEP_BUDGET),
    }
}

const SWITCHING_DEFAULT: Method = Method::Switching(SwitchPair::DormandPrinceRadau);
const SWITCHING_MULTISTEP: Method = Method::Switching(SwitchPair::AdamsBdf);

/// Every method worth a look for `character`, the switching pairs last.
/// Stiff models keep Dormand–Prince 5(4) as the explicit point of comparison.
pub fn full(character: Character) -> Vec<Method> {
    use Method::*;
    let mut m = match character {
        Character::NonStiff => vec![
            BogackiShampine32,
            DormandPrince54,
            Tsitouras54,
            DormandPrince853,
            Adams,
        ],
        Character::Stiff => vec![
            DormandPrince54,
            Ros3p,
            Rosenbrock32,
            TrBdf2,
            Esdirk43,
            RadauIIA5,
            Bdf,
        ],
        Character::Changing => vec![
            DormandPrince54,
            Tsitouras54,
            Adams,
            Esdirk43,
            RadauIIA5,
            Bdf,
        ],
    };
    m.extend([SWITCHING_DEFAULT, SWITCHING_MULTISTEP]);
    m
}

/// A shorter list for the benches: the two or three leading single
/// methods of the character and the switching default.
pub fn short(character: Character) -> Vec<Method> {
    use Method::*;
    let mut m = match character {
        Character::NonStiff => vec![DormandPrince54, Tsitouras54, DormandPrince853],
        Character::Stiff => vec![RadauIIA5, Esdirk43, Bdf],
        // Explicit methods run out of steps where these models turn stiff.
        Character::Changing => vec![RadauIIA5, Esdirk43, Bdf],
    };
    m.push(SWITCHING_DEFAULT);
    m
}

/// Label suffix of the dense-Jacobian variants.
pub const DENSE_SUFFIX: &str = " (dense J)";

/// The contenders for `case`: `methods`, plus, when the model declares a
/// banded or sparse Jacobian, Radau IIA 5 and the switching default with the
/// structure overridden to dense (labels end in [`DENSE_SUFFIX`]).
pub fn entries(case: &Case, methods: &[Method]) -> Vec<Entry> {
    let mut out: Vec<Entry> = methods.iter().map(|&m| entry(m)).collect();
    if case.system.structure() != Structure::Dense {
        for m in [Method::RadauIIA5, SWITCHING_DEFAULT] {
            let mut e = entry(m);
            e.label.push_str(DENSE_SUFFIX);
            e.options = e.options.jacobian_structure(Structure::Dense);
            out.push(e);
        }
    }
    out
}
