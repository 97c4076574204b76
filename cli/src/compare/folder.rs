//! Reading a finished result folder back: `summary.json`, `panels.csv` and
//! `mesh.json`.

use std::path::{Path, PathBuf};

use anyhow::{Context, Result, bail};
use nalgebra::{Point3, Vector3};
use tuft_mesh::PanelMesh;

use crate::output::{PanelState, SurfaceResult};
use crate::summary::Summary;

/// One row of `panels.csv`, the columns `compare` uses.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PanelRow {
    /// Centroid, m.
    pub centroid: Point3<f64>,
    /// Outward unit normal.
    pub normal: Vector3<f64>,
    /// Area, m^2.
    pub area: f64,
    /// Pressure coefficient (attached potential flow).
    pub cp: f64,
    /// Boundary-layer state.
    pub state: PanelState,
    /// Separation risk, 0..1.
    pub risk: f64,
}

/// A finished run read back from its folder.
pub struct ResultFolder {
    /// The folder.
    pub path: PathBuf,
    /// Its summary.
    pub summary: Summary,
    /// Its panels, in file order.
    pub panels: Vec<PanelRow>,
}

impl ResultFolder {
    /// Read `summary.json` and `panels.csv` from `path`.
    pub fn read(path: &Path) -> Result<Self> {
        if !path.exists() {
            bail!("{}: no such folder", path.display());
        }
        if !path.is_dir() {
            bail!("{}: is a file, not a result folder", path.display());
        }
        if !path.join("summary.json").exists() {
            if path.join(crate::sweep::PLAN_FILE).is_file() {
                bail!(
                    "{}: is a sweep's folder, not one run's result: compare two of its variants \
                     (its subfolders), or rank them all with tuft collect",
                    path.display()
                );
            }
            if path.join("compare.json").is_file() {
                bail!(
                    "{}: is a comparison, not a run's result: compare the run folders it compared",
                    path.display()
                );
            }
        }
        let summary = read_summary(path)?;
        let csv = path.join("panels.csv");
        let text = std::fs::read_to_string(&csv)
            .with_context(|| format!("{}: cannot read", csv.display()))?;
        let panels = parse_panels(&text).with_context(|| csv.display().to_string())?;
        if panels.len() != summary.mesh.panels {
            bail!(
                "{}: {} panel rows but summary.json says {} panels",
                csv.display(),
                panels.len(),
                summary.mesh.panels
            );
        }
        Ok(Self {
            path: path.to_path_buf(),
            summary,
            panels,
        })
    }

    /// The panel mesh of the run (`mesh.json`), checked against the table.
    pub fn mesh(&self) -> Result<PanelMesh> {
        let file = self.path.join(crate::meshfile::FILE);
        if !file.exists() {
            bail!(
                "{}: missing; the run was made by an older tuft: run it again to draw pictures from it",
                file.display()
            );
        }
        let mesh = crate::meshfile::read(&file)?;
        if mesh.len() != self.panels.len() {
            bail!(
                "{}: {} panels but panels.csv has {}",
                file.display(),
                mesh.len(),
                self.panels.len()
            );
        }
        Ok(mesh)
    }

    /// True when the run used a symmetry plane (areas count twice).
    pub fn halves(&self) -> f64 {
        if self.summary.mesh.symmetry_plane {
            2.0
        } else {
            1.0
        }
    }

    /// The named regions of the run's case (none when it names none or
    /// they cannot be read back).
    pub fn regions(&self) -> Vec<crate::region::RegionSection> {
        self.summary
            .case
            .get("region")
            .and_then(|r| serde_json::from_value(r.clone()).ok())
            .unwrap_or_default()
    }

    /// Folder name, for captions.
    pub fn label(&self) -> String {
        self.path.file_name().map_or_else(
            || self.summary.case_name.clone(),
            |s| s.to_string_lossy().into_owned(),
        )
    }
}

/// A result folder's panel values in the picture writers' shape: Cp,
/// state and risk as read, no velocity nor boundary-layer values (the
/// pictures drawn from a folder use none).
pub struct PanelFields {
    cp: Vec<f64>,
    zeros: Vec<f64>,
    velocity: Vec<Vector3<f64>>,
    state: Vec<PanelState>,
    risk: Vec<f64>,
}

impl PanelFields {
    /// The values of `r`'s panels.
    pub fn new(r: &ResultFolder) -> Self {
        let n = r.panels.len();
        Self {
            cp: r.panels.iter().map(|p| p.cp).collect(),
            zeros: vec![0.0; n],
            velocity: vec![Vector3::zeros(); n],
            state: r.panels.iter().map(|p| p.state).collect(),
            risk: r.panels.iter().map(|p| p.risk).collect(),
        }
    }

    /// Each panel's state.
    pub fn state(&self) -> &[PanelState] {
        &self.state
    }

    /// The values on `mesh` (the folder's, [`ResultFolder::mesh`]).
    pub fn surface<'a>(&'a self, mesh: &'a PanelMesh) -> SurfaceResult<'a> {
        SurfaceResult {
            mesh,
            cp: &self.cp,
            velocity: &self.velocity,
            theta: &self.zeros,
            shape_factor: &self.zeros,
            cf: &self.zeros,
            state: &self.state,
            risk: &self.risk,
            separation_note: None,
            dead_water_cp: None,
            held: &[],
        }
    }
}

/// Read `summary.json` of a result folder.
pub fn read_summary(dir: &Path) -> Result<Summary> {
    let file = dir.join("summary.json");
    let text = std::fs::read_to_string(&file).with_context(|| {
        format!(
            "{}: cannot read (not a finished result folder?)",
            file.display()
        )
    })?;
    let bad = || format!("{}: not a tuft summary", file.display());
    let mut summary: Summary = serde_json::from_str(&text).with_context(bad)?;
    // A summary written before the regions carried the sensitivity runs'
    // range has none: its share alone, not a range of 0 to 0.
    for r in &mut summary.regions {
        let [lo, hi] = r.separated_band;
        if !(lo <= r.separated_fraction && r.separated_fraction <= hi) {
            r.separated_band = [r.separated_fraction; 2];
        }
    }
    Ok(summary)
}

/// Parse `panels.csv` by column name.
pub fn parse_panels(text: &str) -> Result<Vec<PanelRow>> {
    let mut lines = text.lines();
    let header: Vec<&str> = lines.next().unwrap_or("").split(',').collect();
    let col = |name: &str| {
        header
            .iter()
            .position(|h| *h == name)
            .ok_or_else(|| anyhow::anyhow!("no column \"{name}\" in the header"))
    };
    let idx = [
        col("x")?,
        col("y")?,
        col("z")?,
        col("nx")?,
        col("ny")?,
        col("nz")?,
        col("area")?,
        col("cp")?,
        col("risk")?,
    ];
    let state_col = col("state")?;
    lines
        .enumerate()
        .filter(|(_, l)| !l.trim().is_empty())
        .map(|(k, line)| parse_row(line, &idx, state_col).with_context(|| format!("row {}", k + 2)))
        .collect()
}

fn parse_row(line: &str, idx: &[usize; 9], state_col: usize) -> Result<PanelRow> {
    let cells: Vec<&str> = line.split(',').collect();
    let num = |k: usize| -> Result<f64> {
        let c = cells.get(idx[k]).copied().unwrap_or("");
        c.trim()
            .parse::<f64>()
            .map_err(|_| anyhow::anyhow!("bad number \"{c}\""))
    };
    let state = match cells.get(state_col).map(|s| s.trim()) {
        Some("laminar") => PanelState::Laminar,
        Some("turbulent") => PanelState::Turbulent,
        Some("separated") => PanelState::Separated,
        Some("unresolved") => PanelState::Unresolved,
        other => bail!("bad state {:?}", other.unwrap_or("")),
    };
    Ok(PanelRow {
        centroid: Point3::new(num(0)?, num(1)?, num(2)?),
        normal: Vector3::new(num(3)?, num(4)?, num(5)?),
        area: num(6)?,
        cp: num(7)?,
        state,
        risk: num(8)?,
    })
}
