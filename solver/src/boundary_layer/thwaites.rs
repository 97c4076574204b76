//! Thwaites' laminar integral method with the streamline spreading term.
//!
//! Momentum-integral solution (Thwaites, Aero. Quarterly 1, 1949, 245-280;
//! White, *Viscous Fluid Flow*, sec. 4-6), in the form that carries the
//! streamline spreading metric `h` (Rott & Crabtree 1952; the Mangler
//! transform, `h = r` on a body of revolution):
//!
//! ```text
//! theta^2 U^6 h^2 = theta0^2 U0^6 h0^2 + 0.45 nu * integral(U^5 h^2 ds)
//! lambda = theta^2 (dU/ds) / nu,   laminar separation at lambda = -0.09
//! ```

/// Thwaites' constant `a` in `theta^2 U^6 = a nu integral(U^5 ds)`
/// (Thwaites 1949; White, *Viscous Fluid Flow*, eq. 4-126).
pub const THWAITES_A: f64 = 0.45;

/// Exponent `b` of `U` in Thwaites' integral (Thwaites 1949).
pub const THWAITES_B: f64 = 6.0;

/// Laminar separation: `lambda = -0.09` (Thwaites 1949; White sec. 4-6).
pub const SEPARATION_LAMBDA: f64 = -0.09;

/// Shape factor `H` and shear correlation `l(lambda)` from Thwaites'
/// parameter, by the fits of Cebeci & Bradshaw (1977) to Thwaites' table:
///
/// ```text
/// 0 <= lambda <= 0.1:  H = 2.61 - 3.75 lambda + 5.24 lambda^2
///                      l = 0.22 + 1.57 lambda - 1.8 lambda^2
/// -0.1 <= lambda <= 0: H = 2.088 + 0.0731 / (lambda + 0.14)
///                      l = 0.22 + 1.402 lambda + 0.018 lambda / (lambda + 0.107)
/// ```
///
/// `lambda` is clamped to the fitted range `[-0.1, 0.1]`.
pub fn closure(lambda: f64) -> (f64, f64) {
    let lam = lambda.clamp(-0.1, 0.1);
    if lam >= 0.0 {
        (
            2.61 - 3.75 * lam + 5.24 * lam * lam,
            0.22 + 1.57 * lam - 1.8 * lam * lam,
        )
    } else {
        (
            2.088 + 0.0731 / (lam + 0.14),
            // The fit dips just below zero for lambda under -0.0898 (to
            // -0.0015 at -0.09): no wall shear there, not a reversed one.
            (0.22 + 1.402 * lam + 0.018 * lam / (lam + 0.107)).max(0.0),
        )
    }
}

/// Skin-friction coefficient `c_f = 2 nu l / (U theta)` (Thwaites 1949;
/// White, *Viscous Fluid Flow*, eq. 4-128).
pub fn skin_friction(nu: f64, speed: f64, theta: f64, l: f64) -> f64 {
    2.0 * nu * l / (speed * theta)
}

/// Thwaites' parameter at a stagnation start where `U = a s` and the
/// spreading metric grows as `h ~ s^m`: the integral gives
/// `theta^2 a^6 s^(6+2m) = 0.45 nu a^5 s^(6+2m) / (6 + 2m)`, so
/// `lambda = 0.45 / (6 + 2m)`: 0.075 on a plane (2D) stagnation line
/// (`m = 0`), 0.05625 at the nose of a body of revolution (`m = 1`), derived
/// from Thwaites' integral with the Mangler metric (Rott & Crabtree 1952).
pub fn stagnation_lambda(m: f64) -> f64 {
    THWAITES_A / (THWAITES_B + 2.0 * m)
}

/// Thwaites' integrand `0.45 nu U^5 h^2` (Thwaites 1949 with the Rott &
/// Crabtree spreading metric).
pub fn integrand(nu: f64, speed: f64, h: f64) -> f64 {
    THWAITES_A * nu * speed.powi(5) * h * h
}

/// Momentum thickness from the accumulated integral
/// `J = theta0^2 U0^6 h0^2 + 0.45 nu integral(U^5 h^2 ds)`:
/// `theta = sqrt(J / (U^6 h^2))` (Thwaites 1949).
pub fn theta_from_integral(accumulated: f64, speed: f64, h: f64) -> f64 {
    (accumulated / (speed.powi(6) * h * h)).max(0.0).sqrt()
}

/// Laminar separation risk in 0..1: `lambda / -0.09`, clamped, zero in a
/// favourable gradient (how close `lambda` came to Thwaites' separation value).
pub fn risk(lambda: f64) -> f64 {
    (lambda / SEPARATION_LAMBDA).clamp(0.0, 1.0)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn fits_are_continuous_at_zero() {
        // Both Cebeci & Bradshaw (1977) fits give Thwaites' flat-plate values
        // H = 2.61, l = 0.22 at lambda = 0 (to the fits' 3 digits).
        let (h_minus, l_minus) = closure(-1e-12);
        let (h_plus, l_plus) = closure(0.0);
        assert!((h_minus - h_plus).abs() < 1e-3 && (h_plus - 2.61).abs() < 1e-12);
        assert!((l_minus - l_plus).abs() < 1e-9 && (l_plus - 0.22).abs() < 1e-12);
    }

    #[test]
    fn shear_never_reverses_before_separation() {
        // At Thwaites' separation (lambda = -0.09) the wall shear vanishes
        // (l = 0, Thwaites 1949); the fit's dip below zero is cut off.
        let (_, l) = closure(-0.09);
        assert!(l.abs() < 1e-12, "l {l}");
        assert!((0..=100).all(|k| closure(-0.001 * f64::from(k)).1 >= 0.0));
    }

    #[test]
    fn stagnation_values() {
        // Derived from Thwaites' integral: 0.075 (2D), 0.05625 (axisymmetric).
        assert!((stagnation_lambda(0.0) - 0.075).abs() < 1e-12);
        assert!((stagnation_lambda(1.0) - 0.05625).abs() < 1e-12);
    }
}
