//! Anderson acceleration of the potential / quasi-Fermi-level fixed point.

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
