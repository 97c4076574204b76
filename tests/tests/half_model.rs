//! A symmetric body run as a half model (symmetry plane y = 0, by images)
//! gives the same loads as the full model: the image method is an exact
//! identity of the panel method (Katz & Plotkin, *Low-Speed Aerodynamics*,
//! 2nd ed., 2001, on images (from memory); the reflected panels carry the same
//! singularity strengths), so the only differences are round-off.
#![allow(clippy::unwrap_used, clippy::expect_used)]

use tuft_mesh::generate::{AhmedParams, ahmed_with_params};
use tuft_mesh::prepare::{PrepareParams, prepare_mesh};
use tuft_mesh::{LengthUnit, Mirrors, PanelMesh};
use tuft_solver::loads::{FlowState, Loads, Reference, integrate_loads};
use tuft_solver::{Freestream, solve_potential};

fn body(half: bool) -> tuft_mesh::TriMesh {
    ahmed_with_params(&AhmedParams {
        slant_deg: 25.0,
        panels: 1600,
        half,
        ..Default::default()
    })
    .unwrap()
}

fn loads(half: bool) -> (usize, tuft_solver::loads::Loads) {
    let mirrors = Mirrors {
        ground: Some(0.0),
        symmetry: half,
    };
    let mesh = PanelMesh::new(body(half), mirrors).unwrap();
    loads_of(&mesh)
}

fn loads_of(mesh: &PanelMesh) -> (usize, tuft_solver::loads::Loads) {
    let sol = solve_potential(mesh, &Freestream::new(40.0, 0.0)).unwrap();
    let reference = Reference::from_mesh(mesh, 0.2, 0.85);
    let air = FlowState {
        density: 1.204,
        speed: 40.0,
        yaw: 0.0,
    };
    (
        mesh.len(),
        integrate_loads(mesh, &sol.cp, None, &reference, &air).unwrap(),
    )
}

/// The two runs' loads agree within 1e-6 relative (the image identity:
/// round-off only).
fn same_loads(a_name: &str, a: &Loads, b_name: &str, b: &Loads) {
    let rel = |x: f64, y: f64| (x - y).abs() / y.abs().max(1e-12);
    let (ca, cb) = (a.total.coefficients, b.total.coefficients);
    println!(
        "{a_name}: lift {:.9} drag {:.9} pitch {:.9}; {b_name}: lift {:.9} drag {:.9} pitch {:.9}",
        ca.lift, ca.drag, ca.pitch, cb.lift, cb.drag, cb.pitch
    );
    assert!(rel(b.lift, a.lift) < 1e-6, "lift {} vs {}", b.lift, a.lift);
    assert!(
        rel(cb.drag, ca.drag) < 1e-6,
        "drag {} vs {}",
        cb.drag,
        ca.drag
    );
    assert!(
        rel(cb.pitch, ca.pitch) < 1e-6,
        "pitch {} vs {}",
        cb.pitch,
        ca.pitch
    );
    assert!(rel(b.axles.front, a.axles.front) < 1e-6);
    assert!(rel(b.axles.rear, a.axles.rear) < 1e-6);
}

#[test]
fn half_model_gives_the_full_model_loads() {
    let (n_full, full) = loads(false);
    let (n_half, half) = loads(true);
    // Half the unknowns: a quarter of the dense matrix.
    assert_eq!(
        2 * n_half,
        n_full,
        "the half model holds exactly half the panels"
    );
    same_loads("full", &full, "half", &half);
    // By symmetry the half model has no side force at all.
    assert!(half.total.coefficients.side.abs() < 1e-12);
}

/// A whole body declared a half model (`geometry.half_model = true` on a
/// whole STL) is cut at y = 0 and its y >= 0 half run mirrored: the same
/// image identity, so the loads are the whole body's. The slant-back body
/// has edges on y = 0, so the cut splits no facet and the half holds half
/// the panels; the loads agree to round-off.
#[test]
fn a_whole_body_cut_at_its_symmetry_plane_gives_the_whole_bodys_loads() {
    let whole = body(false);
    let params = PrepareParams {
        units: LengthUnit::M,
        mirrors: Mirrors {
            ground: Some(0.0),
            symmetry: true,
        },
        target_panels: Some(whole.len()),
        ..PrepareParams::default()
    };
    let (mesh, report) = prepare_mesh(whole.clone(), None, &params).unwrap();
    let cut = report.mirrors.whole_cut.expect("the whole body is cut");
    println!("{}", cut.describe());
    assert_eq!(2 * mesh.len(), whole.len());
    assert!(cut.largest_difference < 1e-9);
    let (_, full) = loads(false);
    let (_, half) = loads_of(&mesh);
    same_loads("whole", &full, "cut half", &half);
}
