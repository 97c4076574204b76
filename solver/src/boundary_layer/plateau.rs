//! The pressure plateau in separated regions.

use tuft_mesh::PanelMesh;

use super::{BoundaryLayer, FlowState};

/// Pressure coefficients with the separated-region plateau: every separated
/// panel holds the Cp at its streamline's separation point (the base-pressure
/// model of separated flow: the pressure in a separated region stays near
/// its value at separation; e.g. Hoerner, *Fluid-Dynamic Drag*, 1965, ch. 3;
/// common practice in panel-method drag estimates). Other panels keep their
/// Cp. The source panel is [`BoundaryLayer::separation_source`].
///
/// # Panics
/// If `cp` or `layer` do not have one entry per panel of `mesh` (a
/// programmer mistake).
#[track_caller]
pub fn plateau_cp(mesh: &PanelMesh, cp: &[f64], layer: &BoundaryLayer) -> Vec<f64> {
    assert_eq!(cp.len(), mesh.len(), "one Cp per panel");
    assert_eq!(layer.panels.len(), mesh.len(), "one layer per panel");
    cp.iter()
        .zip(&layer.panels)
        .zip(&layer.separation_source)
        .map(|((&c, p), src)| match (p.state, src) {
            (FlowState::Separated, Some(s)) => cp[*s as usize],
            _ => c,
        })
        .collect()
}
