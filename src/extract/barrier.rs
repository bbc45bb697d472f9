//! The leakiest path's barrier (MODEL.md section 5; in 3D, DEVICE-FORMAT.md
//! "Fins and wires solved in 3D": every line of silicon nodes along x at
//! fixed (y, z) is a path).

use crate::device::Polarity;
use crate::discretize::Problem;

/// The leakiest path's barrier.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Barrier {
    /// Band edge of the channel carrier relative to the source Fermi level, eV.
    pub height_ev: f64,
    /// Depth of that line below the top silicon surface, nm (the y of a 2D
    /// along-channel section, the z of a 3D fin).
    pub depth_nm: f64,
    /// Position of the barrier's top along the channel, nm.
    pub x_nm: f64,
    /// Mesh coordinates of the leakiest line (y, z), nm: in 3D y runs across
    /// the fin (0 at its centre) and z downward; in 2D z is 0.
    pub y_nm: f64,
    pub z_nm: f64,
    /// Index of the line in the problem: node `i + nx * line` for i along x.
    pub line: usize,
}

/// Channel-carrier band edge relative to the source Fermi level at potential
/// `psi` (midgap approximation): E_g/2 - s psi (s = +1 electrons, -1 holes).
pub fn band_edge_ev(p: &Problem, psi: f64, polarity: Polarity) -> f64 {
    0.5 * p.silicon.eg_ev - polarity.sign() * psi
}

/// The top of every line of semiconductor nodes along x (fixed y, z): its
/// highest band edge (eV) and the x where it lies (nm), or None for a line
/// without semiconductor nodes. Indexed by line `j + ny k`.
pub fn line_tops(p: &Problem, psi: &[f64], polarity: Polarity) -> Vec<Option<(f64, f64)>> {
    (0..p.ny * p.nz)
        .map(|line| {
            let mut top: Option<(f64, f64)> = None;
            for i in 0..p.nx {
                let k = i + line * p.nx;
                if p.semi_area[k] > 0.0 {
                    let e = band_edge_ev(p, psi[k], polarity);
                    if top.is_none_or(|(t, _)| e > t) {
                        top = Some((e, p.x.nodes[i]));
                    }
                }
            }
            top
        })
        .collect()
}

/// For each line of semiconductor nodes along x (fixed y, z) the barrier is
/// the maximum band edge over x; the device barrier is the lowest of these
/// (the leakiest path). Ties keep the first line (lowest y, then z).
pub fn barrier(p: &Problem, psi: &[f64], polarity: Polarity) -> Barrier {
    let mut best = Barrier {
        height_ev: f64::INFINITY,
        depth_nm: 0.0,
        x_nm: 0.0,
        y_nm: 0.0,
        z_nm: 0.0,
        line: 0,
    };
    for (line, top) in line_tops(p, psi, polarity).into_iter().enumerate() {
        if let Some((top, x_top)) = top {
            if top < best.height_ev {
                let (j, k) = (line % p.ny, line / p.ny);
                let (y_nm, z_nm) = (p.y.nodes[j], p.z.nodes[k]);
                best = Barrier {
                    height_ev: top,
                    depth_nm: if p.is_3d() { z_nm } else { y_nm },
                    x_nm: x_top,
                    y_nm,
                    z_nm,
                    line,
                };
            }
        }
    }
    best
}
