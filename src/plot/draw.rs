//! Drawing only: a described [`Figure`] or [`MapFigure`] onto a plotters
//! drawing area. The legend is drawn from the same [`Style`] as the traces,
//! so it shows each trace as it is drawn.

use plotters::coord::types::RangedCoordf64;
use plotters::coord::Shift;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};

use super::figure::{Figure, Glyph, LegendEntry, LineStyle, MarkerStyle, Scale, Style};
use super::map::{axis_text, tick_text, MapFigure};
use super::{scale_colour, DrawResult, FONT, PALETTE};

/// Dash and gap of a dashed trace, px.
const DASH: (u32, u32) = (8, 5);
/// Marker radius, px.
const MARKER: i32 = 4;
/// Ring radius of a compliant-length mark, px.
const RING: i32 = 8;
/// Half size of a missing-point cross, px.
const CROSS: i32 = 6;
/// Width of the legend panel, px.
const LEGEND_W: u32 = 290;
/// Grey of guide lines that belong to no series.
const GUIDE: RGBColor = RGBColor(0x55, 0x55, 0x55);
/// Ink of criteria lines, missing-point legend and labels.
const INK: RGBColor = PALETTE[6];

fn colour(k: usize) -> RGBColor {
    PALETTE[k % PALETTE.len()]
}

/// The pixel size of a figure with a legend panel.
pub const FIGURE_SIZE: (u32, u32) = (1100, 600);
/// The pixel size of a map.
pub const MAP_SIZE: (u32, u32) = (1000, 560);

/// Splits a legend text into lines of at most `width` characters at ", " or spaces.
fn wrap(text: &str, width: usize) -> Vec<String> {
    let mut lines = vec![String::new()];
    for word in text.split(' ') {
        let last = lines.last_mut().expect("one line");
        if !last.is_empty() && last.len() + 1 + word.len() > width {
            lines.push(word.to_string());
        } else {
            if !last.is_empty() {
                last.push(' ');
            }
            last.push_str(word);
        }
    }
    lines
}

/// Draws one legend glyph with its left end at (x, y), px.
fn draw_glyph<DB: DrawingBackend>(
    area: &DrawingArea<DB, Shift>,
    glyph: &Glyph,
    (x, y): (i32, i32),
) -> DrawResult
where
    DB::ErrorType: 'static,
{
    let w = 34;
    match glyph {
        Glyph::Trace(s) => {
            let c = colour(s.colour);
            match s.line {
                LineStyle::Solid => area.draw(&PathElement::new(
                    vec![(x, y), (x + w, y)],
                    c.stroke_width(2),
                ))?,
                LineStyle::Dashed => {
                    let mut a = x;
                    while a < x + w {
                        let b = (a + DASH.0 as i32).min(x + w);
                        area.draw(&PathElement::new(vec![(a, y), (b, y)], c.stroke_width(2)))?;
                        a = b + DASH.1 as i32;
                    }
                }
                LineStyle::None => {}
            }
            draw_marker(area, s, (x + w / 2, y))?;
        }
        Glyph::Level => {
            let mut a = x;
            while a < x + w {
                area.draw(&PathElement::new(
                    vec![(a, y), ((a + 3).min(x + w), y)],
                    INK.stroke_width(2),
                ))?;
                a += 6;
            }
        }
        Glyph::Mark => {
            area.draw(&Circle::new((x + w / 2, y), RING, INK.stroke_width(2)))?;
        }
        Glyph::Missing => {
            area.draw(&Cross::new((x + w / 2, y), CROSS, INK.stroke_width(2)))?;
        }
    }
    Ok(())
}

/// A trace's marker at pixel `p` (legend) in the trace's style.
fn draw_marker<DB: DrawingBackend>(
    area: &DrawingArea<DB, Shift>,
    s: &Style,
    p: (i32, i32),
) -> DrawResult
where
    DB::ErrorType: 'static,
{
    let c = colour(s.colour);
    match s.marker {
        MarkerStyle::Filled => area.draw(&Circle::new(p, MARKER, c.filled()))?,
        MarkerStyle::Hollow => {
            area.draw(&Circle::new(p, MARKER, WHITE.filled()))?;
            area.draw(&Circle::new(p, MARKER, c.stroke_width(2)))?;
        }
        MarkerStyle::None => {}
    }
    Ok(())
}

fn draw_legend_panel<DB: DrawingBackend>(
    area: &DrawingArea<DB, Shift>,
    entries: &[LegendEntry],
) -> DrawResult
where
    DB::ErrorType: 'static,
{
    let font = (FONT, 13).into_font().color(&BLACK);
    let bottom = area.dim_in_pixel().1 as i32 - 30;
    let mut y = 60;
    for (k, e) in entries.iter().enumerate() {
        let lines = wrap(&e.label, 33);
        if y + 16 * (lines.len() as i32 - 1) > bottom {
            area.draw(&Text::new(
                format!("+ {} more entries not shown", entries.len() - k),
                (8, y - 7),
                font.clone(),
            ))?;
            break;
        }
        draw_glyph(area, &e.glyph, (8, y))?;
        for (k, line) in lines.iter().enumerate() {
            area.draw(&Text::new(
                line.clone(),
                (50, y - 7 + 16 * k as i32),
                font.clone(),
            ))?;
        }
        y += 24 + 16 * (lines.len() as i32 - 1);
    }
    Ok(())
}

/// Decimals for about ten ticks over [lo, hi].
fn decimals(lo: f64, hi: f64) -> usize {
    let step = (hi - lo).abs().max(1e-12) / 10.0;
    (-step.log10().floor()).clamp(0.0, 6.0) as usize
}

fn padded(lo: f64, hi: f64, frac: f64) -> (f64, f64) {
    if hi > lo {
        let p = frac * (hi - lo);
        (lo - p, hi + p)
    } else {
        let p = 0.5 * lo.abs().max(1.0);
        (lo - p, hi + p)
    }
}

/// Draws a figure: the plot on the left, its legend panel on the right.
pub fn draw_figure<DB: DrawingBackend>(root: &DrawingArea<DB, Shift>, fig: &Figure) -> DrawResult
where
    DB::ErrorType: 'static,
{
    let ((x0, x1), (y0, y1)) = fig.extent().ok_or("no finite values")?;
    let (x0, x1) = padded(x0, x1, 0.04);
    let w = root.dim_in_pixel().0;
    let (plot, legend) = root.split_horizontally(w.saturating_sub(LEGEND_W));
    let mut builder = ChartBuilder::on(&plot);
    builder
        .caption(&fig.title, (FONT, 20))
        .margin(12)
        .x_label_area_size(48)
        .y_label_area_size(82);
    let xd = decimals(x0, x1);
    let x_fmt = |v: &f64| axis_text(*v, xd);
    match fig.y_scale {
        Scale::Linear => {
            let (y0, y1) = padded(y0, y1, 0.08);
            let yd = decimals(y0, y1);
            let mut chart = builder.build_cartesian_2d(x0..x1, y0..y1)?;
            chart
                .configure_mesh()
                .x_desc(&fig.x_label)
                .y_desc(&fig.y_label)
                .x_label_formatter(&x_fmt)
                .y_label_formatter(&|v| axis_text(*v, yd))
                .label_style((FONT, 14))
                .light_line_style(RGBColor(235, 235, 235))
                .draw()?;
            draw_content(&mut chart, fig, (x0, x1), (y0, y1))?;
        }
        Scale::Log => {
            let lo = 10f64.powf(y0.log10().floor());
            let hi = 10f64.powf(y1.log10().ceil()).max(lo * 10.0);
            let mut chart = builder.build_cartesian_2d(x0..x1, (lo..hi).log_scale())?;
            chart
                .configure_mesh()
                .x_desc(&fig.x_label)
                .y_desc(&fig.y_label)
                .x_label_formatter(&x_fmt)
                .y_label_formatter(&|v| format!("{v:.0e}"))
                .label_style((FONT, 14))
                .light_line_style(RGBColor(235, 235, 235))
                .draw()?;
            draw_content(&mut chart, fig, (x0, x1), (lo, hi))?;
        }
    }
    draw_legend_panel(&legend, &fig.legend())
}

fn draw_content<DB: DrawingBackend, Y>(
    chart: &mut ChartContext<'_, DB, Cartesian2d<RangedCoordf64, Y>>,
    fig: &Figure,
    (x0, x1): (f64, f64),
    (y0, y1): (f64, f64),
) -> DrawResult
where
    DB::ErrorType: 'static,
    Y: Ranged<ValueType = f64>,
{
    let label_font = (FONT, 13).into_font().color(&INK);
    // Guide lines first, under the data.
    for l in &fig.levels {
        chart.draw_series(DashedLineSeries::new(
            vec![(x0, l.y), (x1, l.y)],
            3,
            3,
            INK.stroke_width(2),
        ))?;
        // Written at the right end, above the line, where curves that
        // fall with L_g leave room.
        chart.draw_series(std::iter::once(
            EmptyElement::at((x1, l.y))
                + Text::new(
                    l.label.clone(),
                    (-8, -5),
                    label_font.clone().pos(Pos::new(HPos::Right, VPos::Bottom)),
                ),
        ))?;
    }
    for (k, c) in fig.cuts.iter().enumerate() {
        let col = c.colour.map(colour).unwrap_or(GUIDE);
        chart.draw_series(DashedLineSeries::new(
            vec![(c.x, y0), (c.x, y1)],
            6,
            4,
            col.stroke_width(1),
        ))?;
        chart.draw_series(std::iter::once(
            EmptyElement::at((c.x, y1))
                + Text::new(
                    c.label.clone(),
                    (5, 6 + 17 * k as i32),
                    (FONT, 13).into_font().color(&col),
                ),
        ))?;
    }
    for t in &fig.traces {
        let c = colour(t.style.colour);
        let pts = t
            .points
            .iter()
            .copied()
            .filter(|p| p.0.is_finite() && p.1.is_finite());
        match t.style.line {
            LineStyle::Solid => {
                chart.draw_series(LineSeries::new(pts.clone(), c.stroke_width(2)))?;
            }
            LineStyle::Dashed => {
                chart.draw_series(DashedLineSeries::new(
                    pts.clone(),
                    DASH.0,
                    DASH.1,
                    c.stroke_width(2),
                ))?;
            }
            LineStyle::None => {}
        }
        match t.style.marker {
            MarkerStyle::Filled => {
                chart.draw_series(pts.map(|p| Circle::new(p, MARKER, c.filled())))?;
            }
            MarkerStyle::Hollow => {
                chart.draw_series(pts.map(|p| {
                    EmptyElement::at(p)
                        + Circle::new((0, 0), MARKER, WHITE.filled())
                        + Circle::new((0, 0), MARKER, c.stroke_width(2))
                }))?;
            }
            MarkerStyle::None => {}
        }
    }
    for m in &fig.marks {
        let c = colour(m.colour);
        chart.draw_series(DashedLineSeries::new(
            vec![(m.x, y0), (m.x, m.y)],
            3,
            3,
            c.stroke_width(1),
        ))?;
        chart.draw_series(std::iter::once(Circle::new(
            (m.x, m.y),
            RING,
            c.stroke_width(2),
        )))?;
    }
    for m in &fig.missing {
        let c = colour(m.colour);
        chart.draw_series(std::iter::once(
            EmptyElement::at((m.x, y0)) + Cross::new((0, -CROSS - 1), CROSS, c.stroke_width(2)),
        ))?;
    }
    Ok(())
}

/// Draws a potential map with its region outlines, contacts, names and colour bar.
/// Caption size of a map, px: smaller for long titles so that they fit.
fn title_size(title: &str) -> u32 {
    if title.chars().count() > 80 {
        15
    } else {
        18
    }
}

pub fn draw_map<DB: DrawingBackend>(root: &DrawingArea<DB, Shift>, f: &MapFigure<'_>) -> DrawResult
where
    DB::ErrorType: 'static,
{
    let m = f.map;
    let psi = f.psi;
    let (nx, ny) = (m.nx(), m.ny());
    let (lo, hi) = f.range_v;
    let range = (hi - lo).max(1e-12);
    let (main, bar) = root.split_horizontally(root.dim_in_pixel().0.saturating_sub(120));
    let (x0, x1) = (m.x_nm[0], m.x_nm[nx - 1]);
    let (y0, y1) = (m.y_nm[0], m.y_nm[ny - 1]);
    let (xd, yd) = (decimals(x0, x1), decimals(y0, y1));
    let mut chart = ChartBuilder::on(&main)
        .caption(&f.title, (FONT, title_size(&f.title)))
        .margin(12)
        .x_label_area_size(45)
        .y_label_area_size(60)
        .build_cartesian_2d(x0..x1, y1..y0)?;
    chart
        .configure_mesh()
        .disable_mesh()
        .x_desc(f.x_desc.as_str())
        .y_desc(f.y_desc.as_str())
        .x_label_formatter(&|v| axis_text(*v, xd))
        .y_label_formatter(&|v| axis_text(*v, yd))
        .label_style((FONT, 14))
        .draw()?;
    let metal = RGBColor(0xb8, 0xb8, 0xb8);
    chart.draw_series(
        (0..ny - 1)
            .flat_map(|j| (0..nx - 1).map(move |i| (i, j)))
            .map(|(i, j)| {
                let c = if m.material[i + j * (nx - 1)] >= 2 {
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
    chart.draw_series(
        f.outlines
            .iter()
            .map(|s| PathElement::new(s.to_vec(), BLACK.stroke_width(1))),
    )?;
    for c in &f.contacts {
        chart.draw_series(std::iter::once(PathElement::new(
            c.segment.to_vec(),
            BLACK.stroke_width(5),
        )))?;
    }
    let font = (FONT, 13).into_font().color(&BLACK);
    let boxed = |text: &str, at: (f64, f64), dx: i32, dy: i32| {
        let w = 7 * text.len() as i32 + 6;
        EmptyElement::at(at)
            + Rectangle::new([(dx, dy), (dx + w, dy + 17)], WHITE.mix(0.8).filled())
            + Text::new(text.to_string(), (dx + 3, dy + 2), font.clone())
    };
    for l in &f.labels {
        let w = 7 * l.text.len() as i32 + 6;
        chart.draw_series(std::iter::once(boxed(l.text, l.at, -w / 2, -8)))?;
    }
    for g in &f.guides {
        chart.draw_series(DashedLineSeries::new(
            g.segment.to_vec(),
            6,
            4,
            WHITE.stroke_width(2),
        ))?;
        chart.draw_series(std::iter::once(boxed(&g.label, g.segment[0], 4, 4)))?;
    }
    for m in &f.marks {
        chart.draw_series(std::iter::once(
            EmptyElement::at(m.at)
                + Circle::new((0, 0), RING, WHITE.stroke_width(3))
                + Circle::new((0, 0), RING, BLACK.stroke_width(1)),
        ))?;
        if !m.label.is_empty() {
            chart.draw_series(std::iter::once(boxed(&m.label, m.at, RING + 2, -RING - 18)))?;
        }
    }
    for c in &f.contacts {
        let [(ax, ay), (bx, by)] = c.segment;
        let mid = (0.5 * (ax + bx), 0.5 * (ay + by));
        let w = 7 * c.name.len() as i32 + 6;
        let dx = if c.name == "drain" { -w - 6 } else { 6 };
        let dy = if c.name == "substrate" { -24 } else { -8 };
        chart.draw_series(std::iter::once(boxed(c.name, mid, dx, dy)))?;
    }
    // Colour bar.
    let decimals = f.tick_decimals();
    let mut cb = ChartBuilder::on(&bar)
        .margin_top(40)
        .margin_bottom(57)
        .margin_right(10)
        .y_label_area_size(65)
        .build_cartesian_2d(0f64..1f64, lo..hi.max(lo + 1e-12))?;
    cb.configure_mesh()
        .disable_mesh()
        .disable_x_axis()
        .y_desc(f.value_desc.as_str())
        .y_label_formatter(&|v| tick_text(*v, decimals))
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

#[cfg(test)]
mod tests {
    use super::wrap;

    #[test]
    fn legend_text_wraps_at_spaces() {
        // Source: common practice (legend lines kept inside their panel).
        let w = wrap("double-gate: compliant from 22 nm and some more words", 20);
        assert!(w.iter().all(|l| l.len() <= 20), "{w:?}");
        assert_eq!(
            w.join(" "),
            "double-gate: compliant from 22 nm and some more words"
        );
    }
}
