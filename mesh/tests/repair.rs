//! Repair passes on damaged analytic bodies.
#![allow(clippy::unwrap_used, clippy::expect_used)]

mod common;

use std::f64::consts::PI;

use common::{Lcg, closed, cut, soup};
use tuft_mesh::repair::{RepairParams, repair, repair_with_params};
use tuft_mesh::{MeshError, Mirrors, Point, TriMesh, generate};

/// Sphere volume 4/3 pi r^3 (Archimedes). A level-3 icosphere is inscribed
/// and falls short by about 1.5 %; 3 % is allowed (the generator's own test
/// uses the same bound).
fn assert_sphere_volume(mesh: &TriMesh, r: f64) {
    let exact = 4.0 / 3.0 * PI * r.powi(3);
    let v = mesh.signed_volume();
    assert!(
        v > 0.0 && (v - exact).abs() / exact < 0.03,
        "volume {v} vs {exact}"
    );
}

/// An export that writes each facet's corners apart (a triangle soup) with
/// gaps over the weld tolerance: welded wider when most edges stay open
/// (1e-4 of the diagonal at most: 0.2 mm gaps on a review's 4.5 m car had
/// been refused as 3,954 holes), and refused in one sentence when even
/// that leaves them open.
#[test]
fn a_facet_soup_with_gaps_is_welded_wider_or_refused_in_one_sentence() {
    let sphere = generate::icosphere(1.0, 3);
    // Diagonal 2 sqrt(3) = 3.46 m: the usual weld 35 micrometres, the
    // widest (30 times) 1.04 mm. Corners up to 0.1 mm apart in each axis.
    let (m, r) = repair(soup(&sphere, 0.5e-4, &mut Lcg(7)), &Mirrors::none()).unwrap();
    assert!(r.weld_widened > 1.0, "{r:?}");
    assert_eq!(m.len(), 1280);
    assert_sphere_volume(&m, 1.0);
    // Corners 2 mm apart: no weld closes them.
    match repair(soup(&sphere, 1e-3, &mut Lcg(7)), &Mirrors::none()).unwrap_err() {
        e @ MeshError::UnweldedFacets { .. } => {
            let text = e.to_string();
            assert!(
                text.contains("the facets do not share their corners"),
                "{text}"
            );
        }
        other => panic!("unexpected {other}"),
    }
    // A scan whose facets share corners is welded as before.
    let (_, r) = repair(sphere, &Mirrors::none()).unwrap();
    assert_eq!(r.weld_widened, 1.0);
}

/// Corners written a little apart, most within the weld tolerance and a
/// few beyond it (a review's export jittered by 0.02 mm on a 5 m car,
/// whose few unwelded corners left one hole at a fan pole): welded three
/// times wider, since that closes every edge, with the share that was
/// open; a real hole in the same mesh keeps the weld and is reported.
#[test]
fn a_few_corners_that_only_nearly_meet_are_welded_wider_a_real_hole_is_not() {
    let sphere = generate::icosphere(1.0, 3);
    // Diagonal 3.46 m: the usual weld 35 micrometres, three times that
    // 104. Corners up to 14 micrometres off in each axis: copies up to 48
    // apart, and 3.5 % of the edges stay open after the usual weld.
    let jittered = soup(&sphere, 1.4e-5, &mut Lcg(5));
    let (m, r) = repair(jittered.clone(), &Mirrors::none()).unwrap();
    println!(
        "open after the usual weld {:.4}, widened {}",
        r.open_before_widening, r.weld_widened
    );
    assert!(
        r.open_before_widening > 0.0 && r.open_before_widening <= 0.5,
        "{r:?}"
    );
    assert_eq!(r.weld_widened, 3.0);
    assert_eq!(m.len(), 1280);
    assert!(closed(&m));
    assert_sphere_volume(&m, 1.0);
    // Twelve facets round one vertex taken out: a hole no weld closes.
    let mut holed = jittered;
    let centre = sphere.vertices[0];
    holed.triangles.retain(|t| {
        !t.iter()
            .any(|&v| (holed.vertices[v as usize] - centre).norm() < 0.3)
    });
    match repair(holed, &Mirrors::none()) {
        Err(MeshError::OpenHole { .. }) => {}
        other => panic!("a real hole must be reported: {other:?}"),
    }
}

#[test]
fn clean_sphere_needs_no_change() {
    let (m, r) = repair(generate::icosphere(1.0, 3), &Mirrors::none()).unwrap();
    assert_eq!(r.changes(), 0, "{r:?}");
    assert_eq!(m.len(), 1280);
}

#[test]
fn single_facet_is_refused_as_open() {
    let m = TriMesh::new(
        vec![
            Point::new(0.0, 0.0, 0.0),
            Point::new(1.0, 0.0, 0.0),
            Point::new(0.0, 1.0, 0.0),
        ],
        vec![[0, 1, 2]],
    )
    .unwrap();
    let e = repair(m, &Mirrors::none()).unwrap_err();
    // Perimeter 2 + sqrt(2) (the triangle's own edges).
    match e {
        MeshError::OpenHole {
            perimeter,
            edges: 3,
            ..
        } => assert!((perimeter - (2.0 + 2f64.sqrt())).abs() < 1e-12),
        other => panic!("unexpected {other}"),
    }
}

#[test]
fn all_facets_degenerate() {
    let m = TriMesh::new(
        vec![
            Point::new(0.0, 0.0, 0.0),
            Point::new(1.0, 0.0, 0.0),
            Point::new(2.0, 0.0, 0.0),
        ],
        vec![[0, 1, 2], [0, 2, 1], [0, 0, 1]],
    )
    .unwrap();
    assert!(matches!(
        repair(m, &Mirrors::none()),
        Err(MeshError::AllDegenerate { facets: 3 })
    ));
}

#[test]
fn open_hole_names_centre_and_perimeter() {
    let sphere = generate::icosphere(1.0, 3);
    let holed = cut(&sphere, |c| c.z < 0.8);
    let e = repair(holed, &Mirrors::none()).unwrap_err();
    let text = e.to_string();
    assert!(
        text.contains("centre (") && text.contains("perimeter"),
        "{text}"
    );
    let MeshError::OpenHole {
        centre,
        perimeter,
        refused: 1,
        ..
    } = e
    else {
        panic!("{e}")
    };
    // The cut follows facet edges near z = 0.8 on the unit sphere, between
    // z = 0.7 and 0.9: centre on the z axis, loop radius between
    // sqrt(1 - 0.9^2) and sqrt(1 - 0.7^2). A staircase along the edges of a
    // triangular lattice is up to 2/sqrt(3) longer than the circle; 1.3 is
    // allowed for the icosphere's distorted lattice.
    assert!(
        centre[0].abs() < 0.02 && centre[1].abs() < 0.02,
        "{centre:?}"
    );
    assert!(centre[2] > 0.7 && centre[2] < 0.9, "{centre:?}");
    let (r_lo, r_hi) = ((1.0f64 - 0.81).sqrt(), (1.0f64 - 0.49).sqrt());
    assert!(
        perimeter > 2.0 * PI * r_lo && perimeter < 1.3 * 2.0 * PI * r_hi,
        "{perimeter}"
    );
}

#[test]
fn small_holes_are_filled() {
    let sphere = generate::icosphere(1.0, 4);
    // Remove one facet (a 3-edge hole) and the six facets around vertex 0
    // (a 5-edge hole: icosahedron corners have five neighbours). Edges are
    // about 0.08 m, so both perimeters are below 15 % of the 3.46 m diagonal.
    let mut m = sphere.clone();
    m.triangles.remove(4000);
    m.triangles.retain(|t| !t.contains(&0));
    let params = RepairParams {
        hole_fill: 0.15,
        ..RepairParams::default()
    };
    let (fixed, r) = repair_with_params(m, &Mirrors::none(), &params).unwrap();
    assert_eq!(r.holes.filled.len(), 2, "{:?}", r.holes);
    assert_eq!(r.holes.facets_added, 1 + 5);
    assert!(closed(&fixed));
    // Filling flat across the holes loses only a sliver of volume: within
    // 0.1 % of the intact icosphere.
    let v0 = sphere.signed_volume();
    assert!((fixed.signed_volume() - v0).abs() / v0 < 1e-3);
}

#[test]
fn two_holes_meeting_at_one_vertex_are_split_there_and_both_filled() {
    // A pinched rim, a common scan defect: around a vertex of valence six
    // of a level-4 icosphere, two neighbouring facets and the facet
    // opposite them are missing, so a 4-edge and a 3-edge hole meet at
    // that vertex only and their rims chain into one loop visiting it
    // twice, which overlaps itself seen along any normal. Split at the
    // vertex, each is the small hole it is.
    let sphere = generate::icosphere(1.0, 4);
    let v = sphere.triangles[4000][0];
    let centre = sphere.vertices[v as usize];
    let mut fan: Vec<usize> = (0..sphere.len())
        .filter(|&t| sphere.triangles[t].contains(&v))
        .collect();
    assert_eq!(fan.len(), 6, "a subdivision vertex has six facets");
    // Order the fan round the vertex by angle in its tangent plane.
    let n = centre.coords.normalize();
    let u = n.cross(&tuft_mesh::Vector::x()).normalize();
    let w = n.cross(&u);
    let angle = |t: usize| {
        let [a, b, c] = sphere.corners(t);
        let d = (a.coords + b.coords + c.coords) / 3.0 - centre.coords;
        d.dot(&w).atan2(d.dot(&u))
    };
    fan.sort_by(|&a, &b| angle(a).total_cmp(&angle(b)));
    let mut removed = [fan[0], fan[1], fan[3]];
    removed.sort_unstable();
    let mut m = sphere.clone();
    for &t in removed.iter().rev() {
        m.triangles.remove(t);
    }
    let (fixed, r) = repair(m, &Mirrors::none()).unwrap();
    // Two loops, both filled: a quad's two triangles and one triangle.
    assert_eq!(r.holes.loops, 2, "{:?}", r.holes);
    assert_eq!(r.holes.filled.len(), 2, "{:?}", r.holes);
    let mut edges: Vec<usize> = r.holes.filled.iter().map(|h| h.edges).collect();
    edges.sort_unstable();
    assert_eq!(edges, [3, 4]);
    assert!(closed(&fixed));
    // Filled flat across a few facets of a unit sphere: volume and area
    // within 0.1 % of the intact icosphere's.
    let (v0, a0) = (sphere.signed_volume(), sphere.area());
    assert!((fixed.signed_volume() - v0).abs() / v0 < 1e-3);
    assert!((fixed.area() - a0).abs() / a0 < 1e-3);
}

#[test]
fn a_refused_hole_is_told_to_declare_a_plane_only_when_its_rim_lies_in_one() {
    // A hole too large to fill on the side of a sphere: no plane can close
    // it, so none is suggested.
    let sphere = generate::icosphere(1.0, 3);
    let mut side = sphere.clone();
    side.triangles.retain(|t| {
        let c = t
            .iter()
            .map(|&v| sphere.vertices[v as usize].coords)
            .sum::<tuft_mesh::Vector>()
            / 3.0;
        c.x < 0.6
    });
    let text = repair(side, &Mirrors::none()).unwrap_err().to_string();
    assert!(text.contains("close the holes in the model"), "{text}");
    assert!(!text.contains("declare the"), "{text}");
    // A body cut flat at its lowest level (a hemisphere's open base at
    // z = 0), ground not declared: the ground there is suggested.
    let base = half_sphere(|c| c.z > 0.0);
    let text = repair(base, &Mirrors::none()).unwrap_err().to_string();
    assert!(text.contains("declare the ground at z = 0.000 m"), "{text}");
    assert!(!text.contains("symmetry plane (half_model"), "{text}");
}

#[test]
fn fully_inverted_mesh_is_repaired() {
    let mut m = generate::icosphere(2.0, 3);
    m.flip();
    let (fixed, r) = repair(m, &Mirrors::none()).unwrap();
    assert_eq!(
        (r.outward.components_reversed, r.outward.facets_flipped),
        (1, 1280)
    );
    assert_eq!(r.orientation.facets_flipped, 0);
    assert_sphere_volume(&fixed, 2.0);
}

#[test]
fn mixed_orientation_is_made_consistent_and_outward() {
    let mut m = generate::icosphere(1.0, 3);
    let mut rng = Lcg(7);
    for t in &mut m.triangles {
        if rng.next_f64() < 0.3 {
            t.swap(1, 2);
        }
    }
    let (fixed, r) = repair(m, &Mirrors::none()).unwrap();
    assert!(r.orientation.facets_flipped > 0 && r.orientation.conflicting_edges == 0);
    assert!(closed(&fixed));
    assert_sphere_volume(&fixed, 1.0);
}

#[test]
fn soup_is_welded_and_duplicates_dropped() {
    let sphere = generate::icosphere(1.0, 3);
    let mut rng = Lcg(11);
    // Jitter 1e-7 m, far below the weld tolerance 1e-5 * diagonal = 3.5e-5 m.
    let mut m = soup(&sphere, 1e-7, &mut rng);
    let copies: Vec<[u32; 3]> = m.triangles[..10]
        .iter()
        .map(|t| [t[0], t[2], t[1]])
        .collect();
    m.triangles.extend(copies);
    let (fixed, r) = repair(m, &Mirrors::none()).unwrap();
    assert_eq!(r.duplicates, 10);
    assert_eq!(fixed.vertices.len(), sphere.vertices.len());
    assert!(closed(&fixed));
}

/// A lat-long sphere with a multiple of 4 meridians has meridians in the
/// planes y = 0 and z = 0, so cuts there follow edges exactly.
fn half_sphere(keep: impl Fn(&Point) -> bool) -> TriMesh {
    cut(&generate::latlong_sphere(1.0, 24, 48), keep)
}

#[test]
fn half_sphere_on_symmetry_plane() {
    let half = half_sphere(|c| c.y > 0.0);
    let sym = Mirrors {
        ground: None,
        symmetry: true,
    };
    let (fixed, r) = repair(half.clone(), &sym).unwrap();
    assert_eq!(r.holes.mirror_closed.len(), 1);
    assert_eq!(r.holes.mirror_closed[0].plane, Some("symmetry"));
    // Half the sphere's volume, 2/3 pi, within the polyhedron's shortfall (3 %).
    let v = fixed.signed_volume();
    assert!((v - 2.0 / 3.0 * PI).abs() / (2.0 / 3.0 * PI) < 0.03, "{v}");
    let e = repair(half, &Mirrors::none()).unwrap_err();
    assert!(matches!(e, MeshError::OpenHole { .. }), "{e}");
}

/// A half model cut flat a little off the declared plane is named as such
/// (a review's cut at y = 8 mm was told only to cap a hole): the rim's
/// plane and its offset.
#[test]
fn a_cut_just_off_the_declared_plane_is_named() {
    let mut half = half_sphere(|c| c.y > 0.0);
    // Move the whole half 10 mm along +y: the cut lies flat at y = 0.01,
    // beyond the 0.35 mm plane tolerance (1e-4 of the 3.46 m diagonal).
    half.map_vertices(|p| Point::new(p.x, p.y + 0.01, p.z));
    let sym = Mirrors {
        ground: None,
        symmetry: true,
    };
    match repair(half, &sym).unwrap_err() {
        MeshError::OpenHole { holes, .. } => {
            let (axis, at, plane) = holes[0].off_declared_plane.unwrap();
            assert_eq!((axis, plane), ('y', 0.0));
            assert!((at - 0.01).abs() < 1e-9, "{at}");
        }
        other => panic!("unexpected {other}"),
    }
}

#[test]
fn inverted_half_sphere_on_ground_is_turned_outward() {
    let mut half = half_sphere(|c| c.z > 0.0);
    half.flip();
    let (fixed, r) = repair(half, &Mirrors::ground(0.0)).unwrap();
    assert_eq!(r.outward.components_reversed, 1);
    assert_eq!(r.holes.mirror_closed[0].plane, Some("ground"));
    assert!(fixed.signed_volume() > 0.0);
}

/// A facet welded onto an edge two others share (a scan's noise folded
/// at a nose tip) is dropped and the hole it leaves filled: the body comes
/// out closed, where the extra facet used to break the hole's rim.
#[test]
fn a_fin_on_an_edge_is_dropped_and_the_body_closed() {
    let mut m = generate::icosphere(1.0, 3);
    let [a, b, _] = m.triangles[0];
    m.vertices
        .push(Point::from(m.vertices[a as usize].coords * 0.97));
    let tip = (m.vertices.len() - 1) as u32;
    m.triangles.push([b, a, tip]);
    let (fixed, r) = repair(m, &Mirrors::none()).unwrap();
    assert_eq!(r.fins, 1);
    assert_eq!(r.holes.non_manifold_edges, 0);
    assert!(closed(&fixed));
}

#[test]
fn non_manifold_edge_is_counted() {
    // Two closed tetrahedra joined along edge 0-1: four facets use it.
    let v = vec![
        Point::new(0.0, 0.0, 0.0),
        Point::new(1.0, 0.0, 0.0),
        Point::new(0.5, 1.0, 0.0),
        Point::new(0.5, 0.3, 1.0),
        Point::new(0.5, -1.0, 0.0),
        Point::new(0.5, -0.3, -1.0),
    ];
    let tet = |a: u32, b: u32, c: u32, d: u32| vec![[a, c, b], [a, b, d], [b, c, d], [c, a, d]];
    let mut t = tet(0, 1, 2, 3);
    t.extend(tet(1, 0, 4, 5));
    let (_, r) = repair(TriMesh::new(v, t).unwrap(), &Mirrors::none()).unwrap();
    assert_eq!(r.holes.non_manifold_edges, 1);
    assert_eq!(r.holes.loops, 0);
}

#[test]
fn quarter_sphere_is_closed_by_ground_and_symmetry_together() {
    // y >= 0 and z >= 0: one loop, half on y = 0 and half on z = 0.
    let quarter = half_sphere(|c| c.y > 0.0 && c.z > 0.0);
    let both = Mirrors {
        ground: Some(0.0),
        symmetry: true,
    };
    let (fixed, r) = repair(quarter.clone(), &both).unwrap();
    assert_eq!(r.holes.mirror_closed.len(), 1);
    assert_eq!(r.holes.mirror_closed[0].plane, Some("ground and symmetry"));
    // A quarter of 4/3 pi, within the polyhedron's shortfall (3 %).
    let v = fixed.signed_volume();
    assert!((v - PI / 3.0).abs() / (PI / 3.0) < 0.03, "{v}");
    // One plane alone cannot close it.
    assert!(repair(quarter, &Mirrors::ground(0.0)).is_err());
}
