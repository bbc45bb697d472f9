//! The coupled solve at one bias point: Newton steps on the potential
//! interleaved with updates of the channel carrier's quasi-Fermi level
//! (MODEL.md section 4), Anderson-accelerated, reusing the last numeric
//! factorisation while the iteration contracts.

use super::transport::{levels, quasi_fermi, Transport};
use super::{
    apply_boundaries, Anderson, NewtonOptions, PoissonSolver, SolveError, SolveReport, Termination,
};
use crate::device::Scenario;
use crate::discretize::Problem;
use crate::structure::{AlongChannel, BACK_PLANE, ELECTRODES, GATE, PLUG_DRAIN, PLUG_SOURCE};

/// Convergence of the channel carrier's quasi-Fermi level between iterations, V (MODEL.md section 4).
pub const QF_TOL_V: f64 = 1e-7;
/// History kept by the Anderson acceleration of the potential/quasi-Fermi coupling.
const ANDERSON_DEPTH: usize = 5;
/// A factorisation from an earlier bias point is renewed after this many steps.
const STALE_AFTER_STEPS: usize = 5;
/// Above this update (V) the next step refactorises the Jacobian.
const REFACTOR_ABOVE_V: f64 = 1e-2;

/// Steps a device through bias points on one mesh, reusing the symbolic factorisation.
pub struct DeviceSolver<'a> {
    pub scenario: &'a Scenario,
    pub structure: &'a AlongChannel,
    pub solver: PoissonSolver,
    pub opts: NewtonOptions,
    /// Newton steps so far.
    pub steps: usize,
}

impl<'a> DeviceSolver<'a> {
    pub fn new(scenario: &'a Scenario, structure: &'a AlongChannel, solver: PoissonSolver) -> Self {
        let opts = NewtonOptions::for_thermal_voltage(structure.problem.silicon.thermal_v);
        DeviceSolver {
            scenario,
            structure,
            solver,
            opts,
            steps: 0,
        }
    }

    pub(crate) fn problem(&self) -> &Problem {
        &self.structure.problem
    }

    /// Applies the electrode and contact potentials for (vgs, vds).
    pub fn set_bias(&self, psi: &mut [f64], vgs: f64, vds: f64) {
        let p = self.problem();
        let si = p.silicon;
        let g = &self.scenario.gate;
        let mut electrodes = [0.0; ELECTRODES];
        electrodes[GATE] = si.electrode_potential(vgs, g.workfunction_ev);
        electrodes[BACK_PLANE] = si.electrode_potential(g.back_bias_v, g.back_workfunction_ev);
        if let Some(plugs) = &self.structure.plugs {
            // Each plug at the ohmic potential of the silicon beneath it.
            let [ns, nd] = plugs.net_doping_per_nm3;
            electrodes[PLUG_SOURCE] = si.ohmic_potential(0.0, ns);
            electrodes[PLUG_DRAIN] = si.ohmic_potential(vds, nd);
        }
        apply_boundaries(p, psi, &electrodes, &[0.0, vds, 0.0]);
    }

    /// Solves one bias point (vgs, vds) from the starting potential in `psi`.
    pub fn solve_bias_point(
        &mut self,
        psi: &mut [f64],
        vgs: f64,
        vds: f64,
    ) -> Result<(SolveReport, Transport), SolveError> {
        self.set_bias(psi, vgs, vds);
        let polarity = self.scenario.polarity;
        let mu = self.scenario.extraction.mobility_nm2_per_vs;
        let p = &self.structure.problem;
        let mut t = quasi_fermi(p, psi, polarity, vds, mu);
        let mut last = (f64::INFINITY, f64::INFINITY, f64::INFINITY);
        let mut refactor = false; // reuse the last factorisation while it contracts
        let mut fresh = false; // refactorised during this bias point
        let mut accel = Anderson::new(ANDERSON_DEPTH);
        let mut before = psi.to_vec();
        for step in 1..=self.opts.max_steps {
            let qf = levels(&t, polarity);
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
            let t_new = quasi_fermi(p, psi, polarity, vds, mu);
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
                        termination: Termination::Converged,
                        steps: step,
                        final_update_v: st.max_update_v,
                        final_residual_v: st.max_scaled_residual_v,
                    },
                    t,
                ));
            }
        }
        Ok((
            SolveReport {
                termination: Termination::StepLimit {
                    update_tol_v: self.opts.update_tol_v,
                    quasi_fermi_change_v: Some(last.2),
                },
                steps: self.opts.max_steps,
                final_update_v: last.0,
                final_residual_v: last.1,
            },
            t,
        ))
    }
}
