//! Write one of the generated bodies to a binary STL (coordinates in
//! metres), so cases can be made from them.
//!
//! ```text
//! cargo run --release -p tuft-mesh --example write_stl -- BODY OUT.stl [KEY=VALUE ...]
//! ```
//!
//! Bodies and their keys (all optional):
//! - `sphere`: `radius`, `levels` (icosphere subdivisions)
//! - `ellipsoid`: `a`, `b`, `c`, `panels`
//! - `wing`: `naca` (e.g. 2412), `span`, `chord`, `alpha`, `height`,
//!   `chord_panels`, `span_panels`, `rounded_tips` (true/false)
//! - `ahmed`: `slant`, `clearance`, `panels`, `half` (true/false)
//! - `coupe`: `rear_window`, `windscreen`, `cowl_blend`, `length`, `width`, `height`,
//!   `ride_height`, `bonnet`, `roof`, `deck`, `panels`, `half`
//!
//! Example: `write_stl ahmed ahmed25.stl slant=25 panels=6000 half=true`.

use std::collections::HashMap;
use std::error::Error;

use tuft_mesh::TriMesh;
use tuft_mesh::generate::{self, AhmedParams, CoupeParams, EllipsoidParams, WingParams};

type Options = HashMap<String, String>;

fn main() {
    if let Err(e) = run() {
        eprintln!("write_stl: {e}");
        std::process::exit(1);
    }
}

fn run() -> Result<(), Box<dyn Error>> {
    let args: Vec<String> = std::env::args().skip(1).collect();
    let [body, out, rest @ ..] = args.as_slice() else {
        return Err(
            "usage: write_stl BODY OUT.stl [KEY=VALUE ...] (see the example's docs)".into(),
        );
    };
    let mut opts = Options::new();
    for kv in rest {
        let (k, v) = kv
            .split_once('=')
            .ok_or(format!("option {kv:?} is not KEY=VALUE"))?;
        opts.insert(k.to_string(), v.to_string());
    }
    let mesh = build(body, &mut opts)?;
    if let Some(k) = opts.keys().next() {
        return Err(format!("option {k:?} is not known for {body}").into());
    }
    let mut file = std::fs::File::create(out)?;
    let facets = tuft_mesh::export::stl_facets(&mesh, tuft_mesh::LengthUnit::M);
    stl_io::write_stl(&mut file, facets.iter())?;
    println!(
        "{out}: {} triangles, {} vertices",
        mesh.len(),
        mesh.vertices.len()
    );
    Ok(())
}

/// Take `key` from the options, parsed, or keep `default`.
fn take<T: std::str::FromStr>(opts: &mut Options, key: &str, default: T) -> Result<T, String> {
    match opts.remove(key) {
        None => Ok(default),
        Some(v) => v
            .parse()
            .map_err(|_| format!("option {key}={v} is not a valid value")),
    }
}

fn build(body: &str, o: &mut Options) -> Result<TriMesh, Box<dyn Error>> {
    Ok(match body {
        "sphere" => generate::icosphere(take(o, "radius", 1.0)?, take(o, "levels", 3)?),
        "ellipsoid" => {
            let d = EllipsoidParams::default();
            let (a, b, c) = (take(o, "a", d.a)?, take(o, "b", d.b)?, take(o, "c", d.c)?);
            generate::ellipsoid(a, b, c, take(o, "panels", d.panels)?)?
        }
        "wing" => wing(o)?,
        "ahmed" => {
            let d = AhmedParams::default();
            let p = AhmedParams {
                slant_deg: take(o, "slant", d.slant_deg)?,
                clearance: take(o, "clearance", d.clearance)?,
                panels: take(o, "panels", d.panels)?,
                half: take(o, "half", d.half)?,
                ..d
            };
            generate::ahmed_with_params(&p)?
        }
        "coupe" => coupe(o)?,
        _ => {
            return Err(
                format!("unknown body {body:?}: sphere, ellipsoid, wing, ahmed or coupe").into(),
            );
        }
    })
}

fn wing(o: &mut Options) -> Result<TriMesh, Box<dyn Error>> {
    let d = WingParams::default();
    let naca: String = take(o, "naca", "0012".to_string())?;
    let p = WingParams {
        span: take(o, "span", d.span)?,
        chord: take(o, "chord", d.chord)?,
        alpha_deg: take(o, "alpha", d.alpha_deg)?,
        height: take(o, "height", d.height)?,
        chord_panels: take(o, "chord_panels", d.chord_panels)?,
        span_panels: take(o, "span_panels", d.span_panels)?,
        rounded_tips: take(o, "rounded_tips", d.rounded_tips)?,
        ..d
    };
    let p = p
        .naca(&naca)
        .ok_or(format!("naca={naca} is not four digits"))?;
    Ok(generate::wing_with_params(&p)?.mesh)
}

fn coupe(o: &mut Options) -> Result<TriMesh, Box<dyn Error>> {
    let d = CoupeParams::default();
    let p = CoupeParams {
        rear_window_deg: take(o, "rear_window", d.rear_window_deg)?,
        windscreen_deg: take(o, "windscreen", d.windscreen_deg)?,
        cowl_blend: take(o, "cowl_blend", d.cowl_blend)?,
        length: take(o, "length", d.length)?,
        width: take(o, "width", d.width)?,
        height: take(o, "height", d.height)?,
        ride_height: take(o, "ride_height", d.ride_height)?,
        bonnet_length: take(o, "bonnet", d.bonnet_length)?,
        roof_length: take(o, "roof", d.roof_length)?,
        boot_deck_length: take(o, "deck", d.boot_deck_length)?,
        panels: take(o, "panels", d.panels)?,
        half: take(o, "half", d.half)?,
        ..d
    };
    Ok(generate::coupe_with_params(&p)?)
}
