//! The comparison's pictures and page: the Cp difference and the change in
//! separation drawn on B's body in the run report's five views, and a
//! self-contained `compare.html`.

use anyhow::{Context, Result};
use tuft_mesh::PanelMesh;

use super::mapping::Mapping;
use super::{Comparison, PanelFields, ResultFolder, mapped_fields};
use crate::outdir::Staging;
use crate::output::colorbar::{ColourScale, Swatch};
use crate::output::html::{self, NumberRow, Picture, Report, TextSection};
use crate::output::render::PanelPaint;
use crate::output::render::View;
use crate::output::sheet::{
    FieldStyle, NO_VALUE, SheetParams, close_up_layout, field_sheet, field_sheet_in,
};
use crate::output::{self, Caption, PanelState};

/// Stripes where separation appears in B (dark red on light red).
const APPEARS: (output::canvas::Rgb, output::canvas::Rgb) = ([150, 20, 30], [240, 150, 150]);
/// Stripes where separation disappears in B (dark blue on light blue).
const DISAPPEARS: (output::canvas::Rgb, output::canvas::Rgb) = ([20, 60, 150], [150, 190, 240]);
/// Stripes where both runs separate.
const BOTH: (output::canvas::Rgb, output::canvas::Rgb) = ([40, 40, 46], [150, 150, 158]);
/// A part B adds, where A had no surface ([`super::MappedFields::new_in_b`]): no
/// difference to draw there (a review's new wing had been coloured with
/// the deck's Cp from 200 mm below set against its own). Sand, apart
/// from the greys of "not resolved" and "separates in both".
const NEW_IN_B: output::canvas::Rgb = [222, 206, 150];

/// Named regions' outlines on the separation-change sheet: in a colour
/// none of its stripes use, over a white halo.
const SEPARATION_OUTLINE: output::outline::OutlineStyle = output::outline::OutlineStyle {
    colour: output::outline::OUTLINE_ON_STRIPES,
    halo: true,
};

/// The changed shape's outline on the Cp difference sheet: near-black
/// over a white halo, apart from the regions' blue and the colour scale's
/// red and blue.
const CHANGED_OUTLINE: output::outline::OutlineStyle = output::outline::OutlineStyle {
    colour: [25, 25, 25],
    halo: true,
};

/// Largest share of B's surface outlined as changed: beyond it the two
/// bodies differ nearly everywhere (another car, or one moved), and an
/// outline round most of the body says nothing (our choice).
const CHANGED_OUTLINE_SHARE: f64 = 0.5;

/// A changed shape whose extent (along x, across y on its own side, up z)
/// stays under this share of the body's length gets a close-up sheet
/// ([`close_up`]): on the five whole-body views a mirror head or a
/// spoiler's lip is a few pixels (two reviews; our choice).
const CLOSE_UP_SHARE: f64 = 0.35;

/// Room round the changed shape in a close-up, on each side: its extent
/// along that axis times this, but no less than [`CLOSE_UP_ROOM_SHARE`]
/// of the body's length.
const CLOSE_UP_ROOM: f64 = 0.6;

/// The least room round the changed shape in a close-up, as a share of
/// the body's length: 0.225 m on a 4.5 m car (it had been 0.25 m on any
/// body, a quarter of the slant-back research body's length, whose
/// close-ups then showed it at the overview's scale).
const CLOSE_UP_ROOM_SHARE: f64 = 0.05;

/// How far a close-up reaches past the body's bounds at most, metres.
const CLOSE_UP_BEYOND_M: f64 = 0.1;

/// The box (with room round it on each axis, [`CLOSE_UP_ROOM`]) and views of a
/// close-up of the changed panels `member` (over B's display triangles,
/// images after the real panels, which are left out), or `None` where
/// the change is not compact ([`CLOSE_UP_SHARE`]) or there is none. Of a
/// change on both sides (two mirror heads) the side the sheet's side view
/// looks at is framed (y <= 0 from -y; a half model's images stand for
/// it there). The views: the side view of the sheet, from
/// above or from underneath as the changed panels face, and from the
/// front or the rear as the change lies in the front or rear half of the
/// body.
fn close_up(
    mesh_b: &PanelMesh,
    member: &[bool],
    yaw_deg: f64,
) -> Option<((tuft_mesh::Point, tuft_mesh::Point), Vec<View>)> {
    let all: Vec<&tuft_mesh::panels::Panel> = mesh_b
        .panels
        .iter()
        .zip(member)
        .filter(|(_, m)| **m)
        .map(|(p, _)| p)
        .collect();
    let side = View::sheet(yaw_deg)[0];
    let seen = |y: f64| {
        if side == View::Side {
            y <= 0.0
        } else {
            y >= 0.0
        }
    };
    let near: Vec<&tuft_mesh::panels::Panel> =
        all.iter().copied().filter(|p| seen(p.centroid.y)).collect();
    let changed = if near.is_empty() { all } else { near };
    let first = changed.first()?;
    let (mut lo, mut hi) = (first.centroid, first.centroid);
    let mut facing_down = 0.0;
    for p in &changed {
        for v in &p.vertices {
            lo = lo.inf(v);
            hi = hi.sup(v);
        }
        facing_down -= p.area * p.normal.z;
    }
    let (blo, bhi) = mesh_b.bounds();
    let length = bhi.x - blo.x;
    let extent = (hi - lo).max();
    if extent >= CLOSE_UP_SHARE * length {
        return None;
    }
    // Room on each axis by the change's own extent along it: a change
    // long and low (a tailgate, a deck) given its length's room up and
    // down as well had filled its side view no larger than the whole
    // body's (a review measured the scale bar at 112 px against 115).
    let pad = (hi - lo).map(|e| (CLOSE_UP_ROOM * e).max(CLOSE_UP_ROOM_SHARE * length));
    // Nor room beyond the body's own ends, where there is nothing to see
    // (a tailgate's close-up had as much empty space behind the tail).
    let margin = tuft_mesh::Vector::repeat(CLOSE_UP_BEYOND_M);
    let (lo, hi) = (
        (lo - pad).sup(&(blo - margin)),
        (hi + pad).inf(&(bhi + margin)),
    );
    let plan = if facing_down > 0.0 {
        View::Underneath
    } else {
        View::Top
    };
    let end = if 0.5 * (lo.x + hi.x) > 0.5 * (blo.x + bhi.x) {
        View::Rear
    } else {
        View::Front
    };
    Some(((lo, hi), vec![side, plan, end]))
}

/// A close-up sheet to draw: its file, field style, paint and what it
/// shows in words.
type CloseUpSheet<'a> = (
    &'static str,
    &'a FieldStyle,
    &'a dyn Fn(usize) -> PanelPaint,
    &'static str,
);

/// Share of B's surface outlined as changed, or `None` when none is or
/// too much is ([`CHANGED_OUTLINE_SHARE`]).
fn outlined_share(u: &super::SurfaceDeltas, area_m2: f64) -> Option<f64> {
    let share = u.changed_m2 / area_m2;
    (share > 0.0 && share <= CHANGED_OUTLINE_SHARE).then_some(share)
}

/// B's changed panels ([`super::changed_panels`], beyond `near` of A's
/// surface) as a mark on its display triangles (the mirror images of a
/// half model's after its own). A lone changed panel among unchanged ones
/// is the two panellings' difference at an edge, not a change of shape (a
/// review saw a few outlined at an unchanged roof edge): it is left out as
/// the surface deltas leave it out ([`super::clustered`], within `reach`
/// metres of another).
fn changed_mark(
    mesh_b: &PanelMesh,
    mapping: &Mapping,
    (near, reach): (f64, f64),
) -> output::outline::RegionMark {
    let centroids: Vec<nalgebra::Point3<f64>> = mesh_b.panels.iter().map(|p| p.centroid).collect();
    let changed = super::clustered(
        &super::changed_panels(mapping, mesh_b.len(), near),
        &centroids,
        reach,
    );
    let images = if mesh_b.mirrors.symmetry {
        changed.clone()
    } else {
        Vec::new()
    };
    output::outline::RegionMark {
        name: "changed shape".into(),
        member: changed.into_iter().chain(images).collect(),
    }
}

/// Write the sheets and `compare.html` into the staging folder.
pub fn write(
    out: &Staging,
    a: &ResultFolder,
    b: &ResultFolder,
    mesh_b: &PanelMesh,
    mapping: &Mapping,
    cmp: &Comparison,
) -> Result<()> {
    let owned = PanelFields::new(b);
    let surface = owned.surface(mesh_b);
    let f = mapped_fields(a, b, mapping);
    let caption = Caption {
        case: format!("{} minus {}", b.summary.case_name, a.summary.case_name),
        speed_ms: cmp.b.speed,
        yaw_deg: super::yaw_of(&b.summary),
    };
    let outlined = outlined_share(&cmp.surface, b.halves() * mesh_b.area()).is_some();
    let is_new = |i: usize| f.new_in_b.get(i).copied().unwrap_or(false);
    let new_swatch = || {
        f.new_in_b
            .iter()
            .any(|&n| n)
            .then(|| ("added in B".to_string(), Swatch::Solid(NEW_IN_B)))
    };
    // The scale from the panels A and B both have.
    let shared_cp: Vec<f64> = f
        .delta_cp
        .iter()
        .enumerate()
        .filter(|&(i, _)| !is_new(i))
        .map(|(_, &d)| d)
        .collect();
    let cp_style = FieldStyle {
        scale: ColourScale::diverging("\u{394}Cp [-]", &shared_cp, 0.02),
        legend: new_swatch().into_iter().collect(),
        what: "Cp difference".into(),
        note: delta_cp_note(&cmp.surface, outlined),
    };
    let cp_paint = |i: usize| {
        if is_new(i) {
            return PanelPaint::Solid(NEW_IN_B);
        }
        PanelPaint::Solid(cp_style.scale.colour(f.delta_cp[i]).unwrap_or(NO_VALUE))
    };
    let mut dcp = field_sheet(&surface, &cp_style, &caption, &cp_paint)?;
    let sep_style = FieldStyle {
        scale: ColourScale::diverging("\u{394} risk [-]", &f.delta_risk, 0.1),
        legend: vec![
            (
                "separates in B only".into(),
                Swatch::Hatched(APPEARS.0, APPEARS.1),
            ),
            (
                "separates in A only".into(),
                Swatch::Hatched(DISAPPEARS.0, DISAPPEARS.1),
            ),
            ("separates in both".into(), Swatch::Hatched(BOTH.0, BOTH.1)),
        ]
        .into_iter()
        .chain(
            f.delta_risk
                .iter()
                .any(|r| r.is_nan())
                .then(|| ("not resolved".into(), Swatch::Solid(NO_VALUE))),
        )
        .chain(new_swatch())
        .collect(),
        what: "Separation change".into(),
        note: separation_change_note(&cmp.surface, outlined),
    };
    let sep_a = |i: usize| f.state_a[i] == PanelState::Separated;
    let sep_paint = |i: usize| {
        if is_new(i) {
            return PanelPaint::Solid(NEW_IN_B);
        }
        let sep_b = owned.state()[i] == PanelState::Separated;
        match (sep_a(i), sep_b) {
            (false, true) => PanelPaint::Hatched(APPEARS.0, APPEARS.1),
            (true, false) => PanelPaint::Hatched(DISAPPEARS.0, DISAPPEARS.1),
            (true, true) => PanelPaint::Hatched(BOTH.0, BOTH.1),
            (false, false) => {
                PanelPaint::Solid(sep_style.scale.colour(f.delta_risk[i]).unwrap_or(NO_VALUE))
            }
        }
    };
    let mut dsep = field_sheet(&surface, &sep_style, &caption, &sep_paint)?;
    // Where the shape changed, outlined first (unnamed: the note says
    // what the line is), then B's named regions as on its own pictures.
    // The changed panels are found (with their neighbours) only when
    // they are outlined.
    let mark = outlined.then(|| {
        changed_mark(
            mesh_b,
            mapping,
            (
                cmp.surface.margins_m[1],
                super::LONE_REACH_EDGES * cmp.surface.panel_edge_m,
            ),
        )
    });
    // On both sheets, as both notes say (a review found the separation
    // sheet's promised outline missing).
    if let Some(mark) = &mark {
        for sheet in [&mut dcp, &mut dsep] {
            output::outline::draw_outlines_unnamed(
                sheet,
                mesh_b,
                std::slice::from_ref(mark),
                CHANGED_OUTLINE,
                caption.yaw_deg,
            );
        }
    }
    // A compact change seen close up, on both fields, outlined there too.
    let mut close_ups = Vec::new();
    if let Some((mark, (bounds, views))) = mark
        .as_ref()
        .and_then(|m| Some((m, close_up(mesh_b, &m.member, caption.yaw_deg)?)))
    {
        let layout = close_up_layout(&views, bounds, &SheetParams::default());
        let on = output::outline::RegionViews {
            views: &layout.views,
            named: |_| false,
            flow_corner: true,
            scale_bar: true,
        };
        let sheets: [CloseUpSheet<'_>; 2] = [
            (
                "delta-cp-close-up.png",
                &cp_style,
                &cp_paint,
                "Cp of B minus Cp of A",
            ),
            (
                "separation-change-close-up.png",
                &sep_style,
                &sep_paint,
                "Where separation appears or disappears",
            ),
        ];
        for (name, style, paint, what) in sheets {
            let close = FieldStyle {
                what: format!("{}, close-up", style.what),
                ..style.clone()
            };
            let mut img = field_sheet_in(&surface, &close, &caption, &layout, paint)?;
            output::outline::draw_regions_in(
                &mut img,
                mesh_b,
                std::slice::from_ref(mark),
                CHANGED_OUTLINE,
                &on,
            );
            close_ups.push((
                name,
                Picture {
                    title: format!(
                        "{what}, close-up of the changed shape (outlined in black): {}",
                        output::and_list(
                            &layout
                                .views
                                .iter()
                                .map(|(v, _)| v.label_at(caption.yaw_deg))
                                .collect::<Vec<_>>()
                        )
                    ),
                    png: img.to_png()?,
                },
            ));
        }
    }
    let marks = crate::region::marks(&b.regions(), mesh_b);
    output::outline::draw_regions(&mut dcp, mesh_b, &marks, caption.yaw_deg);
    // Not in the legend's blue: along the base edge the outline ran into
    // the "separates in A only" stripes.
    output::outline::draw_regions_styled(
        &mut dsep,
        mesh_b,
        &marks,
        SEPARATION_OUTLINE,
        caption.yaw_deg,
    );
    let pictures = vec![
        (
            "delta-cp.png",
            Picture {
                title: format!(
                    "Cp of B minus Cp of A, on B's body{}: side, top, underneath, front and rear",
                    if outlined {
                        " (the changed shape outlined in black)"
                    } else {
                        ""
                    }
                ),
                png: dcp.to_png()?,
            },
        ),
        (
            "separation-change.png",
            Picture {
                title: "Where separation appears or disappears, on B's body".into(),
                png: dsep.to_png()?,
            },
        ),
    ];
    let mut pictures = pictures;
    pictures.extend(close_ups);
    for (name, p) in &pictures {
        std::fs::write(out.file(name), &p.png).with_context(|| name.to_string())?;
    }
    let report = page(cmp, caption, pictures.into_iter().map(|p| p.1).collect());
    output::write_file(&out.file("compare.html"), |w| {
        html::write_report(w, &report)
    })?;
    Ok(())
}

/// The Cp difference sheet's note: what the colours mean and, where much
/// of the shape did not change, how far Cp moved there, to the table's
/// three decimals (a review read 0.08 here beside the table's 0.085).
fn delta_cp_note(u: &super::SurfaceDeltas, outlined: bool) -> String {
    let mut note =
        "Cp of B minus Cp of A (mapped onto B's body). Red: higher pressure in B; blue: more suction in B."
            .to_owned();
    if outlined {
        note += &format!(" {}.", outline_words(u));
    }
    if u.unchanged_share >= 0.2 {
        note += &format!(
            " Where the shape did not change, 95 % stays under {:.3}; spots at sharp edges are panel noise.",
            u.unchanged_delta_cp_p95
        );
    }
    note
}

/// What the black outline on the comparison sheets marks, for their notes.
fn outline_words(u: &super::SurfaceDeltas) -> String {
    format!(
        "Black outline: where B's shape lies more than {} from A's",
        super::mm(u.margins_m[1])
    )
}

/// The separation-change sheet's note: what the stripes and colours mean
/// and, with the changed shape outlined, that a change of risk far from the
/// outline is more likely the two panellings' than the shape's (a review's
/// roof spoiler read risk changes of 0.3 at the windscreen's foot, 2 m
/// ahead of it, which the delta-Cp sheet's note called noise and this one
/// did not).
fn separation_change_note(u: &super::SurfaceDeltas, outlined: bool) -> String {
    let mut note =
        "Where separation appears (red stripes) or disappears (blue stripes) in B; colour: \
                    risk of B minus risk of A."
            .to_owned();
    if outlined {
        note += &format!(
            " {}; far from it, a change is more likely the two panellings' than the shape's.",
            outline_words(u)
        );
    }
    note
}

/// The comparison page.
fn page(c: &Comparison, caption: Caption, pictures: Vec<Picture>) -> Report {
    let d = &c.deltas;
    let s = &c.surface;
    // Across speeds the force differences take A's at B's dynamic
    // pressure, and say so.
    let scaled = d.a_loads_scaled_by.is_some();
    let at = if scaled {
        format!(
            "kg at {} m/s (A's at B's dynamic pressure)",
            output::speed_number(c.b.speed)
        )
    } else {
        format!("kg at {} m/s", output::speed_number(c.b.speed))
    };
    let force_unit = if scaled {
        "N (A's at B's dynamic pressure)"
    } else {
        "N"
    };
    let drag_label = if c.drag.common_area_m2.is_some() {
        "Drag difference (drag area C_D·A, in A's reference area)"
    } else {
        "Drag difference"
    };
    let signed = |v: f64| output::signed(v, 1);
    let [lift, front, rear] = output::kg_set_signed([d.lift_kg, d.front_axle_kg, d.rear_axle_kg]);
    let mut numbers = vec![
        NumberRow::text(
            "Drag C_D, A and B",
            &format!("{:.3} and {:.3}", c.a.cd, c.b.cd),
            "-",
        ),
        NumberRow::text(drag_label, &signed(d.drag_counts), "counts"),
        NumberRow::text(
            "Drag difference at the band ends (low, high)",
            &format!(
                "{} and {}",
                signed(c.drag.band_deltas_counts[0]),
                signed(c.drag.band_deltas_counts[1])
            ),
            "counts",
        ),
        NumberRow::text(
            "  of which pressure",
            &signed(d.drag_pressure_counts),
            "counts",
        ),
        NumberRow::text(
            "  of which friction",
            &signed(d.drag_friction_counts),
            "counts",
        ),
        NumberRow::text("Drag force difference", &signed(d.drag_force_n), force_unit),
        NumberRow::text(
            "Lift difference, whole body (negative: more downforce in B)",
            &lift,
            &at,
        ),
        NumberRow::text("Lift difference, front axle", &front, &at),
        NumberRow::text("Lift difference, rear axle", &rear, &at),
        NumberRow::text(
            "Lift noise (two runs of imperceptibly different shapes differ by up to this much)",
            &crate::output::kg_set([d.lift_noise_kg])[0],
            &at,
        ),
        NumberRow::text(
            "Lift difference against the noise",
            &crate::compare::lift_noise_words(d),
            "",
        ),
        NumberRow::text(
            "Lift coefficient difference",
            &output::signed(d.lift_coefficient, 3),
            "-",
        ),
        NumberRow::text(
            "Separated area difference",
            &output::signed(d.separated_area_m2, 3),
            "m²",
        ),
        NumberRow::text(
            "Separated share of the surface, B's minus A's",
            &output::signed(d.separated_percent_points, 2),
            "% points",
        ),
        NumberRow::fixed("Separation appears in B", s.separation_appears_m2, 3, "m²"),
        NumberRow::fixed(
            "Separation disappears in B",
            s.separation_disappears_m2,
            3,
            "m²",
        ),
        NumberRow::text(
            "A's separated area as carried onto B's panels (appears minus disappears is B's separated \
             area less this, not the separated area difference above, which takes each run on its own \
             panels; A's on its own in brackets)",
            &format!(
                "{:.3} ({:.3})",
                super::a_separated_on_b(s),
                c.a.separated_area_m2
            ),
            "m²",
        ),
        NumberRow::fixed("RMS Cp difference (area-weighted)", s.delta_cp_rms, 3, "-"),
        NumberRow::text(
            "Unchanged surface (B's panels within 0.1 % of the length of A's surface)",
            &format!("{:.0}", 100.0 * s.unchanged_share),
            "% of B",
        ),
        NumberRow::fixed(
            "Unchanged surface: |Cp difference| that 95 % of it stays under",
            s.unchanged_delta_cp_p95,
            3,
            "-",
        ),
        NumberRow::text(
            "Unchanged surface: the part of the drag difference arising there",
            &output::signed(s.unchanged_drag_counts, 1),
            "counts",
        ),
        NumberRow::text(
            "Unchanged surface: the part of the lift difference arising there",
            &output::signed(
                s.unchanged_lift_kg,
                output::kg_places(&[s.unchanged_lift_kg]),
            ),
            &at,
        ),
        NumberRow::fixed(
            "Largest distance from B's panels to A's surface",
            s.max_distance_m,
            3,
            "m",
        ),
        NumberRow::text(
            "Panels, A and B",
            &format!("{} and {}", c.a.panels, c.b.panels),
            "-",
        ),
    ];
    for (name, noise) in [("A", &c.a.panel_noise), ("B", &c.b.panel_noise)] {
        if let Some(n) = noise {
            numbers.push(NumberRow::text(
                &format!("Panel noise of {name} (its numbers' spread over three panel counts)"),
                &n.words(true),
                "-",
            ));
        }
    }
    for r in &c.regions {
        numbers.push(NumberRow::text(
            &format!("Region \"{}\"", r.name),
            &super::region_text(r),
            "-",
        ));
    }
    let method = TextSection {
        title: "How to read this".into(),
        body: format!(
            "A is {} ({}), B is {} ({}); every difference is B minus A. A's surface values are carried \
             onto B's panels from the nearest point of A's surface among panels facing the same way, \
             corrected to first order by the gradient over the neighbouring panels (never beyond their \
             values), so the pictures are drawn on B's body.\n\n\
             A drag difference is called one only when it is at least {} counts (differences of a few counts \
             are within the noise of any simulation, common practice; the floor is measured on the built-in \
             coupe, and raised where a run measured a larger panel noise of its own with tuft run --noise) \
             and keeps its sign at both ends of \
             the two runs' sensitivity bands. The differences at the band ends compare each run's low \
             end with the other's low end and high with high; they are not a range of the difference, and \
             the central difference need not lie between them, since each band sits unevenly about its \
             estimate (the verdict is at the top of this page).\n\n\
             A change anywhere moves the pressure everywhere (the flow round the whole body answers it, \
             the underbody's most), so the surface that did not change also shows differences and carries \
             part of the drag and lift differences (the table gives how much); panels that differ from \
             their neighbours at sharp edges and corners far from the change are panel noise, not design.",
            c.a.case_name,
            c.a.folder,
            c.b.case_name,
            c.b.folder,
            crate::output::fixed(c.drag.noise_counts, 0),
        ),
    };
    Report {
        caption,
        summary: format!("{}.", output::sentence(&c.drag.text)),
        numbers,
        warnings: c.notes.clone(),
        notes_pointer: None,
        pictures,
        sections: vec![method],
        cautions: vec![],
        generator: c.tool.clone(),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A compact change is framed with room round it, on the side the
    /// side view looks at (y <= 0 at zero yaw), in the side view, from
    /// above (it faces up) and from the rear (it lies in the rear half);
    /// one along the whole body is not.
    #[test]
    fn a_compact_change_is_framed_close_up() {
        let body = tuft_mesh::generate::ahmed(25.0, 2000).unwrap();
        let mesh = PanelMesh::new(body, tuft_mesh::Mirrors::none()).unwrap();
        let (lo, hi) = mesh.bounds();
        let length = hi.x - lo.x;
        // The slant's panels near its top edge: facing up, at the tail.
        let member: Vec<bool> = mesh
            .panels
            .iter()
            .map(|p| p.normal.z > 0.3 && p.normal.x > 0.1 && p.centroid.x > hi.x - 0.15 * length)
            .collect();
        assert!(member.iter().any(|m| *m));
        let ((blo, bhi), views) = close_up(&mesh, &member, 0.0).unwrap();
        assert_eq!(views, [View::Side, View::Top, View::Rear]);
        // Room of at least a twentieth of the length round the part, but
        // none more than 0.1 m past the body's end; only the side at
        // y <= 0.
        let changed = mesh
            .panels
            .iter()
            .zip(&member)
            .filter(|(p, m)| **m && p.centroid.y <= 0.0);
        for (p, _) in changed {
            for v in &p.vertices {
                assert!(
                    v.x >= blo.x + CLOSE_UP_ROOM_SHARE * length - 1e-9 && v.x <= bhi.x,
                    "{v:?} {blo:?} {bhi:?}"
                );
            }
        }
        assert!(bhi.x <= hi.x + CLOSE_UP_BEYOND_M + 1e-9, "{bhi:?}");
        assert!(bhi.y <= 0.26, "{bhi:?}");
        // At yaw the sheet's side view, and nothing for a change along
        // the whole body.
        let ((_, _), views) = close_up(&mesh, &member, 5.0).unwrap();
        assert_eq!(views[0], View::SideFromRight);
        let everywhere = vec![true; mesh.len()];
        assert!(close_up(&mesh, &everywhere, 0.0).is_none());
        assert!(close_up(&mesh, &vec![false; mesh.len()], 0.0).is_none());
    }

    /// The sheet's note gives the unchanged surface's 95 % figure as the
    /// table does, to three decimals (a review read 0.08 on the sheet,
    /// 0.085 in the table and 0.0848 in compare.json).
    /// The changed shape is outlined when some and at most half of B's
    /// surface changed.
    #[test]
    fn the_changed_shape_is_outlined_only_where_it_says_something() {
        let u = |changed_m2: f64| crate::compare::SurfaceDeltas {
            changed_m2,
            ..Default::default()
        };
        assert_eq!(outlined_share(&u(0.0), 10.0), None);
        assert_eq!(outlined_share(&u(1.0), 10.0), Some(0.1));
        assert_eq!(outlined_share(&u(6.0), 10.0), None);
    }

    #[test]
    fn the_cp_note_rounds_as_the_table() {
        let u = crate::compare::SurfaceDeltas {
            unchanged_share: 0.86,
            unchanged_delta_cp_p95: 0.0848,
            ..Default::default()
        };
        let note = delta_cp_note(&u, false);
        assert!(note.contains("95 % stays under 0.085;"), "{note}");
        let row = NumberRow::fixed("", u.unchanged_delta_cp_p95, 3, "-");
        assert!(note.contains(&format!("under {};", row.value)), "{note}");
        // Little unchanged: no such figure.
        let u = crate::compare::SurfaceDeltas {
            unchanged_share: 0.1,
            ..u
        };
        assert!(!delta_cp_note(&u, false).contains("stays under"));
    }

    /// The separation-change note says, with the change outlined, that a
    /// change far from the outline is more likely the panellings'.
    #[test]
    fn the_separation_change_note_says_what_is_far_from_the_change() {
        let u = crate::compare::SurfaceDeltas {
            margins_m: [0.005, 0.021],
            ..Default::default()
        };
        let note = separation_change_note(&u, true);
        assert!(
            note.contains(
                "Black outline: where B's shape lies more than 21 mm from A's; far from it"
            ) && note.contains("the two panellings'"),
            "{note}"
        );
        assert!(!separation_change_note(&u, false).contains("outline"));
    }

    /// The separation-change sheet outlines regions in a colour far from
    /// each of its legend's stripes (a review could not tell the blue
    /// outline from the "separates in A only" stripes along the base).
    #[test]
    fn region_outlines_differ_from_the_separation_stripes() {
        let far = |a: output::canvas::Rgb, b: output::canvas::Rgb| {
            let d: i32 = (0..3)
                .map(|k| (i32::from(a[k]) - i32::from(b[k])).pow(2))
                .sum();
            f64::from(d).sqrt() > 80.0
        };
        for stripes in [APPEARS, DISAPPEARS, BOTH] {
            for c in [stripes.0, stripes.1] {
                assert!(far(SEPARATION_OUTLINE.colour, c), "{c:?}");
            }
        }
        const { assert!(SEPARATION_OUTLINE.halo) };
    }
}
