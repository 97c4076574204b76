//! Every panel gets a boundary layer: lines from the attachment rings fan
//! out and leave strips between them on a long body (a car's sides), so the
//! screening traces the streamline through each panel they missed. The
//! check runs on the concept coupe (a long body with a point-like nose
//! attachment) and the slant-back body in ground effect, through the panel
//! method's own surface velocity.
#![allow(clippy::unwrap_used, clippy::expect_used)]

use tuft_mesh::generate::{AhmedParams, CoupeParams, ahmed_with_params, coupe_with_params};
use tuft_mesh::{Mirrors, PanelMesh, TriMesh};
use tuft_solver::boundary_layer::{BoundaryLayerParams, FlowState, screen_boundary_layer};
use tuft_solver::{Freestream, solve_potential};

fn unresolved_after_screening(body: TriMesh) -> (usize, usize, usize) {
    let mesh = PanelMesh::new(body, Mirrors::ground(0.0)).unwrap();
    let sol = solve_potential(&mesh, &Freestream::new(40.0, 0.0)).unwrap();
    let params = BoundaryLayerParams {
        nu: 1.506e-5,
        ..BoundaryLayerParams::default()
    };
    let layer = screen_boundary_layer(&mesh, &sol.velocity, 40.0, &params).unwrap();
    let counted = layer
        .panels
        .iter()
        .filter(|p| p.state == FlowState::Unresolved)
        .count();
    assert_eq!(
        counted, layer.unresolved,
        "the reported count is the real count"
    );
    let crossed: std::collections::HashSet<u32> = layer
        .streamlines
        .iter()
        .flat_map(|l| l.panels.iter().copied())
        .collect();
    (mesh.len(), layer.unresolved, crossed.len())
}

#[test]
fn every_panel_of_the_coupe_and_the_slant_back_body_is_resolved() {
    let coupe = coupe_with_params(&CoupeParams {
        panels: 2500,
        ..Default::default()
    })
    .unwrap();
    let ahmed = ahmed_with_params(&AhmedParams {
        panels: 2500,
        ..Default::default()
    })
    .unwrap();
    for (name, body) in [("coupe", coupe), ("slant-back", ahmed)] {
        let (n, unresolved, crossed) = unresolved_after_screening(body);
        println!("{name}: {n} panels, {crossed} crossed by a streamline, {unresolved} unresolved");
        // At most 1 % left unresolved and 80 % crossed by a line of their
        // own rather than filled from neighbours (both our choice: the
        // design goal is every panel reached or counted).
        assert!(
            unresolved * 100 <= n,
            "{name}: {unresolved} of {n} unresolved"
        );
        assert!(
            crossed * 10 >= 8 * n,
            "{name}: only {crossed} of {n} crossed"
        );
    }
}
