//! Lowest eigenpairs of a symmetric pencil `A u = mu M u` with `A` sparse
//! symmetric positive definite and `M` diagonal positive (the lumped,
//! eps-weighted box measure of the box-integration discretisation).
//!
//! Method: subspace (block inverse) iteration with Rayleigh-Ritz. One sparse
//! Cholesky factorisation of `A` (faer, AMD ordering, done once) serves every
//! iteration; each iteration solves `A Y = M X` for the whole block, makes `Y`
//! M-orthonormal (modified Gram-Schmidt, twice), and diagonalises the small
//! projected matrix `Q^T A Q` with cyclic Jacobi rotations. Mode `i`
//! converges at the rate `mu_i / mu_{p+1}` per iteration (p = block size),
//! which is why the block carries guard vectors beyond the modes wanted.
//!
//! Convergence is declared on the relative residual
//! `||A x - theta M x||_{M^-1} / theta` of every wanted Ritz pair (x
//! M-normalised), or on its rounding floor `64 eps max_i(A_ii/M_i) / theta`
//! when that is larger (badly scaled pencils, e.g. very low-permittivity
//! layers on fine meshes); the eigenvalue error is then of the order of the
//! square of that residual. A run that does not reach the tolerance is an error, never a
//! value. Everything runs sequentially and from a fixed pseudo-random start,
//! so results do not depend on the thread count.

use faer::dyn_stack::{MemBuffer, MemStack};
use faer::linalg::cholesky::llt::factor::LltRegularization;
use faer::sparse::linalg::cholesky::{
    factorize_symbolic_cholesky, CholeskySymbolicParams, SymmetricOrdering,
};
use faer::sparse::{SparseColMatRef, SymbolicSparseColMatRef};
use faer::{Conj, MatMut, Par, Side};

/// Why an eigen solve failed.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum EigenError {
    #[error("the eigenproblem has no unknowns")]
    Empty,
    #[error("mass entry of unknown {index} is {value} (must be finite and > 0)")]
    BadMass { index: usize, value: f64 },
    #[error("coupling {index} is {value} (must be finite and >= 0)")]
    BadCoupling { index: usize, value: f64 },
    #[error("symbolic analysis of the stiffness matrix failed: {0}")]
    Symbolic(String),
    #[error(
        "the stiffness matrix is not positive definite ({0}); a region with no Dirichlet \
         (gate or grounded) boundary has an infinite natural length"
    )]
    Factorisation(String),
    #[error(
        "subspace iteration did not converge in {iterations} iterations: worst relative \
         residual {residual:.3e} (tolerance {tolerance:.1e})"
    )]
    NotConverged {
        iterations: usize,
        residual: f64,
        tolerance: f64,
    },
}

/// A symmetric pencil: `A` in compressed sparse columns with the full
/// symmetric pattern (rows sorted in each column), `M` diagonal.
///
/// Invariants: `A` is symmetric with non-positive off-diagonals and
/// non-negative row sums (a box-integration stiffness matrix with Dirichlet
/// neighbours eliminated); `mass[i] > 0`.
#[derive(Debug, Clone)]
pub struct Pencil {
    pub n: usize,
    col_ptr: Vec<usize>,
    row_idx: Vec<usize>,
    values: Vec<f64>,
    /// Diagonal of M.
    pub mass: Vec<f64>,
}

/// One coupling of the stiffness matrix: unknowns `a` and `b` (or `a` and a
/// Dirichlet node, `b == None`) joined with coefficient `c >= 0`; it adds
/// `c (u_a - u_b)^2` to the energy.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Coupling {
    pub a: usize,
    pub b: Option<usize>,
    pub c: f64,
}

impl Pencil {
    /// Assembles the pencil from couplings and the mass diagonal.
    pub fn from_couplings(mass: Vec<f64>, couplings: &[Coupling]) -> Result<Pencil, EigenError> {
        let n = mass.len();
        if n == 0 {
            return Err(EigenError::Empty);
        }
        for (index, &value) in mass.iter().enumerate() {
            if !(value.is_finite() && value > 0.0) {
                return Err(EigenError::BadMass { index, value });
            }
        }
        let mut diag = vec![0.0; n];
        let mut cols: Vec<Vec<(usize, f64)>> = vec![Vec::with_capacity(4); n];
        for (index, cp) in couplings.iter().enumerate() {
            if !(cp.c.is_finite() && cp.c >= 0.0) {
                return Err(EigenError::BadCoupling { index, value: cp.c });
            }
            if cp.c == 0.0 {
                continue;
            }
            diag[cp.a] += cp.c;
            if let Some(b) = cp.b {
                diag[b] += cp.c;
                cols[cp.a].push((b, -cp.c));
                cols[b].push((cp.a, -cp.c));
            }
        }
        let mut col_ptr = Vec::with_capacity(n + 1);
        let mut row_idx = Vec::new();
        let mut values = Vec::new();
        col_ptr.push(0);
        for (j, col) in cols.iter_mut().enumerate() {
            col.push((j, diag[j]));
            col.sort_by_key(|e| e.0);
            // Merge duplicates (two couplings between the same pair).
            let mut last = usize::MAX;
            for &(r, v) in col.iter() {
                if r == last {
                    *values.last_mut().expect("a previous entry exists") += v;
                } else {
                    row_idx.push(r);
                    values.push(v);
                    last = r;
                }
            }
            col_ptr.push(row_idx.len());
        }
        Ok(Pencil {
            n,
            col_ptr,
            row_idx,
            values,
            mass,
        })
    }

    /// `y = A x`.
    pub fn apply(&self, x: &[f64], y: &mut [f64]) {
        for (j, yj) in y.iter_mut().enumerate() {
            let mut s = 0.0;
            for p in self.col_ptr[j]..self.col_ptr[j + 1] {
                s += self.values[p] * x[self.row_idx[p]];
            }
            *yj = s; // symmetric: row j of A equals column j
        }
    }
}

/// Settings of [`lowest_modes`].
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct EigenOptions {
    /// Number of lowest modes wanted.
    pub modes: usize,
    /// Extra vectors carried in the block to speed convergence.
    pub guard: usize,
    /// Relative residual below which a Ritz pair counts as converged.
    pub tolerance: f64,
    pub max_iterations: usize,
}

impl EigenOptions {
    /// `modes` wanted, guard max(4, modes/2), tolerance 1e-9, 2000 iterations at most.
    pub fn lowest(modes: usize) -> Self {
        EigenOptions {
            modes,
            guard: (modes / 2).max(4),
            tolerance: 1e-9,
            max_iterations: 2000,
        }
    }
}

/// The lowest eigenpairs, ascending.
#[derive(Debug, Clone, PartialEq)]
pub struct Eigenpairs {
    /// Eigenvalues mu = k^2 (units of A/M; nm^-2 for the natural-length problems).
    pub values: Vec<f64>,
    /// Eigenvectors, M-orthonormal (sum_i M_i u_i^2 = 1).
    pub vectors: Vec<Vec<f64>>,
    /// Final relative residuals of the returned pairs.
    pub residuals: Vec<f64>,
    pub iterations: usize,
}

fn m_dot(m: &[f64], a: &[f64], b: &[f64]) -> f64 {
    m.iter().zip(a).zip(b).map(|((w, x), y)| w * x * y).sum()
}

/// M-orthonormalises the columns of `y` (column-major, n x p) in place by
/// modified Gram-Schmidt, twice. A column that collapses is replaced by a
/// fresh pseudo-random vector and orthogonalised again.
fn m_orthonormalise(m: &[f64], y: &mut [f64], n: usize, p: usize, rng: &mut u64) {
    for j in 0..p {
        for attempt in 0..3 {
            let norm0 = m_dot(m, &y[j * n..(j + 1) * n], &y[j * n..(j + 1) * n]).sqrt();
            for _pass in 0..2 {
                for i in 0..j {
                    let (head, tail) = y.split_at_mut(j * n);
                    let qi = &head[i * n..(i + 1) * n];
                    let yj = &mut tail[..n];
                    let r = m_dot(m, qi, yj);
                    for (a, b) in yj.iter_mut().zip(qi) {
                        *a -= r * b;
                    }
                }
            }
            let yj = &mut y[j * n..(j + 1) * n];
            let norm = m_dot(m, yj, yj).sqrt();
            if norm > 1e-10 * norm0 && norm.is_finite() && norm > 0.0 {
                for a in yj.iter_mut() {
                    *a /= norm;
                }
                break;
            }
            assert!(
                attempt < 2,
                "Gram-Schmidt cannot find an independent direction"
            );
            for a in yj.iter_mut() {
                *a = next_random(rng);
            }
        }
    }
}

/// xorshift64*: deterministic start vectors in [-0.5, 0.5).
fn next_random(state: &mut u64) -> f64 {
    let mut x = *state;
    x ^= x >> 12;
    x ^= x << 25;
    x ^= x >> 27;
    *state = x;
    (x.wrapping_mul(0x2545_F491_4F6C_DD1D) >> 11) as f64 / (1u64 << 53) as f64 - 0.5
}

/// Eigen-decomposition of a small symmetric matrix (row-major p x p) by cyclic
/// Jacobi rotations: returns ascending eigenvalues and the matching
/// eigenvectors as columns of a row-major p x p matrix.
pub fn symmetric_eigen_small(h: &[f64], p: usize) -> (Vec<f64>, Vec<f64>) {
    let mut a = h.to_vec();
    let mut v = vec![0.0; p * p];
    for i in 0..p {
        v[i * p + i] = 1.0;
    }
    let frob: f64 = a.iter().map(|x| x * x).sum::<f64>().sqrt();
    for _sweep in 0..100 {
        let off: f64 = (0..p)
            .flat_map(|i| (0..p).filter(move |&j| j != i).map(move |j| (i, j)))
            .map(|(i, j)| a[i * p + j] * a[i * p + j])
            .sum::<f64>()
            .sqrt();
        if off <= 1e-15 * frob || frob == 0.0 {
            break;
        }
        for i in 0..p {
            for j in i + 1..p {
                let aij = a[i * p + j];
                if aij.abs() <= 1e-300 {
                    continue;
                }
                let theta = (a[j * p + j] - a[i * p + i]) / (2.0 * aij);
                let t = theta.signum() / (theta.abs() + (theta * theta + 1.0).sqrt());
                let t = if theta == 0.0 { 1.0 } else { t };
                let c = 1.0 / (t * t + 1.0).sqrt();
                let s = t * c;
                for k in 0..p {
                    let aki = a[k * p + i];
                    let akj = a[k * p + j];
                    a[k * p + i] = c * aki - s * akj;
                    a[k * p + j] = s * aki + c * akj;
                }
                for k in 0..p {
                    let aik = a[i * p + k];
                    let ajk = a[j * p + k];
                    a[i * p + k] = c * aik - s * ajk;
                    a[j * p + k] = s * aik + c * ajk;
                }
                for k in 0..p {
                    let vki = v[k * p + i];
                    let vkj = v[k * p + j];
                    v[k * p + i] = c * vki - s * vkj;
                    v[k * p + j] = s * vki + c * vkj;
                }
            }
        }
    }
    let mut order: Vec<usize> = (0..p).collect();
    order.sort_by(|&x, &y| a[x * p + x].total_cmp(&a[y * p + y]));
    let values = order.iter().map(|&i| a[i * p + i]).collect();
    let mut vecs = vec![0.0; p * p];
    for (new, &old) in order.iter().enumerate() {
        for k in 0..p {
            vecs[k * p + new] = v[k * p + old];
        }
    }
    (values, vecs)
}

/// The `opts.modes` lowest eigenpairs of `A u = mu M u` (see the module docs).
pub fn lowest_modes(pencil: &Pencil, opts: &EigenOptions) -> Result<Eigenpairs, EigenError> {
    let n = pencil.n;
    let nev = opts.modes.clamp(1, n);
    let p = (nev + opts.guard).min(n);
    let par = Par::Seq;
    let sym = SymbolicSparseColMatRef::new_checked(n, n, &pencil.col_ptr, None, &pencil.row_idx);
    let symbolic = factorize_symbolic_cholesky(
        sym,
        Side::Lower,
        SymmetricOrdering::Amd,
        CholeskySymbolicParams::default(),
    )
    .map_err(|e| EigenError::Symbolic(format!("{e:?}")))?;
    let mut l_values = vec![0.0; symbolic.len_val()];
    let mut fmem =
        MemBuffer::new(symbolic.factorize_numeric_llt_scratch::<f64>(par, Default::default()));
    let mut smem = MemBuffer::new(symbolic.solve_in_place_scratch::<f64>(p, par));
    let a = SparseColMatRef::new(sym, &pencil.values);
    let llt = symbolic
        .factorize_numeric_llt::<f64>(
            &mut l_values,
            a,
            Side::Lower,
            LltRegularization::default(),
            par,
            MemStack::new(&mut fmem),
            Default::default(),
        )
        .map_err(|e| EigenError::Factorisation(format!("{e:?}")))?;

    let m = &pencil.mass;
    // Scale of A relative to M (a Gershgorin-type bound on the largest eigenvalue / 2).
    let a_scale = (0..n)
        .map(|j| {
            let d = (pencil.col_ptr[j]..pencil.col_ptr[j + 1])
                .find(|&q| pencil.row_idx[q] == j)
                .map_or(0.0, |q| pencil.values[q]);
            d / m[j]
        })
        .fold(0.0, f64::max);
    let mut rng: u64 = 0x9E37_79B9_7F4A_7C15;
    let mut x = vec![0.0; n * p];
    for v in x.iter_mut() {
        *v = next_random(&mut rng);
    }
    m_orthonormalise(m, &mut x, n, p, &mut rng);
    let mut ax = vec![0.0; n * p];
    let mut worst = f64::INFINITY;
    for it in 1..=opts.max_iterations {
        // Y = A^-1 M X, in place.
        for j in 0..p {
            for i in 0..n {
                x[j * n + i] *= m[i];
            }
        }
        llt.solve_in_place_with_conj(
            Conj::No,
            MatMut::from_column_major_slice_mut(&mut x, n, p),
            par,
            MemStack::new(&mut smem),
        );
        if let Some(bad) = x.iter().position(|v| !v.is_finite()) {
            return Err(EigenError::Factorisation(format!(
                "non-finite solution at unknown {}",
                bad % n
            )));
        }
        m_orthonormalise(m, &mut x, n, p, &mut rng);
        // Rayleigh-Ritz: H = Q^T A Q.
        for j in 0..p {
            let (q, aq) = (&x[j * n..(j + 1) * n], &mut ax[j * n..(j + 1) * n]);
            pencil.apply(q, aq);
        }
        let mut h = vec![0.0; p * p];
        for i in 0..p {
            for j in i..p {
                let v: f64 = x[i * n..(i + 1) * n]
                    .iter()
                    .zip(&ax[j * n..(j + 1) * n])
                    .map(|(a, b)| a * b)
                    .sum();
                h[i * p + j] = v;
                h[j * p + i] = v;
            }
        }
        let (theta, s) = symmetric_eigen_small(&h, p);
        // X = Q S, AX = (AQ) S.
        let mut xn = vec![0.0; n * p];
        let mut axn = vec![0.0; n * p];
        for j in 0..p {
            for k in 0..p {
                let w = s[k * p + j];
                if w == 0.0 {
                    continue;
                }
                for i in 0..n {
                    xn[j * n + i] += w * x[k * n + i];
                    axn[j * n + i] += w * ax[k * n + i];
                }
            }
        }
        x = xn;
        ax = axn;
        let residual = |j: usize| -> f64 {
            let mut r2 = 0.0;
            for i in 0..n {
                let r = ax[j * n + i] - theta[j] * m[i] * x[j * n + i];
                r2 += r * r / m[i];
            }
            r2.sqrt() / theta[j].abs().max(f64::MIN_POSITIVE)
        };
        let res: Vec<f64> = (0..nev).map(residual).collect();
        // Rounding floor of the residual: A x is formed with relative error of
        // about machine epsilon per entry, so ||r||_{M^-1} cannot go below
        // ~eps * max_i(A_ii / M_i); accept that floor (relative to theta).
        let floor =
            |j: usize| 64.0 * f64::EPSILON * a_scale / theta[j].abs().max(f64::MIN_POSITIVE);
        worst = res.iter().copied().fold(0.0, f64::max);
        if (0..nev).all(|j| res[j] < opts.tolerance.max(floor(j))) {
            return Ok(Eigenpairs {
                values: theta[..nev].to_vec(),
                vectors: (0..nev).map(|j| x[j * n..(j + 1) * n].to_vec()).collect(),
                residuals: res,
                iterations: it,
            });
        }
    }
    Err(EigenError::NotConverged {
        iterations: opts.max_iterations,
        residual: worst,
        tolerance: opts.tolerance,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn jacobi_diagonalises_a_small_matrix() {
        // [[2,1],[1,2]] has eigenvalues 1 and 3.
        let (v, s) = symmetric_eigen_small(&[2.0, 1.0, 1.0, 2.0], 2);
        assert!(
            (v[0] - 1.0).abs() < 1e-14 && (v[1] - 3.0).abs() < 1e-14,
            "{v:?}"
        );
        assert!((s[0].abs() - 0.5f64.sqrt()).abs() < 1e-14);
    }

    #[test]
    fn discrete_dirichlet_laplacian_spectrum() {
        // -u'' on (0, 1), n interior nodes, h = 1/(n+1), M = h: the exact discrete
        // eigenvalues are (4/h^2) sin^2(j pi h / 2).
        let n = 200;
        let h = 1.0 / (n + 1) as f64;
        let mut c = Vec::new();
        for i in 0..n {
            c.push(Coupling {
                a: i,
                b: if i + 1 < n { Some(i + 1) } else { None },
                c: 1.0 / h,
            });
        }
        c.push(Coupling {
            a: 0,
            b: None,
            c: 1.0 / h,
        });
        let p = Pencil::from_couplings(vec![h; n], &c).unwrap();
        let e = lowest_modes(&p, &EigenOptions::lowest(4)).unwrap();
        for (j, mu) in e.values.iter().enumerate() {
            let want = 4.0 / (h * h)
                * ((j + 1) as f64 * std::f64::consts::PI * h / 2.0)
                    .sin()
                    .powi(2);
            assert!((mu / want - 1.0).abs() < 1e-12, "mode {j}: {mu} vs {want}");
        }
    }
}
