//! The command line: each command's handler, progress on stderr, and the
//! exit codes ([`exit::Exit`]). Only the binary uses this module.

pub mod criteria;
pub mod demo;
pub mod device;
pub mod exit;
pub mod interrupt;
pub mod pitch;
pub mod progress;
pub mod sweep;

use std::path::PathBuf;

use clap::{Parser, Subcommand};

use exit::Exit;
use gatehold::device::FinMethod;

#[derive(Parser)]
#[command(
    name = "gatehold",
    version,
    about = "How short can the gate be? 2D electrostatic integrity of short-gate transistors (screening level)"
)]
pub struct Cli {
    #[command(subcommand)]
    command: Command,
}

#[derive(Subcommand)]
enum Command {
    /// Solve one device: V_t, SS, DIBL, barrier lowering, roll-off.
    Run {
        /// Device file (TOML).
        device: PathBuf,
        /// Print one JSON object instead of the summary.
        #[arg(long)]
        json: bool,
        /// Write the I_D-V_G curves to this CSV file.
        #[arg(long, value_name = "FILE.csv")]
        curves: Option<PathBuf>,
        /// Write plots (I_D-V_G, potential map, band along the leakiest path) into this folder.
        #[arg(long, value_name = "DIR")]
        plots: Option<PathBuf>,
        /// No progress on stderr.
        #[arg(long)]
        quiet: bool,
        /// Fins and wires: "3d-solve" (default) or "theory" (cross-section and theory only).
        #[arg(long, value_name = "METHOD", value_parser = parse_fins)]
        fins: Option<FinMethod>,
    },
    /// Natural length of the device's stack or cross-section, numeric beside the closed forms.
    Lambda {
        /// Device file (TOML).
        device: PathBuf,
        /// Print one JSON object instead of the text.
        #[arg(long)]
        json: bool,
    },
    /// Solve several gate lengths (2D planar, 3D fins and wires), beside the theory.
    Scan {
        /// Device file (TOML).
        device: PathBuf,
        /// Gate lengths in nm, comma separated.
        #[arg(long, value_delimiter = ',', required = true, value_name = "NM,NM,...")]
        lengths: Vec<f64>,
        /// Print one JSON object instead of the table.
        #[arg(long)]
        json: bool,
        /// Worker threads (default: all cores).
        #[arg(long)]
        jobs: Option<usize>,
        #[command(flatten)]
        criteria: criteria::CriteriaArgs,
        /// The length the theory columns use: the gate length, or each length's solved L_elec.
        #[arg(long, value_name = "gate|electrical", default_value = "gate", value_parser = ["gate", "electrical"])]
        theory_length: String,
        /// Fins and wires: "3d-solve" (default) or "theory" (cross-section and theory only).
        #[arg(long, value_name = "METHOD", value_parser = parse_fins)]
        fins: Option<FinMethod>,
    },
    /// Run a plan of geometries in parallel into one HDF5 file.
    Sweep(sweep::SweepArgs),
    /// Join shard files of one plan into one HDF5 file.
    Merge(sweep::MergeArgs),
    /// Plots from a sweep file: roll-off, DIBL and SS against L_g, I_D-V_G, maps.
    Plot(sweep::PlotArgs),
    /// Built-in demonstration: an invented node built four ways, swept over gate length, with plots.
    Demo(demo::DemoArgs),
    /// Validate a device file (or, with --plan, a plan and every point's
    /// device) and estimate its mesh, without solving anything.
    #[command(hide = true)]
    Check {
        /// Device file (TOML), or a plan file with --plan.
        file: PathBuf,
        /// The file is a plan.
        #[arg(long)]
        plan: bool,
    },
    /// Print the device-file and plan reference (markdown; docs/device-file.md).
    #[command(hide = true)]
    Keys,
    /// Split a contacted gate pitch into gate, spacers and contact: every split solved, the best compliant one.
    Pitch(pitch::PitchArgs),
    /// Print a commented device file to start from.
    Template {
        /// bulk | thin-body | double-gate | tri-gate | gate-all-around | capped-fin | bulk-fin
        architecture: String,
    },
}

/// Parses `--fins METHOD` ("3d-solve" or "theory").
pub fn parse_fins(v: &str) -> Result<FinMethod, String> {
    FinMethod::from_name(v).ok_or_else(|| {
        format!("unknown fin method \"{v}\": use \"3d-solve\" (solved in 3D) or \"theory\" (cross-section and theory only)")
    })
}

/// The worker count to use for `--jobs N`: 0 means all cores; more than the
/// machine's cores is capped at the core count, with a warning on stderr.
pub fn capped_jobs(jobs: usize) -> usize {
    let cores = std::thread::available_parallelism()
        .map(|n| n.get())
        .unwrap_or(1);
    if jobs > cores {
        eprintln!("warning: --jobs {jobs} is more than the {cores} core(s) of this machine; using {cores}");
        cores
    } else {
        jobs
    }
}

/// A note on stderr when the sweep file at `path` was written without
/// checksums (before gatehold stored them): it reads as before, but damage
/// to its numbers cannot be detected.
pub fn note_unchecksummed(path: &std::path::Path) {
    if let Ok(unchecked) = gatehold::io::hdf5::unchecksummed_datasets(path) {
        if !unchecked.is_empty() {
            eprintln!(
                "note: {}: {} dataset(s) carry no checksum (written by an earlier gatehold), so damage to their numbers cannot be detected; `gatehold merge {} --out NEW.h5` rewrites it with checksums",
                path.display(),
                unchecked.len(),
                path.display()
            );
        }
    }
}

/// Runs the parsed command.
pub fn run(cli: Cli) -> anyhow::Result<Exit> {
    match cli.command {
        Command::Run {
            device,
            json,
            curves,
            plots,
            quiet,
            fins,
        } => device::run(&device, json, curves.as_ref(), plots.as_ref(), quiet, fins),
        Command::Lambda { device, json } => device::lambda(&device, json),
        Command::Scan {
            device,
            lengths,
            json,
            jobs,
            criteria,
            theory_length,
            fins,
        } => device::scan_lengths(
            &device,
            &lengths,
            json,
            jobs,
            &criteria,
            &theory_length,
            fins,
        ),
        Command::Sweep(a) => sweep::sweep(&a),
        Command::Merge(a) => sweep::merge(&a),
        Command::Plot(a) => sweep::plot(&a),
        Command::Demo(a) => demo::demo(&a),
        Command::Pitch(a) => pitch::pitch(&a),
        Command::Template { architecture } => device::template(&architecture),
        Command::Check { file, plan } => device::check(&file, plan),
        Command::Keys => {
            print!("{}", gatehold::render::keys::reference_markdown());
            Ok(Exit::Done)
        }
    }
}
