//! Geometric-multigrid-preconditioned conjugate gradients for the Newton
//! steps of large 3D problems, where a sparse Cholesky factorisation's fill
//! grows too fast (measured in `docs/fins-3d.md`).
//!
//! - **Hierarchy** (built once per mesh): vertex-based on the rectilinear
//!   tensor mesh. Each coarser grid drops every other line of an axis where
//!   the merged step is small against the level's typical step
//!   (semi-coarsening of the graded, anisotropic mesh); the first and last
//!   lines always stay.
//!   Interpolation P is trilinear on the graded lines. A coarse node is an
//!   unknown when the fine node it sits on is one; Dirichlet nodes (electrodes,
//!   contacts) are simply absent, so P has no row or column for them.
//! - **Coarse operators** are Galerkin products `P^T L P` of the fixed
//!   Laplacian part L of the Jacobian (the edge couplings and their diagonal),
//!   computed once. The carrier term (the positive diagonal that changes each
//!   Newton step) is lumped onto each coarse level as `P^T (c * P 1)` (row sums of
//!   `P^T diag(c) P`), so a Newton step only updates diagonals and refactorises
//!   the small coarsest level (faer sparse Cholesky).
//! - **Cycle**: a V-cycle with symmetric Gauss-Seidel (forward sweeps before
//!   the coarse correction, backward after), so the preconditioner is
//!   symmetric positive definite and CG applies (Hestenes and Stiefel,
//!   J. Res. NBS 49(6), 409, 1952; multigrid as a CG preconditioner, from memory: Tatebe,
//!   Copper Mountain Conference on Multigrid Methods, 1993).
//!
//! Tolerance: CG stops when the residual's 2-norm falls below
//! [`CG_RELATIVE_TOLERANCE`] times the right-hand side's; if it does not
//! within [`CG_MAX_ITERATIONS`], the step fails with
//! [`SolveError::LinearSolve`] and never yields a value.

use std::sync::Arc;

use faer::dyn_stack::{MemBuffer, MemStack};
use faer::linalg::cholesky::llt::factor::LltRegularization;
use faer::sparse::linalg::cholesky::{
    factorize_symbolic_cholesky, CholeskySymbolicParams, LltRef, SymbolicCholesky,
    SymmetricOrdering,
};
use faer::sparse::{SparseColMatRef, SymbolicSparseColMatRef};
use faer::{Conj, MatMut, Par, Side};

use super::SolveError;
use crate::discretize::{NodeKind, Problem};

/// CG stops at ||r|| <= this * ||b|| (2-norms). Chosen so that Newton's
/// steps and every extracted figure match the direct solver (test
/// `tests/solver3d.rs`; measured on the demo tri-gate: 1e-4 still gives the
/// same steps and figures to 1e-9 mV, 1e-3 one more equilibrium Newton step,
/// so 1e-5 keeps a decade of margin).
pub const CG_RELATIVE_TOLERANCE: f64 = 1e-5;
/// A CG that has not converged after this many iterations is a failed step.
pub const CG_MAX_ITERATIONS: usize = 300;
/// Coarsening stops when a level has at most this many unknowns (it is
/// then factorised directly).
const COARSEST_UNKNOWNS: usize = 4000;
/// An axis is coarsened where its merged interval is at most this multiple
/// of the lower quartile of the level's steps over all axes (measured on the
/// refined demo tri-gate: 2.5 to 4 give the same time within noise).
const SEMI_COARSENING_RATIO: f64 = 3.0;
/// Smoothing sweeps before and after each coarse correction.
const SWEEPS: usize = 1;

const NONE: u32 = u32::MAX;

/// Compressed sparse rows with `u32` column indices.
#[derive(Debug, Clone, Default)]
struct Csr {
    ptr: Vec<usize>,
    col: Vec<u32>,
    val: Vec<f64>,
}

impl Csr {
    fn rows(&self) -> usize {
        self.ptr.len() - 1
    }

    /// Transpose, with `cols` columns in `self`.
    fn transpose(&self, cols: usize) -> Csr {
        let mut count = vec![0usize; cols + 1];
        for &c in &self.col {
            count[c as usize + 1] += 1;
        }
        for i in 0..cols {
            count[i + 1] += count[i];
        }
        let mut next = count.clone();
        let mut col = vec![0u32; self.col.len()];
        let mut val = vec![0.0; self.val.len()];
        for r in 0..self.rows() {
            for e in self.ptr[r]..self.ptr[r + 1] {
                let c = self.col[e] as usize;
                col[next[c]] = r as u32;
                val[next[c]] = self.val[e];
                next[c] += 1;
            }
        }
        Csr {
            ptr: count,
            col,
            val,
        }
    }

    /// Product self * b (Gustavson), `cols` columns in `b`; columns sorted per row.
    fn mul(&self, b: &Csr, cols: usize) -> Csr {
        let mut mark = vec![usize::MAX; cols];
        let mut acc = vec![0.0; cols];
        let mut ptr = Vec::with_capacity(self.rows() + 1);
        let mut col: Vec<u32> = Vec::new();
        let mut val = Vec::new();
        let mut row: Vec<u32> = Vec::new();
        ptr.push(0);
        for r in 0..self.rows() {
            row.clear();
            for e in self.ptr[r]..self.ptr[r + 1] {
                let (k, a) = (self.col[e] as usize, self.val[e]);
                for f in b.ptr[k]..b.ptr[k + 1] {
                    let c = b.col[f] as usize;
                    if mark[c] != r {
                        mark[c] = r;
                        acc[c] = 0.0;
                        row.push(c as u32);
                    }
                    acc[c] += a * b.val[f];
                }
            }
            row.sort_unstable();
            for &c in &row {
                col.push(c);
                val.push(acc[c as usize]);
            }
            ptr.push(col.len());
        }
        Csr { ptr, col, val }
    }

    /// y = self * x.
    fn matvec(&self, x: &[f64], y: &mut [f64]) {
        for (r, yr) in y.iter_mut().enumerate() {
            let mut s = 0.0;
            for e in self.ptr[r]..self.ptr[r + 1] {
                s += self.val[e] * x[self.col[e] as usize];
            }
            *yr = s;
        }
    }
}

/// One level's grid: line positions and the unknown number of each node
/// (`NONE` for a Dirichlet node).
struct Grid {
    lines: [Vec<f64>; 3],
    unknown: Vec<u32>,
    n: usize,
}

impl Grid {
    fn dims(&self) -> [usize; 3] {
        [
            self.lines[0].len(),
            self.lines[1].len(),
            self.lines[2].len(),
        ]
    }
}

/// Which lines of one axis the coarser level keeps: every other line where
/// the merged interval is at most `limit`, never two drops in a row, the
/// first and last line always.
fn kept_lines(xs: &[f64], limit: f64) -> Vec<usize> {
    let n = xs.len();
    let mut keep = vec![0];
    let mut i = 1;
    while i < n {
        if i + 1 < n && *keep.last().unwrap_or(&0) == i - 1 && xs[i + 1] - xs[i - 1] <= limit {
            // drop line i, keep i + 1
            keep.push(i + 1);
            i += 2;
        } else {
            keep.push(i);
            i += 1;
        }
    }
    keep
}

/// 1D interpolation of fine line i from the kept lines: (coarse index, weight) pairs.
fn line_weights(xs: &[f64], kept: &[usize]) -> Vec<[(usize, f64); 2]> {
    let mut w = Vec::with_capacity(xs.len());
    let mut c = 0;
    for i in 0..xs.len() {
        while c + 1 < kept.len() && kept[c + 1] <= i {
            c += 1;
        }
        if kept[c] == i {
            w.push([(c, 1.0), (c, 0.0)]);
        } else {
            let (a, b) = (kept[c], kept[c + 1]);
            let t = (xs[i] - xs[a]) / (xs[b] - xs[a]);
            w.push([(c, 1.0 - t), (c + 1, t)]);
        }
    }
    w
}

/// The next coarser grid and the interpolation from it, or `None` when no
/// axis can be coarsened.
fn coarsen(g: &Grid) -> Option<(Grid, Csr)> {
    // The lower quartile of the level's steps over all axes: lines are
    // merged where they are fine against most of the mesh, so the graded
    // interface layers coarsen first (semi-coarsening against anisotropy)
    // and the bulk follows at the next levels.
    let mut steps: Vec<f64> = g
        .lines
        .iter()
        .flat_map(|l| l.windows(2).map(|w| w[1] - w[0]))
        .collect();
    if steps.is_empty() {
        return None;
    }
    steps.sort_by(f64::total_cmp);
    let limit = SEMI_COARSENING_RATIO * steps[steps.len() / 4];
    let kept: Vec<Vec<usize>> = g.lines.iter().map(|l| kept_lines(l, limit)).collect();
    if kept.iter().zip(&g.lines).all(|(k, l)| k.len() == l.len()) {
        return None;
    }
    let [nx, ny, _] = g.dims();
    let cd = [kept[0].len(), kept[1].len(), kept[2].len()];
    let mut unknown = vec![NONE; cd[0] * cd[1] * cd[2]];
    let mut n = 0;
    for (kk, &k) in kept[2].iter().enumerate() {
        for (jj, &j) in kept[1].iter().enumerate() {
            for (ii, &i) in kept[0].iter().enumerate() {
                if g.unknown[i + nx * (j + ny * k)] != NONE {
                    unknown[ii + cd[0] * (jj + cd[1] * kk)] = n;
                    n += 1;
                }
            }
        }
    }
    let w: Vec<Vec<[(usize, f64); 2]>> = (0..3)
        .map(|a| line_weights(&g.lines[a], &kept[a]))
        .collect();
    let mut p = Csr {
        ptr: vec![0],
        ..Default::default()
    };
    let mut row: Vec<(u32, f64)> = Vec::with_capacity(8);
    for (node, &u) in g.unknown.iter().enumerate() {
        if u == NONE {
            continue;
        }
        let (i, j, k) = (node % nx, (node / nx) % ny, node / (nx * ny));
        row.clear();
        for &(ck, wk) in &w[2][k] {
            for &(cj, wj) in &w[1][j] {
                for &(ci, wi) in &w[0][i] {
                    let wt = wi * wj * wk;
                    if wt == 0.0 {
                        continue;
                    }
                    let cu = unknown[ci + cd[0] * (cj + cd[1] * ck)];
                    if cu != NONE {
                        row.push((cu, wt));
                    }
                }
            }
        }
        row.sort_unstable_by_key(|e| e.0);
        for &(c, v) in &row {
            p.col.push(c);
            p.val.push(v);
        }
        p.ptr.push(p.col.len());
    }
    let lines = [0, 1, 2].map(|a| kept[a].iter().map(|&i| g.lines[a][i]).collect());
    Some((
        Grid {
            lines,
            unknown,
            n: n as usize,
        },
        p,
    ))
}

/// One level's fixed operators.
struct Level {
    /// Off-diagonal part of the Laplacian operator (the Jacobian without its diagonal).
    off: Csr,
    /// Diagonal of the Laplacian part.
    lap_diag: Vec<f64>,
    /// Interpolation from the next coarser level (absent on the coarsest).
    p: Option<Csr>,
    /// Its transpose (restriction).
    pt: Option<Csr>,
    /// Row sums of `p` (lumping of the carrier term).
    p_rowsum: Vec<f64>,
}

/// The mesh's hierarchy, shared by clones of a solver.
struct Hierarchy {
    levels: Vec<Level>,
    /// Coarsest level's full symmetric CSC pattern and the position of each diagonal entry.
    coarse_ptr: Vec<usize>,
    coarse_idx: Vec<usize>,
    coarse_diag_pos: Vec<usize>,
    coarse_symbolic: SymbolicCholesky<usize>,
}

/// Splits a full operator into its off-diagonal part and diagonal.
fn split(a: &Csr) -> (Csr, Vec<f64>) {
    let mut off = Csr {
        ptr: vec![0],
        ..Default::default()
    };
    let mut diag = vec![0.0; a.rows()];
    for (r, d) in diag.iter_mut().enumerate() {
        for e in a.ptr[r]..a.ptr[r + 1] {
            if a.col[e] as usize == r {
                *d += a.val[e];
            } else {
                off.col.push(a.col[e]);
                off.val.push(a.val[e]);
            }
        }
        off.ptr.push(off.col.len());
    }
    (off, diag)
}

impl Hierarchy {
    fn new(p: &Problem, node_of: &[usize]) -> Result<Self, SolveError> {
        let mut unknown = vec![NONE; p.node_count()];
        for (u, &k) in node_of.iter().enumerate() {
            unknown[k] = u as u32;
        }
        // Fine Laplacian: edge couplings between unknowns, diagonal = sum of all couplings.
        let mut a = Csr {
            ptr: vec![0],
            ..Default::default()
        };
        for (u, &k) in node_of.iter().enumerate() {
            let mut sum_c = 0.0;
            let mut row: Vec<(u32, f64)> = Vec::with_capacity(7);
            for (m, c) in p.neighbours(k).into_iter().flatten() {
                sum_c += c;
                if unknown[m] != NONE {
                    row.push((unknown[m], -c));
                }
            }
            row.push((u as u32, sum_c));
            row.sort_unstable_by_key(|e| e.0);
            for (c, v) in row {
                a.col.push(c);
                a.val.push(v);
            }
            a.ptr.push(a.col.len());
        }
        let mut grid = Grid {
            lines: [p.x.nodes.clone(), p.y.nodes.clone(), p.z.nodes.clone()],
            unknown,
            n: node_of.len(),
        };
        let mut levels = Vec::new();
        loop {
            let (off, lap_diag) = split(&a);
            let next = if grid.n > COARSEST_UNKNOWNS {
                coarsen(&grid)
            } else {
                None
            };
            match next {
                Some((coarse, pm)) if coarse.n < grid.n => {
                    let pt = pm.transpose(coarse.n);
                    let ac = pt.mul(&a.mul(&pm, coarse.n), coarse.n);
                    let p_rowsum = (0..pm.rows())
                        .map(|r| pm.val[pm.ptr[r]..pm.ptr[r + 1]].iter().sum())
                        .collect();
                    levels.push(Level {
                        off,
                        lap_diag,
                        p: Some(pm),
                        pt: Some(pt),
                        p_rowsum,
                    });
                    a = ac;
                    grid = coarse;
                }
                _ => {
                    levels.push(Level {
                        off,
                        lap_diag,
                        p: None,
                        pt: None,
                        p_rowsum: Vec::new(),
                    });
                    break;
                }
            }
        }
        // Coarsest: full symmetric CSC (= CSR of a symmetric matrix), rows sorted.
        let n = a.rows();
        let coarse_ptr = a.ptr.clone();
        let coarse_idx: Vec<usize> = a.col.iter().map(|&c| c as usize).collect();
        let coarse_diag_pos = (0..n)
            .map(|r| {
                (a.ptr[r]..a.ptr[r + 1])
                    .find(|&e| a.col[e] as usize == r)
                    .ok_or_else(|| {
                        SolveError::Symbolic(format!(
                            "multigrid: coarsest unknown {r} has no diagonal entry"
                        ))
                    })
            })
            .collect::<Result<Vec<_>, _>>()?;
        let sym = SymbolicSparseColMatRef::new_checked(n, n, &coarse_ptr, None, &coarse_idx);
        let coarse_symbolic = factorize_symbolic_cholesky(
            sym,
            Side::Lower,
            SymmetricOrdering::Amd,
            CholeskySymbolicParams::default(),
        )
        .map_err(|e| SolveError::Symbolic(format!("multigrid coarsest level: {e:?}")))?;
        Ok(Hierarchy {
            levels,
            coarse_ptr,
            coarse_idx,
            coarse_diag_pos,
            coarse_symbolic,
        })
    }
}

/// Work vectors of one level.
#[derive(Clone)]
struct Work {
    diag: Vec<f64>,
    carrier: Vec<f64>,
    x: Vec<f64>,
    b: Vec<f64>,
    r: Vec<f64>,
}

/// What one preconditioned CG solve did.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct CgStats {
    pub iterations: usize,
    /// Final ||r|| / ||b||.
    pub relative_residual: f64,
}

/// A multigrid-preconditioned CG solver for one mesh's Jacobian. The
/// hierarchy is shared by clones; diagonals and workspace are per clone.
pub struct Multigrid {
    h: Arc<Hierarchy>,
    work: Vec<Work>,
    coarse_values: Vec<f64>,
    l_values: Vec<f64>,
    fmem: MemBuffer,
    smem: MemBuffer,
    /// CG vectors (fine level): residual, preconditioned residual, direction, A * direction.
    cg: [Vec<f64>; 4],
}

impl Clone for Multigrid {
    fn clone(&self) -> Self {
        Multigrid::with_hierarchy(self.h.clone())
    }
}

impl Multigrid {
    /// Builds the hierarchy of problem `p` whose unknowns are the nodes `node_of`.
    pub fn new(p: &Problem, node_of: &[usize]) -> Result<Self, SolveError> {
        debug_assert!(node_of.iter().all(|&k| p.nodes[k] == NodeKind::Free));
        Ok(Self::with_hierarchy(Arc::new(Hierarchy::new(p, node_of)?)))
    }

    fn with_hierarchy(h: Arc<Hierarchy>) -> Self {
        let work = h
            .levels
            .iter()
            .map(|l| {
                let n = l.lap_diag.len();
                Work {
                    diag: l.lap_diag.clone(),
                    carrier: vec![0.0; n],
                    x: vec![0.0; n],
                    b: vec![0.0; n],
                    r: vec![0.0; n],
                }
            })
            .collect();
        let par = Par::Seq;
        let s = &h.coarse_symbolic;
        let n0 = h.levels[0].lap_diag.len();
        Multigrid {
            work,
            coarse_values: vec![0.0; h.coarse_idx.len()],
            l_values: vec![0.0; s.len_val()],
            fmem: MemBuffer::new(s.factorize_numeric_llt_scratch::<f64>(par, Default::default())),
            smem: MemBuffer::new(s.solve_in_place_scratch::<f64>(1, par)),
            cg: std::array::from_fn(|_| vec![0.0; n0]),
            h,
        }
    }

    /// Number of levels (the finest included).
    pub fn levels(&self) -> usize {
        self.h.levels.len()
    }

    /// Unknowns per level, finest first.
    pub fn level_unknowns(&self) -> Vec<usize> {
        self.h.levels.iter().map(|l| l.lap_diag.len()).collect()
    }

    /// Sets the fine operator's diagonal (the Jacobian diagonal, one value
    /// per unknown) and updates every level: the carrier part (diagonal minus
    /// the Laplacian's) is lumped down, the coarsest level refactorised.
    pub fn set_diagonal(&mut self, d: &[f64]) -> Result<(), SolveError> {
        let h = &self.h;
        let nl = h.levels.len();
        self.work[0].diag.copy_from_slice(d);
        for (c, (&dd, &l)) in self.work[0]
            .carrier
            .iter_mut()
            .zip(d.iter().zip(&h.levels[0].lap_diag))
        {
            *c = (dd - l).max(0.0);
        }
        for l in 0..nl - 1 {
            let lev = &h.levels[l];
            let (fine, coarse) = self.work.split_at_mut(l + 1);
            let fine = &mut fine[l];
            let coarse = &mut coarse[0];
            // weighted carrier on the fine level, then restricted
            for (r, (c, &s)) in fine
                .r
                .iter_mut()
                .zip(fine.carrier.iter().zip(&lev.p_rowsum))
            {
                *r = c * s;
            }
            if let Some(pt) = &lev.pt {
                pt.matvec(&fine.r, &mut coarse.carrier);
            }
            for ((d, &c), &l) in coarse
                .diag
                .iter_mut()
                .zip(&coarse.carrier)
                .zip(&h.levels[l + 1].lap_diag)
            {
                *d = l + c;
            }
        }
        // Coarsest: assemble and refactorise.
        let last = &h.levels[nl - 1];
        let w = &self.work[nl - 1];
        for r in 0..w.diag.len() {
            let mut e_off = last.off.ptr[r];
            for e in h.coarse_ptr[r]..h.coarse_ptr[r + 1] {
                if e == h.coarse_diag_pos[r] {
                    self.coarse_values[e] = w.diag[r];
                } else {
                    self.coarse_values[e] = last.off.val[e_off];
                    e_off += 1;
                }
            }
        }
        let n = w.diag.len();
        let a = SparseColMatRef::new(
            SymbolicSparseColMatRef::new_checked(n, n, &h.coarse_ptr, None, &h.coarse_idx),
            &self.coarse_values,
        );
        h.coarse_symbolic
            .factorize_numeric_llt::<f64>(
                &mut self.l_values,
                a,
                Side::Lower,
                LltRegularization::default(),
                Par::Seq,
                MemStack::new(&mut self.fmem),
                Default::default(),
            )
            .map_err(|e| SolveError::Factorisation(format!("multigrid coarsest level: {e:?}")))?;
        Ok(())
    }

    /// One Gauss-Seidel sweep on level `l` (forward or backward) for
    /// `A x = b` with the current diagonal.
    fn sweep(&mut self, l: usize, forward: bool) {
        let off = &self.h.levels[l].off;
        let w = &mut self.work[l];
        let n = w.diag.len();
        let mut relax = |r: usize| {
            let mut s = w.b[r];
            for e in off.ptr[r]..off.ptr[r + 1] {
                s -= off.val[e] * w.x[off.col[e] as usize];
            }
            w.x[r] = s / w.diag[r];
        };
        if forward {
            (0..n).for_each(&mut relax);
        } else {
            (0..n).rev().for_each(&mut relax);
        }
    }

    /// r = b - A x on level l.
    fn residual(&mut self, l: usize) {
        let off = &self.h.levels[l].off;
        let w = &mut self.work[l];
        off.matvec(&w.x, &mut w.r);
        for i in 0..w.r.len() {
            w.r[i] = w.b[i] - w.r[i] - w.diag[i] * w.x[i];
        }
    }

    /// The V-cycle from level `l` down: x = M^-1 b with x starting at zero.
    fn vcycle(&mut self, l: usize) {
        let nl = self.h.levels.len();
        if l + 1 == nl {
            let w = &mut self.work[l];
            w.x.copy_from_slice(&w.b);
            let n = w.x.len();
            let llt = LltRef::new(&self.h.coarse_symbolic, &self.l_values);
            llt.solve_in_place_with_conj(
                Conj::No,
                MatMut::from_column_major_slice_mut(&mut w.x, n, 1),
                Par::Seq,
                MemStack::new(&mut self.smem),
            );
            return;
        }
        self.work[l].x.fill(0.0);
        for _ in 0..SWEEPS {
            self.sweep(l, true);
        }
        self.residual(l);
        let h = self.h.clone();
        let lev = &h.levels[l];
        {
            let (fine, coarse) = self.work.split_at_mut(l + 1);
            if let Some(pt) = &lev.pt {
                pt.matvec(&fine[l].r, &mut coarse[0].b);
            }
        }
        self.vcycle(l + 1);
        {
            let (fine, coarse) = self.work.split_at_mut(l + 1);
            if let Some(p) = &lev.p {
                // x += P x_coarse
                let (f, c) = (&mut fine[l], &coarse[0]);
                for r in 0..p.rows() {
                    let mut s = 0.0;
                    for e in p.ptr[r]..p.ptr[r + 1] {
                        s += p.val[e] * c.x[p.col[e] as usize];
                    }
                    f.x[r] += s;
                }
            }
        }
        for _ in 0..SWEEPS {
            self.sweep(l, false);
        }
    }

    /// y = A x on the fine level with the current diagonal.
    fn apply(&self, x: &[f64], y: &mut [f64]) {
        self.h.levels[0].off.matvec(x, y);
        for ((yi, &xi), &d) in y.iter_mut().zip(x).zip(&self.work[0].diag) {
            *yi += d * xi;
        }
    }

    /// Solves A x = b (A with the diagonal last given to
    /// [`Multigrid::set_diagonal`]) by preconditioned CG from x = 0; `b` is
    /// overwritten by x. Fails with [`SolveError::LinearSolve`] when the
    /// relative residual does not reach `rtol` in `max_iter` iterations.
    pub fn solve(
        &mut self,
        b: &mut [f64],
        rtol: f64,
        max_iter: usize,
    ) -> Result<CgStats, SolveError> {
        let n = b.len();
        let [mut r, mut z, mut d, mut q] = std::mem::take(&mut self.cg);
        r.copy_from_slice(b);
        let x = b;
        x.fill(0.0);
        let norm_b = dot(&r, &r).sqrt();
        let result = if norm_b == 0.0 {
            Ok(CgStats {
                iterations: 0,
                relative_residual: 0.0,
            })
        } else {
            let mut out = None;
            let mut rel = 1.0;
            self.precondition(&r, &mut z);
            d.copy_from_slice(&z);
            let mut rz = dot(&r, &z);
            for it in 1..=max_iter {
                self.apply(&d, &mut q);
                let dq = dot(&d, &q);
                if dq.is_nan() || dq <= 0.0 || !rz.is_finite() {
                    break;
                }
                let alpha = rz / dq;
                for i in 0..n {
                    x[i] += alpha * d[i];
                    r[i] -= alpha * q[i];
                }
                rel = dot(&r, &r).sqrt() / norm_b;
                if rel <= rtol {
                    out = Some(CgStats {
                        iterations: it,
                        relative_residual: rel,
                    });
                    break;
                }
                self.precondition(&r, &mut z);
                let rz_new = dot(&r, &z);
                let beta = rz_new / rz;
                rz = rz_new;
                for i in 0..n {
                    d[i] = z[i] + beta * d[i];
                }
            }
            out.ok_or(SolveError::LinearSolve {
                iterations: max_iter,
                relative_residual: rel,
                tolerance: rtol,
            })
        };
        self.cg = [r, z, d, q];
        result
    }

    /// z = M^-1 r (one V-cycle).
    fn precondition(&mut self, r: &[f64], z: &mut [f64]) {
        self.work[0].b.copy_from_slice(r);
        self.vcycle(0);
        z.copy_from_slice(&self.work[0].x);
    }
}

fn dot(a: &[f64], b: &[f64]) -> f64 {
    a.iter().zip(b).map(|(x, y)| x * y).sum()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn kept_lines_drop_every_other_fine_line_only() {
        let xs = [0.0, 0.5, 1.0, 1.5, 2.0, 4.0, 6.0, 8.0];
        // limit 1.0: lines 1 and 3 go (merged intervals 1.0), the 2 nm steps stay.
        assert_eq!(kept_lines(&xs, 1.0), vec![0, 2, 4, 5, 6, 7]);
        // everything fine: every other line, last kept.
        assert_eq!(kept_lines(&xs, 100.0), vec![0, 2, 4, 6, 7]);
    }

    #[test]
    fn line_weights_are_linear_on_a_graded_line() {
        let xs = [0.0, 1.0, 4.0];
        let w = line_weights(&xs, &[0, 2]);
        assert_eq!(w[1], [(0, 0.75), (1, 0.25)]);
        assert_eq!(w[2][0], (1, 1.0));
    }

    #[test]
    fn galerkin_product_of_a_1d_laplacian_is_the_coarse_laplacian() {
        // 1D Laplacian tridiag(-1, 2, -1) on 7 interior unknowns, linear
        // interpolation from the 3 odd ones: P^T A P = tridiag(-1, 2, -1) / 2
        // (common practice: Briggs, Henson and McCormick, A Multigrid Tutorial, 2000).
        let n: usize = 7;
        let mut a = Csr {
            ptr: vec![0],
            ..Default::default()
        };
        for r in 0..n {
            for c in r.saturating_sub(1)..(r + 2).min(n) {
                a.col.push(c as u32);
                a.val.push(if c == r { 2.0 } else { -1.0 });
            }
            a.ptr.push(a.col.len());
        }
        let mut p = Csr {
            ptr: vec![0],
            ..Default::default()
        };
        for r in 0..n {
            if r % 2 == 1 {
                p.col.push((r / 2) as u32);
                p.val.push(1.0);
            } else {
                if r > 0 {
                    p.col.push((r / 2 - 1) as u32);
                    p.val.push(0.5);
                }
                if r / 2 < 3 {
                    p.col.push((r / 2) as u32);
                    p.val.push(0.5);
                }
            }
            p.ptr.push(p.col.len());
        }
        let ac = p.transpose(3).mul(&a.mul(&p, 3), 3);
        assert_eq!(ac.ptr, vec![0, 2, 5, 7]);
        assert_eq!(ac.val, vec![1.0, -0.5, -0.5, 1.0, -0.5, -0.5, 1.0]);
    }
}
