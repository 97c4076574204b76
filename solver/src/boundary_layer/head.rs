//! Head's entrainment method with the Ludwieg-Tillmann skin-friction law
//! (turbulent boundary layer).
//!
//! Head, ARC R&M 3152 (1958). Along a streamline with spreading metric `h`:
//!
//! ```text
//! d theta/ds = c_f/2 - (H + 2)(theta/U) dU/ds - theta (1/h) dh/ds
//! (1/(U h)) d(U h theta H1)/ds = F(H1)
//! ```

/// Head's shape factor `H1 = (delta - delta*)/theta` as a function of `H`,
/// by the fits credited to Cebeci & Bradshaw (1977) (also Bertin & Smith,
/// *Aerodynamics for Engineers*):
///
/// ```text
/// H <= 1.6: H1 = 3.3 + 0.8234 (H - 1.1)^-1.287
/// H >  1.6: H1 = 3.3 + 1.5501 (H - 0.6778)^-3.064
/// ```
///
/// `H` is floored just above 1.1 where the fit is singular.
pub fn h1_of_h(h: f64) -> f64 {
    if h <= 1.6 {
        3.3 + 0.8234 * (h.max(1.1001) - 1.1).powf(-1.287)
    } else {
        3.3 + 1.5501 * (h - 0.6778).powf(-3.064)
    }
}

/// Inverse of [`h1_of_h`] (Cebeci & Bradshaw 1977 fits):
///
/// ```text
/// H1 >= 5.3: H = 1.1 + 0.86 (H1 - 3.3)^-0.777
/// H1 <  5.3: H = 0.6778 + 1.1536 (H1 - 3.3)^-0.326
/// ```
///
/// `H1` is floored just above 3.3 (where `H` grows without bound).
pub fn h_of_h1(h1: f64) -> f64 {
    if h1 >= 5.3 {
        1.1 + 0.86 * (h1 - 3.3).powf(-0.777)
    } else {
        0.6778 + 1.1536 * (h1.max(3.3001) - 3.3).powf(-0.326)
    }
}

/// Head's entrainment function `F(H1) = 0.0306 (H1 - 3)^-0.6169`
/// (Head 1958, as fitted by Cebeci & Bradshaw 1977).
pub fn entrainment(h1: f64) -> f64 {
    0.0306 * (h1.max(3.0001) - 3.0).powf(-0.6169)
}

/// Lowest `Re_theta` used in the Ludwieg-Tillmann law: the law was fitted on
/// turbulent layers with `Re_theta` of a few hundred and more; below this
/// floor (a numerical guard at a turbulent start, common practice) `c_f` is
/// held at its value at the floor.
pub const MIN_RE_THETA: f64 = 100.0;

/// Ludwieg-Tillmann skin friction:
/// `c_f = 0.246 * 10^(-0.678 H) * Re_theta^-0.268`
/// (Ludwieg & Tillmann, Ing.-Archiv 17, 1949; NACA TM 1285).
pub fn ludwieg_tillmann(h: f64, re_theta: f64) -> f64 {
    0.246 * 10f64.powf(-0.678 * h) * re_theta.max(MIN_RE_THETA).powf(-0.268)
}

/// The local edge flow seen by the turbulent march.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct EdgeFlow {
    /// Edge speed `U`, m/s.
    pub speed: f64,
    /// Its derivative along the streamline `dU/ds`, 1/s.
    pub dspeed: f64,
    /// Streamline spreading `(1/h) dh/ds`, 1/m.
    pub spreading: f64,
}

/// Turbulent state: momentum thickness `theta` and `y = theta * H1`.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct HeadState {
    /// Momentum thickness, m.
    pub theta: f64,
    /// `theta * H1`, m.
    pub y: f64,
}

impl HeadState {
    /// A state from `theta` and the shape factor `H` ([`h1_of_h`]).
    pub fn new(theta: f64, h: f64) -> Self {
        Self {
            theta,
            y: theta * h1_of_h(h),
        }
    }

    /// Shape factor `H` of this state ([`h_of_h1`]).
    pub fn h(&self) -> f64 {
        h_of_h1(self.y / self.theta)
    }

    /// Skin friction by Ludwieg-Tillmann at this state.
    pub fn cf(&self, nu: f64, speed: f64) -> f64 {
        ludwieg_tillmann(self.h(), speed * self.theta / nu)
    }
}

/// Right-hand side of Head's equations (Head 1958; the spreading terms by
/// Rott & Crabtree 1952): returns `(d theta/ds, d(theta H1)/ds)`, using
/// `(1/(U h)) d(U h y)/ds = F` so `dy/ds = F - y (U'/U + h'/h)`.
pub fn derivatives(state: HeadState, flow: EdgeFlow, nu: f64) -> (f64, f64) {
    let h = state.h();
    let cf = ludwieg_tillmann(h, flow.speed * state.theta / nu);
    let strain = flow.dspeed / flow.speed;
    let dtheta = 0.5 * cf - (h + 2.0) * state.theta * strain - state.theta * flow.spreading;
    let h1 = state.y / state.theta;
    let dy = entrainment(h1) - state.y * (strain + flow.spreading);
    (dtheta, dy)
}

/// One classical fourth-order Runge-Kutta step of Head's equations over
/// `ds`, with the edge flow given at the start, middle and end of the step.
pub fn rk4_step(state: HeadState, flows: [EdgeFlow; 3], ds: f64, nu: f64) -> HeadState {
    let add = |s: HeadState, d: (f64, f64), f: f64| HeadState {
        theta: (s.theta + f * d.0).max(1e-12),
        y: (s.y + f * d.1).max(3.3001 * 1e-12),
    };
    let k1 = derivatives(state, flows[0], nu);
    let k2 = derivatives(add(state, k1, 0.5 * ds), flows[1], nu);
    let k3 = derivatives(add(state, k2, 0.5 * ds), flows[1], nu);
    let k4 = derivatives(add(state, k3, ds), flows[2], nu);
    let next = HeadState {
        theta: state.theta + ds / 6.0 * (k1.0 + 2.0 * k2.0 + 2.0 * k3.0 + k4.0),
        y: state.y + ds / 6.0 * (k1.1 + 2.0 * k2.1 + 2.0 * k3.1 + k4.1),
    };
    HeadState {
        theta: next.theta.max(1e-12),
        y: next.y.max(next.theta.max(1e-12) * 3.3001),
    }
}

/// Turbulent separation risk in 0..1: `(H - H_flat)/(H_sep - H_flat)`,
/// clamped (how far `H` has moved from its flat-plate value toward the
/// separation threshold).
pub fn risk(h: f64, h_flat: f64, h_separation: f64) -> f64 {
    ((h - h_flat) / (h_separation - h_flat)).clamp(0.0, 1.0)
}
