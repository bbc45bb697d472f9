//! Temporary development binary (deleted before the final commit): the sweep subcommands.
#[path = "../cli_sweep.rs"]
mod cli_sweep;

use clap::{Parser, Subcommand};

#[derive(Parser)]
struct Cli {
    #[command(subcommand)]
    cmd: Cmd,
}

#[derive(Subcommand)]
enum Cmd {
    Sweep(cli_sweep::SweepArgs),
    Merge(cli_sweep::MergeArgs),
    Plot(cli_sweep::PlotArgs),
}

fn main() {
    let cli = Cli::parse();
    let r = match &cli.cmd {
        Cmd::Sweep(a) => cli_sweep::sweep(a),
        Cmd::Merge(a) => cli_sweep::merge(a),
        Cmd::Plot(a) => cli_sweep::plot(a),
    };
    match r {
        Ok(code) => std::process::exit(code),
        Err(e) => {
            eprintln!("error: {e:#}");
            std::process::exit(2);
        }
    }
}
