//! Velocity off the body against the exact sphere flow, the inside test,
//! the ground-plane identity of the image method, and the treecode
//! against the direct sum.
#![allow(clippy::unwrap_used, clippy::expect_used)]

use tuft_mesh::generate::AhmedParams;
use tuft_mesh::{Mirrors, PanelMesh, Point, Vector, generate};
use tuft_solver::offbody::{FlowField, OffBodyMethod, OffBodyParams};
use tuft_solver::potential::{Freestream, PotentialSolution, solve_potential};

/// Exact potential flow past a sphere of radius `a` centred at the origin,
/// free stream `U e_x`: `phi = U x (1 + a^3 / (2 r^3))`, so
/// `V = U [(1 + a^3/(2 r^3)) e_x - (3 a^3 x / (2 r^5)) r]`
/// (Lamb, Hydrodynamics, 6th ed., 1932, sec. 92).
fn sphere_velocity(p: &Point, a: f64, u: f64) -> Vector {
    let r = p.coords.norm();
    let a3 = a.powi(3);
    (Vector::x() * (1.0 + a3 / (2.0 * r.powi(3))) - p.coords * (3.0 * a3 * p.x / (2.0 * r.powi(5))))
        * u
}

/// Points on a few shells, directions from a seeded golden-angle spiral.
fn shell_points(radius: f64, count: usize) -> Vec<Point> {
    let golden = std::f64::consts::PI * (3.0 - 5f64.sqrt());
    (0..count)
        .map(|k| {
            let z = 1.0 - 2.0 * (k as f64 + 0.5) / count as f64;
            let s = (1.0 - z * z).sqrt();
            let th = golden * k as f64;
            Point::new(s * th.cos(), s * th.sin(), z) * radius
        })
        .collect()
}

#[test]
fn sphere_velocity_off_the_body_matches_lamb() {
    // Icosphere of 1280 panels, panel size (longest edge) about 0.11 a.
    // Off-body error comes from the discretised surface (order h^2 in mu,
    // inscribed facets). Seen: 4.8e-3 U one panel size out, 3.1e-3 at two,
    // 9.3e-4 at r = 2a, 1.2e-4 at r = 4a; allowed: about 1.6 to 4 times
    // that.
    let a = 1.0;
    let u = 2.0;
    let mesh = PanelMesh::new(generate::icosphere(a, 3), Mirrors::none()).unwrap();
    let sol = solve_potential(&mesh, &Freestream::new(u, 0.0)).unwrap();
    let field = FlowField::new(&mesh, &sol.sigma, &sol.mu, Vector::x() * u, None).unwrap();
    let h = mesh.panels.iter().map(|p| p.size).fold(0.0, f64::max);
    for (radius, tol) in [
        (a + h, 2e-2),
        (a + 2.0 * h, 5e-3),
        (2.0 * a, 2e-3),
        (4.0 * a, 5e-4),
    ] {
        let points = shell_points(radius, 200);
        let got = field.velocities(&points);
        let worst = points
            .iter()
            .zip(&got)
            .map(|(p, v)| (v.unwrap() - sphere_velocity(p, a, u)).norm() / u)
            .fold(0.0, f64::max);
        println!("r/a {radius:.3}: max |V - V_exact| / U = {worst:.2e}");
        assert!(worst < tol, "r {radius}: {worst}");
    }
    // Pressure from Bernoulli at the side of the sphere, r = 2a, x = 0:
    // V = U (1 + 1/16), Cp = 1 - (17/16)^2 (Lamb).
    let cp = field.pressure_coefficients(&[Point::new(0.0, 2.0, 0.0)])[0].unwrap();
    assert!((cp - (1.0 - (17.0f64 / 16.0).powi(2))).abs() < 5e-3, "{cp}");
}

#[test]
fn points_inside_the_body_and_its_image_are_flagged() {
    // Gauss: the solid angle of a closed surface is -4 pi inside, 0 outside.
    let mut sphere = generate::icosphere(0.5, 2);
    sphere.map_vertices(|p| p + Vector::new(0.0, 0.0, 1.0));
    let mesh = PanelMesh::new(sphere, Mirrors::ground(0.0)).unwrap();
    let sol = solve_potential(&mesh, &Freestream::new(1.0, 0.0)).unwrap();
    let field = FlowField::new(&mesh, &sol.sigma, &sol.mu, Vector::x(), None).unwrap();
    let inside = [Point::new(0.0, 0.0, 1.0), Point::new(0.3, 0.1, 1.2)];
    let image = Point::new(0.0, 0.0, -1.0);
    let outside = [Point::new(0.0, 0.0, 1.6), Point::new(-0.8, 0.0, 1.0)];
    for p in inside {
        assert!(field.velocity(&p).is_none() && field.is_inside(&p), "{p}");
    }
    assert!(field.is_inside(&image) && field.velocity(&image).is_none());
    for p in outside {
        assert!(field.velocity(&p).is_some() && !field.is_inside(&p), "{p}");
    }
}

#[test]
fn ground_plane_has_no_normal_velocity() {
    // Image method: the reflected body makes the flow mirror-symmetric
    // about z = h, so w = 0 on the plane exactly (to round-off), in the
    // direct sum and in the treecode (which walks the real panels' tree at
    // the mirrored point, the same point on the plane).
    let mut sphere = generate::icosphere(0.5, 3);
    sphere.map_vertices(|p| p + Vector::new(0.0, 0.0, 0.75));
    let h = 0.0;
    let mesh = PanelMesh::new(sphere, Mirrors::ground(h)).unwrap();
    let sol = solve_potential(&mesh, &Freestream::new(1.0, 0.0)).unwrap();
    let points: Vec<Point> = (0..50)
        .map(|k| Point::new(-1.5 + 0.06 * k as f64, 0.3 - 0.01 * k as f64, h))
        .collect();
    for method in [OffBodyMethod::Direct, OffBodyMethod::Tree] {
        let field = field_with(&mesh, &sol, method, 6.0);
        let mut largest_u: f64 = 0.0;
        for v in field.velocities(&points) {
            let v = v.unwrap();
            assert!(v.z.abs() < 1e-12, "{method:?}: w = {}", v.z);
            largest_u = largest_u.max((v.x - 1.0).abs());
        }
        // ... and the flow there is disturbed (the check is not vacuous).
        assert!(largest_u > 0.05, "{largest_u}");
    }
}

#[test]
fn circulation_round_a_wing_section_equals_the_wake_jump() {
    // Stokes: the circulation round a loop that links the wake sheet once
    // equals the jump of the potential across the sheet, which the Kutta
    // condition sets to the wake strength: counter-clockwise in the x-z
    // plane (x right, z up), Gamma = phi_below - phi_above = mu_w for a
    // wake whose normal points up (Katz & Plotkin 2001, sec. 9.3; a
    // constant doublet sheet of strength mu has a potential jump -mu
    // towards its normal side). This checks the wake's ring velocity, its
    // sign and the body kernels together.
    use tuft_mesh::generate::{WingParams, wing_with_params};
    use tuft_solver::wake::solve_potential_with_wake;
    let w = WingParams {
        span: 4.0,
        chord: 1.0,
        alpha_deg: 5.0,
        chord_panels: 12,
        span_panels: 8,
        ..WingParams::default()
    };
    let mesh = PanelMesh::new(wing_with_params(&w).unwrap().mesh, Mirrors::none()).unwrap();
    let sol = solve_potential_with_wake(&mesh, &Freestream::new(1.0, 0.0)).unwrap();
    // The wake panel just off midspan; the loop in its mid-plane.
    let k = sol
        .wake
        .panels
        .iter()
        .position(|q| q[0].y.min(q[1].y) >= -1e-9)
        .unwrap();
    let q = sol.wake.panels[k];
    let y = 0.5 * (q[0].y + q[1].y);
    let zc = q[0].z;
    let corners = [
        Point::new(-1.0, y, zc - 1.0),
        Point::new(3.0, y, zc - 1.0),
        Point::new(3.0, y, zc + 1.0),
        Point::new(-1.0, y, zc + 1.0),
    ];
    let mu_w = sol.wake.strength[k];
    assert!(mu_w.abs() > 0.05, "the wing lifts: {mu_w}");
    // The body sum directly (the default at this size) and on the
    // treecode; the wake rings are summed directly in both.
    let s = &sol.solution;
    let tree = OffBodyParams {
        method: OffBodyMethod::Tree,
        ..OffBodyParams::default()
    };
    let v = s.freestream.velocity();
    let fields = [
        FlowField::from_wake_solution(&mesh, &sol).unwrap(),
        FlowField::with_params(&mesh, &s.sigma, &s.mu, v, Some(&sol.wake), tree).unwrap(),
    ];
    for field in &fields {
        let gamma = circulation(field, &corners, 200);
        let tree = field.uses_tree();
        println!("treecode {tree}: circulation {gamma:.6}, wake strength {mu_w:.6}");
        // Quadrature error of a smooth integrand (Simpson, 200 intervals
        // a side): 5e-6 relative seen, 1e-4 allowed.
        assert!(
            (gamma - mu_w).abs() < 1e-4 * mu_w.abs(),
            "treecode {tree}: {gamma} vs {mu_w}"
        );
    }
}

/// Circulation round the closed polygon `corners`, composite Simpson rule
/// with `n` (even) intervals a side.
fn circulation(field: &FlowField, corners: &[Point], n: usize) -> f64 {
    let mut gamma = 0.0;
    for s in 0..corners.len() {
        let (a, b) = (corners[s], corners[(s + 1) % corners.len()]);
        let pts: Vec<Point> = (0..=n)
            .map(|i| a + (b - a) * (i as f64 / n as f64))
            .collect();
        for (i, v) in field.velocities(&pts).iter().enumerate() {
            let wgt = if i == 0 || i == n {
                1.0
            } else if i % 2 == 1 {
                4.0
            } else {
                2.0
            };
            gamma += wgt * v.unwrap().dot(&(b - a)) / (3.0 * n as f64);
        }
    }
    gamma
}

#[test]
fn treecode_matches_the_direct_sum_on_a_half_model() {
    // Ground and symmetry planes: three images, one of them touching the
    // body along y = 0, all evaluated by mirroring the point into the real
    // tree. Reference and tolerance as in the tests above; points on both
    // sides of the symmetry plane.
    let mesh = tuft_tests::half_ahmed(AhmedParams::default().slant_deg, 3000).unwrap();
    let pts = slice_points(&mesh, 40, 300);
    assert!(pts.iter().any(|p| p.y < -0.05) && pts.iter().any(|p| p.y > 0.05));
    let (exact, _, flags) = tree_against_reference(&mesh, "half Ahmed-type body", &pts);
    assert!(exact < 1e-4, "{exact:.2e}");
    assert_eq!(flags, 0);
}

fn field_with(
    mesh: &PanelMesh,
    sol: &PotentialSolution,
    method: OffBodyMethod,
    far_field_ratio: f64,
) -> FlowField {
    let params = OffBodyParams {
        method,
        far_field_ratio,
        ..OffBodyParams::default()
    };
    let v = sol.freestream.velocity();
    FlowField::with_params(mesh, &sol.sigma, &sol.mu, v, None, params).unwrap()
}

/// Points of two flow slices like those `tuft run` writes (the plane
/// y = 0 and the horizontal plane through the middle of the body, from
/// 0.3 lengths ahead to 0.6 behind), `n` samples along the length,
/// plus shells at 1.5 and 3 panel sizes off each of `near` panels.
fn slice_points(mesh: &PanelMesh, n: usize, near: usize) -> Vec<Point> {
    let (lo, hi) = mesh.bounds();
    let len = hi.x - lo.x;
    let (x0, x1) = (lo.x - 0.3 * len, hi.x + 0.6 * len);
    let z0 = mesh.mirrors.ground.unwrap_or(lo.z - 0.5 * len) + 1e-3 * len;
    let (z1, zm, yw) = (hi.z + 0.5 * len, 0.5 * (lo.z + hi.z), hi.y - lo.y);
    let step = (x1 - x0) / n as f64;
    let mut pts = Vec::new();
    for i in 0..=n {
        let x = x0 + step * i as f64;
        let mut z = z0;
        while z <= z1 {
            pts.push(Point::new(x, 0.0, z));
            z += step;
        }
        // From beyond the body's side (not on it: a point on the surface
        // is inside or outside by round-off).
        let mut y = -1.2 * yw;
        while y <= 1.2 * yw {
            pts.push(Point::new(x, y, zm));
            y += step;
        }
    }
    let every = (mesh.len() / near).max(1);
    for p in mesh.panels.iter().step_by(every) {
        for k in [1.5, 3.0] {
            pts.push(p.centroid + p.normal.into_inner() * (k * p.size));
        }
    }
    pts
}

/// Largest `|V_tree - V| / U` over the points against the exact direct
/// sum and against the default direct sum, and the number of points the
/// treecode and the exact sum flag differently as inside.
fn tree_against_reference(mesh: &PanelMesh, name: &str, pts: &[Point]) -> (f64, f64, usize) {
    let sol = solve_potential(mesh, &Freestream::new(1.0, 0.0)).unwrap();
    let tree = field_with(mesh, &sol, OffBodyMethod::Tree, 6.0);
    assert!(tree.uses_tree());
    let exact = field_with(mesh, &sol, OffBodyMethod::Direct, f64::INFINITY);
    let direct = field_with(mesh, &sol, OffBodyMethod::Direct, 6.0);
    let t0 = std::time::Instant::now();
    let vt = tree.velocities(pts);
    let tt = t0.elapsed().as_secs_f64();
    let t0 = std::time::Instant::now();
    let ve = exact.velocities(pts);
    let te = t0.elapsed().as_secs_f64();
    let vd = direct.velocities(pts);
    let (mut worst_exact, mut worst_direct, mut flags) = (0.0f64, 0.0f64, 0);
    for (((t, e), d), p) in vt.iter().zip(&ve).zip(&vd).zip(pts) {
        if let (Some(t), Some(e)) = (t, e) {
            worst_exact = worst_exact.max((t - e).norm());
        }
        if let (Some(t), Some(d)) = (t, d) {
            worst_direct = worst_direct.max((t - d).norm());
        }
        if t.is_some() != e.is_some() {
            eprintln!(
                "inside flag differs at {p}: tree {} exact {} direct {}",
                t.is_some(),
                e.is_some(),
                d.is_some()
            );
            flags += 1;
        }
    }
    eprintln!(
        "{name}: {} panels, {} points: tree {tt:.2} s, exact direct sum {te:.2} s; \
         max |V_tree - V_exact| / U = {worst_exact:.2e}, against the direct sum with \
         point kernels beyond 6 sizes {worst_direct:.2e}; {flags} inside flags differ",
        mesh.len(),
        pts.len()
    );
    (worst_exact, worst_direct, flags)
}

#[test]
fn treecode_matches_the_direct_sum_on_a_sphere_over_the_ground() {
    // Reference: the direct sum over every panel and image with the exact
    // kernels everywhere (Hess & Smith 1967, sec. 4.3; Katz & Plotkin
    // 2001, eqs. 10.92-10.93 and 10.115). Tolerance 1e-4 of the free
    // stream, the treecode's stated tolerance (seen 1e-5 to 2e-5; the
    // default direct sum, with point kernels beyond 6 panel sizes, is
    // printed too: it is further from the exact sum, several 1e-4).
    let mut sphere = generate::icosphere(0.5, 4);
    sphere.map_vertices(|p| p + Vector::new(0.0, 0.0, 0.6));
    let mesh = PanelMesh::new(sphere, Mirrors::ground(0.0)).unwrap();
    let pts = slice_points(&mesh, 40, 300);
    let (exact, _, flags) = tree_against_reference(&mesh, "sphere over the ground", &pts);
    assert!(exact < 1e-4, "{exact:.2e}");
    assert_eq!(flags, 0);
}

#[test]
fn treecode_matches_the_direct_sum_on_the_ahmed_body() {
    // As above, on the Ahmed-type body (sharp edges, flat faces, a slant)
    // over the ground at 5,000 panels.
    let body = generate::ahmed_with_params(&AhmedParams {
        panels: 5000,
        ..AhmedParams::default()
    })
    .unwrap();
    let mesh = PanelMesh::new(body, Mirrors::ground(0.0)).unwrap();
    let pts = slice_points(&mesh, 50, 300);
    let (exact, _, flags) = tree_against_reference(&mesh, "Ahmed-type body", &pts);
    assert!(exact < 1e-4, "{exact:.2e}");
    assert_eq!(flags, 0);
}

#[test]
fn treecode_gives_the_exact_sphere_flow() {
    // Lamb's sphere flow (see `sphere_velocity`) through the treecode, at
    // 5,120 panels (panel size about 0.055 a), so the default settings
    // choose the tree. The discretisation error falls as h^2 (half the
    // direct-sum test's at 1,280 panels was seen: 2.2e-3, 1.2e-3, 2.3e-4
    // and 2.8e-5 U); allowed about twice what was seen.
    let (a, u) = (1.0, 2.0);
    let mesh = PanelMesh::new(generate::icosphere(a, 4), Mirrors::none()).unwrap();
    let sol = solve_potential(&mesh, &Freestream::new(u, 0.0)).unwrap();
    let field = FlowField::new(&mesh, &sol.sigma, &sol.mu, Vector::x() * u, None).unwrap();
    assert!(field.uses_tree(), "default settings pick the tree here");
    let h = mesh.panels.iter().map(|p| p.size).fold(0.0, f64::max);
    for (radius, tol) in [
        (a + h, 5e-3),
        (a + 2.0 * h, 3e-3),
        (2.0 * a, 5e-4),
        (4.0 * a, 6e-5),
    ] {
        let points = shell_points(radius, 200);
        let worst = points
            .iter()
            .zip(field.velocities(&points))
            .map(|(p, v)| (v.unwrap() - sphere_velocity(p, a, u)).norm() / u)
            .fold(0.0, f64::max);
        eprintln!("tree, r/a {radius:.3}: max |V - V_exact| / U = {worst:.2e}");
        assert!(worst < tol, "r {radius}: {worst}");
    }
    assert!(field.velocity(&Point::new(0.2, -0.3, 0.1)).is_none());
    assert!(field.is_inside(&Point::origin()));
}

/// Study behind the treecode's default settings (not a check): error
/// against the exact direct sum and time for a few opening ratios and
/// orders on the Ahmed-type body over the ground (times: the fastest of
/// three evaluations). Run with
/// `TUFT_STUDY_PANELS=10000 cargo test --release -p tuft-tests --test
/// offbody treecode_settings_study -- --ignored --nocapture`.
#[test]
#[ignore = "study; prints a table"]
fn treecode_settings_study() {
    use tuft_solver::offbody::treecode::TreecodeParams;
    let panels = std::env::var("TUFT_STUDY_PANELS").map_or(10_000, |s| s.parse().unwrap());
    let body = generate::ahmed_with_params(&AhmedParams {
        panels,
        ..AhmedParams::default()
    })
    .unwrap();
    let mesh = PanelMesh::new(body, Mirrors::ground(0.0)).unwrap();
    let sol = solve_potential(&mesh, &Freestream::new(1.0, 0.0)).unwrap();
    let pts = slice_points(&mesh, 60, 300);
    // Fastest of three evaluations (the machine is shared).
    let timed = |f: &FlowField| {
        let mut best = f64::INFINITY;
        let mut v = Vec::new();
        for _ in 0..3 {
            let t0 = std::time::Instant::now();
            v = f.velocities(&pts);
            best = best.min(t0.elapsed().as_secs_f64());
        }
        (v, best)
    };
    let (exact, te) = timed(&field_with(
        &mesh,
        &sol,
        OffBodyMethod::Direct,
        f64::INFINITY,
    ));
    let err = |a: &[Option<Vector>]| {
        a.iter()
            .zip(&exact)
            .filter_map(|(a, b)| Some((a.as_ref()? - b.as_ref()?).norm()))
            .fold(0.0, f64::max)
    };
    let (direct, td) = timed(&field_with(&mesh, &sol, OffBodyMethod::Direct, 6.0));
    eprintln!(
        "{} panels, {} points: exact direct sum {te:.2} s",
        mesh.len(),
        pts.len()
    );
    eprintln!(
        "direct sum, point kernels beyond 6 sizes: {td:.2} s, max error {:.2e} U",
        err(&direct)
    );
    for (opening, order) in [(0.3, 6), (0.35, 6), (0.35, 7), (0.4, 6), (0.4, 8), (0.5, 8)] {
        let params = OffBodyParams {
            method: OffBodyMethod::Tree,
            treecode: TreecodeParams {
                opening,
                order,
                ..TreecodeParams::default()
            },
            ..OffBodyParams::default()
        };
        let v = sol.freestream.velocity();
        let f = FlowField::with_params(&mesh, &sol.sigma, &sol.mu, v, None, params).unwrap();
        let (vt, tt) = timed(&f);
        eprintln!(
            "treecode theta {opening} order {order}: {tt:.2} s, max error {:.2e} U",
            err(&vt)
        );
    }
}

#[test]
fn bad_treecode_settings_are_refused() {
    use tuft_solver::offbody::OffBodyError;
    use tuft_solver::offbody::treecode::TreecodeParams;
    let mesh = PanelMesh::new(generate::icosphere(1.0, 1), Mirrors::none()).unwrap();
    let sol = solve_potential(&mesh, &Freestream::new(1.0, 0.0)).unwrap();
    for opening in [0.0, 1.0, f64::NAN] {
        let params = OffBodyParams {
            treecode: TreecodeParams {
                opening,
                ..TreecodeParams::default()
            },
            ..OffBodyParams::default()
        };
        let v = Vector::x();
        let err = FlowField::with_params(&mesh, &sol.sigma, &sol.mu, v, None, params).unwrap_err();
        assert!(
            matches!(err, OffBodyError::BadOpening(_)),
            "{opening}: {err}"
        );
    }
}
