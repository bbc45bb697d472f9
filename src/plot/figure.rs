//! Pure descriptions of figures: what a figure shows (series and their
//! styles, guide lines, marks, legend, title, file name), with no drawing.
//! [`super::describe`] builds them from data, [`super::draw`] draws them;
//! tests assert on these descriptions.

/// How a trace's points are joined.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum LineStyle {
    Solid,
    Dashed,
    /// Points only.
    None,
}

/// The marker at each point of a trace.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum MarkerStyle {
    /// A filled circle: a solved value.
    Filled,
    /// A ring with a white centre: a value from theory.
    Hollow,
    /// No marker.
    None,
}

/// The look of one trace; `colour` indexes [`super::PALETTE`].
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Style {
    pub colour: usize,
    pub line: LineStyle,
    pub marker: MarkerStyle,
}

impl Style {
    /// A solved series: solid, filled markers.
    pub fn solved(colour: usize) -> Style {
        Style {
            colour,
            line: LineStyle::Solid,
            marker: MarkerStyle::Filled,
        }
    }
    /// A theory series: dashed, hollow markers.
    pub fn theory(colour: usize) -> Style {
        Style {
            colour,
            line: LineStyle::Dashed,
            marker: MarkerStyle::Hollow,
        }
    }
    /// A curve: solid, no markers.
    pub fn curve(colour: usize) -> Style {
        Style {
            colour,
            line: LineStyle::Solid,
            marker: MarkerStyle::None,
        }
    }
}

/// A named set of (x, y) points drawn in one style.
#[derive(Debug, Clone, PartialEq)]
pub struct Trace {
    /// Legend text (theory traces end in "(theory)").
    pub label: String,
    pub points: Vec<(f64, f64)>,
    pub style: Style,
}

/// A horizontal guide line across the plot (a criterion, a threshold current).
#[derive(Debug, Clone, PartialEq)]
pub struct Level {
    pub y: f64,
    /// Written on the plot beside the line, and in the legend.
    pub label: String,
}

/// A vertical guide line (V_t, the gate edges).
#[derive(Debug, Clone, PartialEq)]
pub struct Cut {
    pub x: f64,
    /// Written on the plot beside the line.
    pub label: String,
    /// Index into [`super::PALETTE`], or None for grey.
    pub colour: Option<usize>,
}

/// A point singled out with a ring and a drop line to the x axis: the
/// shortest compliant gate length of a series.
#[derive(Debug, Clone, PartialEq)]
pub struct Mark {
    pub x: f64,
    pub y: f64,
    pub colour: usize,
}

/// A point with no value on this figure (failed, or the figure missing),
/// crossed on the x axis at its x.
#[derive(Debug, Clone, PartialEq)]
pub struct Missing {
    pub x: f64,
    pub colour: usize,
}

/// The y axis scale.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Scale {
    Linear,
    Log,
}

/// What one legend line shows: the glyph (drawn as on the plot) and its text.
#[derive(Debug, Clone, PartialEq)]
pub enum Glyph {
    /// A trace's line and marker.
    Trace(Style),
    /// A guide line (criterion or threshold current).
    Level,
    /// The ring of a [`Mark`].
    Mark,
    /// The cross of a [`Missing`] point.
    Missing,
}

/// One legend line.
#[derive(Debug, Clone, PartialEq)]
pub struct LegendEntry {
    pub glyph: Glyph,
    pub label: String,
}

/// A complete x-y figure.
#[derive(Debug, Clone, PartialEq)]
pub struct Figure {
    /// File name without extension (a safe file-name form).
    pub stem: String,
    pub title: String,
    /// Axis titles, with units.
    pub x_label: String,
    pub y_label: String,
    pub y_scale: Scale,
    pub traces: Vec<Trace>,
    pub levels: Vec<Level>,
    pub cuts: Vec<Cut>,
    pub marks: Vec<Mark>,
    /// Legend text of the marks (one line for all of them).
    pub mark_label: String,
    pub missing: Vec<Missing>,
}

impl Figure {
    /// An empty figure with these names.
    pub fn new(stem: &str, title: &str, x_label: &str, y_label: &str) -> Figure {
        Figure {
            stem: stem.into(),
            title: title.into(),
            x_label: x_label.into(),
            y_label: y_label.into(),
            y_scale: Scale::Linear,
            traces: Vec::new(),
            levels: Vec::new(),
            cuts: Vec::new(),
            marks: Vec::new(),
            mark_label: String::new(),
            missing: Vec::new(),
        }
    }

    /// True when the figure has finite data to draw.
    pub fn is_drawable(&self) -> bool {
        self.traces.iter().any(|t| {
            t.points.iter().any(|p| {
                p.0.is_finite() && p.1.is_finite() && (self.y_scale == Scale::Linear || p.1 > 0.0)
            })
        })
    }

    /// The legend, in order: traces, guide lines, marks, missing points (counted).
    pub fn legend(&self) -> Vec<LegendEntry> {
        let mut out: Vec<LegendEntry> = self
            .traces
            .iter()
            .map(|t| LegendEntry {
                glyph: Glyph::Trace(t.style),
                label: t.label.clone(),
            })
            .collect();
        out.extend(self.levels.iter().map(|l| LegendEntry {
            glyph: Glyph::Level,
            label: l.label.clone(),
        }));
        if !self.marks.is_empty() {
            out.push(LegendEntry {
                glyph: Glyph::Mark,
                label: self.mark_label.clone(),
            });
        }
        if !self.missing.is_empty() {
            let n = self.missing.len();
            out.push(LegendEntry {
                glyph: Glyph::Missing,
                label: format!(
                    "failed or no value: {n} point{} (x on the axis)",
                    if n == 1 { "" } else { "s" }
                ),
            });
        }
        out
    }

    /// The x range over traces, cuts, marks and missing points, and the y
    /// range over traces, levels and marks (finite values; log: positive).
    pub fn extent(&self) -> Option<((f64, f64), (f64, f64))> {
        let ok_y = |y: f64| y.is_finite() && (self.y_scale == Scale::Linear || y > 0.0);
        let pts = self.traces.iter().flat_map(|t| t.points.iter().copied());
        let xs = pts
            .clone()
            .filter(|p| p.0.is_finite() && ok_y(p.1))
            .map(|p| p.0)
            .chain(self.cuts.iter().map(|c| c.x))
            .chain(self.missing.iter().map(|m| m.x))
            .chain(self.marks.iter().map(|m| m.x))
            .filter(|x| x.is_finite());
        let ys = pts
            .filter(|p| p.0.is_finite())
            .map(|p| p.1)
            .chain(self.levels.iter().map(|l| l.y))
            .chain(self.marks.iter().map(|m| m.y))
            .filter(|&y| ok_y(y));
        let range = |v: Vec<f64>| {
            let lo = v.iter().copied().fold(f64::INFINITY, f64::min);
            let hi = v.iter().copied().fold(f64::NEG_INFINITY, f64::max);
            lo.is_finite().then_some((lo, hi))
        };
        Some((range(xs.collect())?, range(ys.collect())?))
    }
}

/// A file-name-safe form of `s`: ASCII letters, digits, '.', '-' and '_'
/// kept, everything else '_'; never empty.
pub fn safe_name(s: &str) -> String {
    let out: String = s
        .chars()
        .map(|c| {
            if c.is_ascii_alphanumeric() || matches!(c, '.' | '-' | '_') {
                c
            } else {
                '_'
            }
        })
        .collect();
    let out = out.trim_matches('.').to_string();
    if out.is_empty() {
        "_".into()
    } else {
        out
    }
}

/// A number for titles and file names: plain for ordinary magnitudes,
/// exponent form (`3e18`) for very large or small ones; never "-0".
pub fn short_number(x: f64) -> String {
    if x == 0.0 {
        return "0".into();
    }
    if x.abs() >= 1e5 || x.abs() < 1e-3 {
        format!("{x:e}")
    } else {
        let s = format!("{:.4}", x);
        let s = s.trim_end_matches('0').trim_end_matches('.');
        if s == "-0" {
            "0".into()
        } else {
            s.to_string()
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn names_are_safe_and_numbers_short() {
        // Source: common practice (portable file names: letters, digits, . - _).
        assert_eq!(safe_name("iv_Lg-20nm_tsi-7nm"), "iv_Lg-20nm_tsi-7nm");
        assert_eq!(safe_name("a/b c\"d"), "a_b_c_d");
        assert_eq!(safe_name(".."), "_");
        assert_eq!(short_number(20.0), "20");
        assert_eq!(short_number(7.5), "7.5");
        assert_eq!(short_number(3e18), "3e18");
        assert_eq!(short_number(-0.0), "0");
        assert_eq!(short_number(-0.00001), "-1e-5");
        assert_eq!(short_number(-0.2), "-0.2");
    }

    #[test]
    fn legend_counts_missing_points_and_extent_covers_levels() {
        let mut f = Figure::new("s", "t", "x (nm)", "y (mV/V)");
        f.traces.push(Trace {
            label: "a".into(),
            points: vec![(10.0, 50.0), (20.0, 30.0)],
            style: Style::solved(0),
        });
        f.levels.push(Level {
            y: 100.0,
            label: "limit".into(),
        });
        f.missing = vec![Missing { x: 5.0, colour: 0 }, Missing { x: 8.0, colour: 1 }];
        let l = f.legend();
        assert_eq!(l.len(), 3);
        assert_eq!(l[2].glyph, Glyph::Missing);
        assert!(l[2].label.contains("2 points"), "{}", l[2].label);
        // The level lies above the data: the y range must reach it; the
        // missing points widen the x range.
        assert_eq!(f.extent(), Some(((5.0, 20.0), (30.0, 100.0))));
        assert!(f.is_drawable());
        f.traces[0].points = vec![(f64::NAN, 1.0)];
        assert!(!f.is_drawable());
    }
}
