//! The surface-gradient reconstruction on its own, fed an exact field.
#![allow(clippy::unwrap_used, clippy::expect_used)]

use nalgebra::Vector3;
use tuft_mesh::{Mirrors, PanelMesh, Point, TriMesh, generate};
use tuft_solver::gradient::surface_gradient;

/// rms and max error of grad_t mu for mu = -x/2 on the unit sphere (the
/// sphere's doublet strength, Lamb 1932, sec. 92), sampled at the radial
/// projection of each centroid; exact tangential gradient there
/// -(e_x - n_x n)/2 with n the sphere normal. Errors over the panels for
/// which `keep` holds.
fn errors(mesh: &PanelMesh, keep: impl Fn(&Point) -> bool) -> (f64, f64, f64) {
    let mu: Vec<f64> = mesh
        .panels
        .iter()
        .map(|p| -0.5 * p.centroid.x / p.centroid.coords.norm())
        .collect();
    let g = surface_gradient(mesh, &mu);
    let (mut sum, mut max, mut count) = (0.0, 0.0f64, 0usize);
    for (p, gi) in mesh
        .panels
        .iter()
        .zip(&g)
        .filter(|(p, _)| keep(&p.centroid))
    {
        let n = p.centroid.coords.normalize();
        let exact = -(Vector3::x() - n * n.x) * 0.5;
        let e = (gi - exact).norm();
        sum += e * e;
        max = max.max(e);
        count += 1;
    }
    let h = (mesh.area() / mesh.len() as f64).sqrt();
    ((sum / count as f64).sqrt(), max, h)
}

fn order(name: &str, meshes: [TriMesh; 3]) -> f64 {
    let r: Vec<(f64, f64, f64)> = meshes
        .into_iter()
        .map(|m| errors(&PanelMesh::new(m, Mirrors::none()).unwrap(), |_| true))
        .collect();
    for (rms, max, h) in &r {
        println!("{name}: h {h:.4} rms {rms:.3e} max {max:.3e}");
    }
    let p = (r[0].0 / r[2].0).ln() / (r[0].2 / r[2].2).ln();
    println!("{name}: observed order {p:.2}");
    p
}

/// The quadratic fit is second order on smooth stencils: on the lat-long
/// sphere the observed order over three meshes is at least 1.8. On the
/// icosphere the valence-5 vertices and the subdivision pattern keep it
/// near 1.6 (observed; at least 1.4 asserted): the error there is set by
/// mesh irregularity (common practice: least-squares gradients lose order
/// on irregular stencils).
#[test]
fn gradient_is_about_second_order() {
    let ll = order(
        "lat-long",
        [
            generate::latlong_sphere(1.0, 12, 14),
            generate::latlong_sphere(1.0, 24, 28),
            generate::latlong_sphere(1.0, 48, 56),
        ],
    );
    let ico = order(
        "icosphere",
        [
            generate::icosphere(1.0, 2),
            generate::icosphere(1.0, 3),
            generate::icosphere(1.0, 4),
        ],
    );
    assert!(ll >= 1.8, "lat-long order {ll:.2}");
    assert!(ico >= 1.4, "icosphere order {ico:.2}");
}

/// A half sphere on the symmetry plane: panels touching the plane use the
/// mirror images of their neighbours, so their gradient equals the one on
/// the explicitly mirrored whole body (to round-off, 1e-12), where a
/// one-sided fit over the real neighbours only is less accurate.
#[test]
fn mirror_plane_panels_use_reflected_neighbours() {
    let half = tuft_tests::half_sphere(24, 28, 0.0);
    // The explicit mirror: reflected copy, plane vertices shared, order reversed.
    let n = half.vertices.len() as u32;
    let mut whole = half.clone();
    whole
        .vertices
        .extend(half.vertices.iter().map(|p| Point::new(p.x, -p.y, p.z)));
    let map = |v: u32| {
        if half.vertices[v as usize].y == 0.0 {
            v
        } else {
            v + n
        }
    };
    whole.triangles.extend(
        half.triangles
            .iter()
            .map(|t| [map(t[0]), map(t[2]), map(t[1])]),
    );
    let imaged = PanelMesh::new(
        half.clone(),
        Mirrors {
            ground: None,
            symmetry: true,
        },
    )
    .unwrap();
    let one_sided = PanelMesh::new(half, Mirrors::none()).unwrap();
    let whole = PanelMesh::new(whole, Mirrors::none()).unwrap();
    let mu = |m: &PanelMesh| -> Vec<f64> {
        m.panels
            .iter()
            .map(|p| -0.5 * p.centroid.x / p.centroid.coords.norm())
            .collect()
    };
    let (gi, gw) = (
        surface_gradient(&imaged, &mu(&imaged)),
        surface_gradient(&whole, &mu(&whole)),
    );
    let diff = gi
        .iter()
        .zip(&gw)
        .fold(0.0f64, |m, (a, b)| m.max((a - b).norm()));
    let near_plane = |c: &Point| c.y.abs() < 0.08;
    let (with_images, _, _) = errors(&imaged, near_plane);
    let (without, _, _) = errors(&one_sided, near_plane);
    println!(
        "panels at the plane: rms error {with_images:.3e} with images, {without:.3e} one-sided; image vs explicit {diff:.1e}"
    );
    assert!(
        diff < 1e-12,
        "image stencil differs from the explicit mirror by {diff:.1e}"
    );
    assert!(with_images < without, "images should help at the plane");
}
