//! Butcher tableaux of the explicit Runge–Kutta methods, from their
//! published coefficients.
//!
//! A tableau with `fsal = true` has as its last stage `f(t + h, y_{n+1})`
//! (its last row of `a` equals `b`), which is reused as the first stage of
//! the next step. Dense output is given as the weight polynomials
//! `b_i(theta) = sum_k dense[i][k-1] theta^k` of a continuous extension
//! `y(t + theta h) = y_n + h sum_i b_i(theta) k_i`; `None` means cubic Hermite
//! interpolation from the end values and slopes.

use crate::method::Method;

/// The coefficients of an explicit Runge–Kutta method.
#[derive(Debug)]
pub struct Tableau {
    /// The method these coefficients define.
    pub method: Method,
    /// Nodes `c_i`.
    pub c: &'static [f64],
    /// Strictly lower-triangular `a`: row `i` has `i` entries.
    pub a: &'static [&'static [f64]],
    /// Weights `b_i` of the propagated solution.
    pub b: &'static [f64],
    /// Error weights `b_i - bhat_i` of the embedded estimate (`None`: no estimate).
    pub e: Option<&'static [f64]>,
    /// Order of the propagated solution.
    pub order: usize,
    /// Order `q` of the error estimate (the estimate is `O(h^(q+1))`).
    pub error_order: usize,
    /// First same as last: the last stage is `f(t + h, y_{n+1})`.
    pub fsal: bool,
    /// Monomial coefficients of the continuous-extension weights `b_i(theta)`
    /// for `theta^1, theta^2, ...`; `None` for cubic Hermite.
    pub dense: Option<&'static [&'static [f64]]>,
    /// Two stages `(i, j)` at the same node whose difference gives the free
    /// spectral-radius estimate `||k_i - k_j|| / ||Y_i - Y_j||`.
    pub stiffness_pair: Option<(usize, usize)>,
}

impl Tableau {
    /// Number of stages.
    pub fn stages(&self) -> usize {
        self.b.len()
    }
}

/// Forward Euler: `y_{n+1} = y_n + h f(t_n, y_n)`. Order 1, no error estimate.
pub static FORWARD_EULER: Tableau = Tableau {
    method: Method::ForwardEuler,
    c: &[0.0],
    a: &[&[]],
    b: &[1.0],
    e: None,
    order: 1,
    error_order: 0,
    fsal: false,
    dense: None,
    stiffness_pair: None,
};

/// Heun's method (explicit trapezoid), order 2, no error estimate
/// (Butcher 2016, section 23).
pub static HEUN: Tableau = Tableau {
    method: Method::Heun,
    c: &[0.0, 1.0],
    a: &[&[], &[1.0]],
    b: &[0.5, 0.5],
    e: None,
    order: 2,
    error_order: 0,
    fsal: false,
    dense: None,
    stiffness_pair: None,
};

/// The classical Runge–Kutta method of order 4 (Hairer, Norsett and Wanner I, II.1, Table 1.2).
pub static RK4: Tableau = Tableau {
    method: Method::Rk4,
    c: &[0.0, 0.5, 0.5, 1.0],
    a: &[&[], &[0.5], &[0.0, 0.5], &[0.0, 0.0, 1.0]],
    b: &[1.0 / 6.0, 1.0 / 3.0, 1.0 / 3.0, 1.0 / 6.0],
    e: None,
    order: 4,
    error_order: 0,
    fsal: false,
    dense: None,
    stiffness_pair: None,
};

/// Bogacki–Shampine 3(2), FSAL (Bogacki and Shampine, Appl. Math. Lett. 2 (1989) 321–325).
/// Embedded weights `bhat = (7/24, 1/4, 1/3, 1/8)`. Dense output: cubic Hermite,
/// which for this pair is the natural third-order interpolant.
pub static BOGACKI_SHAMPINE_32: Tableau = Tableau {
    method: Method::BogackiShampine32,
    c: &[0.0, 0.5, 0.75, 1.0],
    a: &[
        &[],
        &[0.5],
        &[0.0, 0.75],
        &[2.0 / 9.0, 1.0 / 3.0, 4.0 / 9.0],
    ],
    b: &[2.0 / 9.0, 1.0 / 3.0, 4.0 / 9.0, 0.0],
    e: Some(&[
        2.0 / 9.0 - 7.0 / 24.0,
        1.0 / 3.0 - 1.0 / 4.0,
        4.0 / 9.0 - 1.0 / 3.0,
        -1.0 / 8.0,
    ]),
    order: 3,
    error_order: 2,
    fsal: true,
    dense: None,
    stiffness_pair: None,
};

/// Dormand–Prince 5(4), FSAL (Dormand and Prince, J. Comput. Appl. Math. 6
/// (1980) 19–26; Hairer, Norsett and Wanner I, II.5, Table 5.2). Dense output:
/// the fourth-order continuous extension of Hairer, Norsett and Wanner I,
/// II.6 (its `d_i` coefficients expanded to monomials by
/// `tools/reference/dp54_dense.py`).
pub static DORMAND_PRINCE_54: Tableau = Tableau {
    method: Method::DormandPrince54,
    c: &[0.0, 1.0 / 5.0, 3.0 / 10.0, 4.0 / 5.0, 8.0 / 9.0, 1.0, 1.0],
    a: &[
        &[],
        &[1.0 / 5.0],
        &[3.0 / 40.0, 9.0 / 40.0],
        &[44.0 / 45.0, -56.0 / 15.0, 32.0 / 9.0],
        &[
            19372.0 / 6561.0,
            -25360.0 / 2187.0,
            64448.0 / 6561.0,
            -212.0 / 729.0,
        ],
        &[
            9017.0 / 3168.0,
            -355.0 / 33.0,
            46732.0 / 5247.0,
            49.0 / 176.0,
            -5103.0 / 18656.0,
        ],
        &[
            35.0 / 384.0,
            0.0,
            500.0 / 1113.0,
            125.0 / 192.0,
            -2187.0 / 6784.0,
            11.0 / 84.0,
        ],
    ],
    b: &[
        35.0 / 384.0,
        0.0,
        500.0 / 1113.0,
        125.0 / 192.0,
        -2187.0 / 6784.0,
        11.0 / 84.0,
        0.0,
    ],
    // b - bhat with bhat = (5179/57600, 0, 7571/16695, 393/640, -92097/339200, 187/2100, 1/40).
    e: Some(&[
        35.0 / 384.0 - 5179.0 / 57600.0,
        0.0,
        500.0 / 1113.0 - 7571.0 / 16695.0,
        125.0 / 192.0 - 393.0 / 640.0,
        -2187.0 / 6784.0 + 92097.0 / 339200.0,
        11.0 / 84.0 - 187.0 / 2100.0,
        -1.0 / 40.0,
    ]),
    order: 5,
    error_order: 4,
    fsal: true,
    dense: Some(&[
        &[
            1.0,
            -8048581381.0 / 2820520608.0,
            8663915743.0 / 2820520608.0,
            -12715105075.0 / 11282082432.0,
        ],
        &[0.0, 0.0, 0.0, 0.0],
        &[
            0.0,
            131558114200.0 / 32700410799.0,
            -68118460800.0 / 10900136933.0,
            87487479700.0 / 32700410799.0,
        ],
        &[
            0.0,
            -1754552775.0 / 470086768.0,
            14199869525.0 / 1410260304.0,
            -10690763975.0 / 1880347072.0,
        ],
        &[
            0.0,
            127303824393.0 / 49829197408.0,
            -318862633887.0 / 49829197408.0,
            701980252875.0 / 199316789632.0,
        ],
        &[
            0.0,
            -282668133.0 / 205662961.0,
            2019193451.0 / 616988883.0,
            -1453857185.0 / 822651844.0,
        ],
        &[
            0.0,
            40617522.0 / 29380423.0,
            -110615467.0 / 29380423.0,
            69997945.0 / 29380423.0,
        ],
    ]),
    // Stages 6 and 7 both sit at c = 1 (Hairer and Wanner II, IV.2, eq. (2.21)).
    stiffness_pair: Some((5, 6)),
};

/// `k theta^2 (theta - r1)(theta - r2)` as monomial coefficients of
/// `theta^1..theta^4`: the factored form in which Tsitouras (2011) prints
/// most of his continuous-extension weights.
const fn theta2_two_roots(k: f64, r1: f64, r2: f64) -> [f64; 4] {
    [0.0, k * r1 * r2, -k * (r1 + r2), k]
}

/// `k theta^2 (theta^2 - p theta + q)` as monomial coefficients of `theta^1..theta^4`.
const fn theta2_quadratic(k: f64, p: f64, q: f64) -> [f64; 4] {
    [0.0, k * q, -k * p, k]
}

/// `k theta (theta - r)(theta^2 - p theta + q)` as monomial coefficients of `theta^1..theta^4`.
const fn theta_root_quadratic(k: f64, r: f64, p: f64, q: f64) -> [f64; 4] {
    [-k * r * q, k * (q + r * p), -k * (p + r), k]
}

/// Tsitouras 5(4), FSAL, 7 stages (Ch. Tsitouras, Runge–Kutta pairs of
/// order 5(4) satisfying only the first column simplifying assumption,
/// Comput. Math. Appl. 62 (2011) 770–775). Coefficients from memory of that
/// paper; the order-condition tests in `explicit::tests` confirm them
/// (order 5, embedded order 4, continuous extension of order 4).
///
/// Dense output: the paper's fourth-order continuous extension, printed
/// there in factored form, e.g. `b_7(theta) = 5/2 theta^2 (theta - 1)(theta - 3/5)`;
/// the factors are expanded to monomials here at compile time.
pub static TSITOURAS_54: Tableau = Tableau {
    method: Method::Tsitouras54,
    c: &[0.0, 0.161, 0.327, 0.9, 0.9800255409045097, 1.0, 1.0],
    a: &[
        &[],
        &[0.161],
        &[-0.008480655492356989, 0.335480655492357],
        &[2.897153057105493, -6.359448489975075, 4.3622954328695815],
        &[
            5.325864828439257,
            -11.748883564062828,
            7.4955393428898365,
            -0.09249506636175525,
        ],
        &[
            5.86145544294642,
            -12.92096931784711,
            8.159367898576159,
            -0.071584973281401,
            -0.028269050394068383,
        ],
        &[
            0.09646076681806523,
            0.01,
            0.4798896504144996,
            1.379008574103742,
            -3.290069515436081,
            2.324710524099774,
        ],
    ],
    b: &[
        0.09646076681806523,
        0.01,
        0.4798896504144996,
        1.379008574103742,
        -3.290069515436081,
        2.324710524099774,
        0.0,
    ],
    // b - bhat, from memory of the paper's table of the embedded weights.
    e: Some(&[
        -0.00178001105222577714,
        -0.0008164344596567469,
        0.007880878010261995,
        -0.1447110071732629,
        0.5823571654525552,
        -0.45808210592918697,
        1.0 / 66.0,
    ]),
    order: 5,
    error_order: 4,
    fsal: true,
    dense: Some(&[
        &theta_root_quadratic(
            -1.0530884977290216,
            1.3299890189751412,
            1.4364028541716351,
            0.7139816917074209,
        ),
        &theta2_quadratic(0.1017, 2.1966568338249754, 1.2949852507374631),
        &theta2_quadratic(
            2.490627285651252793,
            2.38535645472061657,
            1.57803468208092486,
        ),
        &theta2_two_roots(
            -16.54810288924490272,
            1.21712927295533244,
            0.61620406037800089,
        ),
        &theta2_two_roots(
            47.37952196281928122,
            1.203071208372362603,
            0.658047292653547382,
        ),
        &theta2_two_roots(-34.87065786149660974, 1.2, 2.0 / 3.0),
        &theta2_two_roots(2.5, 1.0, 0.6),
    ]),
    // Stages 6 and 7 both sit at c = 1 (Hairer and Wanner II, IV.2).
    stiffness_pair: Some((5, 6)),
};
