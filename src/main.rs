//! The `gatehold` command: parses arguments, dispatches to the library and
//! turns errors into exit codes (0 ok, 1 bad input or failure, 2 finished
//! with figures missing because a solve did not converge or a range was short).

use std::path::PathBuf;
use std::process::ExitCode;

use anyhow::{Context, Result};
use clap::{Parser, Subcommand};

mod cli_demo;
mod cli_sweep;
use gatehold::device::{load_device, template, Architecture};
use gatehold::run::{evaluate, Observer, Silent};

#[derive(Parser)]
#[command(
    name = "gatehold",
    version,
    about = "How short can the gate be? 2D electrostatic integrity of short-gate transistors (screening level)"
)]
struct Cli {
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
    },
    /// Natural length of the device's stack or cross-section, numeric beside the closed forms.
    Lambda {
        /// Device file (TOML).
        device: PathBuf,
        /// Print one JSON object instead of the text.
        #[arg(long)]
        json: bool,
    },
    /// Solve (planar) or predict (fins, wires) several gate lengths, beside the theory.
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
    },
    /// Run a plan of geometries in parallel into one HDF5 file.
    Sweep(cli_sweep::SweepArgs),
    /// Join shard files of one plan into one HDF5 file.
    Merge(cli_sweep::MergeArgs),
    /// Plots from a sweep file: roll-off, DIBL and SS against L_g, I_D-V_G, maps.
    Plot(cli_sweep::PlotArgs),
    /// Built-in demonstration: an invented node built four ways, swept over gate length, with plots.
    Demo(cli_demo::DemoArgs),
    /// Print a commented device file to start from.
    Template {
        /// bulk | thin-body | double-gate | tri-gate | gate-all-around | capped-fin
        architecture: String,
    },
}

/// Bias-point progress on stderr.
struct Dots {
    enabled: bool,
    count: std::sync::atomic::AtomicUsize,
}

impl Observer for Dots {
    fn bias_point(&self, _vds: f64, _vgs: f64, converged: bool) {
        if self.enabled {
            let n = self
                .count
                .fetch_add(1, std::sync::atomic::Ordering::Relaxed)
                + 1;
            eprint!("{}", if converged { "." } else { "x" });
            if n.is_multiple_of(60) {
                eprintln!();
            }
        }
    }
}

fn run(cli: Cli) -> Result<u8> {
    match cli.command {
        Command::Run {
            device,
            json,
            curves,
            plots,
            quiet,
        } => {
            let s = load_device(&device)
                .with_context(|| format!("device file {}", device.display()))?;
            use std::io::IsTerminal;
            let dots = Dots {
                enabled: !quiet && !json && std::io::stderr().is_terminal(),
                count: 0.into(),
            };
            let observer: &dyn Observer = if dots.enabled { &dots } else { &Silent };
            let ev = evaluate(&s, observer)?;
            if dots.enabled {
                eprintln!();
            }
            let r = &ev.report;
            if json {
                println!("{}", serde_json::to_string_pretty(r)?);
            } else {
                print!("{}", gatehold::summary::device_text(r));
            }
            if let Some(path) = curves {
                std::fs::write(&path, gatehold::summary::curves_csv(r))
                    .with_context(|| format!("writing {}", path.display()))?;
            }
            if let Some(dir) = plots {
                match &ev.solution {
                    Some(sol) => {
                        for p in gatehold::plot::device_plots(sol, &dir)? {
                            eprintln!("wrote {}", p.display());
                        }
                    }
                    None => eprintln!("no plots: {} devices are predicted from theory, not solved along the channel", s.architecture),
                }
            }
            Ok(if r.problems.is_empty() { 0 } else { 2 })
        }
        Command::Lambda { device, json } => {
            let s = load_device(&device)
                .with_context(|| format!("device file {}", device.display()))?;
            let r = gatehold::theory::lambda_report(&s)?;
            if json {
                println!("{}", serde_json::to_string_pretty(&r)?);
            } else {
                print!("{}", gatehold::theory::render_text(&r));
            }
            Ok(0)
        }
        Command::Scan {
            device,
            lengths,
            json,
            jobs,
        } => {
            let s = load_device(&device)
                .with_context(|| format!("device file {}", device.display()))?;
            let pool = rayon::ThreadPoolBuilder::new()
                .num_threads(jobs.unwrap_or(0))
                .build()?;
            use std::io::IsTerminal;
            let dots = Dots {
                enabled: !json && std::io::stderr().is_terminal(),
                count: 0.into(),
            };
            let r = pool.install(|| gatehold::scan::scan(&s, &lengths, &dots))?;
            if dots.enabled {
                eprintln!();
            }
            if json {
                println!("{}", serde_json::to_string_pretty(&r)?);
            } else {
                print!("{}", gatehold::scan::render_text(&r));
            }
            Ok(if r.rows.iter().all(|row| row.status == "ok") {
                0
            } else {
                2
            })
        }
        // Sweep handlers: 0 all ok, 1 some point failed, 3 stopped early.
        Command::Sweep(a) => Ok(match cli_sweep::sweep(&a)? {
            0 => 0,
            1 => 2,
            _ => 3,
        }),
        Command::Merge(a) => Ok(if cli_sweep::merge(&a)? == 0 { 0 } else { 2 }),
        Command::Plot(a) => Ok(cli_sweep::plot(&a)? as u8),
        Command::Demo(a) => Ok(if cli_demo::demo(&a)? == 0 { 0 } else { 2 }),
        Command::Template { architecture } => {
            let arch = Architecture::from_name(&architecture).with_context(|| {
                format!(
                    "unknown architecture \"{architecture}\"; known: {}",
                    Architecture::ALL.map(|a| a.name()).join(", ")
                )
            })?;
            print!("{}", template::template(arch));
            Ok(0)
        }
    }
}

fn main() -> ExitCode {
    let cli = Cli::parse();
    match run(cli) {
        Ok(code) => ExitCode::from(code),
        Err(e) => {
            eprintln!("error: {e:#}");
            ExitCode::from(1)
        }
    }
}
