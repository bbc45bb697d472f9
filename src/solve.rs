//! Newton's method on the discretised nonlinear Poisson equation, with a
//! sparse Cholesky factorisation whose ordering and symbolic analysis are done
//! once per mesh and reused by every Newton step and bias point.
//!
//! The Jacobian `-dF/dpsi` is symmetric positive definite: the off-diagonal
//! couplings are constant on a mesh (assembled once); only the diagonal
//! (carrier terms) changes between steps.

use faer::dyn_stack::{MemBuffer, MemStack};
use faer::linalg::cholesky::llt::factor::LltRegularization;
use faer::sparse::linalg::cholesky::{
    factorize_symbolic_cholesky, CholeskySymbolicParams, SymbolicCholesky, SymmetricOrdering,
};
use faer::sparse::{SparseColMatRef, SymbolicSparseColMatRef};
use faer::{Conj, MatMut, Par, Side};

use crate::discretize::{NodeKind, Problem};

const NONE: usize = usize::MAX;

/// Why a solve failed or stopped.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum SolveError {
    #[error("the Jacobian is not positive definite (factorisation failed): {0}")]
    Factorisation(String),
    #[error("symbolic analysis failed: {0}")]
    Symbolic(String),
    #[error("a non-finite potential appeared at node {node} (x = {x_nm:.3} nm, y = {y_nm:.3} nm)")]
    NonFinite { node: usize, x_nm: f64, y_nm: f64 },
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

/// What a nonlinear solve did.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct SolveReport {
    pub converged: bool,
    pub steps: usize,
    pub final_update_v: f64,
    pub final_residual_v: f64,
    /// Why it stopped, in words.
    pub reason: String,
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
    /// Defaults for thermal voltage `vt`: update below 1e-6 V_T, steps clamped at 4 V_T.
    pub fn for_vt(vt: f64) -> Self {
        NewtonOptions {
            update_tol_v: 1e-6 * vt,
            residual_tol_v: 1e-6 * vt,
            clamp_v: 4.0 * vt,
            max_steps: 200,
        }
    }
}

/// Matrix pattern, symbolic factorisation and workspace for one mesh.
pub struct PoissonSolver {
    /// Matrix pattern and node numbering, shared by clones (one per mesh).
    pattern: std::sync::Arc<Pattern>,
    /// Jacobian values (off-diagonals fixed on a mesh, diagonal per step).
    values: Vec<f64>,
    symbolic: std::sync::Arc<SymbolicCholesky<usize>>,
    l_values: Vec<f64>,
    fmem: MemBuffer,
    smem: MemBuffer,
    rhs: Vec<f64>,
    factored: bool,
    /// Numeric factorisations done so far.
    pub factorisations: usize,
}

impl Clone for PoissonSolver {
    fn clone(&self) -> Self {
        PoissonSolver::with_symbolic(
            self.pattern.clone(),
            self.values.clone(),
            self.symbolic.clone(),
        )
    }
}

/// The Jacobian's CSC pattern (full symmetric) and the node/unknown maps.
struct Pattern {
    n: usize,
    node_of: Vec<usize>,
    col_ptr: Vec<usize>,
    row_idx: Vec<usize>,
    diag_pos: Vec<usize>,
}

impl PoissonSolver {
    fn pattern(p: &Problem) -> (Pattern, Vec<f64>) {
        let nx = p.nx;
        let mut unknown_of = vec![NONE; p.node_count()];
        let mut node_of = Vec::new();
        for (k, kind) in p.nodes.iter().enumerate() {
            if *kind == NodeKind::Free {
                unknown_of[k] = node_of.len();
                node_of.push(k);
            }
        }
        let n = node_of.len();
        let mut col_ptr = Vec::with_capacity(n + 1);
        let mut row_idx = Vec::with_capacity(5 * n);
        let mut values = Vec::with_capacity(5 * n);
        let mut diag_pos = Vec::with_capacity(n);
        col_ptr.push(0);
        for &k in &node_of {
            let (i, j) = (k % nx, k / nx);
            // Neighbours in increasing node (hence unknown) order.
            let push = |nb: usize, c: f64, row_idx: &mut Vec<usize>, values: &mut Vec<f64>| {
                let u = unknown_of[nb];
                if u != NONE {
                    row_idx.push(u);
                    values.push(-c);
                }
            };
            if j > 0 {
                push(
                    k - nx,
                    p.coef_y[i + (j - 1) * nx],
                    &mut row_idx,
                    &mut values,
                );
            }
            if i > 0 {
                push(
                    k - 1,
                    p.coef_x[i - 1 + j * (nx - 1)],
                    &mut row_idx,
                    &mut values,
                );
            }
            diag_pos.push(row_idx.len());
            row_idx.push(unknown_of[k]);
            values.push(0.0);
            if i + 1 < nx {
                push(k + 1, p.coef_x[i + j * (nx - 1)], &mut row_idx, &mut values);
            }
            if j + 1 < p.ny {
                push(k + nx, p.coef_y[i + j * nx], &mut row_idx, &mut values);
            }
            col_ptr.push(row_idx.len());
        }
        (
            Pattern {
                n,
                node_of,
                col_ptr,
                row_idx,
                diag_pos,
            },
            values,
        )
    }

    /// Orders and analyses the Jacobian's pattern for this mesh (done once).
    pub fn new(p: &Problem) -> Result<Self, SolveError> {
        let (pat, values) = Self::pattern(p);
        let sym =
            SymbolicSparseColMatRef::new_checked(pat.n, pat.n, &pat.col_ptr, None, &pat.row_idx);
        let symbolic = factorize_symbolic_cholesky(
            sym,
            Side::Lower,
            SymmetricOrdering::Amd,
            CholeskySymbolicParams::default(),
        )
        .map_err(|e| SolveError::Symbolic(format!("{e:?}")))?;
        Ok(Self::with_symbolic(
            std::sync::Arc::new(pat),
            values,
            std::sync::Arc::new(symbolic),
        ))
    }

    fn with_symbolic(
        pattern: std::sync::Arc<Pattern>,
        values: Vec<f64>,
        symbolic: std::sync::Arc<SymbolicCholesky<usize>>,
    ) -> Self {
        let par = Par::Seq;
        let l_values = vec![0.0; symbolic.len_val()];
        let fmem =
            MemBuffer::new(symbolic.factorize_numeric_llt_scratch::<f64>(par, Default::default()));
        let smem = MemBuffer::new(symbolic.solve_in_place_scratch::<f64>(1, par));
        PoissonSolver {
            rhs: vec![0.0; pattern.n],
            pattern,
            values,
            symbolic,
            l_values,
            fmem,
            smem,
            factored: false,
            factorisations: 0,
        }
    }

    /// Number of unknowns.
    pub fn unknowns(&self) -> usize {
        self.pattern.n
    }

    /// Fills `rhs` with the residual F and the diagonal of -dF/dpsi; returns the
    /// largest scaled residual |F|/diag (V).
    fn assemble(&mut self, p: &Problem, psi: &[f64], qf: &QuasiFermi) -> f64 {
        let nx = p.nx;
        let mut worst: f64 = 0.0;
        let pat = &self.pattern;
        for u in 0..pat.n {
            let k = pat.node_of[u];
            let i = k % nx;
            let (f, d) = p.residual(psi, i, k / nx, qf.phi_n[i], qf.phi_p[i]);
            self.rhs[u] = f;
            self.values[pat.diag_pos[u]] = d;
            worst = worst.max((f / d).abs());
        }
        worst
    }

    /// One damped Newton step: psi += clamp(J^-1 F).
    pub fn newton_step(
        &mut self,
        p: &Problem,
        psi: &mut [f64],
        qf: &QuasiFermi,
        clamp_v: f64,
    ) -> Result<StepStats, SolveError> {
        self.step(p, psi, qf, clamp_v, true)
    }

    /// One damped step; with `refactor == false` the last factorisation is
    /// reused (a modified-Newton step: same fixed point, linear convergence).
    pub fn step(
        &mut self,
        p: &Problem,
        psi: &mut [f64],
        qf: &QuasiFermi,
        clamp_v: f64,
        refactor: bool,
    ) -> Result<StepStats, SolveError> {
        let residual = self.assemble(p, psi, qf);
        let par = Par::Seq;
        if refactor || !self.factored {
            let a = SparseColMatRef::new(
                SymbolicSparseColMatRef::new_checked(
                    self.pattern.n,
                    self.pattern.n,
                    &self.pattern.col_ptr,
                    None,
                    &self.pattern.row_idx,
                ),
                &self.values,
            );
            self.factored = false;
            self.symbolic
                .factorize_numeric_llt::<f64>(
                    &mut self.l_values,
                    a,
                    Side::Lower,
                    LltRegularization::default(),
                    par,
                    MemStack::new(&mut self.fmem),
                    Default::default(),
                )
                .map_err(|e| SolveError::Factorisation(format!("{e:?}")))?;
            self.factored = true;
            self.factorisations += 1;
        }
        let llt = faer::sparse::linalg::cholesky::LltRef::new(&self.symbolic, &self.l_values);
        let pat = &self.pattern;
        let x = MatMut::from_column_major_slice_mut(&mut self.rhs, pat.n, 1);
        llt.solve_in_place_with_conj(Conj::No, x, par, MemStack::new(&mut self.smem));
        let mut max_update: f64 = 0.0;
        for u in 0..pat.n {
            let d = self.rhs[u];
            let k = pat.node_of[u];
            if !d.is_finite() {
                return Err(SolveError::NonFinite {
                    node: k,
                    x_nm: p.x.nodes[k % p.nx],
                    y_nm: p.y.nodes[k / p.nx],
                });
            }
            max_update = max_update.max(d.abs());
            psi[k] += d.clamp(-clamp_v, clamp_v);
        }
        Ok(StepStats {
            max_update_v: max_update,
            max_scaled_residual_v: residual,
        })
    }

    /// Newton iteration with fixed quasi-Fermi levels until converged or out of steps.
    pub fn solve(
        &mut self,
        p: &Problem,
        psi: &mut [f64],
        qf: &QuasiFermi,
        opts: &NewtonOptions,
    ) -> Result<SolveReport, SolveError> {
        let mut last = StepStats {
            max_update_v: f64::INFINITY,
            max_scaled_residual_v: f64::INFINITY,
        };
        for step in 1..=opts.max_steps {
            last = self.newton_step(p, psi, qf, opts.clamp_v)?;
            if last.max_update_v < opts.update_tol_v
                && last.max_scaled_residual_v < opts.residual_tol_v
            {
                return Ok(SolveReport {
                    converged: true,
                    steps: step,
                    final_update_v: last.max_update_v,
                    final_residual_v: last.max_scaled_residual_v,
                    reason: "update and residual below tolerance".into(),
                });
            }
        }
        Ok(SolveReport {
            converged: false,
            steps: opts.max_steps,
            final_update_v: last.max_update_v,
            final_residual_v: last.max_scaled_residual_v,
            reason: format!(
                "no convergence in {} Newton steps (last update {:.3e} V, tolerance {:.1e} V)",
                opts.max_steps, last.max_update_v, opts.update_tol_v
            ),
        })
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

/// Anderson acceleration (type II, depth `depth`) of a fixed-point iteration
/// x -> g(x): the next iterate mixes the last few so that the linear
/// combination of their residuals g - x is smallest (Walker and Ni,
/// SIAM J. Numer. Anal. 49(4), 1715, 2011). Used on the slowly contracting
/// coupling between the potential and the quasi-Fermi level.
#[derive(Debug, Clone, Default)]
pub struct Anderson {
    depth: usize,
    xs: std::collections::VecDeque<Vec<f64>>,
    fs: std::collections::VecDeque<Vec<f64>>,
}

impl Anderson {
    pub fn new(depth: usize) -> Self {
        Anderson {
            depth,
            ..Default::default()
        }
    }

    /// Forgets the history (after the iteration map changed).
    pub fn reset(&mut self) {
        self.xs.clear();
        self.fs.clear();
    }

    /// `x` is the iterate before the step, `g` the plain result; on return `g`
    /// holds the accelerated iterate.
    pub fn mix(&mut self, x: &[f64], g: &mut [f64]) {
        let f: Vec<f64> = g.iter().zip(x).map(|(a, b)| a - b).collect();
        self.xs.push_back(x.to_vec());
        self.fs.push_back(f);
        if self.xs.len() > self.depth + 1 {
            self.xs.pop_front();
            self.fs.pop_front();
        }
        let m = self.xs.len() - 1;
        if m == 0 {
            return;
        }
        let fk = &self.fs[m];
        let df: Vec<Vec<f64>> = (0..m)
            .map(|j| {
                self.fs[j + 1]
                    .iter()
                    .zip(&self.fs[j])
                    .map(|(a, b)| a - b)
                    .collect()
            })
            .collect();
        // Normal equations (df^T df + eps I) gamma = df^T f_k.
        let mut a = vec![vec![0.0; m + 1]; m];
        for i in 0..m {
            for j in 0..m {
                a[i][j] = dot(&df[i], &df[j]);
            }
            a[i][m] = dot(&df[i], fk);
        }
        let scale = (0..m).map(|i| a[i][i]).fold(0.0, f64::max);
        if scale == 0.0 {
            return;
        }
        for (i, row) in a.iter_mut().enumerate() {
            row[i] += 1e-10 * scale;
        }
        let Some(gamma) = solve_dense(a) else {
            self.reset();
            return;
        };
        for (j, gj) in gamma.iter().enumerate() {
            for (k, v) in g.iter_mut().enumerate() {
                let dx = self.xs[j + 1][k] - self.xs[j][k];
                *v -= gj * (dx + df[j][k]);
            }
        }
    }
}

fn dot(a: &[f64], b: &[f64]) -> f64 {
    a.iter().zip(b).map(|(x, y)| x * y).sum()
}

/// Gaussian elimination with partial pivoting on an augmented m x (m+1) matrix.
fn solve_dense(mut a: Vec<Vec<f64>>) -> Option<Vec<f64>> {
    let m = a.len();
    for c in 0..m {
        let p = (c..m).max_by(|&i, &j| a[i][c].abs().partial_cmp(&a[j][c].abs()).unwrap())?;
        if a[p][c].abs() < 1e-300 {
            return None;
        }
        a.swap(c, p);
        for r in c + 1..m {
            let f = a[r][c] / a[c][c];
            let pivot_row = a[c].clone();
            for (v, pv) in a[r][c..].iter_mut().zip(&pivot_row[c..]) {
                *v -= f * pv;
            }
        }
    }
    let mut x = vec![0.0; m];
    for r in (0..m).rev() {
        let s: f64 = (r + 1..m).map(|k| a[r][k] * x[k]).sum();
        x[r] = (a[r][m] - s) / a[r][r];
    }
    Some(x)
}

#[cfg(test)]
mod anderson_tests {
    use super::*;

    #[test]
    fn anderson_accelerates_a_slow_linear_fixed_point() {
        // x = M x + b with spectral radius 0.95: plain iteration needs ~400 steps for 1e-9.
        let n = 6;
        let b: Vec<f64> = (0..n).map(|i| 1.0 + i as f64).collect();
        let map = |x: &[f64]| -> Vec<f64> {
            (0..n)
                .map(|i| 0.95 * x[i] * (1.0 - 0.1 * i as f64) + 0.01 * x[(i + 1) % n] + b[i])
                .collect()
        };
        let mut acc = Anderson::new(5);
        let mut x = vec![0.0; n];
        let mut steps = 0;
        for k in 0..200 {
            let mut g = map(&x);
            let res: f64 = g
                .iter()
                .zip(&x)
                .map(|(a, b)| (a - b).abs())
                .fold(0.0, f64::max);
            if res < 1e-9 {
                steps = k;
                break;
            }
            acc.mix(&x, &mut g);
            x = g;
        }
        assert!(steps > 0 && steps < 40, "took {steps} steps");
    }
}
