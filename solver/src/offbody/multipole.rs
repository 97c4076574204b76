//! Cartesian multipole (Taylor) expansion of a cluster of constant-strength
//! source and doublet triangles, for the velocity and the solid angle at a
//! distant point.
//!
//! In the convention of [`super::kernels`] a panel of area `a`, normal
//! `n`, strengths `sigma` and `mu` induces far away the velocity
//! `grad Phi` of `Phi(P) = q G(P - Y) + d . grad_P G(P - Y)`, with
//! `G(R) = 1/|R|`, `q = sigma a / (4 pi)`, `d = mu a n / (4 pi)` (point
//! source and point doublet, Katz & Plotkin, *Low-Speed Aerodynamics*, 2nd
//! ed., 2001, eqs. 10.91-10.92), and its solid angle is
//! `D(P) = e . grad_P G(P - Y)` with `e = -a n`. Each panel is spread over
//! the six points of a triangle quadrature exact for polynomials of degree
//! 4 ([`TRIANGLE_RULE`]), so the expansion below holds the panel's own
//! moments to fourth order.
//!
//! With `Y = c + s` about the cluster centre `c` and `R = P - c`,
//! `G(R - s) = sum_k b_k(R) s^k` over multi-indices `k`, where
//! `b_k = (-1)^|k| D^k G / k!` follow from the recurrence
//! `|k| |R|^2 b_k = (2|k| - 1) sum_i R_i b_(k - e_i) - (|k| - 1) sum_i b_(k - 2 e_i)`
//! (Lindsay & Krasny, *J. Comput. Phys.* 172, 2001, eq. 10 (from memory);
//! Duan & Krasny 2001). So `Phi = sum_k b_k(R) m_k` with the moments
//! `m_k = sum [q s^k - sum_i d_i k_i s^(k - e_i)]`, and
//! `v_i = -sum_k (k_i + 1) b_(k + e_i) m_k`; the solid angle is
//! `sum_k b_k w_k` with `w_k = -sum sum_i e_i k_i s^(k - e_i)` (the doublet
//! moments with `e` for `d`, no source). Truncated at `|k| <= p`, the
//! relative error of a cluster of radius `rho` is of order
//! `(rho/|R|)^(p+1)` for sources and `(rho/|R|)^p` for doublets.
//! Parents' moments come from their sons' by the binomial shift
//! `(s + t)^k = sum_(j <= k) C(k, j) t^(k - j) s^j`.

use std::f64::consts::PI;

use tuft_mesh::{Panel, Point, Vector};

/// Barycentric coordinates and weights (summing to 1) of a six-point
/// quadrature on a triangle exact for polynomials of degree 4 (Dunavant,
/// *Int. J. Numer. Meth. Eng.* 21, 1985, rule 4 (from memory); checked by
/// the unit test on monomials).
pub const TRIANGLE_RULE: [([f64; 3], f64); 6] = [
    (
        [0.108103018168070, 0.445948490915965, 0.445948490915965],
        0.223381589678011,
    ),
    (
        [0.445948490915965, 0.108103018168070, 0.445948490915965],
        0.223381589678011,
    ),
    (
        [0.445948490915965, 0.445948490915965, 0.108103018168070],
        0.223381589678011,
    ),
    (
        [0.816847572980459, 0.091576213509771, 0.091576213509771],
        0.109951743655322,
    ),
    (
        [0.091576213509771, 0.816847572980459, 0.091576213509771],
        0.109951743655322,
    ),
    (
        [0.091576213509771, 0.091576213509771, 0.816847572980459],
        0.109951743655322,
    ),
];

/// The quadrature points of [`TRIANGLE_RULE`] on a panel, with weights.
pub fn quadrature_points(panel: &Panel) -> impl Iterator<Item = (Point, f64)> + '_ {
    TRIANGLE_RULE.iter().map(|(b, w)| {
        let [p, q, r] = &panel.vertices;
        let c = p.coords * b[0] + q.coords * b[1] + r.coords * b[2];
        (Point::from(c), *w)
    })
}

/// The multi-indices up to an order and the tables that go with them.
#[derive(Debug, Clone)]
pub struct Orders {
    order: usize,
    /// Multi-indices with `|k| <= order + 1`, by increasing `|k|`.
    list: Vec<[usize; 3]>,
    /// How many of `list` have `|k| <= order`.
    moments: usize,
    /// Position in `list` of `(i, j, k)`, at `(i * w + j) * w + k`.
    index: Vec<usize>,
    /// Pairs `(k, j, C(k, j), k - j)` of the moment shift, by position.
    shift: Vec<(usize, usize, f64, [usize; 3])>,
    /// Per position: `(k - e_i, k - 2 e_i)` positions (`usize::MAX` when
    /// negative) for the recurrence, and `k + e_i` for the velocity.
    lower: Vec<[(usize, usize); 3]>,
    upper: Vec<[usize; 3]>,
}

impl Orders {
    /// Tables for expansions of order `order` (`|k| <= order`).
    pub fn new(order: usize) -> Self {
        let w = order + 2;
        let mut list = Vec::new();
        for deg in 0..=order + 1 {
            for i in (0..=deg).rev() {
                for j in (0..=deg - i).rev() {
                    list.push([i, j, deg - i - j]);
                }
            }
        }
        let mut index = vec![usize::MAX; w * w * w];
        for (pos, k) in list.iter().enumerate() {
            index[(k[0] * w + k[1]) * w + k[2]] = pos;
        }
        let moments = list
            .iter()
            .filter(|k| k.iter().sum::<usize>() <= order)
            .count();
        let mut o = Self {
            order,
            list,
            moments,
            index,
            shift: Vec::new(),
            lower: Vec::new(),
            upper: Vec::new(),
        };
        o.shift = o.shift_pairs();
        o.lower = o.list.iter().map(|k| o.neighbours_below(*k)).collect();
        o.upper = o.list[..moments]
            .iter()
            .map(|k| {
                std::array::from_fn(|i| {
                    let mut up = *k;
                    up[i] += 1;
                    o.at(up)
                })
            })
            .collect();
        o
    }

    fn neighbours_below(&self, k: [usize; 3]) -> [(usize, usize); 3] {
        std::array::from_fn(|i| {
            let mut l = k;
            let one = if l[i] >= 1 {
                l[i] -= 1;
                self.at(l)
            } else {
                usize::MAX
            };
            let two = if l[i] >= 1 && one != usize::MAX {
                l[i] -= 1;
                self.at(l)
            } else {
                usize::MAX
            };
            (one, two)
        })
    }

    fn at(&self, k: [usize; 3]) -> usize {
        let w = self.order + 2;
        self.index[(k[0] * w + k[1]) * w + k[2]]
    }

    fn shift_pairs(&self) -> Vec<(usize, usize, f64, [usize; 3])> {
        let mut out = Vec::new();
        for (pk, k) in self.list[..self.moments].iter().enumerate() {
            for (pj, j) in self.list[..self.moments].iter().enumerate() {
                if (0..3).all(|c| j[c] <= k[c]) {
                    let c: f64 = (0..3).map(|c| binomial(k[c], j[c])).product();
                    out.push((pk, pj, c, [k[0] - j[0], k[1] - j[1], k[2] - j[2]]));
                }
            }
        }
        out
    }
}

fn binomial(n: usize, k: usize) -> f64 {
    (0..k).fold(1.0, |c, i| c * (n - i) as f64 / (i + 1) as f64)
}

/// `[x^0..=x^p, y^0..=y^p, z^0..=z^p]` of a vector.
fn powers(s: &Vector, p: usize) -> [Vec<f64>; 3] {
    std::array::from_fn(|c| {
        let mut v = vec![1.0; p + 1];
        for k in 1..=p {
            v[k] = v[k - 1] * s[c];
        }
        v
    })
}

/// The moments of one cluster about its centre.
#[derive(Debug, Clone, PartialEq)]
pub struct Multipole {
    /// Expansion centre.
    pub centre: Point,
    /// Radius of a ball about `centre` holding every panel corner.
    pub radius: f64,
    /// Velocity-potential moments `m_k`.
    m: Vec<f64>,
    /// Solid-angle moments.
    w: Vec<f64>,
}

/// Velocity and solid angle of a cluster at a point.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct FarField {
    /// Velocity, m/s.
    pub velocity: Vector,
    /// Solid angle of the cluster's panels, steradians.
    pub solid_angle: f64,
}

impl Multipole {
    /// The moments of `panels` with strengths `(sigma, mu)` about `centre`;
    /// `radius` bounds the distance from `centre` to any corner.
    pub fn new<'a>(
        orders: &Orders,
        centre: Point,
        radius: f64,
        panels: impl Iterator<Item = (&'a Panel, f64, f64)>,
    ) -> Self {
        let mut mp = Self::empty(orders, centre, radius);
        for (panel, sigma, mu) in panels {
            let n = panel.normal.into_inner() * panel.area;
            let q = sigma * panel.area / (4.0 * PI);
            let d = n * (mu / (4.0 * PI));
            for (y, w) in quadrature_points(panel) {
                mp.add_point(orders, &(y - centre), q * w, &(d * w), &(-n * w));
            }
        }
        mp
    }

    /// The moments of the union of `sons` about `centre` (binomial shift).
    pub fn merged(orders: &Orders, centre: Point, radius: f64, sons: &[&Self]) -> Self {
        let mut mp = Self::empty(orders, centre, radius);
        for son in sons {
            let t = powers(&(son.centre - centre), orders.order);
            for &(k, j, c, e) in &orders.shift {
                let f = c * t[0][e[0]] * t[1][e[1]] * t[2][e[2]];
                mp.m[k] += f * son.m[j];
                mp.w[k] += f * son.w[j];
            }
        }
        mp
    }

    fn empty(orders: &Orders, centre: Point, radius: f64) -> Self {
        Self {
            centre,
            radius,
            m: vec![0.0; orders.moments],
            w: vec![0.0; orders.moments],
        }
    }

    /// Add a point source `q`, point doublet `d` and solid-angle dipole
    /// `e` at `s` from the centre.
    fn add_point(&mut self, orders: &Orders, s: &Vector, q: f64, d: &Vector, e: &Vector) {
        let sp = powers(s, orders.order);
        let pw = |k: [usize; 3]| sp[0][k[0]] * sp[1][k[1]] * sp[2][k[2]];
        for (pos, k) in orders.list[..orders.moments].iter().enumerate() {
            self.m[pos] += q * pw(*k);
            for i in 0..3 {
                if k[i] > 0 {
                    let mut lower = *k;
                    lower[i] -= 1;
                    let f = k[i] as f64 * pw(lower);
                    self.m[pos] -= d[i] * f;
                    self.w[pos] -= e[i] * f;
                }
            }
        }
    }

    /// Velocity and solid angle at `p` from the expansion (meaningful
    /// only well outside the ball of [`Multipole::radius`]).
    pub fn evaluate(&self, orders: &Orders, p: &Point) -> FarField {
        self.evaluate_with(orders, p, &mut Vec::new())
    }

    /// [`Multipole::evaluate`] with a scratch buffer for the Taylor
    /// coefficients, reused between calls.
    pub fn evaluate_with(&self, orders: &Orders, p: &Point, b: &mut Vec<f64>) -> FarField {
        let r = p - self.centre;
        taylor_coefficients(orders, &r, b);
        let mut v = Vector::zeros();
        let mut solid = 0.0;
        for (pos, (k, up)) in orders.list.iter().zip(&orders.upper).enumerate() {
            solid += b[pos] * self.w[pos];
            for i in 0..3 {
                v[i] -= (k[i] + 1) as f64 * b[up[i]] * self.m[pos];
            }
        }
        FarField {
            velocity: v,
            solid_angle: solid,
        }
    }
}

/// `b_k(R) = (-1)^|k| D^k (1/|R|) / k!` for `|k| <= order + 1`, in the
/// order of the tables, into `b` (Lindsay & Krasny 2001, recurrence
/// above).
fn taylor_coefficients(orders: &Orders, r: &Vector, b: &mut Vec<f64>) {
    let r2 = r.norm_squared();
    b.clear();
    b.resize(orders.list.len(), 0.0);
    b[0] = 1.0 / r2.sqrt();
    for pos in 1..orders.list.len() {
        let k = orders.list[pos];
        let deg = (k[0] + k[1] + k[2]) as f64;
        let (mut one, mut two) = (0.0, 0.0);
        for (i, &(l1, l2)) in orders.lower[pos].iter().enumerate() {
            if l1 != usize::MAX {
                one += r[i] * b[l1];
            }
            if l2 != usize::MAX {
                two += b[l2];
            }
        }
        b[pos] = ((2.0 * deg - 1.0) * one - (deg - 1.0) * two) / (deg * r2);
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::offbody::kernels::panel_velocity;

    fn cluster() -> (Vec<Panel>, [(f64, f64); 3]) {
        let corners = [
            [[0.0, 0.0, 0.0], [0.6, 0.1, 0.0], [0.2, 0.5, 0.1]],
            [[0.6, 0.1, 0.0], [0.7, 0.6, 0.2], [0.2, 0.5, 0.1]],
            [[0.1, -0.4, 0.3], [0.5, -0.3, 0.1], [0.2, 0.0, 0.5]],
        ];
        let panels = corners
            .iter()
            .map(|c| {
                Panel::new(c.map(|v| Point::new(v[0], v[1], v[2])))
                    .unwrap_or_else(|| unreachable!())
            })
            .collect();
        (panels, [(0.7, -0.3), (-0.2, 0.9), (0.4, 0.5)])
    }

    /// Field of the cluster's panels at `at`: spread over their
    /// quadrature points as point singularities (`exact = false`, what the
    /// expansion expands), or with the exact kernels (Hess & Smith 1967;
    /// Katz & Plotkin 2001, sec. 10.4).
    fn field(at: &Point, exact: bool) -> (Vector, f64) {
        let (panels, strengths) = cluster();
        let (mut v, mut solid) = (Vector::zeros(), 0.0);
        for (panel, (s, m)) in panels.iter().zip(&strengths) {
            if exact {
                let k = panel_velocity(at, panel, f64::INFINITY);
                v += k.source * *s + k.doublet * *m;
                solid += k.solid_angle;
                continue;
            }
            for (y, w) in quadrature_points(panel) {
                let n = panel.normal.into_inner() * (panel.area * w);
                let r = at - y;
                let (r3, r5) = (r.norm().powi(3), r.norm().powi(5));
                let d = n * (*m / (4.0 * PI));
                v += -r * (*s * panel.area * w / (4.0 * PI) / r3);
                v += r * (3.0 * d.dot(&r) / r5) - d / r3;
                solid += n.dot(&r) / r3;
            }
        }
        (v, solid)
    }

    /// Largest error in velocity (relative) and solid angle (relative to
    /// the panels' area over the distance squared) of the expansion of order `p` at `dist` cluster radii, three directions.
    fn errors(p: usize, dist: f64, exact: bool) -> (f64, f64) {
        let (panels, strengths) = cluster();
        let orders = Orders::new(p);
        let (centre, radius) = (Point::new(0.35, 0.1, 0.25), 0.6);
        let members = panels.iter().zip(&strengths).map(|(p, s)| (p, s.0, s.1));
        let mp = Multipole::new(&orders, centre, radius, members);
        let mut worst = (0.0f64, 0.0f64);
        for dir in [
            Vector::new(1.0, 0.2, -0.3),
            Vector::new(-0.4, 1.0, 0.5),
            Vector::new(0.1, -0.2, -1.0),
        ] {
            let at = centre + dir.normalize() * (dist * radius);
            let (v, solid) = field(&at, exact);
            let far = mp.evaluate(&orders, &at);
            worst.0 = worst.0.max((far.velocity - v).norm() / v.norm());
            // Solid angle against its scale, total area over distance
            // squared (the cluster's own solid angle may nearly cancel).
            let area: f64 = panels.iter().map(|p| p.area).sum();
            let scale = area / (at - centre).norm_squared();
            worst.1 = worst.1.max((far.solid_angle - solid).abs() / scale);
        }
        worst
    }

    /// The truncation error falls as `(rho/R)^p` or faster relative to the
    /// field: halving `rho/R` from 1/4 to 1/8 divides it by at least
    /// `2^p / 1.5` at orders 2, 4 and 6 (against the point singularities
    /// the expansion expands).
    #[test]
    fn expansion_converges_with_order() {
        for p in [2, 4, 6] {
            let (near, far) = (errors(p, 4.0, false), errors(p, 8.0, false));
            let drop = 2f64.powi(p as i32) / 1.5;
            eprintln!("p {p}: {near:?} {far:?}");
            assert!(near.0 / far.0 > drop, "p {p}: velocity {near:?} {far:?}");
            assert!(near.1 / far.1 > drop, "p {p}: solid angle {near:?} {far:?}");
        }
    }

    /// Against the exact kernels the quadrature of each panel adds an
    /// error of order `(size/R)^5` (its fifth moments): at 8 cluster
    /// radii (about 10 panel sizes), order 6, below 1e-5 of the field.
    #[test]
    fn expansion_matches_the_exact_kernels_far_away() {
        let e = errors(6, 8.0, true);
        eprintln!("{e:?}");
        assert!(e.0 < 1e-5 && e.1 < 1e-5, "{e:?}");
    }

    /// The rule integrates every monomial `x^a y^b` of degree up to 4
    /// over the unit right triangle exactly: `a! b! / (a + b + 2)!`
    /// (Dirichlet's integral; Abramowitz & Stegun 1964, 25.4.64 form (from
    /// memory)), to 1e-14.
    #[test]
    fn triangle_rule_is_exact_to_degree_four() {
        let fact = |n: usize| (1..=n).map(|k| k as f64).product::<f64>();
        for a in 0..=4usize {
            for b in 0..=4 - a {
                let got: f64 = TRIANGLE_RULE
                    .iter()
                    .map(|(l, w)| 0.5 * w * l[1].powi(a as i32) * l[2].powi(b as i32))
                    .sum();
                let want = fact(a) * fact(b) / fact(a + b + 2);
                assert!((got - want).abs() < 1e-14, "x^{a} y^{b}: {got} {want}");
            }
        }
    }
    /// The shifted moments of two halves equal the moments of the whole
    /// about the new centre (to round-off), so both give the same field.
    #[test]
    fn shifted_moments_equal_direct_moments() {
        let (panels, s) = cluster();
        let orders = Orders::new(5);
        let c = Point::new(0.35, 0.1, 0.25);
        let one = Multipole::new(
            &orders,
            Point::new(0.3, 0.2, 0.0),
            0.5,
            panels[..2].iter().zip(&s).map(|(p, s)| (p, s.0, s.1)),
        );
        let two = Multipole::new(
            &orders,
            Point::new(0.3, -0.2, 0.3),
            0.3,
            std::iter::once((&panels[2], s[2].0, s[2].1)),
        );
        let merged = Multipole::merged(&orders, c, 0.6, &[&one, &two]);
        let direct = Multipole::new(
            &orders,
            c,
            0.6,
            panels.iter().zip(&s).map(|(p, s)| (p, s.0, s.1)),
        );
        let at = Point::new(4.0, -3.0, 2.0);
        let (a, b) = (merged.evaluate(&orders, &at), direct.evaluate(&orders, &at));
        assert!((a.velocity - b.velocity).norm() < 1e-12 * b.velocity.norm());
        assert!((a.solid_angle - b.solid_angle).abs() < 1e-12 * b.solid_angle.abs());
    }
}
