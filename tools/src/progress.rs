//! Progress display for long commands: a bar on a terminal, nothing when standard error is
//! piped or redirected, or with `--quiet`. It only draws; results never depend on it.

use std::io::IsTerminal;

use indicatif::{ProgressBar, ProgressDrawTarget, ProgressStyle};

/// A progress bar (or spinner when the length is unknown) on standard error.
pub struct Progress {
    bar: ProgressBar,
}

impl Progress {
    /// A bar of `len` steps (a spinner for `None`) labelled `what`; hidden unless standard
    /// error is a terminal and `quiet` is false.
    pub fn new(len: Option<u64>, what: &str, quiet: bool) -> Self {
        let bar = match len {
            Some(n) => ProgressBar::new(n),
            None => ProgressBar::new_spinner(),
        };
        if quiet || !std::io::stderr().is_terminal() {
            bar.set_draw_target(ProgressDrawTarget::hidden());
        }
        let template = if len.is_some() {
            "{prefix} [{bar:30}] {pos}/{len} {msg} (ETA {eta})"
        } else {
            "{prefix} {spinner} {msg} ({elapsed})"
        };
        if let Ok(style) = ProgressStyle::with_template(template) {
            bar.set_style(style.progress_chars("=> "));
        }
        bar.set_prefix(what.to_string());
        bar.enable_steady_tick(std::time::Duration::from_millis(200));
        Self { bar }
    }

    /// Sets the position to `done` steps.
    pub fn set(&self, done: u64) {
        self.bar.set_position(done);
    }

    /// Sets the text after the bar.
    pub fn message(&self, text: String) {
        self.bar.set_message(text);
    }
}

impl Drop for Progress {
    fn drop(&mut self) {
        self.bar.finish_and_clear();
    }
}
