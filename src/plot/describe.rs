//! Figure descriptions from data: a sweep file ([`length_figures`],
//! [`point_figures`]) or one solved device ([`device_figures`]). Pure: no
//! drawing, no files; every value comes from the data handed in.

use super::figure::{
    safe_name, short_number, Cut, Figure, Level, Mark, Missing, Scale, Style, Trace,
};
use super::map::MapFigure;
use crate::evaluate::{Criteria, DeviceReport, DeviceSolution};
use crate::io::{series_labels, AxisValue, CurveData, MapData, SweepFile};

/// The plan key of the gate length axis.
const LENGTH_KEY: &str = "geometry.gate_length_nm";

/// The shortest compliant gate length of each series (by series label), or
/// None where no swept length complies. The one place the plots read the
/// compliance answer from (`sweep::shortest`), so that its source can change
/// in one line.
pub fn compliant_lengths(f: &SweepFile, criteria: &Criteria) -> Vec<(String, Option<(f64, bool)>)> {
    if criteria.is_empty() {
        return Vec::new();
    }
    crate::sweep::shortest::per_series(f, criteria)
        .into_iter()
        .map(|o| {
            let interpolated = o.answer.kind == crate::evaluate::AnswerKind::Interpolated;
            (o.label, o.answer.gate_length_nm.map(|x| (x, interpolated)))
        })
        .collect()
}

/// The value of a series at `x` (sorted points): exact at a point, else
/// interpolated between its neighbours (log-linear when both are positive,
/// as the shortest-length interpolation does for DIBL and roll-off).
fn value_at(points: &[(f64, f64)], x: f64) -> Option<f64> {
    if let Some(p) = points.iter().find(|p| (p.0 - x).abs() < 1e-9) {
        return Some(p.1);
    }
    let w = points
        .windows(2)
        .find(|w| (w[0].0 - x) * (w[1].0 - x) < 0.0)?;
    let t = (x - w[0].0) / (w[1].0 - w[0].0);
    let (a, b) = (w[0].1, w[1].1);
    Some(if a > 0.0 && b > 0.0 {
        (a.ln() + t * (b.ln() - a.ln())).exp()
    } else {
        a + t * (b - a)
    })
}

/// Whether row `k` holds theory figures rather than a solve.
///
/// Read from the file's `method` column; a file that predates the column
/// (format 1) falls back to what it allows: a solved point always stores its
/// I_D-V_G curves, a theory point none, so a point with no gate voltages but
/// a finite DIBL or SS is a theory point.
pub fn is_theory_row(f: &SweepFile, k: usize) -> bool {
    let r = &f.rows[k];
    if let Some(m) = r.method {
        return m == crate::evaluate::Method::Theory;
    }
    let has = |name: &str| {
        f.figures
            .iter()
            .position(|n| n == name)
            .and_then(|i| r.figures.get(i).copied().flatten())
            .is_some_and(f64::is_finite)
    };
    r.curve.vgs_v.is_empty()
        && (has("dibl_mV_per_V") || has("ss_sat_mV_per_dec") || has("vt_rolloff_mV"))
}

/// The gate length of row `k`: its axis value, else its figure, nm.
fn gate_length_of(f: &SweepFile, k: usize) -> f64 {
    let axis = f
        .axes
        .iter()
        .position(|a| a.key == LENGTH_KEY)
        .and_then(|a| match f.rows[k].axis.get(a) {
            Some(AxisValue::Number(x)) => Some(*x),
            _ => None,
        });
    axis.or_else(|| {
        let i = f.figures.iter().position(|n| n == "gate_length_nm")?;
        f.rows[k].figures.get(i).copied().flatten()
    })
    .unwrap_or(f64::NAN)
}

/// One figure against gate length.
struct LengthFigure {
    stem: &'static str,
    title: &'static str,
    y_label: &'static str,
    column: &'static str,
    theory_column: &'static str,
}

const LENGTH_FIGURES: [LengthFigure; 3] = [
    LengthFigure {
        stem: "vt_rolloff",
        title: "Threshold roll-off",
        y_label: "V_t,lin - V_t,long (mV)",
        column: "vt_rolloff_mV",
        theory_column: "theory_rolloff_mV",
    },
    LengthFigure {
        stem: "dibl",
        title: "Drain-induced barrier lowering",
        y_label: "DIBL (mV/V)",
        column: "dibl_mV_per_V",
        theory_column: "theory_dibl_mV_per_V",
    },
    LengthFigure {
        stem: "ss",
        title: "Subthreshold swing at V_DS,sat",
        y_label: "SS (mV/dec)",
        column: "ss_sat_mV_per_dec",
        theory_column: "theory_ss_mV_per_dec",
    },
];

fn same_points(a: &[(f64, f64)], b: &[(f64, f64)]) -> bool {
    a.len() == b.len()
        && a.iter().zip(b).all(|(p, q)| {
            p.0 == q.0 && (p.1 - q.1).abs() <= 1e-9 * p.1.abs().max(q.1.abs()).max(1e-30)
        })
}

/// The roll-off, DIBL and SS figures against L_g: one colour per series
/// (every combination of the other axes); solved values solid with filled
/// markers, theory (stored theory columns, and points whose figures are
/// theory) dashed with hollow markers and "(theory)"; points without a value
/// crossed on the axis; the criteria as labelled lines and each series'
/// shortest compliant length ringed. A figure with nothing to draw is left out.
pub fn length_figures(f: &SweepFile, criteria: &Criteria) -> Vec<Figure> {
    let labels = series_labels(f);
    let mut order: Vec<String> = Vec::new();
    for l in &labels {
        if !order.contains(l) {
            order.push(l.clone());
        }
    }
    let lg: Vec<f64> = (0..f.rows.len()).map(|k| gate_length_of(f, k)).collect();
    let theory_row: Vec<bool> = (0..f.rows.len()).map(|k| is_theory_row(f, k)).collect();
    let compliant = compliant_lengths(f, criteria);
    let mut out = Vec::new();
    for spec in &LENGTH_FIGURES {
        let col = f
            .figure(spec.column)
            .unwrap_or_else(|| vec![f64::NAN; f.rows.len()]);
        let th = f
            .figure(spec.theory_column)
            .unwrap_or_else(|| vec![f64::NAN; f.rows.len()]);
        let mut fig = Figure::new(spec.stem, spec.title, "gate length L_g (nm)", spec.y_label);
        let mut theory_traces = Vec::new();
        for (c, label) in order.iter().enumerate() {
            let rows: Vec<usize> = (0..f.rows.len()).filter(|&k| &labels[k] == label).collect();
            let pick = |v: &[f64], keep: &dyn Fn(usize) -> bool| -> Vec<(f64, f64)> {
                let mut p: Vec<(f64, f64)> = rows
                    .iter()
                    .filter(|&&k| keep(k) && lg[k].is_finite() && v[k].is_finite())
                    .map(|&k| (lg[k], v[k]))
                    .collect();
                p.sort_by(|a, b| a.0.total_cmp(&b.0));
                p
            };
            let solved = pick(&col, &|k| !theory_row[k]);
            let as_theory = pick(&col, &|k| theory_row[k]);
            let column_theory = pick(&th, &|_| true);
            let answer = compliant.iter().find(|(l, _)| l == label).map(|(_, a)| *a);
            let suffix = match answer {
                Some(Some((x, true))) => {
                    format!(": compliant from {x:.1} nm (interpolated)")
                }
                Some(Some((x, false))) => format!(": compliant from {} nm", short_number(x)),
                Some(None) => ": none compliant".into(),
                None => String::new(),
            };
            let main_is_theory = solved.is_empty() && !as_theory.is_empty();
            if !solved.is_empty() {
                fig.traces.push(Trace {
                    label: format!("{label}{suffix}"),
                    points: solved.clone(),
                    style: Style::solved(c),
                });
            }
            if !as_theory.is_empty() {
                fig.traces.push(Trace {
                    label: format!(
                        "{label} (theory){}",
                        if main_is_theory { suffix.as_str() } else { "" }
                    ),
                    points: as_theory.clone(),
                    style: Style::theory(c),
                });
            }
            // The stored theory columns: dropped where they repeat the
            // theory points above.
            if !column_theory.is_empty() && !same_points(&column_theory, &as_theory) {
                theory_traces.push(Trace {
                    label: if as_theory.is_empty() {
                        format!("{label} (theory)")
                    } else {
                        format!("{label} (theory column)")
                    },
                    points: column_theory,
                    style: Style::theory(c),
                });
            }
            for &k in &rows {
                if !col[k].is_finite() && lg[k].is_finite() {
                    fig.missing.push(Missing {
                        x: lg[k],
                        colour: c,
                    });
                }
            }
            if let Some(Some((x, _))) = answer {
                let on = if solved.is_empty() {
                    &as_theory
                } else {
                    &solved
                };
                if let Some(y) = value_at(on, x) {
                    fig.marks.push(Mark { x, y, colour: c });
                }
            }
        }
        fig.traces.extend(theory_traces);
        fig.mark_label = format!("shortest compliant L_g ({})", criteria_text(criteria));
        fig.levels = criteria_levels(spec.column, criteria, &col);
        if fig.is_drawable() {
            out.push(fig);
        }
    }
    out
}

/// The criteria in words ([`Criteria::text`]; SS is the larger of lin and sat).
pub fn criteria_text(c: &Criteria) -> String {
    if c.ss_max_mv_per_dec.is_some() {
        format!("{}; SS the larger of lin and sat", c.text())
    } else {
        c.text()
    }
}

/// The criterion lines of one figure (by its column).
fn criteria_levels(column: &str, c: &Criteria, values: &[f64]) -> Vec<Level> {
    let line = |limit: Option<f64>, what: &str, unit: &str| -> Vec<Level> {
        limit
            .map(|x| Level {
                y: x,
                label: format!("{what} limit {} {unit}", short_number(x)),
            })
            .into_iter()
            .collect()
    };
    match column {
        "dibl_mV_per_V" => line(c.dibl_max_mv_per_v, "DIBL", "mV/V"),
        // SS is judged on the larger of lin and sat; this figure shows sat.
        "ss_sat_mV_per_dec" => line(c.ss_max_mv_per_dec, "SS", "mV/dec"),
        "vt_rolloff_mV" => {
            let Some(x) = c.vt_rolloff_max_mv else {
                return Vec::new();
            };
            let mut l = vec![Level {
                y: -x,
                label: format!("roll-off limit -{} mV", short_number(x)),
            }];
            if values.iter().any(|v| v.is_finite() && *v > 0.0) {
                l.push(Level {
                    y: x,
                    label: format!("roll-off limit +{} mV", short_number(x)),
                });
            }
            l
        }
        _ => Vec::new(),
    }
}

/// Short names of the usual plan keys for titles and file names.
const SHORT_KEYS: &[(&str, &str)] = &[
    ("geometry.gate_length_nm", "Lg"),
    ("geometry.body_thickness_nm", "tsi"),
    ("geometry.box_thickness_nm", "tbox"),
    ("geometry.fin_height_nm", "Hfin"),
    ("geometry.fin_pitch_nm", "pitch"),
    ("geometry.gate_height_nm", "Hgate"),
    ("geometry.junction_depth_nm", "xj"),
    ("geometry.source_drain_length_nm", "Lsd"),
    ("doping.channel_cm3", "Nch"),
    ("doping.source_drain_cm3", "Nsd"),
    ("gate.workfunction_eV", "WF"),
    ("gate.back_bias_V", "Vbb"),
];

/// Splits a plan key into a short name and its unit ("geometry.gate_length_nm" -> ("Lg", "nm")).
fn short_key(key: &str) -> (String, String) {
    let unit = crate::io::units_of(key);
    let unit = if unit == "1" { "" } else { unit };
    if let Some((_, s)) = SHORT_KEYS.iter().find(|(k, _)| *k == key) {
        return ((*s).into(), unit.into());
    }
    let last = key.rsplit('.').next().unwrap_or(key);
    let suffix = ["_nm", "_cm3", "_eV", "_V", "_K", "_mV"]
        .iter()
        .find(|s| last.ends_with(*s))
        .copied()
        .unwrap_or("");
    // A numbered stack layer keeps its number ("gate_stack.1.thickness_nm" -> "stack1-thickness").
    let mut name = last.trim_end_matches(suffix).to_string();
    let parts: Vec<&str> = key.split('.').collect();
    if parts.len() >= 3 {
        name = format!(
            "{}{}-{name}",
            parts[0].trim_start_matches("gate_"),
            parts[1]
        );
    }
    (name, unit.into())
}

/// The axis values of row `k` that tell it apart: (title text, file-name
/// text), e.g. ("L_g = 20 nm, tsi = 7 nm", "Lg-20nm_tsi-7nm"). When one text
/// axis determines every other axis but the length (a zip of an
/// architecture with its settings), it stands for them.
pub fn point_name(f: &SweepFile, k: usize) -> (String, String) {
    let row = &f.rows[k];
    let determines = |a: usize| {
        let mut seen: std::collections::BTreeMap<String, String> = Default::default();
        f.rows.iter().all(|r| {
            let AxisValue::Text(t) = &r.axis[a] else {
                return false;
            };
            let rest: String = r
                .axis
                .iter()
                .enumerate()
                .filter(|(b, _)| *b != a && f.axes[*b].key != LENGTH_KEY)
                .map(|(_, v)| v.to_string())
                .collect::<Vec<_>>()
                .join("|");
            seen.entry(t.clone()).or_insert(rest.clone()) == &rest
        })
    };
    let others: Vec<usize> = (0..f.axes.len())
        .filter(|&a| f.axes[a].key != LENGTH_KEY)
        .collect();
    let shown: Vec<usize> = match others
        .iter()
        .find(|&&a| !f.axes[a].numeric && determines(a))
    {
        Some(&a) if others.len() > 1 => (0..f.axes.len())
            .filter(|&b| b == a || f.axes[b].key == LENGTH_KEY)
            .collect(),
        _ => (0..f.axes.len()).collect(),
    };
    // Gate length first.
    let mut shown = shown;
    shown.sort_by_key(|&a| f.axes[a].key != LENGTH_KEY);
    let (mut title, mut file) = (Vec::new(), Vec::new());
    for a in shown {
        match &row.axis[a] {
            AxisValue::Text(t) => {
                title.push(t.clone());
                file.push(t.clone());
            }
            AxisValue::Number(x) => {
                let (name, unit) = short_key(&f.axes[a].key);
                let shown_name = if f.axes[a].key == LENGTH_KEY {
                    "L_g".to_string()
                } else {
                    name.clone()
                };
                let sp = if unit.is_empty() { "" } else { " " };
                title.push(format!("{shown_name} = {}{sp}{unit}", short_number(*x)));
                file.push(format!(
                    "{name}-{}{}",
                    short_number(*x),
                    unit.replace(['^', '/', ' '], "")
                ));
            }
        }
    }
    if title.is_empty() {
        return (
            format!("point {}", row.index),
            format!("point-{}", row.index),
        );
    }
    (title.join(", "), safe_name(&file.join("_")))
}

/// A figure left out, and why.
#[derive(Debug, Clone, PartialEq)]
pub struct Omission {
    pub reason: String,
    /// True when the data should have held the figure (a solve that did not
    /// converge); false when it never could (theory points have no curves).
    pub expected: bool,
}

impl Omission {
    pub(crate) fn missing(reason: String) -> Self {
        Omission {
            reason,
            expected: true,
        }
    }
}

/// The figures of one point: I_D-V_G, and where a map is stored, the
/// potential map and the band edge along the leakiest path.
#[derive(Debug, Clone)]
pub struct PointFigures<'a> {
    /// The file-name form of the point's axis values.
    pub name: String,
    /// None when no bias point has a current.
    pub iv: Option<Figure>,
    pub map: Option<MapFigure<'a>>,
    pub band: Option<Figure>,
}

/// Where the threshold current lies: the lin curve's current at V_t,lin
/// (log-linear between bias points), which is I_cc W/L_g by the
/// constant-current definition of V_t (MODEL.md, extraction).
fn current_at(curve: &CurveData, vt: f64) -> Option<f64> {
    let pts: Vec<(f64, f64)> = curve
        .vgs_v
        .iter()
        .zip(&curve.id_lin)
        .filter(|(_, i)| i.is_finite() && i.abs() > 0.0)
        .map(|(&g, &i)| (g, i.abs().ln()))
        .collect();
    pts.windows(2)
        .find(|w| w[0].0 <= vt && vt <= w[1].0 && w[1].0 > w[0].0)
        .map(|w| {
            let t = (vt - w[0].0) / (w[1].0 - w[0].0);
            (w[0].1 + t * (w[1].1 - w[0].1)).exp()
        })
}

/// The I_D-V_G figure: |I_D| on a log scale at both drain biases, V_t
/// (lin, sat) as vertical lines and the threshold current as a horizontal
/// line. None when no bias point has a current.
pub fn iv_figure(
    stem: &str,
    title: &str,
    curve: &CurveData,
    vds: (f64, f64),
    vt: (Option<f64>, Option<f64>),
    threshold_current_a_per_um: Option<f64>,
) -> Option<Figure> {
    let mut fig = Figure::new(stem, title, "gate voltage V_GS (V)", "|I_D| (A/um)");
    fig.y_scale = Scale::Log;
    for (c, (ids, v)) in [(&curve.id_lin, vds.0), (&curve.id_sat, vds.1)]
        .into_iter()
        .enumerate()
    {
        let points: Vec<(f64, f64)> = curve
            .vgs_v
            .iter()
            .zip(ids)
            .filter(|(g, i)| g.is_finite() && i.is_finite() && i.abs() > 0.0)
            .map(|(&g, &i)| (g, i.abs()))
            .collect();
        if !points.is_empty() {
            fig.traces.push(Trace {
                label: format!("V_DS = {} V", short_number(v)),
                points,
                style: Style::solved(c),
            });
        }
    }
    if !fig.is_drawable() {
        return None;
    }
    for (c, (name, v)) in [("V_t,lin", vt.0), ("V_t,sat", vt.1)]
        .into_iter()
        .enumerate()
    {
        if let Some(x) = v.filter(|x| x.is_finite()) {
            fig.cuts.push(Cut {
                x,
                label: format!("{name} = {x:.3} V"),
                colour: Some(c),
            });
        }
    }
    let ith = threshold_current_a_per_um.or_else(|| vt.0.and_then(|v| current_at(curve, v)));
    if let Some(i) = ith.filter(|i| i.is_finite() && *i > 0.0) {
        fig.levels.push(Level {
            y: i,
            label: format!("I_cc W/L_g = {i:.2e} A/um"),
        });
    }
    Some(fig)
}

/// The band-edge figure along the leakiest row at both drain biases, with
/// the gate edges; None without a converged off-state potential.
pub fn band_figure(stem: &str, title: &str, map: &MapData, vds: (f64, f64)) -> Option<Figure> {
    let traces = [
        (&map.psi_lin_v, map.leakiest_depth_lin_nm, vds.0),
        (&map.psi_sat_v, map.leakiest_depth_sat_nm, vds.1),
    ]
    .map(|(psi, depth, v)| match (psi, depth) {
        (Some(p), Some(d)) if p.len() == map.nx() * map.ny() => Some(BandTrace {
            vds_v: v,
            line: format!("depth {d:.1} nm"),
            points: map.band_along(p, d),
        }),
        _ => None,
    });
    band_lines_figure(stem, title, &traces, (map.gate_start_nm, map.gate_end_nm))
}

/// The band edge along one leakiest line at one drain bias.
#[derive(Debug, Clone, PartialEq)]
pub struct BandTrace {
    pub vds_v: f64,
    /// Where the line runs, for the legend ("depth 1.0 nm").
    pub line: String,
    /// (x along the channel nm, band edge - source Fermi level eV).
    pub points: Vec<(f64, f64)>,
}

/// The band-edge figure of [`band_figure`] from its traces (lin, sat; None:
/// that drain bias has no converged off state) and the gate edges, nm;
/// None when no trace has a value.
pub fn band_lines_figure(
    stem: &str,
    title: &str,
    traces: &[Option<BandTrace>],
    gate_nm: (f64, f64),
) -> Option<Figure> {
    let mut fig = Figure::new(
        stem,
        title,
        "x along the channel (nm)",
        "band edge - source Fermi level (eV)",
    );
    for (c, t) in traces.iter().enumerate() {
        if let Some(t) = t {
            fig.traces.push(Trace {
                label: format!("V_DS = {} V ({})", short_number(t.vds_v), t.line),
                points: t.points.clone(),
                style: Style::curve(c),
            });
        }
    }
    if !fig.is_drawable() {
        return None;
    }
    for (x, l) in [(gate_nm.0, "gate start"), (gate_nm.1, "gate end")] {
        fig.cuts.push(Cut {
            x,
            label: l.into(),
            colour: None,
        });
    }
    Some(fig)
}

/// The potential map figure (off state, V_DS,sat if converged, else lin).
fn map_figure<'a>(
    stem: &str,
    name: &str,
    map: &'a MapData,
    vds: (f64, f64),
) -> Option<MapFigure<'a>> {
    let (psi, v) = match (&map.psi_sat_v, &map.psi_lin_v) {
        (Some(p), _) => (p, vds.1),
        (None, Some(p)) => (p, vds.0),
        _ => return None,
    };
    MapFigure::new(
        stem,
        &format!("Potential, off state, V_DS = {} V: {name}", short_number(v)),
        map,
        psi,
    )
}

/// The per-point figures a sweep file supports: every point holding a map,
/// else the first ok point with curves. Returns the figures and what was
/// left out (theory points have no curves; a failed point may have none).
pub fn point_figures(f: &SweepFile) -> (Vec<PointFigures<'_>>, Vec<Omission>) {
    let mut chosen: Vec<usize> = (0..f.rows.len())
        .filter(|&k| f.rows[k].map.is_some())
        .collect();
    let mut notes = Vec::new();
    if chosen.is_empty() {
        match (0..f.rows.len())
            .find(|&k| f.rows[k].status.is_ok() && !f.rows[k].curve.vgs_v.is_empty())
        {
            Some(k) => chosen.push(k),
            None if !f.rows.is_empty() => notes.push(Omission {
                reason: "no I_D-V_G figure: no point of this file holds curves (theory \
                         points, such as fins and wires swept with --fins theory, \
                         have no along-channel solve)"
                    .to_string(),
                expected: f.rows.iter().any(|r| !r.curve.vgs_v.is_empty()),
            }),
            None => {}
        }
    }
    let vt = |k: usize, name: &str| {
        let i = f.figures.iter().position(|n| n == name)?;
        f.rows[k].figures.get(i).copied().flatten()
    };
    let mut out = Vec::new();
    for k in chosen {
        let r = &f.rows[k];
        let (title, file) = point_name(f, k);
        let iv = iv_figure(
            &format!("iv_{file}"),
            &format!("I_D-V_G: {title}"),
            &r.curve,
            r.vds_v,
            (vt(k, "vt_lin_V"), vt(k, "vt_sat_V")),
            None,
        );
        if iv.is_none() {
            notes.push(Omission::missing(format!(
                "point {} ({title}): no converged drain current, no I_D-V_G figure",
                r.index
            )));
        }
        let map = r
            .map
            .as_ref()
            .and_then(|m| map_figure(&format!("potential_map_{file}"), &title, m, r.vds_v));
        let band = r.map.as_ref().and_then(|m| {
            band_figure(
                &format!("band_{file}"),
                &format!("Band edge along the leakiest path, off state: {title}"),
                m,
                r.vds_v,
            )
        });
        if r.map.is_some() && (map.is_none() || band.is_none()) {
            notes.push(Omission::missing(format!(
                "point {} ({title}): no converged off-state potential, no map or band figure",
                r.index
            )));
        }
        if iv.is_some() || map.is_some() || band.is_some() {
            out.push(PointFigures {
                name: file,
                iv,
                map,
                band,
            });
        }
    }
    // Distinct file names even when two points show the same values.
    let mut seen = std::collections::BTreeSet::new();
    for (n, p) in out.iter_mut().enumerate() {
        if !seen.insert(p.name.clone()) {
            p.name = format!("{}_{n}", p.name);
            if let Some(i) = &mut p.iv {
                i.stem = format!("{}_{n}", i.stem);
            }
            if let Some(m) = &mut p.map {
                m.stem = format!("{}_{n}", m.stem);
            }
            if let Some(b) = &mut p.band {
                b.stem = format!("{}_{n}", b.stem);
            }
        }
    }
    (out, notes)
}

/// "NAME, L_g = 20 nm": a solved device in titles.
pub fn device_name(r: &DeviceReport) -> String {
    format!("{}, L_g = {} nm", r.name, short_number(r.gate_length_nm))
}

/// The I_D-V_G figure of one device report (its curves, V_t lines and
/// threshold current); None when no bias point has a current.
pub fn report_iv_figure(r: &DeviceReport, stem: &str) -> Option<Figure> {
    let nan = |v: &Vec<Option<f64>>| v.iter().map(|x| x.unwrap_or(f64::NAN)).collect();
    let curve = CurveData {
        vgs_v: r.vgs_v.clone(),
        id_lin: nan(&r.id_lin),
        id_sat: nan(&r.id_sat),
    };
    iv_figure(
        stem,
        &format!("I_D-V_G: {}", device_name(r)),
        &curve,
        (r.vds_lin_v, r.vds_sat_v),
        (r.vt_lin_v, r.vt_sat_v),
        Some(r.threshold_current_a_per_um),
    )
}

/// The figures of one solved device, named `iv`, `potential_map`, `band`.
pub fn device_figures<'a>(
    sol: &DeviceSolution,
    map: &'a MapData,
) -> (Option<PointFigures<'a>>, Vec<Omission>) {
    let r = &sol.report;
    let name = device_name(r);
    let vds = (r.vds_lin_v, r.vds_sat_v);
    let Some(iv) = report_iv_figure(r, "iv") else {
        return (
            None,
            vec![Omission::missing(format!(
                "{name}: no converged drain current, no figures"
            ))],
        );
    };
    let mut notes = Vec::new();
    let mapf = map_figure("potential_map", &name, map, vds);
    let band = band_figure(
        "band",
        &format!("Band edge along the leakiest path, off state: {name}"),
        map,
        vds,
    );
    if mapf.is_none() || band.is_none() {
        notes.push(Omission::missing(format!(
            "{name}: no converged off-state potential, no map or band figure"
        )));
    }
    (
        Some(PointFigures {
            name: String::new(),
            iv: Some(iv),
            map: mapf,
            band,
        }),
        notes,
    )
}
