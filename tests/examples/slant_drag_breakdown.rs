//! Where the separated-flow loop's drag goes on the slant-back research
//! body: forebody, slant, base and skin friction at each slant angle,
//! beside the total Ahmed, Ramm & Faltin (1984) measured (from memory).
//!
//! `cargo run --release -p tuft-tests --example slant_drag_breakdown [panels]`
//! (triangles on the full body, default 5000; the half model is solved).
#![allow(clippy::unwrap_used, clippy::expect_used)]

use nalgebra::Vector3;
use tuft_solver::boundary_layer::FlowState;
use tuft_solver::loads;
use tuft_solver::potential::Freestream;
use tuft_solver::viscous_loop::{ViscousLoopParams, dead_water_cp, viscous_loop_with_params};

const SPEED: f64 = 40.0;

/// Ahmed, Ramm & Faltin (1984) total drag, from memory.
fn published(slant: f64) -> &'static str {
    match slant {
        0.0 => "0.25",
        12.5 => "0.23",
        25.0 => "0.285",
        30.0 => "0.378",
        35.0 => "0.26",
        _ => "--",
    }
}

fn main() {
    let panels: usize = std::env::args()
        .nth(1)
        .map_or(5000, |s| s.parse().expect("a panel count"));
    println!(
        "slant  passes  forebody  slant  base  friction  total  published  slant separated  attached-slant Cp  dead-water Cp"
    );
    for slant in [0.0, 12.5, 20.0, 25.0, 30.0, 35.0, 40.0] {
        let mesh = tuft_tests::half_ahmed(slant, panels).unwrap();
        let mut params = ViscousLoopParams::default();
        params.layer.flow_direction = Some(Vector3::x());
        let r = viscous_loop_with_params(&mesh, &Freestream::new(SPEED, 0.0), &params).unwrap();
        let last = &r.last;
        let friction = loads::friction_vectors(&last.solution.velocity, &last.layer, SPEED);
        let cp = dead_water_cp(
            &mesh,
            &last.solution.cp,
            &last.layer,
            &friction,
            &Vector3::x(),
        );
        // Drag of each part on the frontal area (the half model's both
        // sides cancel in the ratio): forebody, slant, base, friction.
        let (mut frontal, mut part) = (0.0, [0.0f64; 4]);
        let (mut slant_area, mut dead_area, mut attached_cp) = (0.0, 0.0, 0.0);
        let mut dead_cp = f64::NAN;
        for (t, p) in mesh.panels.iter().enumerate() {
            let n = p.normal;
            frontal += (-n.x).max(0.0) * p.area;
            let is_slant = n.x > 0.05 && n.x < 0.95 && n.z > 0.3;
            let k = if is_slant {
                1
            } else if n.x >= 0.95 {
                2
            } else {
                0
            };
            part[k] -= cp[t] * n.x * p.area;
            part[3] += friction[t].x * p.area;
            let separated = last.layer.panels[t].state == FlowState::Separated;
            if separated {
                dead_cp = cp[t];
            }
            if is_slant {
                slant_area += p.area;
                if separated {
                    dead_area += p.area;
                } else {
                    attached_cp += cp[t] * p.area;
                }
            }
        }
        let cd = part.map(|x| x / frontal);
        println!(
            "{slant:5.1}  {:6}  {:8.3}  {:5.3}  {:4.3}  {:8.3}  {:5.3}  {:>9}  {:15.2}  {:17.3}  {:13.3}",
            r.passes,
            cd[0],
            cd[1],
            cd[2],
            cd[3],
            cd.iter().sum::<f64>(),
            published(slant),
            dead_area / slant_area.max(1e-30),
            attached_cp / (slant_area - dead_area).max(1e-30),
            dead_cp
        );
    }
}
