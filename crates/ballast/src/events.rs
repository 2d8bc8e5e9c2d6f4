//! Events: sign changes of user functions `g(t, y)`, located inside a step.
//!
//! After each accepted step the controller's dense output gives `y(t)` on
//! the step; an event whose `g` changed sign over the step (in the wanted
//! direction) is located by the Illinois variant of regula falsi (a
//! bracketing method with superlinear convergence; Dowell and Jarratt,
//! BIT 11 (1971) 168–174), safeguarded by bisection, to the event's time
//! tolerance. Several events in one step are reported in time order (ties
//! in the order the events were added); a terminal one ends the run there.
//!
//! What counts as a sign change: `g` goes from `< 0` to `>= 0` (rising) or
//! from `> 0` to `<= 0` (falling) between the two ends of a step, in the
//! direction of integration. So a zero of `g` at the very start of a run is
//! not an event (restarting from a terminal event does not fire it again),
//! and two zeros of the same `g` inside one step cancel out: keep
//! `max_step` below the shortest interval between two zeros you need.

/// Which sign changes count (in the direction of integration).
#[derive(Clone, Copy, Debug, PartialEq, Eq, Default)]
pub enum Direction {
    /// From negative to positive.
    Rising,
    /// From positive to negative.
    Falling,
    /// Either way.
    #[default]
    Either,
}

/// A boxed event function `g(t, y)`.
type EventFn<'g> = Box<dyn FnMut(f64, &[f64]) -> f64 + 'g>;

/// An event function with its settings. The function may borrow from the
/// caller for the lifetime `'g`.
///
/// ```
/// use ballast::{Direction, Event};
/// // y[0] crosses zero going down; stop the run there.
/// let ground = Event::new(|_t: f64, y: &[f64]| y[0]).direction(Direction::Falling).terminal();
/// assert!(ground.is_terminal());
/// ```
pub struct Event<'g> {
    pub(crate) g: EventFn<'g>,
    pub(crate) direction: Direction,
    pub(crate) terminal: bool,
    pub(crate) t_tol: f64,
}

impl std::fmt::Debug for Event<'_> {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.debug_struct("Event")
            .field("direction", &self.direction)
            .field("terminal", &self.terminal)
            .field("t_tol", &self.t_tol)
            .finish()
    }
}

impl<'g> Event<'g> {
    /// An event at the zeros of `g(t, y)`, either direction, not terminal.
    pub fn new(g: impl FnMut(f64, &[f64]) -> f64 + 'g) -> Self {
        Self {
            g: Box::new(g),
            direction: Direction::Either,
            terminal: false,
            t_tol: 0.0,
        }
    }

    /// Only sign changes in this direction count.
    pub fn direction(mut self, direction: Direction) -> Self {
        self.direction = direction;
        self
    }

    /// Ends the run at the first occurrence.
    pub fn terminal(mut self) -> Self {
        self.terminal = true;
        self
    }

    /// Absolute tolerance on the event time (default 0: a few ulps of `t`,
    /// the best the dense output can resolve). Must be finite and `>= 0`;
    /// the run rejects anything else before it starts.
    pub fn time_tolerance(mut self, tol: f64) -> Self {
        self.t_tol = tol;
        self
    }

    /// Whether the event ends the run.
    pub fn is_terminal(&self) -> bool {
        self.terminal
    }

    /// The tolerance on the event time given with [`Event::time_tolerance`].
    pub fn get_time_tolerance(&self) -> f64 {
        self.t_tol
    }

    fn counts(&self, before: f64, after: f64) -> bool {
        let rising = before < 0.0 && after >= 0.0;
        let falling = before > 0.0 && after <= 0.0;
        match self.direction {
            Direction::Rising => rising,
            Direction::Falling => falling,
            Direction::Either => rising || falling,
        }
    }
}

/// One event found during a run.
#[derive(Clone, Debug, PartialEq)]
pub struct EventRecord {
    /// Index of the event in the order the events were added.
    pub index: usize,
    /// Time of the sign change.
    pub t: f64,
    /// State at that time (dense output).
    pub y: Vec<f64>,
    /// Whether `g` went from negative to positive.
    pub rising: bool,
    /// Whether this event ended the run.
    pub terminal: bool,
}

/// An event function returned NaN or infinity.
#[derive(Clone, Copy, Debug, PartialEq)]
pub(crate) struct NonFiniteEvent {
    /// Which event.
    pub index: usize,
    /// Where.
    pub t: f64,
}

/// Tracks the event functions' values along the run.
pub(crate) struct EventTracker<'g> {
    events: Vec<Event<'g>>,
    g_prev: Vec<f64>,
    y_buf: Vec<f64>,
    found: Vec<(f64, usize, bool)>,
}

impl<'g> EventTracker<'g> {
    pub(crate) fn new(events: Vec<Event<'g>>, n: usize) -> Self {
        let k = events.len();
        Self {
            events,
            g_prev: vec![0.0; k],
            y_buf: vec![0.0; n],
            found: Vec::with_capacity(k),
        }
    }

    pub(crate) fn is_empty(&self) -> bool {
        self.events.is_empty()
    }

    /// Evaluates every `g` at the initial state.
    pub(crate) fn start(&mut self, t: f64, y: &[f64]) -> Result<(), NonFiniteEvent> {
        for (index, (e, g)) in self
            .events
            .iter_mut()
            .zip(self.g_prev.iter_mut())
            .enumerate()
        {
            *g = (e.g)(t, y);
            if !g.is_finite() {
                return Err(NonFiniteEvent { index, t });
            }
        }
        Ok(())
    }

    /// Looks for sign changes over the step `[t0, t1]` whose dense output
    /// `interp(t, out)` gives, with `y1` the state at `t1`. Appends the
    /// events found to `out` in time order, up to and including the first
    /// terminal one, and returns the time of that terminal event.
    pub(crate) fn scan(
        &mut self,
        t0: f64,
        t1: f64,
        y1: &[f64],
        mut interp: impl FnMut(f64, &mut [f64]),
        out: &mut Vec<EventRecord>,
    ) -> Result<Option<f64>, NonFiniteEvent> {
        self.found.clear();
        for i in 0..self.events.len() {
            let g1 = (self.events[i].g)(t1, y1);
            if !g1.is_finite() {
                return Err(NonFiniteEvent { index: i, t: t1 });
            }
            let g0 = self.g_prev[i];
            self.g_prev[i] = g1;
            if !self.events[i].counts(g0, g1) {
                continue;
            }
            let tol = self.events[i]
                .t_tol
                .max(4.0 * f64::EPSILON * t0.abs().max(t1.abs()));
            let ev = &mut self.events[i];
            let y_buf = &mut self.y_buf;
            let mut bad = None;
            let mut g_at = |t: f64| {
                interp(t, y_buf);
                let v = (ev.g)(t, y_buf);
                if !v.is_finite() && bad.is_none() {
                    bad = Some(t);
                }
                v
            };
            let (t_root, _) = illinois(&mut g_at, t0, t1, g0, g1, tol);
            if let Some(t) = bad {
                return Err(NonFiniteEvent { index: i, t });
            }
            self.found.push((t_root, i, g0 < 0.0));
        }
        let forward = t1 >= t0;
        // Stable sort: ties keep the order the events were added in.
        self.found.sort_by(|a, b| {
            if forward {
                a.0.total_cmp(&b.0)
            } else {
                b.0.total_cmp(&a.0)
            }
        });
        for &(t, index, rising) in &self.found {
            let terminal = self.events[index].terminal;
            let mut y = vec![0.0; y1.len()];
            if t == t1 {
                y.copy_from_slice(y1);
            } else {
                interp(t, &mut y);
            }
            out.push(EventRecord {
                index,
                t,
                y,
                rising,
                terminal,
            });
            if terminal {
                return Ok(Some(t));
            }
        }
        Ok(None)
    }
}

/// The Illinois method on `[a, b]` with `g(a) = ga`, `g(b) = gb` of opposite
/// signs (or `gb = 0`): regula falsi that halves the retained end's value
/// when the same end is kept twice, with a bisection step whenever two
/// iterations failed to halve the bracket (so a discontinuous or very flat
/// `g` still converges linearly). Stops when the bracket is at most `tol`
/// wide. Returns the end of the final bracket on the far side of the sign
/// change (so the event is never reported early: `g` there already has its
/// new sign, or is zero) and the number of `g` evaluations.
pub(crate) fn illinois(
    g: &mut impl FnMut(f64) -> f64,
    mut a: f64,
    mut b: f64,
    mut ga: f64,
    mut gb: f64,
    tol: f64,
) -> (f64, usize) {
    if gb == 0.0 {
        return (b, 0);
    }
    let mut side = 0i8;
    let mut evals = 0usize;
    let mut widths = [f64::INFINITY; 2];
    while evals < 200 && (b - a).abs() > tol {
        let width = (b - a).abs();
        let stalled = width > 0.5 * widths[0];
        let mut c = b - gb * (b - a) / (gb - ga);
        if stalled || !c.is_finite() || (c - a) * (c - b) >= 0.0 {
            c = a + 0.5 * (b - a);
            side = 0;
        }
        if c == a || c == b {
            // No representable point strictly inside: the bracket is tight.
            break;
        }
        widths = [widths[1], width];
        let gc = g(c);
        evals += 1;
        if gc == 0.0 {
            return (c, evals);
        }
        if gc.is_nan() {
            break;
        }
        if (gc < 0.0) == (gb < 0.0) {
            b = c;
            gb = gc;
            if side == -1 {
                ga *= 0.5;
            }
            side = -1;
        } else {
            a = c;
            ga = gc;
            if side == 1 {
                gb *= 0.5;
            }
            side = 1;
        }
    }
    (b, evals)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn illinois_finds_cosine_zero() {
        // Closed form: cos has its first zero at pi/2.
        let mut g = |t: f64| t.cos();
        let (r, evals) = illinois(&mut g, 1.0, 2.0, 1f64.cos(), 2f64.cos(), 1e-14);
        assert!((r - std::f64::consts::FRAC_PI_2).abs() < 1e-13);
        // Superlinear: far fewer evaluations than bisection's 47.
        assert!(evals <= 12, "{evals} evaluations");
    }

    #[test]
    fn illinois_returns_the_far_side_of_the_root() {
        // Closed form root t = 0.3; g rises through it, so g(result) >= 0.
        let mut g = |t: f64| t - 0.3;
        let (r, _) = illinois(&mut g, 0.0, 1.0, -0.3, 0.7, 1e-12);
        assert!(r >= 0.3 && r - 0.3 <= 1e-12);
        // Backwards bracket [1, 0] with g falling in the direction of travel.
        let mut h = |t: f64| t - 0.3;
        let (r, _) = illinois(&mut h, 1.0, 0.0, 0.7, -0.3, 1e-12);
        assert!(r <= 0.3 && 0.3 - r <= 1e-12);
    }

    #[test]
    fn illinois_converges_on_a_jump_and_a_flat_root() {
        // A jump at t = 0.5 (no root, only a sign change) and a triple root
        // at 0.3 (g' = 0 there): the bisection safeguard halves the bracket
        // at least every two or three evaluations, so the work stays within
        // a small multiple of bisection's log2(1 / 1e-12) = 40 evaluations.
        let mut jump = |t: f64| if t < 0.5 { -1.0 } else { 1.0 };
        let (r, evals) = illinois(&mut jump, 0.0, 1.0, -1.0, 1.0, 1e-12);
        assert!(
            (r - 0.5).abs() <= 1e-12 && evals <= 100,
            "{r} after {evals}"
        );
        let mut flat = |t: f64| (t - 0.3f64).powi(3);
        let (r, evals) = illinois(&mut flat, 0.0, 1.0, -0.027, 0.343, 1e-12);
        assert!(
            (r - 0.3).abs() <= 1e-12 && evals <= 100,
            "{r} after {evals}"
        );
    }

    #[test]
    fn zero_at_the_end_is_the_root() {
        let mut calls = 0;
        let mut g = |t: f64| {
            calls += 1;
            t - 1.0
        };
        assert_eq!(illinois(&mut g, 0.0, 1.0, -1.0, 0.0, 1e-12), (1.0, 0));
        assert_eq!(calls, 0);
    }

    #[test]
    fn sign_change_rules() {
        let e = Event::new(|_t: f64, y: &[f64]| y[0]);
        assert!(e.counts(-1.0, 1.0) && e.counts(1.0, -1.0));
        assert!(e.counts(-1.0, 0.0) && e.counts(1.0, 0.0));
        assert!(!e.counts(0.0, 1.0) && !e.counts(0.0, -1.0) && !e.counts(1.0, 2.0));
        let up = Event::new(|_t: f64, y: &[f64]| y[0]).direction(Direction::Rising);
        assert!(up.counts(-1.0, 1.0) && !up.counts(1.0, -1.0));
        let down = Event::new(|_t: f64, y: &[f64]| y[0]).direction(Direction::Falling);
        assert!(!down.counts(-1.0, 1.0) && down.counts(1.0, -1.0));
    }
}
