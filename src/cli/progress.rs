//! Progress on standard error (indicatif): a spinner with the elapsed time for stages whose
//! length is not known in advance (cutoff search, trajectory stage), a bar for the orientation
//! loop. Hidden when standard error is not a terminal or with `--quiet`.

use std::io::IsTerminal;
use std::time::Duration;

use indicatif::{ProgressBar, ProgressStyle};

/// Makes the progress indicators of one run.
#[derive(Clone, Copy, Debug)]
pub struct Progress {
    visible: bool,
}

impl Progress {
    /// Visible unless `quiet` or standard error is not a terminal.
    pub fn new(quiet: bool) -> Self {
        Progress {
            visible: !quiet && std::io::stderr().is_terminal(),
        }
    }

    /// A spinner for a stage of unknown length; finish it with `finish_and_clear`.
    pub fn spinner(&self, message: impl Into<String>) -> ProgressBar {
        if !self.visible {
            return ProgressBar::hidden();
        }
        let b = ProgressBar::new_spinner();
        b.set_style(
            ProgressStyle::with_template("{spinner} {msg} ({elapsed})")
                .unwrap_or_else(|_| ProgressStyle::default_spinner()),
        );
        b.set_message(message.into());
        b.enable_steady_tick(Duration::from_millis(120));
        b
    }

    /// A bar counting `unit`s (its length is set by the first report).
    pub fn bar(&self, message: impl Into<String>, unit: &str) -> ProgressBar {
        if !self.visible {
            return ProgressBar::hidden();
        }
        let b = ProgressBar::new(0);
        b.set_style(
            ProgressStyle::with_template(&format!(
                "{{msg}} [{{bar:40}}] {{pos}}/{{len}} {unit} ({{elapsed}}, {{eta}} left)"
            ))
            .unwrap_or_else(|_| ProgressStyle::default_bar()),
        );
        b.set_message(message.into());
        b
    }
}
