//! The generated bodies through the public API: each one becomes a panel
//! mesh without complaint, with every edge matched (or, for half models,
//! open only on the symmetry plane), above the ground plane z = 0.
#![allow(clippy::unwrap_used, clippy::expect_used)]

use tuft_mesh::generate::{self, AhmedParams, CoupeParams, WingParams};
use tuft_mesh::{Mirrors, PanelMesh, TriMesh};

/// Panels build (no zero-area facet) and every edge has a neighbour
/// unless it lies on a declared mirror plane.
fn panels_ok(mesh: TriMesh, mirrors: Mirrors) -> PanelMesh {
    let panels = PanelMesh::new(mesh, mirrors).unwrap();
    for (t, tri) in panels.triangles.iter().enumerate() {
        for k in 0..3 {
            if panels.edge_neighbours[t][k].is_none() {
                let (a, b) = (tri[k], tri[(k + 1) % 3]);
                for v in [a, b] {
                    let p = panels.vertices[v as usize];
                    assert!(mirrors.on_plane(&p, 0.0), "open edge {a}-{b} at {p}");
                }
            }
        }
    }
    panels
}

#[test]
fn every_generator_makes_a_usable_panel_mesh() {
    let ground = Mirrors::ground(0.0);
    let bodies = [
        generate::ellipsoid(0.5, 0.1, 0.08, 1500).unwrap(),
        generate::wing_with_params(&WingParams::default())
            .unwrap()
            .mesh,
        generate::ahmed(35.0, 3000).unwrap(),
        generate::coupe(20.0, 3000).unwrap(),
    ];
    for (k, mesh) in bodies.into_iter().enumerate() {
        let mirrors = if k == 0 { Mirrors::none() } else { ground };
        let panels = panels_ok(mesh, mirrors);
        let (lo, _) = panels.bounds();
        assert!(k == 0 || lo.z > 0.0, "body {k} reaches the ground: {lo}");
    }
}

#[test]
fn half_models_close_on_their_image() {
    let both = Mirrors {
        ground: Some(0.0),
        symmetry: true,
    };
    let ahmed = AhmedParams {
        half: true,
        panels: 2000,
        ..AhmedParams::default()
    };
    let coupe = CoupeParams {
        half: true,
        panels: 2000,
        ..CoupeParams::default()
    };
    for mesh in [
        generate::ahmed_with_params(&ahmed).unwrap(),
        generate::coupe_with_params(&coupe).unwrap(),
    ] {
        let panels = panels_ok(mesh, both);
        assert!(panels.edge_neighbours.iter().flatten().any(Option::is_none));
    }
}

#[test]
fn convex_ellipsoid_normals_point_away_from_the_centre() {
    // An ellipsoid is convex: every outward panel normal has a positive
    // component along the centroid's position vector (geometry).
    let mesh = generate::ellipsoid(1.0, 0.4, 0.3, 2000).unwrap();
    let panels = PanelMesh::new(mesh, Mirrors::none()).unwrap();
    assert!(
        panels
            .panels
            .iter()
            .all(|p| p.normal.dot(&p.centroid.coords) > 0.0)
    );
}
