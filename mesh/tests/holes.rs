//! Hole filling: missing facets of a coarse file are filled at the local
//! resolution, a fan that would fold gives way to ear clipping, and large
//! openings are refused with every one of them named.
#![allow(clippy::unwrap_used, clippy::expect_used)]

mod common;

use std::path::Path;

use common::{closed, grid_cube};
use tuft_mesh::import::read_stl;
use tuft_mesh::panels::edge_neighbours;
use tuft_mesh::repair::{Refusal, RepairParams, repair, repair_with_params};
use tuft_mesh::{MeshError, Mirrors, Point, TriMesh, Vector, generate};

/// The shipped coupe, read from millimetres into metres and repaired.
fn shipped_coupe() -> TriMesh {
    let path = Path::new(env!("CARGO_MANIFEST_DIR")).join("../cases/coupe.stl");
    let (mut mesh, _) = read_stl(&path).unwrap();
    mesh.map_vertices(|p| Point::from(p.coords * 1e-3));
    repair(mesh, &Mirrors::none()).unwrap().0
}

fn perimeter(mesh: &TriMesh, t: usize) -> f64 {
    let [a, b, c] = mesh.corners(t);
    (b - a).norm() + (c - b).norm() + (a - c).norm()
}

#[test]
fn coupe_with_missing_facets_is_filled_closed() {
    // The README's promise: "small holes are fine". Seven facets of the
    // coarse shipped coupe go missing (100, 101, 900, 2000, 2500 and two
    // neighbours of 2500); its facets are larger than the 2 % absolute
    // limit, so only the local limit can fill them.
    let intact = shipped_coupe();
    assert!(closed(&intact));
    let around = edge_neighbours(&intact.triangles)[2500];
    let mut gone = vec![100, 101, 900, 2000, 2500];
    gone.extend(around.iter().take(2).map(|n| n.unwrap() as usize));
    let mut holed = intact.clone();
    holed.triangles = (0..intact.len())
        .filter(|t| !gone.contains(t))
        .map(|t| intact.triangles[t])
        .collect();
    assert!(!closed(&holed));
    let (fixed, r) = repair(holed, &Mirrors::none()).unwrap();
    let h = &r.holes;
    // Four holes: 100 and 101 share an edge, 2500 and its two neighbours
    // make one, 900 and 2000 stand alone.
    assert_eq!((h.loops, h.filled.len()), (4, 4), "{h:?}");
    assert!(
        h.filled.iter().any(|l| l.perimeter > h.fill_limit),
        "no hole needed the local limit: {h:?}"
    );
    assert!(closed(&fixed));
    // Volume by the divergence theorem (Gauss): filling flat across a few
    // facets loses or gains only their thin caps; 0.5 % allowed.
    let (v0, v) = (intact.signed_volume(), fixed.signed_volume());
    assert!((v - v0).abs() / v0 < 5e-3, "volume {v} vs intact {v0}");
    let mut p: Vec<f64> = (0..intact.len()).map(|t| perimeter(&intact, t)).collect();
    p.sort_by(f64::total_cmp);
    println!(
        "coupe: median facet perimeter {:.3} m, absolute limit {:.3} m, {} holes filled, \
         perimeters {:?} m, volume change {:.2e}",
        p[p.len() / 2],
        h.fill_limit,
        h.filled.len(),
        h.filled.iter().map(|l| l.perimeter).collect::<Vec<_>>(),
        (v - v0) / v0
    );
}

#[test]
fn l_shaped_hole_is_ear_clipped_flat() {
    // On a 6 x 6 grid top face, remove the cells (i, j) in 1..5 x 1..5 that
    // are not in 2..5 x 2..5: an L of 7 cells with arms 4 cells long and 1
    // wide. Its length-weighted centre lies in the notch, outside the L, so
    // a fan from it folds.
    let n = 6;
    let cube = grid_cube(n);
    let h = 1.0 / f64::from(n);
    let in_l = |c: Point| {
        let (i, j) = ((c.x / h).floor() as i32, (c.y / h).floor() as i32);
        (c.z - 1.0).abs() < 1e-9 && (1..5).contains(&i) && (1..5).contains(&j) && (i < 2 || j < 2)
    };
    let mut holed = cube.clone();
    holed.triangles.retain(|t| {
        let c = t
            .iter()
            .map(|&v| cube.vertices[v as usize].coords)
            .sum::<Vector>()
            / 3.0;
        !in_l(Point::from(c))
    });
    assert_eq!(cube.len() - holed.len(), 14);
    let before = holed.len();
    // Perimeter 16 cells = 2.67 m: above both default limits, so the limit
    // is raised to test the filling alone.
    let params = RepairParams {
        hole_fill: 2.0,
        ..RepairParams::default()
    };
    let (fixed, r) = repair_with_params(holed, &Mirrors::none(), &params).unwrap();
    assert_eq!((r.holes.filled.len(), r.holes.ear_clipped), (1, 1));
    assert!(closed(&fixed));
    // The fill covers the hole polygon exactly: its area equals the
    // shoelace (Gauss area formula) area of the L, 4 x 4 - 3 x 3 = 7 cells.
    let shoelace = |p: &[(f64, f64)]| {
        0.5 * (0..p.len())
            .map(|k| {
                let (a, b) = (p[k], p[(k + 1) % p.len()]);
                a.0 * b.1 - b.0 * a.1
            })
            .sum::<f64>()
    };
    let l = [(1, 1), (5, 1), (5, 2), (2, 2), (2, 5), (1, 5)];
    let l: Vec<(f64, f64)> = l
        .iter()
        .map(|&(x, y)| (f64::from(x) * h, f64::from(y) * h))
        .collect();
    let exact = shoelace(&l);
    assert!((exact - 7.0 * h * h).abs() < 1e-12);
    let fill: Vec<usize> = (before..fixed.len()).collect();
    let area: f64 = fill.iter().map(|&t| fixed.area_vector(t).norm()).sum();
    // Equal up to round-off (1e-12 m^2 on 0.19 m^2).
    assert!((area - exact).abs() < 1e-12, "fill area {area} vs {exact}");
    // Every fill triangle faces the neighbours' way, +z (outward on the
    // top face), and none is a sliver left by a collinear rim vertex: a
    // triangle with corners on a square lattice has area at least half a
    // cell (Pick's theorem), up to round-off.
    for &t in &fill {
        let a = fixed.area_vector(t);
        assert!(
            a.z > 0.5 * h * h - 1e-12 && a.x.abs() + a.y.abs() < 1e-12,
            "{t}: {a}"
        );
    }
    // Divergence theorem: the volume of the unit cube, exactly.
    assert!((fixed.signed_volume() - 1.0).abs() < 1e-12);
}

#[test]
fn missing_end_of_a_body_is_refused_with_its_centre() {
    // An ellipsoid 4 m long with its end x > 1.5 m removed: an opening
    // 0.66 m across, many facets wide, is a missing part, not a defect.
    let body = generate::ellipsoid(2.0, 0.5, 0.5, 2000).unwrap();
    let open = common::cut(&body, |c| c.x < 1.5);
    let e = repair(open, &Mirrors::none()).unwrap_err();
    let text = e.to_string();
    let MeshError::OpenHole { holes, .. } = &e else {
        panic!("{e}")
    };
    assert_eq!(holes.len(), 1, "{text}");
    let hole = &holes[0];
    assert_eq!(hole.reason, Refusal::TooLarge);
    // Centre on the axis near x = 1.5 (the cut follows facet edges).
    let [x, y, z] = hole.centre;
    assert!(
        (x - 1.5).abs() < 0.1 && y.abs() < 1e-3 && z.abs() < 1e-3,
        "{text}"
    );
    assert!(text.contains(&format!("centre ({x:.3}, ")), "{text}");
    assert!(text.contains(&format!("perimeter {:.3} m", hole.perimeter)));
    assert!(!hole.on_undeclared_symmetry_plane, "{text}");
}

/// A scan's openings are named by where they lie on the car, so a
/// modeller can find them: an open floor between the axles, and a side
/// opening low over the front axle, asked after as a wheel arch (a
/// review's open half scan had its holes named only by centre points).
#[test]
fn refused_holes_are_named_by_where_they_lie_on_the_car() {
    let coupe = generate::coupe_with_params(&generate::CoupeParams::default()).unwrap();
    let (lo, hi) = coupe.vertices.iter().fold(
        (
            Point::new(f64::MAX, f64::MAX, f64::MAX),
            Point::new(f64::MIN, f64::MIN, f64::MIN),
        ),
        |(lo, hi), p| (lo.inf(p), hi.sup(p)),
    );
    let (length, height) = (hi.x - lo.x, hi.z - lo.z);
    // The floor's middle fifth, and the right side low over the front
    // fifth of the length.
    let open = common::cut(&coupe, |c| {
        let fx = (c.x - lo.x) / length;
        let floor = c.z < lo.z + 0.02 * height && (0.4..0.6).contains(&fx);
        let arch = c.y > 0.9 * hi.y && c.z < lo.z + 0.35 * height && (0.15..0.25).contains(&fx);
        !(floor || arch)
    });
    let e = repair(open, &Mirrors::none()).unwrap_err();
    let text = e.to_string();
    let MeshError::OpenHole { holes, .. } = &e else {
        panic!("{e}")
    };
    let places: Vec<&str> = holes.iter().map(|h| h.place.as_str()).collect();
    assert!(places.contains(&"under the middle"), "{text}");
    assert!(
        places.contains(&"low on the side at the front (a wheel arch?)"),
        "{text}"
    );
    assert!(text.contains("under the middle, centre ("), "{text}");
}

/// A loose open sheet beside a closed body (a scan's debris under the
/// floor) is named as a separate piece, not a hole in the body, with the
/// advice to delete it; its rim's perimeter is still given.
#[test]
fn a_loose_open_piece_is_named_as_such() {
    let coupe = generate::coupe_with_params(&generate::CoupeParams::default()).unwrap();
    let lo = coupe
        .vertices
        .iter()
        .fold(Point::new(f64::MAX, f64::MAX, f64::MAX), |lo, p| lo.inf(p));
    let z = lo.z - 0.15;
    let sheet = TriMesh::new(
        vec![
            Point::new(1.8, 0.2, z),
            Point::new(2.1, 0.2, z),
            Point::new(2.1, 0.35, z),
            Point::new(1.8, 0.35, z),
        ],
        vec![[0, 1, 2], [0, 2, 3]],
    )
    .unwrap();
    let e = repair(coupe.joined(&sheet), &Mirrors::none()).unwrap_err();
    let text = e.to_string();
    let MeshError::OpenHole { holes, .. } = &e else {
        panic!("{e}")
    };
    assert_eq!(holes.len(), 1, "{text}");
    assert!(
        holes[0].piece_m2.is_some_and(|a| (a - 0.045).abs() < 1e-6),
        "{text}"
    );
    assert!(
        text.contains("the rim of a separate open piece of 0.045 m^2, no hole in the body")
            && text.contains("delete the loose pieces"),
        "{text}"
    );
}

#[test]
fn a_half_model_read_as_whole_is_asked_whether_it_is_one() {
    // The generated half coupe repaired without its symmetry plane: the
    // cut is refused, and the refusal asks whether it is a half model's.
    let half = generate::coupe_with_params(&generate::CoupeParams {
        half: true,
        ..generate::CoupeParams::default()
    })
    .unwrap();
    let e = repair(half, &Mirrors::none()).unwrap_err();
    let text = e.to_string();
    let MeshError::OpenHole { holes, .. } = &e else {
        panic!("{e}")
    };
    assert!(holes[0].on_undeclared_symmetry_plane, "{text}");
    assert!(text.contains("is this the cut of a half model?"), "{text}");
    // The diagnosis first, where a log line is read.
    assert!(
        text.starts_with("open along y = 0, a half model with no symmetry plane declared"),
        "{text}"
    );
}

#[test]
fn every_refused_hole_is_listed() {
    // Twelve separate holes: the five or six facets around each of the
    // twelve corners of the icosahedron (vertices 0-11), far apart. With
    // both limits at zero each is refused; ten are named, then "and 2 more".
    let sphere = generate::icosphere(1.0, 3);
    let mut m = sphere.clone();
    m.triangles.retain(|t| t.iter().all(|&v| v >= 12));
    let params = RepairParams {
        hole_fill: 0.0,
        hole_fill_local: 0.0,
        ..RepairParams::default()
    };
    let e = repair_with_params(m, &Mirrors::none(), &params).unwrap_err();
    let text = e.to_string();
    let MeshError::OpenHole { holes, refused, .. } = &e else {
        panic!("{e}")
    };
    assert_eq!((holes.len(), *refused), (12, 12));
    assert_eq!(text.matches("centre (").count(), 10, "{text}");
    assert!(
        text.contains("and 2 more") && !text.contains('\n'),
        "{text}"
    );
    for hole in &holes[..10] {
        let [x, y, z] = hole.centre;
        assert!(text.contains(&format!("centre ({x:.3}, {y:.3}, {z:.3}) m")));
    }
    // Largest first.
    assert!(holes.windows(2).all(|w| w[0].perimeter >= w[1].perimeter));
}

#[test]
fn open_end_of_a_sliver_sided_cylinder_is_refused() {
    // A cylinder 4 m long, radius 0.5 m, 24 sides each split into two long
    // slivers (perimeter about 8.1 m), one end capped by a fan, the other
    // open. The open end (perimeter 3.13 m, 24 edges) is smaller than four
    // side facets but 24 rim edges across: the rim-edge bound on the local
    // facet perimeter (3 x 0.131 m) refuses it.
    let k = 24u32;
    let ring = |x: f64| {
        (0..k).map(move |i| {
            let t = 2.0 * std::f64::consts::PI * f64::from(i) / f64::from(k);
            Point::new(x, 0.5 * t.cos(), 0.5 * t.sin())
        })
    };
    let mut vertices: Vec<Point> = ring(0.0).chain(ring(4.0)).collect();
    vertices.push(Point::new(0.0, 0.0, 0.0));
    let mut triangles = Vec::new();
    for i in 0..k {
        let j = (i + 1) % k;
        triangles.push([i, i + k, j + k]);
        triangles.push([i, j + k, j]);
        triangles.push([2 * k, i, j]);
    }
    let mut capped = TriMesh::new(vertices, triangles).unwrap();
    if capped.signed_volume() < 0.0 {
        capped.flip();
    }
    let e = repair(capped, &Mirrors::none()).unwrap_err();
    let MeshError::OpenHole { holes, .. } = &e else {
        panic!("{e}")
    };
    assert_eq!(holes.len(), 1, "{e}");
    // 2 pi r = 3.14 m for the circle; the 24-gon is 0.3 % shorter.
    assert!((holes[0].perimeter - 3.133).abs() < 1e-3, "{e}");
    assert!((holes[0].centre[0] - 4.0).abs() < 1e-9, "{e}");
}

/// The sphere the hole-limit tests cut: radius 1.4 m, so that its box's
/// diagonal, 2 sqrt(3) 1.4 = 4.85 m, is a car's and its absolute fill limit
/// (2 %) 0.097 m; facets of about 4 mm (a fine scan's) within 0.15 m of
/// its north pole, coarser beyond.
fn fine_spot_sphere() -> TriMesh {
    common::graded_sphere(1.4, 0.004, 0.15, &mut common::Lcg(11))
}

/// A point on the 1.4 m sphere `s` metres from its north pole along the
/// surface, at azimuth `phi`.
fn on_sphere(s: f64, phi: f64) -> Point {
    let t = s / 1.4;
    Point::new(
        1.4 * t.sin() * phi.cos(),
        1.4 * t.sin() * phi.sin(),
        1.4 * t.cos(),
    )
}

#[test]
fn round_holes_count_as_circles_slits_by_their_perimeter() {
    // A review's 22 mm hole in a scan of 3-5 mm facets traced 0.098 m
    // round its jagged rim and was refused against 0.093 m; the README
    // promises a hole some 3 cm across on a car. Round holes 20 and 30 mm
    // across in the fine spot of a car-sized sphere (every facet whose
    // centroid lies within 7.7 or 12.7 mm of a point removed: spans of 18
    // and 30 mm, the latter's traced rim 0.113 m), a 50 mm one, and a slit
    // 44 mm long and about a facet wide.
    use std::f64::consts::PI;
    let sphere = fine_spot_sphere();
    assert!(closed(&sphere) && sphere.signed_volume() > 0.0);
    // 2 % of the diagonal, 2 sqrt(3) 1.4 m but for the rings' jitter.
    let limit = 0.02 * sphere.bounds().map(|(lo, hi)| (hi - lo).norm()).unwrap();
    assert!((limit - 0.02 * 2.0 * 3f64.sqrt() * 1.4).abs() < 1e-4);
    let holes = [
        (0.0077, 0.0),
        (0.0127, 2.0 * PI / 3.0),
        (0.0227, 4.0 * PI / 3.0),
    ];
    let mut holed = sphere.clone();
    for (radius, phi) in holes {
        holed = common::punch(&holed, on_sphere(0.06, phi), radius);
    }
    // The slit: facets whose centroid lies within 2 mm of a 44 mm piece
    // of the ring 0.12 m from the pole, across azimuth pi / 3.
    let (mid, along) = (on_sphere(0.12, PI / 3.0), Vector::new(-0.866, 0.5, 0.0));
    let near_slit = |m: &TriMesh, t: usize| {
        let [a, b, c] = m.corners(t);
        let d = Point::from((a.coords + b.coords + c.coords) / 3.0) - mid;
        let u = d.dot(&along).clamp(-0.022, 0.022);
        (d - along * u).norm() < 0.002
    };
    let mut slit = holed.clone();
    slit.triangles = (0..holed.len())
        .filter(|&t| !near_slit(&holed, t))
        .map(|t| holed.triangles[t])
        .collect();
    let e = repair(slit, &Mirrors::none()).unwrap_err();
    let MeshError::OpenHole { holes: refused, .. } = &e else {
        panic!("{e}")
    };
    let text = e.to_string();
    // Refused: the 50 mm hole, as the circle across it, and the slit, by
    // its perimeter; the 20 and 30 mm holes are not among them.
    assert_eq!(refused.len(), 2, "{text}");
    let big = refused
        .iter()
        .find(|h| (Point::from(h.centre) - on_sphere(0.06, 4.0 * PI / 3.0)).norm() < 0.01)
        .expect("the 50 mm hole");
    assert!(big.measure < big.perimeter && big.measure > limit, "{text}");
    // Its span (measure / pi) is about 50 mm.
    assert!((0.045..=0.052).contains(&(big.measure / PI)), "{text}");
    assert!(
        text.contains(&format!(
            "{:.3} m as the circle across its widest",
            big.measure
        )),
        "{text}"
    );
    let cut = refused
        .iter()
        .find(|h| (Point::from(h.centre) - mid).norm() < 0.01)
        .expect("the slit");
    assert_eq!(cut.measure, cut.perimeter, "{text}");
    assert!(
        cut.perimeter > limit && cut.perimeter < 1.5 * limit,
        "{text}"
    );
    println!(
        "limit {limit:.4} m; 50 mm hole perimeter {:.4} measure {:.4}; slit perimeter {:.4}",
        big.perimeter, big.measure, cut.perimeter
    );
    // Without the 50 mm hole and the slit, both round holes are filled,
    // the 30 mm one though its traced rim is longer than the limit, and
    // the sphere's area is Archimedes' 4 pi r^2 to within its facets'
    // chords, as the intact mesh's is.
    let mut two = sphere.clone();
    for (radius, phi) in &holes[..2] {
        two = common::punch(&two, on_sphere(0.06, *phi), *radius);
    }
    let (fixed, r) = repair(two, &Mirrors::none()).unwrap();
    let h = &r.holes;
    assert_eq!(h.filled.len(), 2, "{h:?}");
    assert!((h.fill_limit - limit).abs() < 1e-12, "{h:?}");
    let wide = h
        .filled
        .iter()
        .max_by(|a, b| a.perimeter.total_cmp(&b.perimeter))
        .unwrap();
    println!(
        "filled (perimeter, measure): {:?}",
        h.filled
            .iter()
            .map(|l| (l.perimeter, l.measure))
            .collect::<Vec<_>>()
    );
    assert!(
        wide.perimeter > limit && wide.measure <= PI * 0.030,
        "{h:?}"
    );
    assert!(closed(&fixed));
    let exact = 4.0 * PI * 1.4 * 1.4;
    let (a0, a) = (sphere.area(), fixed.area());
    assert!((a - exact).abs() / exact < 1e-2, "area {a} vs {exact}");
    assert!((a - a0).abs() / a0 < 1e-5, "area {a} vs intact {a0}");
}

#[test]
fn a_half_models_fill_limit_is_the_whole_bodys() {
    // A review's half car read its limit off its half's diagonal, 4.631 m
    // against 4.88 m whole. A sphere cut at y = 0 and declared a half
    // model: 2 % of the whole sphere's diagonal, not the half's.
    let sphere = generate::icosphere(1.0, 3);
    let (half, _) = tuft_mesh::cut::keep_right_half(&sphere).unwrap().unwrap();
    let mirrors = Mirrors {
        ground: None,
        symmetry: true,
    };
    let (_, r) = repair(half.clone(), &mirrors).unwrap();
    let whole = sphere.bounds().map(|(lo, hi)| (hi - lo).norm()).unwrap();
    let own = half.bounds().map(|(lo, hi)| (hi - lo).norm()).unwrap();
    assert!((r.holes.fill_limit - 0.02 * whole).abs() < 1e-12, "{r:?}");
    assert!(own < 0.9 * whole && (r.diagonal - own).abs() < 1e-12);
}
