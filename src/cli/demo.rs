//! `gatehold demo`: the built-in scenario through the ordinary path, i.e. the
//! plan (data, [`gatehold::demo`]) into a sweep file, its plots, and the
//! summary of the shortest compliant length per architecture.

use std::path::PathBuf;
use std::time::Instant;

use anyhow::Context;
use clap::Args;

use super::exit::Exit;
use super::progress::Bar;
use gatehold::demo::{self, DemoOptions, SUMMARY_FILE, SWEEP_FILE};
use gatehold::device::FinMethod;
use gatehold::evaluate::Method;
use gatehold::render::summary::{demo_text, DemoSummary};
use gatehold::sweep::{self, SweepOptions};

/// `gatehold demo [--out DIR]`
#[derive(Debug, Clone, Args)]
pub struct DemoArgs {
    /// Output folder for sweep.h5, the figures and summary.txt (created if missing; its files are overwritten).
    #[arg(long, short, default_value = "gatehold-demo")]
    pub out: PathBuf,
    /// Points solved at once (default: all cores).
    #[arg(long, short, default_value_t = 0)]
    pub jobs: usize,
    /// --dibl-max, --ss-max (default: the demo plan's 100 mV/V and 80 mV/dec), --vt-rolloff-max (default: none).
    #[command(flatten)]
    pub criteria: super::criteria::CriteriaArgs,
    /// Gate lengths in nm, comma separated (default: the plan's 14 to 60 nm).
    #[arg(long, value_delimiter = ',', value_name = "NM,NM,...")]
    pub lengths: Option<Vec<f64>>,
    /// No progress bar.
    #[arg(long, short)]
    pub quiet: bool,
    /// The tri-gate: "3d-solve" (default) or "theory" (cross-section and theory only).
    #[arg(long, value_name = "METHOD", value_parser = super::parse_fins)]
    pub fins: Option<gatehold::device::FinMethod>,
}

/// The 3D figures of the demo's representative fin ([`demo::fin_figure_point`]):
/// the sweep file holds no 3D fields, so that one point is solved again
/// (the same scenario, so the same figures) and drawn. A point that failed
/// in the sweep, or a solve that fails now, is said on stderr, not drawn.
fn fin_plots(
    plan: &sweep::Plan,
    file: &gatehold::io::SweepFile,
    out: &std::path::Path,
) -> anyhow::Result<Vec<PathBuf>> {
    let Some(k) = demo::fin_figure_point(plan) else {
        return Ok(Vec::new());
    };
    let Some(row) = file.rows.iter().position(|r| r.index == k) else {
        return Ok(Vec::new());
    };
    let (_, name) = gatehold::plot::describe::point_name(file, row);
    if !file.rows[row].status.is_ok() {
        eprintln!("note: no 3D fin figures: demo point {k} ({name}) did not solve");
        return Ok(Vec::new());
    }
    let s = &plan.points[k].scenario;
    let ev = match gatehold::evaluate::evaluate_alone(s, &gatehold::progress::Silent) {
        Ok(ev) => ev,
        Err(e) => {
            eprintln!("note: no 3D fin figures: demo point {k} ({name}): {e}");
            return Ok(Vec::new());
        }
    };
    let Some(sol) = ev.solution_3d else {
        return Ok(Vec::new());
    };
    let done =
        gatehold::plot::fin_plots(&sol, out, &format!("_{name}")).context("demo fin plots")?;
    for n in &done.notes {
        eprintln!("note: {}", n.reason);
    }
    Ok(done.files)
}

/// Runs `gatehold demo`: prints the summary on stdout.
pub fn demo(args: &DemoArgs) -> anyhow::Result<Exit> {
    let t0 = Instant::now();
    let options = DemoOptions {
        lengths_nm: args.lengths.clone(),
        dibl_max_mv_per_v: args.criteria.dibl_max,
        ss_max_mv_per_dec: args.criteria.ss_max,
        fins: args.fins,
    };
    let mut plan = demo::plan(&options).context("demo plan")?;
    plan.criteria = plan
        .criteria
        .overridden(None, None, args.criteria.vt_rolloff_max)?;
    std::fs::create_dir_all(&args.out)
        .with_context(|| format!("cannot create {}", args.out.display()))?;
    let sweep_file = args.out.join(SWEEP_FILE);
    let opts = SweepOptions {
        jobs: super::capped_jobs(args.jobs),
        overwrite: true,
        command_line: std::env::args().collect::<Vec<_>>().join(" "),
        interrupt: Some(super::interrupt::install()),
        ..SweepOptions::default()
    };
    let bar = Bar::new("demo ", args.quiet);
    let run = sweep::run_sweep(&plan, &sweep_file, &opts, &bar);
    bar.0.finish_and_clear();
    let run = run.context("demo sweep")?;
    if !run.complete {
        eprintln!(
            "demo stopped early: {} holds the {} finished point(s); no plots or summary",
            sweep_file.display(),
            run.resumed + run.computed
        );
        return Ok(Exit::Stopped);
    }
    let file = gatehold::io::hdf5::read_sweep(&sweep_file)?;
    let mut plots = gatehold::plot::sweep_plots(&file, &args.out).context("demo plots")?;
    plots.extend(fin_plots(&plan, &file, &args.out)?);
    let series = sweep::shortest::per_series(&file, &plan.criteria)
        .into_iter()
        .map(|o| {
            let s = &plan.points[file.rows[o.rows[0]].index].scenario;
            let method = if s.architecture.is_planar() {
                Method::TwoDSolve
            } else if s.fin_method == FinMethod::Solve3d {
                Method::ThreeDSolve
            } else {
                Method::Theory
            };
            (o, method)
        })
        .collect();
    let mut lengths: Vec<f64> = plan
        .points
        .iter()
        .map(|p| p.scenario.geometry.gate_length_nm)
        .collect();
    lengths.sort_by(f64::total_cmp);
    lengths.dedup();
    let summary_file = args.out.join(SUMMARY_FILE);
    let summary = DemoSummary {
        lengths_nm: lengths,
        criteria: plan.criteria.clone(),
        points: file.rows.len(),
        failed_points: run.failed,
        elapsed_s: t0.elapsed().as_secs_f64(),
        series,
        sweep_file,
        figure_files: plots.len(),
        summary_file: summary_file.clone(),
    };
    let text = demo_text(&summary);
    std::fs::write(&summary_file, &text)
        .with_context(|| format!("writing {}", summary_file.display()))?;
    print!("{text}");
    let (pitch, pitch_missing) = super::pitch::demo_part(
        &args.out,
        opts.jobs,
        args.criteria.dibl_max,
        args.criteria.ss_max,
    )?;
    let pitch = format!("\nPitch study of the node (ridge-7 double gate):\n{pitch}");
    super::pitch::append(&summary_file, &pitch)?;
    print!("{pitch}");
    Ok(Exit::missing_if(run.failed > 0 || pitch_missing))
}
