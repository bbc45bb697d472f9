//! `gatehold sweep`, `gatehold merge` and `gatehold plot`. Errors that stop
//! the whole command (bad plan, file exists, resume mismatch, I/O) come back
//! as `Err` (exit 1).

use std::path::PathBuf;

use anyhow::Context;
use clap::Args;

use super::exit::Exit;
use super::progress::Bar;
use gatehold::sweep::{self, Shard, SweepOptions};

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
    #[arg(long, value_parser = parse_shard)]
    pub shard: Option<Shard>,
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
    #[command(flatten)]
    pub criteria: super::criteria::CriteriaArgs,
    /// Fins and wires: "3d-solve" (default) or "theory" (cross-section and
    /// theory only, for very large sweeps); written into the stored plan text.
    #[arg(long, value_name = "METHOD", value_parser = super::parse_fins)]
    pub fins: Option<gatehold::device::FinMethod>,
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
    /// No longer needed (the theory curves are stored in the sweep file); accepted and ignored.
    #[arg(long, value_name = "DIR", hide = true)]
    pub plan_dir: Option<PathBuf>,
    /// Criteria drawn as lines on the DIBL, SS and roll-off plots, with the
    /// shortest compliant length ringed (default: the plan's `[criteria]`
    /// stored in the file).
    #[command(flatten)]
    pub criteria: super::criteria::CriteriaArgs,
}

/// `--shard I/N`, checked by the argument parser (a bad value is a usage error, exit 64).
fn parse_shard(s: &str) -> Result<Shard, String> {
    s.parse::<Shard>().map_err(|e| e.to_string())
}

fn command_line() -> String {
    std::env::args().collect::<Vec<_>>().join(" ")
}

/// Runs `gatehold sweep`.
pub fn sweep(args: &SweepArgs) -> anyhow::Result<Exit> {
    let mut plan = gatehold::sweep::plan::load_plan_with_fins(&args.plan, args.fins)?;
    plan.criteria = args.criteria.over(&plan.criteria)?;
    let shard = args.shard.unwrap_or(Shard::ALL);
    let opts = SweepOptions {
        jobs: super::capped_jobs(args.jobs),
        shard,
        resume: args.resume,
        overwrite: args.force,
        stop_after: args.stop_after,
        command_line: command_line(),
        interrupt: Some(super::interrupt::install()),
    };
    if let Some(csv) = &args.csv {
        for (input, what) in plan
            .input_paths
            .iter()
            .map(|p| (p, "an input of the plan"))
            .chain(std::iter::once((&args.out, "the sweep's own output file")))
        {
            if sweep::same_file(csv, input) || csv == input {
                anyhow::bail!(
                    "refusing to write --csv {}: it is {what} ({})",
                    csv.display(),
                    input.display()
                );
            }
        }
    }
    let bar = Bar::new("", args.quiet);
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
    if summary.complete {
        print!("{}", answer_text(&args.out, &plan.criteria)?);
    }
    Ok(if !summary.complete {
        Exit::Stopped
    } else {
        Exit::missing_if(summary.failed > 0)
    })
}

/// The per-series answer of a complete sweep file, read back from its `shortest` group.
fn answer_text(out: &std::path::Path, criteria: &sweep::plan::Criteria) -> anyhow::Result<String> {
    if criteria.is_empty() {
        return Ok("no [criteria] in the plan and no --dibl-max/--ss-max/--vt-rolloff-max: no shortest compliant length\n".into());
    }
    let f = gatehold::io::hdf5::read_sweep(out)?;
    let outcomes = sweep::shortest::per_series(&f, criteria);
    let mut t = gatehold::render::shortest::heading(criteria);
    for o in &outcomes {
        t.push_str("  ");
        t.push_str(&gatehold::render::shortest::answer_line(
            &o.label,
            &o.answer,
            o.lambda_numeric_nm,
        ));
        if o.failed_points > 0 {
            t.push_str(&format!(
                "    ({} point(s) of this series failed; see `status` in the file)\n",
                o.failed_points
            ));
        }
    }
    t.push_str(&format!(
        "(stored in the group `shortest` of {})\n",
        out.display()
    ));
    Ok(t)
}

/// Runs `gatehold merge`.
pub fn merge(args: &MergeArgs) -> anyhow::Result<Exit> {
    let parts: Vec<&std::path::Path> = args.parts.iter().map(PathBuf::as_path).collect();
    let merged = sweep::merge(&parts, &args.out, &command_line())?;
    let failed = merged.rows.iter().filter(|r| !r.status.is_ok()).count();
    eprintln!(
        "{}: {} points merged from {} file(s), {failed} failed",
        args.out.display(),
        merged.rows.len(),
        parts.len()
    );
    Ok(Exit::missing_if(failed > 0))
}

/// Runs `gatehold plot`: exit 2 when a figure the file should hold could not be drawn.
pub fn plot(args: &PlotArgs) -> anyhow::Result<Exit> {
    if args.plan_dir.is_some() {
        eprintln!(
            "note: --plan-dir is no longer needed: the theory curves are stored in the sweep file"
        );
    }
    let f = gatehold::io::hdf5::read_sweep(&args.file)?;
    super::note_unchecksummed(&args.file);
    // A stored plan whose [criteria] this version cannot read (written by a
    // newer one) leaves the lines to the options, with a warning.
    let criteria = gatehold::plot::plan_criteria(&f).unwrap_or_else(|e| {
        eprintln!(
            "warning: {}: {e}; criteria lines only from the options",
            args.file.display()
        );
        Default::default()
    });
    let criteria = args.criteria.over(&criteria)?;
    let outcome = gatehold::plot::sweep_plots_with(&f, &args.out, &criteria)?;
    for note in &outcome.notes {
        eprintln!("note: {}", note.reason);
    }
    for p in &outcome.files {
        println!("{}", p.display());
    }
    Ok(Exit::missing_if(outcome.figures_missing()))
}
