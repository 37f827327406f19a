//! A progress bar for long exports, imports and syncs: drawn on a terminal
//! only, and nothing at all when the output goes to a file or a pipe.

use std::io::IsTerminal;

use indicatif::{ProgressBar, ProgressDrawTarget, ProgressStyle};

use tankwalk::exchange::{Progress, Stage};

/// Below this many records, or bytes, a stage finishes too fast for a bar to help.
const WORTH_A_BAR_RECORDS: u64 = 20_000;
const WORTH_A_BAR_BYTES: u64 = 8 << 20;

/// Turns [`Progress`] reports into a bar on standard error.
pub struct Bar {
    enabled: bool,
    bar: Option<ProgressBar>,
    stage: Option<Stage>,
}

impl Bar {
    /// A bar when both standard output and standard error are terminals; otherwise silent.
    pub fn on_terminal() -> Bar {
        Bar { enabled: std::io::stdout().is_terminal() && std::io::stderr().is_terminal(), bar: None, stage: None }
    }

    /// Shows `progress`.
    pub fn update(&mut self, progress: Progress) {
        if !self.enabled {
            return;
        }
        if self.stage.as_ref() != Some(&progress.stage) {
            self.clear();
            let bytes = progress.stage.unit() == "bytes";
            if progress.total >= if bytes { WORTH_A_BAR_BYTES } else { WORTH_A_BAR_RECORDS } {
                let bar = ProgressBar::with_draw_target(Some(progress.total), ProgressDrawTarget::stderr());
                let template = if bytes {
                    "{msg:24} [{bar:30}] {bytes}/{total_bytes} ({eta})"
                } else {
                    "{msg:24} [{bar:30}] {human_pos}/{human_len} records ({eta})"
                };
                if let Ok(style) = ProgressStyle::with_template(template) {
                    bar.set_style(style.progress_chars("=> "));
                }
                bar.set_message(progress.stage.label());
                self.bar = Some(bar);
            }
            self.stage = Some(progress.stage.clone());
        }
        if let Some(bar) = &self.bar {
            bar.set_position(progress.done.min(progress.total));
        }
    }

    /// Removes the bar, so that the summary prints on a clean line.
    pub fn clear(&mut self) {
        if let Some(bar) = self.bar.take() {
            bar.finish_and_clear();
        }
    }
}

impl Drop for Bar {
    fn drop(&mut self) {
        self.clear();
    }
}
