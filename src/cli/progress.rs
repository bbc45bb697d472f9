//! Progress on stderr: dots per bias point for one device, a bar per sweep point.

use std::io::IsTerminal;
use std::sync::atomic::{AtomicUsize, Ordering};
use std::time::Duration;

use indicatif::{ProgressBar, ProgressDrawTarget, ProgressStyle};

use gatehold::evaluate::Status;
use gatehold::progress::Observer;
use gatehold::sweep::SweepObserver;

/// Bias-point progress on stderr (only when stderr is a terminal).
pub struct Dots {
    pub enabled: bool,
    count: AtomicUsize,
}

impl Dots {
    pub fn new(wanted: bool) -> Self {
        Dots {
            enabled: wanted && std::io::stderr().is_terminal(),
            count: AtomicUsize::new(0),
        }
    }

    /// Ends the line of dots.
    pub fn finish(&self) {
        if self.enabled && self.count.load(Ordering::Relaxed) > 0 {
            eprintln!();
        }
    }
}

impl Observer for Dots {
    fn bias_point(&self, _vds: f64, _vgs: f64, converged: bool) {
        if self.enabled {
            let n = self.count.fetch_add(1, Ordering::Relaxed) + 1;
            eprint!("{}", if converged { "." } else { "x" });
            if n.is_multiple_of(60) {
                eprintln!();
            }
        }
    }
}

/// A progress bar over sweep points; failed points are named as they finish.
pub struct Bar(pub ProgressBar);

impl Bar {
    /// A bar with `what` before it, hidden when `quiet` or stderr is not a terminal.
    pub fn new(what: &str, quiet: bool) -> Self {
        let pb = ProgressBar::with_draw_target(Some(0), ProgressDrawTarget::stderr());
        if quiet || !std::io::stderr().is_terminal() {
            pb.set_draw_target(ProgressDrawTarget::hidden());
        }
        pb.set_style(
            ProgressStyle::with_template(&format!(
                "{{spinner}} {what}[{{elapsed_precise}}] {{wide_bar}} {{pos}}/{{len}} points  {{per_sec}}  ETA {{eta}}"
            ))
            .expect("valid template"),
        );
        pb.enable_steady_tick(Duration::from_millis(250));
        Bar(pb)
    }
}

impl SweepObserver for Bar {
    fn started(&self, to_run: usize, _in_shard: usize, done: usize) {
        self.0.set_length(to_run as u64);
        if done > 0 {
            self.0.println(format!(
                "resuming: {done} point(s) already in the file, {to_run} to run"
            ));
        }
    }
    fn point_done(&self, index: usize, status: &Status) {
        if !status.is_ok() {
            self.0.println(format!("point {index}: {status}"));
        }
        self.0.inc(1);
    }
}
