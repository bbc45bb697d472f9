//! The leakiest path's barrier (MODEL.md section 5).

use crate::device::Polarity;
use crate::discretize::Problem;

/// The leakiest path's barrier.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Barrier {
    /// Band edge of the channel carrier relative to the source Fermi level, eV.
    pub height_ev: f64,
    /// Depth of that row below the top silicon surface, nm.
    pub depth_nm: f64,
    /// Position of the barrier's top along the channel, nm.
    pub x_nm: f64,
}

/// Channel-carrier band edge relative to the source Fermi level at potential
/// `psi` (midgap approximation): E_g/2 - s psi (s = +1 electrons, -1 holes).
pub fn band_edge_ev(p: &Problem, psi: f64, polarity: Polarity) -> f64 {
    0.5 * p.silicon.eg_ev - polarity.sign() * psi
}

/// For each semiconductor row the barrier is the maximum band edge over x;
/// the device barrier is the lowest of these (the leakiest path).
pub fn barrier(p: &Problem, psi: &[f64], polarity: Polarity) -> Barrier {
    let mut best = Barrier {
        height_ev: f64::INFINITY,
        depth_nm: 0.0,
        x_nm: 0.0,
    };
    for j in 0..p.ny {
        let mut top = f64::NEG_INFINITY;
        let mut x_top = 0.0;
        let mut any = false;
        for i in 0..p.nx {
            let k = i + j * p.nx;
            if p.semi_area[k] > 0.0 {
                any = true;
                let e = band_edge_ev(p, psi[k], polarity);
                if e > top {
                    top = e;
                    x_top = p.x.nodes[i];
                }
            }
        }
        if any && top < best.height_ev {
            best = Barrier {
                height_ev: top,
                depth_nm: p.y.nodes[j],
                x_nm: x_top,
            };
        }
    }
    best
}
