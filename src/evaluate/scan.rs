//! Gate-length scans: the 2D (planar) or 3D (fins and wires) solve at each
//! length beside the theory from the natural length, or, chosen explicitly
//! for fins, the theory alone.
//! The length-independent [`Reference`] is solved once for the whole scan.

use rayon::prelude::*;
use serde::Serialize;

use super::criteria::{shortest_compliant, Criteria, LengthPoint, ShortestAnswer};
use super::device::evaluate;
use super::reference::{Reference, ReferenceError};
use super::report::{Method, Status, CAUTION};
use crate::device::{Architecture, FinMethod, Scenario};
use crate::extract::electrical_length::{terada_muta, LengthCurve, TeradaMuta};
use crate::extract::line_tops;
use crate::progress::Observer;
use crate::theory::short_channel::{fit_lambda_from_dibl, LambdaFit, TheoryLength};

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
    #[serde(rename = "ss_sat_mV_per_dec")]
    pub ss_sat_mv_per_dec: Option<f64>,
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
    pub l_met_nm: f64,
    /// Electrical channel length (planar solves), nm.
    pub l_elec_nm: Option<f64>,
    #[serde(rename = "vt_rolloff_electrostatic_mV")]
    pub vt_rolloff_electrostatic_mv: Option<f64>,
    #[serde(rename = "vt_rolloff_length_mV")]
    pub vt_rolloff_length_mv: Option<f64>,
    #[serde(rename = "ioff_A_per_um")]
    pub ioff_a_per_um: Option<f64>,
    /// Cautions on this length's figures (merged junctions, L_elec below a few nm).
    pub warnings: Vec<String>,
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
    /// Fins and wires solved in 3D: lambda fitted to the barrier lowering on
    /// one fixed path for every length, the leakiest line of the shortest
    /// solved length at V_DS,sat (natural-length theory's exp(-L/(2 lambda))
    /// holds on each path; the leakiest line itself moves with L, up a
    /// tri-gate's fin as L grows, so `lambda_fitted_barrier` mixes paths).
    pub lambda_fitted_barrier_fixed_path: Option<FixedPathFit>,
    pub lambda_fit_note: String,
    /// The length the theory columns are evaluated at: "gate" (L_g) or "electrical" (L_elec).
    pub theory_length: &'static str,
    /// Delta L = L_g - L_elec by the channel-resistance method of Terada and
    /// Muta (Jpn. J. Appl. Phys. 18, 953, 1979) across the solved lengths, at
    /// two gate voltages in the subthreshold window of the longest length
    /// (planar, two or more lengths; meaningful where the lengths are long).
    pub terada_muta: Option<TeradaMuta>,
    #[serde(rename = "vt_long_V")]
    pub vt_long_v: f64,
    #[serde(rename = "ss_long_mV_per_dec")]
    pub ss_long_mv_per_dec: f64,
    /// V_bi - phi_s used by the theory, V.
    #[serde(rename = "theory_barrier_V")]
    pub theory_barrier_v: f64,
    pub rows: Vec<ScanRow>,
    /// The criteria judged by [`ScanReport::judge`] (null: none given).
    pub criteria: Option<CriteriaSet>,
    /// The shortest compliant length interpolated between the solved lengths (null: no criteria).
    pub shortest: Option<ShortestAnswer>,
    pub caution: String,
}

/// Lambda fitted on one fixed path (a line along x at fixed y and z).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct FixedPathFit {
    #[serde(flatten)]
    pub fit: LambdaFit,
    /// The path: across the fin (0 at its centre) and below the top silicon surface, nm.
    pub path_y_nm: f64,
    pub path_z_nm: f64,
}

/// Barrier lowering on every (y, z) line of one 3D solve, meV.
struct LineLowering {
    y_nm: Vec<f64>,
    z_nm: Vec<f64>,
    lowering_mev: Vec<Option<f64>>,
    /// The leakiest line at V_DS,sat (y, z), nm.
    leakiest: (f64, f64),
}

impl LineLowering {
    fn of(sol: &super::device::DeviceSolution, polarity: crate::device::Polarity) -> Option<Self> {
        let p = &sol.structure.problem;
        let (lin, sat) = (sol.lin.off_psi.as_ref()?, sol.sat.off_psi.as_ref()?);
        let b = sol.barrier_sat?;
        let (tl, ts) = (line_tops(p, lin, polarity), line_tops(p, sat, polarity));
        Some(LineLowering {
            y_nm: p.y.nodes.clone(),
            z_nm: p.z.nodes.clone(),
            lowering_mev: tl
                .iter()
                .zip(&ts)
                .map(|(a, b)| Some(1000.0 * (a.as_ref()?.0 - b.as_ref()?.0)))
                .collect(),
            leakiest: (b.y_nm, b.z_nm),
        })
    }

    /// The lowering on the line through the mesh nodes nearest (y, z).
    fn at(&self, (y, z): (f64, f64)) -> Option<f64> {
        let nearest = |nodes: &[f64], v: f64| {
            (0..nodes.len()).min_by(|&a, &b| (nodes[a] - v).abs().total_cmp(&(nodes[b] - v).abs()))
        };
        let (j, k) = (nearest(&self.y_nm, y)?, nearest(&self.z_nm, z)?);
        self.lowering_mev[j + self.y_nm.len() * k]
    }
}

/// The criteria of a scan as written in its JSON.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct CriteriaSet {
    #[serde(rename = "dibl_max_mV_per_V")]
    pub dibl_max_mv_per_v: Option<f64>,
    #[serde(rename = "ss_max_mV_per_dec")]
    pub ss_max_mv_per_dec: Option<f64>,
    #[serde(rename = "vt_rolloff_max_mV")]
    pub vt_rolloff_max_mv: Option<f64>,
}

impl ScanReport {
    /// Judges the rows against `criteria` and stores the shortest compliant
    /// length ([`shortest_compliant`]); no criteria clears it.
    pub fn judge(&mut self, criteria: &Criteria) {
        if criteria.is_empty() {
            self.criteria = None;
            self.shortest = None;
            return;
        }
        // Fins and wires are judged on their theory figures (the method says so).
        let theory = self.method == Method::Theory;
        let pick = |solved: Option<f64>, th: Option<f64>| if theory { th } else { solved };
        let points: Vec<LengthPoint> = self
            .rows
            .iter()
            .map(|r| LengthPoint {
                gate_length_nm: r.gate_length_nm,
                dibl_mv_per_v: pick(r.dibl_mv_per_v, r.theory_dibl_mv_per_v),
                ss_lin_mv_per_dec: pick(r.ss_lin_mv_per_dec, r.theory_ss_mv_per_dec),
                ss_sat_mv_per_dec: pick(r.ss_sat_mv_per_dec, r.theory_ss_mv_per_dec),
                vt_rolloff_mv: pick(r.vt_rolloff_mv, r.theory_rolloff_mv),
                ok: r.status.is_ok(),
            })
            .collect();
        self.criteria = Some(CriteriaSet {
            dibl_max_mv_per_v: criteria.dibl_max_mv_per_v,
            ss_max_mv_per_dec: criteria.ss_max_mv_per_dec,
            vt_rolloff_max_mv: criteria.vt_rolloff_max_mv,
        });
        self.shortest = Some(shortest_compliant(&points, criteria));
    }
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

/// A solved length's V_DS,lin curve and its threshold current (A/um).
type SolvedCurve = (f64, Vec<f64>, Vec<Option<f64>>, f64);

/// Terada-Muta across the solved lengths' V_DS,lin curves (L_g nm, gate
/// voltages, currents, threshold current A/um): the two gate voltages are the
/// lowest and highest grid points of the longest length's SS window (1e-3 to
/// 1e-1 of its threshold current).
fn terada_muta_of(curves: &[SolvedCurve], vds_v: f64) -> Option<TeradaMuta> {
    let longest = curves.iter().max_by(|a, b| a.0.total_cmp(&b.0))?;
    let (_, v, i, target) = longest;
    let window: Vec<f64> = v
        .iter()
        .zip(i)
        .filter(|(_, c)| c.is_some_and(|c| c.abs() >= 1e-3 * target && c.abs() <= 1e-1 * target))
        .map(|(vg, _)| *vg)
        .collect();
    let (lo, hi) = (*window.first()?, *window.last()?);
    if lo == hi {
        return None;
    }
    let refs: Vec<LengthCurve> = curves
        .iter()
        .map(|(l, v, i, _)| (*l, v.as_slice(), i.as_slice()))
        .collect();
    terada_muta(&refs, vds_v, (lo, hi))
}

/// Solves (planar) or predicts (fins and wires) each gate length, in parallel.
pub fn scan(
    s: &Scenario,
    lengths: &[f64],
    observer: &dyn Observer,
) -> Result<ScanReport, ScanError> {
    scan_with(s, lengths, TheoryLength::Gate, observer)
}

/// [`scan`] with the theory columns at the length `theory_length` names
/// (L_g, or each length's solved L_elec).
pub fn scan_with(
    s: &Scenario,
    lengths: &[f64],
    theory_length: TheoryLength,
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
    let solved: Vec<(ScanRow, Option<SolvedCurve>, Option<LineLowering>)> = scenarios
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
                ss_sat_mv_per_dec: None,
                barrier_lowering_mev: None,
                theory_rolloff_mv: th.as_ref().map(|t| 1000.0 * t.roll_off_lin_v),
                theory_dibl_mv_per_v: th.as_ref().map(|t| t.dibl_mv_per_v),
                theory_ss_mv_per_dec: th.as_ref().map(|t| t.ss_mv_per_dec),
                lg_over_lambda: l / lambda,
                l_met_nm: f64::NAN,
                l_elec_nm: None,
                vt_rolloff_electrostatic_mv: None,
                vt_rolloff_length_mv: None,
                ioff_a_per_um: None,
                warnings: Vec::new(),
                status: Status::Ok,
            };
            let mut curve = None;
            let mut lines = None;
            if method != Method::Theory {
                match evaluate(sc, &reference, observer) {
                    Ok(ev) => {
                        lines = ev
                            .solution_3d
                            .as_ref()
                            .and_then(|sol| LineLowering::of(sol, sc.polarity));
                        let r = ev.report;
                        row.vt_lin_v = r.vt_lin_v;
                        row.vt_rolloff_mv = r.vt_rolloff_mv;
                        row.dibl_mv_per_v = r.dibl_mv_per_v;
                        row.ss_lin_mv_per_dec = r.ss_lin_mv_per_dec;
                        row.ss_sat_mv_per_dec = r.ss_sat_mv_per_dec;
                        row.barrier_lowering_mev = r.barrier_lowering_mev;
                        row.l_met_nm = r.l_met_nm;
                        row.l_elec_nm = r.l_elec_nm;
                        row.vt_rolloff_electrostatic_mv = r.vt_rolloff_electrostatic_mv;
                        row.vt_rolloff_length_mv = r.vt_rolloff_length_mv;
                        row.ioff_a_per_um = r.ioff_a_per_um;
                        row.warnings = r
                            .warnings
                            .iter()
                            .filter(|w| w.contains("L_elec") || w.contains("junctions merge"))
                            .cloned()
                            .collect();
                        curve = Some((l, r.vgs_v, r.id_lin, r.threshold_current_a_per_um));
                        if theory_length == TheoryLength::Electrical {
                            let th = inputs.at_length(l, r.l_elec_nm, theory_length);
                            let th = th.map_err(|e| problems.push(format!("theory: {e}"))).ok();
                            row.theory_rolloff_mv = th.map(|t| 1000.0 * t.roll_off_lin_v);
                            row.theory_dibl_mv_per_v = th.map(|t| t.dibl_mv_per_v);
                            row.theory_ss_mv_per_dec = th.map(|t| t.ss_mv_per_dec);
                        }
                        problems.extend(r.problems);
                    }
                    Err(e) => problems.push(format!("solve: {e}")),
                }
            }
            row.status = Status::from_problems(&problems);
            (row, curve, lines)
        })
        .collect();
    let curves: Vec<SolvedCurve> = solved.iter().filter_map(|(_, c, _)| c.clone()).collect();
    // The fixed path: the leakiest line of the shortest 3D-solved length.
    let path = solved
        .iter()
        .filter_map(|(r, _, l)| l.as_ref().map(|l| (r.gate_length_nm, l.leakiest)))
        .min_by(|a, b| a.0.total_cmp(&b.0))
        .map(|(_, p)| p);
    let on_path: Vec<(f64, f64)> = match path {
        Some(path) => solved
            .iter()
            .filter_map(|(r, _, l)| Some((r.gate_length_nm, l.as_ref()?.at(path)?)))
            .collect(),
        None => Vec::new(),
    };
    let rows: Vec<ScanRow> = solved.into_iter().map(|(r, _, _)| r).collect();
    let terada_muta = terada_muta_of(&curves, s.bias.vds_lin_v);
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
    let lambda_fitted_barrier_fixed_path = match path {
        Some((y, z)) if on_path.len() >= 2 => {
            fit_lambda_from_dibl(&on_path, 0.0)
                .ok()
                .map(|fit| FixedPathFit {
                    fit,
                    path_y_nm: y,
                    path_z_nm: z,
                })
        }
        _ => None,
    };
    Ok(ScanReport {
        name: s.name.clone(),
        architecture: s.architecture,
        method,
        lambda_numeric_nm: lambda,
        lambda_dielectric_path_nm: lam.lambda_dielectric_path_nm,
        lambda_closed_forms: lam.lambda_closed_forms,
        lambda_fitted,
        lambda_fitted_barrier,
        lambda_fitted_barrier_fixed_path,
        terada_muta,
        theory_length: theory_length.name(),
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
        criteria: None,
        shortest: None,
        caution: CAUTION.into(),
    })
}
