//! Progress on stderr: a spinner per phase when stderr is a terminal, one
//! plain line per phase otherwise, nothing with `--quiet`.

use std::io::IsTerminal;
use std::time::{Duration, Instant};

use indicatif::{ProgressBar, ProgressStyle};

/// A duration in the words a log reads: seconds under two minutes,
/// minutes under two hours, then hours and minutes.
pub fn duration_words(secs: f64) -> String {
    let secs = secs.max(0.0).round();
    if secs < 120.0 {
        format!("{secs:.0} s")
    } else if secs < 7200.0 {
        format!("{:.0} min", secs / 60.0)
    } else {
        let min = (secs / 60.0).round();
        format!("{:.0} h {:.0} min", (min / 60.0).floor(), min % 60.0)
    }
}

/// Reports the phases of a run and times them.
pub struct Progress {
    quiet: bool,
    terminal: bool,
    prefix: String,
    timings: Vec<(String, f64)>,
}

/// One running phase; finish it with [`Progress::end`].
pub struct Phase {
    name: String,
    start: Instant,
    bar: Option<ProgressBar>,
}

impl Progress {
    /// A reporter; `prefix` (e.g. the case name) starts every line.
    pub fn new(quiet: bool, prefix: &str) -> Self {
        Self {
            quiet,
            terminal: std::io::stderr().is_terminal(),
            prefix: prefix.to_string(),
            timings: Vec::new(),
        }
    }

    /// Start a phase with a human description.
    pub fn begin(&self, name: &str, what: &str) -> Phase {
        let bar = if self.quiet {
            None
        } else if self.terminal {
            let bar = ProgressBar::new_spinner();
            if let Ok(style) = ProgressStyle::with_template("{spinner} {prefix}: {msg} [{elapsed}]")
            {
                bar.set_style(style);
            }
            bar.set_prefix(self.prefix.clone());
            bar.set_message(what.to_string());
            bar.enable_steady_tick(Duration::from_millis(120));
            Some(bar)
        } else {
            eprintln!("{}: {what} ...", self.prefix);
            None
        };
        Phase {
            name: name.to_string(),
            start: Instant::now(),
            bar,
        }
    }

    /// Finish a phase, with a short result note.
    pub fn end(&mut self, phase: Phase, note: &str) {
        let secs = phase.start.elapsed().as_secs_f64();
        if let Some(bar) = phase.bar {
            bar.finish_and_clear();
        }
        if !self.quiet {
            eprintln!(
                "{}: {} done in {secs:.1} s{}{note}",
                self.prefix,
                phase.name,
                if note.is_empty() { "" } else { ": " }
            );
        }
        self.timings.push((phase.name, secs));
    }

    /// The geometry's stages within `phase` ([`Phase::spinner_stages`]
    /// on a terminal), otherwise, unless quiet, one indented line per
    /// stage. A review's 1.9-million-facet scan had sat 21 s on "reading
    /// and preparing the geometry".
    pub fn stages(&self, phase: &Phase, what: &str) -> Option<tuft_mesh::stage::StageGuard> {
        if let Some(guard) = phase.spinner_stages(what) {
            return Some(guard);
        }
        let prefix = self.prefix.clone();
        (!self.quiet).then(|| {
            tuft_mesh::stage::on_stages(Box::new(move |stage| {
                eprintln!("{prefix}:   {stage} ...");
            }))
        })
    }

    /// Print a one-off note (unless quiet).
    pub fn note(&self, msg: &str) {
        if !self.quiet {
            eprintln!("{}: {msg}", self.prefix);
        }
    }

    /// Seconds per phase, in order.
    pub fn timings(&self) -> &[(String, f64)] {
        &self.timings
    }
}

impl Phase {
    /// Let the geometry's preparation say its stages (reading, repairing,
    /// wrapping, coarsening, checking the panels) as this phase's
    /// spinner's message after `what`, the phase's own words, until the
    /// guard is dropped; `None` off a terminal.
    pub fn spinner_stages(&self, what: &str) -> Option<tuft_mesh::stage::StageGuard> {
        let (bar, what) = (self.bar.clone()?, what.to_owned());
        Some(tuft_mesh::stage::on_stages(Box::new(move |stage| {
            bar.set_message(format!("{what}: {stage}"));
        })))
    }

    /// Take the phase's spinner off the terminal, printing nothing.
    pub fn clear(self) {
        if let Some(bar) = self.bar {
            bar.finish_and_clear();
        }
    }
}

#[cfg(test)]
mod tests {
    use super::duration_words;

    #[test]
    fn durations_read_in_seconds_minutes_or_hours() {
        assert_eq!(duration_words(6.4), "6 s");
        assert_eq!(duration_words(119.4), "119 s");
        assert_eq!(duration_words(170.0), "3 min");
        assert_eq!(duration_words(7199.0), "120 min");
        assert_eq!(
            duration_words(3.0 * 3600.0 + 25.0 * 60.0 + 10.0),
            "3 h 25 min"
        );
    }
}
