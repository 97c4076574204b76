//! The pressure plateau in separated regions.

use tuft_mesh::PanelMesh;

use super::screen::RIM_CP;
use super::{BoundaryLayer, FlowState, Streamline};

/// How far upstream of a separation point, in median panel sizes, the
/// plateau pressure is read (see [`plateau_cp`]).
pub const PLATEAU_LOOKBACK_SIZES: f64 = 3.0;

/// Pressure coefficients with the separated-region plateau: every separated
/// panel holds the Cp at its streamline's separation point (the base-pressure
/// model of separated flow: the pressure in a separated region stays near
/// its value at separation; e.g. Hoerner, *Fluid-Dynamic Drag*, 1965, ch. 3;
/// common practice in panel-method drag estimates). Other panels keep their
/// Cp.
///
/// The value at separation is read [`PLATEAU_LOOKBACK_SIZES`] median panel
/// sizes upstream of the separation point along the streamline. At a sharp
/// base edge the attached potential flow has a suction peak that grows
/// without bound as panels shrink (Cp of -50 and below on the panels at
/// the edge); the real flow leaves the edge at about the pressure it had
/// just upstream, so the plateau takes that value instead of the
/// mesh-dependent peak. Where several separated streamlines cross a panel,
/// it holds the mean of their plateaus; a separated panel that no
/// separated streamline crossed (filled from a neighbour) holds the Cp of
/// [`BoundaryLayer::separation_source`]'s panel, or its own where there is
/// none. Beside a rim the flow leaves ([`BoundaryLayer::rim_zone`]) the
/// pressure is held no lower than [`RIM_CP`] first (the free streamline's
/// bound; the loop's dead water uses its own pressure there instead).
///
/// # Panics
/// If `cp` or `layer` (its panels and rim flags) do not have one entry per
/// panel of `mesh` (a programmer mistake).
#[track_caller]
pub fn plateau_cp(mesh: &PanelMesh, cp: &[f64], layer: &BoundaryLayer) -> Vec<f64> {
    assert_eq!(cp.len(), mesh.len(), "one Cp per panel");
    assert_eq!(layer.panels.len(), mesh.len(), "one layer per panel");
    assert_eq!(layer.rim_zone.len(), mesh.len(), "one rim flag per panel");
    let cp: Vec<f64> = cp
        .iter()
        .zip(&layer.rim_zone)
        .map(|(&c, &rim)| if rim { c.max(RIM_CP) } else { c })
        .collect();
    let lookback = PLATEAU_LOOKBACK_SIZES * median_size(mesh);
    let mut sum = vec![0.0; mesh.len()];
    let mut count = vec![0u32; mesh.len()];
    for line in &layer.streamlines {
        let Some(at) = line.separated_at else {
            continue;
        };
        let value = cp[upstream_panel(line, at, lookback) as usize];
        for &p in line.panels.iter().skip(at) {
            sum[p as usize] += value;
            count[p as usize] += 1;
        }
    }
    (0..mesh.len())
        .map(|i| match layer.panels[i].state {
            FlowState::Separated if count[i] > 0 => sum[i] / f64::from(count[i]),
            FlowState::Separated => layer.separation_source[i].map_or(cp[i], |s| cp[s as usize]),
            _ => cp[i],
        })
        .collect()
}

/// The panel of the segment `distance` upstream of point `at` along `line`
/// (the line's first panel when it is shorter than that).
fn upstream_panel(line: &Streamline, at: usize, distance: f64) -> u32 {
    let mut left = distance;
    let mut j = at.min(line.panels.len().saturating_sub(1));
    while j > 0 && left > 0.0 {
        left -= (line.points[j] - line.points[j - 1]).norm();
        j -= 1;
    }
    line.panels.get(j).copied().unwrap_or(0)
}

fn median_size(mesh: &PanelMesh) -> f64 {
    let mut sizes: Vec<f64> = mesh.panels.iter().map(|p| p.size).collect();
    sizes.sort_by(f64::total_cmp);
    sizes.get(sizes.len() / 2).copied().unwrap_or(0.0)
}
