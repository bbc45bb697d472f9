//! Gate-length scans: the 2D solve at each length beside the theory from the
//! natural length (planar devices), or the theory alone (fins and wires).

use rayon::prelude::*;
use serde::Serialize;

use crate::device::Scenario;
use crate::run::{run_device, Observer, CAUTION};
use crate::theory::short_channel::{fit_lambda_from_dibl, theory_inputs_with_lambda, LambdaFit};
use crate::theory::{lambda_report, TheoryError};

/// One gate length of a scan.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ScanRow {
    pub gate_length_nm: f64,
    /// From the 2D along-channel solve (null for fins and wires, or if it failed).
    #[serde(rename = "vt_lin_V")]
    pub vt_lin_v: Option<f64>,
    #[serde(rename = "vt_rolloff_mV")]
    pub vt_rolloff_mv: Option<f64>,
    #[serde(rename = "dibl_mV_per_V")]
    pub dibl_mv_per_v: Option<f64>,
    #[serde(rename = "ss_lin_mV_per_dec")]
    pub ss_lin_mv_per_dec: Option<f64>,
    #[serde(rename = "barrier_lowering_meV")]
    pub barrier_lowering_mev: Option<f64>,
    /// Theory (Liu et al., IEEE TED 40(1), 86, 1993) with the numeric body natural length.
    #[serde(rename = "theory_rolloff_mV")]
    pub theory_rolloff_mv: Option<f64>,
    #[serde(rename = "theory_dibl_mV_per_V")]
    pub theory_dibl_mv_per_v: Option<f64>,
    #[serde(rename = "theory_ss_mV_per_dec")]
    pub theory_ss_mv_per_dec: Option<f64>,
    pub lg_over_lambda: f64,
    /// "ok" or why something is missing.
    pub status: String,
}

/// A whole scan.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ScanReport {
    pub name: String,
    pub architecture: String,
    /// "2d-solve and theory" (planar) or "theory only" (fins and wires).
    pub method: String,
    pub lambda_numeric_nm: f64,
    pub lambda_dielectric_path_nm: Option<f64>,
    pub lambda_closed_forms: std::collections::BTreeMap<String, f64>,
    /// Lambda fitted to the solved DIBL against L (planar, two or more lengths).
    pub lambda_fitted: Option<LambdaFit>,
    /// Lambda fitted to the solved barrier lowering against L.
    pub lambda_fitted_barrier: Option<LambdaFit>,
    pub lambda_fit_note: String,
    #[serde(rename = "vt_long_V")]
    pub vt_long_v: f64,
    #[serde(rename = "ss_long_mV_per_dec")]
    pub ss_long_mv_per_dec: f64,
    /// V_bi - phi_s used by the theory, V.
    #[serde(rename = "theory_barrier_V")]
    pub theory_barrier_v: f64,
    pub rows: Vec<ScanRow>,
    pub caution: String,
}

/// Why a scan could not run at all (single lengths that fail are rows with a status).
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum ScanError {
    #[error("no gate lengths given")]
    Empty,
    #[error(transparent)]
    Device(#[from] crate::device::DeviceError),
    #[error(transparent)]
    Theory(#[from] TheoryError),
}

/// Solves (planar) or predicts (fins and wires) each gate length, in parallel.
pub fn scan(
    s: &Scenario,
    lengths: &[f64],
    observer: &dyn Observer,
) -> Result<ScanReport, ScanError> {
    if lengths.is_empty() {
        return Err(ScanError::Empty);
    }
    let scenarios: Vec<Scenario> = lengths
        .iter()
        .map(|&l| s.with_gate_length(l))
        .collect::<Result<_, _>>()?;
    let lam = lambda_report(s)?;
    let lambda = lam.lambda_numeric_nm;
    let inputs = theory_inputs_with_lambda(s, lambda)?;
    let theory = |l: f64| inputs.at(l);
    let rows: Vec<ScanRow> = scenarios
        .par_iter()
        .map(|sc| {
            let l = sc.geometry.gate_length_nm;
            let mut status = Vec::new();
            let th = theory(l)
                .map_err(|e| status.push(format!("theory: {e}")))
                .ok();
            let mut row = ScanRow {
                gate_length_nm: l,
                vt_lin_v: None,
                vt_rolloff_mv: None,
                dibl_mv_per_v: None,
                ss_lin_mv_per_dec: None,
                barrier_lowering_mev: None,
                theory_rolloff_mv: th.as_ref().map(|t| 1000.0 * t.roll_off_lin_v),
                theory_dibl_mv_per_v: th.as_ref().map(|t| t.dibl_mv_per_v),
                theory_ss_mv_per_dec: th.as_ref().map(|t| t.ss_mv_per_dec),
                lg_over_lambda: l / lambda,
                status: String::new(),
            };
            if sc.architecture.is_planar() {
                match run_device(sc, observer) {
                    Ok(sol) => {
                        let r = sol.report;
                        row.vt_lin_v = r.vt_lin_v;
                        row.vt_rolloff_mv = r.vt_rolloff_mv;
                        row.dibl_mv_per_v = r.dibl_mv_per_v;
                        row.ss_lin_mv_per_dec = r.ss_lin_mv_per_dec;
                        row.barrier_lowering_mev = r.barrier_lowering_mev;
                        status.extend(r.problems);
                    }
                    Err(e) => status.push(format!("solve: {e}")),
                }
            }
            row.status = if status.is_empty() {
                "ok".into()
            } else {
                status.join("; ")
            };
            row
        })
        .collect();
    let fit = |pick: &dyn Fn(&ScanRow) -> Option<f64>| {
        let pts: Vec<(f64, f64)> = rows
            .iter()
            .filter_map(|r| pick(r).map(|d| (r.gate_length_nm, d)))
            .collect();
        if pts.len() >= 2 {
            fit_lambda_from_dibl(&pts, 0.0).ok()
        } else {
            None
        }
    };
    let lambda_fitted = fit(&|r| r.dibl_mv_per_v);
    let lambda_fitted_barrier = fit(&|r| r.barrier_lowering_mev);
    Ok(ScanReport {
        name: s.name.clone(),
        architecture: s.architecture.name().into(),
        method: if s.architecture.is_planar() { "2d-solve and theory".into() } else { "theory only".into() },
        lambda_numeric_nm: lambda,
        lambda_dielectric_path_nm: lam.lambda_dielectric_path_nm,
        lambda_closed_forms: lam.lambda_closed_forms,
        lambda_fitted,
        lambda_fitted_barrier,
        lambda_fit_note: "least-squares lines of ln(DIBL) and of ln(barrier lowering) against L over the solved \
                          lengths; lambda = -1/(2 slope) (leading exp(-L/(2 lambda)) term of Liu et al. 1993). \
                          Constant-current DIBL also holds a slowly decaying part (the drain shortens the \
                          low-density stretch that limits subthreshold current, about 1/L), so its fit reads \
                          long; the barrier lowering is the purely electrostatic measure."
            .into(),
        vt_long_v: inputs.vt_long_v,
        ss_long_mv_per_dec: inputs.ss_long_mv_per_dec,
        theory_barrier_v: inputs.barrier_v,
        rows,
        caution: CAUTION.into(),
    })
}

/// Console table of a scan.
pub fn render_text(r: &ScanReport) -> String {
    let f = |v: Option<f64>, d: usize| {
        v.map(|x| format!("{x:.d$}"))
            .unwrap_or_else(|| "n/a".into())
    };
    let mut o = format!(
        "{} ({}): {}\n  lambda numeric {:.2} nm{}; closed forms: {}\n",
        r.name,
        r.architecture,
        r.method,
        r.lambda_numeric_nm,
        r.lambda_dielectric_path_nm
            .map(|d| format!(" (dielectric path {d:.2} nm)"))
            .unwrap_or_default(),
        r.lambda_closed_forms
            .iter()
            .map(|(k, v)| format!("{k} {v:.2} nm"))
            .collect::<Vec<_>>()
            .join(", ")
    );
    for (what, fit) in [
        ("barrier lowering", &r.lambda_fitted_barrier),
        ("DIBL", &r.lambda_fitted),
    ] {
        if let Some(fit) = fit {
            o.push_str(&format!(
                "  lambda fitted to the solved {what}: {:.2} nm (R^2 {:.4}, {} lengths)\n",
                fit.lambda_nm, fit.r_squared, fit.points
            ));
        }
    }
    o.push_str(&format!(
        "  V_t,long {:.4} V, SS_long {:.1} mV/dec, theory barrier V_bi - phi_s {:.3} V\n\n",
        r.vt_long_v, r.ss_long_mv_per_dec, r.theory_barrier_v
    ));
    o.push_str("   L_g nm  L_g/lambda | roll-off mV  theory | DIBL mV/V  theory | SS mV/dec  theory | status\n");
    for row in &r.rows {
        o.push_str(&format!(
            "  {:7.1}  {:10.2} | {:>11} {:>7} | {:>9} {:>7} | {:>9} {:>7} | {}\n",
            row.gate_length_nm,
            row.lg_over_lambda,
            f(row.vt_rolloff_mv, 1),
            f(row.theory_rolloff_mv, 1),
            f(row.dibl_mv_per_v, 1),
            f(row.theory_dibl_mv_per_v, 1),
            f(row.ss_lin_mv_per_dec, 1),
            f(row.theory_ss_mv_per_dec, 1),
            row.status
        ));
    }
    o.push_str(&format!("\nTheory: Liu et al., IEEE TED 40(1), 86, 1993, with the numeric natural length.\nCaution: {}\n", r.caution));
    o
}
