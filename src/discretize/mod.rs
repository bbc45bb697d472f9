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
///
/// One implementation for 2D and 3D: a 2D problem has a single node in z
/// (`z.nodes == [0.0]`, `nz == 1`) and one cell layer of unit depth, so its box
/// "volumes" are areas times 1 nm and every 2D figure is what a purely 2D
/// code gives, bit for bit.
#[derive(Debug, Clone)]
pub struct Problem {
    pub x: Line,
    pub y: Line,
    /// Third direction (a single node at 0 for a 2D problem).
    pub z: Line,
    pub nx: usize,
    pub ny: usize,
    pub nz: usize,
    /// Cell materials, index `cx + (nx - 1) * (cy + (ny - 1) * cz)`.
    pub cells: Vec<CellKind>,
    /// Node roles, index `i + nx * (j + ny * k)`.
    pub nodes: Vec<NodeKind>,
    /// Semiconductor volume of each node's box: nm^3 in 3D, nm^2 (times a
    /// unit depth of 1 nm) in 2D.
    pub semi_area: Vec<f64>,
    /// Net doping N_D - N_A averaged over the node's semiconductor box, nm^-3.
    pub net_doping: Vec<f64>,
    /// Coefficient of each x-directed edge (i,j,k)-(i+1,j,k), index `i + (nx - 1) * (j + ny * k)`.
    pub coef_x: Vec<f64>,
    /// Coefficient of each y-directed edge (i,j,k)-(i,j+1,k), index `i + nx * (j + (ny - 1) * k)`.
    pub coef_y: Vec<f64>,
    /// Coefficient of each z-directed edge (i,j,k)-(i,j,k+1), index `i + nx * (j + ny * k)` (empty in 2D).
    pub coef_z: Vec<f64>,
    pub silicon: Silicon,
    /// 2 when this is one half of a mirror-symmetric structure: column
    /// integrals count the other half too. (2D double gate: the last y line is
    /// the symmetry plane; 3D fins: the first y line, y = 0.)
    pub symmetry_factor: f64,
    /// Width the drain current is divided by, nm: 1 for a 2D problem (its
    /// currents are per unit depth), the device width W for a 3D fin or wire.
    pub current_width_nm: f64,
}

/// Extent of a box along one axis: the parts of the node's box in the cells
/// before and after it, as (cell index, start, end, weight) with weight the
/// part's length (or 1 for the single unit layer of a 2D problem).
fn box_parts(line: &Line, i: usize) -> [Option<(usize, f64, f64, f64)>; 2] {
    let n = line.len();
    let xs = &line.nodes;
    if n == 1 {
        return [Some((0, xs[0], xs[0], 1.0)), None];
    }
    let before = (i > 0).then(|| {
        let m = 0.5 * (xs[i - 1] + xs[i]);
        (i - 1, m, xs[i], xs[i] - m)
    });
    let after = (i + 1 < n).then(|| {
        let m = 0.5 * (xs[i] + xs[i + 1]);
        (i, xs[i], m, m - xs[i])
    });
    [before, after]
}

/// Half-widths of the cells on both sides of node `i` of a transverse axis:
/// (cell index, half step), or the unit layer of a 2D problem.
fn half_steps(line: &Line, i: usize) -> [Option<(usize, f64)>; 2] {
    let n = line.len();
    if n == 1 {
        return [Some((0, 1.0)), None];
    }
    let h = |c: usize| line.nodes[c + 1] - line.nodes[c];
    [
        (i > 0).then(|| (i - 1, 0.5 * h(i - 1))),
        (i + 1 < n).then(|| (i, 0.5 * h(i))),
    ]
}

impl Problem {
    /// Builds a 2D problem from a material function of the cell centre, the
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
        Problem::new_3d(
            x,
            y,
            Line { nodes: vec![0.0] },
            silicon,
            |xc, yc, _| material(xc, yc),
            |i, j, _| contact(i, j),
            |x0, x1, y0, y1, _, _| doping_avg(x0, x1, y0, y1),
        )
    }

    /// Builds a 3D problem (or a 2D one when `z` has a single node) from a
    /// material function of the cell centre, ohmic nodes `contact(i, j, k)`
    /// and the average net doping over a box `doping_avg(x0, x1, y0, y1, z0, z1)` (nm^-3).
    pub fn new_3d(
        x: Line,
        y: Line,
        z: Line,
        silicon: Silicon,
        material: impl Fn(f64, f64, f64) -> CellKind,
        contact: impl Fn(usize, usize, usize) -> Option<usize>,
        doping_avg: impl Fn(f64, f64, f64, f64, f64, f64) -> f64,
    ) -> Problem {
        let nx = x.len();
        let ny = y.len();
        let nz = z.len();
        let (cnx, cny) = (nx - 1, ny - 1);
        let cnz = nz.saturating_sub(1).max(1);
        let centre = |line: &Line, c: usize| {
            if line.len() == 1 {
                line.nodes[0]
            } else {
                0.5 * (line.nodes[c] + line.nodes[c + 1])
            }
        };
        let mut cells = Vec::with_capacity(cnx * cny * cnz);
        for cz in 0..cnz {
            let zc = centre(&z, cz);
            for cy in 0..cny {
                let yc = centre(&y, cy);
                for cx in 0..cnx {
                    cells.push(material(centre(&x, cx), yc, zc));
                }
            }
        }
        let cell = |cx: usize, cy: usize, cz: usize| cells[cx + cnx * (cy + cny * cz)];
        let count = nx * ny * nz;
        let mut nodes = vec![NodeKind::Free; count];
        let mut semi_area = vec![0.0; count];
        let mut net_doping = vec![0.0; count];
        for k in 0..nz {
            let zp = box_parts(&z, k);
            for j in 0..ny {
                let yp = box_parts(&y, j);
                for i in 0..nx {
                    let xp = box_parts(&x, i);
                    let n = i + nx * (j + ny * k);
                    let mut doping_integral = 0.0;
                    let mut touches_semi = false;
                    for (cz, z0, z1, wz) in zp.iter().flatten().copied() {
                        for (cy, y0, y1, wy) in yp.iter().flatten().copied() {
                            for (cx, x0, x1, wx) in xp.iter().flatten().copied() {
                                match cell(cx, cy, cz) {
                                    CellKind::Metal(e)
                                        if !matches!(nodes[n], NodeKind::Electrode(_)) =>
                                    {
                                        nodes[n] = NodeKind::Electrode(e);
                                    }
                                    CellKind::Semi => {
                                        touches_semi = true;
                                        let a = wx * wy * wz;
                                        semi_area[n] += a;
                                        doping_integral += a * doping_avg(x0, x1, y0, y1, z0, z1);
                                    }
                                    _ => {}
                                }
                            }
                        }
                    }
                    if semi_area[n] > 0.0 {
                        net_doping[n] = doping_integral / semi_area[n];
                    }
                    if touches_semi && nodes[n] == NodeKind::Free {
                        if let Some(c) = contact(i, j, k) {
                            nodes[n] = NodeKind::Contact(c);
                        }
                    }
                }
            }
        }
        // Edge coefficients: sum over the cells around the edge of
        // eps * (face part in each transverse direction) / edge length.
        let hx = x.steps();
        let hy = y.steps();
        let hz = z.steps();
        let mut coef_x = vec![0.0; cnx * ny * nz];
        for k in 0..nz {
            let zs = half_steps(&z, k);
            for j in 0..ny {
                let ys = half_steps(&y, j);
                for i in 0..cnx {
                    let mut sum = 0.0;
                    for (cz, wz) in zs.iter().flatten().copied() {
                        for (cy, wy) in ys.iter().flatten().copied() {
                            sum += cell(i, cy, cz).eps() * wy * wz;
                        }
                    }
                    coef_x[i + cnx * (j + ny * k)] = sum / hx[i];
                }
            }
        }
        let mut coef_y = vec![0.0; nx * cny * nz];
        for k in 0..nz {
            let zs = half_steps(&z, k);
            for j in 0..cny {
                for i in 0..nx {
                    let xs = half_steps(&x, i);
                    let mut sum = 0.0;
                    for (cz, wz) in zs.iter().flatten().copied() {
                        for (cx, wx) in xs.iter().flatten().copied() {
                            sum += cell(cx, j, cz).eps() * wx * wz;
                        }
                    }
                    coef_y[i + nx * (j + cny * k)] = sum / hy[j];
                }
            }
        }
        let mut coef_z = vec![0.0; nx * ny * nz.saturating_sub(1)];
        for k in 0..nz.saturating_sub(1) {
            for j in 0..ny {
                let ys = half_steps(&y, j);
                for i in 0..nx {
                    let xs = half_steps(&x, i);
                    let mut sum = 0.0;
                    for (cy, wy) in ys.iter().flatten().copied() {
                        for (cx, wx) in xs.iter().flatten().copied() {
                            sum += cell(cx, cy, k).eps() * wx * wy;
                        }
                    }
                    coef_z[i + nx * (j + ny * k)] = sum / hz[k];
                }
            }
        }
        Problem {
            x,
            y,
            z,
            nx,
            ny,
            nz,
            cells,
            nodes,
            semi_area,
            net_doping,
            coef_x,
            coef_y,
            coef_z,
            silicon,
            symmetry_factor: 1.0,
            current_width_nm: 1.0,
        }
    }

    pub fn node_count(&self) -> usize {
        self.nx * self.ny * self.nz
    }

    /// True for a problem with a third direction.
    pub fn is_3d(&self) -> bool {
        self.nz > 1
    }

    /// Material of 2D cell (cx, cy) (the first z layer of a 3D problem).
    pub fn cell(&self, cx: usize, cy: usize) -> CellKind {
        self.cells[cx + cy * (self.nx - 1)]
    }

    /// Material of cell (cx, cy, cz).
    pub fn cell_3d(&self, cx: usize, cy: usize, cz: usize) -> CellKind {
        self.cells[cx + (self.nx - 1) * (cy + (self.ny - 1) * cz)]
    }

    /// Node index of (i, j, k).
    #[inline]
    pub fn index(&self, i: usize, j: usize, k: usize) -> usize {
        i + self.nx * (j + self.ny * k)
    }

    /// (i, j, k) of node `n`.
    #[inline]
    pub fn ijk(&self, n: usize) -> (usize, usize, usize) {
        let i = n % self.nx;
        let r = n / self.nx;
        (i, r % self.ny, r / self.ny)
    }

    /// Coordinates (x, y, z) of node `n`, nm.
    pub fn coords_nm(&self, n: usize) -> (f64, f64, f64) {
        let (i, j, k) = self.ijk(n);
        (self.x.nodes[i], self.y.nodes[j], self.z.nodes[k])
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

    /// The coupled neighbours of node `n` with their edge coefficients, in
    /// the order x-, x+, y-, y+, z-, z+ (absent ones are `None`).
    #[inline]
    pub fn neighbours(&self, n: usize) -> [Option<(usize, f64)>; 6] {
        let (nx, ny, nz) = (self.nx, self.ny, self.nz);
        let (i, j, k) = self.ijk(n);
        let plane = nx * ny;
        [
            (i > 0).then(|| (n - 1, self.coef_x[i - 1 + (nx - 1) * (j + ny * k)])),
            (i + 1 < nx).then(|| (n + 1, self.coef_x[i + (nx - 1) * (j + ny * k)])),
            (j > 0).then(|| (n - nx, self.coef_y[i + nx * (j - 1 + (ny - 1) * k)])),
            (j + 1 < ny).then(|| (n + nx, self.coef_y[i + nx * (j + (ny - 1) * k)])),
            (k > 0).then(|| (n - plane, self.coef_z[n - plane])),
            (k + 1 < nz).then(|| (n + plane, self.coef_z[n])),
        ]
    }

    /// Sum of the coupling coefficients of node `n` and the flux term
    /// `sum c (psi_nb - psi_n)` (V).
    #[inline]
    pub fn flux(&self, psi: &[f64], n: usize) -> (f64, f64) {
        let mut sum_c = 0.0;
        let mut flux = 0.0;
        for (nb, c) in self.neighbours(n).into_iter().flatten() {
            sum_c += c;
            flux += c * (psi[nb] - psi[n]);
        }
        (sum_c, flux)
    }

    /// Residual of node `n` and its derivative's magnitude (the Jacobian
    /// diagonal of `-dF/dpsi`), with quasi-Fermi levels for its x cross-section.
    pub fn residual(&self, psi: &[f64], n: usize, phi_n: f64, phi_p: f64) -> (f64, f64) {
        let (sum_c, flux) = self.flux(psi, n);
        let a = self.semi_area[n];
        if a == 0.0 {
            return (flux, sum_c);
        }
        let (e, h) = self.carriers(psi[n], phi_n, phi_p);
        let rho = h - e + self.net_doping[n];
        let scale = Q_OVER_EPS0_V_NM * a;
        (
            flux + scale * rho,
            sum_c + scale * (e + h) / self.silicon.thermal_v,
        )
    }

    /// Integral over the semiconductor of the cross-section at x index `i` of
    /// `f(psi)`, in units of f times nm (2D, per nm of depth) or nm^2 (3D):
    /// each node weighs its semiconductor box volume divided by the box's
    /// x-width (times [`Problem::symmetry_factor`]).
    pub fn column_integral(&self, psi: &[f64], i: usize, f: impl Fn(f64) -> f64) -> f64 {
        let w = self.box_width_x(i);
        let mut sum = 0.0;
        for r in 0..self.ny * self.nz {
            let n = i + r * self.nx;
            let a = self.semi_area[n];
            if a > 0.0 {
                sum += a / w * f(psi[n]);
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
