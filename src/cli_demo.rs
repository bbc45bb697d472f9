//! Command-line handler for `gatehold demo` (argument struct for clap derive;
//! the binary wires it). All console output of the demo lives here.
//!
//! Exit codes returned: 0 every point ok; 1 at least one point failed (the
//! binary maps it to 2, "finished with failures"). Errors that stop the demo
//! come back as `Err`.

use std::io::IsTerminal;
use std::path::PathBuf;
use std::time::Duration;

use clap::Args;
use indicatif::{ProgressBar, ProgressDrawTarget, ProgressStyle};

use gatehold::demo::{self, DemoOptions};
use gatehold::sweep::SweepObserver;

/// `gatehold demo [--out DIR]`
#[derive(Debug, Clone, Args)]
pub struct DemoArgs {
    /// Output folder for sweep.h5, the figures and summary.txt (created if missing; its files are overwritten).
    #[arg(long, short, default_value = "gatehold-demo")]
    pub out: PathBuf,
    /// Points solved at once (default: all cores).
    #[arg(long, short, default_value_t = 0)]
    pub jobs: usize,
    /// Screening target on DIBL, mV/V (common practice, not a standard).
    #[arg(long, default_value_t = demo::DEFAULT_DIBL_MAX_MV_PER_V, value_name = "MV_PER_V")]
    pub dibl_max: f64,
    /// Screening target on SS, mV/dec (common practice, not a standard).
    #[arg(long, default_value_t = demo::DEFAULT_SS_MAX_MV_PER_DEC, value_name = "MV_PER_DEC")]
    pub ss_max: f64,
    /// No progress bar.
    #[arg(long, short)]
    pub quiet: bool,
}

struct Bar(ProgressBar);

impl SweepObserver for Bar {
    fn started(&self, to_run: usize, _in_shard: usize, _done: usize) {
        self.0.set_length(to_run as u64);
    }
    fn point_done(&self, index: usize, status: &str) {
        if status != "ok" {
            self.0.println(format!("point {index}: {status}"));
        }
        self.0.inc(1);
    }
}

/// Runs `gatehold demo`: prints the summary on stdout.
pub fn demo(args: &DemoArgs) -> anyhow::Result<i32> {
    let opts = DemoOptions {
        jobs: args.jobs,
        dibl_max_mv_per_v: args.dibl_max,
        ss_max_mv_per_dec: args.ss_max,
        ..DemoOptions::default()
    };
    let pb = ProgressBar::with_draw_target(Some(0), ProgressDrawTarget::stderr());
    if args.quiet || !std::io::stderr().is_terminal() {
        pb.set_draw_target(ProgressDrawTarget::hidden());
    }
    pb.set_style(
        ProgressStyle::with_template(
            "{spinner} demo [{elapsed_precise}] {wide_bar} {pos}/{len} points  ETA {eta}",
        )
        .expect("valid template"),
    );
    pb.enable_steady_tick(Duration::from_millis(250));
    let bar = Bar(pb);
    let report = demo::run_demo(&args.out, &opts, &bar);
    bar.0.finish_and_clear();
    let report = report?;
    print!("{}", demo::summary_text(&report));
    Ok(i32::from(report.failed_points > 0))
}
