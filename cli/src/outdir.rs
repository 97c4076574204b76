//! Result folders that appear whole or not at all.
//!
//! Every file of a run is written into a hidden temporary folder beside the
//! destination; only when all of them are complete is the folder renamed into
//! place. A failed run leaves nothing behind, and a finished result folder is
//! never replaced unless the user asks (`--force`).

use std::path::{Path, PathBuf};

use anyhow::{Context, Result, bail};

/// A result folder under construction.
pub struct Staging {
    tmp: PathBuf,
    dest: PathBuf,
    force: bool,
    done: bool,
}

impl Staging {
    /// Prepare to write `dest`. Refuses when `dest` exists and `force` is false.
    pub fn new(dest: &Path, force: bool) -> Result<Self> {
        if dest.exists() && !force {
            bail!(
                "{}: the result folder already exists; pass --force to replace it or --out to choose another",
                dest.display()
            );
        }
        let parent = match dest.parent() {
            Some(p) if !p.as_os_str().is_empty() => p.to_path_buf(),
            _ => PathBuf::from("."),
        };
        std::fs::create_dir_all(&parent)
            .with_context(|| format!("{}: cannot create the folder", parent.display()))?;
        let leaf = dest
            .file_name()
            .map_or("tuft".into(), |s| s.to_string_lossy().into_owned());
        let tmp = parent.join(format!(".{leaf}.partial-{}", std::process::id()));
        if tmp.exists() {
            std::fs::remove_dir_all(&tmp).ok();
        }
        std::fs::create_dir_all(&tmp)
            .with_context(|| format!("{}: cannot create the folder", tmp.display()))?;
        Ok(Self {
            tmp,
            dest: dest.to_path_buf(),
            force,
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

impl Drop for Staging {
    fn drop(&mut self) {
        if !self.done {
            std::fs::remove_dir_all(&self.tmp).ok();
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn failed_run_leaves_nothing_and_force_replaces() {
        let root = tempfile::tempdir().unwrap();
        let dest = root.path().join("case");
        {
            let s = Staging::new(&dest, false).unwrap();
            std::fs::write(s.file("a.txt"), "x").unwrap();
        }
        assert_eq!(
            std::fs::read_dir(root.path()).unwrap().count(),
            0,
            "dropped staging cleans up"
        );
        let s = Staging::new(&dest, false).unwrap();
        std::fs::write(s.file("a.txt"), "1").unwrap();
        s.commit().unwrap();
        assert!(
            Staging::new(&dest, false).is_err(),
            "no overwrite without force"
        );
        let s = Staging::new(&dest, true).unwrap();
        std::fs::write(s.file("a.txt"), "2").unwrap();
        s.commit().unwrap();
        assert_eq!(std::fs::read_to_string(dest.join("a.txt")).unwrap(), "2");
        assert_eq!(std::fs::read_dir(root.path()).unwrap().count(), 1);
    }
}
