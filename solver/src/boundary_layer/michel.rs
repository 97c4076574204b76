//! Michel's transition criterion in the Cebeci-Smith form.

/// Momentum-thickness Reynolds number at transition for a given `Re_x`:
///
/// ```text
/// Re_theta,tr = 1.174 (1 + 22400 / Re_x) Re_x^0.46
/// ```
///
/// Michel, ONERA Rapport 1/1578A (1951), in the form of Cebeci & Smith,
/// *Analysis of Turbulent Boundary Layers* (1974); fitted for
/// `1e5 < Re_x < 4e7`. `Re_x` uses the arc length from the attachment point.
/// Returns infinity for `Re_x <= 0` (no transition at the attachment point).
pub fn transition_re_theta(re_x: f64) -> f64 {
    if re_x <= 0.0 {
        return f64::INFINITY;
    }
    1.174 * (1.0 + 22_400.0 / re_x) * re_x.powf(0.46)
}

/// True when a laminar layer with `Re_theta` at `Re_x` has passed Michel's
/// criterion ([`transition_re_theta`]).
pub fn has_transitioned(re_theta: f64, re_x: f64) -> bool {
    re_theta >= transition_re_theta(re_x)
}
