//! Electrical channel length and the split of the V_t roll-off
//! (docs/electrical-length.md).
//!
//! With N(x) the column density of the channel carrier referenced to the
//! source Fermi level (`solve::transport::column_densities`), the
//! subthreshold current is I/W = q mu V_T (1 - exp(-V_DS/V_T)) / int dx/N
//! (MODEL.md section 4). A uniform channel at the barrier-top density
//! N_top = min_x N(x) carries the same current when its length is
//!
//! ```text
//! L_elec = N_top * int dx / N(x)      (over the whole device, contact to contact)
//! ```
//!
//! i.e. L_elec is how far apart source and drain act at that bias: the
//! stretch of channel at barrier-top density that the current sees. The
//! caller evaluates it at V_DS,lin two decades below the threshold current
//! (docs/electrical-length.md says why not at V_t itself).

use crate::device::Polarity;
use crate::discretize::Problem;
use crate::physics::Q_C;
use crate::solve::transport::{column_densities, segment_resistances};

/// Below this electrical length (nm) a figure is flagged: the source and drain
/// are then a few lattice constants apart and the classical, uniform-level
/// model is outside its range (common practice: about 10 silicon lattice
/// constants, 5.43 nm, rounded down).
pub const L_ELEC_WARN_NM: f64 = 3.0;

/// The electrical length of one solved potential.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ElectricalLength {
    /// N_top * int dx / N, nm.
    pub l_elec_nm: f64,
    /// Barrier-top column density per nm of width, nm^-2 (a 3D problem's
    /// cross-section integral divided by its current width W, so that it
    /// compares with [`threshold_density_per_nm2`] as a 2D section's does).
    pub n_top_per_nm2: f64,
    /// Where the barrier top lies along x, nm.
    pub x_top_nm: f64,
    /// int dx / N over the device, nm^3.
    pub resistance_nm3: f64,
}

/// L_elec of potential `psi` (any bias; gatehold reports it at V_DS,lin, two decades below the threshold current).
pub fn electrical_length(p: &Problem, psi: &[f64], polarity: Polarity) -> ElectricalLength {
    let dens = column_densities(p, psi, polarity);
    let total: f64 = segment_resistances(p, &dens).iter().sum();
    let (i_top, n_top) = dens
        .iter()
        .copied()
        .enumerate()
        .min_by(|a, b| a.1.total_cmp(&b.1))
        .expect("a mesh has columns");
    ElectricalLength {
        l_elec_nm: n_top * total,
        n_top_per_nm2: n_top / p.current_width_nm,
        x_top_nm: p.x.nodes[i_top],
        resistance_nm3: total,
    }
}

/// Column density, nm^-2, at which a long channel (one square, W = L)
/// carries `current_a` at drain bias `vds_abs_v` in subthreshold:
/// I = q mu V_T (1 - exp(-V_DS/V_T)) N (the same current law as the 2D
/// solve and the Pao-Sah reference in the subthreshold limit).
pub fn threshold_density_per_nm2(
    current_a: f64,
    mobility_nm2_per_vs: f64,
    thermal_v: f64,
    vds_abs_v: f64,
) -> f64 {
    current_a / (Q_C * mobility_nm2_per_vs * thermal_v * (1.0 - (-vds_abs_v / thermal_v).exp()))
}

/// The V_t roll-off split, mV.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct RolloffSplit {
    /// total - SS_long log10(N_top / N_th): see [`split_rolloff`].
    pub electrostatic_mv: f64,
    /// SS_lin log10(L_elec / L_g): negative when L_elec < L_g.
    pub length_mv: f64,
    /// total - electrostatic - length, mV.
    pub residual_mv: f64,
}

/// Splits the roll-off `total_mv` = V_t,lin - V_t,long (n-channel signs; a
/// p-channel caller passes magnitudes mirrored the same way) into
///
/// - the electrostatic part: V_t,lin minus the gate voltage at which the long
///   channel would hold the short device's barrier-top density N_top, i.e.
///   `total - SS_long log10(N_top / N_th)` with N_th the long channel's density
///   at its threshold ([`threshold_density_per_nm2`]) and the long channel
///   exponential with slope SS_long below threshold;
/// - the electrical-length part: `SS_lin log10(L_elec / L_g)` (the short
///   device reaches the threshold current I_cc W / L_g at the lower barrier-top
///   density N_th L_elec / L_g).
///
/// They sum to the total up to `(SS_long - SS_lin) log10(L_elec/L_g)` plus
/// `SS_long log10(I(V_t) L_g / (I_cc W))` (the extra solve's current against
/// the threshold current): `residual_mv` holds that difference.
pub fn split_rolloff(
    total_mv: f64,
    n_top_per_nm2: f64,
    n_threshold_per_nm2: f64,
    ss_long_mv_per_dec: f64,
    ss_lin_mv_per_dec: f64,
    l_elec_nm: f64,
    gate_length_nm: f64,
) -> RolloffSplit {
    let electrostatic_mv =
        total_mv - ss_long_mv_per_dec * (n_top_per_nm2 / n_threshold_per_nm2).log10();
    let length_mv = ss_lin_mv_per_dec * (l_elec_nm / gate_length_nm).log10();
    RolloffSplit {
        electrostatic_mv,
        length_mv,
        residual_mv: total_mv - electrostatic_mv - length_mv,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn split_sums_exactly_when_the_slopes_agree_and_the_current_is_the_target() {
        // N_top = N_th L_elec / L_g exactly (the threshold condition) and
        // SS_lin = SS_long: the residual is zero by the identity above.
        let (n_th, l_g, l_e) = (2e-6, 30.0, 24.0);
        let s = split_rolloff(-40.0, n_th * l_e / l_g, n_th, 70.0, 70.0, l_e, l_g);
        assert!(s.residual_mv.abs() < 1e-9, "{s:?}");
        assert!((s.length_mv - 70.0 * (0.8f64).log10()).abs() < 1e-9);
        // A 5 mV/dec slope difference leaves (SS_long - SS_lin) log10(L_elec/L_g).
        let s = split_rolloff(-40.0, n_th * l_e / l_g, n_th, 70.0, 75.0, l_e, l_g);
        assert!((s.residual_mv - (70.0 - 75.0) * (0.8f64).log10()).abs() < 1e-9);
    }
}

/// The channel-resistance extraction of Terada and Muta (Jpn. J. Appl.
/// Phys. 18, 953, 1979) across gate lengths.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct TeradaMuta {
    /// Gate length minus electrical length, nm (where the R-L lines meet).
    pub delta_l_nm: f64,
    /// Total resistance there (source/drain series part), Ohm um.
    #[serde(rename = "r_sd_ohm_um")]
    pub r_sd_ohm_um: f64,
    /// The two gate voltages of the lines, V.
    #[serde(rename = "vgs_V")]
    pub vgs_v: (f64, f64),
    /// Lengths used.
    pub lengths: usize,
}

/// One gate length's V_DS,lin curve: (L_g nm, gate voltages V, |I_D| A/um or None).
pub type LengthCurve<'a> = (f64, &'a [f64], &'a [Option<f64>]);

/// Least-squares line y = a + b x.
fn line(pts: &[(f64, f64)]) -> (f64, f64) {
    let n = pts.len() as f64;
    let mx = pts.iter().map(|p| p.0).sum::<f64>() / n;
    let my = pts.iter().map(|p| p.1).sum::<f64>() / n;
    let sxy: f64 = pts.iter().map(|p| (p.0 - mx) * (p.1 - my)).sum();
    let sxx: f64 = pts.iter().map(|p| (p.0 - mx).powi(2)).sum();
    let b = sxy / sxx;
    (my - b * mx, b)
}

/// Terada-Muta from the V_DS,lin curves of several gate lengths on one
/// gate-voltage grid: R(L) = V_DS / I_D is fitted by a line in L at two gate
/// voltages; the lines meet at L = Delta L (and R = R_sd). `curves` holds
/// (L_g nm, gate voltages, |I_D| A/um or None); `vgs` the two gate voltages
/// (each must be a sample of every curve, within 1e-9 V). None with fewer
/// than two lengths, a missing sample, or parallel lines.
pub fn terada_muta(curves: &[LengthCurve], vds_v: f64, vgs: (f64, f64)) -> Option<TeradaMuta> {
    if curves.len() < 2 {
        return None;
    }
    let at = |v: &[f64], i: &[Option<f64>], vg: f64| {
        v.iter()
            .position(|x| (x - vg).abs() < 1e-9)
            .and_then(|k| i[k])
            .map(f64::abs)
    };
    let fit = |vg: f64| -> Option<(f64, f64)> {
        let pts: Option<Vec<(f64, f64)>> = curves
            .iter()
            .map(|(l, v, i)| at(v, i, vg).map(|id| (*l, vds_v.abs() / id)))
            .collect();
        Some(line(&pts?))
    };
    let (a1, b1) = fit(vgs.0)?;
    let (a2, b2) = fit(vgs.1)?;
    if (b1 - b2).abs() <= 1e-12 * b1.abs().max(b2.abs()) {
        return None;
    }
    let delta = (a2 - a1) / (b1 - b2);
    Some(TeradaMuta {
        delta_l_nm: delta,
        r_sd_ohm_um: a1 + b1 * delta,
        vgs_v: vgs,
        lengths: curves.len(),
    })
}

#[cfg(test)]
mod tm_tests {
    use super::*;

    #[test]
    fn terada_muta_recovers_the_intersection_of_exact_lines() {
        // R = R_sd + (L - dL) rho(V): lines meet at (dL, R_sd) exactly (Terada and Muta 1979).
        let (dl, rsd) = (7.0, 50.0);
        let v = [0.1, 0.2];
        let rho = [40.0, 10.0];
        let ls = [30.0, 60.0, 90.0];
        let cur: Vec<Vec<Option<f64>>> = ls
            .iter()
            .map(|&l| {
                rho.iter()
                    .map(|r| Some(0.05 / (rsd + (l - dl) * r)))
                    .collect()
            })
            .collect();
        let c: Vec<LengthCurve> = ls
            .iter()
            .zip(&cur)
            .map(|(&l, i)| (l, &v[..], &i[..]))
            .collect();
        let t = terada_muta(&c, 0.05, (0.1, 0.2)).unwrap();
        assert!((t.delta_l_nm - dl).abs() < 1e-9 && (t.r_sd_ohm_um - rsd).abs() < 1e-9);
    }
}
