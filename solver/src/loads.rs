//! Forces and moments from surface pressure and skin friction, the front and
//! rear axle split of the vertical load, and the reference quantities
//! (frontal area, body length) used to make them coefficients.
//!
//! Only the real panels carry load: the image panels that close a body at the
//! ground or symmetry plane are never integrated.
//!
//! Axes: body axes are x downstream (nose at small x), y, z up. The free
//! stream is `U (cos yaw, sin yaw, 0)`. Coefficients are given in the
//! free-stream axes: drag along `e_d = (cos yaw, sin yaw, 0)`, lift along
//! `e_z`, side force along `e_s = e_z x e_d = (-sin yaw, cos yaw, 0)`; the
//! moments about the moment point are roll about `e_d`, pitch about `e_s`
//! (positive nose up: at zero yaw this is `M_y`, which lifts a nose at small
//! x) and yaw about `e_z`.

use tuft_mesh::{PanelMesh, Point, Vector};

use thiserror::Error;

/// Standard gravity, m/s^2 (CGPM 1901; ISO 80000-3), used to quote loads in
/// kilograms-force as the trade does.
pub const STANDARD_GRAVITY: f64 = 9.80665;

/// What can be wrong with the inputs to a load integration.
#[derive(Debug, Error, PartialEq)]
pub enum LoadsError {
    /// The pressure coefficients do not match the panels one to one.
    #[error("{got} pressure coefficients given for {expected} panels")]
    CpLength {
        /// Number of real panels.
        expected: usize,
        /// Number of values given.
        got: usize,
    },
    /// The skin-friction vectors do not match the panels one to one.
    #[error("{got} skin-friction vectors given for {expected} panels")]
    FrictionLength {
        /// Number of real panels.
        expected: usize,
        /// Number of values given.
        got: usize,
    },
    /// A panel's pressure coefficient or friction vector is NaN or infinite.
    #[error("panel {panel} has a pressure or friction value that is not a finite number")]
    NonFinite {
        /// Index of the panel.
        panel: usize,
    },
    /// A reference quantity (area, length, density, speed) is not positive.
    #[error("the reference {what} must be a positive finite number, got {value}")]
    BadReference {
        /// Which quantity.
        what: &'static str,
        /// The value given.
        value: f64,
    },
    /// Front and rear axle at the same x: the split is undefined.
    #[error("front and rear axle are both at x = {x} m: the wheelbase is zero")]
    ZeroWheelbase {
        /// The common axle position.
        x: f64,
    },
}

/// Reference quantities for coefficients and the axle split.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Reference {
    /// Reference area, m^2 (frontal area unless the case gives one).
    pub area: f64,
    /// Reference length for moment coefficients, m (body length unless given).
    pub length: f64,
    /// Point the moments are taken about. Its height is also the height at
    /// which the axle loads act (put it on the ground for the usual split).
    pub moment_point: Point,
    /// x of the front axle, m.
    pub front_axle_x: f64,
    /// x of the rear axle, m.
    pub rear_axle_x: f64,
}

impl Reference {
    /// Defaults from the body: frontal area ([`frontal_area`]), body length
    /// ([`body_length`]), moment point at mid-wheelbase on the ground plane
    /// (or under the lowest point of the body in free air), on `y = 0`.
    pub fn from_mesh(mesh: &PanelMesh, front_axle_x: f64, rear_axle_x: f64) -> Self {
        let (lo, _) = mesh.bounds();
        let z = mesh.mirrors.ground.unwrap_or(lo.z);
        Self {
            area: frontal_area(mesh),
            length: body_length(mesh),
            moment_point: Point::new(0.5 * (front_axle_x + rear_axle_x), 0.0, z),
            front_axle_x,
            rear_axle_x,
        }
    }
}

/// Air and free stream for dimensional loads.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct FlowState {
    /// Air density, kg/m^3.
    pub density: f64,
    /// Free-stream speed, m/s.
    pub speed: f64,
    /// Yaw angle, radians: the free stream is `U (cos yaw, sin yaw, 0)`.
    pub yaw: f64,
}

impl FlowState {
    /// Dynamic pressure `q = rho U^2 / 2`, Pa.
    pub fn dynamic_pressure(&self) -> f64 {
        0.5 * self.density * self.speed * self.speed
    }

    /// Unit vectors of the free-stream axes: drag, side, lift.
    pub fn wind_axes(&self) -> [Vector; 3] {
        let (s, c) = self.yaw.sin_cos();
        [Vector::new(c, s, 0.0), Vector::new(-s, c, 0.0), Vector::z()]
    }
}

/// Force and moment coefficients in the free-stream axes.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct Coefficients {
    /// Drag, along the free stream.
    pub drag: f64,
    /// Side force, across the free stream (`e_z x e_d`).
    pub side: f64,
    /// Lift, +z.
    pub lift: f64,
    /// Rolling moment about the free-stream direction.
    pub roll: f64,
    /// Pitching moment about the side axis (positive nose up).
    pub pitch: f64,
    /// Yawing moment about +z.
    pub yaw: f64,
}

/// One part of the load (pressure, friction or their sum).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct LoadPart {
    /// Force in body axes, N.
    pub force: Vector,
    /// Moment about the reference moment point in body axes, N m.
    pub moment: Vector,
    /// Coefficients in the free-stream axes.
    pub coefficients: Coefficients,
}

/// Vertical load shared between the axles.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct AxleSplit {
    /// Lift on the front axle, N (+ up).
    pub front: f64,
    /// Lift on the rear axle, N (+ up).
    pub rear: f64,
    /// Front lift in kilograms-force (`front / g`).
    pub front_kg: f64,
    /// Rear lift in kilograms-force.
    pub rear_kg: f64,
    /// Front lift coefficient `front / (q A)`.
    pub front_coefficient: f64,
    /// Rear lift coefficient.
    pub rear_coefficient: f64,
}

/// Everything the load integration reports.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Loads {
    /// Dynamic pressure used, Pa.
    pub dynamic_pressure: f64,
    /// Pressure part.
    pub pressure: LoadPart,
    /// Skin-friction part (zero when no friction is given).
    pub friction: LoadPart,
    /// Sum of both.
    pub total: LoadPart,
    /// Total lift (+z), N.
    pub lift: f64,
    /// Total lift in kilograms-force, `L / 9.80665` (trade habit).
    pub lift_kg: f64,
    /// Split of the total vertical load between the axles.
    pub axles: AxleSplit,
}

/// Integrate pressure (and friction, when given) over the real panels.
///
/// The pressure force on panel `j` is `-Cp_j q A_j n_j` (pressure pushes
/// against the outward normal) and the friction force is `q A_j c_f,j`,
/// where `c_f,j` is the skin-friction coefficient times the unit direction
/// of the surface flow. Moments are `(c_j - m) x F_j` about the moment point
/// `m` (Katz & Plotkin 2001, sec. 12.4, panel force summation).
///
/// ```
/// use tuft_mesh::{generate, Mirrors, PanelMesh};
/// use tuft_solver::loads::{integrate_loads, FlowState, Reference};
/// let mesh = PanelMesh::new(generate::icosphere(0.5, 2), Mirrors::none()).unwrap();
/// let reference = Reference::from_mesh(&mesh, -0.3, 0.3);
/// let air = FlowState { density: 1.225, speed: 30.0, yaw: 0.0 };
/// // A uniform pressure on a closed body gives no net force.
/// let cp = vec![0.4; mesh.len()];
/// let loads = integrate_loads(&mesh, &cp, None, &reference, &air).unwrap();
/// assert!(loads.total.coefficients.drag.abs() < 1e-12);
/// assert!((loads.axles.front + loads.axles.rear - loads.lift).abs() < 1e-9);
/// ```
///
/// # Errors
/// [`LoadsError`] when the inputs do not match the mesh, hold non-finite
/// values, or the references are not positive.
pub fn integrate_loads(
    mesh: &PanelMesh,
    cp: &[f64],
    friction: Option<&[Vector]>,
    reference: &Reference,
    flow: &FlowState,
) -> Result<Loads, LoadsError> {
    check_inputs(mesh, cp, friction, reference, flow)?;
    let q = flow.dynamic_pressure();
    let m = reference.moment_point;
    let pressure = sum_forces(mesh, m, |j, p| -cp[j] * q * p.area * p.normal.into_inner());
    let friction = match friction {
        Some(cf) => sum_forces(mesh, m, |j, p| q * p.area * cf[j]),
        None => (Vector::zeros(), Vector::zeros()),
    };
    let total = (pressure.0 + friction.0, pressure.1 + friction.1);
    let part = |(force, moment): (Vector, Vector)| LoadPart {
        force,
        moment,
        coefficients: coefficients(force, moment, q, reference, flow),
    };
    let lift = total.0.z;
    Ok(Loads {
        dynamic_pressure: q,
        pressure: part(pressure),
        friction: part(friction),
        total: part(total),
        lift,
        lift_kg: lift / STANDARD_GRAVITY,
        axles: axle_split(lift, total.1.y, q, reference)?,
    })
}

fn check_inputs(
    mesh: &PanelMesh,
    cp: &[f64],
    friction: Option<&[Vector]>,
    reference: &Reference,
    flow: &FlowState,
) -> Result<(), LoadsError> {
    let expected = mesh.len();
    if cp.len() != expected {
        return Err(LoadsError::CpLength {
            expected,
            got: cp.len(),
        });
    }
    if let Some(cf) = friction {
        if cf.len() != expected {
            return Err(LoadsError::FrictionLength {
                expected,
                got: cf.len(),
            });
        }
        if let Some(panel) = cf.iter().position(|v| !v.iter().all(|c| c.is_finite())) {
            return Err(LoadsError::NonFinite { panel });
        }
    }
    if let Some(panel) = cp.iter().position(|c| !c.is_finite()) {
        return Err(LoadsError::NonFinite { panel });
    }
    for (what, value) in [
        ("area", reference.area),
        ("length", reference.length),
        ("density", flow.density),
        ("speed", flow.speed),
    ] {
        if !(value.is_finite() && value > 0.0) {
            return Err(LoadsError::BadReference { what, value });
        }
    }
    Ok(())
}

/// Sum of the panel forces `f(j, panel)` and of their moments about `m`.
///
/// A half model (symmetry plane `y = 0`) stands for the whole body, so the
/// mirror half's forces are added: each panel force reflected in `y = 0`,
/// acting at the reflected centroid. The ground image is not part of the
/// body and adds nothing.
fn sum_forces(
    mesh: &PanelMesh,
    m: Point,
    f: impl Fn(usize, &tuft_mesh::Panel) -> Vector,
) -> (Vector, Vector) {
    let mirror = Vector::new(1.0, -1.0, 1.0);
    let symmetric = mesh.mirrors.symmetry;
    mesh.panels.iter().enumerate().fold(
        (Vector::zeros(), Vector::zeros()),
        |(mut force, mut moment), (j, p)| {
            let df = f(j, p);
            force += df;
            moment += (p.centroid - m).cross(&df);
            if symmetric {
                let (c, dfi) = (
                    Point::from(p.centroid.coords.component_mul(&mirror)),
                    df.component_mul(&mirror),
                );
                force += dfi;
                moment += (c - m).cross(&dfi);
            }
            (force, moment)
        },
    )
}

/// Body-axis force and moment to free-stream-axis coefficients.
fn coefficients(
    force: Vector,
    moment: Vector,
    q: f64,
    reference: &Reference,
    flow: &FlowState,
) -> Coefficients {
    let [ed, es, ez] = flow.wind_axes();
    let qa = q * reference.area;
    let qal = qa * reference.length;
    Coefficients {
        drag: force.dot(&ed) / qa,
        side: force.dot(&es) / qa,
        lift: force.dot(&ez) / qa,
        roll: moment.dot(&ed) / qal,
        pitch: moment.dot(&es) / qal,
        yaw: moment.dot(&ez) / qal,
    }
}

/// Share the vertical load `lift` between the axles.
///
/// The aerodynamic loads are replaced by two vertical forces `F_f`, `F_r`
/// at the axles (at the height of the moment point `m`, where the tyres
/// also take the horizontal forces, which then have no moment arm) with the
/// same total and the same pitching moment about `m`. A vertical force `F`
/// at `x` has moment `M_y = -(x - x_m) F` about `m` (`r x F`, `r` along x),
/// so
///
/// ```text
/// F_f + F_r = L,   -(x_f - x_m) F_f - (x_r - x_m) F_r = M_y
/// =>  F_f = (M_y + (x_r - x_m) L) / (x_r - x_f),   F_r = L - F_f.
/// ```
///
/// With the centre of pressure `x_cp = x_m - M_y / L` this is the lever
/// rule `F_f = L (x_r - x_cp) / (x_r - x_f)`, `F_r = L (x_cp - x_f) / (x_r - x_f)`
/// (statics of a beam on two supports).
///
/// # Errors
/// [`LoadsError::ZeroWheelbase`] when both axles are at the same x.
pub fn axle_split(
    lift: f64,
    pitch_moment_y: f64,
    dynamic_pressure: f64,
    reference: &Reference,
) -> Result<AxleSplit, LoadsError> {
    let (xf, xr) = (reference.front_axle_x, reference.rear_axle_x);
    let wheelbase = xr - xf;
    let big_enough = wheelbase.abs() > 1e-12 * (xf.abs() + xr.abs() + 1.0);
    if !big_enough {
        return Err(LoadsError::ZeroWheelbase { x: xf });
    }
    let xm = reference.moment_point.x;
    let front = (pitch_moment_y + (xr - xm) * lift) / wheelbase;
    let rear = lift - front;
    let qa = dynamic_pressure * reference.area;
    Ok(AxleSplit {
        front,
        rear,
        front_kg: front / STANDARD_GRAVITY,
        rear_kg: rear / STANDARD_GRAVITY,
        front_coefficient: front / qa,
        rear_coefficient: rear / qa,
    })
}

/// Frontal area: the projection of the body on the y-z plane (its
/// silhouette seen along the stream), m^2.
///
/// The real panels are projected onto a raster of [`FRONTAL_PIXELS`]
/// pixels along the larger of the body's width and height, and the pixels
/// whose centre any projected panel covers are counted. Unlike the sum
/// `sum |n_x| A / 2` (Cauchy's projection formula, exact when every line
/// along x crosses the surface twice), this counts a part hidden behind
/// another once (a wheel behind the bumper, a spoiler behind the roof) and
/// is not raised by small-scale roughness of a scanned or wrapped surface.
/// A body cut by the ground plane is measured above it (its image is not
/// frontal area); a half model gives half the silhouette, so it is doubled.
/// The raster's error is about the silhouette's perimeter times a pixel
/// and mostly cancels along it.
pub fn frontal_area(mesh: &PanelMesh) -> f64 {
    let (mut lo, hi) = mesh.bounds();
    // The whole body's width, so that a half model is rastered as finely as
    // the whole, on a lattice symmetric about y = 0.
    let width = if mesh.mirrors.symmetry {
        2.0 * hi.y
    } else {
        hi.y - lo.y
    };
    let px = width.max(hi.z - lo.z) / FRONTAL_PIXELS as f64;
    if !(px.is_finite() && px > 0.0) {
        return 0.0;
    }
    lo.y = (lo.y / px).floor() * px;
    let ny = ((hi.y - lo.y) / px).ceil() as usize + 1;
    let nz = ((hi.z - lo.z) / px).ceil() as usize + 1;
    let mut covered = vec![false; ny * nz];
    for t in &mesh.triangles {
        let p = t.map(|v| {
            let q = mesh.vertices[v as usize];
            [(q.y - lo.y) / px, (q.z - lo.z) / px]
        });
        let cross = |a: [f64; 2], b: [f64; 2], c: [f64; 2]| {
            (b[0] - a[0]) * (c[1] - a[1]) - (b[1] - a[1]) * (c[0] - a[0])
        };
        let turn = cross(p[0], p[1], p[2]);
        if turn == 0.0 {
            continue;
        }
        let lo_u = p.iter().map(|q| q[0]).fold(f64::INFINITY, f64::min);
        let hi_u = p.iter().map(|q| q[0]).fold(f64::NEG_INFINITY, f64::max);
        let lo_v = p.iter().map(|q| q[1]).fold(f64::INFINITY, f64::min);
        let hi_v = p.iter().map(|q| q[1]).fold(f64::NEG_INFINITY, f64::max);
        // Pixel centres sit at (i + 1/2, j + 1/2).
        let span = |lo: f64, hi: f64, n: usize| {
            let a = (lo - 0.5).ceil().max(0.0);
            let b = (hi - 0.5).floor().min((n - 1) as f64);
            (a <= b).then_some((a as usize, b as usize))
        };
        let (Some((i0, i1)), Some((j0, j1))) = (span(lo_u, hi_u, ny), span(lo_v, hi_v, nz)) else {
            continue;
        };
        for i in i0..=i1 {
            for j in j0..=j1 {
                let c = [i as f64 + 0.5, j as f64 + 0.5];
                let inside = [(0, 1), (1, 2), (2, 0)]
                    .iter()
                    .all(|&(a, b)| cross(p[a], p[b], c) * turn >= 0.0);
                if inside {
                    covered[i * nz + j] = true;
                }
            }
        }
    }
    let area = covered.iter().filter(|&&c| c).count() as f64 * px * px;
    if mesh.mirrors.symmetry {
        2.0 * area
    } else {
        area
    }
}

/// Pixels of the frontal-area raster along the body's larger side (about
/// 1 mm on a car).
pub const FRONTAL_PIXELS: usize = 2048;

/// Body length: the extent of the real vertices along x, m.
pub fn body_length(mesh: &PanelMesh) -> f64 {
    let (lo, hi) = mesh.bounds();
    hi.x - lo.x
}

/// Skin-friction vectors on the free-stream dynamic pressure:
/// `c_f (|V_e| / U)^2` along the local flow direction, zero where
/// separated (the boundary layer's `c_f` is zero there). Pass them to
/// [`integrate_loads`] as its friction.
pub fn friction_vectors(
    velocity: &[Vector],
    layer: &crate::boundary_layer::BoundaryLayer,
    speed: f64,
) -> Vec<Vector> {
    velocity
        .iter()
        .zip(&layer.panels)
        .map(|(v, l)| {
            let ratio2 = v.norm_squared() / (speed * speed);
            v.try_normalize(1e-12)
                .map_or(Vector::zeros(), |d| d * l.cf * ratio2)
        })
        .collect()
}
