//! `gatehold run`, `lambda`, `scan` and `template`: one device file.

use std::path::{Path, PathBuf};

use anyhow::{Context, Result};

use super::exit::Exit;
use super::progress::Dots;
use gatehold::device::{load_device, template, Architecture, Scenario};
use gatehold::evaluate::{evaluate_alone, natural_length, scan::scan};
use gatehold::progress::Silent;
use gatehold::render;

fn load(device: &Path) -> Result<Scenario> {
    load_device(device).with_context(|| format!("device file {}", device.display()))
}

/// `gatehold run DEVICE.toml`
pub fn run(
    device: &Path,
    json: bool,
    curves: Option<&PathBuf>,
    plots: Option<&PathBuf>,
    quiet: bool,
) -> Result<Exit> {
    let mut s = load(device)?;
    if curves.is_some() || plots.is_some() {
        // The curves and plots show the whole I_D-V_G curve on the user's grid.
        s.bias.points = s.bias.points.with_whole_curve();
    }
    let dots = Dots::new(!quiet && !json);
    let ev = evaluate_alone(&s, &dots)?;
    dots.finish();
    let r = &ev.report;
    if json {
        println!("{}", serde_json::to_string_pretty(r)?);
    } else {
        print!("{}", render::device::device_text(r));
    }
    if let Some(path) = curves {
        std::fs::write(path, render::device::curves_csv(r))
            .with_context(|| format!("writing {}", path.display()))?;
    }
    if let Some(dir) = plots {
        match &ev.solution {
            Some(sol) => {
                for p in gatehold::plot::device_plots(sol, dir)? {
                    eprintln!("wrote {}", p.display());
                }
            }
            None => eprintln!(
                "no plots: {} devices are predicted from theory, not solved along the channel",
                s.architecture
            ),
        }
    }
    Ok(Exit::missing_if(!r.problems.is_empty()))
}

/// `gatehold lambda DEVICE.toml`
pub fn lambda(device: &Path, json: bool) -> Result<Exit> {
    let s = load(device)?;
    let r = natural_length(&s, &Silent)?;
    if json {
        println!("{}", serde_json::to_string_pretty(&r)?);
    } else {
        print!("{}", render::lambda::render_text(&r));
    }
    Ok(Exit::Done)
}

/// `gatehold scan DEVICE.toml --lengths ...`
pub fn scan_lengths(
    device: &Path,
    lengths: &[f64],
    json: bool,
    jobs: Option<usize>,
) -> Result<Exit> {
    let s = load(device)?;
    let pool = rayon::ThreadPoolBuilder::new()
        .num_threads(super::capped_jobs(jobs.unwrap_or(0)))
        .build()?;
    let dots = Dots::new(!json);
    let r = pool.install(|| scan(&s, lengths, &dots))?;
    dots.finish();
    if json {
        println!("{}", serde_json::to_string_pretty(&r)?);
    } else {
        print!("{}", render::scan::render_text(&r));
    }
    Ok(Exit::missing_if(
        r.rows.iter().any(|row| !row.status.is_ok()),
    ))
}

/// `gatehold template ARCHITECTURE`
pub fn template(architecture: &str) -> Result<Exit> {
    let arch = Architecture::from_name(architecture).with_context(|| {
        format!(
            "unknown architecture \"{architecture}\"; known: {}",
            Architecture::ALL.map(|a| a.name()).join(", ")
        )
    })?;
    print!("{}", template::template(arch));
    Ok(Exit::Done)
}
