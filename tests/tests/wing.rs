//! Rectangular NACA 0012 wing with the Kutta wake: lift slope against
//! Helmbold's lifting-surface formula, and ground effect.
#![allow(clippy::unwrap_used, clippy::expect_used)]

use std::f64::consts::PI;

use tuft_mesh::generate::{WingParams, wing_with_params};
use tuft_mesh::{Mirrors, PanelMesh, Point};
use tuft_solver::loads::{FlowState, Reference, integrate_loads};
use tuft_solver::potential::Freestream;
use tuft_solver::wake::{WakeParams, solve_potential_with_wake_params};

struct Lift {
    pressure: f64,
    kutta_joukowski: f64,
    edges: usize,
}

fn wing_lift(
    alpha_deg: f64,
    ground: Option<f64>,
    wake_length: f64,
    panels: (usize, usize),
) -> Lift {
    wing_lift_t(alpha_deg, ground, wake_length, panels, 0.12)
}
fn wing_lift_t(
    alpha_deg: f64,
    ground: Option<f64>,
    wake_length: f64,
    panels: (usize, usize),
    t: f64,
) -> Lift {
    wing_lift_ar(alpha_deg, ground, wake_length, panels, t, 6.0)
}
fn wing_lift_ar(
    alpha_deg: f64,
    ground: Option<f64>,
    wake_length: f64,
    panels: (usize, usize),
    t: f64,
    ar: f64,
) -> Lift {
    let w = WingParams {
        span: ar,
        chord: 1.0,
        alpha_deg,
        height: ground.unwrap_or(1.0),
        chord_panels: panels.0,
        span_panels: panels.1,
        thickness: t,
        ..WingParams::default()
    };
    let mesh = wing_with_params(&w).unwrap();
    let mirrors = ground.map_or(Mirrors::none(), |_| Mirrors::ground(0.0));
    let pm = PanelMesh::new(mesh.mesh, mirrors).unwrap();
    let params = WakeParams {
        length: wake_length,
        ..WakeParams::default()
    };
    let sol = solve_potential_with_wake_params(&pm, &Freestream::new(1.0, 0.0), &params).unwrap();
    let r = Reference {
        area: ar,
        length: 1.0,
        moment_point: Point::origin(),
        front_axle_x: 0.0,
        rear_axle_x: 1.0,
    };
    let flow = FlowState {
        density: 1.0,
        speed: 1.0,
        yaw: 0.0,
    };
    let loads = integrate_loads(&pm, &sol.solution.cp, None, &r, &flow).unwrap();
    let kj = sol
        .wake
        .kutta_joukowski_force(&nalgebra::Vector3::x(), 1.0)
        .z
        / (0.5 * ar);
    Lift {
        pressure: loads.total.coefficients.lift,
        kutta_joukowski: kj,
        edges: sol.edges.len(),
    }
}

#[test]
fn explore() {
    for n in [(12, 16), (16, 16), (24, 24)] {
        let t = std::time::Instant::now();
        let l2 = wing_lift(2.0, None, 50.0, n);
        let l6 = wing_lift(6.0, None, 50.0, n);
        let a = (l6.pressure - l2.pressure) / 4f64.to_radians();
        let akj = (l6.kutta_joukowski - l2.kutta_joukowski) / 4f64.to_radians();
        println!(
            "{n:?} edges {} CL2 {:.4} CL6 {:.4} a {a:.4} kj {:.4} {:.4} a_kj {akj:.4} t {:?}",
            l2.edges,
            l2.pressure,
            l6.pressure,
            l2.kutta_joukowski,
            l6.kutta_joukowski,
            t.elapsed()
        );
    }
    let h = 2.0 * PI * 6.0 / (2.0 + (40f64).sqrt());
    println!("helmbold {h}");
}

#[test]
fn explore_cp() {
    let w = WingParams {
        span: 6.0,
        chord: 1.0,
        alpha_deg: 4.0,
        chord_panels: 16,
        span_panels: 16,
        ..WingParams::default()
    };
    let mesh = wing_with_params(&w).unwrap();
    let pm = PanelMesh::new(mesh.mesh, Mirrors::none()).unwrap();
    let sol =
        solve_potential_with_wake_params(&pm, &Freestream::new(1.0, 0.0), &WakeParams::default())
            .unwrap();
    let plain = tuft_solver::potential::post_process(
        &pm,
        sol.solution.mu.clone(),
        &Freestream::new(1.0, 0.0),
        sol.solution.stats,
    );
    for (j, p) in pm.panels.iter().enumerate() {
        if sol.solution.cp[j].abs() > 1.5 {
            println!(
                "x {:.3} z {:.3} nz {:.2} mu {:.4} cp {:.3} cp_plain {:.3}",
                p.centroid.x,
                p.centroid.z,
                p.normal.z,
                sol.solution.mu[j],
                sol.solution.cp[j],
                plain.cp[j]
            );
        }
    }
    println!("{:?}", sol.wake.strength);
}

#[test]
fn explore_t() {
    for (t, n) in [(0.12, (24, 32)), (0.12, (40, 16)), (0.12, (32, 24))] {
        let l2 = wing_lift_t(2.0, None, 50.0, n, t);
        let l6 = wing_lift_t(6.0, None, 50.0, n, t);
        let a = (l6.pressure - l2.pressure) / 4f64.to_radians();
        let akj = (l6.kutta_joukowski - l2.kutta_joukowski) / 4f64.to_radians();
        println!("t {t} {n:?} a {a:.4} a_kj {akj:.4}");
    }
}

#[test]
fn explore_ar() {
    for (ar, t, n) in [(20.0, 0.12, (16, 40)), (20.0, 0.04, (16, 40))] {
        let l2 = wing_lift_ar(2.0, None, 50.0, n, t, ar);
        let l6 = wing_lift_ar(6.0, None, 50.0, n, t, ar);
        let a = (l6.pressure - l2.pressure) / 4f64.to_radians();
        let akj = (l6.kutta_joukowski - l2.kutta_joukowski) / 4f64.to_radians();
        println!("ar {ar} t {t} {n:?} a {a:.4} a_kj {akj:.4}");
    }
}
