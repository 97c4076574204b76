//! Typed errors of the mesh crate. Each variant names the bad element.

use thiserror::Error;

/// Everything that can go wrong between an STL file and a panel mesh.
#[derive(Debug, Error)]
pub enum MeshError {
    /// A facet has (numerically) zero area, so it has no normal.
    #[error("facet {facet} has zero area and no normal")]
    DegenerateFacet {
        /// Index of the facet.
        facet: usize,
    },
    /// A facet refers to a vertex that does not exist.
    #[error("facet {facet} refers to vertex {vertex}, but the mesh has only {count} vertices")]
    BadVertexIndex {
        /// Index of the facet.
        facet: usize,
        /// The vertex index it holds.
        vertex: usize,
        /// Number of vertices in the mesh.
        count: usize,
    },
    /// The mesh has no facets at all (or none left after repair).
    #[error("the mesh has no usable facets")]
    Empty,
    /// A coordinate is NaN or infinite.
    #[error("vertex {vertex} has a coordinate that is not a finite number")]
    NonFinite {
        /// Index of the vertex (or facet corner when read from STL).
        vertex: usize,
    },
    /// The path names a directory, not a file.
    #[error("it is a directory, not an STL file")]
    IsDirectory,
    /// The file could not be opened or read before the first facet.
    #[error("cannot read the file")]
    Io {
        /// What the operating system said.
        #[source]
        source: std::io::Error,
    },
    /// The file has no bytes at all.
    #[error("the file is empty (0 bytes)")]
    EmptyFile,
    /// Too short for a binary STL and not ASCII STL.
    #[error(
        "{bytes} bytes is too short for a binary STL (an 84-byte header, then 50 bytes per facet) \
         and it does not start with `solid` as ASCII STL does"
    )]
    TooShort {
        /// File length in bytes.
        bytes: u64,
    },
    /// A file of another format, told by its first bytes (a review's PNG
    /// renamed `.stl` read "header declares 68188068 facets", an OBJ "too
    /// short for a binary STL").
    #[error("it is {what}, not an STL: export the surface as STL (binary or ASCII)")]
    OtherFormat {
        /// The format in words ("a PNG image", "a Wavefront OBJ mesh").
        what: &'static str,
    },
    /// Text that does not start with `solid`: neither ASCII nor binary STL.
    #[error("it is text that does not start with `solid`: neither ASCII nor binary STL")]
    NotStl,
    /// The binary header declares more facets than the file can hold.
    #[error(
        "the binary STL header declares {declared} facets ({expected} bytes) but the file has \
         {bytes} bytes, room for {room} facets: it is truncated or not STL"
    )]
    FacetCountMismatch {
        /// Facet count in the header.
        declared: u64,
        /// File length that count implies.
        expected: u64,
        /// Actual file length.
        bytes: u64,
        /// Whole facets the file can hold.
        room: u64,
    },
    /// A facet could not be read or parsed (truncated file, malformed number).
    #[error("facet {} (counting from 1) cannot be read: {}", .facet + 1, match .line {
        Some((n, text, _)) if *.last_line => format!(
            "line {n} (`{text}`), the file's last, breaks off: the file ends in the middle of a \
             facet, so it was cut short (an interrupted export or copy); export it again"
        ),
        Some((n, text, _)) if crate::import::plain_read_error(.reader).contains("NaN") => {
            format!("line {n} (`{text}`): {}", crate::import::plain_read_error(.reader))
        }
        Some((n, text, Some(want))) => format!(
            "line {n} (`{text}`) does not read as ASCII STL: `{want}` belongs there (a line \
             missing or out of order)"
        ),
        Some((n, text, None)) => format!("line {n} (`{text}`) does not read as ASCII STL"),
        None => crate::import::plain_read_error(.reader),
    })]
    BadFacet {
        /// Index of the facet (0-based) being read.
        facet: usize,
        /// The reader's complaint (put in plain words by the message).
        reader: std::io::Error,
        /// In an ASCII file, the first line that does not read as ASCII
        /// STL (its number from 1, its text, and the keyword that belongs
        /// there when it is one out of order), when one was found.
        line: Option<(usize, String, Option<&'static str>)>,
        /// That line is the file's last.
        last_line: bool,
    },
    /// A facet corner has a NaN or infinite coordinate.
    #[error(
        "facet {} (counting from 1), corner {} has a coordinate that is not a finite number (NaN or infinity)",
        .facet + 1,
        .corner + 1
    )]
    NonFiniteCorner {
        /// Index of the facet.
        facet: usize,
        /// Corner 0, 1 or 2.
        corner: usize,
    },
    /// The file was read but holds no facets.
    #[error("the file holds no facets")]
    NoFacets,
    /// Every facet was degenerate: nothing is left after repair.
    #[error("all {facets} facets are degenerate (zero area or collapsed): no surface is left")]
    AllDegenerate {
        /// Number of facets read.
        facets: usize,
    },
    /// Most edges stay open even with the weld widened ([`crate::repair::WIDER_WELDS`]):
    /// the facets do not share their corners.
    #[error(
        "{:.0} % of the edges between facets stay open even with corners welded within {:.2} mm: the \
         facets do not share their corners (an export that writes each facet apart, with gaps larger \
         than that); export the STL again with shared, welded vertices (a closed, watertight mesh)",
        100.0 * .open_share,
        1000.0 * .tolerance
    )]
    UnweldedFacets {
        /// Share of the distinct edges used by one facet only.
        open_share: f64,
        /// The widest weld tried, metres.
        tolerance: f64,
    },
    /// Boundary loops that could be neither filled nor closed by a mirror.
    /// The fields describe the largest; `holes` lists every one, largest
    /// first, and the message names them all (up to ten).
    #[error(
        "{}{} that no declared mirror plane closes, largest first: {}: the \
         panel method needs a closed surface, because it holds the potential inside the body at \
         zero and an open surface has no inside; {}",
        crate::repair::hole_lead(.holes),
        if *.refused == 1 { "1 open hole".to_string() } else { format!("{} open holes", .refused) },
        crate::repair::describe_refused(.holes),
        crate::repair::hole_advice(.holes)
    )]
    OpenHole {
        /// Index of the largest refused loop among the boundary loops found.
        loop_index: usize,
        /// Number of edges around the largest refused loop.
        edges: usize,
        /// Length-weighted centre of the largest refused loop, metres.
        centre: [f64; 3],
        /// Perimeter of the largest refused loop, metres.
        perimeter: f64,
        /// Largest perimeter that would have been filled there, metres.
        limit: f64,
        /// Number of holes refused.
        refused: usize,
        /// Every refused hole, largest first.
        holes: Vec<crate::repair::RefusedHole>,
    },
    /// An ASCII STL without its closing `endsolid` line whose repair
    /// failed: the file was most likely cut short at a facet's end, and
    /// what is missing left the holes (a review's file, cut at 60 % of its
    /// facets, had been told to close a hole of 7 m in the modeller).
    #[error(
        "the ASCII STL ends after facet {facets} without its closing endsolid line, so it was most \
         likely cut short (an interrupted export or copy): export it again; the repair found {source}"
    )]
    CutShort {
        /// Facets read.
        facets: usize,
        /// What the repair found.
        source: Box<MeshError>,
    },
    /// A shape generator was given a parameter it cannot build.
    #[error("generator parameter {name} = {value}: {reason}")]
    InvalidParameter {
        /// Name of the parameter.
        name: &'static str,
        /// The value given.
        value: f64,
        /// What is wrong with it.
        reason: std::borrow::Cow<'static, str>,
    },
    /// The surface passes through itself: a facet crosses another facet of
    /// the same connected surface.
    #[error(
        "panel {facet} crosses panel {other} of the same surface at ({x:.4}, {y:.4}, {z:.4}) m \
         ({pairs} crossing pairs in all): a surface that passes through itself has no single \
         inside, and the panel method holds the potential inside the body at zero, so its \
         results would be meaningless; look for facets that run through the body, such as a fan \
         of facets whose apex sits at the wrong end",
        x = .point[0],
        y = .point[1],
        z = .point[2]
    )]
    SelfCrossing {
        /// One of the two facets (numbered as the panels the run would use).
        facet: usize,
        /// The other facet.
        other: usize,
        /// Where they cross, metres.
        point: [f64; 3],
        /// Pairs of facets of one surface that cross.
        pairs: usize,
    },
    /// A whole body to be run as a half model is not centred on the
    /// symmetry plane y = 0.
    #[error(
        "symmetry plane: a whole body run as a half model is cut at y = 0, but this one spans \
         y = {y_min:.4} to {y_max:.4} m, centred {off_mm:.1} mm off that plane: move its centre plane \
         onto y = 0 in the STL, or run it whole",
        off_mm = 500.0 * (y_min + y_max)
    )]
    NotCentred {
        /// The body's least y, metres.
        y_min: f64,
        /// The body's greatest y, metres.
        y_max: f64,
    },
    /// A half model reaches across its symmetry plane (y = 0) by more than
    /// the cut tolerance.
    #[error(
        "symmetry plane: a half model must lie in y >= 0 (its mirror image supplies y < 0), \
         but the body reaches y = {y:.4} m ({y_mm:.1} mm; up to {moved_mm:.1} mm is moved onto the cut)",
        y_mm = 1000.0 * y,
        moved_mm = 1000.0 * moved
    )]
    AcrossSymmetryPlane {
        /// The body's least y, metres.
        y: f64,
        /// How far a cut is moved onto y = 0, metres.
        moved: f64,
    },
    /// A grounded body reaches below its ground plane by more than tyres
    /// pressed into the floor would.
    #[error("{}", below_ground_words(*z, *ground, *allowed, *top))]
    BelowGround {
        /// The body's least z, metres.
        z: f64,
        /// The ground plane's height, metres.
        ground: f64,
        /// How far below the ground the body may reach, metres.
        allowed: f64,
        /// The body's greatest z, metres.
        top: f64,
    },
    /// Every coarsening try was refused and the input has far more facets
    /// than the target: running it as it is would cost the square of that
    /// in memory, so the run stops with the cause.
    #[error(
        "the coarsening could not bring its {input} facets down to {target} panels: every try (up to \
         {largest_try} panels) was refused, the first because {why}; {advice}"
    )]
    CoarseningFailed {
        /// Panels wanted.
        target: usize,
        /// Facets of the repaired input.
        input: usize,
        /// The largest panel count tried.
        largest_try: usize,
        /// Why the try at the target was refused, with where.
        why: String,
        /// What the user can do.
        advice: String,
    },
    /// A half model closed by a flat face parallel to its symmetry plane,
    /// off it by more than the cut tolerance: mirrored, a slot would run
    /// down the middle of the body.
    #[error(
        "symmetry plane: this half model is closed by a flat face of {area:.2} m^2 at y = {y:.4} m, \
         {y_mm:.1} mm off the symmetry plane y = 0 (up to {moved_mm:.1} mm is moved onto it): mirrored, it \
         would leave a slot {slot_mm:.1} mm wide down the middle of the body; move the cut onto y = 0 in \
         the modeller (a face lying on y = 0 is dropped, since the mirror image closes the cut)",
        y_mm = 1000.0 * y,
        moved_mm = 1000.0 * moved,
        slot_mm = 2000.0 * y
    )]
    CapOffSymmetryPlane {
        /// Where the flat face lies, metres.
        y: f64,
        /// Its area, m^2.
        area: f64,
        /// How far a cut is moved onto y = 0, metres.
        moved: f64,
    },
    /// Wrapping found no inside at all.
    #[error(
        "wrapping the surface into one outer surface found no inside: every part is thinner than the \
         wrap's cell of {cell_mm:.1} mm",
        cell_mm = 1000.0 * cell
    )]
    NothingInside {
        /// The wrap's cell edge, metres.
        cell: f64,
    },
}

/// [`MeshError::BelowGround`] in words. A body wholly below the plane
/// (a ground height typed in millimetres, 120 for 0.12) is said so: the
/// depth allowed for tyres, zero there, would only confuse.
fn below_ground_words(z: f64, ground: f64, allowed: f64, top: f64) -> String {
    if top <= ground {
        format!(
            "ground: the whole body, from z = {z:.4} to {top:.4} m, lies below the ground \
             plane z = {ground:.4} m (the ground's height is in metres, in tuft's axes, like the body's)"
        )
    } else {
        format!(
            "ground: the body reaches z = {z:.4} m, below the ground plane z = {ground:.4} m \
             (up to {:.0} mm below it is cut off at the ground, as tyres pressed into the floor are)",
            1000.0 * allowed
        )
    }
}
