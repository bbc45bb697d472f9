//! Box-integration (finite-volume) discretisation of the nonlinear Poisson
//! equation on a rectilinear mesh (MODEL.md section 3).
//!
//! A [`Problem`] is geometry and materials only: cells carry a material,
//! nodes are free, on an electrode (Dirichlet) or on an ohmic contact
//! (Dirichlet at charge neutrality). Each node owns the box between the
//! mid-lines of its neighbouring cells; permittivity is constant per cell, so
//! the flux through a box face sums the contributions of the cells it
//! crosses. Space charge and doping are integrated over the semiconductor
//! part of each box only.

pub mod charge;

use crate::mesh::Line;
use crate::physics::{Silicon, EPS_SI, Q_OVER_EPS0_V_NM};

/// Material of one mesh cell.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum CellKind {
    /// Silicon (eps_r = 11.7), holds carriers and doping.
    Semi,
    /// Insulator with this relative permittivity.
    Dielectric(f64),
    /// Metal of electrode number `.0`: every node touching it is held at the electrode's potential.
    Metal(usize),
}

impl CellKind {
    pub fn eps(&self) -> f64 {
        match *self {
            CellKind::Semi => EPS_SI,
            CellKind::Dielectric(e) => e,
            CellKind::Metal(_) => 0.0,
        }
    }
}

/// Role of one mesh node.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum NodeKind {
    Free,
    /// Held at the potential of electrode `.0`.
    Electrode(usize),
    /// Ohmic contact `.0`: held at charge neutrality of its own net doping.
    Contact(usize),
}

/// The discretised structure: mesh, materials, node roles, box geometry and doping.
#[derive(Debug, Clone)]
pub struct Problem {
    pub x: Line,
    pub y: Line,
    pub nx: usize,
    pub ny: usize,
    /// Cell materials, index `cx + cy * (nx - 1)`.
    pub cells: Vec<CellKind>,
    /// Node roles, index `i + j * nx`.
    pub nodes: Vec<NodeKind>,
    /// Semiconductor area of each node's box, nm^2.
    pub semi_area: Vec<f64>,
    /// Net doping N_D - N_A averaged over the node's semiconductor box, nm^-3.
    pub net_doping: Vec<f64>,
    /// Coefficient of each x-directed edge (i,j)-(i+1,j), index `i + j * (nx - 1)`.
    pub coef_x: Vec<f64>,
    /// Coefficient of each y-directed edge (i,j)-(i,j+1), index `i + j * nx`.
    pub coef_y: Vec<f64>,
    pub silicon: Silicon,
    /// 2 when this is one half of a mirror-symmetric structure (the last y
    /// line is the symmetry plane): column integrals count the other half too.
    pub symmetry_factor: f64,
}

impl Problem {
    /// Builds the problem from a material function of the cell centre, the
    /// node roles derived from metal cells plus `contact(i, j)` for the ohmic
    /// nodes, and the average net doping over a rectangle `doping_avg(x0, x1, y0, y1)` (nm^-3).
    pub fn new(
        x: Line,
        y: Line,
        silicon: Silicon,
        material: impl Fn(f64, f64) -> CellKind,
        contact: impl Fn(usize, usize) -> Option<usize>,
        doping_avg: impl Fn(f64, f64, f64, f64) -> f64,
    ) -> Problem {
        let nx = x.len();
        let ny = y.len();
        let hx = x.steps();
        let hy = y.steps();
        let mut cells = Vec::with_capacity((nx - 1) * (ny - 1));
        for cy in 0..ny - 1 {
            for cx in 0..nx - 1 {
                let xc = 0.5 * (x.nodes[cx] + x.nodes[cx + 1]);
                let yc = 0.5 * (y.nodes[cy] + y.nodes[cy + 1]);
                cells.push(material(xc, yc));
            }
        }
        let cell = |cx: isize, cy: isize| -> Option<CellKind> {
            if cx < 0 || cy < 0 || cx >= nx as isize - 1 || cy >= ny as isize - 1 {
                None
            } else {
                Some(cells[cx as usize + cy as usize * (nx - 1)])
            }
        };
        let mut nodes = vec![NodeKind::Free; nx * ny];
        let mut semi_area = vec![0.0; nx * ny];
        let mut net_doping = vec![0.0; nx * ny];
        for j in 0..ny {
            for i in 0..nx {
                let k = i + j * nx;
                let mut doping_integral = 0.0;
                let mut touches_semi = false;
                for (dx, dy) in [(-1isize, -1isize), (0, -1), (-1, 0), (0, 0)] {
                    let (cx, cy) = (i as isize + dx, j as isize + dy);
                    match cell(cx, cy) {
                        Some(CellKind::Metal(e)) if !matches!(nodes[k], NodeKind::Electrode(_)) => {
                            nodes[k] = NodeKind::Electrode(e);
                        }
                        Some(CellKind::Semi) => {
                            touches_semi = true;
                            let (cxu, cyu) = (cx as usize, cy as usize);
                            // The quarter of the cell that belongs to this node.
                            let (x0, x1) = if dx < 0 {
                                (0.5 * (x.nodes[cxu] + x.nodes[cxu + 1]), x.nodes[cxu + 1])
                            } else {
                                (x.nodes[cxu], 0.5 * (x.nodes[cxu] + x.nodes[cxu + 1]))
                            };
                            let (y0, y1) = if dy < 0 {
                                (0.5 * (y.nodes[cyu] + y.nodes[cyu + 1]), y.nodes[cyu + 1])
                            } else {
                                (y.nodes[cyu], 0.5 * (y.nodes[cyu] + y.nodes[cyu + 1]))
                            };
                            let a = (x1 - x0) * (y1 - y0);
                            semi_area[k] += a;
                            doping_integral += a * doping_avg(x0, x1, y0, y1);
                        }
                        _ => {}
                    }
                }
                if semi_area[k] > 0.0 {
                    net_doping[k] = doping_integral / semi_area[k];
                }
                if touches_semi && nodes[k] == NodeKind::Free {
                    if let Some(c) = contact(i, j) {
                        nodes[k] = NodeKind::Contact(c);
                    }
                }
            }
        }
        let eps_at = |cx: isize, cy: isize| cell(cx, cy).map_or(0.0, |c| c.eps());
        let mut coef_x = vec![0.0; (nx - 1) * ny];
        for j in 0..ny {
            for i in 0..nx - 1 {
                let (ii, jj) = (i as isize, j as isize);
                let below = if j > 0 {
                    eps_at(ii, jj - 1) * 0.5 * hy[j - 1]
                } else {
                    0.0
                };
                let above = if j < ny - 1 {
                    eps_at(ii, jj) * 0.5 * hy[j]
                } else {
                    0.0
                };
                coef_x[i + j * (nx - 1)] = (below + above) / hx[i];
            }
        }
        let mut coef_y = vec![0.0; nx * (ny - 1)];
        for j in 0..ny - 1 {
            for i in 0..nx {
                let (ii, jj) = (i as isize, j as isize);
                let left = if i > 0 {
                    eps_at(ii - 1, jj) * 0.5 * hx[i - 1]
                } else {
                    0.0
                };
                let right = if i < nx - 1 {
                    eps_at(ii, jj) * 0.5 * hx[i]
                } else {
                    0.0
                };
                coef_y[i + j * nx] = (left + right) / hy[j];
            }
        }
        Problem {
            x,
            y,
            nx,
            ny,
            cells,
            nodes,
            semi_area,
            net_doping,
            coef_x,
            coef_y,
            silicon,
            symmetry_factor: 1.0,
        }
    }

    pub fn node_count(&self) -> usize {
        self.nx * self.ny
    }

    pub fn cell(&self, cx: usize, cy: usize) -> CellKind {
        self.cells[cx + cy * (self.nx - 1)]
    }

    /// Number of free (unknown) nodes.
    pub fn unknowns(&self) -> usize {
        self.nodes.iter().filter(|n| **n == NodeKind::Free).count()
    }

    /// Width in x of node `i`'s box, nm.
    pub fn box_width_x(&self, i: usize) -> f64 {
        let xs = &self.x.nodes;
        let left = if i > 0 {
            0.5 * (xs[i] - xs[i - 1])
        } else {
            0.0
        };
        let right = if i + 1 < self.nx {
            0.5 * (xs[i + 1] - xs[i])
        } else {
            0.0
        };
        left + right
    }

    /// Electron and hole densities (nm^-3) at potential `psi` with quasi-Fermi levels `phi_n`, `phi_p`.
    #[inline]
    pub fn carriers(&self, psi: f64, phi_n: f64, phi_p: f64) -> (f64, f64) {
        let s = &self.silicon;
        (
            s.ni * ((psi - phi_n) / s.thermal_v).exp(),
            s.ni * ((phi_p - psi) / s.thermal_v).exp(),
        )
    }

    /// Sum of the coupling coefficients of node `k` and the flux term
    /// `sum c (psi_nb - psi_k)` (V).
    pub fn flux(&self, psi: &[f64], i: usize, j: usize) -> (f64, f64) {
        let nx = self.nx;
        let k = i + j * nx;
        let mut sum_c = 0.0;
        let mut flux = 0.0;
        if i > 0 {
            let c = self.coef_x[i - 1 + j * (nx - 1)];
            sum_c += c;
            flux += c * (psi[k - 1] - psi[k]);
        }
        if i + 1 < nx {
            let c = self.coef_x[i + j * (nx - 1)];
            sum_c += c;
            flux += c * (psi[k + 1] - psi[k]);
        }
        if j > 0 {
            let c = self.coef_y[i + (j - 1) * nx];
            sum_c += c;
            flux += c * (psi[k - nx] - psi[k]);
        }
        if j + 1 < self.ny {
            let c = self.coef_y[i + j * nx];
            sum_c += c;
            flux += c * (psi[k + nx] - psi[k]);
        }
        (sum_c, flux)
    }

    /// Residual of node (i, j) and its derivative's magnitude (the Jacobian
    /// diagonal of `-dF/dpsi`), with quasi-Fermi levels for its column.
    pub fn residual(&self, psi: &[f64], i: usize, j: usize, phi_n: f64, phi_p: f64) -> (f64, f64) {
        let k = i + j * self.nx;
        let (sum_c, flux) = self.flux(psi, i, j);
        let a = self.semi_area[k];
        if a == 0.0 {
            return (flux, sum_c);
        }
        let (n, p) = self.carriers(psi[k], phi_n, phi_p);
        let rho = p - n + self.net_doping[k];
        let scale = Q_OVER_EPS0_V_NM * a;
        (
            flux + scale * rho,
            sum_c + scale * (n + p) / self.silicon.thermal_v,
        )
    }

    /// Integral over the semiconductor of column `i` of `f(psi)`, in units of f times nm:
    /// each node weighs its semiconductor box area divided by the box's x-width
    /// (times [`Problem::symmetry_factor`]).
    pub fn column_integral(&self, psi: &[f64], i: usize, f: impl Fn(f64) -> f64) -> f64 {
        let w = self.box_width_x(i);
        let mut sum = 0.0;
        for j in 0..self.ny {
            let k = i + j * self.nx;
            let a = self.semi_area[k];
            if a > 0.0 {
                sum += a / w * f(psi[k]);
            }
        }
        sum * self.symmetry_factor
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::mesh::Line;

    #[test]
    fn box_areas_tile_the_semiconductor() {
        let x = Line::uniform(0.0, 4.0, 4);
        let y = Line {
            nodes: vec![-1.0, 0.0, 0.5, 1.5, 3.0],
        };
        let p = Problem::new(
            x,
            y,
            Silicon::at(300.0),
            |_, yc| {
                if yc < 0.0 {
                    CellKind::Dielectric(3.9)
                } else {
                    CellKind::Semi
                }
            },
            |_, _| None,
            |_, _, _, _| 1e-3,
        );
        let total: f64 = p.semi_area.iter().sum();
        assert!((total - 4.0 * 3.0).abs() < 1e-12);
        // An interface node has half its box in silicon.
        let k = 2 + p.nx; // j = 1 is y = 0
        assert!((p.semi_area[k] - 1.0 * 0.25).abs() < 1e-12);
        // Edge along the interface: half oxide, half silicon.
        let c = p.coef_x[1 + p.nx - 1];
        assert!((c - (3.9 * 0.5 + 11.7 * 0.25) / 1.0).abs() < 1e-12);
    }
}
