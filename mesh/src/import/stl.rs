//! Streaming STL reader (binary and ASCII) with exact-duplicate welding.
//!
//! The file is classified from its first 84 bytes and its length before any
//! facet is trusted: a binary file must be exactly `84 + 50 n` bytes long for
//! the `n` its header declares (trailing bytes beyond that are tolerated and
//! reported; whole facets beyond a count that fell short are read, and so
//! are binary STLs joined after it), text must start with `solid` (every
//! `solid ... endsolid` block of a file that holds several parts is read). Facets are then streamed through
//! `stl_io` one at a time; corners with bit-identical coordinates are merged
//! on the fly with a hash map, so memory stays near the size of the indexed
//! mesh rather than of the file.

use std::fs::File;
use std::io::{BufRead, BufReader, Read, Seek, SeekFrom};
use std::path::Path;

use serde::Serialize;

use crate::fasthash::FastMap;
use crate::{MeshError, Point, TriMesh};

/// Length of the binary STL header plus facet count.
const HEADER: u64 = 84;
/// Bytes per binary facet: normal, three corners (12 `f32`), attribute (2).
const FACET: u64 = 50;

/// Which STL flavour the file was.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum StlFormat {
    /// Little-endian binary STL.
    Binary,
    /// ASCII STL (`solid ... endsolid`).
    Ascii,
}

/// What the reader found in the file.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct StlReport {
    /// Binary or ASCII.
    pub format: StlFormat,
    /// File length in bytes.
    pub bytes: u64,
    /// Facets read.
    pub facets: usize,
    /// Distinct corner positions (bit-identical coordinates merged).
    pub vertices: usize,
    /// Bytes after the last declared binary facet (ignored).
    pub trailing_bytes: u64,
    /// The binary header's facet count was 0 though the file holds whole
    /// facets after it (a writer that never filled the count in): the
    /// facets the file's length holds were read.
    #[serde(default)]
    pub count_missing: bool,
    /// The binary header's facet count when it was below the whole facets
    /// the file's length holds, and those were all read (a writer that
    /// counted wrong); `None` when the count was right (or 0, see
    /// [`Self::count_missing`]).
    pub count_short: Option<u64>,
    /// Solids read: `solid ... endsolid` blocks of an ASCII file (one per
    /// part, as many exporters write them), or binary STLs joined one after
    /// another in one file; 1 for a plain file.
    pub solids: usize,
    /// An ASCII file that ends after a whole facet without its closing
    /// `endsolid` line: the facets were read, but the export may have been
    /// cut short.
    pub endsolid_missing: bool,
}

/// Read an STL file in the file's own length unit (no scaling).
///
/// # Errors
/// [`MeshError::IsDirectory`], [`MeshError::Io`] and every error of
/// [`read_stl_from`].
pub fn read_stl(path: &Path) -> Result<(TriMesh, StlReport), MeshError> {
    let meta = std::fs::metadata(path).map_err(|source| MeshError::Io { source })?;
    if meta.is_dir() {
        return Err(MeshError::IsDirectory);
    }
    let file = File::open(path).map_err(|source| MeshError::Io { source })?;
    read_stl_from(file)
}

/// Read STL from any seekable source.
///
/// # Errors
/// [`MeshError::EmptyFile`], [`MeshError::TooShort`], [`MeshError::NotStl`],
/// [`MeshError::FacetCountMismatch`] before any facet is read;
/// [`MeshError::BadFacet`] (with the facet index) for a truncated file or a
/// malformed number; [`MeshError::NonFiniteCorner`]; [`MeshError::NoFacets`].
pub fn read_stl_from<R: Read + Seek>(mut reader: R) -> Result<(TriMesh, StlReport), MeshError> {
    let io = |source| MeshError::Io { source };
    let bytes = reader.seek(SeekFrom::End(0)).map_err(io)?;
    reader.seek(SeekFrom::Start(0)).map_err(io)?;
    let mut head = Vec::with_capacity(HEADER as usize);
    (&mut reader)
        .take(HEADER)
        .read_to_end(&mut head)
        .map_err(io)?;
    let kind = classify(&head, bytes)?;
    let whole_facets = bytes > HEADER && (bytes - HEADER).is_multiple_of(FACET);
    let count_missing = matches!(kind, Kind::Binary { declared: 0 }) && whole_facets;
    let (mut patched, format, declared, mut count_short) = match kind {
        Kind::Binary { declared } => {
            // Binary STLs joined one after another (`cat a.stl b.stl`): each
            // one's header is skipped and every facet read.
            let joined = joined_binaries(&mut reader, declared, bytes).map_err(io)?;
            let read_all = !count_missing && joined.is_none() && whole_facets;
            let (n, count_short, gaps) = match joined {
                Some((total, gaps)) => (total, None, gaps),
                // A count of 0, or one short of the whole facets the length
                // holds: read what the length holds (a short count's extra
                // facets are checked below).
                None if count_missing => ((bytes - HEADER) / FACET, None, Vec::new()),
                None if read_all && HEADER + FACET * declared < bytes => {
                    ((bytes - HEADER) / FACET, Some(declared), Vec::new())
                }
                None => (declared, None, Vec::new()),
            };
            (
                binary_source(reader, n, gaps).map_err(io)?,
                StlFormat::Binary,
                Some(n),
                count_short,
            )
        }
        Kind::Ascii => {
            let (skip, solid_line) = first_line(&mut reader).map_err(io)?;
            let prefix = b"solid tuft\n".to_vec();
            (
                Patched::new(reader, prefix, skip, true, usize::from(solid_line)).map_err(io)?,
                StlFormat::Ascii,
                None,
                None,
            )
        }
    };
    let mut declared = declared;
    let mut mesh = match stream_facets(&mut patched, declared) {
        Err(MeshError::BadFacet { facet, reader, .. }) if format == StlFormat::Ascii => {
            let mut inner = patched.inner.into_inner();
            let found = inner
                .seek(SeekFrom::Start(0))
                .ok()
                .and_then(|_| first_bad_line(BufReader::new(inner)));
            let last_line = found.as_ref().is_some_and(|f| f.3);
            return Err(MeshError::BadFacet {
                facet,
                reader,
                line: found.map(|(n, text, want, _)| (n, text, want)),
                last_line,
            });
        }
        Err(e) if count_short.is_none() => return Err(e),
        other => other,
    };
    // The facets past a short count are taken only when they are facets of
    // this body (finite, not degenerate, within its reach); padding or
    // other data there stays trailing bytes, read no further.
    if let Some(n) = count_short
        && !mesh.as_ref().is_ok_and(|m| extra_facets_fit(m, n as usize))
    {
        let reader = patched.inner.into_inner();
        patched = binary_source(reader, n, Vec::new()).map_err(io)?;
        declared = Some(n);
        count_short = None;
        mesh = stream_facets(&mut patched, declared);
    }
    let mesh = mesh?;
    if mesh.is_empty() {
        return Err(MeshError::NoFacets);
    }
    let headers = HEADER * patched.solids as u64;
    let trailing_bytes = declared.map_or(0, |n| bytes.saturating_sub(headers + FACET * n));
    let report = StlReport {
        format,
        bytes,
        facets: mesh.len(),
        vertices: mesh.vertices.len(),
        trailing_bytes,
        count_missing,
        count_short,
        solids: patched.solids,
        endsolid_missing: patched.endsolid_missing,
    };
    Ok((mesh, report))
}

/// A binary STL's facets as `stl_io` reads them: a header giving `n`
/// facets, then the file's facets from byte 84 with the byte ranges
/// `gaps` left out (the headers of STLs joined after the first).
fn binary_source<R: Read + Seek>(
    reader: R,
    n: u64,
    gaps: Vec<(u64, u64)>,
) -> std::io::Result<Patched<R>> {
    let mut prefix = vec![0; 80];
    prefix.extend_from_slice(&u32::try_from(n).unwrap_or(u32::MAX).to_le_bytes());
    let mut patched = Patched::new(reader, prefix, HEADER, false, 1 + gaps.len())?;
    patched.gaps = gaps;
    Ok(patched)
}

/// Whether the facets of `mesh` after the first `n` read as facets of the
/// same body: every one has area (zero padding has none), and every corner
/// lies within the first facets' bounding box grown by a thousand times its
/// diagonal (the first `n` may be a small patch of the body, but bytes that
/// are not facets read as floats of any size: nine of them land that close
/// about once in two hundred).
fn extra_facets_fit(mesh: &TriMesh, n: usize) -> bool {
    let (first, extra) = mesh.triangles.split_at(n.min(mesh.triangles.len()));
    let corners = |tris: &[[u32; 3]]| -> Vec<Point> {
        tris.iter()
            .flat_map(|t| t.map(|v| mesh.vertices[v as usize]))
            .collect()
    };
    let seen = corners(first);
    let Some(p0) = seen.first() else {
        return false;
    };
    let (lo, hi) = seen
        .iter()
        .fold((*p0, *p0), |(lo, hi), p| (lo.inf(p), hi.sup(p)));
    let reach = 1000.0 * (hi - lo).norm();
    let inside = |p: &Point| (0..3).all(|k| p[k] >= lo[k] - reach && p[k] <= hi[k] + reach);
    extra.iter().all(|t| {
        let [a, b, c] = t.map(|v| mesh.vertices[v as usize]);
        (b - a).cross(&(c - a)).norm() > 0.0 && [a, b, c].iter().all(inside)
    })
}

/// The keywords of one facet of an ASCII STL, in their order.
const FACET_LINES: [&str; 7] = [
    "facet", "outer", "vertex", "vertex", "vertex", "endloop", "endfacet",
];

/// The first line of an ASCII STL that does not read as one: an unknown
/// keyword, a `facet normal` or `vertex` line without three numbers, or a
/// keyword out of the facet's order (a missing `endloop`).
/// Its number (from 1), its text, shortened, the keyword that belongs
/// there when the line is one out of order, and whether it is the file's
/// last (the file then breaks off there: cut short); `None` when every
/// line reads.
fn first_bad_line<R: BufRead>(reader: R) -> Option<(usize, String, Option<&'static str>, bool)> {
    let numbers = |t: &[&str]| t.iter().all(|x| x.parse::<f32>().is_ok());
    let mut found: Option<(usize, String, Option<&'static str>)> = None;
    // Where in a facet's lines the next line falls.
    let mut next = 0;
    for (k, line) in reader.split(b'\n').enumerate() {
        let line = String::from_utf8_lossy(&line.ok()?).trim().to_owned();
        if found.is_some() {
            if line.is_empty() {
                continue;
            }
            return found.map(|(n, text, want)| (n, text, want, false));
        }
        let lower = line.to_ascii_lowercase();
        let t: Vec<&str> = lower.split_whitespace().collect();
        let fine = match t.as_slice() {
            [] => true,
            ["solid" | "endsolid", ..] => next == 0,
            ["outer", "loop"] | ["endloop" | "endfacet"] => true,
            ["facet", "normal", rest @ ..] | ["vertex", rest @ ..] => {
                rest.len() == 3 && numbers(rest)
            }
            _ => false,
        };
        let keyword = t.first().copied().unwrap_or("");
        let want = FACET_LINES[next];
        let in_order = matches!(keyword, "" | "solid" | "endsolid") || keyword == want;
        if !fine || !in_order {
            let shown: String = line.chars().take(60).collect();
            let more = if shown.len() < line.len() { "..." } else { "" };
            // What belongs there when the line holds another keyword (one
            // missing or out of order, or misspelt: `endlop`, `vertx`).
            found = Some((k + 1, format!("{shown}{more}"), (!in_order).then_some(want)));
        } else if !matches!(keyword, "" | "solid" | "endsolid") {
            next = (next + 1) % FACET_LINES.len();
        }
    }
    // The bad line was the file's last.
    found.map(|(n, text, want)| (n, text, want, true))
}

/// The flavour decided from the first bytes and the length.
enum Kind {
    Binary { declared: u64 },
    Ascii,
}

fn classify(head: &[u8], bytes: u64) -> Result<Kind, MeshError> {
    if bytes == 0 {
        return Err(MeshError::EmptyFile);
    }
    let printable = head
        .iter()
        .all(|&b| b.is_ascii_graphic() || b.is_ascii_whitespace());
    // Keywords in capitals (`SOLID`, `FACET`) are read too, as some
    // exporters write them, but only from a head that is text. A binary
    // header may start "solid" or "SOLID" too (many writers put the part's
    // name there), but its facet count holds bytes no text has.
    let control = head.iter().any(|&b| b < 0x20 && !b.is_ascii_whitespace());
    let text_start = String::from_utf8_lossy(head);
    let looks_ascii = !control
        && (text_start.trim_start().starts_with("solid")
            || (printable
                && text_start
                    .trim_start()
                    .to_ascii_lowercase()
                    .starts_with("solid")));
    // Another format's signature, unless the length says binary STL (whose
    // 80-byte header is free text and may start with anything).
    let exact = head.len() >= HEADER as usize && {
        let declared = u64::from(u32::from_le_bytes([head[80], head[81], head[82], head[83]]));
        HEADER + FACET * declared == bytes
    };
    if !looks_ascii
        && !exact
        && let Some(what) = other_format(head)
    {
        return Err(MeshError::OtherFormat { what });
    }
    if head.len() < HEADER as usize {
        return if looks_ascii {
            Ok(Kind::Ascii)
        } else {
            Err(MeshError::TooShort { bytes })
        };
    }
    let declared = u64::from(u32::from_le_bytes([head[80], head[81], head[82], head[83]]));
    let expected = HEADER + FACET * declared;
    if expected == bytes {
        return Ok(Kind::Binary { declared });
    }
    // A count left at 0 before whole facets, behind a header that is not
    // text (a streaming writer's, "solid" or not): binary, read to the
    // length.
    if declared == 0 && bytes > HEADER && (bytes - HEADER).is_multiple_of(FACET) && !printable {
        return Ok(Kind::Binary { declared });
    }
    if looks_ascii {
        return Ok(Kind::Ascii);
    }
    if printable {
        return Err(MeshError::NotStl);
    }
    if expected > bytes {
        return Err(MeshError::FacetCountMismatch {
            declared,
            expected,
            bytes,
            room: (bytes - HEADER) / FACET,
        });
    }
    Ok(Kind::Binary { declared })
}

/// The format a file's first bytes name, for those a studio's tools write
/// beside STL (or an image renamed by mistake): magic numbers for the
/// binary ones, the first keyword for the text ones.
fn other_format(head: &[u8]) -> Option<&'static str> {
    const MAGIC: [(&[u8], &str); 6] = [
        (b"\x89PNG\r\n\x1a\n", "a PNG image"),
        (b"\xff\xd8\xff", "a JPEG image"),
        (b"%PDF", "a PDF document"),
        (b"PK\x03\x04", "a ZIP archive (a 3MF model is one)"),
        (b"glTF", "a binary glTF model"),
        (b"ISO-10303-21", "a STEP file"),
    ];
    if let Some((_, what)) = MAGIC.iter().find(|(m, _)| head.starts_with(m)) {
        return Some(what);
    }
    let text = String::from_utf8_lossy(head);
    let first = text
        .lines()
        .map(str::trim)
        .find(|l| !l.is_empty() && !l.starts_with('#'))?;
    let word = first.split_whitespace().next()?;
    match word {
        "ply" => Some("a PLY mesh"),
        "v" | "vn" | "vt" | "o" | "g" | "f" | "mtllib" | "usemtl" => Some("a Wavefront OBJ mesh"),
        _ => None,
    }
}

/// Binary STLs joined in one file: the facets of all of them, and the byte
/// ranges of the headers after the first.
type Joined = (u64, Vec<(u64, u64)>);

/// When the bytes after a binary STL's `declared` facets are whole binary
/// STLs, one after another to the end of the file, each header giving the
/// facets that follow it: the facets of all of them and the byte ranges of
/// the headers after the first (to skip). `None` for anything else
/// (padding, a short count, a file that ends inside a facet).
fn joined_binaries<R: Read + Seek>(
    reader: &mut R,
    declared: u64,
    bytes: u64,
) -> std::io::Result<Option<Joined>> {
    let mut at = HEADER + FACET * declared;
    let (mut total, mut gaps) = (declared, Vec::new());
    while at + HEADER <= bytes {
        reader.seek(SeekFrom::Start(at + 80))?;
        let mut count = [0u8; 4];
        reader.read_exact(&mut count)?;
        let n = u64::from(u32::from_le_bytes(count));
        if n == 0 || at + HEADER + FACET * n > bytes {
            return Ok(None);
        }
        gaps.push((at, at + HEADER));
        total += n;
        at += HEADER + FACET * n;
    }
    Ok((at == bytes && !gaps.is_empty()).then_some((total, gaps)))
}

/// Length of the first line including its newline (at most 64 KiB looked
/// at), and whether it is the `solid` line (a file may open with blank
/// lines, its `solid` line then read later).
fn first_line<R: Read + Seek>(reader: &mut R) -> std::io::Result<(u64, bool)> {
    reader.seek(SeekFrom::Start(0))?;
    let mut line = Vec::new();
    BufReader::new(reader.by_ref().take(65_536)).read_until(b'\n', &mut line)?;
    let solid = line
        .trim_ascii_start()
        .to_ascii_lowercase()
        .starts_with(b"solid");
    Ok((line.len() as u64, solid))
}

/// The STL reader's complaint about a facet in a practitioner's words:
/// a number that is not finite, a file cut short, or a line that does not
/// read as ASCII STL; anything else is quoted.
pub fn plain_read_error(e: &std::io::Error) -> String {
    let said = e.to_string();
    let lower = said.to_lowercase();
    if lower.contains("nan") || lower.contains("inf") {
        "a coordinate is not a finite number (NaN or infinity)".into()
    } else if lower.contains("float") || lower.contains("number") {
        "a number in it is malformed".into()
    } else if e.kind() == std::io::ErrorKind::UnexpectedEof {
        "the file ends in the middle of it (cut short)".into()
    } else if ["vertex", "facet", "outer", "endloop", "endfacet", "normal"]
        .iter()
        .any(|w| lower.starts_with(w) || lower.contains(&format!("expected {w}")))
    {
        "a line of it does not read as ASCII STL (a number missing or malformed, or the file cut short)"
            .into()
    } else {
        format!("the STL reader reports \"{said}\"")
    }
}

/// Stream facets, weld bit-identical corners, check every coordinate.
fn stream_facets<R: Read + Seek>(
    source: &mut Patched<R>,
    declared: Option<u64>,
) -> Result<TriMesh, MeshError> {
    let facets = stl_io::create_stl_reader(source).map_err(|source| MeshError::BadFacet {
        facet: 0,
        reader: source,
        line: None,
        last_line: false,
    })?;
    let capacity = declared.map_or(1024, |n| n as usize);
    let mut vertices: Vec<Point> = Vec::with_capacity(capacity / 2 + 3);
    let mut triangles: Vec<[u32; 3]> = Vec::with_capacity(capacity);
    let mut index: FastMap<[u32; 3], u32> = FastMap::default();
    index.reserve(capacity / 2 + 3);
    for (facet, item) in facets.enumerate() {
        let tri = item.map_err(|source| MeshError::BadFacet {
            facet,
            reader: source,
            line: None,
            last_line: false,
        })?;
        let mut ids = [0u32; 3];
        for (corner, v) in tri.vertices.iter().enumerate() {
            if !v.0.iter().all(|c| c.is_finite()) {
                return Err(MeshError::NonFiniteCorner { facet, corner });
            }
            // +0.0 and -0.0 are the same coordinate but not the same bits.
            let key = v.0.map(|c| (c + 0.0).to_bits());
            let next = vertices.len() as u32;
            ids[corner] = *index.entry(key).or_insert_with(|| {
                let [x, y, z] = v.0.map(f64::from);
                vertices.push(Point::new(x, y, z));
                next
            });
        }
        triangles.push(ids);
    }
    Ok(TriMesh {
        vertices,
        triangles,
    })
}

/// A reader that serves `prefix` and then the inner reader from byte `skip`:
/// masks a binary header that happens to start with `solid` (and gives it
/// the facet count read), and gives an ASCII file a first line `stl_io`
/// accepts, its keywords in lower case (`lower`: `stl_io` reads only
/// those). Seeking supports only a rewind to the start, which is all
/// `stl_io` asks for.
struct Patched<R> {
    prefix: Vec<u8>,
    pos: usize,
    inner: BufReader<R>,
    skip: u64,
    lower: bool,
    /// Byte ranges of the inner reader to leave out (the headers of binary
    /// STLs joined after the first), in order, and the first not yet passed.
    gaps: Vec<(u64, u64)>,
    next_gap: usize,
    /// Where the inner reader stands, bytes from its start.
    at: u64,
    /// ASCII: the current line, as served, and how much of it is served.
    line: Vec<u8>,
    line_pos: usize,
    /// ASCII: an `endsolid` line was the last seen (only another `solid`
    /// may follow; anything else ends the file, as `stl_io` ends it).
    ended: bool,
    /// ASCII: the reading stopped (junk after the last `endsolid`).
    stopped: bool,
    /// ASCII: the last line served closed a facet (`endfacet`), or none was
    /// served: a place where the file may end.
    between_facets: bool,
    /// ASCII: the closing `endsolid` has been served.
    closed: bool,
    /// ASCII: the file ended after a whole facet without an `endsolid`,
    /// which was supplied.
    endsolid_missing: bool,
    /// Solids met: `solid` lines of an ASCII file, or the binary STLs
    /// joined in the file; and their number before any line is read.
    solids: usize,
    solids_at_start: usize,
}

impl<R: Read + Seek> Patched<R> {
    /// `solids`: the solids met before any line is read (see the field).
    fn new(
        mut inner: R,
        prefix: Vec<u8>,
        skip: u64,
        lower: bool,
        solids: usize,
    ) -> std::io::Result<Self> {
        inner.seek(SeekFrom::Start(skip))?;
        Ok(Self {
            prefix,
            pos: 0,
            inner: BufReader::with_capacity(1 << 16, inner),
            skip,
            lower,
            gaps: Vec::new(),
            next_gap: 0,
            at: skip,
            line: Vec::new(),
            line_pos: 0,
            ended: false,
            stopped: false,
            between_facets: true,
            closed: false,
            endsolid_missing: false,
            solids,
            solids_at_start: solids,
        })
    }

    /// ASCII: the next line to serve, in lower case, with the `solid` and
    /// `endsolid` lines between parts left out (each part's facets then
    /// read as one solid's) and one `endsolid` served at the end. A file
    /// whose writer left out the last `endsolid` reads too when it ends
    /// after a whole facet (`endsolid_missing` says so); one that ends
    /// inside a facet ends there, for the reader to call it cut short.
    /// `false` at the end.
    fn next_line(&mut self) -> std::io::Result<bool> {
        loop {
            self.line.clear();
            self.line_pos = 0;
            let read = if self.stopped {
                0
            } else {
                self.inner.read_until(b'\n', &mut self.line)?
            };
            if read == 0 {
                if self.closed || !(self.ended || self.between_facets) {
                    return Ok(false);
                }
                self.closed = true;
                self.endsolid_missing = !self.ended;
                self.line.clear();
                self.line.extend_from_slice(b"endsolid tuft\n");
                return Ok(true);
            }
            self.line.make_ascii_lowercase();
            // A last line without its newline still ends before what follows.
            if !self.line.ends_with(b"\n") {
                self.line.push(b'\n');
            }
            let text = self.line.trim_ascii();
            if text.is_empty() {
                continue;
            }
            if self.ended {
                if text.starts_with(b"solid") {
                    self.solids += 1;
                    self.ended = false;
                } else {
                    self.stopped = true;
                }
                continue;
            }
            if text.starts_with(b"endsolid") {
                self.ended = true;
                continue;
            }
            if text.starts_with(b"solid") {
                self.solids += 1;
                continue;
            }
            self.between_facets = text.starts_with(b"endfacet");
            return Ok(true);
        }
    }
}

impl<R: Read + Seek> Read for Patched<R> {
    fn read(&mut self, buf: &mut [u8]) -> std::io::Result<usize> {
        if self.pos < self.prefix.len() {
            let n = buf.len().min(self.prefix.len() - self.pos);
            buf[..n].copy_from_slice(&self.prefix[self.pos..self.pos + n]);
            self.pos += n;
            return Ok(n);
        }
        if self.lower {
            if self.line_pos == self.line.len() && !self.next_line()? {
                return Ok(0);
            }
            let n = buf.len().min(self.line.len() - self.line_pos);
            buf[..n].copy_from_slice(&self.line[self.line_pos..self.line_pos + n]);
            self.line_pos += n;
            return Ok(n);
        }
        let mut limit = buf.len();
        if let Some(&(start, end)) = self.gaps.get(self.next_gap) {
            if self.at >= start {
                self.inner.seek(SeekFrom::Start(end))?;
                self.at = end;
                self.next_gap += 1;
                return self.read(buf);
            }
            limit = limit.min(usize::try_from(start - self.at).unwrap_or(usize::MAX));
        }
        let n = self.inner.read(&mut buf[..limit])?;
        self.at += n as u64;
        Ok(n)
    }
}

impl<R: Read + Seek> Seek for Patched<R> {
    fn seek(&mut self, to: SeekFrom) -> std::io::Result<u64> {
        if to != SeekFrom::Start(0) {
            return Err(std::io::Error::new(
                std::io::ErrorKind::Unsupported,
                "only a rewind is supported",
            ));
        }
        self.pos = 0;
        self.inner.seek(SeekFrom::Start(self.skip))?;
        self.at = self.skip;
        self.next_gap = 0;
        self.line.clear();
        self.line_pos = 0;
        self.ended = false;
        self.stopped = false;
        self.between_facets = true;
        self.closed = false;
        self.endsolid_missing = false;
        self.solids = self.solids_at_start;
        Ok(0)
    }
}
