//! Bias continuation: equilibrium at the first gate voltage, the drain ramped
//! up, then the gate ramp from the off end with a linear predictor between
//! converged points.

use super::{neutral_guess, DeviceSolver, QuasiFermi, SolveError, SolveReport};
use crate::progress::Observer;

/// Largest drain-bias step while ramping, V.
const VDS_RAMP_STEP_V: f64 = 0.1;

/// One solved bias point.
#[derive(Debug, Clone, PartialEq)]
pub struct BiasPoint {
    pub vgs_v: f64,
    /// Signed drain current per width, A/um; `None` when the point did not converge.
    pub current_a_per_um: Option<f64>,
    pub report: SolveReport,
}

/// A gate ramp at one drain bias, in ramp order (from the off end).
#[derive(Debug, Clone, PartialEq)]
pub struct GateRamp {
    pub vds_v: f64,
    pub points: Vec<BiasPoint>,
    /// Potential at the off-state gate voltage (None if it did not converge).
    pub off_psi: Option<Vec<f64>>,
    pub newton_steps: usize,
    pub factorisations: usize,
}

impl DeviceSolver<'_> {
    /// Equilibrium at the first gate voltage, then the drain ramped to `vds`.
    pub fn initial_state(&mut self, vgs: f64, vds: f64) -> Result<Vec<f64>, SolveError> {
        let p = self.problem();
        let mut psi = neutral_guess(p, &QuasiFermi::uniform(p.nx, 0.0, 0.0));
        let ramp = (vds.abs() / VDS_RAMP_STEP_V).ceil().max(1.0) as usize;
        for k in 0..=ramp {
            let v = vds * k as f64 / ramp as f64;
            let (rep, _) = self.solve_bias_point(&mut psi, vgs, v)?;
            if !rep.converged() {
                return Err(SolveError::Factorisation(format!(
                    "drain ramp failed at V_DS = {v:.3} V: {}",
                    rep.reason()
                )));
            }
        }
        Ok(psi)
    }

    /// Gate ramp at drain bias `vds` over the scenario's gate voltages, from the off end.
    pub fn gate_ramp(&mut self, vds: f64, observer: &dyn Observer) -> Result<GateRamp, SolveError> {
        let s = self.scenario;
        let mut grid = s.bias.gate_voltages();
        if s.polarity.sign() < 0.0 {
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
                let (rep, _) = self.solve_bias_point(&mut trial, off, vds)?;
                if rep.converged() {
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
            let (mut rep, mut t) = self.solve_bias_point(&mut guess, vg, vds)?;
            if !rep.converged() && prev.is_some() {
                // Retry without the predictor.
                guess = psi.clone();
                let (r2, t2) = self.solve_bias_point(&mut guess, vg, vds)?;
                rep = r2;
                t = t2;
            }
            observer.bias_point(vds, vg, rep.converged());
            if rep.converged() {
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
        Ok(GateRamp {
            vds_v: vds,
            points,
            off_psi,
            newton_steps: self.steps - steps0,
            factorisations: self.solver.factorisations - f0,
        })
    }
}
