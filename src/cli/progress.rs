//! A progress bar on standard error for the library's progress hooks (hidden when standard error
//! is not a terminal).

use eddyzone::study::Progress;
use indicatif::{ProgressBar, ProgressDrawTarget, ProgressStyle};

/// The library's progress as an indicatif bar.
pub struct Bar(ProgressBar);

impl Bar {
    /// A bar on standard error.
    pub fn new() -> Self {
        Bar(ProgressBar::with_draw_target(
            None,
            ProgressDrawTarget::stderr(),
        ))
    }

    /// Removes the bar.
    pub fn finish(&self) {
        self.0.finish_and_clear();
    }
}

impl Progress for Bar {
    fn stage(&self, what: &str, total: Option<u64>) {
        let template = if total.is_some() {
            "{spinner} {prefix} {pos}/{len}  {msg}  [{elapsed}]"
        } else {
            "{spinner} {prefix}  {msg}  [{elapsed}]"
        };
        if let Ok(style) = ProgressStyle::with_template(template) {
            self.0.set_style(style);
        }
        self.0.set_prefix(what.to_string());
        self.0.set_message("");
        self.0.set_position(0);
        self.0.set_length(total.unwrap_or(0));
    }

    fn advance(&self, steps: u64) {
        self.0.inc(steps);
    }

    fn status(&self, text: &str) {
        self.0.set_message(text.to_string());
    }
}
