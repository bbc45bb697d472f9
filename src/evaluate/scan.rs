//! Gate-length scans: the 2D (planar) or 3D (fins and wires) solve at each
//! length beside the theory from the natural length, or, chosen explicitly
//! for fins, the theory alone.
//! The length-independent [`Reference`] is solved once for the whole scan.

use rayon::prelude::*;
use serde::Serialize;

use super::device::evaluate;
use super::reference::{Reference, ReferenceError};
use super::report::{Method, Status, CAUTION};
use crate::device::{Architecture, FinMethod, Scenario};
use crate::progress::Observer;
use crate::theory::short_channel::{fit_lambda_from_dibl, LambdaFit};

/// One gate length of a scan.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ScanRow {
    pub gate_length_nm: f64,
    /// From the 2D or 3D solve (null for fins evaluated by theory alone, or if it failed).
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
    pub status: Status,
}

/// A whole scan.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ScanReport {
    pub name: String,
    pub architecture: Architecture,
    /// How the rows' figures were obtained ("2d-solve": the solve with the
    /// theory beside it; "theory": fins and wires, the theory alone).
    pub method: Method,
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
    Reference(#[from] ReferenceError),
    #[error("the natural length or long-channel reference failed: {0}")]
    Theory(String),
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
    let reference = Reference::of(s, observer)?;
    let lam = reference
        .lambda
        .clone()
        .map_err(|e| ScanError::Theory(e.to_string()))?;
    let inputs = reference.theory.clone().map_err(ScanError::Theory)?;
    let lambda = lam.lambda_numeric_nm;
    let method = if s.architecture.is_planar() {
        Method::TwoDSolve
    } else if s.fin_method == FinMethod::Solve3d {
        Method::ThreeDSolve
    } else {
        Method::Theory
    };
    let rows: Vec<ScanRow> = scenarios
        .par_iter()
        .map(|sc| {
            let l = sc.geometry.gate_length_nm;
            let mut problems = Vec::new();
            let th = inputs
                .at(l)
                .map_err(|e| problems.push(format!("theory: {e}")))
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
                status: Status::Ok,
            };
            if method != Method::Theory {
                match evaluate(sc, &reference, observer) {
                    Ok(ev) => {
                        let r = ev.report;
                        row.vt_lin_v = r.vt_lin_v;
                        row.vt_rolloff_mv = r.vt_rolloff_mv;
                        row.dibl_mv_per_v = r.dibl_mv_per_v;
                        row.ss_lin_mv_per_dec = r.ss_lin_mv_per_dec;
                        row.barrier_lowering_mev = r.barrier_lowering_mev;
                        problems.extend(r.problems);
                    }
                    Err(e) => problems.push(format!("solve: {e}")),
                }
            }
            row.status = Status::from_problems(&problems);
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
        architecture: s.architecture,
        method,
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
