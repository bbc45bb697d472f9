//! `gatehold run`, `lambda`, `scan` and `template`: one device file.

use std::path::{Path, PathBuf};

use anyhow::{Context, Result};

use super::exit::Exit;
use super::progress::Dots;
use gatehold::device::{load_device, template, Architecture, FinMethod, Scenario};
use gatehold::evaluate::{evaluate_alone, natural_length, scan::scan_with};
use gatehold::progress::Silent;
use gatehold::render;
use gatehold::theory::short_channel::TheoryLength;

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
    fins: Option<FinMethod>,
) -> Result<Exit> {
    let mut s = load(device)?;
    if let Some(m) = fins {
        s.fin_method = m;
    }
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
    let mut figures_missing = false;
    if let Some(dir) = plots {
        match &ev.solution {
            Some(sol) => {
                for p in gatehold::plot::device_plots(sol, dir)? {
                    eprintln!("wrote {}", p.display());
                }
            }
            None => match &ev.solution_3d {
                Some(sol) => {
                    let out = gatehold::plot::fin_plots(sol, dir, "")?;
                    for p in &out.files {
                        eprintln!("wrote {}", p.display());
                    }
                    for n in &out.notes {
                        eprintln!("note: {}", n.reason);
                    }
                    figures_missing = out.figures_missing();
                }
                None => eprintln!(
                    "no plots: {} devices evaluated by theory alone (--fins theory) are not solved along the channel",
                    s.architecture
                ),
            },
        }
    }
    Ok(Exit::missing_if(!r.problems.is_empty() || figures_missing))
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

/// Most gate lengths one `scan` takes (a sweep plan has no such limit).
pub const MAX_SCAN_LENGTHS: usize = 200;

/// `gatehold scan DEVICE.toml --lengths ...`
pub fn scan_lengths(
    device: &Path,
    lengths: &[f64],
    json: bool,
    jobs: Option<usize>,
    criteria: &super::criteria::CriteriaArgs,
    theory_length: &str,
    fins: Option<FinMethod>,
) -> Result<Exit> {
    if lengths.len() > MAX_SCAN_LENGTHS {
        anyhow::bail!(
            "--lengths: {} gate lengths; a scan takes at most {MAX_SCAN_LENGTHS} (use a sweep plan for more)",
            lengths.len()
        );
    }
    if let Some(d) = lengths
        .iter()
        .enumerate()
        .find(|(k, l)| lengths[..*k].contains(l))
    {
        anyhow::bail!("--lengths: {} nm is given twice", d.1);
    }
    let which = TheoryLength::from_name(theory_length)
        .with_context(|| format!("--theory-length {theory_length}: use gate or electrical"))?;
    let mut s = load(device)?;
    if let Some(m) = fins {
        s.fin_method = m;
    }
    let criteria = criteria.over(&Default::default())?;
    let pool = rayon::ThreadPoolBuilder::new()
        .num_threads(super::capped_jobs(jobs.unwrap_or(0)))
        .build()?;
    let dots = Dots::new(!json);
    let mut r = pool.install(|| scan_with(&s, lengths, which, &dots))?;
    dots.finish();
    r.judge(&criteria);
    if criteria.is_empty() && !json {
        eprintln!("hint: give --dibl-max, --ss-max (and --vt-rolloff-max) for the shortest compliant gate length");
    }
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

/// `gatehold check FILE [--plan]`: validation and the mesh estimate only.
pub fn check(file: &Path, plan: bool) -> Result<Exit> {
    let scenarios: Vec<Scenario> = if plan {
        gatehold::sweep::load_plan(file)?
            .points
            .into_iter()
            .map(|p| p.scenario)
            .collect()
    } else {
        vec![load(file)?]
    };
    let mut largest = 0.0f64;
    for s in &scenarios {
        for w in &s.warnings {
            eprintln!("warning: {w}");
        }
        largest = largest.max(gatehold::device::estimate_nodes(s).0);
    }
    println!(
        "{}: valid; {} device(s); largest mesh at least {:.0} nodes (about {:.2} GB)",
        file.display(),
        scenarios.len(),
        largest,
        largest * gatehold::device::BYTES_PER_NODE_ESTIMATE / 1e9
    );
    Ok(Exit::Done)
}
