//! The linear core of every solve: Newton steps on the discretised nonlinear
//! Poisson equation with a sparse Cholesky factorisation whose ordering and symbolic analysis are done
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

use super::multigrid::{Multigrid, CG_MAX_ITERATIONS, CG_RELATIVE_TOLERANCE};
use super::{NewtonOptions, QuasiFermi, SolveError, SolveReport, StepStats, Termination};
use crate::discretize::{NodeKind, Problem};

const NONE: usize = usize::MAX;

/// Which linear solver a [`PoissonSolver`] uses for its Newton steps.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum LinearSolver {
    /// Sparse Cholesky (AMD ordering in 2D, nested dissection in 3D).
    Direct,
    /// Conjugate gradients preconditioned by a geometric-multigrid V-cycle
    /// ([`crate::solve::multigrid`]).
    Multigrid,
}

impl LinearSolver {
    /// The automatic choice: multigrid-preconditioned CG for 3D problems
    /// with at least [`MULTIGRID_FROM_UNKNOWNS`] unknowns, the direct
    /// factorisation otherwise (every 2D problem).
    pub fn for_problem(p: &Problem, unknowns: usize) -> Self {
        if p.is_3d() && unknowns >= MULTIGRID_FROM_UNKNOWNS {
            LinearSolver::Multigrid
        } else {
            LinearSolver::Direct
        }
    }

    /// Stable name for outputs.
    pub fn as_str(&self) -> &'static str {
        match self {
            LinearSolver::Direct => "cholesky",
            LinearSolver::Multigrid => "multigrid-cg",
        }
    }
}

/// 3D problems with at least this many unknowns use the multigrid-preconditioned
/// CG (measured crossover, `docs/fins-3d.md`).
pub const MULTIGRID_FROM_UNKNOWNS: usize = 20_000;

/// The factorisation or preconditioner of the Jacobian.
enum Backend {
    Direct {
        symbolic: std::sync::Arc<SymbolicCholesky<usize>>,
        l_values: Vec<f64>,
        fmem: MemBuffer,
        smem: MemBuffer,
    },
    Multigrid {
        mg: Box<Multigrid>,
        /// The Jacobian diagonal, gathered for the preconditioner.
        diag: Vec<f64>,
    },
}

/// Matrix pattern, symbolic factorisation (or multigrid hierarchy) and
/// workspace for one mesh.
pub struct PoissonSolver {
    /// Matrix pattern and node numbering, shared by clones (one per mesh).
    pattern: std::sync::Arc<Pattern>,
    /// Jacobian values (off-diagonals fixed on a mesh, diagonal per step).
    values: Vec<f64>,
    backend: Backend,
    rhs: Vec<f64>,
    factored: bool,
    /// Numeric factorisations (direct) or preconditioner setups (multigrid:
    /// diagonal update and coarsest-level factorisation) done so far.
    pub factorisations: usize,
    /// Conjugate-gradient iterations done so far (0 for the direct solver).
    pub cg_iterations: usize,
}

impl Clone for PoissonSolver {
    fn clone(&self) -> Self {
        match &self.backend {
            Backend::Direct { symbolic, .. } => PoissonSolver::with_symbolic(
                self.pattern.clone(),
                self.values.clone(),
                symbolic.clone(),
            ),
            Backend::Multigrid { mg, diag } => PoissonSolver::with_backend(
                self.pattern.clone(),
                self.values.clone(),
                Backend::Multigrid {
                    mg: mg.clone(),
                    diag: vec![0.0; diag.len()],
                },
            ),
        }
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

/// Geometric nested dissection of the unknowns of a tensor-product mesh
/// (George, SIAM J. Numer. Anal. 10(2), 345, 1973): the index box is split
/// at the middle plane of its longest side, both halves are ordered first and
/// the separating plane last, recursively. Returns (fwd, inv) with
/// `fwd[new] = old` and `inv[old] = new` over unknown numbers.
fn nested_dissection(p: &Problem, node_of: &[usize]) -> (Vec<usize>, Vec<usize>) {
    let mut unknown_of = vec![NONE; p.node_count()];
    for (u, &k) in node_of.iter().enumerate() {
        unknown_of[k] = u;
    }
    let mut fwd = Vec::with_capacity(node_of.len());
    // Explicit stack of boxes [lo, hi) in (i, j, k); a `true` flag emits the box as is.
    let mut stack = vec![([0, 0, 0], [p.nx, p.ny, p.nz], false)];
    while let Some((lo, hi, emit)) = stack.pop() {
        let ext = [hi[0] - lo[0], hi[1] - lo[1], hi[2] - lo[2]];
        if ext.contains(&0) {
            continue;
        }
        if emit || ext.iter().product::<usize>() <= 64 {
            for k in lo[2]..hi[2] {
                for j in lo[1]..hi[1] {
                    for i in lo[0]..hi[0] {
                        let u = unknown_of[p.index(i, j, k)];
                        if u != NONE {
                            fwd.push(u);
                        }
                    }
                }
            }
            continue;
        }
        let axis = (0..3).max_by_key(|&a| ext[a]).unwrap_or(0);
        let mid = lo[axis] + ext[axis] / 2;
        let (mut left_hi, mut right_lo, mut sep_lo, mut sep_hi) = (hi, lo, lo, hi);
        left_hi[axis] = mid;
        right_lo[axis] = mid + 1;
        sep_lo[axis] = mid;
        sep_hi[axis] = mid + 1;
        // Popped in reverse: left, right, then the separator.
        stack.push((sep_lo, sep_hi, true));
        stack.push((right_lo, hi, false));
        stack.push((lo, left_hi, false));
    }
    let mut inv = vec![0; fwd.len()];
    for (new, &old) in fwd.iter().enumerate() {
        inv[old] = new;
    }
    (fwd, inv)
}

impl PoissonSolver {
    fn pattern(p: &Problem) -> (Pattern, Vec<f64>) {
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
            // Neighbours in increasing node (hence unknown) order: z-, y-, x-, x+, y+, z+.
            let nb = p.neighbours(k);
            for (m, c) in [nb[4], nb[2], nb[0]].into_iter().flatten() {
                let u = unknown_of[m];
                if u != NONE {
                    row_idx.push(u);
                    values.push(-c);
                }
            }
            diag_pos.push(row_idx.len());
            row_idx.push(unknown_of[k]);
            values.push(0.0);
            for (m, c) in [nb[1], nb[3], nb[5]].into_iter().flatten() {
                let u = unknown_of[m];
                if u != NONE {
                    row_idx.push(u);
                    values.push(-c);
                }
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

    /// Orders and analyses the Jacobian's pattern for this mesh (done once):
    /// approximate minimum degree in 2D, geometric nested dissection on the
    /// tensor mesh in 3D (less fill, faster numeric factorisation: measured in
    /// `benches/fin3d.rs`); large 3D meshes get the multigrid hierarchy
    /// instead ([`LinearSolver::for_problem`]).
    pub fn new(p: &Problem) -> Result<Self, SolveError> {
        let (pat, values) = Self::pattern(p);
        let choice = LinearSolver::for_problem(p, pat.n);
        Self::build(p, pat, values, choice)
    }

    /// As [`PoissonSolver::new`] with the linear solver chosen by the caller.
    pub fn with_linear_solver(p: &Problem, choice: LinearSolver) -> Result<Self, SolveError> {
        let (pat, values) = Self::pattern(p);
        Self::build(p, pat, values, choice)
    }

    fn build(
        p: &Problem,
        pat: Pattern,
        values: Vec<f64>,
        choice: LinearSolver,
    ) -> Result<Self, SolveError> {
        if choice == LinearSolver::Multigrid {
            let mg = Multigrid::new(p, &pat.node_of)?;
            let n = pat.n;
            return Ok(Self::with_backend(
                std::sync::Arc::new(pat),
                values,
                Backend::Multigrid {
                    mg: Box::new(mg),
                    diag: vec![0.0; n],
                },
            ));
        }
        let sym =
            SymbolicSparseColMatRef::new_checked(pat.n, pat.n, &pat.col_ptr, None, &pat.row_idx);
        let (fwd, inv) = if p.is_3d() {
            nested_dissection(p, &pat.node_of)
        } else {
            (Vec::new(), Vec::new())
        };
        let ordering = if p.is_3d() {
            SymmetricOrdering::Custom(faer::perm::PermRef::new_checked(&fwd, &inv, pat.n))
        } else {
            SymmetricOrdering::Amd
        };
        let symbolic = factorize_symbolic_cholesky(
            sym,
            Side::Lower,
            ordering,
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
        Self::with_backend(
            pattern,
            values,
            Backend::Direct {
                symbolic,
                l_values,
                fmem,
                smem,
            },
        )
    }

    fn with_backend(pattern: std::sync::Arc<Pattern>, values: Vec<f64>, backend: Backend) -> Self {
        PoissonSolver {
            rhs: vec![0.0; pattern.n],
            pattern,
            values,
            backend,
            factored: false,
            factorisations: 0,
            cg_iterations: 0,
        }
    }

    /// The linear solver in use.
    pub fn linear_solver(&self) -> LinearSolver {
        match self.backend {
            Backend::Direct { .. } => LinearSolver::Direct,
            Backend::Multigrid { .. } => LinearSolver::Multigrid,
        }
    }

    /// Multigrid levels' unknowns, finest first (empty for the direct solver).
    pub fn multigrid_levels(&self) -> Vec<usize> {
        match &self.backend {
            Backend::Direct { .. } => Vec::new(),
            Backend::Multigrid { mg, .. } => mg.level_unknowns(),
        }
    }

    /// Refreshes the factorisation or preconditioner from `values`.
    fn refresh(&mut self) -> Result<(), SolveError> {
        self.factored = false;
        let pat = &self.pattern;
        match &mut self.backend {
            Backend::Direct {
                symbolic,
                l_values,
                fmem,
                ..
            } => {
                let a = SparseColMatRef::new(
                    SymbolicSparseColMatRef::new_checked(
                        pat.n,
                        pat.n,
                        &pat.col_ptr,
                        None,
                        &pat.row_idx,
                    ),
                    &self.values,
                );
                symbolic
                    .factorize_numeric_llt::<f64>(
                        l_values,
                        a,
                        Side::Lower,
                        LltRegularization::default(),
                        Par::Seq,
                        MemStack::new(fmem),
                        Default::default(),
                    )
                    .map_err(|e| SolveError::Factorisation(format!("{e:?}")))?;
            }
            Backend::Multigrid { mg, diag } => {
                for (d, &pos) in diag.iter_mut().zip(&pat.diag_pos) {
                    *d = self.values[pos];
                }
                mg.set_diagonal(diag)?;
            }
        }
        self.factored = true;
        self.factorisations += 1;
        Ok(())
    }

    /// Solves J x = b in place with the last factorisation or preconditioner.
    fn solve_in_place(&mut self, b: &mut [f64]) -> Result<(), SolveError> {
        let n = self.pattern.n;
        match &mut self.backend {
            Backend::Direct {
                symbolic,
                l_values,
                smem,
                ..
            } => {
                let llt = faer::sparse::linalg::cholesky::LltRef::new(symbolic, l_values);
                let x = MatMut::from_column_major_slice_mut(b, n, 1);
                llt.solve_in_place_with_conj(Conj::No, x, Par::Seq, MemStack::new(smem));
            }
            Backend::Multigrid { mg, .. } => {
                let st = mg.solve(b, CG_RELATIVE_TOLERANCE, CG_MAX_ITERATIONS)?;
                self.cg_iterations += st.iterations;
            }
        }
        Ok(())
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
            let (f, d) = p.residual(psi, k, qf.phi_n[i], qf.phi_p[i]);
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
        if refactor || !self.factored {
            self.refresh()?;
        }
        let mut rhs = std::mem::take(&mut self.rhs);
        let solved = self.solve_in_place(&mut rhs);
        self.rhs = rhs;
        solved?;
        let pat = &self.pattern;
        let mut max_update: f64 = 0.0;
        for u in 0..pat.n {
            let d = self.rhs[u];
            let k = pat.node_of[u];
            if !d.is_finite() {
                let (x_nm, y_nm, z_nm) = p.coords_nm(k);
                return Err(SolveError::NonFinite {
                    node: k,
                    x_nm,
                    y_nm,
                    z_nm,
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

    /// The free nodes in unknown order (the order of the vectors of
    /// [`PoissonSolver::solve_linearised`]).
    pub fn unknown_nodes(&self) -> &[usize] {
        &self.pattern.node_of
    }

    /// Solves the linearised system J x = b, J = -dF/dpsi at `psi` with the
    /// quasi-Fermi levels `qf` (the Jacobian Newton uses, so its symbolic
    /// analysis is reused), `b` one value per unknown in the order of
    /// [`PoissonSolver::unknown_nodes`], overwritten by x. J is factorised at
    /// `psi` by one Newton step taken on a copy of `psi` and thrown away.
    pub fn solve_linearised(
        &mut self,
        p: &Problem,
        psi: &[f64],
        qf: &QuasiFermi,
        b: &mut [f64],
    ) -> Result<(), SolveError> {
        assert_eq!(b.len(), self.pattern.n, "one value per unknown");
        let mut scratch = psi.to_vec();
        self.step(p, &mut scratch, qf, f64::INFINITY, true)?;
        self.solve_in_place(b)
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
                    termination: Termination::Converged,
                    steps: step,
                    final_update_v: last.max_update_v,
                    final_residual_v: last.max_scaled_residual_v,
                });
            }
        }
        Ok(SolveReport {
            termination: Termination::StepLimit {
                update_tol_v: opts.update_tol_v,
                quasi_fermi_change_v: None,
            },
            steps: opts.max_steps,
            final_update_v: last.max_update_v,
            final_residual_v: last.max_scaled_residual_v,
        })
    }
}
