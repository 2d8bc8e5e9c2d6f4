//! The Nordsieck history array shared by Adams and BDF.
//!
//! Column `j` holds `h^j p^{(j)}(t_n) / j!` of the history polynomial
//! `p`, so `p(t_n + x h) = sum_j z_j x^j` (Nordsieck 1962; Hairer, Norsett
//! and Wanner I, III.6). Everything a variable-step, variable-order method
//! needs is a cheap operation on it:
//!
//! * predict: `z^(0) = P z` with the Pascal matrix `P_{jk} = binom(k, j)`
//!   (re-expands `p` about `t_n + h`);
//! * change the step by the ratio `r`: column `j` times `r^j`;
//! * change the order: add a multiple of a monic polynomial (see
//!   [`super::coefficients`]);
//! * dense output: evaluate `p`.
//!
//! Two arrays are kept: the accepted history and the trial of the step in
//! progress; accepting swaps them, rejecting leaves the history untouched.

/// A Nordsieck history of a state of dimension `n`, up to a maximum order.
#[derive(Clone, Debug)]
pub struct Nordsieck {
    n: usize,
    max_order: usize,
    order: usize,
    /// The step the columns are scaled to.
    h: f64,
    z: Vec<f64>,
    trial: Vec<f64>,
}

impl Nordsieck {
    /// A history for dimension `n` and orders up to `max_order`.
    pub fn new(n: usize, max_order: usize) -> Self {
        let len = (max_order + 1) * n;
        Self {
            n,
            max_order,
            order: 1,
            h: 0.0,
            z: vec![0.0; len],
            trial: vec![0.0; len],
        }
    }

    /// Current order (the degree of the history polynomial).
    pub fn order(&self) -> usize {
        self.order
    }

    /// Largest order the array holds.
    pub fn max_order(&self) -> usize {
        self.max_order
    }

    /// The step the columns are scaled to.
    pub fn step(&self) -> f64 {
        self.h
    }

    /// Every column of the accepted history, column `j` at `j*n..(j+1)*n`
    /// (columns beyond the order hold stale values).
    pub fn cols(&self) -> &[f64] {
        &self.z
    }

    /// Column `j` of the accepted history.
    pub fn col(&self, j: usize) -> &[f64] {
        &self.z[j * self.n..(j + 1) * self.n]
    }

    /// Column `j` of the accepted history, mutably.
    pub fn col_mut(&mut self, j: usize) -> &mut [f64] {
        &mut self.z[j * self.n..(j + 1) * self.n]
    }

    /// Column `j` of the trial array.
    pub fn trial(&self, j: usize) -> &[f64] {
        &self.trial[j * self.n..(j + 1) * self.n]
    }

    /// Column `j` of the trial array, mutably.
    pub fn trial_mut(&mut self, j: usize) -> &mut [f64] {
        &mut self.trial[j * self.n..(j + 1) * self.n]
    }

    /// Sets an order-`q` history from the columns in `cols` (`(q + 1) * n`
    /// values, scaled to the step `h`).
    pub fn set(&mut self, q: usize, h: f64, cols: &[f64]) {
        let len = (q + 1) * self.n;
        self.order = q;
        self.h = h;
        self.z[..len].copy_from_slice(&cols[..len]);
        self.z[len..].fill(0.0);
    }

    /// Sets the order-1 history `[y, h f]`.
    pub fn set_first_order(&mut self, y: &[f64], f: &[f64], h: f64) {
        let n = self.n;
        self.order = 1;
        self.h = h;
        self.z[..n].copy_from_slice(y);
        for (zi, fi) in self.z[n..2 * n].iter_mut().zip(f) {
            *zi = h * fi;
        }
        self.z[2 * n..].fill(0.0);
    }

    /// Rescales the history to the step `h` (column `j` times `(h / h_old)^j`)
    /// and returns the ratio `r`.
    pub fn rescale(&mut self, h: f64) -> f64 {
        let r = h / self.h;
        let mut s = 1.0;
        for j in 1..=self.order {
            s *= r;
            for v in &mut self.z[j * self.n..(j + 1) * self.n] {
                *v *= s;
            }
        }
        self.h = h;
        r
    }

    /// Trial = `P z`: the history polynomial re-expanded about `t_n + h`.
    pub fn predict(&mut self) {
        let (n, q) = (self.n, self.order);
        let len = (q + 1) * n;
        self.trial[..len].copy_from_slice(&self.z[..len]);
        // q sweeps of neighbour additions apply the Pascal matrix.
        for i in 0..q {
            for j in (i..q).rev() {
                let (lo, hi) = self.trial.split_at_mut((j + 1) * n);
                for (a, b) in lo[j * n..].iter_mut().zip(&hi[..n]) {
                    *a += b;
                }
            }
        }
    }

    /// Trial column `j` += `l_j v` for every `j` in `from..=q`.
    pub fn correct_trial(&mut self, l: &[f64], v: &[f64], from: usize) {
        let n = self.n;
        for (j, &lj) in l.iter().enumerate().skip(from) {
            for (a, b) in self.trial[j * n..(j + 1) * n].iter_mut().zip(v) {
                *a += lj * b;
            }
        }
    }

    /// History column `j` += `l_j v` for every `j` in `from..l.len()`.
    pub fn correct(&mut self, l: &[f64], v: &[f64], from: usize) {
        let n = self.n;
        for (j, &lj) in l.iter().enumerate().skip(from) {
            for (a, b) in self.z[j * n..(j + 1) * n].iter_mut().zip(v) {
                *a += lj * b;
            }
        }
    }

    /// Makes the trial the accepted history.
    pub fn commit(&mut self) {
        std::mem::swap(&mut self.z, &mut self.trial);
    }

    /// Lowers the order by one: `z -= z_q M_q`, keeping the conditions of
    /// the order-`q-1` history. `m` is the monic `M_q`.
    pub fn lower_order(&mut self, m: &[f64]) {
        let (n, q) = (self.n, self.order);
        if q <= 1 {
            return;
        }
        let (head, top) = self.z.split_at_mut(q * n);
        for j in 0..q {
            for (a, b) in head[j * n..(j + 1) * n].iter_mut().zip(&top[..n]) {
                *a -= m[j] * b;
            }
        }
        top[..n].fill(0.0);
        self.order = q - 1;
    }

    /// Raises the order by one: `z += M_{q+1} (scale v)`, where
    /// `scale v` estimates the new leading coefficient. `m` is `M_{q+1}`.
    pub fn raise_order(&mut self, m: &[f64], scale: f64, v: &[f64]) {
        let (n, q) = (self.n, self.order);
        if q >= self.max_order {
            return;
        }
        // Column q + 1 is assigned: beyond the order the array holds stale
        // values from earlier steps at higher orders.
        for (a, b) in self.z[(q + 1) * n..(q + 2) * n].iter_mut().zip(v) {
            *a = m[q + 1] * scale * b;
        }
        for j in 0..=q {
            let c = m[j] * scale;
            for (a, b) in self.z[j * n..(j + 1) * n].iter_mut().zip(v) {
                *a += c * b;
            }
        }
        self.order = q + 1;
    }

    /// Writes `p(t_n + x h)` into `out` (Horner over the columns).
    pub fn eval(&self, x: f64, out: &mut [f64]) {
        let n = self.n;
        out.copy_from_slice(self.col(self.order));
        for j in (0..self.order).rev() {
            for (o, c) in out.iter_mut().zip(&self.z[j * n..(j + 1) * n]) {
                *o = *o * x + c;
            }
        }
    }

    /// Writes the monomial coefficients of `p` in `theta`, where
    /// `t = t_n + (theta - 1) rho h`, into `coeffs` (`(q + 1) * n` values):
    /// `p = sum_j z_j rho^j (theta - 1)^j`.
    pub fn theta_coefficients(&self, rho: f64, coeffs: &mut [f64]) {
        let (n, q) = (self.n, self.order);
        coeffs[..(q + 1) * n].fill(0.0);
        let mut rj = 1.0;
        for j in 0..=q {
            // (theta - 1)^j = sum_k binom(j, k) theta^k (-1)^{j-k}.
            let mut binom = 1.0;
            for k in 0..=j {
                let sign = if (j - k) % 2 == 0 { 1.0 } else { -1.0 };
                let c = rj * binom * sign;
                let zj = &self.z[j * n..(j + 1) * n];
                for (o, v) in coeffs[k * n..(k + 1) * n].iter_mut().zip(zj) {
                    *o += c * v;
                }
                binom = binom * (j - k) as f64 / (k + 1) as f64;
            }
            rj *= rho;
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn cubic_history() -> Nordsieck {
        // p(t_n + x h) = 1 + 2x + 3x^2 + 4x^3, one component.
        let mut z = Nordsieck::new(1, 4);
        z.set(3, 0.5, &[1.0, 2.0, 3.0, 4.0]);
        z
    }

    #[test]
    fn prediction_re_expands_the_polynomial() {
        let mut z = cubic_history();
        z.predict();
        // p(x + 1) = 10 + 20x + 15x^2 + 4x^3.
        let want = [10.0, 20.0, 15.0, 4.0];
        for (j, w) in want.iter().enumerate() {
            assert_eq!(z.trial(j)[0], *w);
        }
    }

    #[test]
    fn rescaling_keeps_the_polynomial_in_time() {
        let mut z = cubic_history();
        let (mut a, mut b) = ([0.0], [0.0]);
        z.eval(-0.3, &mut a); // t = t_n - 0.15
        z.rescale(0.25);
        z.eval(-0.6, &mut b); // same t
        assert!((a[0] - b[0]).abs() < 1e-14);
    }

    #[test]
    fn raising_after_lowering_ignores_stale_columns() {
        // Regression: the columns beyond the order hold old values after
        // a commit; raising the order must overwrite, not add to, them.
        let mut z = cubic_history();
        z.predict();
        z.commit(); // trial had 4 columns; the old history lands in trial
        z.lower_order(&[0.0, 2.0, 3.0, 1.0]);
        z.predict();
        z.trial_mut(3)[0] = 99.0; // stale value beyond the order
        z.commit();
        z.raise_order(&[0.0, 0.0, 0.0, 1.0], 1.0, &[5.0]);
        assert_eq!(z.col(3)[0], 5.0);
    }

    #[test]
    fn theta_coefficients_match_evaluation() {
        let mut z = cubic_history();
        z.rescale(0.2); // rho = 0.5 / 0.2
        let mut c = [0.0; 4];
        z.theta_coefficients(2.5, &mut c);
        for theta in [0.0, 0.3, 1.0] {
            let x = (theta - 1.0) * 2.5;
            let mut v = [0.0];
            z.eval(x, &mut v);
            let p: f64 = c.iter().rev().fold(0.0, |s, &ck| s * theta + ck);
            assert!((p - v[0]).abs() < 1e-12, "theta = {theta}");
        }
    }
}
