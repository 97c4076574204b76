//! Boundary-layer screening over triangulated bodies on the exact
//! potential-flow surface velocity, against axisymmetric marches computed
//! here from the published formulas. Each assertion names its source.
#![allow(clippy::unwrap_used, clippy::expect_used)]

use nalgebra::{Point3, Vector3};
use tuft_mesh::TriMesh;
use tuft_mesh::{Mirrors, PanelMesh, generate};
use tuft_solver::boundary_layer::{
    BoundaryLayer, BoundaryLayerError, BoundaryLayerParams, FlowState, Transition, plateau_cp,
    screen_boundary_layer,
};
use tuft_solver::potential::{Freestream, solve_potential};

/// Exact surface velocity of an ellipsoid in a uniform stream along `d`
/// (a sphere, or a spheroid along its axis) at the panel centroids:
/// `V = (1 + k) U [d - (d.n) n]` (Lamb, Hydrodynamics, sec. 114-115).
fn ellipsoid_velocity(mesh: &PanelMesh, k: f64, speed: f64, d: Vector3<f64>) -> Vec<Vector3<f64>> {
    mesh.panels
        .iter()
        .map(|p| {
            let n = p.normal.into_inner();
            (d - n * d.dot(&n)) * (1.0 + k) * speed
        })
        .collect()
}

/// Lamb's added-mass coefficient of a prolate spheroid along its axis
/// (Lamb, ARC R&M 623, 1918): `alpha0 = 2(1 - e^2)/e^3 (artanh e - e)`,
/// `k = alpha0/(2 - alpha0)`.
fn spheroid_k(a: f64, b: f64) -> f64 {
    let e = (1.0 - b * b / (a * a)).sqrt();
    let alpha0 = 2.0 * (1.0 - e * e) / e.powi(3) * (e.atanh() - e);
    alpha0 / (2.0 - alpha0)
}

fn laminar(nu: f64) -> BoundaryLayerParams {
    BoundaryLayerParams {
        nu,
        transition: Transition::Laminar,
        ..BoundaryLayerParams::default()
    }
}

/// Every panel has a state; unresolved ones are counted.
fn check_accounting(layer: &BoundaryLayer, panels: usize) {
    assert_eq!(layer.panels.len(), panels);
    let counted = layer
        .panels
        .iter()
        .filter(|p| p.state == FlowState::Unresolved)
        .count();
    assert_eq!(counted, layer.unresolved);
}

/// Axisymmetric Thwaites separation (Thwaites 1949 with the Mangler metric,
/// Rott & Crabtree 1952) along a meridian given by `t -> (x, r, U, ds/dt)`
/// on `t` in (0, pi): the parameter `t` where `lambda = -0.09`.
fn axisymmetric_thwaites_separation(meridian: impl Fn(f64) -> (f64, f64, f64, f64)) -> f64 {
    let n = 200_000;
    let dt = std::f64::consts::PI / n as f64;
    let mut integral = 0.0; // integral of U^5 r^2 ds (theta^2 / nu scaled)
    let mut prev = meridian(0.0);
    for i in 1..n {
        let t = i as f64 * dt;
        let cur = meridian(t);
        let f = |m: (f64, f64, f64, f64)| m.2.powi(5) * m.1 * m.1 * m.3;
        integral += 0.5 * (f(prev) + f(cur)) * dt;
        let theta2_over_nu = 0.45 * integral / (cur.2.powi(6) * cur.1 * cur.1);
        let next = meridian(t + dt);
        let du_ds = (next.2 - prev.2) / (2.0 * dt * cur.3);
        if theta2_over_nu * du_ds < -0.09 {
            return t;
        }
        prev = cur;
    }
    panic!("no separation found")
}

#[test]
fn sphere_laminar_separation_line_all_round() {
    // Reference: axisymmetric Thwaites with U = 1.5 U_inf sin(phi), r = a
    // sin(phi): separation near 103.6 deg (derived here).
    let reference =
        axisymmetric_thwaites_separation(|t| (t.cos(), t.sin(), 1.5 * t.sin(), 1.0)).to_degrees();
    assert!((reference - 103.6).abs() < 0.3, "reference {reference}");
    // 20,480 panels: the piecewise-linear velocity puts the line about 1
    // degree late at this size (2.6 degrees at 5,120 panels).
    let mesh = PanelMesh::new(generate::icosphere(1.0, 5), Mirrors::none()).unwrap();
    // A yawed stream (20 deg) so the attachment point is not at a mesh axis.
    let yaw = 20f64.to_radians();
    let d = Vector3::new(yaw.cos(), yaw.sin(), 0.0);
    let velocity = ellipsoid_velocity(&mesh, 0.5, 20.0, d);
    let layer = screen_boundary_layer(&mesh, &velocity, 20.0, &laminar(1.5e-5)).unwrap();
    check_accounting(&layer, mesh.len());
    let mut octants = [0usize; 8];
    let mut separated = 0;
    for line in &layer.streamlines {
        let Some(i) = line.separated_at else { continue };
        separated += 1;
        let p = line.points[i].coords.normalize();
        let angle = (-p.dot(&d)).acos().to_degrees();
        // Within 3 degrees of the axisymmetric integral, all round.
        assert!((angle - reference).abs() < 3.0, "separation at {angle} deg");
        let side = p - d * p.dot(&d);
        let az = side.z.atan2(side.dot(&Vector3::new(-d.y, d.x, 0.0)));
        let oct = ((az + std::f64::consts::PI) / (std::f64::consts::PI / 4.0)) as usize;
        octants[oct.min(7)] += 1;
    }
    assert!(
        separated * 10 >= layer.streamlines.len() * 9,
        "{separated} of {} separate",
        layer.streamlines.len()
    );
    assert!(
        octants.iter().all(|&c| c > 0),
        "separation all round: {octants:?}"
    );
    // Nearly every panel reached (a screening that leaves patches unknown is
    // of little use): fewer than 2 % unresolved.
    assert!(
        layer.unresolved * 50 < mesh.len(),
        "{} unresolved",
        layer.unresolved
    );
    // Panels behind the separation line are separated, ahead of it laminar.
    for (p, l) in mesh.panels.iter().zip(&layer.panels) {
        let angle = (-p.centroid.coords.normalize().dot(&d)).acos().to_degrees();
        if angle < reference - 8.0 {
            assert_eq!(l.state, FlowState::Laminar, "panel at {angle} deg");
        } else if angle > reference + 8.0 && l.state != FlowState::Unresolved {
            assert_eq!(l.state, FlowState::Separated, "panel at {angle} deg");
        }
    }
}

/// A prolate spheroid, semi-axes `a` along x and `b`, from an icosphere.
fn spheroid(a: f64, b: f64, level: u32) -> PanelMesh {
    let mut m = generate::icosphere(1.0, level);
    m.map_vertices(|p| Point3::new(a * p.x, b * p.y, b * p.z));
    PanelMesh::new(m, Mirrors::none()).unwrap()
}

/// Meridian of the spheroid: `t -> (x, r, U/U_inf, ds/dt)`, with the exact
/// surface speed `(1 + k) sqrt(1 - n_x^2)` (Lamb sec. 115).
fn spheroid_meridian(a: f64, b: f64, k: f64) -> impl Fn(f64) -> (f64, f64, f64, f64) {
    move |t: f64| {
        let (x, r) = (-a * t.cos(), b * t.sin());
        let n = Vector3::new(x / (a * a), r / (b * b), 0.0).normalize();
        let ds = (a * a * t.sin().powi(2) + b * b * t.cos().powi(2)).sqrt();
        (x, r, (1.0 + k) * (1.0 - n.x * n.x).sqrt(), ds)
    }
}

#[test]
fn spheroid_laminar_separation_position() {
    let (a, b) = (2.0, 0.5);
    let k = spheroid_k(a, b);
    // Lamb's table: L/D 4 -> k = 0.082 (Lamb, Hydrodynamics sec. 115).
    assert!((k - 0.082).abs() < 1e-3);
    let t_sep = axisymmetric_thwaites_separation(spheroid_meridian(a, b, k));
    let x_ref = -a * t_sep.cos();
    let mesh = spheroid(a, b, 4);
    let velocity = ellipsoid_velocity(&mesh, k, 20.0, Vector3::x());
    let layer = screen_boundary_layer(&mesh, &velocity, 20.0, &laminar(1.5e-5)).unwrap();
    check_accounting(&layer, mesh.len());
    let xs: Vec<f64> = layer
        .streamlines
        .iter()
        .filter_map(|l| l.separated_at.map(|i| l.points[i].x))
        .collect();
    // Nine in ten lines separate (and there are lines to separate).
    assert!(!xs.is_empty() && xs.len() * 10 >= layer.streamlines.len() * 9);
    for x in xs {
        // Within 3 % of the body length of the axisymmetric integral.
        assert!(
            (x - x_ref).abs() < 0.03 * 2.0 * a,
            "separation at x {x}, reference {x_ref}"
        );
    }
}

/// Axisymmetric Head march (Head 1958, ARC R&M 3152; Cebeci-Bradshaw fits;
/// Ludwieg-Tillmann 1949) from the nose, RK4 in `t`, started at `t0` with
/// `theta0` and H = 1.4: returns theta at the station nearest `x_target`.
fn axisymmetric_head_theta(
    meridian: &impl Fn(f64) -> (f64, f64, f64, f64),
    speed: f64,
    nu: f64,
    t0: f64,
    theta0: f64,
    x_target: f64,
) -> f64 {
    let h1_of_h = |h: f64| {
        if h <= 1.6 {
            3.3 + 0.8234 * (h - 1.1).powf(-1.287)
        } else {
            3.3 + 1.5501 * (h - 0.6778).powf(-3.064)
        }
    };
    let h_of_h1 = |h1: f64| {
        if h1 >= 5.3 {
            1.1 + 0.86 * (h1 - 3.3).powf(-0.777)
        } else {
            0.6778 + 1.1536 * (h1 - 3.3).powf(-0.326)
        }
    };
    let dt = 1e-4;
    let rhs = |t: f64, th: f64, y: f64| {
        let (_, r, u, ds) = meridian(t);
        let (_, r1, u1, _) = meridian(t + 1e-6);
        let (_, r0, u0, _) = meridian(t - 1e-6);
        let du = (u1 - u0) * speed / (2e-6 * ds);
        let dr = (r1 - r0) / (2e-6 * ds);
        let (u, h1) = (u * speed, y / th);
        let h = h_of_h1(h1);
        let re = (u * th / nu).max(100.0);
        let cf = 0.246 * 10f64.powf(-0.678 * h) * re.powf(-0.268);
        let f = 0.0306 * (h1 - 3.0).powf(-0.6169);
        let dth = 0.5 * cf - (h + 2.0) * th * du / u - th * dr / r;
        let dy = f - y * (du / u + dr / r);
        (dth * ds, dy * ds)
    };
    let (mut t, mut th, mut y) = (t0, theta0, theta0 * h1_of_h(1.4));
    while meridian(t).0 < x_target {
        let k1 = rhs(t, th, y);
        let k2 = rhs(t + dt / 2.0, th + dt / 2.0 * k1.0, y + dt / 2.0 * k1.1);
        let k3 = rhs(t + dt / 2.0, th + dt / 2.0 * k2.0, y + dt / 2.0 * k2.1);
        let k4 = rhs(t + dt, th + dt * k3.0, y + dt * k3.1);
        th += dt / 6.0 * (k1.0 + 2.0 * k2.0 + 2.0 * k3.0 + k4.0);
        y += dt / 6.0 * (k1.1 + 2.0 * k2.1 + 2.0 * k3.1 + k4.1);
        t += dt;
    }
    th
}

#[test]
fn spheroid_turbulent_momentum_thickness_at_mid_length() {
    let (a, b, speed, nu) = (2.0, 0.5, 40.0, 1.5e-5);
    let k = spheroid_k(a, b);
    let meridian = spheroid_meridian(a, b, k);
    // Start a little behind the nose with the laminar stagnation theta
    // (lambda = 0.05625, derived) floored at Re_theta = 100, as the screening
    // does.
    let t0 = 0.05;
    let (_, _, u0, _) = meridian(t0);
    let s0 = b * t0; // near the nose ds/dt is about b
    let theta0 = (0.05625 * nu * s0 / (u0 * speed))
        .sqrt()
        .max(100.0 * nu / (u0 * speed));
    let reference = axisymmetric_head_theta(&meridian, speed, nu, t0, theta0, 0.0);
    let mesh = spheroid(a, b, 4);
    let velocity = ellipsoid_velocity(&mesh, k, speed, Vector3::x());
    let params = BoundaryLayerParams {
        nu,
        transition: Transition::Turbulent,
        ..BoundaryLayerParams::default()
    };
    let layer = screen_boundary_layer(&mesh, &velocity, speed, &params).unwrap();
    check_accounting(&layer, mesh.len());
    let mid: Vec<f64> = mesh
        .panels
        .iter()
        .zip(&layer.panels)
        .filter(|(p, l)| p.centroid.x.abs() < 0.05 && l.state == FlowState::Turbulent)
        .map(|(_, l)| l.theta)
        .collect();
    assert!(
        mid.len() > 20,
        "{} turbulent panels at mid-length",
        mid.len()
    );
    for theta in mid {
        // Within 15 % of the axisymmetric Head march (the spreading of the
        // traced lines and the panel velocities differ from the exact
        // meridian by a few percent).
        assert!(
            (theta / reference - 1.0).abs() < 0.15,
            "theta {theta} vs {reference}"
        );
    }
}

#[test]
fn bad_inputs_name_the_panel() {
    let mesh = PanelMesh::new(generate::icosphere(1.0, 2), Mirrors::none()).unwrap();
    let mut velocity = ellipsoid_velocity(&mesh, 0.5, 10.0, Vector3::x());
    let p = BoundaryLayerParams::default();
    assert_eq!(
        screen_boundary_layer(&mesh, &velocity[1..], 10.0, &p).unwrap_err(),
        BoundaryLayerError::VelocityCount {
            panels: mesh.len(),
            velocities: mesh.len() - 1
        }
    );
    velocity[17].y = f64::NAN;
    assert_eq!(
        screen_boundary_layer(&mesh, &velocity, 10.0, &p).unwrap_err(),
        BoundaryLayerError::NonFiniteVelocity { panel: 17 }
    );
    velocity[17].y = 0.0;
    assert!(matches!(
        screen_boundary_layer(&mesh, &velocity, 0.0, &p),
        Err(BoundaryLayerError::BadSpeed { .. })
    ));
    let bad = BoundaryLayerParams {
        nu: -1.0,
        ..BoundaryLayerParams::default()
    };
    assert!(matches!(
        screen_boundary_layer(&mesh, &velocity, 10.0, &bad),
        Err(BoundaryLayerError::BadParameter { name: "nu", .. })
    ));
}

/// A convex slant-back block: rounded nose (12 facets of 15 degrees), flat
/// roof, a 25-degree slant, a vertical base at x = 3.5 and a flat floor,
/// extruded over y in [-0.5, 0.5] with fan-triangulated side walls; panels
/// about `h` long.
fn slant_back_block(h: f64) -> TriMesh {
    let mut profile = Vec::new();
    for i in 0..=12 {
        let a = (270.0 - 15.0 * i as f64).to_radians();
        profile.push((0.5 + 0.5 * a.cos(), 0.5 + 0.5 * a.sin()));
    }
    let slant_end = 1.0 - 0.5 * 25f64.to_radians().tan();
    profile.extend([(3.0, 1.0), (3.5, slant_end), (3.5, 0.0)]);
    let mut ring = Vec::new();
    for i in 0..profile.len() {
        let (a, b) = (profile[i], profile[(i + 1) % profile.len()]);
        let n = (((b.0 - a.0).hypot(b.1 - a.1)) / h).ceil().max(1.0) as usize;
        for k in 0..n {
            let t = k as f64 / n as f64;
            ring.push((a.0 + (b.0 - a.0) * t, a.1 + (b.1 - a.1) * t));
        }
    }
    let (m, ny) = (ring.len(), (1.0 / h).ceil() as usize);
    let mut vertices: Vec<Point3<f64>> = (0..=ny)
        .flat_map(|j| {
            let y = -0.5 + j as f64 / ny as f64;
            ring.iter().map(move |&(x, z)| Point3::new(x, y, z))
        })
        .collect();
    let centre = ring.iter().fold((0.0, 0.0), |c, p| {
        (c.0 + p.0 / m as f64, c.1 + p.1 / m as f64)
    });
    vertices.push(Point3::new(centre.0, -0.5, centre.1));
    vertices.push(Point3::new(centre.0, 0.5, centre.1));
    let id = |i: usize, j: usize| (j * m + i % m) as u32;
    let mut triangles = Vec::new();
    for j in 0..ny {
        for i in 0..m {
            triangles.push([id(i, j), id(i + 1, j), id(i + 1, j + 1)]);
            triangles.push([id(i, j), id(i + 1, j + 1), id(i, j + 1)]);
        }
    }
    let (c0, c1) = ((vertices.len() - 2) as u32, (vertices.len() - 1) as u32);
    for i in 0..m {
        triangles.push([c0, id(i, 0), id(i + 1, 0)]);
        triangles.push([c1, id(i, ny), id(i + 1, ny)]);
    }
    // Convex body: orient every facet away from the centre.
    let mid = Point3::new(centre.0, 0.0, centre.1);
    for t in &mut triangles {
        let [a, b, c] = t.map(|v| vertices[v as usize]);
        if (b - a).cross(&(c - a)).dot(&(a - mid)) < 0.0 {
            t.swap(1, 2);
        }
    }
    TriMesh::new(vertices, triangles).unwrap()
}

/// A made-up attached-flow field on the block: the tangential part of
/// `U e_x` on the upstream-facing nose (a stagnation line at the front),
/// speed `U` along the roof, slant, floor and sides, and flow from the base
/// edges toward the base centre.
fn block_velocity(mesh: &PanelMesh, speed: f64) -> Vec<Vector3<f64>> {
    let d = Vector3::x();
    mesh.panels
        .iter()
        .map(|p| {
            let n = p.normal.into_inner();
            let tangential = d - n * d.dot(&n);
            if n.x > 0.99 {
                let to_centre = Point3::new(3.5, 0.0, 0.45) - p.centroid;
                to_centre * speed
            } else if n.x < -0.05 {
                tangential * speed
            } else {
                tangential.normalize() * speed
            }
        })
        .collect()
}

#[test]
fn bluff_base_edges_separate_and_a_slant_edge_is_left_to_the_layer() {
    let h = 0.1;
    let mesh = PanelMesh::new(slant_back_block(h), Mirrors::none()).unwrap();
    assert!(
        mesh.edge_neighbours.iter().flatten().all(Option::is_some),
        "closed"
    );
    let speed = 20.0;
    let velocity = block_velocity(&mesh, speed);
    let params = BoundaryLayerParams {
        transition: Transition::Turbulent,
        ..BoundaryLayerParams::default()
    };
    let layer = screen_boundary_layer(&mesh, &velocity, speed, &params).unwrap();
    check_accounting(&layer, mesh.len());
    let base = |t: usize| mesh.panels[t].normal.x > 0.99;
    let mut reaching = 0;
    for line in &layer.streamlines {
        if !line.panels.iter().any(|&t| base(t as usize)) {
            continue;
        }
        reaching += 1;
        // Flow does not turn a sharp 90-degree corner (common practice): the
        // line separates at the base edge, within one panel of it.
        let i = line.separated_at.expect("separates at the base edge");
        let x = line.points[i].x;
        assert!((x - 3.5).abs() <= 1.0 * h, "separation at x = {x}");
    }
    assert!(reaching > 10, "{reaching} lines reach the base");
    // The 25-degree slant is not a bluff edge: with a constant edge speed
    // the turbulent layer stays attached over it (Head's H stays near its
    // flat-plate value, Schlichting ch. 21), so no panel ahead of the base is
    // separated (among the panels a line crossed: filled ones copy a
    // neighbour).
    let mut crossed = vec![false; mesh.len()];
    for line in &layer.streamlines {
        for &t in &line.panels {
            crossed[t as usize] = true;
        }
    }
    for (t, l) in layer.panels.iter().enumerate() {
        let vertices = mesh.panels[t].vertices;
        if crossed[t] && vertices.iter().all(|v| v.x < 3.5 - 1e-9) {
            assert_ne!(l.state, FlowState::Separated, "panel {t} ahead of the base");
        }
    }
    // Every resolved base panel is separated and holds the plateau Cp of
    // its separation point: there the attached speed is U, Cp = 0 (the
    // plateau model of the screening; Bernoulli for the attached Cp).
    let cp: Vec<f64> = velocity
        .iter()
        .map(|v| 1.0 - (v.norm() / speed).powi(2))
        .collect();
    let plateau = plateau_cp(&mesh, &cp, &layer);
    let mut base_panels = 0;
    for t in (0..mesh.len()).filter(|&t| base(t)) {
        if layer.panels[t].state == FlowState::Unresolved {
            continue;
        }
        base_panels += 1;
        assert_eq!(
            layer.panels[t].state,
            FlowState::Separated,
            "base panel {t} {:?} crossed {}",
            layer.panels[t],
            crossed[t]
        );
        assert!(
            plateau[t].abs() < 1e-9,
            "plateau Cp {} on base panel {t} crossed {} src {:?} {:?}",
            plateau[t],
            crossed[t],
            layer.separation_source[t],
            layer.separation_source[t]
                .map(|s| (mesh.panels[s as usize].centroid, crossed[s as usize]))
        );
    }
    assert!(base_panels * 2 > (0..mesh.len()).filter(|&t| base(t)).count());
}

#[test]
fn hemisphere_on_the_ground_plane() {
    // A sphere whose centre lies on the ground plane is its own image, so the
    // exact velocity is still 1.5 U_inf [e_x - (e_x.n) n] (Lamb sec. 92,
    // images in a plane); the upper half with a ground mirror at z = 0 must
    // give the same separation line as the full sphere: the axisymmetric
    // Thwaites integral (derived, 103.6 deg), within 3 degrees. The lines
    // that run along the cut end at the mirror-plane boundary.
    let full = generate::latlong_sphere(1.0, 90, 120);
    let triangles: Vec<[u32; 3]> = full
        .triangles
        .iter()
        .copied()
        .filter(|t| t.iter().map(|&v| full.vertices[v as usize].z).sum::<f64>() > 0.0)
        .collect();
    let half = TriMesh::new(full.vertices.clone(), triangles).unwrap();
    let mesh = PanelMesh::new(half, Mirrors::ground(0.0)).unwrap();
    let open = mesh
        .edge_neighbours
        .iter()
        .flatten()
        .filter(|n| n.is_none())
        .count();
    assert!(open > 100, "the cut leaves open edges on the ground plane");
    let velocity = ellipsoid_velocity(&mesh, 0.5, 20.0, Vector3::x());
    let layer = screen_boundary_layer(&mesh, &velocity, 20.0, &laminar(1.5e-5)).unwrap();
    check_accounting(&layer, mesh.len());
    let reference =
        axisymmetric_thwaites_separation(|t| (t.cos(), t.sin(), 1.5 * t.sin(), 1.0)).to_degrees();
    let mut separated = 0;
    for line in &layer.streamlines {
        let Some(i) = line.separated_at else { continue };
        separated += 1;
        let angle = (-line.points[i].coords.normalize().x).acos().to_degrees();
        assert!((angle - reference).abs() < 3.0, "separation at {angle} deg");
        assert!(
            line.points.iter().all(|p| p.z > -1e-9),
            "lines stay on the half model"
        );
    }
    assert!(separated * 10 >= layer.streamlines.len() * 9);
    assert!(
        layer.unresolved * 50 < mesh.len(),
        "{} unresolved",
        layer.unresolved
    );
}

#[test]
fn sphere_through_the_panel_solution() {
    // The same sphere check, now on the panel method's own surface velocity
    // (icosphere, 1,280 panels): its Cp error is of order of the panel
    // size or better (tests/potential_sphere.rs measures the order), so
    // the separation line may move by a few degrees from the
    // axisymmetric Thwaites integral (derived, 103.6 deg): within 6 degrees,
    // and every panel resolved or counted.
    let mesh = PanelMesh::new(generate::icosphere(1.0, 3), Mirrors::none()).unwrap();
    let solution = solve_potential(&mesh, &Freestream::new(20.0, 0.0)).unwrap();
    let layer = screen_boundary_layer(&mesh, &solution.velocity, 20.0, &laminar(1.5e-5)).unwrap();
    check_accounting(&layer, mesh.len());
    let reference =
        axisymmetric_thwaites_separation(|t| (t.cos(), t.sin(), 1.5 * t.sin(), 1.0)).to_degrees();
    let angles: Vec<f64> = layer
        .streamlines
        .iter()
        .filter_map(|l| l.separated_at.map(|i| l.points[i]))
        .map(|p| (-p.coords.normalize().x).acos().to_degrees())
        .collect();
    assert!(angles.len() * 10 >= layer.streamlines.len() * 9);
    for a in &angles {
        assert!((a - reference).abs() < 6.0, "separation at {a} deg");
    }
    assert!(
        layer.unresolved * 20 < mesh.len(),
        "{} unresolved",
        layer.unresolved
    );
    // The plateau holds the separated panels at their separation Cp, which
    // lies between the attached minimum (-1.25, Lamb) and zero.
    let plateau = tuft_solver::boundary_layer::plateau_cp(&mesh, &solution.cp, &layer);
    for (l, cp) in layer.panels.iter().zip(&plateau) {
        if l.state == FlowState::Separated {
            assert!(*cp < 0.0 && *cp > -1.4, "plateau Cp {cp}");
        }
    }
}

#[test]
fn spreading_on_a_sphere_is_the_axisymmetric_metric() {
    // On a body of revolution the spreading (1/h) dh/ds of the meridians is
    // r'/r = cot(phi)/a (Mangler; Rott & Crabtree 1952). The least-squares
    // surface divergence of the exact flow direction must match it away from
    // the poles, converging at first order in the panel size (rms error
    // about 0.009/a at 20,480 panels, halving with each subdivision). The
    // largest errors sit at the icosahedron's valence-5 vertices, where the
    // flat facets' normals tilt the sampled field: below 0.15/a.
    let rms = |level: u32| {
        let mesh = PanelMesh::new(generate::icosphere(1.0, level), Mirrors::none()).unwrap();
        let velocity = ellipsoid_velocity(&mesh, 0.5, 1.0, Vector3::x());
        let field = tuft_solver::boundary_layer::field::SurfaceField::new(&mesh, &velocity);
        let errors: Vec<f64> = mesh
            .panels
            .iter()
            .zip(&field.spreading)
            .filter_map(|(p, div)| {
                let phi = (-p.centroid.coords.normalize().x).acos();
                let band = phi.to_degrees() > 30.0 && phi.to_degrees() < 150.0;
                band.then(|| div - phi.cos() / phi.sin())
            })
            .collect();
        let max = errors.iter().fold(0.0f64, |m, e| m.max(e.abs()));
        assert!(max < 0.15, "level {level}: max error {max}");
        (errors.iter().map(|e| e * e).sum::<f64>() / errors.len() as f64).sqrt()
    };
    let (coarse, fine) = (rms(4), rms(5));
    assert!(fine < 0.015, "rms error {fine}");
    assert!(
        fine < 0.6 * coarse,
        "first-order convergence: {coarse} -> {fine}"
    );
}

#[test]
fn a_surface_at_rest_is_unresolved_not_a_panic() {
    // No tangential velocity anywhere: no line can be traced; every panel is
    // reported unresolved (or no attachment is found), never a panic.
    let mesh = PanelMesh::new(generate::icosphere(1.0, 2), Mirrors::none()).unwrap();
    let velocity = vec![Vector3::zeros(); mesh.len()];
    match screen_boundary_layer(&mesh, &velocity, 10.0, &BoundaryLayerParams::default()) {
        Ok(layer) => {
            check_accounting(&layer, mesh.len());
            assert_eq!(layer.unresolved, mesh.len());
        }
        Err(e) => assert_eq!(e, BoundaryLayerError::NoAttachment),
    }
}

/// Fraction of the slant panels of an Ahmed-type half body (2,000 panels,
/// ground and symmetry mirrors, 40 m/s, free transition) that the screening
/// marks separated, and whether every resolved base panel is separated.
fn ahmed_slant_separation(slant_deg: f64) -> (f64, bool) {
    let mesh = tuft_tests::half_ahmed(slant_deg, 4000).unwrap();
    let solution = solve_potential(&mesh, &Freestream::new(40.0, 0.0)).unwrap();
    let params = BoundaryLayerParams {
        flow_direction: Some(Vector3::x()),
        ..BoundaryLayerParams::default()
    };
    let layer = screen_boundary_layer(&mesh, &solution.velocity, 40.0, &params).unwrap();
    check_accounting(&layer, mesh.len());
    assert!(
        layer.unresolved * 10 < mesh.len(),
        "{} unresolved",
        layer.unresolved
    );
    let state = |t: usize| layer.panels[t].state;
    let slant: Vec<usize> = (0..mesh.len())
        .filter(|&t| {
            let n = mesh.panels[t].normal;
            n.x > 0.05 && n.x < 0.95 && n.z > 0.3
        })
        .collect();
    let separated = slant
        .iter()
        .filter(|&&t| state(t) == FlowState::Separated)
        .count();
    let base: Vec<usize> = (0..mesh.len())
        .filter(|&t| mesh.panels[t].normal.x > 0.95 && state(t) != FlowState::Unresolved)
        .collect();
    // Not true of an empty set: the base must have resolved panels.
    let base_separated = !base.is_empty() && base.iter().all(|&t| state(t) == FlowState::Separated);
    (separated as f64 / slant.len() as f64, base_separated)
}

#[test]
fn ahmed_slant_regimes_through_the_panel_solution() {
    // Ahmed, Ramm & Faltin (SAE 840300, 1984): below a slant of about 12
    // degrees the flow stays attached over the slant; between 12.5 and 30 a
    // separation bubble sits on it; above 30 the flow leaves the slant edge.
    // The screening is attached-flow only (no wake loop), so it is checked
    // for the regimes' order, not their full extent: no separation at 10
    // degrees, at 25 at least the 20 % that the regime lines call partly
    // separated (the lines of tests/separated_wakes.rs and the region
    // verdicts, our choice), at least 40 % of the slant at 35, growing
    // with the angle. The vertical base separates at its edges whatever
    // the slant (flow does not turn a sharp corner, common practice).
    let (f10, b10) = ahmed_slant_separation(10.0);
    let (f25, b25) = ahmed_slant_separation(25.0);
    let (f35, b35) = ahmed_slant_separation(35.0);
    println!(
        "attached screening, slant separated: 10 deg {f10:.2}, 25 deg {f25:.2}, 35 deg {f35:.2}"
    );
    assert_eq!(f10, 0.0, "10 degrees: attached");
    assert!(
        f25 >= 0.2 && f25 < f35,
        "25 degrees: {f25}, 35 degrees: {f35}"
    );
    assert!(f35 >= 0.4, "35 degrees: {f35}");
    assert!(b10 && b25 && b35, "base separated");
}
