//! The engineer's answer read from a sweep file: for each series (every
//! combination of the axes other than the gate length), the shortest swept
//! gate length whose figures meet the criteria, and the shortest compliant
//! length interpolated between solved lengths
//! ([`crate::evaluate::shortest_compliant`]). Reads the file's figures,
//! nothing else.

use crate::evaluate::{
    shortest_compliant, Criteria, CriteriaVerdict, Criterion, LengthPoint, ShortestAnswer,
};
use crate::io::shortest::{ShortestRow, ShortestTable};
use crate::io::{series_labels, SweepFile};

/// The shortest compliant length of one series, with the figures there.
#[derive(Debug, Clone, PartialEq)]
pub struct Compliant {
    pub gate_length_nm: f64,
    pub dibl_mv_per_v: f64,
    /// The larger of SS at V_DS,lin and V_DS,sat, mV/dec.
    pub ss_mv_per_dec: f64,
    pub lambda_numeric_nm: f64,
    pub lg_over_lambda: f64,
}

/// One series' outcome.
#[derive(Debug, Clone, PartialEq)]
pub struct SeriesOutcome {
    /// The series label ([`crate::io::series_labels`]).
    pub label: String,
    /// Positions in `SweepFile::rows` of the series' points, in file order.
    pub rows: Vec<usize>,
    /// Numeric natural length of the series' first point that has one, nm.
    pub lambda_numeric_nm: Option<f64>,
    /// None: no swept length of the series meets the criteria.
    pub shortest: Option<Compliant>,
    /// Points of the series whose status is not "ok".
    pub failed_points: usize,
    /// The shortest compliant length interpolated between solved lengths.
    pub answer: ShortestAnswer,
}

/// The outcome of every series of `f` against `criteria`, in order of first appearance.
pub fn per_series(f: &SweepFile, criteria: &Criteria) -> Vec<SeriesOutcome> {
    let labels = series_labels(f);
    let col = |name: &str| {
        f.figure(name)
            .unwrap_or_else(|| vec![f64::NAN; f.rows.len()])
    };
    let (lg, dibl, ss_lin, ss_sat, roll, lam) = (
        col("gate_length_nm"),
        col("dibl_mV_per_V"),
        col("ss_lin_mV_per_dec"),
        col("ss_sat_mV_per_dec"),
        col("vt_rolloff_mV"),
        col("lambda_numeric_nm"),
    );
    let finite = |x: f64| x.is_finite().then_some(x);
    let mut out: Vec<SeriesOutcome> = Vec::new();
    for (k, label) in labels.iter().enumerate() {
        let i = match out.iter().position(|o| &o.label == label) {
            Some(i) => i,
            None => {
                out.push(SeriesOutcome {
                    label: label.clone(),
                    rows: Vec::new(),
                    lambda_numeric_nm: None,
                    shortest: None,
                    failed_points: 0,
                    answer: shortest_compliant(&[], criteria),
                });
                out.len() - 1
            }
        };
        let o = &mut out[i];
        o.rows.push(k);
        o.lambda_numeric_nm = o.lambda_numeric_nm.or(finite(lam[k]));
        if !f.rows[k].status.is_ok() {
            o.failed_points += 1;
            continue;
        }
        let verdict = criteria.judge(
            finite(dibl[k]),
            finite(ss_lin[k]),
            finite(ss_sat[k]),
            finite(roll[k]),
        );
        let shorter = o.shortest.as_ref().is_none_or(|c| lg[k] < c.gate_length_nm);
        if verdict == CriteriaVerdict::Meets && shorter {
            o.shortest = Some(Compliant {
                gate_length_nm: lg[k],
                dibl_mv_per_v: dibl[k],
                ss_mv_per_dec: ss_lin[k].max(ss_sat[k]),
                lambda_numeric_nm: lam[k],
                lg_over_lambda: lg[k] / lam[k],
            });
        }
    }
    for o in &mut out {
        let points: Vec<LengthPoint> = o
            .rows
            .iter()
            .map(|&k| LengthPoint {
                gate_length_nm: lg[k],
                dibl_mv_per_v: finite(dibl[k]),
                ss_lin_mv_per_dec: finite(ss_lin[k]),
                ss_sat_mv_per_dec: finite(ss_sat[k]),
                vt_rolloff_mv: finite(roll[k]),
                ok: f.rows[k].status.is_ok(),
            })
            .collect();
        o.answer = shortest_compliant(&points, criteria);
    }
    out
}

/// The per-series answers as the table stored in the file's `shortest` group.
pub fn table(outcomes: &[SeriesOutcome], criteria: &Criteria) -> ShortestTable {
    let rows = outcomes
        .iter()
        .map(|o| {
            let a = &o.answer;
            ShortestRow {
                series: o.label.clone(),
                gate_length_nm: a.gate_length_nm,
                kind: a.kind.name().into(),
                limiting_criterion: a.limiting_criterion.map_or("none", |c| c.name()).into(),
                lambda_numeric_nm: o.lambda_numeric_nm,
                lg_over_lambda: a
                    .gate_length_nm
                    .zip(o.lambda_numeric_nm)
                    .map(|(l, m)| l / m),
                bracket_short_nm: a.bracket_nm.map(|b| b.0),
                bracket_long_nm: a.bracket_nm.map(|b| b.1),
                swept_shortest_nm: a.swept_shortest_nm,
                dibl_mv_per_v: a.dibl_mv_per_v,
                ss_mv_per_dec: a.ss_mv_per_dec,
                vt_rolloff_abs_mv: a.vt_rolloff_abs_mv,
                failed_points: o.failed_points,
                notes: a.notes.join("; "),
            }
        })
        .collect();
    ShortestTable {
        dibl_max_mv_per_v: criteria.dibl_max_mv_per_v,
        ss_max_mv_per_dec: criteria.ss_max_mv_per_dec,
        vt_rolloff_max_mv: criteria.vt_rolloff_max_mv,
        interpolation: Criterion::ALL
            .iter()
            .map(|c| format!("{}: {}", c.name(), c.interpolation()))
            .collect::<Vec<_>>()
            .join("; "),
        rows,
    }
}

/// The `shortest` group of a complete file judged by `criteria` (None without criteria).
pub fn stored_answer(f: &SweepFile, criteria: &Criteria) -> Option<ShortestTable> {
    (!criteria.is_empty()).then(|| table(&per_series(f, criteria), criteria))
}
