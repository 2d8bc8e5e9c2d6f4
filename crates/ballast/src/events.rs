//! Events: sign changes of user functions `g(t, y)`, located inside a step.
//!
//! After each accepted step the controller's dense output gives `y(t)` on
//! the step; an event whose `g` changed sign over the step (in the wanted
//! direction) is located by the Illinois variant of regula falsi (a
//! bracketing method with superlinear convergence; Dowell and Jarratt,
//! BIT 11 (1971)) to the event's time tolerance. Several events in one
//! step are reported in time order; a terminal one ends the run there.

/// Which sign changes count.
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

/// An event function with its settings.
///
/// ```
/// use ballast::{Direction, Event};
/// // y[0] crosses zero going down; stop the run there.
/// let ground = Event::new(|_t: f64, y: &[f64]| y[0]).direction(Direction::Falling).terminal();
/// assert!(ground.is_terminal());
/// ```
pub struct Event {
    pub(crate) g: Box<dyn FnMut(f64, &[f64]) -> f64>,
    pub(crate) direction: Direction,
    pub(crate) terminal: bool,
    pub(crate) t_tol: f64,
}

impl std::fmt::Debug for Event {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.debug_struct("Event")
            .field("direction", &self.direction)
            .field("terminal", &self.terminal)
            .field("t_tol", &self.t_tol)
            .finish()
    }
}

impl Event {
    /// An event at the zeros of `g(t, y)`, either direction, not terminal.
    pub fn new(g: impl FnMut(f64, &[f64]) -> f64 + 'static) -> Self {
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

    /// Absolute tolerance on the event time (default: a few ulps of `t`).
    pub fn time_tolerance(mut self, tol: f64) -> Self {
        self.t_tol = tol;
        self
    }

    /// Whether the event ends the run.
    pub fn is_terminal(&self) -> bool {
        self.terminal
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

/// Tracks the event functions' values along the run.
pub(crate) struct EventTracker {
    events: Vec<Event>,
    g_prev: Vec<f64>,
    y_buf: Vec<f64>,
    found: Vec<(f64, usize, bool)>,
}

impl EventTracker {
    pub(crate) fn new(events: Vec<Event>, n: usize) -> Self {
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
    pub(crate) fn start(&mut self, t: f64, y: &[f64]) {
        for (e, g) in self.events.iter_mut().zip(self.g_prev.iter_mut()) {
            *g = (e.g)(t, y);
        }
    }

    /// Looks for sign changes over the step `[t0, t1]` whose dense output
    /// `interp(t, out)` gives; returns the events in time order (up to and
    /// including the first terminal one).
    pub(crate) fn scan(
        &mut self,
        t0: f64,
        t1: f64,
        y1: &[f64],
        mut interp: impl FnMut(f64, &mut [f64]),
        out: &mut Vec<EventRecord>,
    ) -> Option<f64> {
        self.found.clear();
        for i in 0..self.events.len() {
            let g1 = (self.events[i].g)(t1, y1);
            let g0 = self.g_prev[i];
            if g0.is_finite() && g1.is_finite() && self.events[i].counts(g0, g1) {
                let tol = self.events[i]
                    .t_tol
                    .max(4.0 * f64::EPSILON * t0.abs().max(t1.abs()));
                let ev = &mut self.events[i];
                let y_buf = &mut self.y_buf;
                let mut g_at = |t: f64| {
                    interp(t, y_buf);
                    (ev.g)(t, y_buf)
                };
                let t_root = illinois(&mut g_at, t0, t1, g0, g1, tol);
                self.found.push((t_root, i, g0 < 0.0));
            }
            self.g_prev[i] = g1;
        }
        let forward = t1 >= t0;
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
            interp(t, &mut y);
            out.push(EventRecord {
                index,
                t,
                y,
                rising,
                terminal,
            });
            if terminal {
                return Some(t);
            }
        }
        None
    }
}

/// The Illinois method on `[a, b]` with `g(a) = ga`, `g(b) = gb` of opposite
/// signs (or `gb = 0`): regula falsi that halves the retained end's value
/// when the same end is kept twice. Returns the end of the final bracket on
/// the side of the sign change, so the event is never reported early.
pub(crate) fn illinois(
    g: &mut impl FnMut(f64) -> f64,
    mut a: f64,
    mut b: f64,
    mut ga: f64,
    mut gb: f64,
    tol: f64,
) -> f64 {
    if gb == 0.0 {
        return b;
    }
    let mut side = 0i8;
    for _ in 0..200 {
        if (b - a).abs() <= tol {
            break;
        }
        let mut c = b - gb * (b - a) / (gb - ga);
        if !c.is_finite() || (c - a) * (c - b) >= 0.0 {
            c = 0.5 * (a + b);
        }
        let gc = g(c);
        if gc == 0.0 {
            return c;
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
    b
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn illinois_finds_cosine_zero() {
        // Closed form: cos has its first zero at pi/2.
        let mut g = |t: f64| t.cos();
        let r = illinois(&mut g, 1.0, 2.0, 1f64.cos(), 2f64.cos(), 1e-14);
        assert!((r - std::f64::consts::FRAC_PI_2).abs() < 1e-13);
    }
}
