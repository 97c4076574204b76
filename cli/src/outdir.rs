//! Result folders that appear whole or not at all.
//!
//! Every file of a run is written into a hidden temporary folder beside the
//! destination; only when all of them are complete is the folder renamed into
//! place. A failed run leaves nothing behind, and a finished result folder is
//! never replaced unless the user asks (`--force`).

use std::path::{Path, PathBuf};

use anyhow::{Context, Result, bail};

/// The hidden folders of results under construction in this process, each
/// with the folder it is to become, for [`remove_unfinished`] on an
/// interrupt.
static UNFINISHED: std::sync::Mutex<Vec<(PathBuf, PathBuf)>> = std::sync::Mutex::new(Vec::new());

/// Remember `tmp`, to become `dest`, as under construction, or (`dest`
/// `None`) forget it.
fn unfinished(tmp: &Path, dest: Option<&Path>) {
    if let Ok(mut list) = UNFINISHED.lock() {
        list.retain(|p| p.0 != tmp);
        if let Some(dest) = dest {
            list.push((tmp.to_path_buf(), dest.to_path_buf()));
        }
    }
}

/// Remove every result folder still under construction (on an interrupt:
/// nothing half-written is left, as on a failure); the folders they were
/// to become.
pub fn remove_unfinished() -> Vec<PathBuf> {
    let Ok(mut list) = UNFINISHED.lock() else {
        return Vec::new();
    };
    list.drain(..)
        .map(|(tmp, dest)| {
            std::fs::remove_dir_all(&tmp).ok();
            dest
        })
        .collect()
}

/// A result folder under construction.
pub struct Staging {
    tmp: PathBuf,
    dest: PathBuf,
    force: bool,
    kind: Kind,
    done: bool,
}

impl Staging {
    /// Prepare to write `dest`, a result folder of this `kind`. Refuses
    /// when `dest` exists and `force` is false, and, with `force`, when
    /// `dest` is not such a folder tuft wrote (see [`replaceable`]).
    pub fn new(dest: &Path, force: bool, kind: Kind) -> Result<Self> {
        if dest.exists() {
            if !dest.is_dir() {
                bail!(
                    "{}: a file of that name is in the way of the result folder; choose another with --out",
                    dest.display()
                );
            }
            if !force {
                bail!(
                    "{}: the result folder already exists; pass --force to replace it or --out to choose another",
                    dest.display()
                );
            }
            replaceable(dest, kind)?;
        }
        let parent = match dest.parent() {
            Some(p) if !p.as_os_str().is_empty() => p.to_path_buf(),
            _ => PathBuf::from("."),
        };
        create_folder(&parent)?;
        let leaf = dest
            .file_name()
            .map_or("tuft".into(), |s| s.to_string_lossy().into_owned());
        remove_stale(&parent, &leaf);
        let tmp = parent.join(format!(".{leaf}.partial-{}", std::process::id()));
        if tmp.exists() {
            std::fs::remove_dir_all(&tmp).ok();
        }
        // Named after the folder the user asked for, not the hidden one.
        std::fs::create_dir_all(&tmp).with_context(|| {
            format!(
                "{}: cannot write the result folder in {}",
                dest.display(),
                parent.display()
            )
        })?;
        unfinished(&tmp, Some(dest));
        Ok(Self {
            tmp,
            dest: dest.to_path_buf(),
            force,
            kind,
            done: false,
        })
    }

    /// Path of a file inside the folder being written.
    pub fn file(&self, name: &str) -> PathBuf {
        self.tmp.join(name)
    }

    /// Move the finished folder into place.
    pub fn commit(mut self) -> Result<PathBuf> {
        if self.dest.exists() {
            if !self.force {
                bail!(
                    "{}: the result folder appeared while running; not replacing it",
                    self.dest.display()
                );
            }
            replaceable(&self.dest, self.kind)?;
            std::fs::remove_dir_all(&self.dest).with_context(|| {
                format!("{}: cannot replace the old results", self.dest.display())
            })?;
        }
        std::fs::rename(&self.tmp, &self.dest).with_context(|| {
            format!(
                "{}: cannot move the results into place",
                self.dest.display()
            )
        })?;
        self.done = true;
        Ok(self.dest.clone())
    }
}

/// Remove the hidden staging folders `.{leaf}.partial-PID` that an
/// interrupted run (Ctrl-C, a killed job) left beside `leaf`: those whose
/// process is gone. Where there is no `/proc` to ask, none are removed.
fn remove_stale(parent: &Path, leaf: &str) {
    let prefix = format!(".{leaf}.partial-");
    let Ok(entries) = std::fs::read_dir(parent) else {
        return;
    };
    for e in entries.flatten() {
        let name = e.file_name().to_string_lossy().into_owned();
        let Some(pid) = name.strip_prefix(&prefix) else {
            continue;
        };
        // A zombie (killed, not yet reaped: a review's next run started at
        // once after `kill -9`) is gone too.
        let alive = || {
            std::fs::read_to_string(Path::new("/proc").join(pid).join("stat")).is_ok_and(|stat| {
                stat.rsplit_once(')')
                    .is_none_or(|(_, rest)| !rest.trim_start().starts_with('Z'))
            })
        };
        if pid.parse::<u32>().is_ok() && Path::new("/proc/self").exists() && !alive() {
            std::fs::remove_dir_all(e.path()).ok();
        }
    }
}

/// The kinds of result folder, each known by the file only it holds.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Kind {
    /// A run's or a sweep variant's folder, holding `summary.json`.
    Run,
    /// A comparison's folder, holding `compare.json`.
    Compare,
}

impl Kind {
    /// Every kind.
    pub const ALL: [Self; 2] = [Self::Run, Self::Compare];

    /// The file only this kind of folder holds.
    pub fn marker(self) -> &'static str {
        match self {
            Self::Run => "summary.json",
            Self::Compare => "compare.json",
        }
    }

    fn words(self) -> &'static str {
        match self {
            Self::Run => "a run's results",
            Self::Compare => "a comparison",
        }
    }
}

/// The extensions of every file tuft writes into a result folder: a
/// folder holding anything else (the case file, the STL, notes, a
/// subfolder) holds work of the user's, which `--force` must not delete (a
/// review's designer, starting a variant in a copy of last week's result
/// folder, had lost the case and the STL of the run being made).
const RESULT_EXTENSIONS: [&str; 7] = ["json", "html", "csv", "png", "vtu", "vtp", "vti"];

/// The entries of `dir` that tuft does not write into a result folder (a
/// file manager's `.DS_Store` and `._` files are not counted).
fn foreign_entries(dir: &Path) -> Result<Vec<String>> {
    let entries = std::fs::read_dir(dir)
        .with_context(|| format!("{}: cannot read the folder", dir.display()))?;
    let mut foreign: Vec<String> = entries
        .flatten()
        .filter_map(|e| {
            let name = e.file_name().to_string_lossy().into_owned();
            let file = e.file_type().is_ok_and(|t| t.is_file());
            let result = Path::new(&name)
                .extension()
                .is_some_and(|x| RESULT_EXTENSIONS.iter().any(|r| x.eq_ignore_ascii_case(r)));
            // A file manager's own files only; any other hidden file may be
            // the user's (a review's `.notes.md`, and an STL kept as
            // `.scan.stl`, had gone with the old results).
            let metadata = name == ".DS_Store" || name.starts_with("._");
            (!(file && (result || metadata))).then_some(name)
        })
        .collect();
    foreign.sort();
    Ok(foreign)
}

/// `--force` deletes the old folder, so it may only delete what tuft wrote:
/// a folder of this `kind` (holding its [`Kind::marker`]; a comparison
/// never replaces a run's results, which may be one of its own two) whose
/// every file is of a kind tuft writes ([`RESULT_EXTENSIONS`]), and which
/// is neither the working folder nor one of its parents (`--out .` beside
/// the case and the STL would otherwise delete them).
///
/// # Errors
/// When `dest` does not look like such a folder or holds the working
/// folder.
pub fn replaceable(dest: &Path, kind: Kind) -> Result<()> {
    let full = dest
        .canonicalize()
        .with_context(|| format!("{}: cannot read the folder", dest.display()))?;
    let here = std::env::current_dir().and_then(|d| d.canonicalize());
    if here.is_ok_and(|h| h.starts_with(&full)) {
        bail!(
            "{}: --force would delete the working folder (or one holding it); choose a result folder with --out",
            dest.display()
        );
    }
    if !full.join(kind.marker()).is_file() {
        let other = Kind::ALL
            .into_iter()
            .find(|k| full.join(k.marker()).is_file());
        match other {
            Some(o) => bail!(
                "{}: the folder holds {} ({}), not {}, so --force will not delete it; choose another with --out",
                dest.display(),
                o.words(),
                o.marker(),
                kind.words()
            ),
            None => bail!(
                "{}: the folder exists but holds no tuft results (no {}), so --force will not delete it; \
                 choose another with --out",
                dest.display(),
                kind.marker()
            ),
        }
    }
    let foreign = foreign_entries(&full)?;
    if let Some(named) = first_and_more(&foreign) {
        bail!(
            "{}: the folder holds {named}, which tuft does not write, so --force will not delete \
             it; move {} out or choose another folder with --out",
            dest.display(),
            if foreign.len() == 1 { "it" } else { "them" }
        );
    }
    Ok(())
}

/// The first of a folder's `names` and how many more, for a refusal:
/// "notes.txt", "base.toml and 1 more"; `None` for none.
pub fn first_and_more(names: &[String]) -> Option<String> {
    let first = names.first()?;
    Some(match names.len() {
        1 => first.clone(),
        n => format!("{first} and {} more", n - 1),
    })
}

impl Drop for Staging {
    fn drop(&mut self) {
        if !self.done {
            std::fs::remove_dir_all(&self.tmp).ok();
        }
        unfinished(&self.tmp, None);
    }
}

/// Write a file whole: a temporary file beside it renamed into place, so a
/// reader never sees half of it (the temporary file is removed on failure).
///
/// # Errors
/// One sentence naming the file that could not be written.
pub fn write_whole(path: &Path, bytes: &[u8]) -> Result<()> {
    let tmp = path.with_extension(format!("partial-{}", std::process::id()));
    let written = std::fs::write(&tmp, bytes).and_then(|()| std::fs::rename(&tmp, path));
    written.with_context(|| {
        let _ = std::fs::remove_file(&tmp);
        format!("{}: cannot write", path.display())
    })
}

/// `path` itself or, where it does not exist yet, the nearest of the
/// folders above it that does (`None` for a relative path none of whose
/// parts exist: the working folder then holds it).
pub fn nearest_existing(path: &Path) -> Option<&Path> {
    path.ancestors()
        .find(|a| !a.as_os_str().is_empty() && a.exists())
}

/// Create `folder` and the folders above it. A file standing where one
/// of them should be is named as such (the system's own message only says
/// that something exists).
///
/// # Errors
/// When a file is in the way or the folder cannot be created.
pub fn create_folder(folder: &Path) -> Result<()> {
    if let Some(file) = nearest_existing(folder).filter(|a| !a.is_dir()) {
        if file == folder {
            bail!("{}: is a file, not a folder", file.display());
        }
        bail!(
            "{}: is a file, not a folder, so {} cannot be created under it",
            file.display(),
            folder.display()
        );
    }
    std::fs::create_dir_all(folder)
        .with_context(|| format!("{}: cannot create the folder", folder.display()))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn failed_run_leaves_nothing_and_force_replaces() {
        let root = tempfile::tempdir().unwrap();
        let dest = root.path().join("case");
        {
            let s = Staging::new(&dest, false, Kind::Run).unwrap();
            std::fs::write(s.file("a.csv"), "x").unwrap();
        }
        assert_eq!(
            std::fs::read_dir(root.path()).unwrap().count(),
            0,
            "dropped staging cleans up"
        );
        let s = Staging::new(&dest, false, Kind::Run).unwrap();
        std::fs::write(s.file("a.csv"), "1").unwrap();
        s.commit().unwrap();
        assert!(
            Staging::new(&dest, false, Kind::Run).is_err(),
            "no overwrite without force"
        );
        let err = Staging::new(&dest, true, Kind::Run).err().unwrap();
        assert!(format!("{err}").contains("holds no tuft results"), "{err}");
        assert_eq!(std::fs::read_to_string(dest.join("a.csv")).unwrap(), "1");
        std::fs::write(dest.join("summary.json"), "{}").unwrap();
        let s = Staging::new(&dest, true, Kind::Run).unwrap();
        std::fs::write(s.file("a.csv"), "2").unwrap();
        s.commit().unwrap();
        assert_eq!(std::fs::read_to_string(dest.join("a.csv")).unwrap(), "2");
        assert_eq!(std::fs::read_dir(root.path()).unwrap().count(), 1);
    }

    /// A staging folder left by a process that is gone is removed by the
    /// next run to the same folder; one of a live process is kept.
    #[test]
    fn interrupted_runs_leave_nothing_for_long() {
        if !Path::new("/proc/self").exists() {
            return; // nothing to ask whether a process lives
        }
        let root = tempfile::tempdir().unwrap();
        // PID 4194304 is beyond Linux's largest (2^22), so never alive.
        let stale = root.path().join(".case.partial-4194304");
        // PID 1 (the init process) always lives.
        let live = root.path().join(".case.partial-1");
        std::fs::create_dir_all(&stale).unwrap();
        std::fs::create_dir_all(&live).unwrap();
        let other = root.path().join(".other.partial-4194304");
        std::fs::create_dir_all(&other).unwrap();
        let s = Staging::new(&root.path().join("case"), false, Kind::Run).unwrap();
        assert!(!stale.exists());
        assert!(live.exists(), "a live process's folder is in use");
        assert!(other.exists(), "another result's staging is not touched");
        drop(s);
    }

    /// `--force` never deletes a folder tuft did not write, nor a file in
    /// the way, nor the working folder's parents.
    #[test]
    fn force_deletes_only_result_folders() {
        let root = tempfile::tempdir().unwrap();
        let mine = root.path().join("my-scans");
        std::fs::create_dir_all(mine.join("sub")).unwrap();
        std::fs::write(mine.join("sub/scan-v3.stl"), "solid").unwrap();
        assert!(Staging::new(&mine, true, Kind::Run).is_err());
        assert!(
            mine.join("sub/scan-v3.stl").is_file(),
            "the user's file stays"
        );
        let file = root.path().join("afile");
        std::fs::write(&file, "x").unwrap();
        let err = Staging::new(&file, true, Kind::Run).err().unwrap();
        assert!(format!("{err}").contains("a file of that name"), "{err}");
        // The working folder (cargo runs tests in the crate's folder) and
        // its parents are never replaced, even holding a summary.
        let here = std::env::current_dir().unwrap();
        assert!(replaceable(&here, Kind::Run).is_err());
        assert!(replaceable(here.parent().unwrap(), Kind::Run).is_err());
    }

    /// A result folder holding the user's files (a case and an STL copied
    /// into last week's results) is not replaced, and a comparison never
    /// replaces a run's results (which may be one of the two compared), nor
    /// a run a comparison.
    #[test]
    fn force_keeps_the_users_files_and_the_other_kind() {
        let root = tempfile::tempdir().unwrap();
        let dest = root.path().join("week-49");
        std::fs::create_dir_all(&dest).unwrap();
        for f in ["summary.json", "report.html", "pressure.png", "surface.vtu"] {
            std::fs::write(dest.join(f), "x").unwrap();
        }
        assert!(replaceable(&dest, Kind::Run).is_ok());
        let err = replaceable(&dest, Kind::Compare).err().unwrap();
        assert!(format!("{err}").contains("holds a run's results"), "{err}");
        std::fs::write(dest.join("base.toml"), "x").unwrap();
        std::fs::write(dest.join("coupe.stl"), "x").unwrap();
        let err = format!("{}", Staging::new(&dest, true, Kind::Run).err().unwrap());
        assert!(
            err.contains("holds base.toml and 1 more, which tuft does not write"),
            "{err}"
        );
        assert!(dest.join("coupe.stl").is_file() && dest.join("summary.json").is_file());
        std::fs::remove_file(dest.join("base.toml")).unwrap();
        std::fs::remove_file(dest.join("coupe.stl")).unwrap();
        std::fs::create_dir(dest.join("old")).unwrap();
        assert!(
            replaceable(&dest, Kind::Run).is_err(),
            "a subfolder is the user's"
        );
        std::fs::remove_dir(dest.join("old")).unwrap();
        std::fs::write(dest.join(".DS_Store"), "x").unwrap();
        assert!(
            replaceable(&dest, Kind::Run).is_ok(),
            "hidden files do not count"
        );
        let cmp = root.path().join("a-vs-b");
        std::fs::create_dir_all(&cmp).unwrap();
        std::fs::write(cmp.join("compare.json"), "x").unwrap();
        assert!(replaceable(&cmp, Kind::Compare).is_ok());
        assert!(replaceable(&cmp, Kind::Run).is_err());
    }
}
