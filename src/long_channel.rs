//! The 1D long-channel reference (MODEL.md section 5): the mid-channel column
//! solved with a uniform channel-carrier quasi-Fermi level V gives the sheet
//! density N_s(V_G, V); a long device carries (gradual channel, Pao and Sah,
//! Solid-State Electronics 9, 927, 1966)
//! `I_D L / W = q mu int_0^{V_DS} N_s(V_G, V) dV`,
//! and V_t,long solves `I_D L / W = I_cc` at V_DS,lin.

use crate::device::Scenario;
use crate::discretize::Problem;
use crate::physics::{CM2_TO_NM2, Q_C};
use crate::solve::{
    apply_boundaries, neutral_guess, NewtonOptions, PoissonSolver, QuasiFermi, SolveError,
};
use crate::structure::{long_channel_column, BACK_PLANE, GATE};

/// Gauss-Legendre nodes and weights on [-1, 1], 8 points (digits as tabulated).
#[allow(clippy::excessive_precision)]
const GL8: [(f64, f64); 8] = [
    (-0.960_289_856_497_536_3, 0.101_228_536_290_376_26),
    (-0.796_666_477_413_626_7, 0.222_381_034_453_374_47),
    (-0.525_532_409_916_329_0, 0.313_706_645_877_887_3),
    (-0.183_434_642_495_649_8, 0.362_683_783_378_362_0),
    (0.183_434_642_495_649_8, 0.362_683_783_378_362_0),
    (0.525_532_409_916_329_0, 0.313_706_645_877_887_3),
    (0.796_666_477_413_626_7, 0.222_381_034_453_374_47),
    (0.960_289_856_497_536_3, 0.101_228_536_290_376_26),
];

/// The long-channel column and its solver.
pub struct Column {
    pub problem: Problem,
    solver: PoissonSolver,
    psi: Vec<f64>,
    sign: f64,
    wf: f64,
    back_wf: f64,
    back_bias: f64,
    mobility: f64,
    opts: NewtonOptions,
    /// Newton steps so far.
    pub steps: usize,
}

/// A long-channel bias: gate voltage, the channel carrier's uniform quasi-Fermi level.
pub(crate) struct GateBias<'a> {
    pub vgs: f64,
    pub v: f64,
    /// +1 n-channel, -1 p-channel.
    pub sign: f64,
    /// Electrode potentials, V.
    pub electrodes: &'a [f64],
    /// What is being solved, for the error message.
    pub what: &'static str,
}

/// Solves `p` with every contact at 0 V, the channel carrier's quasi-Fermi
/// level uniform at `g.v` and the other carrier's at 0 V; returns the Newton
/// steps. A solve that does not converge is an error, never a value.
pub(crate) fn solve_at_channel_level(
    p: &Problem,
    solver: &mut PoissonSolver,
    psi: &mut [f64],
    g: &GateBias,
    opts: &NewtonOptions,
) -> Result<usize, LongChannelError> {
    apply_boundaries(p, psi, g.electrodes, &[0.0; 3]);
    let qf = if g.sign > 0.0 {
        QuasiFermi::uniform(p.nx, g.v, 0.0)
    } else {
        QuasiFermi::uniform(p.nx, 0.0, g.v)
    };
    let rep = solver.solve(p, psi, &qf, opts)?;
    if !rep.converged {
        return Err(LongChannelError::NotConverged {
            what: g.what,
            vgs_v: g.vgs,
            v: g.v,
            reason: rep.reason,
        });
    }
    Ok(rep.steps)
}

/// Long-channel figures.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct LongChannel {
    /// Threshold voltage at V_DS,lin, V.
    pub vt_v: f64,
    /// Subthreshold swing in the middle of the SS window at V_DS,lin, mV/dec.
    pub ss_mv_per_dec: f64,
}

/// Failure of the long-channel reference.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum LongChannelError {
    #[error(transparent)]
    Solve(#[from] SolveError),
    #[error("the {what} did not converge at V_G = {vgs_v:.4} V, V = {v:.4} V: {reason}")]
    NotConverged {
        what: &'static str,
        vgs_v: f64,
        v: f64,
        reason: String,
    },
    #[error("the long-channel current does not reach the criterion within the gate sweep {0:.3} to {1:.3} V; widen bias.vgs_start_V/vgs_stop_V")]
    NotBracketed(f64, f64),
}

impl Column {
    pub fn new(s: &Scenario) -> Result<Self, SolveError> {
        let problem = long_channel_column(s);
        let solver = PoissonSolver::new(&problem)?;
        let qf = QuasiFermi::uniform(problem.nx, 0.0, 0.0);
        let psi = neutral_guess(&problem, &qf);
        Ok(Column {
            opts: NewtonOptions::for_vt(problem.silicon.vt),
            problem,
            solver,
            psi,
            sign: s.polarity.sign(),
            wf: s.gate.workfunction_ev,
            back_wf: s.gate.back_workfunction_ev,
            back_bias: s.gate.back_bias_v,
            mobility: s.extraction.mobility_cm2_per_vs,
            steps: 0,
        })
    }

    /// Solves at gate voltage `vgs` with the channel carrier's quasi-Fermi level at `v`; returns
    /// the channel-carrier sheet density, nm^-2, and leaves the potential in `self.psi`.
    pub fn sheet_density(&mut self, vgs: f64, v: f64) -> Result<f64, LongChannelError> {
        let p = &self.problem;
        let si = p.silicon;
        let mut electrodes = [0.0; 2];
        electrodes[GATE] = si.electrode_potential(vgs, self.wf);
        electrodes[BACK_PLANE] = si.electrode_potential(self.back_bias, self.back_wf);
        let gate = GateBias {
            vgs,
            v,
            sign: self.sign,
            electrodes: &electrodes,
            what: "1D long-channel column",
        };
        self.steps +=
            solve_at_channel_level(p, &mut self.solver, &mut self.psi, &gate, &self.opts)?;
        let s = self.sign;
        let vt = si.vt;
        Ok(p.column_integral(&self.psi, 0, |x| si.ni * (s * (x - v) / vt).exp()))
    }

    /// Potential of the last solve, V (nodes of [`Column::problem`]).
    pub fn potential(&self) -> &[f64] {
        &self.psi
    }

    /// Long-channel I_D L / W (A) at gate voltage `vgs` and drain bias `vds`.
    pub fn current_l_over_w(&mut self, vgs: f64, vds: f64) -> Result<f64, LongChannelError> {
        pao_sah_current_l_over_w(self, vgs, vds)
    }
}

/// A long-channel device seen through its cross-section at uniform
/// quasi-Fermi level: what the Pao-Sah extraction needs. Implemented by the
/// planar [`Column`] and by the fin/wire cross-section
/// (`crosssection::FinChannel`).
pub trait PaoSahDevice {
    /// Channel-carrier density at gate voltage `vgs` and channel quasi-Fermi
    /// level `v`, integrated over the cross-section per unit device width, nm^-2.
    fn sheet_density(&mut self, vgs: f64, v: f64) -> Result<f64, LongChannelError>;
    /// Constant mobility, cm^2/(V s).
    fn mobility_cm2_per_vs(&self) -> f64;
    /// Newton steps spent so far.
    fn newton_steps(&self) -> usize;
}

impl PaoSahDevice for Column {
    fn sheet_density(&mut self, vgs: f64, v: f64) -> Result<f64, LongChannelError> {
        Column::sheet_density(self, vgs, v)
    }
    fn mobility_cm2_per_vs(&self) -> f64 {
        self.mobility
    }
    fn newton_steps(&self) -> usize {
        self.steps
    }
}

/// Long-channel I_D L / W (A) of any [`PaoSahDevice`]: q mu int_0^{V_DS} N_s dV
/// by 8-point Gauss-Legendre quadrature.
pub fn pao_sah_current_l_over_w<D: PaoSahDevice + ?Sized>(
    dev: &mut D,
    vgs: f64,
    vds: f64,
) -> Result<f64, LongChannelError> {
    let half = 0.5 * vds;
    let mut sum = 0.0;
    for (t, w) in GL8 {
        sum += w * dev.sheet_density(vgs, half * (1.0 + t))?;
    }
    // |int_0^vds N dV| = |half| * sum
    Ok(Q_C * dev.mobility_cm2_per_vs() * CM2_TO_NM2 * half.abs() * sum)
}

/// V_t,long and the long-channel SS for the scenario (at V_DS,lin).
pub fn long_channel(s: &Scenario) -> Result<(LongChannel, usize), LongChannelError> {
    let mut col = Column::new(s)?;
    extract_long_channel(&mut col, s)
}

/// V_t,long (constant current I_cc at V_DS,lin, bias grid of `s`) and the
/// long-channel SS of any [`PaoSahDevice`]; also returns the Newton steps spent.
pub fn extract_long_channel<D: PaoSahDevice>(
    col: &mut D,
    s: &Scenario,
) -> Result<(LongChannel, usize), LongChannelError> {
    let b = &s.bias;
    let sign = s.polarity.sign();
    let target = s.extraction.current_criterion_a;
    let vds = b.vds_lin_v;
    // Gate voltages from the off end toward the on end.
    let mut grid = b.gate_voltages();
    if sign < 0.0 {
        grid.reverse();
    }
    let log_i = |col: &mut D, vg: f64| -> Result<f64, LongChannelError> {
        Ok(pao_sah_current_l_over_w(col, vg, vds)?.log10())
    };
    let lt = target.log10();
    let mut prev: Option<(f64, f64)> = None;
    let mut bracket = None;
    for &vg in &grid {
        let li = log_i(col, vg)?;
        if li >= lt {
            bracket = prev.map(|p| (p, (vg, li)));
            break;
        }
        prev = Some((vg, li));
    }
    let ((mut va, mut la), (mut vb, mut lb)) =
        bracket.ok_or(LongChannelError::NotBracketed(b.vgs_start_v, b.vgs_stop_v))?;
    // Illinois false position on log10 I (monotone in V_G).
    let mut side = 0i32;
    let mut vt = va;
    for _ in 0..60 {
        vt = vb - (lb - lt) * (vb - va) / (lb - la);
        let lv = log_i(col, vt)?;
        if (lv - lt).abs() < 1e-10 || (vb - va).abs() < 1e-9 {
            break;
        }
        if (lv - lt) * (lb - lt) > 0.0 {
            vb = vt;
            lb = lv;
            if side == 1 {
                la = lt + 0.5 * (la - lt);
            }
            side = 1;
        } else {
            va = vt;
            la = lv;
            if side == -1 {
                lb = lt + 0.5 * (lb - lt);
            }
            side = -1;
        }
    }
    // SS at the middle of the SS window (1e-2 of the criterion): about 2 decades below V_t.
    let mut v_mid = vt - sign * 0.12;
    for _ in 0..30 {
        let d = 1e-3 * sign;
        let l0 = log_i(col, v_mid)?;
        let slope = (log_i(col, v_mid + d)? - l0) / d;
        let step = (lt - 2.0 - l0) / slope;
        v_mid += step;
        if step.abs() < 1e-6 {
            break;
        }
    }
    let h = 2e-3;
    let slope = (log_i(col, v_mid + h)? - log_i(col, v_mid - h)?) / (2.0 * h);
    let steps = col.newton_steps();
    Ok((
        LongChannel {
            vt_v: vt,
            ss_mv_per_dec: 1000.0 / slope.abs(),
        },
        steps,
    ))
}
