//! Each bad input gives one clear error, never a panic.
#![allow(clippy::unwrap_used, clippy::expect_used)]

mod common;

use tuft_mesh::import::{StlFormat, read_stl};
use tuft_mesh::{MeshError, generate};

fn err_of(bytes: &[u8]) -> MeshError {
    let dir = tempfile::tempdir().unwrap();
    let path = common::write(dir.path(), "bad.stl", bytes);
    read_stl(&path).expect_err("bad input must be refused")
}

#[test]
fn empty_file() {
    assert!(matches!(err_of(b""), MeshError::EmptyFile));
}

#[test]
fn header_only() {
    // 80-byte header and a facet count of zero: a valid but empty binary STL.
    let mut bytes = vec![0u8; 80];
    bytes.extend_from_slice(&0u32.to_le_bytes());
    assert!(matches!(err_of(&bytes), MeshError::NoFacets));
    // The 80-byte header alone, without the count.
    assert!(matches!(
        err_of(&[0u8; 80]),
        MeshError::TooShort { bytes: 80 }
    ));
}

#[test]
fn truncated_binary() {
    let mut bytes = common::binary_stl(&generate::icosphere(1.0, 1));
    bytes.truncate(bytes.len() - 30);
    let e = err_of(&bytes);
    // 80 facets declared, 79 whole facets and 20 bytes present.
    assert!(
        matches!(
            e,
            MeshError::FacetCountMismatch {
                declared: 80,
                room: 79,
                ..
            }
        ),
        "{e}"
    );
}

#[test]
fn facet_count_larger_than_file() {
    let mut bytes = common::binary_stl(&generate::icosphere(1.0, 0));
    bytes[80..84].copy_from_slice(&4_000_000_000u32.to_le_bytes());
    let e = err_of(&bytes);
    assert!(
        matches!(
            e,
            MeshError::FacetCountMismatch {
                declared: 4_000_000_000,
                room: 20,
                ..
            }
        ),
        "{e}"
    );
    assert!(e.to_string().contains("4000000000 facets"), "{e}");
}

#[test]
fn nan_and_infinite_coordinates() {
    for bad in [f32::NAN, f32::INFINITY, f32::NEG_INFINITY] {
        let mut bytes = common::binary_stl(&generate::icosphere(1.0, 0));
        // Facet 3, corner 1, y coordinate: 84 + 3*50 + 12 (normal) + 12 (corner 0) + 4.
        let at = 84 + 3 * 50 + 12 + 12 + 4;
        bytes[at..at + 4].copy_from_slice(&bad.to_le_bytes());
        let e = err_of(&bytes);
        assert!(
            matches!(
                e,
                MeshError::NonFiniteCorner {
                    facet: 3,
                    corner: 1
                }
            ),
            "{e}"
        );
    }
}

#[test]
fn text_that_is_not_stl() {
    let text = "This is a shopping list, not a surface.\n".repeat(10);
    assert!(matches!(err_of(text.as_bytes()), MeshError::NotStl));
    assert!(matches!(
        err_of(b"hello\n"),
        MeshError::TooShort { bytes: 6 }
    ));
}

#[test]
fn ascii_with_malformed_number() {
    let good = common::ascii_stl(&generate::icosphere(1.0, 0));
    // The first corner's x becomes "1.2.3e..." (two decimal points).
    let bad = good.replacen("vertex ", "vertex 1.2.3e", 1);
    let e = err_of(bad.as_bytes());
    assert!(matches!(e, MeshError::BadFacet { facet: 0, .. }), "{e}");
    // The message counts from 1, as a text editor does, and names the
    // line and what it holds.
    assert!(
        e.to_string()
            .starts_with("facet 1 (counting from 1) cannot be read: line 4 (`vertex 1.2.3e")
            && e.to_string().ends_with("`) does not read as ASCII STL"),
        "{e}"
    );
}

/// A keyword typed wrong in the middle of an ASCII file: the line and its
/// text are named (a review's `vertx` on line 501 had been "a line of it
/// does not read as ASCII STL", with no line).
#[test]
fn ascii_with_a_misspelt_keyword_names_its_line() {
    let good = common::ascii_stl(&generate::icosphere(1.0, 1));
    let at = good.match_indices("vertex ").nth(71 * 3 + 1).unwrap().0;
    let bad = format!("{}vertx{}", &good[..at], &good[at + 6..]);
    let line = bad[..at].matches('\n').count() + 1;
    let e = err_of(bad.as_bytes()).to_string();
    assert!(
        e.starts_with(&format!(
            "facet 72 (counting from 1) cannot be read: line {line} (`vertx"
        )) && e.contains("`vertex` belongs there"),
        "{e}"
    );
}

/// A line missing in the middle of an ASCII file (a facet without its
/// `endloop`): the line out of order is named with the keyword that
/// belongs there (a review had read the STL reader's own words, `expected
/// ["endloop"], got ["endfacet"]`, with no line).
#[test]
fn ascii_with_a_missing_line_names_where() {
    let good = common::ascii_stl(&generate::icosphere(1.0, 1));
    let at = good.match_indices("endloop").nth(40).unwrap().0;
    let end = at + good[at..].find('\n').unwrap() + 1;
    let line = good[..at].matches('\n').count() + 1;
    let bad = format!("{}{}", &good[..at], &good[end..]);
    let e = err_of(bad.as_bytes()).to_string();
    assert!(
        e.starts_with("facet 41 (counting from 1) cannot be read")
            && e.contains(&format!(
                "line {line} (`endfacet`) does not read as ASCII STL: `endloop` belongs there"
            )),
        "{e}"
    );
}

/// Keywords in capitals, as some exporters write them, read as in lower
/// case; a binary file whose header count was left at 0 reads the facets
/// its length holds, and says so.
#[test]
fn capital_keywords_and_a_missing_binary_count_read() {
    let sphere = generate::icosphere(1.0, 1);
    let dir = tempfile::tempdir().unwrap();
    let upper = common::ascii_stl(&sphere).to_uppercase();
    let (m, r) = read_stl(&common::write(dir.path(), "u.stl", upper.as_bytes())).unwrap();
    assert_eq!((r.format, r.facets), (StlFormat::Ascii, 80));
    let mut bytes = common::binary_stl(&sphere);
    bytes[80..84].copy_from_slice(&0u32.to_le_bytes());
    let (mb, rb) = read_stl(&common::write(dir.path(), "z.stl", &bytes)).unwrap();
    assert_eq!(
        (rb.format, rb.facets, rb.count_missing),
        (StlFormat::Binary, 80, true)
    );
    assert_eq!(m.triangles, mb.triangles);
    // The same behind a header starting "solid" (as streaming writers
    // put it), and one starting "SOLID" with bytes trailing the facets:
    // the header is not text, so the file is binary.
    bytes[..12].copy_from_slice(b"solid part  ");
    let (_, r) = read_stl(&common::write(dir.path(), "s.stl", &bytes)).unwrap();
    assert_eq!((r.format, r.facets), (StlFormat::Binary, 80));
    let mut bytes = common::binary_stl(&sphere);
    bytes[..12].copy_from_slice(b"SOLID PART  ");
    bytes.extend_from_slice(&[0u8; 7]);
    let (_, r) = read_stl(&common::write(dir.path(), "t.stl", &bytes)).unwrap();
    assert_eq!(
        (r.format, r.facets, r.trailing_bytes),
        (StlFormat::Binary, 80, 7)
    );
}

#[test]
fn ascii_with_a_nan_or_a_cut_line() {
    let good = common::ascii_stl(&generate::icosphere(1.0, 0));
    // The second facet's first corner gets a NaN coordinate.
    let at = good.match_indices("vertex ").nth(3).unwrap().0;
    let bad = format!("{}vertex nan{}", &good[..at], &good[at + 6..]);
    let e = err_of(bad.as_bytes()).to_string();
    assert!(e.contains("facet 2 (counting from 1)"), "{e}");
    assert!(e.contains("not a finite number (NaN or infinity)"), "{e}");
    // The file stops inside a vertex line.
    let cut = &good[..good.match_indices("vertex ").nth(4).unwrap().0 + 10];
    let e = err_of(cut.as_bytes()).to_string();
    assert!(
        e.contains("facet 2 (counting from 1) cannot be read"),
        "{e}"
    );
    assert!(!e.contains("f32"), "no reader's jargon: {e}");
}

#[test]
fn a_directory() {
    let dir = tempfile::tempdir().unwrap();
    assert!(matches!(read_stl(dir.path()), Err(MeshError::IsDirectory)));
}

#[test]
fn missing_file() {
    let dir = tempfile::tempdir().unwrap();
    assert!(matches!(
        read_stl(&dir.path().join("none.stl")),
        Err(MeshError::Io { .. })
    ));
}

#[test]
fn binary_and_ascii_read_the_same_mesh() {
    let sphere = generate::icosphere(1.0, 2);
    let dir = tempfile::tempdir().unwrap();
    let b = common::write(dir.path(), "b.stl", &common::binary_stl(&sphere));
    let a = common::write(dir.path(), "a.stl", common::ascii_stl(&sphere).as_bytes());
    let (mb, rb) = read_stl(&b).unwrap();
    let (ma, ra) = read_stl(&a).unwrap();
    assert_eq!(
        (rb.format, ra.format),
        (StlFormat::Binary, StlFormat::Ascii)
    );
    // Exact-duplicate welding recovers the indexed sphere: 20 * 4^2 facets,
    // 10 * 4^2 + 2 vertices (Euler: V = F/2 + 2 for a closed triangulated sphere).
    assert_eq!((rb.facets, rb.vertices), (320, 162));
    assert_eq!(mb.triangles, ma.triangles);
}

#[test]
fn binary_header_starting_with_solid_is_still_binary() {
    let sphere = generate::icosphere(1.0, 1);
    let mut bytes = common::binary_stl(&sphere);
    bytes[..12].copy_from_slice(b"solid part  ");
    let dir = tempfile::tempdir().unwrap();
    let (_, r) = read_stl(&common::write(dir.path(), "s.stl", &bytes)).unwrap();
    assert_eq!((r.format, r.facets), (StlFormat::Binary, 80));
}

#[test]
fn ascii_solid_without_name() {
    let text = common::ascii_stl(&generate::icosphere(1.0, 0)).replacen("solid test", "solid", 1);
    let dir = tempfile::tempdir().unwrap();
    let (_, r) = read_stl(&common::write(dir.path(), "n.stl", text.as_bytes())).unwrap();
    assert_eq!(r.facets, 20);
}

/// Parts written as separate solids, the way many exporters write an
/// assembly: every ASCII `solid ... endsolid` block is read (only the
/// first had been, silently), and so is a file whose writer left out the
/// last `endsolid`. Binary STLs joined with `cat` are read whole too, and
/// a binary count that falls short of the facets the length holds reads
/// them all, saying so.
#[test]
fn every_part_of_a_multi_part_file_is_read() {
    let dir = tempfile::tempdir().unwrap();
    let a = generate::icosphere(1.0, 1);
    let mut b = generate::icosphere(0.5, 0);
    for v in &mut b.vertices {
        v.x += 5.0;
    }
    // ASCII: two solids, and the same without its closing line.
    let two = common::ascii_stl(&a) + &common::ascii_stl(&b).replace("solid test", "solid wheel");
    let (m, r) = read_stl(&common::write(dir.path(), "two.stl", two.as_bytes())).unwrap();
    assert_eq!((r.format, r.facets, r.solids), (StlFormat::Ascii, 100, 2));
    assert!(m.vertices.iter().any(|v| v.x > 4.0));
    let open = two
        .trim_end()
        .trim_end_matches("endsolid wheel")
        .trim_end_matches("endsolid");
    let (_, r) = read_stl(&common::write(dir.path(), "open.stl", open.as_bytes())).unwrap();
    assert_eq!((r.facets, r.solids), (100, 2));
    // Binary: two files joined, their meshes the same as the ASCII's.
    let mut joined = common::binary_stl(&a);
    joined.extend_from_slice(&common::binary_stl(&b));
    let (mb, r) = read_stl(&common::write(dir.path(), "cat.stl", &joined)).unwrap();
    assert_eq!(
        (r.format, r.facets, r.solids, r.trailing_bytes),
        (StlFormat::Binary, 100, 2, 0)
    );
    assert_eq!(m.triangles, mb.triangles);
    // A count of 30 before 80 facets: all 80 read, the short count kept.
    let mut short = common::binary_stl(&a);
    short[80..84].copy_from_slice(&30u32.to_le_bytes());
    let (_, r) = read_stl(&common::write(dir.path(), "short.stl", &short)).unwrap();
    assert_eq!((r.facets, r.count_short, r.solids), (80, Some(30), 1));
    // Padding that is no STL stays trailing bytes.
    let mut padded = common::binary_stl(&a);
    padded.extend_from_slice(&[0u8; 130]);
    let (_, r) = read_stl(&common::write(dir.path(), "pad.stl", &padded)).unwrap();
    assert_eq!((r.facets, r.trailing_bytes, r.solids), (80, 130, 1));
}

/// The ends of an ASCII file: one cut after a whole facet reads, and says
/// its `endsolid` is missing; one cut inside a facet is refused as cut
/// short; junk after the last `endsolid` is left unread (as it always
/// was); blank lines before `solid` count no extra part. A binary header
/// starting "solid" (many writers put the part's name there) joins and
/// short counts read as with any header; a short count before padding,
/// or before facets that are not this body's, reads only the facets
/// counted.
#[test]
fn file_ends_and_binary_headers_read_as_they_should() {
    let dir = tempfile::tempdir().unwrap();
    let a = generate::icosphere(1.0, 1);
    let text = common::ascii_stl(&a);
    let body = text.trim_end().trim_end_matches("endsolid test").trim_end();
    let (_, r) = read_stl(&common::write(dir.path(), "noend.stl", body.as_bytes())).unwrap();
    assert_eq!((r.facets, r.endsolid_missing, r.solids), (80, true, 1));
    let (_, r) = read_stl(&common::write(dir.path(), "end.stl", text.as_bytes())).unwrap();
    assert_eq!((r.facets, r.endsolid_missing), (80, false));
    // Cut inside the last facet, after a vertex line.
    let cut = &body[..body.rfind("endloop").unwrap()];
    let e = read_stl(&common::write(dir.path(), "cut.stl", cut.as_bytes())).unwrap_err();
    assert!(
        matches!(e, MeshError::BadFacet { .. }) && e.to_string().contains("cut short"),
        "{e}"
    );
    // Cut in the middle of a line: that line, the file's last, is named
    // as where it breaks off.
    let mid = &body[..body.rfind("vertex").unwrap() + 3];
    let e = read_stl(&common::write(dir.path(), "mid.stl", mid.as_bytes())).unwrap_err();
    let said = e.to_string();
    assert!(
        said.contains("(`ver`), the file's last, breaks off") && said.contains("cut short"),
        "{said}"
    );
    // Cut at a facet's end with a third of the facets gone: the repair's
    // hole is put down to the missing end, not to the model.
    let lines: Vec<&str> = body.lines().collect();
    let kept = lines[..1 + 7 * 53].join("\n");
    let path = common::write(dir.path(), "short.stl", kept.as_bytes());
    let e = tuft_mesh::prepare::prepare(&path, &tuft_mesh::prepare::PrepareParams::default())
        .unwrap_err();
    let said = e.to_string();
    assert!(
        matches!(e, MeshError::CutShort { facets: 53, .. })
            && said.starts_with(
                "the ASCII STL ends after facet 53 without its closing endsolid line, so it was \
                 most likely cut short"
            )
            && said.contains("the repair found 1 open hole"),
        "{said}"
    );
    let junk = format!("{text}\u{1a}exported by a tool\n");
    let (_, r) = read_stl(&common::write(dir.path(), "junk.stl", junk.as_bytes())).unwrap();
    assert_eq!((r.facets, r.solids), (80, 1));
    let blank = format!("\n\n{text}");
    let (_, r) = read_stl(&common::write(dir.path(), "blank.stl", blank.as_bytes())).unwrap();
    assert_eq!((r.facets, r.solids), (80, 1));

    let named = |mesh: &tuft_mesh::TriMesh| {
        let mut b = common::binary_stl(mesh);
        b[..12].copy_from_slice(b"solid part  ");
        b
    };
    let mut small = generate::icosphere(0.5, 0);
    for v in &mut small.vertices {
        v.x += 5.0;
    }
    let mut joined = named(&a);
    joined.extend_from_slice(&named(&small));
    let (_, r) = read_stl(&common::write(dir.path(), "cat.stl", &joined)).unwrap();
    assert_eq!((r.format, r.facets, r.solids), (StlFormat::Binary, 100, 2));
    let mut short = named(&a);
    short[80..84].copy_from_slice(&30u32.to_le_bytes());
    let (_, r) = read_stl(&common::write(dir.path(), "short.stl", &short)).unwrap();
    assert_eq!((r.facets, r.count_short), (80, Some(30)));
    // Zero padding of whole facets, and facets far from the body.
    let mut padded = common::binary_stl(&a);
    padded.extend_from_slice(&[0u8; 200]);
    let (_, r) = read_stl(&common::write(dir.path(), "pad.stl", &padded)).unwrap();
    assert_eq!((r.facets, r.count_short, r.trailing_bytes), (80, None, 200));
    let mut far = generate::icosphere(1.0, 0);
    for v in &mut far.vertices {
        v.x += 1.0e6;
    }
    let mut other = common::binary_stl(&a);
    other.extend_from_slice(&common::binary_stl(&far)[84..]);
    let (_, r) = read_stl(&common::write(dir.path(), "far.stl", &other)).unwrap();
    assert_eq!(
        (r.facets, r.count_short, r.trailing_bytes),
        (80, None, 1000)
    );
}

/// Files of other formats are named as such (a review's PNG renamed
/// `.stl` had read as a truncated binary STL declaring 68 million facets,
/// and an OBJ as too short for a binary STL).
#[test]
fn other_formats_are_named() {
    let mut png = b"\x89PNG\r\n\x1a\n".to_vec();
    png.extend_from_slice(&[7u8; 400]);
    let obj = "# exported\nmtllib car.mtl\nv 0 0 0\nv 1 0 0\nv 0 1 0\nf 1 2 3\n";
    let ply = "ply\nformat ascii 1.0\nelement vertex 3\n".repeat(4);
    for (bytes, what) in [
        (png, "a PNG image"),
        (obj.as_bytes().to_vec(), "a Wavefront OBJ mesh"),
        (ply.into_bytes(), "a PLY mesh"),
        (b"PK\x03\x04rest of a 3mf".to_vec(), "a ZIP archive"),
    ] {
        let e = err_of(&bytes);
        assert!(
            matches!(e, MeshError::OtherFormat { .. })
                && e.to_string().starts_with(&format!("it is {what}")),
            "{what}: {e}"
        );
    }
    // A binary STL whose free-text header starts like a PNG is still read.
    let mut stl = common::binary_stl(&generate::icosphere(1.0, 1));
    stl[..8].copy_from_slice(b"\x89PNG\r\n\x1a\n");
    let dir = tempfile::tempdir().unwrap();
    let path = common::write(dir.path(), "odd-header.stl", &stl);
    assert!(read_stl(&path).is_ok());
}
