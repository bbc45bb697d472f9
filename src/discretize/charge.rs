//! Charges from a potential by Gauss's law on the boxes of
//! [`Problem`]: the charge in node k's box is the outward displacement flux
//! through its faces, `Q_k = eps0 sum_nb c (psi_k - psi_nb)` per unit depth.
//! For a free node this is the space charge of its box (the residual is
//! zero); for an electrode or contact node it is the charge the metal holds
//! there. The flux of every edge enters two boxes with opposite signs, so
//! the charges of all nodes sum to zero (neutrality).

use super::Problem;
use crate::physics::EPS0_F_PER_M;

/// Charge per um of width for 1 V of `eps0 sum c (psi_k - psi_nb)`, F/um.
pub const EPS0_F_PER_UM: f64 = EPS0_F_PER_M * 1e-6;

impl Problem {
    /// The charge in every node's box per um of width, C/um (potential
    /// `psi` in V), with [`Problem::symmetry_factor`] (a half structure
    /// counts its mirror half too).
    pub fn node_charges_c_per_um(&self, psi: &[f64]) -> Vec<f64> {
        let scale = EPS0_F_PER_UM * self.symmetry_factor;
        (0..self.node_count())
            .map(|k| -scale * self.flux(psi, k).1)
            .collect()
    }
}

#[cfg(test)]
mod tests {
    use crate::discretize::{CellKind, NodeKind, Problem};
    use crate::mesh::Line;
    use crate::physics::Silicon;

    #[test]
    fn plate_charges_are_equal_and_opposite() {
        // Two electrodes 2 nm apart in SiO2 on a 3 x 2 nm strip: the linear
        // potential between them is exact for box integration, and Gauss's
        // law gives Q = eps0 eps_r H V / t on the plates (parallel plate).
        let x = Line::uniform(0.0, 4.0, 8);
        let y = Line::uniform(0.0, 3.0, 6);
        let p = Problem::new(
            x,
            y,
            Silicon::at(300.0),
            |xc, _| {
                if xc < 1.0 {
                    CellKind::Metal(0)
                } else if xc > 3.0 {
                    CellKind::Metal(1)
                } else {
                    CellKind::Dielectric(3.9)
                }
            },
            |_, _| None,
            |_, _, _, _| 0.0,
        );
        let psi: Vec<f64> = (0..p.node_count())
            .map(|k| {
                let xv = p.x.nodes[k % p.nx];
                (1.0 - (xv - 1.0) / 2.0).clamp(0.0, 1.0)
            })
            .collect();
        let q = p.node_charges_c_per_um(&psi);
        let on = |e: usize| -> f64 {
            (0..p.node_count())
                .filter(|&k| p.nodes[k] == NodeKind::Electrode(e))
                .map(|k| q[k])
                .sum()
        };
        let want = super::EPS0_F_PER_UM * 3.9 * 3.0 / 2.0;
        assert!((on(0) - want).abs() < 1e-12 * want, "{} vs {want}", on(0));
        assert!((on(1) + want).abs() < 1e-12 * want);
        assert!(q.iter().sum::<f64>().abs() < 1e-12 * want);
    }
}
