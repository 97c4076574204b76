//! Property tests (seeded, 16 cases each): repair is idempotent, coarsening
//! keeps a closed mesh closed, a rigid motion keeps area and volume.
#![allow(clippy::unwrap_used, clippy::expect_used)]

mod common;

use std::f64::consts::PI;

use common::{Lcg, closed, soup};
use proptest::prelude::*;
use proptest::test_runner::{Config, RngSeed};
use tuft_mesh::coarsen::coarsen;
use tuft_mesh::prepare::{PrepareParams, prepare_mesh};
use tuft_mesh::repair::{RepairParams, repair_with_params};
use tuft_mesh::{LengthUnit, Mirrors, RigidTransform, TriMesh, Vector, generate};

fn config() -> Config {
    Config {
        cases: 16,
        rng_seed: RngSeed::Fixed(0x7475_6674),
        failure_persistence: None,
        ..Config::default()
    }
}

/// An ellipsoid with semi-axes `a`, `b`, `c` from a level-`level` icosphere.
fn ellipsoid(level: u32, a: f64, b: f64, c: f64) -> TriMesh {
    let mut m = generate::icosphere(1.0, level);
    m.map_vertices(|p| tuft_mesh::Point::new(a * p.x, b * p.y, c * p.z));
    m
}

/// Damage a closed mesh: a jittered soup, some facets flipped, a few
/// duplicated, a few removed (each leaves a small hole).
fn damaged(level: u32, seed: u64, flip: f64, dups: usize, holes: usize) -> TriMesh {
    let mut rng = Lcg(seed);
    let mut m = soup(&generate::icosphere(1.0, level), 1e-7, &mut rng);
    for t in &mut m.triangles {
        if rng.next_f64() < flip {
            t.swap(1, 2);
        }
    }
    for _ in 0..dups {
        let t = m.triangles[rng.below(m.len())];
        m.triangles.push([t[1], t[0], t[2]]);
    }
    for _ in 0..holes {
        let k = rng.below(m.len());
        m.triangles.swap_remove(k);
    }
    m
}

proptest! {
    #![proptest_config(config())]

    #[test]
    fn repair_twice_changes_nothing(
        level in 1u32..=3,
        seed in any::<u64>(),
        flip in 0.0f64..0.5,
        dups in 0usize..5,
        holes in 0usize..3,
    ) {
        let m = damaged(level, seed, flip, dups, holes);
        // Holes of one or two removed facets on a level-1 sphere reach
        // about 40 % of the diagonal; fill them all.
        let params = RepairParams { hole_fill: 0.6, ..RepairParams::default() };
        let (once, r1) = repair_with_params(m, &Mirrors::none(), &params).unwrap();
        let (twice, r2) = repair_with_params(once.clone(), &Mirrors::none(), &params).unwrap();
        prop_assert!(r1.changes() > 0);
        prop_assert_eq!(r2.changes(), 0, "{:?}", r2);
        prop_assert_eq!(&once, &twice);
        prop_assert!(closed(&once));
    }

    #[test]
    fn coarsening_keeps_a_closed_mesh_closed(
        a in 0.5f64..3.0,
        b in 0.5f64..2.0,
        c in 0.5f64..2.0,
        target in 100usize..1500,
    ) {
        let fine = ellipsoid(4, a, b, c);
        let (coarse, report) = coarsen(&fine, &Mirrors::none(), target);
        prop_assert!(closed(&coarse), "{:?}", report);
        prop_assert!(coarse.len() <= fine.len());
        prop_assert!(report.fallback.is_some() || coarse.len() <= target);
        // Every fine vertex lies within half the smallest semi-axis of the
        // coarse surface: even a cross-section only four panels round
        // deviates by 1 - cos 45 deg = 0.29 of its radius.
        prop_assert!(report.max_deviation < 0.5 * a.min(b).min(c), "{:?}", report);
        prop_assert!(coarse.signed_volume() > 0.0);
    }

    #[test]
    fn rigid_motion_keeps_area_and_volume(
        roll in -180.0f64..180.0,
        pitch in -90.0f64..90.0,
        yaw in -180.0f64..180.0,
        t in proptest::array::uniform3(-10.0f64..10.0),
    ) {
        let sphere = generate::icosphere(1.0, 3);
        let transform = RigidTransform::from_euler_deg(roll, pitch, yaw, Vector::from(t));
        let params = PrepareParams {
            units: LengthUnit::M,
            transform: Some(transform),
            target_panels: Some(usize::MAX),
            ..PrepareParams::default()
        };
        let (panels, report) = prepare_mesh(sphere.clone(), None, &params).unwrap();
        let moved = panels.to_trimesh();
        // Exact invariants up to round-off (1e-12 relative).
        prop_assert!((report.area - sphere.area()).abs() < 1e-12 * sphere.area());
        let v0 = sphere.signed_volume();
        prop_assert!((moved.signed_volume() - v0).abs() < 1e-12 * v0 * (1.0 + Vector::from(t).norm()));
        // And both near the sphere's 4 pi and 4/3 pi (Archimedes): the
        // inscribed level-3 icosphere falls short by under 3 %.
        prop_assert!((report.area - 4.0 * PI).abs() / (4.0 * PI) < 0.03);
        prop_assert!((moved.signed_volume() - 4.0 / 3.0 * PI).abs() / (4.0 / 3.0 * PI) < 0.03);
    }
}
