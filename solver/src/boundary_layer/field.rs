//! The surface flow field the streamlines follow: per-panel unit flow
//! direction and speed, vertex speeds for interpolation, in-plane edge
//! normals, the spreading term, and the sharp-edge test.

use nalgebra::{Point3, Vector3};
use tuft_mesh::PanelMesh;

/// Flow quantities per panel, ready for tracing and marching.
#[derive(Debug, Clone)]
pub struct SurfaceField {
    /// Unit flow direction in each panel's plane (zero where the panel has
    /// no tangential velocity).
    pub direction: Vec<Vector3<f64>>,
    /// Tangential speed per panel, m/s.
    pub speed: Vec<f64>,
    /// Area-weighted mean of the speeds of the panels round each vertex.
    pub vertex_speed: Vec<f64>,
    /// Area-weighted mean of the tangential velocities of the panels round
    /// each vertex (the continuous field the streamlines follow).
    pub vertex_velocity: Vec<Vector3<f64>>,
    /// Inward unit normal of each panel edge `k` (from corner `k` to `k+1`)
    /// in the panel's plane.
    pub inward: Vec<[Vector3<f64>; 3]>,
    /// Streamline spreading `(1/h) dh/ds`: surface divergence of the unit
    /// flow direction, 1/m ([`spreading`]).
    pub spreading: Vec<f64>,
}

impl SurfaceField {
    /// Build the field from one velocity per panel (its tangential part is
    /// used).
    ///
    /// # Panics
    /// If `velocity.len() != mesh.len()` (checked by the caller).
    #[track_caller]
    pub fn new(mesh: &PanelMesh, velocity: &[Vector3<f64>]) -> Self {
        assert_eq!(velocity.len(), mesh.len(), "one velocity per panel");
        let tangential: Vec<Vector3<f64>> = mesh
            .panels
            .iter()
            .zip(velocity)
            .map(|(p, v)| v - p.normal.into_inner() * v.dot(&p.normal))
            .collect();
        let speed: Vec<f64> = tangential.iter().map(|v| v.norm()).collect();
        let direction = tangential
            .iter()
            .map(|v| v.try_normalize(1e-300).unwrap_or_else(Vector3::zeros))
            .collect::<Vec<_>>();
        let inward = mesh.panels.iter().map(inward_normals).collect();
        let vertex_velocity = vertex_velocities(mesh, &tangential);
        let spreading = spreading(mesh, &direction);
        Self {
            vertex_speed: vertex_speeds(mesh, &speed),
            vertex_velocity,
            direction,
            speed,
            inward,
            spreading,
        }
    }

    /// Unit flow direction at a point of panel `t`: the vertex velocities
    /// interpolated linearly (barycentric weights), projected onto the
    /// panel's plane. `None` where that vanishes.
    pub fn direction_at(
        &self,
        mesh: &PanelMesh,
        t: usize,
        p: &Point3<f64>,
    ) -> Option<Vector3<f64>> {
        let w = barycentric(mesh, t, p);
        let tri = mesh.triangles[t];
        let v: Vector3<f64> = (0..3)
            .map(|k| self.vertex_velocity[tri[k] as usize] * w[k])
            .sum();
        let n = mesh.panels[t].normal.into_inner();
        (v - n * v.dot(&n)).try_normalize(1e-300)
    }

    /// Speed at a point of panel `t`, interpolated linearly from the vertex
    /// speeds (barycentric weights).
    pub fn speed_at(&self, mesh: &PanelMesh, t: usize, p: &Point3<f64>) -> f64 {
        let w = barycentric(mesh, t, p);
        let tri = mesh.triangles[t];
        (0..3)
            .map(|k| w[k] * self.vertex_speed[tri[k] as usize])
            .sum::<f64>()
            .max(0.0)
    }
}

/// Barycentric weights of `p` (projected on the plane) in panel `t`,
/// clamped to the triangle.
pub fn barycentric(mesh: &PanelMesh, t: usize, p: &Point3<f64>) -> [f64; 3] {
    let panel = &mesh.panels[t];
    let [a, b, c] = panel.vertices;
    let n = panel.normal.into_inner();
    let twice = 2.0 * panel.area;
    let wa = ((c - b).cross(&(p - b))).dot(&n) / twice;
    let wb = ((a - c).cross(&(p - c))).dot(&n) / twice;
    let w = [wa.max(0.0), wb.max(0.0), (1.0 - wa - wb).max(0.0)];
    let sum = w[0] + w[1] + w[2];
    if sum > 0.0 {
        [w[0] / sum, w[1] / sum, w[2] / sum]
    } else {
        [1.0 / 3.0; 3]
    }
}

/// In-plane inward unit normals of the three edges: `n x (v[k+1] - v[k])`
/// for counter-clockwise corners.
fn inward_normals(panel: &tuft_mesh::Panel) -> [Vector3<f64>; 3] {
    std::array::from_fn(|k| {
        let e = panel.vertices[(k + 1) % 3] - panel.vertices[k];
        panel.normal.cross(&e).normalize()
    })
}

/// Area-weighted mean speed of the panels round each vertex.
fn vertex_speeds(mesh: &PanelMesh, speed: &[f64]) -> Vec<f64> {
    mesh.vertex_panels
        .iter()
        .map(|ps| {
            let (sum, area) = ps.iter().fold((0.0, 0.0), |(s, a), &t| {
                let ar = mesh.panels[t as usize].area;
                (s + speed[t as usize] * ar, a + ar)
            });
            if area > 0.0 { sum / area } else { 0.0 }
        })
        .collect()
}

/// Area-weighted mean tangential velocity of the panels round each vertex.
fn vertex_velocities(mesh: &PanelMesh, tangential: &[Vector3<f64>]) -> Vec<Vector3<f64>> {
    mesh.vertex_panels
        .iter()
        .map(|ps| {
            let (sum, area) = ps.iter().fold((Vector3::zeros(), 0.0), |(s, a), &t| {
                let ar = mesh.panels[t as usize].area;
                (s + tangential[t as usize] * ar, a + ar)
            });
            if area > 0.0 {
                sum / area
            } else {
                Vector3::zeros()
            }
        })
        .collect()
}

/// Surface divergence of the unit flow direction `t` per panel, the
/// streamline spreading `(1/h) dh/ds` (Rott & Crabtree 1952: `h` the
/// distance between neighbouring streamlines; on a body of revolution
/// `h = r`, so `(1/h) dh/ds = r'/r`, Mangler).
///
/// Least-squares gradient (e.g. Blazek, *Computational Fluid Dynamics*,
/// 2001, sec. 5.3.4): in the panel's frame `(l, m)`, the directions of the
/// panel and of its vertex neighbourhood, projected onto the plane, are
/// fitted by `t(x) = t0 + G x` over the neighbours' centroid offsets; the
/// divergence is the trace of `G`. The fit is exact for a linear field, so
/// the estimate converges with the panel size on irregular meshes too.
/// Panels without direction, or with too few neighbours for a fit, get zero.
pub fn spreading(mesh: &PanelMesh, direction: &[Vector3<f64>]) -> Vec<f64> {
    (0..mesh.len())
        .map(|t| {
            if direction[t] == Vector3::zeros() {
                return 0.0;
            }
            least_squares_divergence(mesh, direction, t).unwrap_or(0.0)
        })
        .collect()
}

/// The fit of [`spreading`] for panel `t`; `None` when it is singular.
fn least_squares_divergence(mesh: &PanelMesh, direction: &[Vector3<f64>], t: usize) -> Option<f64> {
    let panel = &mesh.panels[t];
    let (l, m, n) = (
        panel.l.into_inner(),
        panel.m.into_inner(),
        panel.normal.into_inner(),
    );
    let mut normal = nalgebra::Matrix3::<f64>::zeros();
    let mut rhs_u = Vector3::zeros();
    let mut rhs_v = Vector3::zeros();
    let own = std::iter::once(t as u32);
    for j in own.chain(mesh.vertex_neighbourhood(t)) {
        let dj = direction[j as usize];
        if dj == Vector3::zeros() {
            continue;
        }
        let d = mesh.panels[j as usize].centroid - panel.centroid;
        let row = Vector3::new(1.0, d.dot(&l), d.dot(&m));
        let tj = dj - n * dj.dot(&n);
        normal += row * row.transpose();
        rhs_u += row * tj.dot(&l);
        rhs_v += row * tj.dot(&m);
    }
    let scale = panel.size * panel.size;
    let conditioned = normal.determinant().abs() > 1e-12 * scale * scale * normal[(0, 0)].powi(3);
    let inverse = normal.try_inverse().filter(|_| conditioned)?;
    let gu = inverse * rhs_u;
    let gv = inverse * rhs_v;
    Some(gu[1] + gv[2])
}

/// Angle (degrees) by which an edge may fall short of the sharp-edge
/// threshold and still count as sharp: far above the rounding of normals
/// computed from single-precision vertices (about 1e-5 degrees), far below
/// any design intent. Without it, an edge of exactly the threshold angle
/// (a 20-degree slant under the default) is sharp on one mesh and not on the
/// next, by rounding.
pub const SHARP_EDGE_TOLERANCE_DEG: f64 = 1e-3;

/// How far panel `b`'s centroid lies above panel `a`'s plane, metres:
/// negative where the surface falls away from `a` onto `b` (a convex
/// edge), positive where it rises (a concave one).
pub fn rise(mesh: &PanelMesh, a: usize, b: usize) -> f64 {
    let (pa, pb) = (&mesh.panels[a], &mesh.panels[b]);
    pa.normal.dot(&(pb.centroid - pa.centroid))
}

/// True when the edge between panels `a` and `b` is sharp and convex: the
/// angle between the normals reaches `sharp_edge_deg` (within
/// [`SHARP_EDGE_TOLERANCE_DEG`]) and the surface turns away (`b`'s centroid
/// lies below `a`'s plane).
pub fn sharp_convex(mesh: &PanelMesh, a: usize, b: usize, sharp_edge_deg: f64) -> bool {
    let (pa, pb) = (&mesh.panels[a], &mesh.panels[b]);
    let convex = rise(mesh, a, b) < 0.0;
    let limit = (sharp_edge_deg - SHARP_EDGE_TOLERANCE_DEG)
        .to_radians()
        .cos();
    convex && pa.normal.dot(&pb.normal) < limit
}
