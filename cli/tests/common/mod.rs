//! Helpers shared by the end-to-end tests of the `tuft` binary: run it in a
//! folder, copy a ready-made case (and the STL it names) out of `cases/`,
//! and read results back with independent readers.
#![allow(dead_code, clippy::unwrap_used, clippy::expect_used)]

use std::path::{Path, PathBuf};
use std::process::Command;

/// The binary under test, as Cargo built it for these tests.
pub const TUFT: &str = env!("CARGO_BIN_EXE_tuft");

/// The force and moment coefficients every `summary.json` carries under
/// `coefficients`.
pub const COEFFICIENTS: [&str; 6] = [
    "lift",
    "drag",
    "drag_friction",
    "drag_pressure",
    "side",
    "pitch",
];

/// What one run of the binary did.
pub struct Output {
    /// Exit code.
    pub code: i32,
    /// Standard output.
    pub stdout: String,
    /// Standard error.
    pub stderr: String,
}

/// Run `tuft ARGS` with `dir` as the working folder.
pub fn tuft(dir: &Path, args: &[&str]) -> Output {
    let out = Command::new(TUFT)
        .args(args)
        .current_dir(dir)
        .output()
        .expect("the tuft binary runs");
    Output {
        code: out
            .status
            .code()
            .expect("tuft exits normally, not by a signal"),
        stdout: String::from_utf8(out.stdout).expect("stdout is UTF-8"),
        stderr: String::from_utf8(out.stderr).expect("stderr is UTF-8"),
    }
}

/// The repository's `cases/` folder.
pub fn cases_dir() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("../cases")
}

/// Copy `cases/NAME.toml` and the STL it names (if any) into `dir`;
/// returns the file name of the copied case.
pub fn copy_case(name: &str, dir: &Path) -> String {
    let file = format!("{name}.toml");
    let src = cases_dir().join(&file);
    let text = std::fs::read_to_string(&src).expect("the case file exists");
    std::fs::write(dir.join(&file), &text).unwrap();
    let case: toml::Table = toml::from_str(&text).expect("the case file is TOML");
    if let Some(stl) = case["geometry"].get("stl").and_then(|s| s.as_str()) {
        std::fs::copy(cases_dir().join(stl), dir.join(stl)).expect("the case's STL exists");
    }
    file
}

/// Names of the entries of a folder, sorted.
pub fn entries(dir: &Path) -> Vec<String> {
    let mut names: Vec<String> = std::fs::read_dir(dir)
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
        .collect();
    names.sort();
    names
}

/// Decoded 8-bit PNG: width, height, channels and pixel bytes.
pub struct Picture {
    /// Width in pixels.
    pub width: u32,
    /// Height in pixels.
    pub height: u32,
    /// Bytes per pixel.
    pub channels: usize,
    /// Pixel bytes, row by row.
    pub pixels: Vec<u8>,
}

/// Decode a PNG with the `png` crate.
pub fn read_png(bytes: &[u8]) -> Picture {
    let decoder = png::Decoder::new(std::io::Cursor::new(bytes));
    let mut reader = decoder.read_info().expect("a PNG header");
    let mut buf = vec![0; reader.output_buffer_size().expect("a sane picture size")];
    let info = reader.next_frame(&mut buf).expect("PNG pixels decode");
    assert_eq!(info.bit_depth, png::BitDepth::Eight, "8-bit pictures");
    buf.truncate(info.buffer_size());
    Picture {
        width: info.width,
        height: info.height,
        channels: info.color_type.samples(),
        pixels: buf,
    }
}

impl Picture {
    /// Number of distinct colours (alpha ignored).
    pub fn colours(&self) -> usize {
        let mut seen: Vec<[u8; 3]> = self
            .pixels
            .chunks(self.channels)
            .map(|p| [p[0], p[1 % p.len()], p[2 % p.len()]])
            .collect();
        seen.sort_unstable();
        seen.dedup();
        seen.len()
    }

    /// Fraction of pixels that differ from the top-left (background) pixel.
    pub fn drawn_fraction(&self) -> f64 {
        let bg = &self.pixels[..self.channels];
        let n = self.pixels.len() / self.channels;
        let drawn = self
            .pixels
            .chunks(self.channels)
            .filter(|p| p != &bg)
            .count();
        drawn as f64 / n as f64
    }

    /// Fraction of clearly coloured (not grey) pixels: the largest and
    /// smallest of R, G and B differ by more than 60 of 255.
    pub fn coloured_fraction(&self) -> f64 {
        let n = self.pixels.len() / self.channels;
        let coloured = self
            .pixels
            .chunks(self.channels)
            .filter(|p| {
                let rgb = &p[..3.min(p.len())];
                rgb.iter().max().unwrap() - rgb.iter().min().unwrap() > 60
            })
            .count();
        coloured as f64 / n as f64
    }
}

/// Run a Python script with VTK's own XML readers (the `vtk` package, an
/// implementation independent of ours) on `arg`; its stdout as lines of
/// whitespace-separated words. Fails, rather than skips, when `python3` or
/// `vtk` is missing (`pip install vtk`; CI installs it).
pub fn vtk_read(script: &str, arg: &Path) -> Vec<Vec<String>> {
    let prelude = "import sys, math\nfrom vtkmodules import vtkIOXML\n";
    let out = Command::new("python3")
        .arg("-c")
        .arg(format!("{prelude}{script}"))
        .arg(arg)
        .output()
        .expect("python3 is needed to read VTK files back (pip install vtk)");
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert!(out.status.success(), "the VTK reader failed: {stderr}");
    assert!(!stderr.contains("ERROR"), "VTK reported: {stderr}");
    String::from_utf8(out.stdout)
        .unwrap()
        .lines()
        .map(|l| l.split_whitespace().map(str::to_owned).collect())
        .collect()
}

/// Run the binary in `dir` with `args` and its stdout closed before it
/// prints (a reader that stopped, as `| head` does); asserts it did not
/// panic, and gives its exit code and stderr.
pub fn with_closed_stdout(dir: &Path, args: &[&str]) -> (Option<i32>, String) {
    let mut child = Command::new(TUFT)
        .current_dir(dir)
        .args(args)
        .stdout(std::process::Stdio::piped())
        .stderr(std::process::Stdio::piped())
        .spawn()
        .unwrap();
    drop(child.stdout.take());
    let out = child.wait_with_output().unwrap();
    let stderr = String::from_utf8_lossy(&out.stderr).into_owned();
    assert!(!stderr.contains("panicked"), "{args:?}: {stderr}");
    (out.status.code(), stderr)
}
