//! Nonlinear solves on a discretised [`Problem`].
//!
//! | piece | module | entry point |
//! |---|---|---|
//! | sparse Cholesky, damped Newton step | [`cholesky`] | [`PoissonSolver`] |
//! | multigrid-preconditioned CG for large 3D meshes | [`multigrid`] | [`multigrid::Multigrid`] |
//! | Anderson acceleration | [`anderson`] | [`Anderson`] |
//! | channel quasi-Fermi level and current (MODEL.md section 4) | [`transport`] | [`transport::quasi_fermi`] |
//! | the coupled potential / quasi-Fermi-level loop at one bias point | [`coupled`] | [`DeviceSolver::solve_bias_point`] |
//! | bias continuation: drain ramp, grid points in any order, the whole gate grid | [`ramp`] | [`ramp::GateWalker`], [`DeviceSolver::gate_ramp`] |
//! | one cross-section at a uniform quasi-Fermi level (planar column, fin, wire) | [`uniform`] | [`UniformChannel`] |
//!
//! Every solve returns a [`SolveReport`] with a [`Termination`]; a solve that
//! does not converge is a value the caller handles, never a panic.

pub mod anderson;
pub mod cholesky;
pub mod coupled;
pub mod multigrid;
pub mod ramp;
pub mod transport;
pub mod uniform;

pub use anderson::Anderson;
pub use cholesky::{LinearSolver, PoissonSolver};
pub use coupled::DeviceSolver;
pub use ramp::{BiasPoint, GateRamp};
pub use uniform::{UniformChannel, UniformSolveError};

use crate::discretize::{NodeKind, Problem};

/// Why a solve failed or stopped.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum SolveError {
    #[error("the Jacobian is not positive definite (factorisation failed): {0}")]
    Factorisation(String),
    #[error("the conjugate-gradient solve of a Newton step did not converge: relative residual {relative_residual:.2e} after {iterations} iterations (tolerance {tolerance:.0e})")]
    LinearSolve {
        iterations: usize,
        relative_residual: f64,
        tolerance: f64,
    },
    #[error("symbolic analysis failed: {0}")]
    Symbolic(String),
    #[error("a non-finite potential appeared at node {node} (x = {x_nm:.3} nm, y = {y_nm:.3} nm, z = {z_nm:.3} nm)")]
    NonFinite {
        node: usize,
        x_nm: f64,
        y_nm: f64,
        z_nm: f64,
    },
}

/// Electron and hole quasi-Fermi levels (V), one value per mesh column (x index).
#[derive(Debug, Clone, PartialEq)]
pub struct QuasiFermi {
    pub phi_n: Vec<f64>,
    pub phi_p: Vec<f64>,
}

impl QuasiFermi {
    /// Both levels uniform.
    pub fn uniform(nx: usize, phi_n: f64, phi_p: f64) -> Self {
        QuasiFermi {
            phi_n: vec![phi_n; nx],
            phi_p: vec![phi_p; nx],
        }
    }
}

/// Result of one Newton step.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct StepStats {
    /// Largest |update| before damping, V.
    pub max_update_v: f64,
    /// Largest residual divided by its Jacobian diagonal, V (before the step).
    pub max_scaled_residual_v: f64,
}

/// Why a nonlinear solve stopped.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Termination {
    /// Update and scaled residual (and, for a coupled solve, the change of
    /// the quasi-Fermi level) below their tolerances.
    Converged,
    /// Out of steps before the tolerances were met.
    StepLimit {
        /// The update tolerance that was not met, V.
        update_tol_v: f64,
        /// Coupled solves: the last change of the quasi-Fermi level, V.
        quasi_fermi_change_v: Option<f64>,
    },
}

/// What a nonlinear solve did.
#[derive(Debug, Clone, PartialEq)]
pub struct SolveReport {
    pub termination: Termination,
    pub steps: usize,
    pub final_update_v: f64,
    pub final_residual_v: f64,
}

impl SolveReport {
    pub fn converged(&self) -> bool {
        self.termination == Termination::Converged
    }

    /// Why it stopped, in words.
    pub fn reason(&self) -> String {
        match self.termination {
            Termination::Converged => "converged: update and residual below tolerance".into(),
            Termination::StepLimit {
                update_tol_v,
                quasi_fermi_change_v: None,
            } => format!(
                "no convergence in {} Newton steps (last update {:.3e} V, tolerance {:.1e} V)",
                self.steps, self.final_update_v, update_tol_v
            ),
            Termination::StepLimit {
                quasi_fermi_change_v: Some(dphi),
                ..
            } => format!(
                "no convergence in {} steps (update {:.2e} V, residual {:.2e} V, quasi-Fermi change {:.2e} V)",
                self.steps, self.final_update_v, self.final_residual_v, dphi
            ),
        }
    }
}

/// Convergence settings (MODEL.md section 3).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct NewtonOptions {
    /// Stop when the update is below this (V).
    pub update_tol_v: f64,
    /// ... and the scaled residual is below this (V).
    pub residual_tol_v: f64,
    /// Largest update applied to one node in one step (V).
    pub clamp_v: f64,
    pub max_steps: usize,
}

impl NewtonOptions {
    /// Defaults for thermal voltage `thermal_v` (V): update below 1e-6 V_T, steps clamped at 4 V_T.
    pub fn for_thermal_voltage(thermal_v: f64) -> Self {
        NewtonOptions {
            update_tol_v: 1e-6 * thermal_v,
            residual_tol_v: 1e-6 * thermal_v,
            clamp_v: 4.0 * thermal_v,
            max_steps: 200,
        }
    }
}

/// Sets every Dirichlet node of `psi`: electrodes from `electrode_v[e]`,
/// ohmic contacts at neutrality with quasi-Fermi level `contact_v[c]`.
pub fn apply_boundaries(p: &Problem, psi: &mut [f64], electrode_v: &[f64], contact_v: &[f64]) {
    for (k, kind) in p.nodes.iter().enumerate() {
        match *kind {
            NodeKind::Electrode(e) => psi[k] = electrode_v[e],
            NodeKind::Contact(c) => {
                psi[k] = p.silicon.ohmic_potential(contact_v[c], p.net_doping[k])
            }
            NodeKind::Free => {}
        }
    }
}

/// A starting potential: local charge neutrality in the semiconductor
/// (quasi-Fermi levels of the node's column), zero in insulators.
pub fn neutral_guess(p: &Problem, qf: &QuasiFermi) -> Vec<f64> {
    let mut psi = vec![0.0; p.node_count()];
    for (k, v) in psi.iter_mut().enumerate() {
        if p.semi_area[k] > 0.0 {
            let i = k % p.nx;
            let mid = 0.5 * (qf.phi_n[i] + qf.phi_p[i]);
            *v = p.silicon.ohmic_potential(mid, p.net_doping[k]);
        }
    }
    psi
}
