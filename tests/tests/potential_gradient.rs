//! The surface-gradient reconstruction on its own, fed an exact field.
#![allow(clippy::unwrap_used, clippy::expect_used)]

use tuft_mesh::{Mirrors, PanelMesh, TriMesh, generate};
use tuft_solver::gradient::surface_gradient;

/// rms and max error of grad_t mu for mu = -x/2 on the unit sphere, whose
/// exact tangential gradient is -(e_x - n_x n)/2 at the centroid's
/// projection on the sphere (potential of a sphere in unit flow, Lamb 1932,
/// sec. 92: the inside-minus-outside perturbation potential is -x/2).
fn errors(mesh: TriMesh) -> (f64, f64, f64) {
    let mesh = PanelMesh::new(mesh, Mirrors::none()).unwrap();
    let mu: Vec<f64> = mesh
        .panels
        .iter()
        .map(|p| -0.5 * p.centroid.x / p.centroid.coords.norm())
        .collect();
    let g = surface_gradient(&mesh, &mu);
    let (mut sum, mut max) = (0.0, 0.0f64);
    for (p, gi) in mesh.panels.iter().zip(&g) {
        let n = p.centroid.coords.normalize();
        let ex = nalgebra::Vector3::x();
        let exact = -(ex - n * n.x) * 0.5;
        let e = (gi - exact).norm();
        sum += e * e;
        max = max.max(e);
    }
    let h = (mesh.area() / mesh.len() as f64).sqrt();
    ((sum / mesh.len() as f64).sqrt(), max, h)
}

#[test]
fn gradient_orders() {
    for (name, meshes) in [
        (
            "ico",
            vec![
                generate::icosphere(1.0, 2),
                generate::icosphere(1.0, 3),
                generate::icosphere(1.0, 4),
            ],
        ),
        (
            "latlong",
            vec![
                generate::latlong_sphere(1.0, 12, 14),
                generate::latlong_sphere(1.0, 24, 28),
                generate::latlong_sphere(1.0, 48, 56),
            ],
        ),
    ] {
        for m in meshes {
            let (rms, max, h) = errors(m);
            println!("{name} h {h:.4} rms {rms:.3e} max {max:.3e}");
        }
    }
}
