//! Bodies with sharp rims the flow leaves (a flat nose, a box's front
//! edges): the free-streamline bound beside the rim against the drag
//! measured on such bodies. Each assertion names its source.
//!
//! Print the figures with
//! `cargo test --release -p tuft-tests --test sharp_rims -- --nocapture`.
#![allow(clippy::unwrap_used, clippy::expect_used)]

use std::f64::consts::PI;

use nalgebra::Vector3;
use tuft_mesh::{Mirrors, PanelMesh, Point, TriMesh};
use tuft_solver::boundary_layer::{BoundaryLayerParams, screen_boundary_layer};
use tuft_solver::loads::{self, Reference};
use tuft_solver::potential::Freestream;
use tuft_solver::solve_potential;
use tuft_solver::viscous_loop::{
    ViscousLoop, ViscousLoopParams, dead_water_cp, viscous_loop_with_params,
};

const SPEED: f64 = 40.0;

/// A flat-faced circular cylinder along x: diameter `d`, length `l`, nose
/// face at x = 0, `around` panels round the girth; the end faces are cut
/// in rings about as wide as the panels round the rim, the side in
/// stations as long.
fn flat_faced_cylinder(d: f64, l: f64, around: usize) -> TriMesh {
    chamfered_cylinder(d, l, 0.0, around)
}

/// [`flat_faced_cylinder`] with its nose rim cut by a 45-degree chamfer
/// `c` deep (none for 0).
fn chamfered_cylinder(d: f64, l: f64, c: f64, around: usize) -> TriMesh {
    cylinder(d, l, c, around, None)
}

/// [`chamfered_cylinder`], its nose face cut in `nose_rings` rings when
/// given (1: a fan of triangles from the centre to the rim, as CAD
/// exporters cut a flat face), else in rings about as wide as the panels
/// round the rim.
fn cylinder(d: f64, l: f64, c: f64, around: usize, nose_rings: Option<usize>) -> TriMesh {
    let r = 0.5 * d;
    let edge = PI * d / around as f64;
    let rings = ((r / edge).round() as usize).max(2);
    let nose_rings = nose_rings.unwrap_or(rings);
    let stations = ((l / edge).round() as usize).max(2);
    let mut v: Vec<Point> = Vec::new();
    let mut t: Vec<[u32; 3]> = Vec::new();
    let ring = |v: &mut Vec<Point>, x: f64, rad: f64| -> u32 {
        let start = v.len() as u32;
        for k in 0..around {
            let a = 2.0 * PI * k as f64 / around as f64;
            v.push(Point::new(x, rad * a.cos(), rad * a.sin()));
        }
        start
    };
    // Rings of the nose face from the centre out, the side, the base face
    // from the rim in; `quad` joins two rings with the outward order.
    let quad = |t: &mut Vec<[u32; 3]>, a: u32, b: u32| {
        for k in 0..around as u32 {
            let k1 = (k + 1) % around as u32;
            t.push([a + k, b + k1, b + k]);
            t.push([a + k, a + k1, b + k1]);
        }
    };
    let fan = |t: &mut Vec<[u32; 3]>, c: u32, a: u32, flip: bool| {
        for k in 0..around as u32 {
            let k1 = (k + 1) % around as u32;
            t.push(if flip {
                [c, a + k1, a + k]
            } else {
                [c, a + k, a + k1]
            });
        }
    };
    let nose = v.len() as u32;
    v.push(Point::new(0.0, 0.0, 0.0));
    let mut ids = Vec::new();
    for i in 1..=nose_rings {
        ids.push(ring(&mut v, 0.0, (r - c) * i as f64 / nose_rings as f64));
    }
    if c > 0.0 {
        ids.push(ring(&mut v, c, r));
    }
    for j in 1..=stations {
        ids.push(ring(&mut v, c + (l - c) * j as f64 / stations as f64, r));
    }
    for i in (1..rings).rev() {
        ids.push(ring(&mut v, l, r * i as f64 / rings as f64));
    }
    let tail = v.len() as u32;
    v.push(Point::new(l, 0.0, 0.0));
    fan(&mut t, nose, ids[0], true);
    for w in ids.windows(2) {
        quad(&mut t, w[0], w[1]);
    }
    fan(&mut t, tail, *ids.last().unwrap(), false);
    TriMesh::new(v, t).unwrap()
}

/// A box `size` (x, y, z) with its faces cut in squares of about `edge`,
/// its lowest face at z = `bottom`, the nose face at x = 0, centred on
/// y = 0. Sharp edges all round.
fn sharp_box(size: [f64; 3], edge: f64, bottom: f64) -> TriMesh {
    let n = size.map(|s| ((s / edge).round() as usize).max(1));
    let mut v: Vec<Point> = Vec::new();
    let mut t: Vec<[u32; 3]> = Vec::new();
    let lo = [0.0, -0.5 * size[1], bottom];
    // Each face: a fixed axis `a` at side `hi`, cut along the other two.
    for a in 0..3 {
        for hi in [false, true] {
            let (b, c) = ((a + 1) % 3, (a + 2) % 3);
            let start = v.len() as u32;
            for i in 0..=n[b] {
                for j in 0..=n[c] {
                    let mut p = [0.0; 3];
                    p[a] = lo[a] + if hi { size[a] } else { 0.0 };
                    p[b] = lo[b] + size[b] * i as f64 / n[b] as f64;
                    p[c] = lo[c] + size[c] * j as f64 / n[c] as f64;
                    v.push(Point::new(p[0], p[1], p[2]));
                }
            }
            let id = |i: usize, j: usize| start + (i * (n[c] + 1) + j) as u32;
            for i in 0..n[b] {
                for j in 0..n[c] {
                    let (p00, p10, p11, p01) =
                        (id(i, j), id(i + 1, j), id(i + 1, j + 1), id(i, j + 1));
                    // (b, c, a) is right-handed, so b x c points along +a.
                    if hi {
                        t.extend([[p00, p10, p11], [p00, p11, p01]]);
                    } else {
                        t.extend([[p00, p11, p10], [p00, p01, p11]]);
                    }
                }
            }
        }
    }
    weld(v, t)
}

/// Merge coincident vertices (the faces' shared edges).
fn weld(v: Vec<Point>, t: Vec<[u32; 3]>) -> TriMesh {
    let key = |p: &Point| [p.x, p.y, p.z].map(|c| (c * 1e9).round() as i64);
    let mut index = std::collections::HashMap::new();
    let mut out = Vec::new();
    let map: Vec<u32> = v
        .iter()
        .map(|p| {
            *index.entry(key(p)).or_insert_with(|| {
                out.push(*p);
                (out.len() - 1) as u32
            })
        })
        .collect();
    let t = t.into_iter().map(|f| f.map(|i| map[i as usize])).collect();
    TriMesh::new(out, t).unwrap()
}

fn run(mesh: &PanelMesh) -> ViscousLoop {
    let params = ViscousLoopParams {
        layer: BoundaryLayerParams {
            flow_direction: Some(Vector3::x()),
            ..BoundaryLayerParams::default()
        },
        ..ViscousLoopParams::default()
    };
    viscous_loop_with_params(mesh, &Freestream::new(SPEED, 0.0), &params).unwrap()
}

/// The loop's drag estimate (dead water at Hoerner's pressure, friction
/// included) on the frontal area, and the mean Cp of the nose face.
fn figures(mesh: &PanelMesh, r: &ViscousLoop) -> (f64, f64) {
    let friction = loads::friction_vectors(&r.last.solution.velocity, &r.last.layer, SPEED);
    let cp = dead_water_cp(
        mesh,
        &r.last.solution.cp,
        &r.last.layer,
        &friction,
        &Vector3::x(),
    );
    let (lo, hi) = mesh.bounds();
    let reference = Reference::from_mesh(mesh, lo.x, hi.x);
    let air = loads::FlowState {
        density: 1.225,
        speed: SPEED,
        yaw: 0.0,
    };
    let c = loads::integrate_loads(mesh, &cp, Some(&friction), &reference, &air).unwrap();
    let (mut sum, mut area) = (0.0, 0.0);
    for (p, c) in mesh.panels.iter().zip(&cp) {
        if p.normal.x < -0.99 {
            sum += c * p.area;
            area += p.area;
        }
    }
    (c.total.coefficients.drag, sum / area)
}

/// Flat-faced circular cylinders in axial flow, drag on the frontal area
/// at Reynolds numbers above 10^4: 1.15, 0.90, 0.85, 0.87 and 0.99 for
/// length-to-diameter ratios 0.5, 1, 2, 4 and 8 (Hoerner, *Fluid-Dynamic
/// Drag*, 1965, as tabulated in White, *Fluid Mechanics*, table 7.3;
/// from memory). Attached potential flow alone pulls such a body
/// upstream (the rim's suction on the nose face); the free-streamline
/// bound beside the rim gives the nose face its pressure. The loop comes
/// out 13-30 % low, lowest at the ends of the range, where the base
/// pressure of the short cylinder (no reattachment on its side) and the
/// friction of the long one are what it lacks.
#[test]
fn flat_faced_cylinders_against_the_handbook() {
    println!("L/D  panels  C_D   measured  nose-face Cp  rim zone");
    for (ld, measured, tolerance) in [
        (0.5, 1.15, 0.35),
        (1.0, 0.90, 0.2),
        (2.0, 0.85, 0.2),
        (4.0, 0.87, 0.2),
        (8.0, 0.99, 0.3),
    ] {
        let mesh = PanelMesh::new(flat_faced_cylinder(0.5, 0.5 * ld, 48), Mirrors::none()).unwrap();
        let r = run(&mesh);
        let (cd, nose) = figures(&mesh, &r);
        let rim = r.last.layer.rim_zone.iter().filter(|&&z| z).count();
        println!(
            "{ld:>3}  {:>6}  {cd:.3}  {measured:.2}      {nose:.3}         {rim}",
            mesh.len()
        );
        // One-sided: the loop's estimate is low on every cylinder (above),
        // so one that came out more than 5 % high would be a new error,
        // not the known shortfall.
        assert!(
            cd >= (1.0 - tolerance) * measured && cd <= 1.05 * measured,
            "L/D {ld}: C_D {cd:.3} against {measured} measured (Hoerner 1965, from memory)"
        );
        // Every panel of the nose face lies beside the rim.
        let nose_panels = mesh.panels.iter().filter(|p| p.normal.x < -0.99).count();
        let flagged = (0..mesh.len())
            .filter(|&t| mesh.panels[t].normal.x < -0.99 && r.last.layer.rim_zone[t])
            .count();
        assert!(
            flagged as f64 >= 0.95 * nose_panels as f64,
            "L/D {ld}: {flagged} of {nose_panels} nose-face panels in the rim zone"
        );
    }
}

/// The estimate settles with the panels: the L/D = 2 cylinder at 32, 48
/// and 64 panels round the girth (1,856 to 7,680 panels).
#[test]
fn flat_faced_cylinder_drag_settles_with_the_panels() {
    let cd: Vec<f64> = [32, 48, 64]
        .iter()
        .map(|&around| {
            let mesh =
                PanelMesh::new(flat_faced_cylinder(0.5, 1.0, around), Mirrors::none()).unwrap();
            figures(&mesh, &run(&mesh)).0
        })
        .collect();
    println!("L/D 2 at 32, 48, 64 round: C_D {cd:.3?}");
    // Seen: 0.672, 0.741, 0.753, so the last step moves it 0.012 and the
    // first 0.081; allowed about 2.5 and 1.5 times that (our choice).
    assert!((cd[1] - cd[2]).abs() < 0.03, "{cd:?}");
    assert!((cd[0] - cd[2]).abs() < 0.12, "{cd:?}");
}

/// A cube face-on: C_D 1.05 (Hoerner 1965, from memory; White's table 7.3
/// gives 1.07). And the box of a review's report, 1,044 x 389 x 288 mm
/// standing 50 mm above the ground, which attached flow and the dead water
/// alone had put at C_D -0.83: its drag is a bluff body's again. No
/// measurement of that box is at hand, so it is held to the flat-faced
/// cylinders' measured range (0.85 to 1.15, above) widened by the
/// shortfall allowed on them (35 % low, 5 % high): 0.55 to 1.2 (seen
/// 0.684 at 3,740 panels). The cube, like the cylinders, comes out low
/// (0.754 at 2,700 panels): allowed 30 % low, 5 % high.
#[test]
fn sharp_edged_boxes() {
    let cube = PanelMesh::new(sharp_box([0.3, 0.3, 0.3], 0.02, 0.0), Mirrors::none()).unwrap();
    let (cd, nose) = figures(&cube, &run(&cube));
    println!(
        "cube, {} panels: C_D {cd:.3} (measured 1.05), nose-face Cp {nose:.3}",
        cube.len()
    );
    assert!(
        (0.7 * 1.05..=1.05 * 1.05).contains(&cd),
        "cube: C_D {cd:.3}"
    );
    let mesh = PanelMesh::new(
        sharp_box([1.044, 0.389, 0.288], 0.03, 0.05),
        Mirrors::ground(0.0),
    )
    .unwrap();
    let (cd, nose) = figures(&mesh, &run(&mesh));
    println!(
        "box on the ground, {} panels: C_D {cd:.3}, nose-face Cp {nose:.3}",
        mesh.len()
    );
    assert!((0.55..1.2).contains(&cd), "box: C_D {cd:.3}");
}

/// A nose face exported as a fan of thin triangles from its centre (as
/// CAD exporters cut flat faces; every triangle reaches the sharp rim,
/// where the surface-velocity fit leans on the panels round the edge):
/// `prepare::recut_fans` re-cuts it in rings. Measured (48 panels round,
/// L/D 1): the fan's drag 0.014 (its nose face at Cp -0.24, pulled by the
/// rim's suction), re-cut 0.857 (nose face 0.520), cut in rings 0.765
/// (0.531), against 0.90 measured (Hoerner 1965, from memory).
#[test]
fn a_nose_face_cut_as_a_fan_is_recut_in_rings() {
    use tuft_mesh::prepare::recut_fans;
    let (d, l, around) = (0.5, 0.5, 48);
    let rings = PanelMesh::new(flat_faced_cylinder(d, l, around), Mirrors::none()).unwrap();
    let fan = PanelMesh::new(cylinder(d, l, 0.0, around, Some(1)), Mirrors::none()).unwrap();
    let (recut, done) = recut_fans(fan.clone()).unwrap();
    assert_eq!(
        done,
        Some((1, 48 * 6)),
        "one fan of 48, each triangle cut in seven"
    );
    assert!(recut.edge_neighbours.iter().flatten().all(Option::is_some));
    let area = |m: &PanelMesh| m.panels.iter().map(|p| p.area).sum::<f64>();
    assert!((area(&recut) - area(&fan)).abs() < 1e-9 * area(&fan));
    assert_eq!(recut_fans(recut.clone()).unwrap().1, None, "no fan left");
    let cd = |m: &PanelMesh| figures(m, &run(m));
    let ((fan_cd, fan_nose), (recut_cd, recut_nose), (rings_cd, rings_nose)) =
        (cd(&fan), cd(&recut), cd(&rings));
    println!(
        "L/D 1, nose face as a fan: C_D {fan_cd:.3} (nose Cp {fan_nose:.3}); re-cut {recut_cd:.3} \
         ({recut_nose:.3}); cut in rings {rings_cd:.3} ({rings_nose:.3}); measured 0.90"
    );
    // Against Hoerner's 0.90 (from memory), the allowance the cylinder
    // cut in rings is held to in the handbook test: 20 % low, 5 % high.
    assert!(
        (0.8 * 0.90..=1.05 * 0.90).contains(&recut_cd),
        "re-cut: C_D {recut_cd:.3}"
    );
    assert!(
        fan_cd < 0.5 * 0.90,
        "the fan was thought far off: C_D {fan_cd:.3}"
    );
    // The nose face's own pressure, re-cut against cut in rings.
    assert!(
        (recut_nose - rings_nose).abs() < 0.05,
        "nose-face Cp: re-cut {recut_nose:.3}, rings {rings_nose:.3}"
    );
}

/// The march's free-streamline bound beside a rim is the strongest
/// dead-water suction the loop allows: Hoerner's base-drag correlation at
/// its friction floor (one value, written twice).
#[test]
fn the_rim_bound_is_the_loops_strongest_dead_water() {
    use tuft_solver::boundary_layer::screen::RIM_CP;
    use tuft_solver::viscous_loop::{HOERNER_BASE_DRAG, HOERNER_MIN_FRICTION};
    let strongest = -HOERNER_BASE_DRAG / HOERNER_MIN_FRICTION.sqrt();
    assert!(
        (RIM_CP - strongest).abs() < 0.005,
        "{RIM_CP} against {strongest}"
    );
}

/// Panels in the rim zone of `mesh`'s attached flow along x.
fn attached_rim_panels(mesh: &PanelMesh) -> usize {
    let sol = solve_potential(mesh, &Freestream::new(SPEED, 0.0)).unwrap();
    let params = BoundaryLayerParams {
        flow_direction: Some(Vector3::x()),
        ..BoundaryLayerParams::default()
    };
    let layer = screen_boundary_layer(mesh, &sol.velocity, SPEED, &params).unwrap();
    layer.rim_zone.iter().filter(|&&z| z).count()
}

/// A rounded nose has no rim: on the slant-back research body (front edges
/// rounded with 100 mm, Ahmed, Ramm & Faltin 1984) no panel lies in the
/// rim zone, so its figures in `separated_wakes.rs` are untouched.
#[test]
fn a_rounded_nose_has_no_rim() {
    let rim = attached_rim_panels(&tuft_tests::half_ahmed(25.0, 5000).unwrap());
    assert_eq!(rim, 0, "{rim} panels of the rounded nose in the rim zone");
}

/// A chamfer round the nose rim: the flow leaves a tight one and stays on
/// a wide one. An axial cylinder's drag falls from the flat face's 0.8-0.9
/// to about 0.2 once its nose edge is rounded to a tenth of the diameter
/// or more, most of the fall coming over the first few hundredths
/// (Hoerner 1965, ch. 3; for bluff vehicles Cooper 1985; both from
/// memory). L/D 2, chamfers 1 % and 12 % of the diameter deep.
#[test]
fn a_tight_chamfer_is_a_rim_and_a_wide_one_is_not() {
    let cd = |c: f64| {
        let mesh = PanelMesh::new(chamfered_cylinder(0.5, 1.0, c, 48), Mirrors::none()).unwrap();
        let r = run(&mesh);
        let rim = r.last.layer.rim_zone.iter().filter(|&&z| z).count();
        let (cd, _) = figures(&mesh, &r);
        println!(
            "chamfer {:.0} mm: C_D {cd:.3}, rim zone {rim} panels",
            1000.0 * c
        );
        cd
    };
    let (sharp, tight, wide) = (cd(0.0), cd(0.005), cd(0.06));
    assert!(
        tight > 0.85 * sharp,
        "tight chamfer {tight:.3} against sharp {sharp:.3}"
    );
    assert!(wide < 0.4, "wide chamfer {wide:.3}");
    assert!(
        wide < 0.5 * sharp,
        "wide chamfer {wide:.3} against sharp {sharp:.3}"
    );
}

/// A bump on a rounded body is no front face: on a sphere (5,120 panels)
/// one vertex on the rear half, where the surface faces 20 degrees
/// downstream, is pushed out by 0.3 radii, which tips the panels ahead of
/// it to face upstream and turns the flow down round a sharp crest behind
/// them. A line from the front stagnation point crosses one such panel
/// before the crest, a stretch shorter than two rim radii
/// (`screen::RIM_FACE_RADII`), so no rim zone forms there (a review's scan
/// had "sharp front edges" at its tail from one panel the noise had
/// tipped forward; with the rule off, this bump makes a rim zone, seen).
#[test]
fn a_bump_far_down_a_rounded_body_is_no_rim() {
    let mut sphere = tuft_mesh::generate::icosphere(1.0, 4);
    let target = Vector3::new(20f64.to_radians().sin(), 0.0, 20f64.to_radians().cos());
    let v = (0..sphere.vertices.len())
        .min_by(|&a, &b| {
            let d = |i: usize| (sphere.vertices[i].coords - target).norm();
            d(a).total_cmp(&d(b))
        })
        .unwrap();
    sphere.vertices[v] = Point::from(sphere.vertices[v].coords * 1.3);
    let rim = attached_rim_panels(&PanelMesh::new(sphere, Mirrors::none()).unwrap());
    assert_eq!(rim, 0, "{rim} panels round the bump in the rim zone");
}
