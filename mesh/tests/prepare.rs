//! `prepare`: file to panels in one call.
#![allow(clippy::unwrap_used, clippy::expect_used)]

mod common;

use std::f64::consts::PI;

use common::cut;
use tuft_mesh::prepare::{PrepareParams, prepare};
use tuft_mesh::{LengthUnit, MeshError, Mirrors, generate};

#[test]
fn half_sphere_in_millimetres_with_symmetry() {
    // A 1 m radius half sphere written in millimetres.
    let mut half = cut(&generate::latlong_sphere(1000.0, 40, 80), |c| c.y > 0.0);
    tuft_mesh::repair::remove_unused_vertices(&mut half);
    let dir = tempfile::tempdir().unwrap();
    let path = common::write(dir.path(), "half.stl", &common::binary_stl(&half));
    let params = PrepareParams {
        units: LengthUnit::Mm,
        mirrors: Mirrors {
            ground: None,
            symmetry: true,
        },
        target_panels: Some(1500),
        ..PrepareParams::default()
    };
    let (panels, report) = prepare(&path, &params).unwrap();
    assert_eq!(report.read.as_ref().unwrap().facets, half.len());
    assert!(panels.len() <= 1500 + 200);
    // Half of 4 pi r^2 (Archimedes) with r = 1 m, within 3 % (inscribed polyhedron).
    assert!(
        (report.area - 2.0 * PI).abs() / (2.0 * PI) < 0.03,
        "{}",
        report.area
    );
    assert_eq!(report.repair.holes.mirror_closed.len(), 1);
    let json = serde_json::to_string(&report).unwrap();
    assert!(json.contains("\"mirror_closed\""));

    let refused = prepare(
        &path,
        &PrepareParams {
            mirrors: Mirrors::none(),
            ..params
        },
    );
    assert!(matches!(refused, Err(MeshError::OpenHole { .. })));
}

#[test]
fn body_across_the_symmetry_plane_is_refused() {
    let dir = tempfile::tempdir().unwrap();
    let path = common::write(
        dir.path(),
        "s.stl",
        &common::binary_stl(&generate::icosphere(1.0, 2)),
    );
    let params = PrepareParams {
        units: LengthUnit::M,
        mirrors: Mirrors {
            ground: None,
            symmetry: true,
        },
        ..PrepareParams::default()
    };
    let e = prepare(&path, &params).unwrap_err();
    assert!(
        matches!(e, MeshError::Mirror(_)) && e.to_string().contains("y >= 0"),
        "{e}"
    );
}
