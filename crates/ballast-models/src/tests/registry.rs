use crate::{all, get, names, Character};
use ballast_core::System;

#[test]
fn every_name_resolves_and_is_consistent() {
    let mut seen = std::collections::HashSet::new();
    for &name in names() {
        assert!(seen.insert(name), "duplicate name {name}");
        let case = get(name).unwrap_or_else(|| panic!("{name} not found"));
        assert_eq!(case.name, name);
        assert!(!case.description.is_empty());
        let n = case.system.dim();
        assert_eq!(case.y0.len(), n, "{name}: y0 length");
        assert_eq!(case.dim(), n);
        assert_eq!(case.reference.y.len(), n, "{name}: reference length");
        assert_eq!(
            case.reference.t, case.span.1,
            "{name}: reference at the end of the span"
        );
        assert!(case.span.0 < case.span.1);
        let mut last = case.span.0;
        for (t, y) in &case.reference.interior {
            assert!(*t > last && *t < case.span.1, "{name}: interior time {t}");
            assert_eq!(y.len(), n);
            assert_eq!(case.reference.at(*t), Some(y.as_slice()));
            last = *t;
        }
        assert!(
            case.reference.digits >= 9.0,
            "{name}: {} digits",
            case.reference.digits
        );
        assert!(case.reference.source.len() > 10);
        assert!(case
            .y0
            .iter()
            .chain(&case.reference.y)
            .all(|v| v.is_finite()));
        // The reference is exact against itself, and the error measure sees a change.
        assert_eq!(case.reference.relative_error(&case.reference.y), 0.0);
        let mut off = case.reference.y.clone();
        off[0] += 1e-6 * off[0].abs().max(1.0);
        assert!(case.reference.correct_digits(&off) < 7.0);
        // The system evaluates to finite values at the start.
        let mut sys = case.system.clone();
        let mut dy = vec![0.0; n];
        sys.rhs(case.span.0, &case.y0, &mut dy);
        assert!(dy.iter().all(|v| v.is_finite()), "{name}: rhs at y0");
    }
    assert_eq!(all().len(), names().len());
    assert!(get("no-such-model").is_none());
}

#[test]
fn characters_are_as_documented() {
    let ch = |n: &str| get(n).unwrap().character;
    for n in ["arenstorf", "pleiades", "lorenz", "kepler"] {
        assert_eq!(ch(n), Character::NonStiff, "{n}");
        assert!(!get(n).unwrap().is_stiff());
    }
    for n in ["flame", "stiffness-ramp"] {
        assert_eq!(ch(n), Character::Changing, "{n}");
    }
    for n in [
        "robertson",
        "hires",
        "vanderpol",
        "brusselator-500",
        "linear-complex",
    ] {
        assert_eq!(ch(n), Character::Stiff, "{n}");
    }
}

#[test]
fn brusselator_is_banded_and_others_dense() {
    use ballast_core::Structure;
    for case in all() {
        let s = case.system.structure();
        if case.name.starts_with("brusselator") {
            assert_eq!(s, Structure::Banded { lower: 2, upper: 2 });
        } else {
            assert_eq!(s, Structure::Dense, "{}", case.name);
        }
    }
    assert_eq!(get("brusselator-500").unwrap().dim(), 1000);
    assert_eq!(get("pleiades").unwrap().dim(), 28);
}
