//! `gatehold pitch DEVICE.toml --pitch NM`: every split of a contacted gate
//! pitch into gate, spacers and contact, solved in parallel, with the best
//! compliant split.

use std::path::{Path, PathBuf};

use anyhow::{Context, Result};
use clap::Args;

use super::exit::{Exit, UsageError};
use super::progress::Dots;
use gatehold::device::{closest, parse_table, read_input_file, scenario_from_table, DeviceError};
use gatehold::evaluate::pitch::{run_pitch, split_table, splits, PitchSpec, PitchStudy, Split};
use gatehold::evaluate::{evaluate_alone, Criteria};
use gatehold::physics::{dielectric_permittivity, KNOWN_DIELECTRICS};
use gatehold::progress::Silent;
use gatehold::render::pitch::{pitch_json, pitch_text};

/// Default screening targets (common practice, not standards; the demo's defaults).
const DIBL_MAX_MV_PER_V: f64 = 100.0;
const SS_MAX_MV_PER_DEC: f64 = 80.0;

/// `gatehold pitch DEVICE.toml --pitch NM [--spacer-nm ..] [--spacer-material ..] [--contact-nm ..]`
#[derive(Debug, Clone, Args)]
pub struct PitchArgs {
    /// Planar device file (TOML): everything but the split keys.
    pub device: PathBuf,
    /// Contacted gate pitch, nm: L_g + 2 t_spacer + W_contact.
    #[arg(long, value_name = "NM", allow_negative_numbers = true, value_parser = positive_nm)]
    pub pitch: f64,
    /// Spacer thicknesses, nm, comma separated (default: the device file's geometry.spacer_thickness_nm).
    #[arg(long, value_delimiter = ',', value_name = "NM,NM,...", allow_negative_numbers = true, value_parser = positive_nm)]
    pub spacer_nm: Option<Vec<f64>>,
    /// Spacer materials, comma separated, e.g. Si3N4,SiOC,air (default: the device file's geometry.spacer).
    #[arg(long, value_delimiter = ',', value_name = "NAME,NAME,...", value_parser = spacer_material)]
    pub spacer_material: Option<Vec<String>>,
    /// Contact widths, nm, comma separated (default: the device file's geometry.contact_width_nm).
    #[arg(long, value_delimiter = ',', value_name = "NM,NM,...", allow_negative_numbers = true, value_parser = positive_nm)]
    pub contact_nm: Option<Vec<f64>>,
    /// Screening target on DIBL, mV/V (default 100; common practice, not a standard).
    #[arg(long, value_name = "MV_PER_V", allow_negative_numbers = true, value_parser = positive_target)]
    pub dibl_max: Option<f64>,
    /// Screening target on the larger SS, mV/dec (default 80; common practice, not a standard).
    #[arg(long, value_name = "MV_PER_DEC", allow_negative_numbers = true, value_parser = positive_target)]
    pub ss_max: Option<f64>,
    /// Print one JSON object (`rows`, `best`) instead of the table.
    #[arg(long)]
    pub json: bool,
    /// Write the pitch plots (C_gc against spacer thickness, tau and DIBL against L_g) into this folder.
    #[arg(long, value_name = "DIR")]
    pub plots: Option<PathBuf>,
    /// Splits solved at once (default: all cores).
    #[arg(long)]
    pub jobs: Option<usize>,
    /// No progress on stderr.
    #[arg(long)]
    pub quiet: bool,
}

/// `--pitch`, `--spacer-nm`, `--contact-nm`: a finite length > 0, nm. The
/// argument parser calls it, so a bad value is a usage error (exit 64) and
/// clap's message names the option and the value.
fn positive_nm(v: &str) -> Result<f64, String> {
    match v.trim().parse::<f64>() {
        Ok(x) if x.is_finite() && x > 0.0 => Ok(x),
        Ok(_) => Err("must be a finite length > 0 (nm)".into()),
        Err(_) if v.trim().is_empty() => Err(
            "empty: give a length in nm (lists are comma separated, without empty items)".into(),
        ),
        Err(_) => Err("not a number: give a length in nm".into()),
    }
}

/// `--dibl-max`, `--ss-max`: a finite number > 0 (a usage error otherwise).
fn positive_target(v: &str) -> Result<f64, String> {
    match v.trim().parse::<f64>() {
        Ok(x) if x.is_finite() && x > 0.0 => Ok(x),
        Ok(_) => Err("must be a finite number > 0".into()),
        Err(_) => Err("not a number".into()),
    }
}

/// `--spacer-material`: a dielectric the device file accepts as
/// `geometry.spacer` (a usage error otherwise, with the closest name).
fn spacer_material(v: &str) -> Result<String, String> {
    if dielectric_permittivity(v).is_some() {
        return Ok(v.to_string());
    }
    let hint = closest(v, KNOWN_DIELECTRICS.iter().copied())
        .map(|c| format!(" (did you mean \"{c}\"?)"))
        .unwrap_or_default();
    let what = if v.trim().is_empty() {
        "empty material name".to_string()
    } else {
        format!("unknown spacer material{hint}")
    };
    Err(format!("{what}; known: {}", KNOWN_DIELECTRICS.join(", ")))
}

fn missing(option: &str, key: &str, path: &Path) -> UsageError {
    UsageError(format!(
        "{option}: not given, and the device file {} has no {key} to default to (give {option})",
        path.display()
    ))
}

/// A list option's value given twice would solve the same splits twice: a usage error.
fn no_repeats<T: PartialEq + std::fmt::Display>(
    option: &str,
    list: &[T],
) -> Result<(), UsageError> {
    match list
        .iter()
        .enumerate()
        .find(|(k, v)| list[..*k].contains(v))
    {
        Some((_, v)) => Err(UsageError(format!(
            "{option}: {v} is given twice (each value once)"
        ))),
        None => Ok(()),
    }
}

/// Runs `gatehold pitch`.
pub fn pitch(a: &PitchArgs) -> Result<Exit> {
    let path: &Path = &a.device;
    let text = read_input_file(path)
        .map_err(|(path, reason)| DeviceError::Io { path, reason })
        .with_context(|| format!("device file {}", path.display()))?;
    let base = parse_table(&text).with_context(|| format!("device file {}", path.display()))?;
    let s =
        scenario_from_table(&base).with_context(|| format!("device file {}", path.display()))?;
    let contacts = s.geometry.contacts;
    let spec = PitchSpec {
        pitch_nm: a.pitch,
        spacer_thickness_nm: match &a.spacer_nm {
            Some(v) => v.clone(),
            None => vec![
                contacts
                    .ok_or_else(|| missing("--spacer-nm", "geometry.spacer_thickness_nm", path))?
                    .spacer_thickness_nm,
            ],
        },
        spacers: match &a.spacer_material {
            Some(v) => v.clone(),
            // The splits name their spacer by material: a device file that
            // gives geometry.spacer_permittivity instead has none to lend.
            None if dielectric_permittivity(&s.geometry.spacer_material).is_none() => {
                return Err(UsageError(format!(
                    "--spacer-material: not given, and the device file {} gives geometry.spacer_permittivity = {} rather than a material (geometry.spacer); give --spacer-material NAME,... ({})",
                    path.display(),
                    s.geometry.spacer_eps,
                    KNOWN_DIELECTRICS.join(", ")
                ))
                .into())
            }
            None => vec![s.geometry.spacer_material.clone()],
        },
        contact_width_nm: match &a.contact_nm {
            Some(v) => v.clone(),
            None => vec![
                contacts
                    .ok_or_else(|| missing("--contact-nm", "geometry.contact_width_nm", path))?
                    .contact_width_nm,
            ],
        },
    };
    no_repeats("--spacer-nm", &spec.spacer_thickness_nm)?;
    no_repeats("--contact-nm", &spec.contact_width_nm)?;
    no_repeats("--spacer-material", &spec.spacers)?;
    // Options that leave no gate at all are the command line's fault alone.
    let (todo, skipped) = splits(&spec);
    if let (true, Some((_, why))) = (todo.is_empty(), skipped.first()) {
        return Err(UsageError(format!(
            "--pitch {}: no split leaves a positive gate length ({why}); give a larger --pitch or smaller --spacer-nm / --contact-nm",
            spec.pitch_nm
        ))
        .into());
    }
    let criteria = Criteria {
        dibl_max_mv_per_v: Some(a.dibl_max.unwrap_or(DIBL_MAX_MV_PER_V)),
        ss_max_mv_per_dec: Some(a.ss_max.unwrap_or(SS_MAX_MV_PER_DEC)),
        vt_rolloff_max_mv: None,
    };
    let jobs = super::capped_jobs(a.jobs.unwrap_or(0));
    let pool = rayon::ThreadPoolBuilder::new().num_threads(jobs).build()?;
    let dots = Dots::new(!a.quiet && !a.json);
    let study = pool.install(|| run_pitch(&base, &spec, &criteria, &dots));
    dots.finish();
    let study = study?;
    if a.json {
        println!("{}", serde_json::to_string_pretty(&pitch_json(&study))?);
    } else {
        print!("{}", pitch_text(&study));
    }
    if let Some(dir) = &a.plots {
        for p in plots(&base, &study, dir)? {
            eprintln!("wrote {}", p.display());
        }
    }
    Ok(Exit::missing_if(
        study.rows.iter().any(|r| r.status != "ok"),
    ))
}

/// The study's figures, and the potential map of the best split with its
/// plugs (that split solved once more, for its fields).
fn plots(base: &toml::Table, study: &PitchStudy, dir: &Path) -> Result<Vec<PathBuf>> {
    let mut out = gatehold::plot::pitch::pitch_plots(study, dir)?;
    if let Some(i) = study.best_index {
        let r = &study.rows[i];
        let split = Split {
            gate_length_nm: r.gate_length_nm,
            spacer_thickness_nm: r.spacer_thickness_nm,
            spacer: r.spacer.clone(),
            contact_width_nm: r.contact_width_nm,
        };
        let s = scenario_from_table(&split_table(base, study.pitch_nm, &split))?;
        if let Some(sol) = evaluate_alone(&s, &Silent)?.solution {
            out.extend(gatehold::plot::pitch::plug_map(
                &sol,
                dir,
                "pitch_best_map",
            )?);
        }
    }
    Ok(out)
}

/// The demo's pitch study (data: [`gatehold::demo::pitch`]) into `out`:
/// `pitch.txt` and the pitch figures. Returns the table and whether a
/// figure is missing.
pub fn demo_part(
    out: &Path,
    jobs: usize,
    dibl_max: Option<f64>,
    ss_max: Option<f64>,
) -> Result<(String, bool)> {
    let base = gatehold::demo::pitch::base_table();
    let criteria = Criteria {
        dibl_max_mv_per_v: Some(dibl_max.unwrap_or(DIBL_MAX_MV_PER_V)),
        ss_max_mv_per_dec: Some(ss_max.unwrap_or(SS_MAX_MV_PER_DEC)),
        vt_rolloff_max_mv: None,
    };
    let pool = rayon::ThreadPoolBuilder::new().num_threads(jobs).build()?;
    let study = pool
        .install(|| run_pitch(&base, &gatehold::demo::pitch::spec(), &criteria, &Silent))
        .context("demo pitch study")?;
    let text = pitch_text(&study);
    let file = out.join(gatehold::demo::pitch::PITCH_FILE);
    std::fs::write(&file, &text).with_context(|| format!("writing {}", file.display()))?;
    plots(&base, &study, out).context("demo pitch plots")?;
    Ok((text, study.rows.iter().any(|r| r.status != "ok")))
}

/// Appends `text` to the file at `path` (the demo's summary).
pub fn append(path: &Path, text: &str) -> Result<()> {
    use std::io::Write;
    std::fs::OpenOptions::new()
        .append(true)
        .open(path)
        .and_then(|mut f| f.write_all(text.as_bytes()))
        .with_context(|| format!("writing {}", path.display()))
}
