//! Load integration checked against closed-form results.
#![allow(clippy::unwrap_used, clippy::expect_used)]

use std::f64::consts::PI;

use tuft_mesh::{Mirrors, PanelMesh, Point, TriMesh, Vector, generate};
use tuft_solver::loads::{
    FlowState, LoadsError, Reference, STANDARD_GRAVITY, axle_split, body_length, frontal_area,
    integrate_loads,
};

/// Seeded xorshift generator: reproducible jitter without extra dependencies.
struct XorShift(u64);
impl XorShift {
    fn next(&mut self) -> f64 {
        self.0 ^= self.0 << 13;
        self.0 ^= self.0 >> 7;
        self.0 ^= self.0 << 17;
        (self.0 >> 11) as f64 / (1u64 << 53) as f64 - 0.5
    }
}

fn reference(area: f64) -> Reference {
    Reference {
        area,
        length: 1.0,
        moment_point: Point::origin(),
        front_axle_x: -1.0,
        rear_axle_x: 1.0,
    }
}

const AIR: FlowState = FlowState {
    density: 1.225,
    speed: 40.0,
    yaw: 0.0,
};

/// A flat plate `[x0, x1] x [-b/2, b/2]` in the plane z = 0, normal +z.
fn plate(x0: f64, x1: f64, b: f64) -> PanelMesh {
    let v = vec![
        Point::new(x0, -b / 2.0, 0.0),
        Point::new(x1, -b / 2.0, 0.0),
        Point::new(x1, b / 2.0, 0.0),
        Point::new(x0, b / 2.0, 0.0),
    ];
    PanelMesh::new(
        TriMesh::new(v, vec![[0, 1, 2], [0, 2, 3]]).unwrap(),
        Mirrors::none(),
    )
    .unwrap()
}

#[test]
fn constant_pressure_on_a_closed_body_gives_no_force() {
    // The outward area vectors of a closed surface sum to zero (divergence
    // theorem), so a uniform pressure gives no net force or moment on any
    // closed mesh: a jittered (asymmetric) icosphere here.
    let mut mesh = generate::icosphere(0.7, 3);
    let mut rng = XorShift(0x9e37_79b9_7f4a_7c15);
    for p in &mut mesh.vertices {
        *p += Vector::new(rng.next(), rng.next(), rng.next()) * 0.02;
    }
    let panels = PanelMesh::new(mesh, Mirrors::none()).unwrap();
    let cp = vec![0.37; panels.len()];
    let loads = integrate_loads(&panels, &cp, None, &reference(1.0), &AIR).unwrap();
    let scale = loads.dynamic_pressure * panels.area();
    // Round-off only: 1e-12 of the largest panel force sum.
    assert!(loads.total.force.norm() < 1e-12 * scale, "{loads:?}");
    assert!(loads.total.moment.norm() < 1e-12 * scale, "{loads:?}");
}

#[test]
fn suction_on_a_flat_plate_is_q_times_area() {
    // Cp = -1 on the upper face of a plate: lift = q A exactly (definition of
    // Cp); the axle split follows the lever rule with the centre of pressure
    // at the plate centre x_c = 0.25: front = L (x_r - x_c)/(x_r - x_f)
    // = L * 0.75 / 2, rear = L * 1.25 / 2 (hand derivation).
    let panels = plate(-0.5, 1.0, 2.0);
    let area = 3.0;
    let loads = integrate_loads(&panels, &[-1.0, -1.0], None, &reference(area), &AIR).unwrap();
    let q = 0.5 * 1.225 * 40.0 * 40.0;
    assert!((loads.lift - q * area).abs() < 1e-9 * q * area);
    assert!((loads.total.coefficients.lift - 1.0).abs() < 1e-12);
    assert!(loads.total.coefficients.drag.abs() < 1e-12);
    assert!((loads.lift_kg - q * area / 9.80665).abs() < 1e-9 * q);
    assert!((loads.axles.front - q * area * 0.75 / 2.0).abs() < 1e-9 * q);
    assert!((loads.axles.rear - q * area * 1.25 / 2.0).abs() < 1e-9 * q);
    assert!((loads.axles.front + loads.axles.rear - loads.lift).abs() < 1e-9 * q);
    // Pitch: an upward force behind the moment point (x_c = 0.25 > 0) gives
    // M_y = (r x F)_y = -x_c L < 0, nose down (r = x_c e_x, F = L e_z).
    assert!((loads.total.moment.y + 0.25 * q * area).abs() < 1e-9 * q);
}

#[test]
fn skin_friction_on_a_plate_is_drag_and_reported_apart() {
    // Uniform c_f = 0.004 along +x on a plate of area A: friction drag
    // c_f q A (definition of c_f), no pressure part.
    let panels = plate(0.0, 2.0, 1.0);
    let cf = vec![Vector::new(0.004, 0.0, 0.0); 2];
    let loads = integrate_loads(&panels, &[0.0, 0.0], Some(&cf), &reference(2.0), &AIR).unwrap();
    assert!((loads.friction.coefficients.drag - 0.004).abs() < 1e-15);
    assert!((loads.total.coefficients.drag - 0.004).abs() < 1e-15);
    assert!(loads.pressure.force.norm() < 1e-12);
    // Yawed 30 degrees: drag is the component along the free stream,
    // c_f cos 30, side force -c_f sin 30 (side axis (-sin, cos, 0)).
    let yawed = FlowState {
        yaw: 30f64.to_radians(),
        ..AIR
    };
    let loads = integrate_loads(&panels, &[0.0, 0.0], Some(&cf), &reference(2.0), &yawed).unwrap();
    let c = loads.total.coefficients;
    assert!((c.drag - 0.004 * 30f64.to_radians().cos()).abs() < 1e-15);
    assert!((c.side + 0.004 * 0.5).abs() < 1e-15);
}

#[test]
fn hemisphere_lift_matches_potential_flow_value() {
    // Upper half (z > 0) of a sphere of radius a in potential flow along x,
    // Cp = 1 - (9/4) sin^2(theta) (Lamb, Hydrodynamics, sec. 92). The lift on
    // it is q pi a^2 (1 - (9/4)(3/4)) * (-1) = (11/16) q pi a^2 (derived in
    // closed form: integral of n_z over the half is pi a^2, of sin^2 n_z is
    // (3/4) pi a^2). Cp is taken at the panel centroid projected on the
    // sphere; flat panels converge at second order: 0.1 % seen at 40 x 80
    // panels, 0.5 % allowed.
    let a = 0.5;
    let sphere = PanelMesh::new(generate::latlong_sphere(a, 40, 80), Mirrors::none()).unwrap();
    let upper: Vec<usize> = (0..sphere.len())
        .filter(|&j| sphere.panels[j].centroid.z > 0.0)
        .collect();
    let tris: Vec<[u32; 3]> = upper.iter().map(|&j| sphere.triangles[j]).collect();
    let half = PanelMesh::new(
        TriMesh::new(sphere.vertices.clone(), tris).unwrap(),
        Mirrors::none(),
    )
    .unwrap();
    let cp: Vec<f64> = half
        .panels
        .iter()
        .map(|p| {
            let c = p.centroid.coords.normalize();
            1.0 - 2.25 * (1.0 - c.x * c.x)
        })
        .collect();
    let loads = integrate_loads(&half, &cp, None, &reference(PI * a * a), &AIR).unwrap();
    let cl = loads.pressure.coefficients.lift;
    assert!((cl - 11.0 / 16.0).abs() < 0.005 * 11.0 / 16.0, "C_L {cl}");
    // d'Alembert on the half: Cp is symmetric fore and aft, so no drag.
    assert!(loads.pressure.coefficients.drag.abs() < 1e-3, "{loads:?}");
}

#[test]
fn axle_split_sums_to_lift_and_follows_the_lever_rule() {
    // Hand-derived: wheelbase 2.8 m from x_f = 0.9 to x_r = 3.7, moment point
    // at x_m = 2.3; L = 1000 N with M_y = -300 N m gives x_cp = x_m - M_y/L
    // = 2.6, front = L (3.7 - 2.6)/2.8 = 392.857 N, rear = 607.143 N.
    let r = Reference {
        area: 2.0,
        length: 4.5,
        moment_point: Point::new(2.3, 0.0, 0.0),
        front_axle_x: 0.9,
        rear_axle_x: 3.7,
    };
    let s = axle_split(1000.0, -300.0, 500.0, &r).unwrap();
    assert!((s.front - 1000.0 * 1.1 / 2.8).abs() < 1e-9);
    assert!((s.rear - 1000.0 * 1.7 / 2.8).abs() < 1e-9);
    assert!((s.front + s.rear - 1000.0).abs() < 1e-9);
    assert!((s.front_kg - s.front / STANDARD_GRAVITY).abs() < 1e-12);
    assert!((s.rear_coefficient - s.rear / 1000.0).abs() < 1e-12);
    let same = Reference {
        rear_axle_x: 0.9,
        ..r
    };
    assert_eq!(
        axle_split(1.0, 0.0, 1.0, &same),
        Err(LoadsError::ZeroWheelbase { x: 0.9 })
    );
}

#[test]
fn frontal_area_of_a_sphere_is_pi_a_squared() {
    // Projection of a sphere: pi a^2. An inscribed icosphere of 5120 panels
    // loses area O(h^2): within 0.5 %.
    let a = 1.3;
    let s = PanelMesh::new(generate::icosphere(a, 4), Mirrors::none()).unwrap();
    let area = frontal_area(&s);
    assert!((area - PI * a * a).abs() < 5e-3 * PI * a * a, "{area}");
    assert!((body_length(&s) - 2.0 * a).abs() < 1e-12);
    // Half model on the symmetry plane (y >= 0 half, latitude-longitude mesh
    // cut along a meridian plane): doubled back to the full area.
    let full = PanelMesh::new(generate::latlong_sphere(a, 40, 80), Mirrors::none()).unwrap();
    let tris: Vec<[u32; 3]> = (0..full.len())
        .filter(|&j| full.panels[j].centroid.y > 0.0)
        .map(|j| full.triangles[j])
        .collect();
    let half = PanelMesh::new(
        TriMesh::new(full.vertices.clone(), tris).unwrap(),
        Mirrors {
            ground: None,
            symmetry: true,
        },
    )
    .unwrap();
    let area = frontal_area(&half);
    assert!((area - PI * a * a).abs() < 5e-3 * PI * a * a, "{area}");
}

#[test]
fn frontal_area_counts_a_hidden_part_once() {
    // Two spheres of radius a, one 3a behind the other along the stream:
    // the silhouette is one disc, pi a^2 (the projection formula sum
    // |n_x| A / 2 counts it twice); side by side, 3a apart in y, two discs.
    let a = 0.5;
    let pair = |offset: tuft_mesh::Vector| {
        let mut m = generate::icosphere(a, 4);
        let other = m.clone();
        let n = m.vertices.len() as u32;
        m.vertices.extend(other.vertices.iter().map(|p| p + offset));
        m.triangles
            .extend(other.triangles.iter().map(|t| t.map(|v| v + n)));
        PanelMesh::new(m, Mirrors::none()).unwrap()
    };
    let disc = PI * a * a;
    let behind = frontal_area(&pair(tuft_mesh::Vector::new(3.0 * a, 0.0, 0.0)));
    assert!((behind - disc).abs() < 5e-3 * disc, "{behind}");
    let beside = frontal_area(&pair(tuft_mesh::Vector::new(0.0, 3.0 * a, 0.0)));
    assert!((beside - 2.0 * disc).abs() < 5e-3 * 2.0 * disc, "{beside}");
}

#[test]
fn bad_inputs_are_typed_errors() {
    let panels = plate(0.0, 1.0, 1.0);
    let r = reference(1.0);
    assert_eq!(
        integrate_loads(&panels, &[0.0], None, &r, &AIR),
        Err(LoadsError::CpLength {
            expected: 2,
            got: 1
        })
    );
    assert_eq!(
        integrate_loads(&panels, &[0.0, f64::NAN], None, &r, &AIR),
        Err(LoadsError::NonFinite { panel: 1 })
    );
    assert!(matches!(
        integrate_loads(&panels, &[0.0, 0.0], None, &reference(0.0), &AIR),
        Err(LoadsError::BadReference { what: "area", .. })
    ));
}
