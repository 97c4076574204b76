//! Spheres: subdivided icosahedron and latitude-longitude.

use std::collections::HashMap;

use crate::{Point, TriMesh};

/// Sphere of `radius` centred at the origin from an icosahedron subdivided
/// `levels` times: `20 * 4^levels` triangles, vertices on the sphere.
pub fn icosphere(radius: f64, levels: u32) -> TriMesh {
    let t = (1.0 + 5f64.sqrt()) / 2.0;
    let mut verts: Vec<Point> = [
        (-1.0, t, 0.0),
        (1.0, t, 0.0),
        (-1.0, -t, 0.0),
        (1.0, -t, 0.0),
        (0.0, -1.0, t),
        (0.0, 1.0, t),
        (0.0, -1.0, -t),
        (0.0, 1.0, -t),
        (t, 0.0, -1.0),
        (t, 0.0, 1.0),
        (-t, 0.0, -1.0),
        (-t, 0.0, 1.0),
    ]
    .iter()
    .map(|&(x, y, z)| Point::from(nalgebra::Vector3::new(x, y, z).normalize()))
    .collect();
    let mut tris: Vec<[u32; 3]> = vec![
        [0, 11, 5],
        [0, 5, 1],
        [0, 1, 7],
        [0, 7, 10],
        [0, 10, 11],
        [1, 5, 9],
        [5, 11, 4],
        [11, 10, 2],
        [10, 7, 6],
        [7, 1, 8],
        [3, 9, 4],
        [3, 4, 2],
        [3, 2, 6],
        [3, 6, 8],
        [3, 8, 9],
        [4, 9, 5],
        [2, 4, 11],
        [6, 2, 10],
        [8, 6, 7],
        [9, 8, 1],
    ];
    for _ in 0..levels {
        let mut mid: HashMap<(u32, u32), u32> = HashMap::new();
        let mut midpoint = |a: u32, b: u32, verts: &mut Vec<Point>| -> u32 {
            let key = (a.min(b), a.max(b));
            *mid.entry(key).or_insert_with(|| {
                let p = (verts[a as usize].coords + verts[b as usize].coords).normalize();
                verts.push(Point::from(p));
                (verts.len() - 1) as u32
            })
        };
        let mut next = Vec::with_capacity(tris.len() * 4);
        for [a, b, c] in tris {
            let ab = midpoint(a, b, &mut verts);
            let bc = midpoint(b, c, &mut verts);
            let ca = midpoint(c, a, &mut verts);
            next.extend([[a, ab, ca], [b, bc, ab], [c, ca, bc], [ab, bc, ca]]);
        }
        tris = next;
    }
    for p in &mut verts {
        *p = Point::from(p.coords * radius);
    }
    TriMesh {
        vertices: verts,
        triangles: tris,
    }
}

/// Latitude-longitude sphere of `radius` with `n_lat` bands (poles on the
/// x axis, so the bands follow the flow) and `n_lon` meridians:
/// `2 * n_lon * (n_lat - 1)` triangles.
///
/// # Panics
/// If `n_lat < 2` or `n_lon < 3`.
#[track_caller]
pub fn latlong_sphere(radius: f64, n_lat: usize, n_lon: usize) -> TriMesh {
    assert!(
        n_lat >= 2 && n_lon >= 3,
        "latlong_sphere needs n_lat >= 2 and n_lon >= 3"
    );
    let mut verts = vec![Point::new(-radius, 0.0, 0.0)];
    for i in 1..n_lat {
        let th = std::f64::consts::PI * i as f64 / n_lat as f64;
        for j in 0..n_lon {
            let ph = 2.0 * std::f64::consts::PI * j as f64 / n_lon as f64;
            verts.push(Point::new(
                -radius * th.cos(),
                radius * th.sin() * ph.cos(),
                radius * th.sin() * ph.sin(),
            ));
        }
    }
    verts.push(Point::new(radius, 0.0, 0.0));
    let last = (verts.len() - 1) as u32;
    let ring = |i: usize, j: usize| (1 + (i - 1) * n_lon + j % n_lon) as u32;
    let mut tris = Vec::new();
    for j in 0..n_lon {
        tris.push([0, ring(1, j + 1), ring(1, j)]);
    }
    for i in 1..n_lat - 1 {
        for j in 0..n_lon {
            let (a, b, c, d) = (
                ring(i, j),
                ring(i, j + 1),
                ring(i + 1, j),
                ring(i + 1, j + 1),
            );
            tris.push([a, b, d]);
            tris.push([a, d, c]);
        }
    }
    for j in 0..n_lon {
        tris.push([last, ring(n_lat - 1, j), ring(n_lat - 1, j + 1)]);
    }
    TriMesh {
        vertices: verts,
        triangles: tris,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn spheres_are_closed_and_outward() {
        for m in [icosphere(2.0, 3), latlong_sphere(2.0, 20, 40)] {
            let v = m.signed_volume();
            let exact = 4.0 / 3.0 * std::f64::consts::PI * 8.0;
            assert!(v > 0.0 && (v - exact).abs() / exact < 0.03, "volume {v}");
            let nb = crate::panels::edge_neighbours(&m.triangles);
            assert!(
                nb.iter().flatten().all(Option::is_some),
                "every edge matched"
            );
        }
    }
}
