//! Channel-carrier quasi-Fermi level and subthreshold current (MODEL.md section 4).
//!
//! With a constant mobility and a quasi-Fermi level uniform over each
//! cross-section, current continuity gives, with N(x) the column integral of
//! n_i exp(s psi / V_T) (s = +1 for electrons, -1 for holes):
//!
//! ```text
//! F(x)   = int_{xS}^{x} dx'/N  /  int_{xS}^{xD} dx'/N
//! phi(x) = -s V_T ln(1 - (1 - exp(-|V_DS|/V_T)) F(x))
//! I_D/W  = q mu V_T (1 - exp(-|V_DS|/V_T)) / int dx/N
//! ```
//! `dx/N` is integrated exactly for N log-linear between nodes, and `1 - F`
//! is accumulated from the drain side so that no digits are lost near the drain.

use crate::device::Polarity;
use crate::discretize::Problem;
use crate::physics::Q_C;
use crate::solve::QuasiFermi;

/// Channel carrier density integrated over each column, nm^-2 (per nm of width, per nm of length).
pub fn column_densities(p: &Problem, psi: &[f64], polarity: Polarity) -> Vec<f64> {
    let ni = p.silicon.ni;
    let thermal_v = p.silicon.thermal_v;
    let sign = polarity.sign();
    (0..p.nx)
        .map(|i| p.column_integral(psi, i, |v| ni * (sign * v / thermal_v).exp()))
        .collect()
}

/// int dx / N over each cell, exact for N log-linear between nodes, nm^3.
pub fn segment_resistances(p: &Problem, dens: &[f64]) -> Vec<f64> {
    let xs = &p.x.nodes;
    (0..p.nx - 1)
        .map(|i| {
            let h = xs[i + 1] - xs[i];
            let (a, b) = (1.0 / dens[i], 1.0 / dens[i + 1]);
            let r = b / a;
            if (r - 1.0).abs() < 1e-6 {
                h * 0.5 * (a + b)
            } else {
                h * (b - a) / r.ln()
            }
        })
        .collect()
}

/// Quasi-Fermi level of the channel carriers per column, and the current per width.
#[derive(Debug, Clone, PartialEq)]
pub struct Transport {
    /// Quasi-Fermi level of the channel carrier per column, V.
    pub phi: Vec<f64>,
    /// Drain current per gate width, A/um (signed: negative for a p-channel device).
    pub current_a_per_um: f64,
}

/// Computes the channel carrier's quasi-Fermi level and current for drain
/// bias `vds` (the user's sign) with mobility `mobility_nm2` (nm^2/(V s)).
pub fn quasi_fermi(
    p: &Problem,
    psi: &[f64],
    polarity: Polarity,
    vds: f64,
    mobility_nm2: f64,
) -> Transport {
    let thermal_v = p.silicon.thermal_v;
    let sign = polarity.sign();
    let dens = column_densities(p, psi, polarity);
    let seg = segment_resistances(p, &dens);
    let n = p.nx;
    let mut from_source = vec![0.0; n];
    for i in 1..n {
        from_source[i] = from_source[i - 1] + seg[i - 1];
    }
    let mut to_drain = vec![0.0; n];
    for i in (0..n - 1).rev() {
        to_drain[i] = to_drain[i + 1] + seg[i];
    }
    let total = from_source[n - 1];
    let e = (-(vds.abs()) / thermal_v).exp();
    let phi = (0..n)
        .map(|i| {
            let arg = to_drain[i] / total + e * from_source[i] / total;
            -sign * thermal_v * arg.ln()
        })
        .collect();
    // A/nm of width -> A/um (a 3D problem's total current over its width W).
    let i_per_nm = Q_C * mobility_nm2 * thermal_v * (1.0 - e) / total / p.current_width_nm;
    Transport {
        phi,
        current_a_per_um: sign * i_per_nm * 1e3,
    }
}

/// Quasi-Fermi levels of both carriers: the channel carrier from `t`, the other at 0 V.
pub fn levels(t: &Transport, polarity: Polarity) -> QuasiFermi {
    let zeros = vec![0.0; t.phi.len()];
    if polarity == Polarity::N {
        QuasiFermi {
            phi_n: t.phi.clone(),
            phi_p: zeros,
        }
    } else {
        QuasiFermi {
            phi_n: zeros,
            phi_p: t.phi.clone(),
        }
    }
}
