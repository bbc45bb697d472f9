//! Whole-device runs: bias sweeps at the two drain biases and every figure.

use serde::Serialize;

use crate::device::{Architecture, Scenario};
use crate::discretize::Problem;
use crate::extract::{self, Barrier, Curve, ExtractError};
use crate::long_channel::long_channel;
use crate::solve::{
    apply_boundaries, neutral_guess, Anderson, NewtonOptions, PoissonSolver, QuasiFermi,
    SolveError, SolveReport,
};
use crate::structure::{along_channel, AlongChannel};
use crate::theory::closed_form;
use crate::transport::{levels, quasi_fermi, Transport};

/// The standing caution printed with every result.
pub const CAUTION: &str =
    "Screening-level estimate: classical (Boltzmann) carriers, no quantum confinement, \
no velocity saturation, constant mobility, quasi-Fermi level uniform over each cross-section. \
Use it to rank geometries before full device simulation; it is not a sign-off figure: defer to \
calibrated device simulation and measured silicon.";

/// Convergence of the channel carrier's quasi-Fermi level between iterations, V (MODEL.md section 4).
pub const QF_TOL_V: f64 = 1e-7;
/// History kept by the Anderson acceleration of the potential/quasi-Fermi coupling.
const ANDERSON_DEPTH: usize = 5;
/// A factorisation from an earlier bias point is renewed after this many steps.
const STALE_AFTER_STEPS: usize = 5;
/// Above this update (V) the next step refactorises the Jacobian.
const REFACTOR_ABOVE_V: f64 = 1e-2;
/// Largest drain-bias step while ramping, V.
const VDS_RAMP_STEP_V: f64 = 0.1;

/// Receives progress from a run (the library never prints).
pub trait Observer: Sync {
    /// One bias point finished.
    fn bias_point(&self, _vds_v: f64, _vgs_v: f64, _converged: bool) {}
}

/// An observer that ignores everything.
pub struct Silent;
impl Observer for Silent {}

/// Failures that stop a whole run (a single bias point failing does not).
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum RunError {
    #[error("architecture {0} has no along-channel solve (fins and wires are analysed through their cross-section: `gatehold lambda`)")]
    NotPlanar(Architecture),
    #[error(transparent)]
    Solve(#[from] SolveError),
    #[error(transparent)]
    Theory(#[from] crate::theory::TheoryError),
}

/// One solved bias point.
#[derive(Debug, Clone, PartialEq)]
pub struct BiasPoint {
    pub vgs_v: f64,
    /// Signed drain current per width, A/um; `None` when the point did not converge.
    pub current_a_per_um: Option<f64>,
    pub report: SolveReport,
}

/// A gate sweep at one drain bias, in sweep order (from the off end).
#[derive(Debug, Clone, PartialEq)]
pub struct DrainSweep {
    pub vds_v: f64,
    pub points: Vec<BiasPoint>,
    /// Potential at the off-state gate voltage (None if it did not converge).
    pub off_psi: Option<Vec<f64>>,
    pub newton_steps: usize,
    pub factorisations: usize,
}

/// Steps a device through bias points on one mesh, reusing the symbolic factorisation.
pub struct DeviceSolver<'a> {
    pub scenario: &'a Scenario,
    pub structure: &'a AlongChannel,
    pub solver: PoissonSolver,
    pub opts: NewtonOptions,
    pub steps: usize,
}

impl<'a> DeviceSolver<'a> {
    pub fn new(scenario: &'a Scenario, structure: &'a AlongChannel, solver: PoissonSolver) -> Self {
        let opts = NewtonOptions::for_vt(structure.problem.silicon.vt);
        DeviceSolver {
            scenario,
            structure,
            solver,
            opts,
            steps: 0,
        }
    }

    fn problem(&self) -> &Problem {
        &self.structure.problem
    }

    /// Applies the electrode and contact potentials for (vgs, vds).
    pub fn set_bias(&self, psi: &mut [f64], vgs: f64, vds: f64) {
        let p = self.problem();
        let si = p.silicon;
        let g = &self.scenario.gate;
        let electrodes = [
            si.electrode_potential(vgs, g.workfunction_ev),
            si.electrode_potential(g.back_bias_v, g.back_workfunction_ev),
        ];
        apply_boundaries(p, psi, &electrodes, &[0.0, vds, 0.0]);
    }

    /// Solves one bias point from the starting potential in `psi`: Newton steps
    /// interleaved with updates of the channel carrier's quasi-Fermi level.
    pub fn solve_point(
        &mut self,
        psi: &mut [f64],
        vgs: f64,
        vds: f64,
    ) -> Result<(SolveReport, Transport), SolveError> {
        self.set_bias(psi, vgs, vds);
        let sign = self.scenario.polarity.sign();
        let mu = self.scenario.extraction.mobility_cm2_per_vs;
        let p = &self.structure.problem;
        let mut t = quasi_fermi(p, psi, sign, vds, mu);
        let mut last = (f64::INFINITY, f64::INFINITY, f64::INFINITY);
        let mut refactor = false; // reuse the last factorisation while it contracts
        let mut fresh = false; // refactorised during this bias point
        let mut accel = Anderson::new(ANDERSON_DEPTH);
        let mut before = psi.to_vec();
        for step in 1..=self.opts.max_steps {
            let qf = levels(&t, sign);
            before.copy_from_slice(psi);
            let st = self.solver.step(p, psi, &qf, self.opts.clamp_v, refactor)?;
            if refactor {
                accel.reset();
            } else {
                accel.mix(&before, psi);
            }
            // Refactorise while Newton is far from the solution or the
            // iteration stops contracting; near the solution the slow part is
            // the quasi-Fermi coupling, which a fresh Jacobian does not speed
            // up (Anderson mixing does).
            fresh |= refactor;
            refactor = st.max_update_v > REFACTOR_ABOVE_V
                || st.max_update_v > 1.5 * last.0
                || (!fresh && step >= STALE_AFTER_STEPS);
            let t_new = quasi_fermi(p, psi, sign, vds, mu);
            let dphi = t_new
                .phi
                .iter()
                .zip(&t.phi)
                .map(|(a, b)| (a - b).abs())
                .fold(0.0, f64::max);
            t = t_new;
            self.steps += 1;
            last = (st.max_update_v, st.max_scaled_residual_v, dphi);
            if st.max_update_v < self.opts.update_tol_v
                && st.max_scaled_residual_v < self.opts.residual_tol_v
                && dphi < QF_TOL_V
            {
                return Ok((
                    SolveReport {
                        converged: true,
                        steps: step,
                        final_update_v: st.max_update_v,
                        final_residual_v: st.max_scaled_residual_v,
                        reason: "update, residual and quasi-Fermi level below tolerance".into(),
                    },
                    t,
                ));
            }
        }
        Ok((
            SolveReport {
                converged: false,
                steps: self.opts.max_steps,
                final_update_v: last.0,
                final_residual_v: last.1,
                reason: format!(
                    "no convergence in {} steps (update {:.2e} V, residual {:.2e} V, quasi-Fermi change {:.2e} V)",
                    self.opts.max_steps, last.0, last.1, last.2
                ),
            },
            t,
        ))
    }

    /// Equilibrium at the first gate voltage, then the drain ramped to `vds`.
    pub fn initial_state(&mut self, vgs: f64, vds: f64) -> Result<Vec<f64>, SolveError> {
        let p = self.problem();
        let mut psi = neutral_guess(p, &QuasiFermi::uniform(p.nx, 0.0, 0.0));
        let ramp = (vds.abs() / VDS_RAMP_STEP_V).ceil().max(1.0) as usize;
        for k in 0..=ramp {
            let v = vds * k as f64 / ramp as f64;
            let (rep, _) = self.solve_point(&mut psi, vgs, v)?;
            if !rep.converged {
                return Err(SolveError::Factorisation(format!(
                    "drain ramp failed at V_DS = {v:.3} V: {}",
                    rep.reason
                )));
            }
        }
        Ok(psi)
    }

    /// Gate sweep at drain bias `vds` over the scenario's gate voltages, from the off end.
    pub fn sweep(&mut self, vds: f64, observer: &dyn Observer) -> Result<DrainSweep, SolveError> {
        let s = self.scenario;
        let sign = s.polarity.sign();
        let mut grid = s.bias.gate_voltages();
        if sign < 0.0 {
            grid.reverse();
        }
        let off = s.bias.off_vgs_v;
        let f0 = self.solver.factorisations;
        let steps0 = self.steps;
        let mut psi = self.initial_state(grid[0], vds)?;
        let mut prev: Option<Vec<f64>> = None;
        let mut points = Vec::with_capacity(grid.len());
        let mut off_psi = None;
        let mut last_vg = grid[0];
        for &vg in &grid {
            // The off-state point, when it falls between grid points.
            let between = (off - last_vg) * (vg - off) > 0.0;
            if between {
                let mut trial = psi.clone();
                let (rep, _) = self.solve_point(&mut trial, off, vds)?;
                if rep.converged {
                    off_psi = Some(trial);
                }
            }
            // Linear predictor from the last two converged points.
            let mut guess = psi.clone();
            if let Some(pp) = &prev {
                for (g, (a, b)) in guess.iter_mut().zip(psi.iter().zip(pp)) {
                    *g += a - b;
                }
            }
            let (mut rep, mut t) = self.solve_point(&mut guess, vg, vds)?;
            if !rep.converged && prev.is_some() {
                // Retry without the predictor.
                guess = psi.clone();
                let (r2, t2) = self.solve_point(&mut guess, vg, vds)?;
                rep = r2;
                t = t2;
            }
            observer.bias_point(vds, vg, rep.converged);
            if rep.converged {
                if (vg - off).abs() < 1e-9 {
                    off_psi = Some(guess.clone());
                }
                prev = Some(std::mem::replace(&mut psi, guess));
                points.push(BiasPoint {
                    vgs_v: vg,
                    current_a_per_um: Some(t.current_a_per_um),
                    report: rep,
                });
            } else {
                prev = None;
                points.push(BiasPoint {
                    vgs_v: vg,
                    current_a_per_um: None,
                    report: rep,
                });
            }
            last_vg = vg;
        }
        Ok(DrainSweep {
            vds_v: vds,
            points,
            off_psi,
            newton_steps: self.steps - steps0,
            factorisations: self.solver.factorisations - f0,
        })
    }
}

/// The JSON-facing result of one device (key names are a contract).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct DeviceReport {
    pub name: String,
    pub architecture: String,
    pub polarity: String,
    #[serde(rename = "temperature_K")]
    pub temperature_k: f64,
    pub gate_length_nm: f64,
    pub l_met_nm: f64,
    pub eot_nm: f64,
    #[serde(rename = "vt_lin_V")]
    pub vt_lin_v: Option<f64>,
    #[serde(rename = "vt_sat_V")]
    pub vt_sat_v: Option<f64>,
    #[serde(rename = "ss_lin_mV_per_dec")]
    pub ss_lin_mv_per_dec: Option<f64>,
    #[serde(rename = "ss_sat_mV_per_dec")]
    pub ss_sat_mv_per_dec: Option<f64>,
    #[serde(rename = "dibl_mV_per_V")]
    pub dibl_mv_per_v: Option<f64>,
    /// Constant-current DIBL of a long device (not subtracted), mV/V.
    #[serde(rename = "dibl_long_floor_mV_per_V")]
    pub dibl_long_floor_mv_per_v: Option<f64>,
    #[serde(rename = "vt_long_V")]
    pub vt_long_v: Option<f64>,
    #[serde(rename = "ss_long_mV_per_dec")]
    pub ss_long_mv_per_dec: Option<f64>,
    #[serde(rename = "vt_rolloff_mV")]
    pub vt_rolloff_mv: Option<f64>,
    #[serde(rename = "barrier_lin_eV")]
    pub barrier_lin_ev: Option<f64>,
    #[serde(rename = "barrier_sat_eV")]
    pub barrier_sat_ev: Option<f64>,
    #[serde(rename = "barrier_lowering_meV")]
    pub barrier_lowering_mev: Option<f64>,
    pub leakiest_depth_nm: Option<f64>,
    pub natural_length_nm: Option<f64>,
    pub natural_length_formula: Option<String>,
    /// Numeric natural length of the stack (planar) or cross-section (fins), nm.
    pub lambda_numeric_nm: Option<f64>,
    /// "2d-solve" (along-channel solve) or "theory" (fins and wires: the
    /// cross-section solve for the long channel, Liu et al. 1993 for the short-channel figures).
    pub method: String,
    pub converged: bool,
    pub nodes: usize,
    pub unknowns: usize,
    pub newton_steps_total: usize,
    pub factorisations_total: usize,
    pub bias_points: usize,
    #[serde(rename = "vds_lin_V")]
    pub vds_lin_v: f64,
    #[serde(rename = "vds_sat_V")]
    pub vds_sat_v: f64,
    #[serde(rename = "current_criterion_A")]
    pub current_criterion_a: f64,
    #[serde(rename = "threshold_current_A_per_um")]
    pub threshold_current_a_per_um: f64,
    /// Gate voltages of the curves, ascending, V.
    #[serde(rename = "vgs_V")]
    pub vgs_v: Vec<f64>,
    /// Drain current per um of gate width at V_DS,lin (signed; null: not converged).
    pub id_lin: Vec<Option<f64>>,
    pub id_sat: Vec<Option<f64>>,
    pub current_unit: String,
    /// Why any figure above is null.
    pub problems: Vec<String>,
    pub warnings: Vec<String>,
    pub caution: String,
}

impl DeviceReport {
    /// The scalar figures (name with unit, value), in the order of the JSON contract.
    pub fn scalars(&self) -> Vec<(&'static str, Option<f64>)> {
        vec![
            ("gate_length_nm", Some(self.gate_length_nm)),
            ("l_met_nm", Some(self.l_met_nm)),
            ("eot_nm", Some(self.eot_nm)),
            ("vt_lin_V", self.vt_lin_v),
            ("vt_sat_V", self.vt_sat_v),
            ("ss_lin_mV_per_dec", self.ss_lin_mv_per_dec),
            ("ss_sat_mV_per_dec", self.ss_sat_mv_per_dec),
            ("dibl_mV_per_V", self.dibl_mv_per_v),
            ("dibl_long_floor_mV_per_V", self.dibl_long_floor_mv_per_v),
            ("vt_long_V", self.vt_long_v),
            ("ss_long_mV_per_dec", self.ss_long_mv_per_dec),
            ("vt_rolloff_mV", self.vt_rolloff_mv),
            ("barrier_lin_eV", self.barrier_lin_ev),
            ("barrier_sat_eV", self.barrier_sat_ev),
            ("barrier_lowering_meV", self.barrier_lowering_mev),
            ("leakiest_depth_nm", self.leakiest_depth_nm),
            ("natural_length_nm", self.natural_length_nm),
            ("lambda_numeric_nm", self.lambda_numeric_nm),
        ]
    }
}

/// A device result with the fields needed for maps and band plots.
#[derive(Debug, Clone)]
pub struct DeviceSolution {
    pub report: DeviceReport,
    pub structure: AlongChannel,
    pub lin: DrainSweep,
    pub sat: DrainSweep,
    pub barrier_lin: Option<Barrier>,
    pub barrier_sat: Option<Barrier>,
}

fn curve_figures(sw: &DrainSweep, target: f64) -> Result<(f64, f64), ExtractError> {
    if let Some(bad) = sw.points.iter().find(|p| p.current_a_per_um.is_none()) {
        return Err(ExtractError::NotConverged {
            vgs_v: bad.vgs_v,
            vds_v: sw.vds_v,
            reason: bad.report.reason.clone(),
        });
    }
    let v: Vec<f64> = sw.points.iter().map(|p| p.vgs_v).collect();
    let i: Vec<f64> = sw
        .points
        .iter()
        .map(|p| p.current_a_per_um.unwrap().abs())
        .collect();
    let c = Curve {
        vgs_v: &v,
        id_abs: &i,
    };
    Ok((extract::threshold(&c, target)?, extract::swing(&c, target)?))
}

fn ascending(sw: &DrainSweep) -> (Vec<f64>, Vec<Option<f64>>) {
    let mut pts: Vec<(f64, Option<f64>)> = sw
        .points
        .iter()
        .map(|p| (p.vgs_v, p.current_a_per_um))
        .collect();
    pts.sort_by(|a, b| a.0.partial_cmp(&b.0).unwrap());
    pts.into_iter().unzip()
}

/// Runs one planar device: both drain sweeps (on two threads), the long-channel
/// reference, and every figure.
pub fn run_device(s: &Scenario, observer: &dyn Observer) -> Result<DeviceSolution, RunError> {
    if !s.architecture.is_planar() {
        return Err(RunError::NotPlanar(s.architecture));
    }
    let structure = along_channel(s);
    let solver = PoissonSolver::new(&structure.problem)?;
    let unknowns = solver.unknowns();
    let solver2 = solver.clone();
    let ((lin, sat), long) = rayon::join(
        || {
            rayon::join(
                || DeviceSolver::new(s, &structure, solver).sweep(s.bias.vds_lin_v, observer),
                || DeviceSolver::new(s, &structure, solver2).sweep(s.bias.vds_sat_v, observer),
            )
        },
        || long_channel(s),
    );
    let (lin, sat) = (lin?, sat?);
    let mut problems = Vec::new();
    let lg_um = s.geometry.gate_length_nm * 1e-3;
    let target = s.extraction.current_criterion_a / lg_um;
    let sign = s.polarity.sign();
    let fig = |sw: &DrainSweep, label: &str, problems: &mut Vec<String>| match curve_figures(
        sw, target,
    ) {
        Ok(v) => Some(v),
        Err(e) => {
            problems.push(format!("{label}: {e}"));
            None
        }
    };
    let lin_f = fig(&lin, "V_DS,lin", &mut problems);
    let sat_f = fig(&sat, "V_DS,sat", &mut problems);
    let (long_fig, long_steps) = match long {
        Ok((l, st)) => (Some(l), st),
        Err(e) => {
            problems.push(format!("long-channel reference: {e}"));
            (None, 0)
        }
    };
    let p = &structure.problem;
    let barrier_of = |sw: &DrainSweep, label: &str, problems: &mut Vec<String>| match &sw.off_psi {
        Some(psi) => Some(extract::barrier(p, psi, sign)),
        None => {
            problems.push(format!(
                "{label}: the off-state point V_G = {} V did not converge",
                s.bias.off_vgs_v
            ));
            None
        }
    };
    let barrier_lin = barrier_of(&lin, "barrier at V_DS,lin", &mut problems);
    let barrier_sat = barrier_of(&sat, "barrier at V_DS,sat", &mut problems);
    let vt_lin = lin_f.map(|f| f.0);
    let vt_sat = sat_f.map(|f| f.0);
    let dibl = vt_lin
        .zip(vt_sat)
        .map(|(a, b)| extract::dibl(a, b, s.bias.vds_lin_v, s.bias.vds_sat_v));
    let vt = s.temperature_k * crate::physics::K_B_J_PER_K / crate::physics::Q_C;
    let floor = long_fig.map(|l| {
        let g = |v: f64| 1.0 - (-(v.abs()) / vt).exp();
        l.ss_mv_per_dec * (g(s.bias.vds_sat_v) / g(s.bias.vds_lin_v)).log10()
            / (s.bias.vds_sat_v - s.bias.vds_lin_v).abs()
    });
    let closed = closed_form::natural_length(s);
    let lambda_numeric_nm = match crate::theory::lambda_report(s) {
        Ok(l) => Some(l.lambda_numeric_nm),
        Err(e) => {
            problems.push(format!("numeric natural length: {e}"));
            None
        }
    };
    let (vgs, id_lin) = ascending(&lin);
    let (_, id_sat) = ascending(&sat);
    let converged = lin
        .points
        .iter()
        .chain(&sat.points)
        .all(|p| p.report.converged)
        && long_fig.is_some();
    let report = DeviceReport {
        name: s.name.clone(),
        architecture: s.architecture.name().into(),
        polarity: s.polarity.name().into(),
        temperature_k: s.temperature_k,
        gate_length_nm: s.geometry.gate_length_nm,
        l_met_nm: structure.doping.metallurgical_length(p.silicon.ni),
        eot_nm: s.eot_nm(),
        vt_lin_v: vt_lin,
        vt_sat_v: vt_sat,
        ss_lin_mv_per_dec: lin_f.map(|f| f.1),
        ss_sat_mv_per_dec: sat_f.map(|f| f.1),
        dibl_mv_per_v: dibl,
        dibl_long_floor_mv_per_v: floor,
        vt_long_v: long_fig.map(|l| l.vt_v),
        ss_long_mv_per_dec: long_fig.map(|l| l.ss_mv_per_dec),
        vt_rolloff_mv: vt_lin.zip(long_fig).map(|(a, l)| 1000.0 * (a - l.vt_v)),
        barrier_lin_ev: barrier_lin.map(|b| b.height_ev),
        barrier_sat_ev: barrier_sat.map(|b| b.height_ev),
        barrier_lowering_mev: barrier_lin
            .zip(barrier_sat)
            .map(|(a, b)| 1000.0 * (a.height_ev - b.height_ev)),
        leakiest_depth_nm: barrier_sat.map(|b| b.depth_nm),
        natural_length_nm: closed.map(|c| c.1),
        natural_length_formula: closed.map(|c| c.0.to_string()),
        lambda_numeric_nm,
        method: "2d-solve".into(),
        converged,
        nodes: p.node_count(),
        unknowns,
        newton_steps_total: lin.newton_steps + sat.newton_steps + long_steps,
        factorisations_total: lin.factorisations + sat.factorisations,
        bias_points: lin.points.len() + sat.points.len(),
        vds_lin_v: s.bias.vds_lin_v,
        vds_sat_v: s.bias.vds_sat_v,
        current_criterion_a: s.extraction.current_criterion_a,
        threshold_current_a_per_um: target,
        vgs_v: vgs,
        id_lin,
        id_sat,
        current_unit: "A/um (drain current per um of gate width; negative for p-channel)".into(),
        problems,
        warnings: s.warnings.clone(),
        caution: CAUTION.into(),
    };
    Ok(DeviceSolution {
        report,
        structure,
        lin,
        sat,
        barrier_lin,
        barrier_sat,
    })
}

/// The result of one device of any architecture.
#[derive(Debug, Clone)]
pub struct Evaluation {
    pub report: DeviceReport,
    /// The 2D solution (planar devices only).
    pub solution: Option<DeviceSolution>,
}

/// Planar devices: the 2D along-channel solve ([`run_device`]). Fins and
/// wires: the long-channel cross-section solve and the theory from the
/// numeric natural length ([`crate::theory::predict_fin`]), reported in the
/// same form with `method` = "theory" and no curves or barriers.
pub fn evaluate(s: &Scenario, observer: &dyn Observer) -> Result<Evaluation, RunError> {
    if s.architecture.is_planar() {
        let sol = run_device(s, observer)?;
        return Ok(Evaluation {
            report: sol.report.clone(),
            solution: Some(sol),
        });
    }
    let f = crate::theory::predict_fin(s)?;
    let closed = closed_form::natural_length(s);
    let ni = crate::physics::Silicon::at(s.temperature_k).ni;
    let report = DeviceReport {
        name: s.name.clone(),
        architecture: s.architecture.name().into(),
        polarity: s.polarity.name().into(),
        temperature_k: s.temperature_k,
        gate_length_nm: s.geometry.gate_length_nm,
        l_met_nm: crate::structure::DopingProfile::of(s).metallurgical_length(ni),
        eot_nm: s.eot_nm(),
        vt_lin_v: Some(f.vt_lin_v),
        vt_sat_v: Some(f.vt_sat_v),
        ss_lin_mv_per_dec: Some(f.ss_mv_per_dec),
        ss_sat_mv_per_dec: Some(f.ss_mv_per_dec),
        dibl_mv_per_v: Some(f.dibl_mv_per_v),
        dibl_long_floor_mv_per_v: None,
        vt_long_v: Some(f.vt_long_v),
        ss_long_mv_per_dec: Some(f.ss_long_mv_per_dec),
        vt_rolloff_mv: Some(1000.0 * f.roll_off_lin_v),
        barrier_lin_ev: None,
        barrier_sat_ev: None,
        barrier_lowering_mev: None,
        leakiest_depth_nm: None,
        natural_length_nm: closed.map(|c| c.1),
        natural_length_formula: closed.map(|c| c.0.to_string()),
        lambda_numeric_nm: Some(f.lambda_nm),
        method: "theory".into(),
        converged: true,
        nodes: f.cross_section_nodes,
        unknowns: 0,
        newton_steps_total: f.newton_steps,
        factorisations_total: 0,
        bias_points: 0,
        vds_lin_v: s.bias.vds_lin_v,
        vds_sat_v: s.bias.vds_sat_v,
        current_criterion_a: s.extraction.current_criterion_a,
        threshold_current_a_per_um: s.extraction.current_criterion_a
            / (s.geometry.gate_length_nm * 1e-3),
        vgs_v: Vec::new(),
        id_lin: Vec::new(),
        id_sat: Vec::new(),
        current_unit: format!(
            "A per device of width W = {:.2} nm ({})",
            f.width_nm, f.width_definition
        ),
        problems: Vec::new(),
        warnings: {
            let mut w = s.warnings.clone();
            w.push(format!(
                "{}: short-channel figures are theory (Liu et al. 1993 with the numeric natural length {:.2} nm), \
                 not an along-channel solve; barrier lowering and I-V curves are not computed",
                s.architecture, f.lambda_nm
            ));
            w
        },
        caution: CAUTION.into(),
    };
    Ok(Evaluation {
        report,
        solution: None,
    })
}
