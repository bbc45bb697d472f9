//! Command-line handlers for `gatehold sweep`, `gatehold merge` and
//! `gatehold plot` (argument structs for clap derive; the binary wires them).
//!
//! Exit codes returned: 0 every point ok; 1 at least one point failed;
//! 3 the run stopped before the shard was complete (`--stop-after`). Errors
//! that stop the whole command (bad plan, file exists, resume mismatch, I/O)
//! come back as `Err` for the binary to print (exit 2 suggested).

use std::io::IsTerminal;
use std::path::PathBuf;
use std::time::Duration;

use anyhow::Context;
use clap::Args;
use indicatif::{ProgressBar, ProgressDrawTarget, ProgressStyle};

use gatehold::sweep::{self, Shard, SweepObserver, SweepOptions};

/// `gatehold sweep PLAN.toml --out FILE.h5`
#[derive(Debug, Clone, Args)]
pub struct SweepArgs {
    /// Plan file (TOML): a base device and the axes to vary.
    pub plan: PathBuf,
    /// Output HDF5 file (rewritten atomically after every finished point).
    #[arg(long, short)]
    pub out: PathBuf,
    /// Points solved at once (default: all cores).
    #[arg(long, short, default_value_t = 0)]
    pub jobs: usize,
    /// Run only points with index % N == I, written "I/N" (I from 0).
    #[arg(long)]
    pub shard: Option<String>,
    /// Continue a partial output file (same plan), skipping finished points.
    #[arg(long, conflicts_with = "force")]
    pub resume: bool,
    /// Overwrite an existing output file.
    #[arg(long)]
    pub force: bool,
    /// No progress bar.
    #[arg(long, short)]
    pub quiet: bool,
    /// Also write the points table as CSV here.
    #[arg(long)]
    pub csv: Option<PathBuf>,
    /// Stop after computing this many points (testing resume).
    #[arg(long, hide = true)]
    pub stop_after: Option<usize>,
}

/// `gatehold merge PARTS... --out FILE.h5`
#[derive(Debug, Clone, Args)]
pub struct MergeArgs {
    /// Shard files written by `gatehold sweep --shard I/N`.
    #[arg(required = true)]
    pub parts: Vec<PathBuf>,
    /// Merged output file.
    #[arg(long, short)]
    pub out: PathBuf,
}

/// `gatehold plot FILE.h5 --out DIR`
#[derive(Debug, Clone, Args)]
pub struct PlotArgs {
    /// A sweep file.
    pub file: PathBuf,
    /// Folder for the PNG and SVG figures (created if missing).
    #[arg(long, short)]
    pub out: PathBuf,
    /// Folder the plan's relative `base` path is resolved from, to draw the
    /// theory curves (default: the sweep file's folder, then the current one).
    #[arg(long, value_name = "DIR")]
    pub plan_dir: Option<PathBuf>,
}

struct Bar(ProgressBar);

impl SweepObserver for Bar {
    fn started(&self, to_run: usize, _in_shard: usize, done: usize) {
        self.0.set_length(to_run as u64);
        if done > 0 {
            self.0.println(format!(
                "resuming: {done} point(s) already in the file, {to_run} to run"
            ));
        }
    }
    fn point_done(&self, index: usize, status: &str) {
        if status != "ok" {
            self.0.println(format!("point {index}: {status}"));
        }
        self.0.inc(1);
    }
}

fn command_line() -> String {
    std::env::args().collect::<Vec<_>>().join(" ")
}

/// Runs `gatehold sweep`.
pub fn sweep(args: &SweepArgs) -> anyhow::Result<i32> {
    let plan = sweep::load_plan(&args.plan)?;
    let shard: Shard = match &args.shard {
        Some(s) => s.parse()?,
        None => Shard::ALL,
    };
    let opts = SweepOptions {
        jobs: args.jobs,
        shard,
        resume: args.resume,
        overwrite: args.force,
        stop_after: args.stop_after,
        command_line: command_line(),
    };
    let pb = ProgressBar::with_draw_target(Some(0), ProgressDrawTarget::stderr());
    if args.quiet || !std::io::stderr().is_terminal() {
        pb.set_draw_target(ProgressDrawTarget::hidden());
    }
    pb.set_style(
        ProgressStyle::with_template(
            "{spinner} [{elapsed_precise}] {wide_bar} {pos}/{len} points  {per_sec}  ETA {eta}",
        )
        .expect("valid template"),
    );
    pb.enable_steady_tick(Duration::from_millis(250));
    let bar = Bar(pb);
    let summary = sweep::run_sweep(&plan, &args.out, &opts, &bar)?;
    bar.0.finish_and_clear();
    if let Some(csv) = &args.csv {
        let f = gatehold::io::hdf5::read_sweep(&args.out)?;
        let w = std::fs::File::create(csv)
            .with_context(|| format!("cannot create {}", csv.display()))?;
        gatehold::io::csv::write_points(&f, std::io::BufWriter::new(w))
            .with_context(|| format!("writing {}", csv.display()))?;
    }
    if !args.quiet {
        eprintln!(
            "{}: {} point(s) computed, {} resumed, {} failed, {:.1} s{}",
            args.out.display(),
            summary.computed,
            summary.resumed,
            summary.failed,
            summary.elapsed_s,
            if summary.complete {
                ""
            } else {
                " (incomplete: run again with --resume)"
            }
        );
    }
    Ok(if !summary.complete {
        3
    } else if summary.failed > 0 {
        1
    } else {
        0
    })
}

/// Runs `gatehold merge`.
pub fn merge(args: &MergeArgs) -> anyhow::Result<i32> {
    let parts: Vec<&std::path::Path> = args.parts.iter().map(PathBuf::as_path).collect();
    let merged = sweep::merge(&parts, &args.out, &command_line())?;
    let failed = merged.rows.iter().filter(|r| r.status != "ok").count();
    eprintln!(
        "{}: {} points merged from {} file(s), {failed} failed",
        args.out.display(),
        merged.rows.len(),
        parts.len()
    );
    Ok(i32::from(failed > 0))
}

/// Runs `gatehold plot`.
pub fn plot(args: &PlotArgs) -> anyhow::Result<i32> {
    let f = gatehold::io::hdf5::read_sweep(&args.file)?;
    let file_dir = args.file.parent().map(PathBuf::from).unwrap_or_default();
    let dirs: Vec<PathBuf> = match &args.plan_dir {
        Some(d) => vec![d.clone()],
        None => vec![file_dir, PathBuf::from(".")],
    };
    // Theory curves need the plan's devices; without them the solved series are still drawn.
    let mut why = String::new();
    let plan = dirs
        .iter()
        .find_map(|d| match sweep::parse_plan(&f.meta.plan, d) {
            Ok(p) => Some(p),
            Err(e) => {
                why = e.to_string();
                None
            }
        });
    let theory = match &plan {
        Some(p) => {
            let (t, notes) = gatehold::plot::theory_for_sweep(&f, p);
            for n in notes {
                eprintln!("note: {n}");
            }
            t
        }
        None => {
            eprintln!("note: no theory curves: the stored plan does not resolve here ({why}); pass --plan-dir");
            gatehold::plot::Theory::default()
        }
    };
    let files = gatehold::plot::sweep_plots(&f, &args.out, &theory)?;
    for p in &files {
        println!("{}", p.display());
    }
    Ok(0)
}
