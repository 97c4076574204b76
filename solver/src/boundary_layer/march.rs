//! The 1D march of the integral boundary layer along one line of edge
//! velocities, with the streamline spreading term: Thwaites (laminar),
//! Michel or a forced trip (transition), Head with Ludwieg-Tillmann
//! (turbulent).
//!
//! The same routine serves a 2D section (spreading zero), a body of
//! revolution (spreading `r'/r`, Mangler) and a 3D surface streamline
//! (spreading = surface divergence of the unit flow direction).

use nalgebra::{Point3, Vector3};

use super::{BoundaryLayerParams, FlowState, REATTACHMENT_H, Transition, head, michel, thwaites};

/// The edge flow at one station of the line.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct LineSample {
    /// Arc length along the line, m (increasing).
    pub s: f64,
    /// Edge speed `U`, m/s (non-negative).
    pub speed: f64,
    /// Spreading `(1/h) dh/ds`, 1/m: zero in 2D, `r'/r` on a body of
    /// revolution.
    pub spreading: f64,
    /// Position along the body as a fraction of its length (for
    /// [`Transition::Forced`]).
    pub body_fraction: f64,
    /// True when the flow leaves the surface at this station regardless of
    /// the boundary layer (a bluff base edge).
    pub forced_separation: bool,
    /// True where the flow reattaches behind a rim it left (a flat nose's
    /// edge): the separated shear layer has turned turbulent, so a laminar
    /// layer turns turbulent here (common practice), except in
    /// [`Transition::Laminar`].
    pub trip: bool,
    /// Concave turning of the surface into the stream along the line up to
    /// this station, radians (the sum of the angles of the concave edges
    /// crossed onto surfaces facing upstream; zero on a 2D section). A
    /// turbulent separation bubble closes only over such a turn, or on the
    /// face it leads onto (see [`march_line`]).
    pub concave_turn: f64,
    /// The surface here faces into the stream (inclined by at least
    /// [`BUBBLE_CONCAVE_TURN`] against it: a windscreen); false on a 2D
    /// section.
    pub faces_stream: bool,
    /// Where the line lands on a wall after running down the back of a
    /// protuberance (a mirror's back, then the flank): where the back
    /// began, how high it stood and how far the wall is clear (see
    /// [`WakeBack`], `wake_reattachment`). `None` elsewhere and on a 2D
    /// section.
    pub wake_back: Option<WakeBack>,
    /// Where the station lies, m (the origin on a 2D section).
    pub point: Point3<f64>,
    /// Outward unit normal of the surface at the station (zero on a 2D
    /// section, where no face rises into the stream).
    pub normal: Vector3<f64>,
    /// The top of the face into the stream the line last climbed onto over
    /// a concave turn: of the connected region of panels facing the stream
    /// round the panel where the line met it, the point that rises highest
    /// above the surface the line came from, among the points that lie
    /// within [`STEP_FACE_REACH`] times their rise of where the line met
    /// the face. `None` before any such face and on a 2D section. The step
    /// rule measures the face's height to it, so a line that meets a tall
    /// face near its foot and passes round its side sees the face's height,
    /// not the few centimetres it climbed (`step_bubble_end`).
    pub face_top: Option<Point3<f64>>,
}

/// The back of a protuberance as a line saw it ([`LineSample::wake_back`]):
/// a face turned downstream (the flow along the stream would turn down by
/// more than the bluff-edge limit to follow it), entered from a wall, which
/// the line ran down, over facets still turned from the stream by more
/// than [`WAKE_FOOT_TURN`] and over bluff edges, to land on a wall turned
/// less.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct WakeBack {
    /// Arc length where the back starts: where the line left the wall
    /// before it, m.
    pub start: f64,
    /// Arc length where the line lands on the wall behind the back (the
    /// back's foot), m.
    pub foot: f64,
    /// How far the line's points on the back rise above the
    /// plane of the surface at the foot, m (zero where the line passes the
    /// back's root, where the protuberance meets the wall).
    pub height: f64,
    /// Arc length where the line next meets a face turned downstream or a
    /// bluff edge, or ends, m: the surface behind the back is clear up to
    /// there.
    pub clear: f64,
    /// Arc length where the bubble closes when the wake of a back beside
    /// the line sets it (a line that passes a protuberance and separates
    /// in its lee closes where the lines off its back reattach; see the
    /// screening's lee rule), m; `None` for a line that ran down the back
    /// itself, whose bubble closes [`WAKE_REATTACHMENT_HEIGHTS`] heights
    /// past the foot.
    pub closes_at: Option<f64>,
}

/// How the line starts.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct LineStart {
    /// Momentum thickness at the first station, m; `None` derives it from a
    /// stagnation start (`lambda` by [`thwaites::stagnation_lambda`] with
    /// `spreading_exponent`) when the speed rises from the first station, or
    /// zero (a sharp leading edge) otherwise.
    pub theta: Option<f64>,
    /// Distance from the attachment point to the first station, m (enters
    /// `Re_x` of Michel's criterion).
    pub x0: f64,
    /// Exponent `m` of the spreading metric near the start, `h ~ s^m`:
    /// 0 for a 2D stagnation line, 1 for a point (nose) attachment.
    pub spreading_exponent: f64,
}

/// The boundary layer at one station.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct LineState {
    /// Momentum thickness, m.
    pub theta: f64,
    /// Displacement thickness `H theta`, m.
    pub delta_star: f64,
    /// Shape factor.
    pub h: f64,
    /// Skin-friction coefficient based on the local edge speed.
    pub cf: f64,
    /// `U theta / nu`.
    pub re_theta: f64,
    /// Thwaites' parameter (laminar stations; 0 elsewhere).
    pub lambda: f64,
    /// Laminar, turbulent or separated.
    pub state: FlowState,
    /// How close the layer is to its separation criterion, 0..1.
    pub risk: f64,
}

/// Result of a march.
#[derive(Debug, Clone, PartialEq)]
pub struct LineMarch {
    /// One state per station.
    pub states: Vec<LineState>,
    /// First turbulent station, if any.
    pub transition: Option<usize>,
    /// The station where the line separated for good, if it did (a
    /// separation on a protuberance's back that `wake_reattachment` closed
    /// is cleared).
    pub separation: Option<usize>,
    /// Each wake bubble `wake_reattachment` held: the station where the
    /// line landed behind a back (or separated in a back's lee) and the
    /// station where it reattached.
    pub wakes: Vec<(usize, usize)>,
}

/// The march as it goes.
enum Phase {
    Laminar {
        accumulated: f64,
    },
    Turbulent(head::HeadState),
    /// Inside a turbulent separation bubble that reattaches at station
    /// `until`, holding the state at its separation point.
    Bubble {
        until: usize,
        held: LineState,
    },
    Separated(LineState),
}

/// Least concave turning of the surface (radians; 10 degrees, our choice)
/// between a turbulent separation and the station where the edge speed has
/// recovered for the separation to count as a bubble in a concave corner.
pub const BUBBLE_CONCAVE_TURN: f64 = 10.0 * std::f64::consts::PI / 180.0;

/// Fewest stations a bubble that starts on a face into the stream may take
/// to close, whatever its thickness: six (three panels at the screening's
/// spacing of half a median panel), the width over which panels resolve a
/// concave corner's dip in the speed (our choice).
pub const BUBBLE_MIN_STATIONS: f64 = 6.0;

/// Farthest a turbulent separation may lie ahead of the foot of a face
/// into the stream, in heights of that face, for the separated layer to
/// count as the bubble ahead of a step: ahead of a forward-facing step the
/// flow separates about one step height upstream and reattaches on the
/// step (Moss & Baker 1980; Sherry, Lo Jacono & Sheridan 2010; from
/// memory). 1.5 is our margin on that.
pub const STEP_SEPARATION_HEIGHTS: f64 = 1.5;

/// How far from the point where a line meets a face into the stream a
/// point of that face may lie, in multiples of its rise above the surface
/// the line came from, to count towards the face's height
/// ([`LineSample::face_top`]): 2, so the face must climb at 30 degrees or
/// more on the way from the foot to the point (our choice). The faces into
/// the stream that meet are one region (a windscreen, its pillars, a
/// bumper, the nose below them), and a point far from the foot does not
/// shape the bubble there: ahead of a step the separated region spans
/// about a step height, along the wall and up the face (see
/// [`STEP_SEPARATION_HEIGHTS`]), so what counts is how high the face rises
/// close to where the line meets it. A screen inclined 30 degrees or more
/// counts up to its top (which lies 1 / sin of its angle times its rise
/// from its foot: 1.1 to 2 rises), seen from the pillar's foot too; a
/// shallower face counts along the line only, as lines climb it anyway.
/// The nose and the bumper lie below a bonnet and a roof, and a low lip's
/// region rises only as high as the lip.
pub const STEP_FACE_REACH: f64 = 2.0;

/// Least turn between the surface a layer separated on and the surface
/// beyond the face into the stream it then met, for the line to have gone
/// round the face's side rather than over its top (`junction_bubble_end`):
/// 60 degrees (our choice), most of the way from a roof above a bonnet
/// (0 to 10 degrees on the cases seen) to a flank beside it (75 to 90).
pub const JUNCTION_SIDE_TURN: f64 = 60.0 * std::f64::consts::PI / 180.0;

/// Longest separated region behind the back of a protuberance, in heights
/// of that back as the line saw it, for a line that runs down a face
/// turned downstream (over a bluff rim or a rounded one) and lands on a
/// wall behind it (the flank behind a mirror): the shear layer off the
/// back's rim reattaches on that wall. Behind a two-dimensional
/// backward-facing step it reattaches 6 to 7 step heights from the step
/// (Eaton & Johnston 1981; Driver & Seegmiller 1985; from memory), behind
/// a wall-mounted cube about 1.5 to 2 heights from its rear face
/// (Martinuzzi & Tropea 1993; from memory), so 7, the two-dimensional
/// step's, is the longest a protuberance's wake stays on the wall (our
/// choice of the upper end). See `wake_reattachment`.
pub const WAKE_REATTACHMENT_HEIGHTS: f64 = 7.0;

/// Largest turn of a surface away from the stream for it to count as the
/// wall behind a protuberance's back, where the back's wake reattaches
/// (`wake_reattachment`): 20 degrees (our choice). A back is entered where
/// the surface turns away by more than the bluff-edge limit (50 degrees)
/// and goes on while it stays turned by more than this, so that facets of
/// a curled housing turned 40 degrees between steeper ones stay part of
/// it; a flank, a roof or a deck turned less is the wall.
pub const WAKE_FOOT_TURN: f64 = 20.0 * std::f64::consts::PI / 180.0;

/// Share by which the edge speed must exceed its value at a turbulent
/// separation for the bubble to close (so that ripples of the interpolated
/// speed do not count; our choice).
const REATTACH_SPEED_MARGIN: f64 = 0.01;

/// March the boundary layer along `samples` (Thwaites 1949, Michel 1951,
/// Head 1958, Ludwieg & Tillmann 1949; spreading by Rott & Crabtree 1952).
///
/// Rules: in every transition mode except [`Transition::Laminar`], a laminar
/// separation ahead of transition is taken as transition through a short
/// bubble (common practice); at transition `theta` is continuous and `H`
/// restarts at `params.turbulent_start_h` (common practice). Turbulent
/// separation when `H >= params.separation_h`, unless the edge speed
/// regains its value at separation (plus 1 %) within
/// `params.reattach_thicknesses` boundary-layer thicknesses `theta (H1 +
/// H)` (Head's `H1`), the surface turns concave into the stream by at
/// least [`BUBBLE_CONCAVE_TURN`] within the first half of that distance and
/// no bluff edge lies between (on a face into the stream, a windscreen, the
/// turn may also lie up to half that distance behind, and the distance is
/// at least [`BUBBLE_MIN_STATIONS`] stations): that is a short bubble in a concave corner
/// (the foot of a windscreen, whose flow speeds up again along the
/// screen), whose stations keep the separation
/// point's thicknesses with no skin friction and risk 1, still counted
/// attached, and at whose end the layer goes on from `H` =
/// [`REATTACHMENT_H`] with `theta` held (our rule; see the setting). A
/// separation that lies ahead of a face into the stream rising above the
/// separated surface, within [`STEP_SEPARATION_HEIGHTS`] of that face's
/// height from its foot, is such a bubble too, closing on the face (the
/// flow ahead of a step; `step_bubble_end`). So is a separation ahead of
/// such a face whose line then leaves the face by its side, onto a surface
/// turned more than [`JUNCTION_SIDE_TURN`] from the separated one, when the
/// face's foot and the speed's recovery both come within the
/// concave-corner rule's distance (the junction vortex ahead of an
/// obstacle, whose legs wrap round its sides: the bonnet's outboard
/// corners ahead of an upright windscreen; `junction_bubble_end`). A
/// line that runs down the back of a protuberance onto a wall reattaches
/// within [`WAKE_REATTACHMENT_HEIGHTS`] of the back's height
/// (`wake_reattachment`; none when `params.reattach_thicknesses` is 0,
/// as for the other bubbles). Once
/// separated for good,
/// every later station is separated and holds the thicknesses of the
/// separation point.
pub fn march_line(
    samples: &[LineSample],
    start: &LineStart,
    params: &BoundaryLayerParams,
) -> LineMarch {
    let dspeed = speed_derivative(samples);
    let log_h = log_metric(samples);
    let mut out = LineMarch {
        states: Vec::with_capacity(samples.len()),
        transition: None,
        separation: None,
        wakes: Vec::new(),
    };
    let Some(first) = samples.first() else {
        return out;
    };
    let theta0 = start_theta(dspeed[0], start, params.nu);
    // In the all-turbulent mode the first station with a positive speed
    // turns turbulent (Head's equations are singular where U = 0).
    let mut phase = Phase::Laminar {
        accumulated: theta0 * theta0 * first.speed.powi(6),
    };
    for i in 0..samples.len() {
        let ctx = Station {
            i,
            samples,
            dspeed: &dspeed,
            log_h: &log_h,
            start,
            params,
        };
        let state = advance(&mut phase, &ctx, &mut out, theta0);
        out.states.push(state);
    }
    out
}

/// Everything one station needs.
struct Station<'a> {
    i: usize,
    samples: &'a [LineSample],
    dspeed: &'a [f64],
    log_h: &'a [f64],
    start: &'a LineStart,
    params: &'a BoundaryLayerParams,
}

/// Advance the phase to station `ctx.i` and return its state.
fn advance(phase: &mut Phase, ctx: &Station, out: &mut LineMarch, theta0: f64) -> LineState {
    let sample = ctx.samples[ctx.i];
    // A line that came down the back of a protuberance (separating on it
    // or not) lands on the wall behind it: the back's wake reattaches
    // within a few of its heights (`wake_reattachment`). A bluff edge at
    // the landing's station lies on the back (no line lands over one).
    if !matches!(phase, Phase::Bubble { .. })
        && let Some((until, before)) = wake_reattachment(ctx, out)
    {
        // The separated shear layer has turned turbulent where it
        // reattaches (common practice, as behind a rim).
        let held = LineState {
            cf: 0.0,
            risk: 1.0,
            lambda: 0.0,
            state: FlowState::Turbulent,
            ..before
        };
        if before.state == FlowState::Laminar && out.transition.is_none() {
            out.transition = Some(ctx.i);
        }
        // The separation on the back is closed: the line's separation mark
        // is for a separation for good (the back's stations keep their
        // separated states).
        if matches!(phase, Phase::Separated(_)) {
            out.separation = None;
        }
        out.wakes.push((ctx.i, until));
        *phase = Phase::Bubble { until, held };
        return held;
    }
    if let Phase::Separated(held) = phase {
        return *held;
    }
    if let Phase::Bubble { until, held } = *phase
        && !sample.forced_separation
    {
        if ctx.i < until {
            return held;
        }
        let theta = held
            .theta
            .max(head::MIN_RE_THETA * ctx.params.nu / sample.speed.max(1e-12));
        let hs = head::HeadState::new(theta, REATTACHMENT_H);
        *phase = Phase::Turbulent(hs);
        return turbulent_state(&hs, sample.speed, ctx.params);
    }
    if sample.forced_separation {
        let prev = out.states.last().copied();
        return separate(phase, out, ctx.i, prev, theta0, ctx.params);
    }
    let state = match phase {
        Phase::Laminar { accumulated } => {
            let lam = laminar_station(accumulated, ctx, theta0);
            match laminar_decision(&lam, ctx) {
                Decision::Stay => lam,
                Decision::Separate => {
                    return separate(phase, out, ctx.i, Some(lam), theta0, ctx.params);
                }
                Decision::Transition => {
                    let hs = turbulent_start(lam.theta, sample.speed, ctx.params);
                    *phase = Phase::Turbulent(hs);
                    out.transition = Some(ctx.i);
                    turbulent_state(&hs, sample.speed, ctx.params)
                }
            }
        }
        Phase::Turbulent(hs) => {
            if ctx.i > 0 {
                *hs = turbulent_interval(*hs, ctx);
            }
            turbulent_state(hs, sample.speed, ctx.params)
        }
        Phase::Bubble { held, .. } | Phase::Separated(held) => *held,
    };
    let finite = state.theta.is_finite() && state.h.is_finite();
    if state.state == FlowState::Turbulent
        && finite
        && state.h >= ctx.params.separation_h
        && let Some(until) = bubble_end(ctx, &state)
    {
        let held = LineState {
            cf: 0.0,
            risk: 1.0,
            ..state
        };
        *phase = Phase::Bubble { until, held };
        return held;
    }
    if state.state == FlowState::Turbulent && (!finite || state.h >= ctx.params.separation_h) {
        // A march that ran out of range (edge speed near zero) counts as
        // separated, holding the last finite state.
        let last = if finite {
            Some(state)
        } else {
            out.states.last().copied()
        };
        return separate(phase, out, ctx.i, last, theta0, ctx.params);
    }
    state
}

/// The station where a turbulent separation at `ctx.i` (layer `state`)
/// reattaches: the first at which the edge speed exceeds the separation
/// point's by [`REATTACH_SPEED_MARGIN`], if that comes within
/// `params.reattach_thicknesses` thicknesses `theta (H1 + H)` and before
/// any bluff edge, with the surface turning concave by at least
/// [`BUBBLE_CONCAVE_TURN`] within the first half of that distance. On a
/// face into the stream the turn is counted from half that distance
/// upstream and the distance is at least [`BUBBLE_MIN_STATIONS`] stations
/// (`corner_bubble_end`). Failing that, a separation ahead of a face into
/// the stream high enough to catch its shear layer closes on that face
/// (`step_bubble_end`), and one whose line passes round the face's side
/// closes where its speed recovers (`junction_bubble_end`). `None` always
/// when `params.reattach_thicknesses` is 0.
fn bubble_end(ctx: &Station, state: &LineState) -> Option<usize> {
    if ctx.params.reattach_thicknesses <= 0.0 {
        return None;
    }
    corner_bubble_end(ctx, state)
        .or_else(|| step_bubble_end(ctx))
        .or_else(|| junction_bubble_end(ctx, state))
}

/// The reattachment of a line that lands at station `ctx.i` on a wall
/// after running down the back of a protuberance
/// ([`LineSample::wake_back`]: a mirror's back, then the flank), with the
/// layer as it reached the back: the first station
/// [`WAKE_REATTACHMENT_HEIGHTS`] heights past the landing, the height being
/// the larger of how high the line saw the back stand above the wall and
/// the layer's thickness `theta (H1 + H)` as it reached the back (the
/// shear layer that leaves the back's rim is at least as thick as the
/// layer that reached it, so a back lower than the layer, where the line
/// passes a protuberance's root, still leaves a wake about that thick; our
/// choice). The flow on the back has separated whether or not the march
/// said so: over a bluff rim the line separated there, and over a rounded
/// one the layer marched down the back grows many times over (theta from
/// 0.2 to 15 mm down a van's mirror, then separating on the flank), as
/// attached potential flow runs down a base. `None` when the line
/// separated before it reached the back (it carries another wake), when a
/// face turned downstream or a bluff edge comes before the reattachment or
/// the line ends first (a fence on a short deck and a roof box, whose
/// wakes run past the body's base), and when `params.reattach_thicknesses`
/// is 0, as for the other bubbles. A line that ends on a body's base or on
/// a mirror's rear face never lands; a slant of up to 50 degrees is no
/// back.
///
/// Behind a bluff protuberance on a wall the separated region closes
/// within a few of its heights (a wall-mounted cube, a backward-facing
/// step; see [`WAKE_REATTACHMENT_HEIGHTS`]), and the wall beyond is
/// attached (common practice: tufts on the side glass behind a mirror
/// stay on). Without the rule every line that came off a mirror's back
/// onto the flank stayed separated to the tail, leaving a strip of dead
/// water one panel row high along the flank. The stations on the back keep
/// the march's verdict (separated behind a bluff rim: the back is dead
/// water); those from the landing to the reattachment are held as a
/// bubble's (risk 1, no friction, counted attached), and the layer goes on
/// from `H` = [`REATTACHMENT_H`] with the thickness it had reaching the
/// back.
fn wake_reattachment(ctx: &Station, out: &LineMarch) -> Option<(usize, LineState)> {
    // A layer kept laminar throughout is not restarted turbulent.
    if ctx.params.reattach_thicknesses <= 0.0 || ctx.params.transition == Transition::Laminar {
        return None;
    }
    let back = ctx.samples[ctx.i].wake_back?;
    // The layer as it reached the back: the station before the first on it
    // (the landing's own, when the back is a facet crossed between two
    // stations).
    let entry = ctx.samples[..ctx.i]
        .iter()
        .position(|b| b.s >= back.start)
        .unwrap_or(ctx.i);
    let before = *out.states.get(entry.checked_sub(1)?)?;
    // A line separated before it reached the back (earlier than the
    // station just ahead of it) carries another wake.
    if entry >= 2 && out.states[entry - 2].state == FlowState::Separated {
        return None;
    }
    let thickness = before.theta * (head::h1_of_h(before.h) + before.h);
    let close = back
        .closes_at
        .unwrap_or(back.foot + WAKE_REATTACHMENT_HEIGHTS * back.height.max(thickness));
    if !close.is_finite() || close >= back.clear {
        return None;
    }
    let k = ctx.samples[ctx.i..].iter().position(|b| b.s >= close)?;
    Some((ctx.i + k, before))
}

/// The reattachment of a separation at `ctx.i` in the decelerating flow
/// ahead of a face into the stream that the line then passes round by its
/// side (the bonnet's outboard corner ahead of an upright windscreen, whose
/// lines turn round the pillar onto the flank): the first station where the
/// edge speed exceeds its value at separation by [`REATTACH_SPEED_MARGIN`],
/// if that comes within `params.reattach_thicknesses` thicknesses
/// `theta (H1 + H)` and before any bluff edge, when within the same
/// distance the line crosses a concave turn of at least
/// [`BUBBLE_CONCAVE_TURN`] onto a face into the stream and leaves that
/// face, with no bluff edge between, onto a surface turned by more than
/// [`JUNCTION_SIDE_TURN`] from the separated surface.
///
/// The layer ahead of an obstacle standing on a wall separates in the
/// obstacle's pressure rise and rolls up into a junction (horseshoe)
/// vortex whose legs wrap round the obstacle's sides; beneath and behind
/// the vortex the flow on the wall beside the obstacle is attached (Baker
/// 1979; Simpson 2001; from memory). On a car the layer that leaves the
/// bonnet ahead of the screen's outboard foot feeds the pillar vortex,
/// which lies along the side glass, and the flank below stays attached
/// (common practice in vehicle aerodynamics). A line that leaves the face
/// onto a surface turned well away from the one it separated on (the flank
/// beside a bonnet) went round the face's side, beneath that vortex, so
/// the region it left is closed, not an open wake (our reading). A line
/// that climbs the face leaves it onto a surface like the one it left (a
/// roof above a bonnet) and stays with [`corner_bubble_end`] and
/// [`step_bubble_end`]. The reach and the speed margin are the
/// concave-corner rule's (our choice). A separation with no face into the
/// stream ahead (a rear window, the side edges of a slant, a base) is
/// never such a bubble.
fn junction_bubble_end(ctx: &Station, state: &LineState) -> Option<usize> {
    let here = ctx.samples[ctx.i];
    // A 2D section carries no normal, so no side to pass round.
    if here.normal.norm_squared() < 0.25 {
        return None;
    }
    let reach = ctx.params.reattach_thicknesses * state.theta * (head::h1_of_h(state.h) + state.h);
    let within = &ctx.samples[ctx.i + 1..];
    let within = &within[..within
        .iter()
        .position(|b| b.forced_separation || b.s - here.s > reach)
        .unwrap_or(within.len())];
    let foot = within
        .iter()
        .position(|b| b.concave_turn - here.concave_turn >= BUBBLE_CONCAVE_TURN)?;
    let exit = ctx.samples[ctx.i + 1 + foot..]
        .iter()
        .find(|b| !b.faces_stream || b.forced_separation)?;
    if exit.forced_separation || exit.normal.dot(&here.normal) > JUNCTION_SIDE_TURN.cos() {
        return None;
    }
    let target = here.speed * (1.0 + REATTACH_SPEED_MARGIN);
    within
        .iter()
        .position(|b| b.speed > target)
        .map(|j| ctx.i + 1 + j)
}

/// The reattachment of a separation at `ctx.i` that lies ahead of a face
/// into the stream rising above the separated surface (a windscreen stood
/// on a bonnet, the face of a step): the separated shear layer leaves along
/// the surface and runs into the face, so the region it encloses is a
/// closed bubble, not an open wake (the flow ahead of a forward-facing
/// step; see [`STEP_SEPARATION_HEIGHTS`]). The face's foot is the first
/// station after a concave turn of at least [`BUBBLE_CONCAVE_TURN`] onto it
/// (when that face is too low for its distance, each later concave turn
/// onto a face into the stream before any bluff edge is a foot in turn:
/// the shear layer passes over a low facet of the cowl to the screen);
/// its height is how far its stations rise above the separated surface's
/// plane, or its top ([`LineSample::face_top`], the face's own height near
/// where the line meets it, which counts when the line crosses only its
/// foot and passes round its side: a bonnet's line round a windscreen's
/// pillar) if that rises higher, and the separation must lie within [`STEP_SEPARATION_HEIGHTS`]
/// such heights of the foot. The bubble closes where the edge speed regains
/// its value at separation (as [`corner_bubble_end`]) or, at the latest,
/// where the face ends. `None` when a bluff edge comes first or the face is
/// too low for the distance.
fn step_bubble_end(ctx: &Station) -> Option<usize> {
    let here = ctx.samples[ctx.i];
    let later = ctx.samples.get(ctx.i + 1..)?;
    let clear = later.iter().take_while(|b| !b.forced_separation).count();
    let first = later[..clear]
        .iter()
        .position(|b| b.concave_turn - here.concave_turn >= BUBBLE_CONCAVE_TURN)?;
    // The shear layer runs on over a face too low to catch it (a facet of
    // the cowl tipped into the stream, a lip) to the next face it meets: each
    // further concave turn onto a face into the stream, before any bluff
    // edge, is a foot too, and the first high enough for its distance
    // closes the bubble.
    std::iter::once(first)
        .chain((first + 1..clear).filter(|&k| later[k].concave_turn > later[k - 1].concave_turn))
        .find_map(|foot| bubble_on_face(ctx, foot))
}

/// The step rule's close on the face whose foot is station `ctx.i + 1 +
/// foot` (see [`step_bubble_end`]): `None` when the face is too low for
/// its distance from the separation or a bluff edge ends the face first.
fn bubble_on_face(ctx: &Station, foot: usize) -> Option<usize> {
    let here = ctx.samples[ctx.i];
    let face = &ctx.samples[ctx.i + 1 + foot..];
    // The foot's station need not face the stream: the turn may reach its
    // threshold on a sliver of the face crossed between two stations (a
    // facet in the corner at a screen's foot, the few centimetres a line
    // crosses before it turns round a pillar). The face's top still
    // counts, and the bubble then closes at that station at the latest.
    let face_len = face.iter().take_while(|b| b.faces_stream).count();
    if face_len == 0 && face[0].face_top.is_none() {
        return None;
    }
    // The face's height: how high its stations rise above the separated
    // surface's plane, or its top (`LineSample::face_top`) when the line
    // meets it near its foot and passes round its side.
    let height = face[..face_len]
        .iter()
        .map(|b| (b.point - here.point).dot(&here.normal))
        .chain(face[0].face_top.map(|p| (p - here.point).dot(&here.normal)))
        .fold(0.0, f64::max);
    if face[0].s - here.s > STEP_SEPARATION_HEIGHTS * height {
        return None;
    }
    let target = here.speed * (1.0 + REATTACH_SPEED_MARGIN);
    // The bubble closes on the face: from its foot to the first station
    // past it. A bluff edge there ends the bubble (the layer then leaves
    // that edge, as `advance` has it); one on the face comes first.
    let (start, end) = (
        ctx.i + 1 + foot,
        ctx.i + 1 + foot + face_len.min(face.len() - 1),
    );
    for j in start..=end {
        let b = &ctx.samples[j];
        if b.forced_separation {
            return (j == end).then_some(j);
        }
        if b.speed > target {
            return Some(j);
        }
    }
    Some(end)
}

/// The reattachment of a separation at `ctx.i` in a concave corner, within
/// `params.reattach_thicknesses` thicknesses (see [`bubble_end`]).
fn corner_bubble_end(ctx: &Station, state: &LineState) -> Option<usize> {
    let here = ctx.samples[ctx.i];
    let thickness = state.theta * (head::h1_of_h(state.h) + state.h);
    let spacing = match ctx.samples {
        [a, b, ..] => b.s - a.s,
        _ => 0.0,
    };
    // On a face into the stream (the layer left the windscreen just past
    // the cowl's crease) the crease behind counts too, and the bubble gets
    // at least the few stations over which the panels resolve the corner's
    // dip, however thin the layer.
    let (behind, reach) = if here.faces_stream {
        let reach =
            (ctx.params.reattach_thicknesses * thickness).max(BUBBLE_MIN_STATIONS * spacing);
        let behind = ctx.samples[..ctx.i]
            .iter()
            .rev()
            .take_while(|b| here.s - b.s <= 0.5 * reach)
            .last()
            .unwrap_or(&here);
        (behind, reach)
    } else {
        (&here, ctx.params.reattach_thicknesses * thickness)
    };
    let target = here.speed * (1.0 + REATTACH_SPEED_MARGIN);
    let mut corner = false;
    for (j, sample) in ctx.samples.iter().enumerate().skip(ctx.i + 1) {
        let run = sample.s - here.s;
        if run > reach || sample.forced_separation {
            return None;
        }
        if sample.concave_turn - behind.concave_turn >= BUBBLE_CONCAVE_TURN {
            corner = true;
        } else if run > 0.5 * reach {
            // The corner must come within the first half of the reach: a
            // layer that left a long slope well ahead of its foot did not
            // separate because of the corner.
            return None;
        }
        if sample.speed > target {
            return corner.then_some(j);
        }
    }
    None
}

/// What a laminar station leads to.
enum Decision {
    Stay,
    Separate,
    Transition,
}

/// Laminar separation (`lambda < -0.09`, Thwaites 1949) or transition (by the
/// chosen mode; Michel's criterion for free transition).
fn laminar_decision(lam: &LineState, ctx: &Station) -> Decision {
    let sample = ctx.samples[ctx.i];
    let separated = lam.lambda < thwaites::SEPARATION_LAMBDA;
    let transition = match ctx.params.transition {
        Transition::Laminar => false,
        Transition::Turbulent => sample.speed > 0.0,
        Transition::Forced { x_fraction } => sample.trip || sample.body_fraction >= x_fraction,
        Transition::Free => {
            let x = sample.s - ctx.samples[0].s + ctx.start.x0;
            sample.trip || michel::has_transitioned(lam.re_theta, sample.speed * x / ctx.params.nu)
        }
    };
    match (separated, transition, ctx.params.transition) {
        (true, _, Transition::Laminar) => Decision::Separate,
        (true, _, _) | (false, true, _) => Decision::Transition,
        _ => Decision::Stay,
    }
}

/// Enter the separated phase at station `i`.
fn separate(
    phase: &mut Phase,
    out: &mut LineMarch,
    i: usize,
    last: Option<LineState>,
    theta0: f64,
    params: &BoundaryLayerParams,
) -> LineState {
    let mut held = last.unwrap_or(LineState {
        theta: theta0,
        delta_star: theta0 * params.separation_h,
        h: params.separation_h,
        cf: 0.0,
        re_theta: 0.0,
        lambda: 0.0,
        state: FlowState::Separated,
        risk: 1.0,
    });
    held.state = FlowState::Separated;
    held.risk = 1.0;
    held.cf = 0.0;
    *phase = Phase::Separated(held);
    out.separation = Some(i);
    held
}

/// Thwaites' station: accumulate the integral and evaluate the closure.
fn laminar_station(accumulated: &mut f64, ctx: &Station, theta0: f64) -> LineState {
    let i = ctx.i;
    let sample = ctx.samples[i];
    let nu = ctx.params.nu;
    let metric = ctx.log_h[i].exp();
    if i > 0 {
        let prev = ctx.samples[i - 1];
        let f0 = thwaites::integrand(nu, prev.speed, ctx.log_h[i - 1].exp());
        let f1 = thwaites::integrand(nu, sample.speed, metric);
        *accumulated += 0.5 * (f0 + f1) * (sample.s - prev.s);
    }
    let theta = if i == 0 || sample.speed <= 0.0 {
        theta0
    } else {
        thwaites::theta_from_integral(*accumulated, sample.speed, metric)
    };
    let lambda = theta * theta * ctx.dspeed[i] / nu;
    let (h, l) = thwaites::closure(lambda);
    let cf = if theta > 0.0 && sample.speed > 0.0 {
        thwaites::skin_friction(nu, sample.speed, theta, l)
    } else {
        0.0
    };
    LineState {
        theta,
        delta_star: h * theta,
        h,
        cf,
        re_theta: sample.speed * theta / nu,
        lambda,
        state: FlowState::Laminar,
        risk: thwaites::risk(lambda),
    }
}

/// First-station momentum thickness (see [`LineStart::theta`]).
fn start_theta(dspeed: f64, start: &LineStart, nu: f64) -> f64 {
    match start.theta {
        Some(theta) => theta.max(0.0),
        None if dspeed > 0.0 => {
            (thwaites::stagnation_lambda(start.spreading_exponent) * nu / dspeed).sqrt()
        }
        None => 0.0,
    }
}

/// Turbulent start: `theta` continuous (floored at `Re_theta` =
/// [`head::MIN_RE_THETA`]), `H = turbulent_start_h` (common practice).
fn turbulent_start(theta: f64, speed: f64, params: &BoundaryLayerParams) -> head::HeadState {
    let floor = head::MIN_RE_THETA * params.nu / speed.max(1e-12);
    head::HeadState::new(theta.max(floor), params.turbulent_start_h)
}

/// The station state of a turbulent layer.
fn turbulent_state(hs: &head::HeadState, speed: f64, params: &BoundaryLayerParams) -> LineState {
    let h = hs.h();
    LineState {
        theta: hs.theta,
        delta_star: h * hs.theta,
        h,
        cf: hs.cf(params.nu, speed.max(1e-12)),
        re_theta: speed * hs.theta / params.nu,
        lambda: 0.0,
        state: FlowState::Turbulent,
        risk: head::risk(h, params.flat_plate_h, params.separation_h),
    }
}

/// Integrate Head's equations from station `i - 1` to `i` by RK4 substeps of
/// at most 20 momentum thicknesses, with the edge flow interpolated linearly.
fn turbulent_interval(mut hs: head::HeadState, ctx: &Station) -> head::HeadState {
    let (a, b) = (ctx.i - 1, ctx.i);
    let (s0, s1) = (ctx.samples[a].s, ctx.samples[b].s);
    let length = s1 - s0;
    if length <= 0.0 {
        return hs;
    }
    let flow = |t: f64| head::EdgeFlow {
        speed: lerp(ctx.samples[a].speed, ctx.samples[b].speed, t).max(1e-9),
        dspeed: lerp(ctx.dspeed[a], ctx.dspeed[b], t),
        spreading: lerp(ctx.samples[a].spreading, ctx.samples[b].spreading, t),
    };
    let mut t = 0.0;
    let mut steps = 0;
    while t < 1.0 && steps < 1000 {
        let dt = (20.0 * hs.theta / length).max(1e-3).min(1.0 - t);
        hs = head::rk4_step(
            hs,
            [flow(t), flow(t + 0.5 * dt), flow(t + dt)],
            dt * length,
            ctx.params.nu,
        );
        t += dt;
        steps += 1;
    }
    hs
}

fn lerp(a: f64, b: f64, t: f64) -> f64 {
    a + (b - a) * t
}

/// `dU/ds` by central differences (one-sided at the ends).
pub fn speed_derivative(samples: &[LineSample]) -> Vec<f64> {
    let n = samples.len();
    (0..n)
        .map(|i| {
            let (a, b) = (i.saturating_sub(1), (i + 1).min(n - 1));
            let ds = samples[b].s - samples[a].s;
            if ds > 0.0 {
                (samples[b].speed - samples[a].speed) / ds
            } else {
                0.0
            }
        })
        .collect()
}

/// `ln h` relative to the first station, by the trapezoidal rule on the
/// spreading `(1/h) dh/ds`.
pub fn log_metric(samples: &[LineSample]) -> Vec<f64> {
    let mut out = Vec::with_capacity(samples.len());
    let mut acc = 0.0;
    for (i, s) in samples.iter().enumerate() {
        if i > 0 {
            let p = samples[i - 1];
            acc += 0.5 * (p.spreading + s.spreading) * (s.s - p.s);
        }
        out.push(acc);
    }
    out
}
