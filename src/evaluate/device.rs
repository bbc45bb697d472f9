//! One whole device at one gate length: planar devices get the 2D
//! along-channel solve at both drain biases; fins and wires the 3D solve
//! along the channel (or, chosen explicitly for very large sweeps, the theory
//! from their cross-section alone). Both come out as one [`DeviceReport`], built in one
//! place ([`build_report`]) with the Liu et al. (IEEE TED 40(1), 86, 1993)
//! theory beside the figures.

use super::capacitance::{self, device_capacitance, CapacitanceFigures};
use super::reference::{Reference, ReferenceError};
use super::report::{DeviceReport, Method, CAUTION};
use crate::device::{BiasPoints, FinMethod, Scenario};
use crate::extract::adaptive::{adaptive_ramp, extend_grid_ramp};
use crate::extract::electrical_length::L_ELEC_WARN_NM;
use crate::extract::{self, ramp_figures, union_curves, Barrier};
use crate::progress::{Observer, SolveKind};
use crate::solve::ramp::GateGrid;
use crate::solve::{DeviceSolver, GateRamp, PoissonSolver, SolveError};
use crate::structure::{along_channel, along_fin, AlongChannel, DopingProfile};
use crate::theory::closed_form;

/// Failures that stop a whole evaluation (a single bias point failing does not).
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum EvaluateError {
    #[error(transparent)]
    Solve(#[from] SolveError),
    #[error(transparent)]
    Reference(#[from] ReferenceError),
    #[error("the reference passed in belongs to another cross-section than device {0}")]
    WrongReference(String),
    /// A fin whose 3D mesh is beyond the node budget (checked before it is built).
    #[error(transparent)]
    Size(#[from] crate::device::DeviceError),
}

/// A planar device's solution: the report plus what maps and band plots need.
#[derive(Debug, Clone)]
pub struct DeviceSolution {
    pub report: DeviceReport,
    pub structure: AlongChannel,
    pub lin: GateRamp,
    pub sat: GateRamp,
    pub barrier_lin: Option<Barrier>,
    pub barrier_sat: Option<Barrier>,
}

/// The result of one device of any architecture.
#[derive(Debug, Clone)]
pub struct Evaluation {
    pub report: DeviceReport,
    /// The 2D solution (planar devices only).
    pub solution: Option<DeviceSolution>,
    /// The 3D solution (fins and wires solved in 3D; its structure is 3D).
    pub solution_3d: Option<DeviceSolution>,
}

/// What differs between a solved and a theory device report; everything
/// else [`build_report`] takes from the scenario and the reference.
struct Figures {
    method: Method,
    capacitance: Option<CapacitanceFigures>,
    vt_lin_v: Option<f64>,
    vt_sat_v: Option<f64>,
    ss_lin_mv_per_dec: Option<f64>,
    ss_sat_mv_per_dec: Option<f64>,
    barrier_lin: Option<Barrier>,
    barrier_sat: Option<Barrier>,
    converged: bool,
    nodes: usize,
    unknowns: usize,
    newton_steps: usize,
    factorisations: usize,
    linear_solver: Option<&'static str>,
    bias_points: usize,
    vgs_v: Vec<f64>,
    id_lin: Vec<Option<f64>>,
    id_sat: Vec<Option<f64>>,
    current_unit: String,
    problems: Vec<String>,
    warnings: Vec<String>,
}

/// Evaluates `s` with the length-independent `reference` of its cross-section
/// (from [`Reference::of`] on any scenario of the same cross-section).
pub fn evaluate(
    s: &Scenario,
    reference: &Reference,
    observer: &dyn Observer,
) -> Result<Evaluation, EvaluateError> {
    if s.architecture.is_planar() {
        let sol = solve_planar(s, reference, observer)?;
        Ok(Evaluation {
            report: sol.report.clone(),
            solution: Some(sol),
            solution_3d: None,
        })
    } else if s.fin_method == FinMethod::Solve3d {
        let sol = solve_fin_3d(s, reference, observer)?;
        Ok(Evaluation {
            report: sol.report.clone(),
            solution: None,
            solution_3d: Some(sol),
        })
    } else {
        Ok(Evaluation {
            report: fin_report(s, reference),
            solution: None,
            solution_3d: None,
        })
    }
}

/// [`evaluate`] with the reference computed here (one device alone).
pub fn evaluate_alone(s: &Scenario, observer: &dyn Observer) -> Result<Evaluation, EvaluateError> {
    let reference = Reference::of(s, observer)?;
    evaluate(s, &reference, observer)
}

/// Threshold current per um of width for the criterion I_cc W / L_g, A/um.
fn threshold_current(s: &Scenario) -> f64 {
    s.extraction.current_criterion_a / (s.geometry.gate_length_nm * 1e-3)
}

/// The 2D along-channel solve: both drain ramps (on two threads) and every figure.
pub fn solve_planar(
    s: &Scenario,
    reference: &Reference,
    observer: &dyn Observer,
) -> Result<DeviceSolution, EvaluateError> {
    solve_structure(s, reference, observer, along_channel(s), Method::TwoDSolve)
}

/// The 3D solve of a fin or wire along the channel (half domain): both drain
/// ramps and every figure, with the cross-section's Pao-Sah V_t,long and the
/// Liu et al. theory beside them.
pub fn solve_fin_3d(
    s: &Scenario,
    reference: &Reference,
    observer: &dyn Observer,
) -> Result<DeviceSolution, EvaluateError> {
    crate::device::check_size_3d(s)?;
    solve_structure(s, reference, observer, along_fin(s), Method::ThreeDSolve)
}

/// One solve path for 2D sections and 3D fins: both drain ramps (on two
/// threads), the figures and the leakiest path.
fn solve_structure(
    s: &Scenario,
    reference: &Reference,
    observer: &dyn Observer,
    structure: AlongChannel,
    method: Method,
) -> Result<DeviceSolution, EvaluateError> {
    let mut solver = PoissonSolver::new(&structure.problem)?;
    let unknowns = solver.unknowns();
    let linear_solver = solver.linear_solver().as_str();
    let target = threshold_current(s);
    // Both drain sweeps start from one equilibrium, at the off-state gate
    // voltage (adaptive) or the off end of the grid (grid).
    let v0 = match s.bias.points {
        BiasPoints::Auto | BiasPoints::Adaptive => s.bias.off_vgs_v,
        BiasPoints::Grid => GateGrid::of(s).vgs(0),
    };
    let (eq, eq_steps) = {
        let mut d = DeviceSolver::new(s, &structure, solver.clone());
        let eq = d.equilibrium(v0)?;
        solver = d.solver;
        (eq, d.steps)
    };
    let eq_factorisations = solver.factorisations;
    let solver2 = solver.clone();
    // Adaptive: only the gate voltages the extraction needs; grid: the whole
    // I_D-V_G curve (extended beyond the user's range when it misses the
    // threshold current or the SS window and bias.auto_extend allows).
    let ramp = |solver: PoissonSolver, vds: f64| -> Result<GateRamp, SolveError> {
        let mut d = DeviceSolver::new(s, &structure, solver);
        match s.bias.points {
            BiasPoints::Auto | BiasPoints::Adaptive => {
                adaptive_ramp(&mut d, vds, target, Some(&eq), observer)
            }
            BiasPoints::Grid => {
                let r = d.gate_ramp(vds, Some(&eq), observer)?;
                extend_grid_ramp(&mut d, r, target, observer)
            }
        }
    };
    // Capacitances (planar sections only) beside the lin ramp.
    let solver3 = solver.clone();
    let ((lin, cap), sat) = rayon::join(
        || {
            let lin = ramp(solver, s.bias.vds_lin_v);
            let cap =
                (method == Method::TwoDSolve).then(|| device_capacitance(s, &structure, solver3));
            (lin, cap)
        },
        || ramp(solver2, s.bias.vds_sat_v),
    );
    let (lin, sat) = (lin?, sat?);
    observer.solved(SolveKind::GateRamp);
    observer.solved(SolveKind::GateRamp);
    let mut warnings = s.warnings.clone();
    for (r, label) in [(&lin, "V_DS,lin"), (&sat, "V_DS,sat")] {
        for v in &r.extended_to_v {
            warnings.push(format!(
                "{label}: the gate range {} to {} V was extended to {v:.3} V to reach the threshold current \
                 and the SS window (bias.auto_extend = true, at most bias.extend_limit_V = {} V beyond each end)",
                s.bias.vgs_start_v, s.bias.vgs_stop_v, s.bias.extend_limit_v
            ));
        }
    }
    let mut problems = Vec::new();
    let capacitance = cap.and_then(|c| c.map_err(|e| problems.push(e.to_string())).ok());
    let mut figures = |ramp: &GateRamp, label: &str| match ramp_figures(ramp, target) {
        Ok(v) => Some(v),
        Err(e) => {
            problems.push(format!("{label}: {e}"));
            None
        }
    };
    let lin_f = figures(&lin, "V_DS,lin");
    let sat_f = figures(&sat, "V_DS,sat");
    let p = &structure.problem;
    let mut barrier_of = |ramp: &GateRamp, label: &str| match &ramp.off_psi {
        Some(psi) => Some(extract::barrier(p, psi, s.polarity)),
        None => {
            problems.push(format!(
                "{label}: the off-state point V_G = {} V did not converge",
                s.bias.off_vgs_v
            ));
            None
        }
    };
    let barrier_lin = barrier_of(&lin, "barrier at V_DS,lin");
    let barrier_sat = barrier_of(&sat, "barrier at V_DS,sat");
    let (vgs, id_lin, id_sat) = union_curves(&lin, &sat);
    let converged = lin
        .points
        .iter()
        .chain(&sat.points)
        .all(|p| p.report.converged())
        && reference.long_channel.is_ok();
    let report = build_report(
        s,
        reference,
        Figures {
            method,
            capacitance,
            vt_lin_v: lin_f.map(|f| f.0),
            vt_sat_v: sat_f.map(|f| f.0),
            ss_lin_mv_per_dec: lin_f.map(|f| f.1),
            ss_sat_mv_per_dec: sat_f.map(|f| f.1),
            barrier_lin,
            barrier_sat,
            converged,
            nodes: p.node_count(),
            unknowns,
            newton_steps: eq_steps + lin.newton_steps + sat.newton_steps,
            factorisations: eq_factorisations + lin.factorisations + sat.factorisations,
            linear_solver: Some(linear_solver),
            bias_points: lin.points.len() + sat.points.len(),
            vgs_v: vgs,
            id_lin,
            id_sat,
            current_unit: match method {
                Method::ThreeDSolve => format!(
                    "A/um (drain current per um of device width W = {:.2} nm, {}; negative for p-channel)",
                    p.current_width_nm,
                    crate::structure::WIDTH_DEFINITION
                ),
                _ => "A/um (drain current per um of gate width; negative for p-channel)".into(),
            },
            problems,
            warnings,
        },
    );
    let mut report = report;
    add_length_figures(s, &structure, &lin, &sat, &mut report);
    Ok(DeviceSolution {
        report,
        structure,
        lin,
        sat,
        barrier_lin,
        barrier_sat,
    })
}

/// Largest gate step of the extra solve from the off state to V_t,lin, V.
const LENGTH_SOLVE_STEP_V: f64 = 0.1;
/// L_elec is taken where I_D at V_DS,lin is this fraction of the threshold current.
pub const L_ELEC_CURRENT_RATIO: f64 = 1e-2;

/// The electrical channel length (one extra coupled solve at V_DS,lin, walked
/// up from the off-state potential of the lin ramp to where the current is
/// [`L_ELEC_CURRENT_RATIO`] of the threshold current, then on to V_t,lin for
/// the barrier-top density there), the
/// roll-off split and the off-state current (from the sat ramp's off-state
/// potential), put into `r`. A solve that does not converge leaves the
/// figures null and says why in `problems`; a merged junction or an
/// electrical length below [`L_ELEC_WARN_NM`] adds a warning.
fn add_length_figures(
    s: &Scenario,
    structure: &AlongChannel,
    lin: &GateRamp,
    sat: &GateRamp,
    r: &mut DeviceReport,
) {
    let p = &structure.problem;
    let mu = s.extraction.mobility_nm2_per_vs;
    if let Some(psi) = &sat.off_psi {
        let t = crate::solve::transport::quasi_fermi(p, psi, s.polarity, sat.vds_v, mu);
        r.ioff_a_per_um = Some(t.current_a_per_um);
    }
    if r.l_met_nm <= 0.0 {
        r.warnings.push(format!(
            "the source and drain junctions merge (L_met = 0 at L_g = {} nm): L_elec and the roll-off split describe a device without a channel region of the channel type",
            r.gate_length_nm
        ));
    }
    let Some(vt) = r.vt_lin_v else { return };
    // L_elec two decades below the threshold current (the middle of the SS
    // window), where the channel charge does not yet bend the potential.
    let v: Vec<f64> = lin.points.iter().map(|q| q.vgs_v).collect();
    let i: Vec<f64> = lin
        .points
        .iter()
        .map(|q| q.current_a_per_um.map_or(f64::NAN, f64::abs))
        .collect();
    let curve = extract::Curve {
        vgs_v: &v,
        id_abs: &i,
    };
    let Ok(v_sub) = extract::threshold(&curve, L_ELEC_CURRENT_RATIO * threshold_current(s)) else {
        r.problems.push(format!(
            "electrical length: the lin sweep does not reach {L_ELEC_CURRENT_RATIO} of the threshold current"
        ));
        return;
    };
    let solved = PoissonSolver::new(p)
        .map_err(|e| e.to_string())
        .and_then(|solver| {
            let mut ds = DeviceSolver::new(s, structure, solver);
            let vds = lin.vds_v;
            let mut psi = match &lin.off_psi {
                Some(psi) => psi.clone(),
                None => ds.initial_state(v_sub, vds).map_err(|e| e.to_string())?,
            };
            let mut walk = |psi: &mut Vec<f64>, from: f64, to: f64| -> Result<(), String> {
                let n = ((to - from).abs() / LENGTH_SOLVE_STEP_V).ceil().max(1.0) as usize;
                for k in 1..=n {
                    let vg = from + (to - from) * k as f64 / n as f64;
                    let (rep, _) = ds
                        .solve_bias_point(psi, vg, vds)
                        .map_err(|e| e.to_string())?;
                    if !rep.converged() {
                        return Err(format!("V_G = {vg:.4} V: {}", rep.reason()));
                    }
                }
                Ok(())
            };
            walk(&mut psi, s.bias.off_vgs_v, v_sub)?;
            let at_sub = psi.clone();
            walk(&mut psi, v_sub, vt)?;
            Ok((at_sub, psi))
        });
    let (psi, psi_vt) = match solved {
        Ok(pair) => pair,
        Err(e) => {
            r.problems.push(format!(
                "electrical length: the solve at V_DS,lin between {v_sub:.4} V and V_t,lin = {vt:.4} V did not converge ({e})"
            ));
            return;
        }
    };
    let at_vt = extract::electrical_length::electrical_length(p, &psi_vt, s.polarity);
    let n_top_vt = at_vt.n_top_per_nm2;
    r.l_elec_at_vt_nm = Some(at_vt.l_elec_nm);
    let el = extract::electrical_length::electrical_length(p, &psi, s.polarity);
    r.l_elec_nm = Some(el.l_elec_nm);
    if el.l_elec_nm < L_ELEC_WARN_NM {
        r.warnings.push(format!(
            "L_elec = {:.2} nm is below {L_ELEC_WARN_NM} nm: source and drain nearly touch; the roll-off split and the figures at L_g = {} nm are outside the model's range",
            el.l_elec_nm, r.gate_length_nm
        ));
    }
    let thermal_v = p.silicon.thermal_v;
    let n_th = extract::electrical_length::threshold_density_per_nm2(
        s.extraction.current_criterion_a,
        mu,
        thermal_v,
        lin.vds_v.abs(),
    );
    if let (Some(total), Some(ss_long), Some(ss_lin)) =
        (r.vt_rolloff_mv, r.ss_long_mv_per_dec, r.ss_lin_mv_per_dec)
    {
        // n-channel signs; a p-channel roll-off is mirrored (|V_t| falls).
        let sign = s.polarity.sign();
        let split = extract::electrical_length::split_rolloff(
            sign * total,
            n_top_vt,
            n_th,
            ss_long,
            ss_lin,
            el.l_elec_nm,
            r.gate_length_nm,
        );
        r.vt_rolloff_electrostatic_mv = Some(sign * split.electrostatic_mv);
        r.vt_rolloff_length_mv = Some(sign * split.length_mv);
        r.vt_rolloff_residual_mv = Some(sign * split.residual_mv);
    }
}

/// A fin or wire: the long-channel cross-section and the theory at this length.
fn fin_report(s: &Scenario, reference: &Reference) -> DeviceReport {
    let mut problems = Vec::new();
    let est = match &reference.theory {
        Ok(t) => t
            .at(s.geometry.gate_length_nm)
            .map_err(|e| problems.push(format!("theory: {e}")))
            .ok(),
        Err(e) => {
            problems.push(format!("theory: {e}"));
            None
        }
    };
    let vt_long = reference.vt_long_v();
    let ss = est.map(|e| e.ss_mv_per_dec);
    let (width, definition) = reference
        .fin
        .as_ref()
        .map(|f| (f.width_nm, f.width_definition.clone()))
        .unwrap_or((f64::NAN, crate::structure::WIDTH_DEFINITION.into()));
    let mut warnings = s.warnings.clone();
    if let Ok(l) = &reference.lambda {
        warnings.push(format!(
            "{}: short-channel figures are theory (Liu et al. 1993 with the numeric natural length {:.2} nm), \
             not an along-channel solve; barrier lowering and I-V curves are not computed",
            s.architecture, l.lambda_numeric_nm
        ));
    }
    build_report(
        s,
        reference,
        Figures {
            method: Method::Theory,
            capacitance: None,
            vt_lin_v: vt_long.zip(est).map(|(v, e)| v + e.roll_off_lin_v),
            vt_sat_v: vt_long.zip(est).map(|(v, e)| v + e.roll_off_sat_v),
            ss_lin_mv_per_dec: ss,
            ss_sat_mv_per_dec: ss,
            barrier_lin: None,
            barrier_sat: None,
            converged: reference.long_channel.is_ok(),
            nodes: reference.fin.as_ref().map_or(0, |f| f.cross_section_nodes),
            unknowns: 0,
            newton_steps: 0,
            factorisations: 0,
            linear_solver: None,
            bias_points: 0,
            vgs_v: Vec::new(),
            id_lin: Vec::new(),
            id_sat: Vec::new(),
            current_unit: format!("A per device of width W = {width:.2} nm ({definition})"),
            problems,
            warnings,
        },
    )
}

/// The one place a [`DeviceReport`] is written.
fn build_report(s: &Scenario, reference: &Reference, f: Figures) -> DeviceReport {
    let mut problems = f.problems;
    let (long, long_steps) = match &reference.long_channel {
        Ok((l, steps)) => (Some(*l), *steps),
        Err(e) => {
            problems.push(format!("long-channel reference: {e}"));
            (None, 0)
        }
    };
    let lambda_numeric_nm = match &reference.lambda {
        Ok(l) => Some(l.lambda_numeric_nm),
        Err(e) => {
            problems.push(format!("numeric natural length: {e}"));
            None
        }
    };
    let theory = reference
        .theory
        .as_ref()
        .ok()
        .and_then(|t| t.at(s.geometry.gate_length_nm).ok());
    let thermal_v = crate::physics::thermal_voltage(s.temperature_k);
    let (lin, sat) = (s.bias.vds_lin_v, s.bias.vds_sat_v);
    let floor = long.map(|l| {
        let g = |v: f64| 1.0 - (-(v.abs()) / thermal_v).exp();
        l.ss_mv_per_dec * (g(sat) / g(lin)).log10() / (sat - lin).abs()
    });
    let dibl = match f.method {
        Method::TwoDSolve | Method::ThreeDSolve => f
            .vt_lin_v
            .zip(f.vt_sat_v)
            .map(|(a, b)| extract::dibl(a, b, lin, sat)),
        Method::Theory => theory.map(|t| t.dibl_mv_per_v),
    };
    let vdd = s.bias.vds_sat_v;
    let ion_a_per_um = f.capacitance.as_ref().zip(f.vt_sat_v).and_then(|(c, vt)| {
        capacitance::on_current_a_per_um(
            c.on.gate_channel,
            s.geometry.gate_length_nm,
            vdd,
            vt,
            s.extraction.injection_velocity_nm_per_s,
        )
    });
    let tau_ps = f
        .capacitance
        .as_ref()
        .zip(ion_a_per_um)
        .map(|(c, i)| capacitance::delay_ps(c, vdd, i));
    let closed = closed_form::natural_length(s);
    let ni = crate::physics::Silicon::at(s.temperature_k).ni;
    DeviceReport {
        name: s.name.clone(),
        architecture: s.architecture,
        polarity: s.polarity,
        temperature_k: s.temperature_k,
        gate_length_nm: s.geometry.gate_length_nm,
        l_met_nm: DopingProfile::of(s).metallurgical_length(ni),
        eot_nm: s.eot_nm(),
        vt_lin_v: f.vt_lin_v,
        vt_sat_v: f.vt_sat_v,
        ss_lin_mv_per_dec: f.ss_lin_mv_per_dec,
        ss_sat_mv_per_dec: f.ss_sat_mv_per_dec,
        dibl_mv_per_v: dibl,
        dibl_long_floor_mv_per_v: match f.method {
            Method::TwoDSolve | Method::ThreeDSolve => floor,
            Method::Theory => None,
        },
        vt_long_v: long.map(|l| l.vt_v),
        ss_long_mv_per_dec: long.map(|l| l.ss_mv_per_dec),
        vt_rolloff_mv: f.vt_lin_v.zip(long).map(|(a, l)| 1000.0 * (a - l.vt_v)),
        barrier_lin_ev: f.barrier_lin.map(|b| b.height_ev),
        barrier_sat_ev: f.barrier_sat.map(|b| b.height_ev),
        barrier_lowering_mev: f
            .barrier_lin
            .zip(f.barrier_sat)
            .map(|(a, b)| 1000.0 * (a.height_ev - b.height_ev)),
        leakiest_depth_nm: f.barrier_sat.map(|b| b.depth_nm),
        leakiest_y_nm: f
            .barrier_sat
            .filter(|_| f.method == Method::ThreeDSolve)
            .map(|b| b.y_nm),
        leakiest_z_nm: f
            .barrier_sat
            .filter(|_| f.method == Method::ThreeDSolve)
            .map(|b| b.z_nm),
        natural_length_nm: closed.map(|c| c.1),
        natural_length_formula: closed.map(|c| c.0.to_string()),
        lambda_numeric_nm,
        theory_rolloff_mv: theory.map(|t| 1000.0 * t.roll_off_lin_v),
        theory_dibl_mv_per_v: theory.map(|t| t.dibl_mv_per_v),
        theory_ss_mv_per_dec: theory.map(|t| t.ss_mv_per_dec),
        l_elec_nm: None,
        vt_rolloff_electrostatic_mv: None,
        vt_rolloff_length_mv: None,
        ioff_a_per_um: None,
        l_elec_at_vt_nm: None,
        vt_rolloff_residual_mv: None,
        off_vgs_v: s.bias.off_vgs_v,
        capacitance: f.capacitance,
        ion_a_per_um,
        tau_ps,
        method: f.method,
        converged: f.converged,
        nodes: f.nodes,
        unknowns: f.unknowns,
        newton_steps_total: f.newton_steps + long_steps,
        factorisations_total: f.factorisations,
        linear_solver: f.linear_solver,
        bias_points: f.bias_points,
        vds_lin_v: lin,
        vds_sat_v: sat,
        current_criterion_a: s.extraction.current_criterion_a,
        threshold_current_a_per_um: threshold_current(s),
        vgs_v: f.vgs_v,
        id_lin: f.id_lin,
        id_sat: f.id_sat,
        current_unit: f.current_unit,
        problems,
        warnings: f.warnings,
        caution: CAUTION.into(),
    }
}
