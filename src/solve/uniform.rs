//! One solver for every cross-section at a uniform quasi-Fermi level: the
//! planar long-channel column (MODEL.md section 5) and the fin or wire
//! cross-section perpendicular to the channel. The channel carrier's
//! quasi-Fermi level is V everywhere, the other carrier's 0 V, every ohmic
//! contact at 0 V; a body without contacts floats and its carriers follow
//! those levels, as in a long channel.

use super::{
    apply_boundaries, neutral_guess, NewtonOptions, PoissonSolver, QuasiFermi, SolveError,
};
use crate::device::{Polarity, Scenario};
use crate::discretize::Problem;
use crate::structure::{long_channel_column, CrossSection, BACK_PLANE, GATE};

/// Width of the planar long-channel column strip, nm (its densities are per nm of width).
pub const COLUMN_WIDTH_NM: f64 = 1.0;

/// A uniform-level solve that failed or did not converge (never written as a value).
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum UniformSolveError {
    #[error(transparent)]
    Solve(#[from] SolveError),
    #[error("the {what} did not converge at V_G = {vgs_v:.4} V, V = {v:.4} V: {reason}")]
    NotConverged {
        what: &'static str,
        vgs_v: f64,
        v: f64,
        reason: String,
    },
}

/// A cross-section and its solver, continuing from its last potential.
pub struct UniformChannel {
    pub problem: Problem,
    /// What this cross-section is, for messages ("1D long-channel column", "fin cross-section").
    pub what: &'static str,
    /// Device width W the densities are divided by, nm.
    pub width_nm: f64,
    solver: PoissonSolver,
    psi: Vec<f64>,
    polarity: Polarity,
    workfunction_ev: f64,
    back_workfunction_ev: f64,
    back_bias_v: f64,
    /// Constant mobility, nm^2/(V s).
    pub mobility_nm2_per_vs: f64,
    opts: NewtonOptions,
    /// Newton steps so far.
    pub steps: usize,
}

impl UniformChannel {
    /// `problem` is the cross-section (electrode [`GATE`] and, if any,
    /// [`BACK_PLANE`]); densities are integrated over all of its silicon and
    /// divided by `width_nm`.
    pub fn new(
        s: &Scenario,
        problem: Problem,
        width_nm: f64,
        what: &'static str,
    ) -> Result<Self, SolveError> {
        let solver = PoissonSolver::new(&problem)?;
        let psi = neutral_guess(&problem, &QuasiFermi::uniform(problem.nx, 0.0, 0.0));
        Ok(UniformChannel {
            opts: NewtonOptions::for_thermal_voltage(problem.silicon.thermal_v),
            what,
            width_nm,
            solver,
            psi,
            polarity: s.polarity,
            workfunction_ev: s.gate.workfunction_ev,
            back_workfunction_ev: s.gate.back_workfunction_ev,
            back_bias_v: s.gate.back_bias_v,
            mobility_nm2_per_vs: s.extraction.mobility_nm2_per_vs,
            steps: 0,
            problem,
        })
    }

    /// The planar long-channel column of `s` (1D, at mid-channel).
    pub fn column(s: &Scenario) -> Result<Self, SolveError> {
        Self::new(
            s,
            long_channel_column(s),
            COLUMN_WIDTH_NM,
            "1D long-channel column",
        )
    }

    /// A fin or wire cross-section of `s`; densities per device width W of the section.
    pub fn fin(s: &Scenario, cs: &CrossSection) -> Result<Self, SolveError> {
        Self::new(s, cs.problem.clone(), cs.width_nm, "fin cross-section")
    }

    /// Solves at gate voltage `vgs` with the channel carrier's quasi-Fermi
    /// level at `v` (from the last potential); a solve that does not converge is an error.
    pub fn solve_at(&mut self, vgs: f64, v: f64) -> Result<(), UniformSolveError> {
        let p = &self.problem;
        let si = p.silicon;
        let mut electrodes = [0.0; 2];
        electrodes[GATE] = si.electrode_potential(vgs, self.workfunction_ev);
        electrodes[BACK_PLANE] =
            si.electrode_potential(self.back_bias_v, self.back_workfunction_ev);
        apply_boundaries(p, &mut self.psi, &electrodes, &[0.0; 3]);
        let qf = match self.polarity {
            Polarity::N => QuasiFermi::uniform(p.nx, v, 0.0),
            Polarity::P => QuasiFermi::uniform(p.nx, 0.0, v),
        };
        let rep = self.solver.solve(p, &mut self.psi, &qf, &self.opts)?;
        if !rep.converged() {
            return Err(UniformSolveError::NotConverged {
                what: self.what,
                vgs_v: vgs,
                v,
                reason: rep.reason(),
            });
        }
        self.steps += rep.steps;
        Ok(())
    }

    /// Solves at (`vgs`, `v`) and returns the channel-carrier density
    /// integrated over the cross-section's silicon per unit device width, nm^-2.
    pub fn sheet_density(&mut self, vgs: f64, v: f64) -> Result<f64, UniformSolveError> {
        self.solve_at(vgs, v)?;
        let p = &self.problem;
        let mut sum = 0.0;
        for (k, &a) in p.semi_area.iter().enumerate() {
            if a > 0.0 {
                sum += a * self.carrier_density(k, v);
            }
        }
        Ok(sum * p.symmetry_factor / self.width_nm)
    }

    /// Potential of the last solve, V (nodes of [`UniformChannel::problem`]).
    pub fn potential(&self) -> &[f64] {
        &self.psi
    }

    /// Channel-carrier density (nm^-3) at node `k` for the last solve at quasi-Fermi level `v`.
    pub fn carrier_density(&self, k: usize, v: f64) -> f64 {
        let si = self.problem.silicon;
        si.ni * (self.polarity.sign() * (self.psi[k] - v) / si.thermal_v).exp()
    }

    /// Majority-carrier density (nm^-3) at node `k` (its quasi-Fermi level is 0 V).
    pub fn majority_density(&self, k: usize) -> f64 {
        let si = self.problem.silicon;
        si.ni * (-self.polarity.sign() * self.psi[k] / si.thermal_v).exp()
    }

    pub fn polarity(&self) -> Polarity {
        self.polarity
    }
}
