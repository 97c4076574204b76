//! `prepare`: file to panels in one call.
#![allow(clippy::unwrap_used, clippy::expect_used)]

mod common;

use std::f64::consts::PI;

use common::cut;
use tuft_mesh::prepare::{PrepareParams, prepare};
use tuft_mesh::{LengthUnit, MeshError, Mirrors, generate};

/// A half model in millimetres coarsened to about 1,500 panels.
fn half_in_mm() -> PrepareParams {
    PrepareParams {
        units: LengthUnit::Mm,
        mirrors: Mirrors {
            ground: None,
            symmetry: true,
        },
        target_panels: Some(1500),
        ..PrepareParams::default()
    }
}

/// A half model in metres, at the suggested panel count.
fn half_in_metres() -> PrepareParams {
    PrepareParams {
        units: LengthUnit::M,
        target_panels: None,
        ..half_in_mm()
    }
}

#[test]
fn half_sphere_in_millimetres_with_symmetry() {
    // A 1 m radius half sphere written in millimetres.
    let mut half = cut(&generate::latlong_sphere(1000.0, 40, 80), |c| c.y > 0.0);
    tuft_mesh::repair::remove_unused_vertices(&mut half);
    let dir = tempfile::tempdir().unwrap();
    let path = common::write(dir.path(), "half.stl", &common::binary_stl(&half));
    let params = half_in_mm();
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

/// A body reaching across y = 0 by a tenth of its width is neither a half
/// model nor a whole body centred there (which would be cut): refused.
#[test]
fn body_across_the_symmetry_plane_is_refused() {
    let dir = tempfile::tempdir().unwrap();
    let mut body = generate::icosphere(1.0, 2);
    body.map_vertices(|p| tuft_mesh::Point::new(p.x, p.y + 0.8, p.z));
    let path = common::write(dir.path(), "s.stl", &common::binary_stl(&body));
    let params = half_in_metres();
    let e = prepare(&path, &params).unwrap_err();
    assert!(
        matches!(e, MeshError::AcrossSymmetryPlane { .. }) && e.to_string().contains("y >= 0"),
        "{e}"
    );
}

/// A half scan whose cut wanders a millimetre either side of y = 0 (a cut
/// made by hand) is taken as cut on the plane: its border vertices move
/// onto it, the cut is closed by the mirror, and the report says how far
/// they moved. A body reaching 5 cm across the plane is still refused,
/// in millimetres.
#[test]
fn a_cut_within_a_millimetre_or_two_of_the_plane_is_moved_onto_it() {
    let mut half = cut(&generate::latlong_sphere(1000.0, 40, 80), |c| c.y > 0.0);
    tuft_mesh::repair::remove_unused_vertices(&mut half);
    let mut rng = common::Lcg(7);
    for v in &mut half.vertices {
        if v.y.abs() < 1e-9 {
            v.y = 2.0 * rng.next_f64() - 1.0; // -1 to 1 mm
        }
    }
    let dir = tempfile::tempdir().unwrap();
    let params = half_in_mm();
    let path = common::write(dir.path(), "half.stl", &common::binary_stl(&half));
    let (_, report) = prepare(&path, &params).unwrap();
    assert_eq!(report.repair.holes.mirror_closed.len(), 1);
    assert!(
        report.mirrors.cut_vertices_moved > 70,
        "{:?}",
        report.mirrors
    );
    assert!(report.mirrors.cut_largest_move <= 1e-3 + 1e-9);
    half.vertices[0].y = -50.0;
    let path = common::write(dir.path(), "across.stl", &common::binary_stl(&half));
    let e = prepare(&path, &params).unwrap_err().to_string();
    assert!(e.contains("-50.0 mm"), "{e}");
}

/// A whole body that is not symmetric about y = 0 (an ellipsoid turned by
/// 0.1 rad about z) is still cut there when declared a half model, but
/// the preparation warns that the halves differ and by how much.
#[test]
fn an_unsymmetric_whole_body_cut_at_the_plane_is_warned_about() {
    let mut body = generate::icosphere(1.0, 3);
    let (c, s) = (0.1f64.cos(), 0.1f64.sin());
    body.map_vertices(|p| {
        tuft_mesh::Point::new(2.0 * c * p.x - s * p.y, 2.0 * s * p.x + c * p.y, p.z)
    });
    let params = half_in_metres();
    let (_, report) = tuft_mesh::prepare::prepare_mesh(body, None, &params).unwrap();
    let cut = report.mirrors.whole_cut.expect("cut");
    assert!(cut.largest_difference > 0.1, "{}", cut.largest_difference);
    assert!(
        report
            .quality
            .warnings
            .iter()
            .any(|w| w.contains("the halves differ by up to")),
        "{:?}",
        report.quality.warnings
    );
}
