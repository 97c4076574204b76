//! The attached-flow screening on an Ahmed-type slant-back body over the
//! ground (Ahmed, Ramm & Faltin 1984, SAE 840300; dimensions from memory):
//! the slant's peak shape factor and its mean risk rise steadily with the
//! slant angle, and are stable when the panel count doubles. With the
//! edge window of two boundary-layer thicknesses (the sharp roof-slant
//! edge's mesh-dependent suction peak kept out of the march over a physical
//! length; the default) the peak shape factor holds within 0.03 at every
//! angle; with the window off (the panels beside the edge only) it does not
//! at 20 and 40 degrees, and the test records by how much.
//! The test also records the first slant angle the attached screening calls
//! separated over most of the slant; experiments see full separation above
//! 30 degrees, and an attached-flow screening is known to call it late.
#![allow(clippy::unwrap_used, clippy::expect_used)]

use nalgebra::Vector3;
use tuft_solver::boundary_layer::{BoundaryLayerParams, FlowState, screen_boundary_layer};
use tuft_solver::{Freestream, solve_potential};

struct Slant {
    peak_h: f64,
    mean_risk: f64,
    separated: f64,
}

/// The edge window of the method's module doc, in boundary-layer
/// thicknesses (the setting `edge_window_thicknesses`).
const WINDOW: f64 = 2.0;

/// Peak turbulent H on the slant's attached panels (90th percentile, so
/// one panel does not decide it), the slant's mean risk (separated panels
/// count as 1), and the separated fraction of the slant.
fn slant(slant_deg: f64, panels: usize, window: f64) -> Slant {
    let mesh = tuft_tests::half_ahmed(slant_deg, panels).unwrap();
    let sol = solve_potential(&mesh, &Freestream::new(40.0, 0.0)).unwrap();
    let params = BoundaryLayerParams {
        nu: 1.506e-5,
        flow_direction: Some(Vector3::x()),
        edge_window_thicknesses: window,
        ..BoundaryLayerParams::default()
    };
    let layer = screen_boundary_layer(&mesh, &sol.velocity, 40.0, &params).unwrap();
    let on_slant: Vec<usize> = (0..mesh.len())
        .filter(|&t| {
            let n = mesh.panels[t].normal;
            n.x > 0.05 && n.x < 0.95 && n.z > 0.3
        })
        .collect();
    let turbulent: Vec<f64> = on_slant
        .iter()
        .filter(|&&t| layer.panels[t].state == FlowState::Turbulent)
        .map(|&t| layer.panels[t].h)
        .collect();
    let peak_h = pct(&turbulent, 0.9);
    let risks: Vec<f64> = on_slant.iter().map(|&t| layer.panels[t].risk).collect();
    let mean_risk = risks.iter().sum::<f64>() / risks.len().max(1) as f64;
    let sep = on_slant
        .iter()
        .filter(|&&t| layer.panels[t].state == FlowState::Separated)
        .count();
    Slant {
        peak_h,
        mean_risk,
        separated: sep as f64 / on_slant.len() as f64,
    }
}

/// The `q` quantile of `v` (0 for an empty list).
fn pct(v: &[f64], q: f64) -> f64 {
    let mut s = v.to_vec();
    s.sort_by(f64::total_cmp);
    if s.is_empty() {
        return 0.0;
    }
    s[((s.len() - 1) as f64 * q).round() as usize]
}

/// Slant at 10, 20, 30 and 40 degrees on 4,000 and 8,000 panels: the
/// values at each angle, after checking that peak H and mean risk rise
/// with the angle on both meshes.
fn table(window: f64) -> Vec<(f64, Slant, Slant)> {
    let angles = [10.0, 20.0, 30.0, 40.0];
    let coarse: Vec<Slant> = angles.iter().map(|&a| slant(a, 4000, window)).collect();
    let fine: Vec<Slant> = angles.iter().map(|&a| slant(a, 8000, window)).collect();
    for ((a, c), f) in angles.iter().zip(&coarse).zip(&fine) {
        println!(
            "window {window}, slant {a:>4} deg: peak H {:.3} / {:.3}, mean risk {:.3} / {:.3}, separated {:.0} % / {:.0} % (4,000 / 8,000 panels)",
            c.peak_h,
            f.peak_h,
            c.mean_risk,
            f.mean_risk,
            100.0 * c.separated,
            100.0 * f.separated
        );
    }
    for mesh in [&coarse, &fine] {
        for w in mesh.windows(2) {
            assert!(
                w[1].peak_h > w[0].peak_h,
                "peak H rises with the slant angle"
            );
            assert!(
                w[1].mean_risk > w[0].mean_risk,
                "risk rises with the slant angle"
            );
        }
    }
    angles
        .into_iter()
        .zip(coarse)
        .zip(fine)
        .map(|((a, c), f)| (a, c, f))
        .collect()
}

#[test]
fn slant_risk_rises_with_angle_and_is_stable_under_refinement() {
    // Mesh doubling (the bar): peak H moves by less than 0.03.
    // Peak H, in words: the 90th percentile of the shape factor H over the
    // slant's panels whose boundary layer is attached and turbulent (the
    // high end of what the attached layer reaches on the slant, so that no
    // single panel decides it). Measured with the window (4,000 / 8,000 /
    // 16,000 panels): 1.396 / 1.369 / 1.375 at 10 degrees, 1.410 / 1.414 /
    // 1.416 at 20, 1.618 / 1.618 / 1.620 at 30 and 1.945 / 1.916 / 1.933 at
    // 40 (`refinement_study` below). The margins are thin at 10 degrees
    // (the highest H sits on the panels along the slant's side edges, which
    // the flow crosses from the side wall) and at 40 (most of the slant is
    // separated, and the top tenth of the attached panels is the row just
    // ahead of the separation line, where H climbs steeply to the
    // criterion: with 1.5 or 3 thicknesses instead of 2 it moves by up to
    // 0.09 or 0.15 on a doubling). Marching stations a quarter of a median
    // panel apart instead of a half move it by at most 0.008 at 20 and 30
    // degrees but by 0.07 at 40 (measured), so at 10 and 40 degrees the bar
    // is met within the statistic's own noise. The mean risk moves by at
    // most 0.022 (measured), 0.05 allowed.
    for (a, c, f) in table(WINDOW) {
        let dh = (c.peak_h - f.peak_h).abs();
        assert!(dh < 0.03, "{a} degrees: peak H moves {dh} on doubling");
        let dr = (c.mean_risk - f.mean_risk).abs();
        assert!(dr < 0.05, "{a} degrees: risk moves {dr} on doubling");
    }
}

#[test]
fn without_the_edge_window_peak_h_is_held_to_twice_the_bar_at_20_and_40_degrees() {
    // With the window off (the panels beside the edge only) peak H
    // moves 0.002, 0.031, 0.012 and 0.048 at 10, 20, 30 and 40 degrees
    // (measured): the remnant of the edge's suction peak the march sees
    // changes with the mesh. Held: 0.03 at 10 and 30, 0.06 at 20 and 40.
    // Mean risk 0.053, 0.321, 0.521, 0.743 on 4,000 panels, moving by at
    // most 0.035 (measured), 0.05 allowed.
    for (a, c, f) in table(0.0) {
        let dh = (c.peak_h - f.peak_h).abs();
        let bound = if a == 10.0 || a == 30.0 { 0.03 } else { 0.06 };
        assert!(dh < bound, "{a} degrees: peak H moves {dh} on doubling");
        let dr = (c.mean_risk - f.mean_risk).abs();
        assert!(dr < 0.05, "{a} degrees: risk moves {dr} on doubling");
    }
}

/// The table with the window at 4,000, 8,000 and 16,000 panels (about 30 s in release
/// mode): `cargo test --release -p tuft-tests --test slant_risk --
/// --ignored --nocapture refinement_study`.
#[test]
#[ignore = "refinement study, about 30 s"]
fn refinement_study() {
    for a in [10.0, 20.0, 30.0, 40.0] {
        let row: Vec<String> = [4000, 8000, 16000]
            .iter()
            .map(|&n| {
                let s = slant(a, n, WINDOW);
                format!(
                    "H {:.3} risk {:.3} sep {:.0} %",
                    s.peak_h,
                    s.mean_risk,
                    100.0 * s.separated
                )
            })
            .collect();
        println!(
            "slant {a:>4} deg (4,000 / 8,000 / 16,000 panels): {}",
            row.join(" | ")
        );
    }
}

#[test]
fn records_the_first_angle_called_separated() {
    // Experiments (Ahmed, Ramm & Faltin 1984): fully separated slant above
    // about 30 degrees. Attached potential flow sees too mild a pressure
    // rise there and calls the switch later, at 35-40 degrees (the
    // shortcoming the separated-flow loop answers, tests/separated_wakes.rs;
    // 35 measured here with the default edge window and without it).
    let first = [15.0, 20.0, 25.0, 30.0, 35.0, 40.0, 45.0]
        .into_iter()
        .find(|&a| slant(a, 2000, WINDOW).separated >= 0.5);
    println!(
        "first slant called separated over half its area: {first:?} degrees (experiment: above 30)"
    );
    let first = first.expect("a steep enough slant is called separated");
    assert!(
        first > 30.0 && first <= 40.0,
        "attached-flow screening calls the switch at {first} degrees, expected later than the \
         experiments' 30 and by 40"
    );
}
