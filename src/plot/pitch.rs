//! Figures of a contacted-gate-pitch study (drawing only): C_gc against
//! spacer thickness per spacer material, tau and DIBL against L_g at the
//! fixed pitch with the compliant region shaded, and a potential map of one
//! split with its contact plugs (grey metal at both ends).

use std::path::{Path, PathBuf};

use plotters::coord::Shift;
use plotters::prelude::*;

use super::{
    draw_legend, draw_solid, fonts, map_plot, span, DrawResult, PlotError, Series, FONT, PALETTE,
};
use crate::evaluate::pitch::{PitchRow, PitchStudy};
use crate::evaluate::DeviceSolution;
use crate::io::MapData;

/// Series of `y(row)` against `x(row)`, one per (spacer material, contact width), sorted by x.
fn series_by_material(
    rows: &[PitchRow],
    x: impl Fn(&PitchRow) -> f64,
    y: impl Fn(&PitchRow) -> Option<f64>,
) -> Vec<Series> {
    let mut widths: Vec<f64> = rows.iter().map(|r| r.contact_width_nm).collect();
    widths.sort_by(f64::total_cmp);
    widths.dedup();
    let mut keys: Vec<(String, f64)> = Vec::new();
    for r in rows {
        let k = (r.spacer.clone(), r.contact_width_nm);
        if !keys.contains(&k) {
            keys.push(k);
        }
    }
    keys.into_iter()
        .map(|(m, w)| {
            let mut points: Vec<(f64, f64)> = rows
                .iter()
                .filter(|r| r.spacer == m && r.contact_width_nm == w)
                .filter_map(|r| y(r).filter(|v| v.is_finite()).map(|v| (x(r), v)))
                .collect();
            points.sort_by(|a, b| a.0.total_cmp(&b.0));
            let label = if widths.len() > 1 {
                format!("{m}, contact {w} nm")
            } else {
                m
            };
            Series { label, points }
        })
        .filter(|s| !s.points.is_empty())
        .collect()
}

fn draw_lines<DB: DrawingBackend>(
    area: &DrawingArea<DB, Shift>,
    title: &str,
    x_desc: &str,
    y_desc: &str,
    series: &[Series],
    shade_x: Option<(f64, f64)>,
    y_max_line: Option<f64>,
) -> DrawResult
where
    DB::ErrorType: 'static,
{
    let all = || series.iter().flat_map(|s| s.points.iter());
    let (x0, x1) = span(all().map(|p| p.0)).ok_or("no finite values")?;
    let (y0, y1) = span(all().map(|p| p.1).chain(y_max_line)).ok_or("no finite values")?;
    let mut chart = ChartBuilder::on(area)
        .caption(title, (FONT, 20))
        .margin(12)
        .x_label_area_size(45)
        .y_label_area_size(70)
        .build_cartesian_2d(x0..x1, y0..y1)?;
    chart
        .configure_mesh()
        .x_desc(x_desc)
        .y_desc(y_desc)
        .label_style((FONT, 14))
        .light_line_style(RGBColor(235, 235, 235))
        .draw()?;
    if let Some((a, b)) = shade_x {
        let c = PALETTE[4].mix(0.18);
        chart
            .draw_series(std::iter::once(Rectangle::new(
                [(a.max(x0), y0), (b.min(x1), y1)],
                c.filled(),
            )))?
            .label("meets the criteria")
            .legend(move |(x, y)| Rectangle::new([(x, y - 5), (x + 18, y + 5)], c.filled()));
    }
    if let Some(m) = y_max_line {
        chart.draw_series(DashedLineSeries::new(
            vec![(x0, m), (x1, m)],
            6,
            4,
            PALETTE[6].stroke_width(1),
        ))?;
    }
    for (k, s) in series.iter().enumerate() {
        let c = PALETTE[k % PALETTE.len()];
        draw_solid(&mut chart, s, c)?;
        chart.draw_series(s.points.iter().map(|&p| Circle::new(p, 4, c.filled())))?;
    }
    draw_legend(&mut chart, 13, SeriesLabelPosition::UpperRight)
}

/// The L_g interval spanned by the compliant splits.
fn compliant_span(rows: &[PitchRow]) -> Option<(f64, f64)> {
    let l: Vec<f64> = rows
        .iter()
        .filter(|r| r.meets_criteria == Some(true))
        .map(|r| r.gate_length_nm)
        .collect();
    let lo = l.iter().copied().reduce(f64::min)?;
    let hi = l.iter().copied().reduce(f64::max)?;
    let pad = if hi > lo { 0.0 } else { 0.25 };
    Some((lo - pad, hi + pad))
}

/// `c_gc_vs_spacer` and `tau_dibl_vs_length` of a study into `dir` (PNG and SVG).
pub fn pitch_plots(study: &PitchStudy, dir: &Path) -> Result<Vec<PathBuf>, PlotError> {
    fonts()?;
    let rows = &study.rows;
    let cgc = series_by_material(
        rows,
        |r| r.spacer_thickness_nm,
        |r| r.capacitance.as_ref().map(|c| 1e18 * c.on.gate_contact),
    );
    if cgc.is_empty() {
        return Err(PlotError::Empty("no split has capacitances".into()));
    }
    let mut out = Vec::new();
    let title = format!("Gate-to-contact capacitance, pitch {} nm", study.pitch_nm);
    out.extend(render!(dir, "c_gc_vs_spacer", (900, 600), |root| {
        draw_lines(
            &root,
            &title,
            "spacer thickness (nm)",
            "C_gc to one plug, on state (aF/um)",
            &cgc,
            None,
            None,
        )
    })?);
    let tau = series_by_material(rows, |r| r.gate_length_nm, |r| r.tau_ps);
    let dibl = series_by_material(rows, |r| r.gate_length_nm, |r| r.dibl_mv_per_v);
    let shade = compliant_span(rows);
    let title_tau = format!("Delay estimate at pitch {} nm", study.pitch_nm);
    let title_dibl = format!("DIBL at pitch {} nm", study.pitch_nm);
    out.extend(render!(dir, "tau_dibl_vs_length", (900, 900), |root| {
        let (top, bottom) = root.split_vertically(450);
        if !tau.is_empty() {
            draw_lines(
                &top,
                &title_tau,
                "gate length L_g (nm)",
                "tau (ps)",
                &tau,
                shade,
                None,
            )?;
        }
        draw_lines(
            &bottom,
            &title_dibl,
            "gate length L_g (nm)",
            "DIBL (mV/V)",
            &dibl,
            shade,
            study.dibl_max_mv_per_v,
        )
    })?);
    Ok(out)
}

/// The potential map of one solved split at V_DS,sat (off-state gate
/// voltage), its contact plugs drawn as grey metal at both ends: `dir/stem.png` and `.svg`.
pub fn plug_map(sol: &DeviceSolution, dir: &Path, stem: &str) -> Result<Vec<PathBuf>, PlotError> {
    let map = MapData::of(sol);
    let psi = map.psi_sat_v.clone().ok_or_else(|| {
        PlotError::Empty(format!(
            "{stem}: the off-state point at V_DS,sat did not converge"
        ))
    })?;
    let title = format!(
        "{}: potential at V_DS,sat, V_G off; plugs and gate grey",
        sol.report.name
    );
    map_plot(dir, stem, &title, &map, &psi)
}
