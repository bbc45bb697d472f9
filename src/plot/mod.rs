//! Figures (PNG and SVG, plotters with the embedded DejaVu font; no system fonts).
//!
//! Drawing only: every curve comes from the data handed in (the theory
//! curves from the columns the sweep stored beside the solved figures).
//!
//! Entry points: [`sweep_plots`] (everything a sweep file holds),
//! [`device_plots`] (one solved device), and the single figures
//! [`figure_vs_length`], [`iv_plot`], [`map_plot`], [`band_plot`].
//! Colour scheme ("harbour"): deep teal, brick, ochre, slate blue, moss, plum,
//! ink, rose; potential maps run from deep blue through sea green and straw to brick.

use std::error::Error;
use std::path::{Path, PathBuf};
use std::sync::OnceLock;

use plotters::coord::Shift;
use plotters::prelude::*;

use crate::evaluate::DeviceSolution;
use crate::io::{series_labels, CurveData, MapData, SweepFile};

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

/// The legend box every figure uses.
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

/// Draws the same figure to `dir/stem.png` and `dir/stem.svg`.
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
            r.map_err(|e| PlotError::Draw {
                path: png.display().to_string(),
                reason: e.to_string(),
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
            r.map_err(|e| PlotError::Draw {
                path: svg.display().to_string(),
                reason: e.to_string(),
            })?;
        }
        Ok::<Vec<PathBuf>, PlotError>(vec![png, svg])
    }};
}

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

fn draw_vs_length<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    title: &str,
    y_desc: &str,
    solved: &[Series],
    theory: &[Series],
) -> DrawResult
where
    DB::ErrorType: 'static,
{
    let all = || solved.iter().chain(theory).flat_map(|s| s.points.iter());
    let (x0, x1) = span(all().map(|p| p.0)).ok_or("no finite values")?;
    let (y0, y1) = span(all().map(|p| p.1)).ok_or("no finite values")?;
    let mut chart = ChartBuilder::on(root)
        .caption(title, (FONT, 22))
        .margin(12)
        .x_label_area_size(45)
        .y_label_area_size(70)
        .build_cartesian_2d(x0..x1, y0..y1)?;
    chart
        .configure_mesh()
        .x_desc("gate length L_g (nm)")
        .y_desc(y_desc)
        .label_style((FONT, 14))
        .light_line_style(RGBColor(235, 235, 235))
        .draw()?;
    for (k, s) in solved.iter().enumerate() {
        let c = PALETTE[k % PALETTE.len()];
        draw_solid(&mut chart, s, c)?;
        chart.draw_series(s.points.iter().map(|&p| Circle::new(p, 4, c.filled())))?;
    }
    for (k, s) in theory.iter().enumerate() {
        let c = solved
            .iter()
            .position(|m| m.label == s.label)
            .map(|i| PALETTE[i % PALETTE.len()])
            .unwrap_or(PALETTE[(solved.len() + k) % PALETTE.len()]);
        chart
            .draw_series(DashedLineSeries::new(
                s.points.iter().copied(),
                8,
                5,
                c.stroke_width(2),
            ))?
            .label(format!("{} (theory)", s.label))
            .legend(move |(x, y)| PathElement::new(vec![(x, y), (x + 18, y)], c.stroke_width(1)));
    }
    draw_legend(&mut chart, 13, SeriesLabelPosition::UpperRight)
}

/// A figure against gate length: solved series (lines with markers) and
/// optional theory series (dashed). Writes `dir/stem.png` and `.svg`.
pub fn figure_vs_length(
    dir: &Path,
    stem: &str,
    title: &str,
    y_desc: &str,
    solved: &[Series],
    theory: &[Series],
) -> Result<Vec<PathBuf>, PlotError> {
    if solved.iter().chain(theory).all(|s| s.points.is_empty()) {
        return Err(PlotError::Empty(format!("{stem}: no finite values")));
    }
    render!(dir, stem, (900, 600), |root| draw_vs_length(
        &root, title, y_desc, solved, theory
    ))
}

fn draw_iv<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    title: &str,
    c: &CurveData,
    vds: (f64, f64),
) -> DrawResult
where
    DB::ErrorType: 'static,
{
    let pos = |v: &[f64]| -> Vec<(f64, f64)> {
        c.vgs_v
            .iter()
            .zip(v)
            .filter(|(_, i)| i.is_finite() && i.abs() > 0.0)
            .map(|(&g, &i)| (g, i.abs()))
            .collect()
    };
    let (lin, sat) = (pos(&c.id_lin), pos(&c.id_sat));
    let (x0, x1) = span(c.vgs_v.iter().copied()).ok_or("no gate voltages")?;
    let ys = lin.iter().chain(&sat).map(|p| p.1);
    let (lo, hi) = ys.fold((f64::INFINITY, 0f64), |(a, b), v| (a.min(v), b.max(v)));
    if !lo.is_finite() {
        return Err("no converged current".into());
    }
    let (lo, hi) = (
        10f64.powf(lo.log10().floor()),
        10f64.powf(hi.log10().ceil()).max(lo * 10.0),
    );
    let mut chart = ChartBuilder::on(root)
        .caption(title, (FONT, 22))
        .margin(12)
        .x_label_area_size(45)
        .y_label_area_size(80)
        .build_cartesian_2d(x0..x1, (lo..hi).log_scale())?;
    chart
        .configure_mesh()
        .x_desc("gate voltage V_GS (V)")
        .y_desc("|I_D| (A/um)")
        .y_label_formatter(&|v| format!("{v:.0e}"))
        .label_style((FONT, 14))
        .draw()?;
    for (k, (pts, v)) in [(lin, vds.0), (sat, vds.1)].into_iter().enumerate() {
        let col = PALETTE[k];
        chart
            .draw_series(LineSeries::new(pts.iter().copied(), col.stroke_width(2)))?
            .label(format!("V_DS = {v} V"))
            .legend(move |(x, y)| PathElement::new(vec![(x, y), (x + 18, y)], col.stroke_width(2)));
        chart.draw_series(pts.iter().map(|&p| Circle::new(p, 3, col.filled())))?;
    }
    draw_legend(&mut chart, 14, SeriesLabelPosition::LowerRight)
}

/// I_D-V_G on a log scale at both drain biases (`vds` = (lin, sat), V).
pub fn iv_plot(
    dir: &Path,
    stem: &str,
    title: &str,
    curve: &CurveData,
    vds: (f64, f64),
) -> Result<Vec<PathBuf>, PlotError> {
    render!(dir, stem, (900, 600), |root| draw_iv(
        &root, title, curve, vds
    ))
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

fn draw_map<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    title: &str,
    m: &MapData,
    psi: &[f64],
) -> DrawResult
where
    DB::ErrorType: 'static,
{
    let (nx, ny) = (m.nx(), m.ny());
    let (lo, hi) = psi
        .iter()
        .filter(|v| v.is_finite())
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), &v| {
            (a.min(v), b.max(v))
        });
    let range = (hi - lo).max(1e-12);
    let (main, bar) = root.split_horizontally(root.dim_in_pixel().0.saturating_sub(110));
    let (x0, x1) = (m.x_nm[0], m.x_nm[nx - 1]);
    let (y0, y1) = (m.y_nm[0], m.y_nm[ny - 1]);
    let mut chart = ChartBuilder::on(&main)
        .caption(title, (FONT, 20))
        .margin(12)
        .x_label_area_size(45)
        .y_label_area_size(60)
        .build_cartesian_2d(x0..x1, y1..y0)?;
    chart
        .configure_mesh()
        .disable_mesh()
        .x_desc("x (nm)")
        .y_desc("y (nm)")
        .label_style((FONT, 14))
        .draw()?;
    let metal = RGBColor(0xb8, 0xb8, 0xb8);
    chart.draw_series(
        (0..ny - 1)
            .flat_map(|j| (0..nx - 1).map(move |i| (i, j)))
            .map(|(i, j)| {
                let code = m.material[i + j * (nx - 1)];
                let c = if code >= 2 {
                    metal
                } else {
                    let v = 0.25
                        * (psi[i + j * nx]
                            + psi[i + 1 + j * nx]
                            + psi[i + (j + 1) * nx]
                            + psi[i + 1 + (j + 1) * nx]);
                    scale_colour((v - lo) / range)
                };
                Rectangle::new(
                    [(m.x_nm[i], m.y_nm[j]), (m.x_nm[i + 1], m.y_nm[j + 1])],
                    c.filled(),
                )
            }),
    )?;
    // Material outlines: cell edges between different materials.
    let mut segs = Vec::new();
    for j in 0..ny - 1 {
        for i in 0..nx - 1 {
            let c = m.material[i + j * (nx - 1)];
            if i + 1 < nx - 1 && m.material[i + 1 + j * (nx - 1)] != c {
                segs.push([(m.x_nm[i + 1], m.y_nm[j]), (m.x_nm[i + 1], m.y_nm[j + 1])]);
            }
            if j + 1 < ny - 1 && m.material[i + (j + 1) * (nx - 1)] != c {
                segs.push([(m.x_nm[i], m.y_nm[j + 1]), (m.x_nm[i + 1], m.y_nm[j + 1])]);
            }
        }
    }
    chart.draw_series(
        segs.into_iter()
            .map(|s| PathElement::new(s.to_vec(), BLACK.stroke_width(1))),
    )?;
    // Colour bar.
    let mut cb = ChartBuilder::on(&bar)
        .margin_top(40)
        .margin_bottom(57)
        .margin_right(10)
        .y_label_area_size(55)
        .build_cartesian_2d(0f64..1f64, lo..hi.max(lo + 1e-12))?;
    cb.configure_mesh()
        .disable_mesh()
        .disable_x_axis()
        .y_desc("potential (V)")
        .label_style((FONT, 12))
        .draw()?;
    let steps = 64;
    cb.draw_series((0..steps).map(|k| {
        let a = lo + range * k as f64 / steps as f64;
        let b = lo + range * (k + 1) as f64 / steps as f64;
        Rectangle::new(
            [(0.0, a), (1.0, b)],
            scale_colour((k as f64 + 0.5) / steps as f64).filled(),
        )
    }))?;
    Ok(())
}

/// The potential map (`psi` node values, V) with material outlines; metal grey.
pub fn map_plot(
    dir: &Path,
    stem: &str,
    title: &str,
    map: &MapData,
    psi: &[f64],
) -> Result<Vec<PathBuf>, PlotError> {
    if psi.len() != map.nx() * map.ny() || map.nx() < 2 || map.ny() < 2 {
        return Err(PlotError::Empty(format!(
            "{stem}: potential has {} values for a {}x{} mesh",
            psi.len(),
            map.nx(),
            map.ny()
        )));
    }
    render!(dir, stem, (1000, 560), |root| draw_map(
        &root, title, map, psi
    ))
}

fn draw_band<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    title: &str,
    m: &MapData,
    curves: &[Series],
) -> DrawResult
where
    DB::ErrorType: 'static,
{
    let (x0, x1) = (m.x_nm[0], m.x_nm[m.nx() - 1]);
    let (y0, y1) =
        span(curves.iter().flat_map(|s| s.points.iter().map(|p| p.1))).ok_or("no band values")?;
    let mut chart = ChartBuilder::on(root)
        .caption(title, (FONT, 20))
        .margin(12)
        .x_label_area_size(45)
        .y_label_area_size(70)
        .build_cartesian_2d(x0..x1, y0..y1)?;
    chart
        .configure_mesh()
        .x_desc("x along the channel (nm)")
        .y_desc("band edge - source Fermi level (eV)")
        .label_style((FONT, 14))
        .draw()?;
    for x in [m.gate_start_nm, m.gate_end_nm] {
        chart.draw_series(DashedLineSeries::new(
            vec![(x, y0), (x, y1)],
            6,
            4,
            RGBColor(150, 150, 150).stroke_width(1),
        ))?;
    }
    for (k, s) in curves.iter().enumerate() {
        draw_solid(&mut chart, s, PALETTE[k % PALETTE.len()])?;
    }
    draw_legend(&mut chart, 14, SeriesLabelPosition::UpperRight)
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
    let mut curves = Vec::new();
    for (psi, depth, v) in [
        (&map.psi_lin_v, map.leakiest_depth_lin_nm, vds.0),
        (&map.psi_sat_v, map.leakiest_depth_sat_nm, vds.1),
    ] {
        if let (Some(p), Some(d)) = (psi, depth) {
            curves.push(Series {
                label: format!("V_DS = {v} V (depth {d:.1} nm)"),
                points: map.band_along(p, d),
            });
        }
    }
    if curves.is_empty() {
        return Err(PlotError::Empty(format!(
            "{stem}: no converged off-state potential"
        )));
    }
    render!(dir, stem, (900, 560), |root| draw_band(
        &root, title, map, &curves
    ))
}

/// All figures of one solved device into `dir`: `iv`, `potential_map`, `band`.
pub fn device_plots(sol: &DeviceSolution, dir: &Path) -> Result<Vec<PathBuf>, PlotError> {
    let r = &sol.report;
    let nan = |v: &Vec<Option<f64>>| v.iter().map(|x| x.unwrap_or(f64::NAN)).collect();
    let curve = CurveData {
        vgs_v: r.vgs_v.clone(),
        id_lin: nan(&r.id_lin),
        id_sat: nan(&r.id_sat),
    };
    let map = MapData::of(sol);
    per_point(
        dir,
        "",
        &r.name,
        &curve,
        Some(&map),
        (r.vds_lin_v, r.vds_sat_v),
    )
}

fn per_point(
    dir: &Path,
    prefix: &str,
    name: &str,
    curve: &CurveData,
    map: Option<&MapData>,
    vds: (f64, f64),
) -> Result<Vec<PathBuf>, PlotError> {
    let mut out = iv_plot(
        dir,
        &format!("{prefix}iv"),
        &format!("{name}: drain current"),
        curve,
        vds,
    )?;
    if let Some(m) = map {
        if let Some(psi) = m.psi_sat_v.as_ref().or(m.psi_lin_v.as_ref()) {
            let v = if m.psi_sat_v.is_some() { vds.1 } else { vds.0 };
            out.extend(map_plot(
                dir,
                &format!("{prefix}potential_map"),
                &format!("{name}: potential, off state, V_DS = {v} V"),
                m,
                psi,
            )?);
        }
        out.extend(band_plot(
            dir,
            &format!("{prefix}band"),
            &format!("{name}: band edge along the leakiest path"),
            m,
            vds,
        )?);
    }
    Ok(out)
}

/// Every figure a sweep file supports, into `dir`: `vt_rolloff`, `dibl`, `ss`
/// against L_g (one series per combination of the other axes, theory beside
/// them when given), and for each point holding a map (or the first ok point)
/// `point_NNNNNN_iv`, `_potential_map`, `_band`.
pub fn sweep_plots(f: &SweepFile, dir: &Path) -> Result<Vec<PathBuf>, PlotError> {
    let lg = f
        .figure("gate_length_nm")
        .ok_or_else(|| PlotError::Empty("no gate_length_nm column".into()))?;
    let labels = series_labels(f);
    let label = |k: usize| labels[k].clone();
    let series_of = |name: &str| -> Vec<Series> {
        let vals = f.figure(name).unwrap_or_default();
        let mut out: Vec<Series> = Vec::new();
        for (k, &x) in lg.iter().enumerate() {
            let y = vals.get(k).copied().unwrap_or(f64::NAN);
            if !(x.is_finite() && y.is_finite()) {
                continue;
            }
            let l = label(k);
            match out.iter_mut().find(|s| s.label == l) {
                Some(s) => s.points.push((x, y)),
                None => out.push(Series {
                    label: l,
                    points: vec![(x, y)],
                }),
            }
        }
        for s in &mut out {
            s.points.sort_by(|a, b| a.0.total_cmp(&b.0));
        }
        out
    };
    let mut files = Vec::new();
    for (stem, title, y, name, theory) in [
        (
            "vt_rolloff",
            "Threshold roll-off",
            "V_t,lin - V_t,long (mV)",
            "vt_rolloff_mV",
            "theory_rolloff_mV",
        ),
        (
            "dibl",
            "Drain-induced barrier lowering",
            "DIBL (mV/V)",
            "dibl_mV_per_V",
            "theory_dibl_mV_per_V",
        ),
        (
            "ss",
            "Subthreshold swing at V_DS,sat",
            "SS (mV/dec)",
            "ss_sat_mV_per_dec",
            "theory_ss_mV_per_dec",
        ),
    ] {
        let solved = series_of(name);
        // The theory stored beside the data, one series per solved series.
        let th = series_of(theory);
        if solved.is_empty() && th.is_empty() {
            continue;
        }
        files.extend(figure_vs_length(dir, stem, title, y, &solved, &th)?);
    }
    let mut chosen: Vec<usize> = (0..f.rows.len())
        .filter(|&k| f.rows[k].map.is_some())
        .collect();
    if chosen.is_empty() {
        chosen.extend((0..f.rows.len()).find(|&k| f.rows[k].status.is_ok()));
    }
    for k in chosen {
        let r = &f.rows[k];
        let name = format!("point {}", r.index);
        files.extend(per_point(
            dir,
            &format!("point_{:06}_", r.index),
            &name,
            &r.curve,
            r.map.as_ref(),
            r.vds_v,
        )?);
    }
    Ok(files)
}

pub mod pitch;
