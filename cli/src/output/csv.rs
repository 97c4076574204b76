//! `panels.csv`: one row per real panel, SI units.
//!
//! Columns: centroid `x,y,z` (m), outward unit normal `nx,ny,nz`, `area`
//! (m^2), `cp`, surface velocity `vx,vy,vz` (m/s), momentum thickness
//! `theta` (m), `shape_factor`, `cf`, `state` (lowercase word) and `risk`
//! (0..1); `theta` and `shape_factor` are empty on separated panels. Numbers are written in Rust's shortest round-trip form, so
//! reading them back gives the same `f64` bit for bit.

use std::io::Write;

use super::{OutputError, SurfaceResult};

/// The header line (without the newline).
pub const HEADER: &str = "x,y,z,nx,ny,nz,area,cp,vx,vy,vz,theta,shape_factor,cf,state,risk";

/// Write the table to `w`.
///
/// # Errors
/// [`OutputError::LengthMismatch`] when a field does not have one value per
/// panel; [`OutputError::Write`] when writing fails.
pub fn write_panels<W: Write>(w: &mut W, s: &SurfaceResult<'_>) -> Result<(), OutputError> {
    s.validate()?;
    writeln!(w, "{HEADER}")?;
    for i in 0..s.len() {
        writeln!(w, "{}", row(s, i))?;
    }
    Ok(())
}

/// One data row.
fn row(s: &SurfaceResult<'_>, i: usize) -> String {
    let p = &s.mesh.panels[i];
    let (c, n, v) = (p.centroid, p.normal, s.velocity[i]);
    let numbers = [
        c.x,
        c.y,
        c.z,
        n.x,
        n.y,
        n.z,
        p.area,
        s.cp[i],
        v.x,
        v.y,
        v.z,
        s.theta_at(i),
        s.shape_factor_at(i),
        s.cf[i],
    ];
    // Adding +0 turns a negative zero (a risk clamped from below) into 0;
    // a value not given (theta and H on a separated panel) is an empty
    // cell.
    let mut out: Vec<String> = numbers
        .iter()
        .map(|v| {
            if v.is_nan() {
                String::new()
            } else {
                (v + 0.0).to_string()
            }
        })
        .collect();
    out.push(s.state[i].as_str().to_owned());
    out.push((s.risk[i] + 0.0).to_string());
    out.join(",")
}

#[cfg(test)]
mod tests {
    #![allow(clippy::unwrap_used, clippy::expect_used)]
    use super::*;
    use crate::output::PanelState;
    use crate::output::fixture::{Fixture, sphere_cp};

    fn parse(text: &str) -> Vec<Vec<String>> {
        text.lines()
            .map(|l| l.split(',').map(str::to_owned).collect())
            .collect()
    }

    #[test]
    fn round_trips_every_value_exactly() {
        let f = Fixture::sphere(2);
        let s = f.surface();
        let mut buf = Vec::new();
        write_panels(&mut buf, &s).unwrap();
        let rows = parse(&String::from_utf8(buf).unwrap());
        assert_eq!(rows[0].join(","), HEADER);
        assert_eq!(rows.len(), 1 + s.len());
        for (i, r) in rows[1..].iter().enumerate() {
            let num = |k: usize| r[k].parse::<f64>().unwrap();
            // Shortest round-trip formatting: parsing gives the same bits.
            assert_eq!(num(7).to_bits(), s.cp[i].to_bits());
            assert_eq!(num(0).to_bits(), s.mesh.panels[i].centroid.x.to_bits());
            assert_eq!(num(9).to_bits(), s.velocity[i].y.to_bits());
            // Theta and H are left empty where the panel is separated.
            if s.state[i] == PanelState::Separated {
                assert_eq!((r[11].as_str(), r[12].as_str()), ("", ""), "row {i}");
            } else {
                assert_eq!(num(11).to_bits(), s.theta[i].to_bits());
                assert_eq!(num(12).to_bits(), s.shape_factor[i].to_bits());
            }
            assert_eq!(r[14], s.state[i].as_str());
            assert_eq!(num(15).to_bits(), s.risk[i].to_bits());
        }
    }

    #[test]
    fn cp_column_is_lambs_sphere() {
        // Lamb, Hydrodynamics, 6th ed., §92: Cp = 1 - 9/4 sin^2 theta at the
        // centroid direction; the CSV carries the field unchanged.
        let f = Fixture::sphere(1);
        let mut buf = Vec::new();
        write_panels(&mut buf, &f.surface()).unwrap();
        let rows = parse(&String::from_utf8(buf).unwrap());
        for r in &rows[1..] {
            let p = tuft_mesh::Point::new(
                r[0].parse().unwrap(),
                r[1].parse().unwrap(),
                r[2].parse().unwrap(),
            );
            let cp: f64 = r[7].parse().unwrap();
            assert!((cp - sphere_cp(&p)).abs() < 1e-15);
        }
    }

    #[test]
    fn wrong_length_is_named() {
        let f = Fixture::sphere(1);
        let mut s = f.surface();
        s.risk = &f.risk[1..];
        let err = write_panels(&mut Vec::new(), &s).unwrap_err();
        assert!(
            matches!(err, OutputError::LengthMismatch { field: "risk", .. }),
            "{err}"
        );
    }
}
