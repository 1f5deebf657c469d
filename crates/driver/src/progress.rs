//! A progress bar on stderr for long sweeps, drawn only when stderr is a terminal.

use std::io::IsTerminal;

use indicatif::{ProgressBar, ProgressDrawTarget, ProgressStyle};

use crate::output::PolarPoint;

/// Sweeps with fewer points than this finish quickly enough not to need a bar.
pub const MIN_POINTS_FOR_BAR: usize = 8;

/// Counts finished points of a sweep on a bar on stderr; hidden when stderr is not a terminal
/// or the sweep is short, so piped output and logs stay clean.
#[derive(Debug)]
pub struct SweepProgress {
    bar: ProgressBar,
}

impl SweepProgress {
    /// A bar for a sweep of `total` points.
    pub fn new(total: usize) -> Self {
        let visible = total >= MIN_POINTS_FOR_BAR && std::io::stderr().is_terminal();
        let target = if visible {
            ProgressDrawTarget::stderr()
        } else {
            ProgressDrawTarget::hidden()
        };
        let bar = ProgressBar::with_draw_target(Some(total as u64), target);
        if let Ok(style) =
            ProgressStyle::with_template("{bar:30} {pos}/{len} points  {elapsed} {msg}")
        {
            bar.set_style(style);
        }
        Self { bar }
    }

    /// Records one finished point (callable from several threads).
    pub fn point_done(&self, point: &PolarPoint) {
        if !point.converged {
            self.bar.set_message("some points flagged");
        }
        self.bar.inc(1);
    }

    /// Points recorded so far.
    pub fn done(&self) -> u64 {
        self.bar.position()
    }

    /// Removes the bar from the terminal.
    pub fn finish(&self) {
        self.bar.finish_and_clear();
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn counts_finished_points() {
        let progress = SweepProgress::new(3);
        let point = PolarPoint::flagged(
            1.0e6,
            Some(0.0),
            None,
            "not attempted".to_owned(),
            None,
            None,
            0,
        );
        progress.point_done(&point);
        progress.point_done(&point);
        assert_eq!(progress.done(), 2);
        progress.finish();
    }
}
