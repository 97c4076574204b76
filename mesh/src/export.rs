//! Writing a mesh back out as a binary STL (for looking at the panels a
//! run uses in any viewer, over the scan they came from).

use std::io::Write;

use crate::{FileAxes, LengthUnit, PanelMesh, TriMesh};

/// The facets of `mesh` (metres) as STL triangles in `unit`, with unit
/// normals from the vertex order.
pub fn stl_facets(mesh: &TriMesh, unit: LengthUnit) -> Vec<stl_io::Triangle> {
    let scale = 1.0 / unit.to_metres();
    (0..mesh.len())
        .map(|t| {
            let n = mesh.area_vector(t).try_normalize(0.0).unwrap_or_default();
            let vertices = mesh.corners(t).map(|p| {
                stl_io::Vertex::new([
                    (p.x * scale) as f32,
                    (p.y * scale) as f32,
                    (p.z * scale) as f32,
                ])
            });
            stl_io::Triangle {
                normal: stl_io::Normal::new([n.x as f32, n.y as f32, n.z as f32]),
                vertices,
            }
        })
        .collect()
}

/// Write the real panels of `mesh` (no mirror images) to `out` as a binary
/// STL in `unit`, in the axes of a file read with `axes` (`mirrored`: the
/// file held a left half, [`FileAxes::apply`]); `None` keeps tuft's. A
/// [`crate::prepare::PrepareParams::transform`] applied after the axes is
/// not undone (the command line sets none).
///
/// # Errors
/// The writer's I/O errors.
pub fn write_panels_stl(
    out: &mut impl Write,
    mesh: &PanelMesh,
    unit: LengthUnit,
    axes: Option<(FileAxes, bool)>,
) -> std::io::Result<()> {
    let mut tri = TriMesh {
        vertices: mesh.vertices.clone(),
        triangles: mesh.triangles.clone(),
    };
    if let Some((axes, mirrored)) = axes {
        axes.restore(&mut tri, mirrored);
    }
    let mut bytes = Vec::new();
    stl_io::write_stl(&mut bytes, stl_facets(&tri, unit).iter())?;
    // The header marks the file as panels tuft wrote (binary STL leaves
    // its 80 bytes free; never "solid", which reads as ASCII).
    let tag = PANELS_HEADER.as_bytes();
    if let Some(h) = bytes.get_mut(..tag.len()) {
        h.copy_from_slice(tag);
    }
    out.write_all(&bytes)
}

/// How the 80-byte header of a panels file [`write_panels_stl`] wrote
/// begins: `tuft check --save-panels` replaces only such a file.
pub const PANELS_HEADER: &str = "tuft panels";

/// Whether the file at `path` is a panels file [`write_panels_stl`] wrote.
pub fn is_panels_file(path: &std::path::Path) -> bool {
    use std::io::Read;
    let mut head = [0u8; PANELS_HEADER.len()];
    std::fs::File::open(path)
        .and_then(|mut f| f.read_exact(&mut head))
        .is_ok_and(|()| head == PANELS_HEADER.as_bytes())
}
