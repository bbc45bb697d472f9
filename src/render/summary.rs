//! The answer of a sweep in words: the shortest compliant gate length of each
//! series, and the demo's summary built on it.

use std::path::PathBuf;

use crate::evaluate::{Criteria, Method, CAUTION};
use crate::sweep::shortest::SeriesOutcome;

/// What the demo did, for [`demo_text`].
#[derive(Debug, Clone)]
pub struct DemoSummary {
    /// Gate lengths swept, nm.
    pub lengths_nm: Vec<f64>,
    pub criteria: Criteria,
    pub points: usize,
    pub failed_points: usize,
    pub elapsed_s: f64,
    /// Each series (architecture) with how its figures were obtained.
    pub series: Vec<(SeriesOutcome, Method)>,
    pub sweep_file: PathBuf,
    pub figure_files: usize,
    pub summary_file: PathBuf,
}

/// One table row per series: the shortest compliant length and the figures there.
pub fn shortest_text(series: &[(SeriesOutcome, Method)], range_nm: (f64, f64)) -> String {
    let (lo, hi) = range_nm;
    let mut t = String::from(
        "  series        method    lambda nm  shortest L_g nm  L_g/lambda  DIBL mV/V  SS mV/dec\n",
    );
    let lam = |o: &SeriesOutcome| {
        o.lambda_numeric_nm
            .map_or("n/a".to_string(), |l| format!("{l:.2}"))
    };
    for (o, method) in series {
        match &o.shortest {
            Some(c) => t.push_str(&format!(
                "  {:<12}  {:<8}  {:>9.2}  {:>15.1}  {:>10.2}  {:>9.1}  {:>9.1}\n",
                o.label,
                method.name(),
                c.lambda_numeric_nm,
                c.gate_length_nm,
                c.lg_over_lambda,
                c.dibl_mv_per_v,
                c.ss_mv_per_dec
            )),
            None => t.push_str(&format!(
                "  {:<12}  {:<8}  {:>9}  none in the range ({lo} to {hi} nm)\n",
                o.label,
                method.name(),
                lam(o)
            )),
        }
        if o.failed_points > 0 {
            t.push_str(&format!(
                "      ({} point(s) of {} failed; see `status` in the sweep file)\n",
                o.failed_points, o.label
            ));
        }
    }
    t
}

/// The demo's summary (printed by `gatehold demo` and written to `summary.txt`).
pub fn demo_text(r: &DemoSummary) -> String {
    let (lo, hi) = r
        .lengths_nm
        .iter()
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), &l| {
            (a.min(l), b.max(l))
        });
    let mut t = format!(
        "gatehold demo: the invented \"ridge-7\" node built four ways, {} gate lengths from {lo} to {hi} nm\n\
         ({} points, {} failed; {:.1} s).\n\
         Shortest swept gate length with {} (SS: the larger of SS at\n\
         V_DS,lin and V_DS,sat). These are common-practice screening targets, not standards.\n\n",
        r.lengths_nm.len(),
        r.points,
        r.failed_points,
        r.elapsed_s,
        r.criteria.text(),
    );
    t.push_str(&shortest_text(&r.series, (lo, hi)));
    t.push_str("\nInterpolated between solved lengths (DIBL and |roll-off| log-linear in L_g, SS linear):\n");
    for (o, _) in &r.series {
        t.push_str("  ");
        t.push_str(&super::shortest::answer_line(
            &o.label,
            &o.answer,
            o.lambda_numeric_nm,
        ));
    }
    t.push_str(
        "\nmethod: 2d-solve = along-channel 2D nonlinear Poisson solve at each length; 3d-solve = the\n\
         fin solved in 3D along the channel at each length (the same model and extraction); theory = the\n\
         long-channel cross-section solve with the Liu et al. (IEEE TED 40(1), 86, 1993) model from the\n\
         numeric natural length (dashed curves in the figures, for every architecture).\n",
    );
    t.push_str(&format!(
        "\nwritten: {} ({} figure files), {}\n\nCaution: {CAUTION}\n",
        r.sweep_file.display(),
        r.figure_files,
        r.summary_file.display()
    ));
    t
}
