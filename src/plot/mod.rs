//! Figures (PNG and SVG, plotters with the embedded DejaVu font; no system fonts).
//!
//! Drawing only: every curve comes from the data handed in (the theory
//! curves from the columns the sweep stored beside the solved figures).
//! Each figure is first described ([`figure::Figure`], [`map::MapFigure`],
//! built from the data by [`describe`]) and only then drawn ([`draw`]), and
//! a file is written only for a figure that has something to draw.
//!
//! Entry points: [`sweep_plots`] (everything a sweep file holds, with the
//! plan's criteria), [`sweep_plots_with`] (other criteria, and notes on what
//! was left out), [`device_plots`] (one solved device), [`fin_plots`] (one
//! fin or wire solved in 3D: cross-section at the barrier, along-channel
//! slice through the leakiest line, band edge along it), and the single
//! figures [`figure_vs_length`], [`iv_plot`], [`map_plot`], [`band_plot`].
//! Solved values are solid lines with filled markers; theory is dashed with
//! hollow markers and "(theory)" in its label; points without a value are
//! crossed on the x axis and counted in the legend; criteria are dotted
//! lines and each series' shortest compliant length is ringed.
//! Colour scheme ("harbour"): deep teal, brick, ochre, slate blue, moss, plum,
//! ink, rose; potential maps run from deep blue through sea green and straw to brick.

use std::error::Error;
use std::path::{Path, PathBuf};
use std::sync::OnceLock;

use plotters::prelude::*;

use crate::evaluate::{Criteria, DeviceSolution};
use crate::io::{CurveData, MapData, SweepFile};

pub mod describe;
pub mod figure;
pub mod fin;
pub mod map;

use figure::{Figure, Style, Trace};
use map::MapFigure;

/// The font family registered from the embedded DejaVu Sans.
pub const FONT: &str = "sans-serif";

/// Line colours, in order of use.
pub const PALETTE: [RGBColor; 8] = [
    RGBColor(0x0f, 0x6e, 0x7a), // deep teal
    RGBColor(0xb2, 0x3a, 0x2e), // brick
    RGBColor(0xc9, 0x8b, 0x16), // ochre
    RGBColor(0x4a, 0x5d, 0x9c), // slate blue
    RGBColor(0x5c, 0x8a, 0x3a), // moss
    RGBColor(0x8a, 0x4f, 0x86), // plum
    RGBColor(0x26, 0x2b, 0x33), // ink
    RGBColor(0xd6, 0x7a, 0x8c), // rose
];

/// Stops of the potential-map colour scale, low to high.
const SCALE: [(u8, u8, u8); 5] = [
    (0x14, 0x2f, 0x5c),
    (0x2a, 0x8c, 0x82),
    (0xe8, 0xd8, 0x8f),
    (0xe0, 0x8e, 0x45),
    (0x9b, 0x2d, 0x25),
];

/// A figure could not be drawn.
#[derive(Debug, thiserror::Error)]
pub enum PlotError {
    #[error("font registration failed: {0}")]
    Font(String),
    #[error("{path}: {reason}")]
    Draw { path: String, reason: String },
    #[error("nothing to plot: {0}")]
    Empty(String),
}

/// A named series of (x, y) points.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Series {
    pub label: String,
    pub points: Vec<(f64, f64)>,
}

fn fonts() -> Result<(), PlotError> {
    static DONE: OnceLock<Result<(), String>> = OnceLock::new();
    DONE.get_or_init(|| {
        plotters::style::register_font(FONT, FontStyle::Normal, dejavu::sans::regular())
            .map_err(|_| "DejaVu Sans regular".to_string())?;
        plotters::style::register_font(FONT, FontStyle::Bold, dejavu::sans::bold())
            .map_err(|_| "DejaVu Sans bold".to_string())
    })
    .clone()
    .map_err(PlotError::Font)
}

type DrawResult = Result<(), Box<dyn Error>>;

/// The legend box of plotters' own legend (the figures here draw their own
/// legend panel, [`draw`]).
#[allow(dead_code)]
fn draw_legend<'a, DB: DrawingBackend + 'a, CT: plotters::coord::CoordTranslate>(
    chart: &mut ChartContext<'a, DB, CT>,
    font_size: u32,
    position: SeriesLabelPosition,
) -> DrawResult
where
    DB::ErrorType: 'static,
{
    chart
        .configure_series_labels()
        .position(position)
        .border_style(BLACK)
        .background_style(WHITE.mix(0.85))
        .label_font((FONT, font_size))
        .draw()?;
    Ok(())
}

/// A solid labelled line in colour `c` on a linear chart.
#[allow(dead_code)]
fn draw_solid<'a, DB: DrawingBackend + 'a>(
    chart: &mut ChartContext<
        'a,
        DB,
        Cartesian2d<plotters::coord::types::RangedCoordf64, plotters::coord::types::RangedCoordf64>,
    >,
    s: &Series,
    c: RGBColor,
) -> DrawResult
where
    DB::ErrorType: 'static,
{
    chart
        .draw_series(LineSeries::new(s.points.iter().copied(), c.stroke_width(2)))?
        .label(&s.label)
        .legend(move |(x, y)| PathElement::new(vec![(x, y), (x + 18, y)], c.stroke_width(2)));
    Ok(())
}

/// Draws the same figure to `dir/stem.png` and `dir/stem.svg` (both removed
/// again if drawing fails, so that no partial file is left).
macro_rules! render {
    ($dir:expr, $stem:expr, $size:expr, |$root:ident| $body:expr) => {{
        fonts()?;
        std::fs::create_dir_all($dir).map_err(|e| PlotError::Draw {
            path: $dir.display().to_string(),
            reason: e.to_string(),
        })?;
        let png = $dir.join(format!("{}.png", $stem));
        let svg = $dir.join(format!("{}.svg", $stem));
        {
            let $root = BitMapBackend::new(&png, $size).into_drawing_area();
            let r: DrawResult = (|| {
                $root.fill(&WHITE)?;
                $body?;
                $root.present()?;
                Ok(())
            })();
            r.map_err(|e| {
                let _ = std::fs::remove_file(&png);
                PlotError::Draw {
                    path: png.display().to_string(),
                    reason: e.to_string(),
                }
            })?;
        }
        {
            let $root = SVGBackend::new(&svg, $size).into_drawing_area();
            let r: DrawResult = (|| {
                $root.fill(&WHITE)?;
                $body?;
                $root.present()?;
                Ok(())
            })();
            r.map_err(|e| {
                let _ = std::fs::remove_file(&png);
                let _ = std::fs::remove_file(&svg);
                PlotError::Draw {
                    path: svg.display().to_string(),
                    reason: e.to_string(),
                }
            })?;
        }
        Ok::<Vec<PathBuf>, PlotError>(vec![png, svg])
    }};
}

#[allow(dead_code)]
fn span(vals: impl Iterator<Item = f64>) -> Option<(f64, f64)> {
    let (lo, hi) = vals
        .filter(|v| v.is_finite())
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), v| {
            (a.min(v), b.max(v))
        });
    if !lo.is_finite() {
        return None;
    }
    let pad = if hi > lo {
        0.06 * (hi - lo)
    } else {
        0.5 * lo.abs().max(1.0)
    };
    Some((lo - pad, hi + pad))
}

fn scale_colour(t: f64) -> RGBColor {
    let t = if t.is_finite() {
        t.clamp(0.0, 1.0)
    } else {
        0.0
    } * (SCALE.len() - 1) as f64;
    let k = (t.floor() as usize).min(SCALE.len() - 2);
    let f = t - k as f64;
    let (a, b) = (SCALE[k], SCALE[k + 1]);
    let mix = |p: u8, q: u8| (p as f64 + f * (q as f64 - p as f64)).round() as u8;
    RGBColor(mix(a.0, b.0), mix(a.1, b.1), mix(a.2, b.2))
}

pub mod draw;

/// Writes a described figure to `dir/STEM.png` and `.svg`; refuses (and
/// writes nothing) when it has nothing to draw.
pub fn write_figure(dir: &Path, fig: &Figure) -> Result<Vec<PathBuf>, PlotError> {
    if !fig.is_drawable() {
        return Err(PlotError::Empty(format!("{}: no finite values", fig.stem)));
    }
    render!(dir, &fig.stem, draw::FIGURE_SIZE, |root| draw::draw_figure(
        &root, fig
    ))
}

/// Writes a described potential map to `dir/STEM.png` and `.svg`.
pub fn write_map(dir: &Path, fig: &MapFigure<'_>) -> Result<Vec<PathBuf>, PlotError> {
    render!(dir, &fig.stem, draw::MAP_SIZE, |root| draw::draw_map(
        &root, fig
    ))
}

/// A figure against gate length: solved series (solid lines, filled
/// markers) and optional theory series (dashed, hollow markers,
/// "(theory)"); a theory series takes the colour of the solved series of the
/// same label. Writes `dir/stem.png` and `.svg`.
pub fn figure_vs_length(
    dir: &Path,
    stem: &str,
    title: &str,
    y_desc: &str,
    solved: &[Series],
    theory: &[Series],
) -> Result<Vec<PathBuf>, PlotError> {
    let mut fig = Figure::new(stem, title, "gate length L_g (nm)", y_desc);
    for (k, s) in solved.iter().enumerate() {
        fig.traces.push(Trace {
            label: s.label.clone(),
            points: s.points.clone(),
            style: Style::solved(k),
        });
    }
    for (k, s) in theory.iter().enumerate() {
        let c = solved
            .iter()
            .position(|m| m.label == s.label)
            .unwrap_or(solved.len() + k);
        fig.traces.push(Trace {
            label: format!("{} (theory)", s.label),
            points: s.points.clone(),
            style: Style::theory(c),
        });
    }
    write_figure(dir, &fig)
}

/// I_D-V_G on a log scale at both drain biases (`vds` = (lin, sat), V).
pub fn iv_plot(
    dir: &Path,
    stem: &str,
    title: &str,
    curve: &CurveData,
    vds: (f64, f64),
) -> Result<Vec<PathBuf>, PlotError> {
    let fig = describe::iv_figure(stem, title, curve, vds, (None, None), None)
        .ok_or_else(|| PlotError::Empty(format!("{stem}: no converged drain current")))?;
    write_figure(dir, &fig)
}

/// The potential map (`psi` node values, V) with region outlines; metal grey.
pub fn map_plot(
    dir: &Path,
    stem: &str,
    title: &str,
    map: &MapData,
    psi: &[f64],
) -> Result<Vec<PathBuf>, PlotError> {
    let fig = MapFigure::new(stem, title, map, psi).ok_or_else(|| {
        PlotError::Empty(format!(
            "{stem}: potential has {} values for a {}x{} mesh",
            psi.len(),
            map.nx(),
            map.ny()
        ))
    })?;
    write_map(dir, &fig)
}

/// Channel-carrier band edge along the leakiest row at both drain biases
/// (off-state gate voltage); `vds` = (lin, sat), V.
pub fn band_plot(
    dir: &Path,
    stem: &str,
    title: &str,
    map: &MapData,
    vds: (f64, f64),
) -> Result<Vec<PathBuf>, PlotError> {
    let fig = describe::band_figure(stem, title, map, vds)
        .ok_or_else(|| PlotError::Empty(format!("{stem}: no converged off-state potential")))?;
    write_figure(dir, &fig)
}

/// Files written, and what was left out and why (for the caller to show).
#[derive(Debug, Clone, Default, PartialEq)]
pub struct PlotOutcome {
    pub files: Vec<PathBuf>,
    pub notes: Vec<describe::Omission>,
}

impl PlotOutcome {
    /// True when a figure the data should have held is missing.
    pub fn figures_missing(&self) -> bool {
        self.notes.iter().any(|n| n.expected)
    }
}

fn write_point(
    dir: &Path,
    p: &describe::PointFigures<'_>,
    out: &mut PlotOutcome,
) -> Result<(), PlotError> {
    if let Some(iv) = &p.iv {
        out.files.extend(write_figure(dir, iv)?);
    }
    if let Some(m) = &p.map {
        out.files.extend(write_map(dir, m)?);
    }
    if let Some(b) = &p.band {
        out.files.extend(write_figure(dir, b)?);
    }
    Ok(())
}

/// All figures of one solved device into `dir`: `iv`, `potential_map`, `band`.
pub fn device_plots(sol: &DeviceSolution, dir: &Path) -> Result<Vec<PathBuf>, PlotError> {
    let map = MapData::of(sol);
    let (fig, notes) = describe::device_figures(sol, &map);
    let mut out = PlotOutcome::default();
    match fig {
        Some(p) => write_point(dir, &p, &mut out)?,
        None => {
            let why: Vec<String> = notes.into_iter().map(|n| n.reason).collect();
            return Err(PlotError::Empty(why.join("; ")));
        }
    }
    Ok(out.files)
}

/// All figures of one fin or wire solved in 3D into `dir` ([`fin::fin_figures`]):
/// `iv`, `cross_section`, `along_channel` and `band`, each stem ending in
/// `suffix`. What the data cannot hold is left out with a note, never
/// written as an empty file.
pub fn fin_plots(sol: &DeviceSolution, dir: &Path, suffix: &str) -> Result<PlotOutcome, PlotError> {
    let f = fin::fin_figures(sol, suffix);
    let mut out = PlotOutcome {
        files: Vec::new(),
        notes: f.notes.clone(),
    };
    if let Some(iv) = &f.iv {
        out.files.extend(write_figure(dir, iv)?);
    }
    for s in [&f.cross_section, &f.along_channel].into_iter().flatten() {
        if let Some(m) = s.figure() {
            out.files.extend(write_map(dir, &m)?);
        }
    }
    if let Some(b) = &f.band {
        out.files.extend(write_figure(dir, b)?);
    }
    Ok(out)
}

/// The `[criteria]` of the plan stored in a sweep file (none: empty).
pub fn plan_criteria(f: &SweepFile) -> Result<Criteria, PlotError> {
    crate::sweep::plan::criteria_from_text(&f.meta.plan)
        .map_err(|e| PlotError::Empty(format!("the stored plan's [criteria]: {e}")))
}

/// Every figure a sweep file supports, into `dir`, judged against the
/// plan's own `[criteria]`: see [`sweep_plots_with`].
pub fn sweep_plots(f: &SweepFile, dir: &Path) -> Result<Vec<PathBuf>, PlotError> {
    let criteria = plan_criteria(f)?;
    Ok(sweep_plots_with(f, dir, &criteria)?.files)
}

/// Every figure a sweep file supports, into `dir`: `vt_rolloff`, `dibl`,
/// `ss` against L_g (one series per combination of the other axes, theory
/// beside them, `criteria` as lines with each series' shortest compliant
/// length ringed), and for every point holding a map (else the first ok
/// point with curves) `iv_NAME`, `potential_map_NAME`, `band_NAME`, NAME
/// made of the point's axis values (e.g. `iv_Lg-20nm_tsi-7nm`). Figures with
/// nothing to draw are left out with a note; no file is started before its
/// data is known to be drawable.
pub fn sweep_plots_with(
    f: &SweepFile,
    dir: &Path,
    criteria: &Criteria,
) -> Result<PlotOutcome, PlotError> {
    let mut out = PlotOutcome::default();
    let length = describe::length_figures(f, criteria);
    if length.is_empty() {
        out.notes.push(describe::Omission {
            reason: "no roll-off, DIBL or SS figure: no point of this file has those figures"
                .into(),
            expected: !f.rows.is_empty(),
        });
    }
    for fig in &length {
        out.files.extend(write_figure(dir, fig)?);
    }
    let (points, notes) = describe::point_figures(f);
    out.notes.extend(notes);
    for p in &points {
        write_point(dir, p, &mut out)?;
    }
    Ok(out)
}

pub mod pitch;
