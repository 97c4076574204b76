//! Streaming STL reader (binary and ASCII) with exact-duplicate welding.
//!
//! The file is classified from its first 84 bytes and its length before any
//! facet is trusted: a binary file must be exactly `84 + 50 n` bytes long for
//! the `n` its header declares (trailing bytes beyond that are tolerated and
//! reported), text must start with `solid`. Facets are then streamed through
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
    let count_missing = matches!(kind, Kind::Binary { declared: 0 })
        && bytes > HEADER
        && (bytes - HEADER).is_multiple_of(FACET);
    let (mut patched, format, declared) = match kind {
        Kind::Binary { declared } => {
            // A count of 0 before whole facets: read what the length holds.
            let declared = if count_missing {
                (bytes - HEADER) / FACET
            } else {
                declared
            };
            let mut prefix = vec![0; 80];
            prefix.extend_from_slice(&u32::try_from(declared).unwrap_or(u32::MAX).to_le_bytes());
            (
                Patched::new(reader, prefix, HEADER, false).map_err(io)?,
                StlFormat::Binary,
                Some(declared),
            )
        }
        Kind::Ascii => {
            let skip = first_line_length(&mut reader).map_err(io)?;
            let prefix = b"solid tuft\n".to_vec();
            (
                Patched::new(reader, prefix, skip, true).map_err(io)?,
                StlFormat::Ascii,
                None,
            )
        }
    };
    let mesh = match stream_facets(&mut patched, declared) {
        Err(MeshError::BadFacet { facet, reader, .. }) if format == StlFormat::Ascii => {
            let mut inner = patched.inner.into_inner();
            let line = inner
                .seek(SeekFrom::Start(0))
                .ok()
                .and_then(|_| first_bad_line(BufReader::new(inner)));
            return Err(MeshError::BadFacet {
                facet,
                reader,
                line,
            });
        }
        other => other?,
    };
    if mesh.is_empty() {
        return Err(MeshError::NoFacets);
    }
    let trailing_bytes = declared.map_or(0, |n| bytes - HEADER - FACET * n);
    let report = StlReport {
        format,
        bytes,
        facets: mesh.len(),
        vertices: mesh.vertices.len(),
        trailing_bytes,
        count_missing,
    };
    Ok((mesh, report))
}

/// The first line of an ASCII STL that does not read as one: an unknown
/// keyword, or a `facet normal` or `vertex` line without three numbers.
/// Its number (from 1) and its text, shortened; `None` when every line
/// reads, or when the first that does not is a `vertex` or `facet` line
/// the file ends in (cut short: the reader's own words say so).
fn first_bad_line<R: BufRead>(reader: R) -> Option<(usize, String)> {
    let numbers = |t: &[&str]| t.iter().all(|x| x.parse::<f32>().is_ok());
    let mut found: Option<(usize, String, bool)> = None;
    for (k, line) in reader.split(b'\n').enumerate() {
        let line = String::from_utf8_lossy(&line.ok()?).trim().to_owned();
        if found.is_some() {
            if line.is_empty() {
                continue;
            }
            return found.map(|(n, text, _)| (n, text));
        }
        let lower = line.to_ascii_lowercase();
        let t: Vec<&str> = lower.split_whitespace().collect();
        let (fine, numbered) = match t.as_slice() {
            [] | ["solid" | "endsolid", ..] | ["outer", "loop"] | ["endloop" | "endfacet"] => {
                (true, false)
            }
            ["facet", "normal", rest @ ..] | ["vertex", rest @ ..] => {
                (rest.len() == 3 && numbers(rest), true)
            }
            _ => (false, false),
        };
        if !fine {
            let shown: String = line.chars().take(60).collect();
            let more = if shown.len() < line.len() { "..." } else { "" };
            found = Some((k + 1, format!("{shown}{more}"), numbered));
        }
    }
    // The bad line was the file's last.
    found
        .filter(|(_, _, numbered)| !numbered)
        .map(|(n, text, _)| (n, text))
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
    // exporters write them, but only from a head that is text: a binary
    // header may start "SOLID" too.
    let text_start = String::from_utf8_lossy(head);
    let looks_ascii = text_start.trim_start().starts_with("solid")
        || (printable
            && text_start
                .trim_start()
                .to_ascii_lowercase()
                .starts_with("solid"));
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

/// Length of the first line including its newline (at most 64 KiB looked at).
fn first_line_length<R: Read + Seek>(reader: &mut R) -> std::io::Result<u64> {
    reader.seek(SeekFrom::Start(0))?;
    let mut line = Vec::new();
    BufReader::new(reader.by_ref().take(65_536)).read_until(b'\n', &mut line)?;
    Ok(line.len() as u64)
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
}

impl<R: Read + Seek> Patched<R> {
    fn new(mut inner: R, prefix: Vec<u8>, skip: u64, lower: bool) -> std::io::Result<Self> {
        inner.seek(SeekFrom::Start(skip))?;
        Ok(Self {
            prefix,
            pos: 0,
            inner: BufReader::with_capacity(1 << 16, inner),
            skip,
            lower,
        })
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
        let n = self.inner.read(buf)?;
        if self.lower {
            buf[..n].make_ascii_lowercase();
        }
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
        Ok(0)
    }
}
