//! Closed-form natural lengths (MODEL.md section 6), thin-layer approximations
//! taking a layered stack through its EOT: they cannot see fringing through a
//! physically thick high-k layer or the buried-oxide path.
//!
//! Convention: the short-channel perturbation decays as exp(-x/lambda).

use crate::device::{Architecture, Scenario};
use std::collections::BTreeMap;

use crate::physics::{Silicon, EPS_SI, EPS_SIO2, Q_OVER_EPS0_V_NM};

/// Single gate, thin body on a thick buried oxide (Yan, Ourmazd and Lee,
/// IEEE Trans. Electron Devices 39(7), 1704, 1992): sqrt((eps_Si/eps_ox) t_Si t_ox).
pub fn single_gate_yan(t_si: f64, eot: f64) -> f64 {
    (EPS_SI / EPS_SIO2 * t_si * eot).sqrt()
}

/// Symmetric double gate (Suzuki et al., IEEE Trans. Electron Devices 40(12), 2326, 1993):
/// sqrt((eps_Si/(2 eps_ox)) t_Si t_ox).
pub fn double_gate_suzuki(t_si: f64, eot: f64) -> f64 {
    (EPS_SI / (2.0 * EPS_SIO2) * t_si * eot).sqrt()
}

/// Equivalent number of gates n (Colinge, Solid-State Electronics 48, 897, 2004;
/// from memory): sqrt(eps_Si t_Si t_ox / (n eps_ox)).
pub fn multi_gate_colinge(t_si: f64, eot: f64, n_gates: f64) -> f64 {
    (EPS_SI * t_si * eot / (n_gates * EPS_SIO2)).sqrt()
}

/// Maximum depletion width of a bulk body, nm (common practice):
/// W_dm = sqrt(4 eps_Si V_T ln(N_A/n_i) / (q N_A)).
/// `na` is the channel doping, nm^-3.
pub fn max_depletion_width_nm(si: &Silicon, na: f64) -> Option<f64> {
    if na <= si.ni {
        return None;
    }
    Some((4.0 * EPS_SI * si.thermal_v * (na / si.ni).ln() / (Q_OVER_EPS0_V_NM * na)).sqrt())
}

/// Name of the bulk headline closed form (Yan 1992 at the maximum depletion width).
const HEADLINE_BULK: &str = "yan-1992-bulk-depletion";

/// The architecture's headline closed form: (formula name, lambda in nm),
/// taken from [`table`].
pub fn natural_length(s: &Scenario) -> Option<(&'static str, f64)> {
    let name = match s.architecture {
        Architecture::DoubleGate => "suzuki-1993-double-gate",
        Architecture::ThinBody => "yan-1992-single-gate",
        Architecture::Bulk => HEADLINE_BULK,
        Architecture::TriGate => "colinge-2004-n3",
        Architecture::GateAllAround => "colinge-2004-n4",
        Architecture::CappedFin => "colinge-2004-n2",
        // A bulk fin is gated on three sides like a tri-gate.
        Architecture::BulkFin => "colinge-2004-n3",
    };
    table(s, None).get(name).map(|&v| (name, v))
}

/// Every applicable closed form for the scenario, nm, keyed by name (the one
/// table of closed forms; [`natural_length`] picks the headline from it). All are
/// EOT-based (the stack enters as SiO2 of thickness EOT, eps_ox = 3.9): they
/// cannot see fringing through a physically thick high-k layer, nor the
/// buried-oxide path. `depth_nm` is the bulk depletion depth used.
pub fn table(s: &Scenario, depth_nm: Option<f64>) -> BTreeMap<String, f64> {
    let eot = s.eot_nm();
    let t = s.geometry.body_thickness_nm;
    let mut m = BTreeMap::new();
    let mut put = |k: &str, v: Option<f64>| {
        if let Some(v) = v.filter(|v| v.is_finite() && *v > 0.0) {
            m.insert(k.to_string(), v);
        }
    };
    match s.architecture {
        Architecture::DoubleGate => {
            put("suzuki-1993-double-gate", Some(double_gate_suzuki(t, eot)));
            put(
                "frank-taur-wong-1998-double-gate-exact",
                ftw_double_gate(t, eot, EPS_SI, EPS_SIO2),
            );
        }
        Architecture::ThinBody => {
            put("yan-1992-single-gate", Some(single_gate_yan(t, eot)));
            put(
                "frank-taur-wong-1998-floating-bottom-exact",
                ftw_single_gate_floating(t, eot, EPS_SI, EPS_SIO2),
            );
        }
        Architecture::Bulk => {
            // A bulk body's depth of gate control is, in the textbook
            // estimate, the maximum depletion width.
            let si = Silicon::at(s.temperature_k);
            if let Some(wdm) = max_depletion_width_nm(&si, s.doping.channel_per_nm3) {
                put(
                    HEADLINE_BULK,
                    Some(single_gate_yan(wdm.min(s.geometry.substrate_depth_nm), eot)),
                );
            }
            if let Some(d) = depth_nm {
                put(
                    "yan-1992-single-gate-depletion-depth",
                    Some(single_gate_yan(d, eot)),
                );
                put(
                    "frank-taur-wong-1998-grounded-exact",
                    ftw_single_gate_grounded(d, eot, EPS_SI, EPS_SIO2),
                );
            }
        }
        Architecture::TriGate | Architecture::BulkFin => {
            put("colinge-2004-n3", Some(multi_gate_colinge(t, eot, 3.0)))
        }
        Architecture::GateAllAround => {
            put("colinge-2004-n4", Some(multi_gate_colinge(t, eot, 4.0)))
        }
        Architecture::CappedFin => put("colinge-2004-n2", Some(multi_gate_colinge(t, eot, 2.0))),
    }
    m
}

/// Root of an increasing function `f` on the open bracket (a, b) by
/// bisection to machine precision; `None` when f does not change sign.
/// Used for the exact one-dimensional conditions below, whose left sides are
/// monotone on the bracket of their lowest root.
pub fn bisect_increasing(f: impl Fn(f64) -> f64, a: f64, b: f64) -> Option<f64> {
    let (mut lo, mut hi) = (a, b);
    // Step in from the bracket ends (poles of tan) until the signs are right.
    let shrink = 1e-13 * (b - a);
    if !(f(lo + shrink) < 0.0 && f(hi - shrink) > 0.0) {
        return None;
    }
    lo += shrink;
    hi -= shrink;
    for _ in 0..300 {
        let mid = 0.5 * (lo + hi);
        if mid <= lo || mid >= hi {
            break;
        }
        if f(mid) < 0.0 {
            lo = mid;
        } else {
            hi = mid;
        }
    }
    Some(0.5 * (lo + hi))
}

/// Exact 1D natural length of a symmetric double gate (Frank, Taur and Wong,
/// IEEE Electron Device Letters 19(10), 385, 1998): lowest root k of
/// `eps_Si tan(k t_Si/2) tan(k t_ox) = eps_ox`, lambda = 1/k (nm).
/// `eps_si` is the body's relative permittivity (11.7 for silicon).
pub fn ftw_double_gate(t_si: f64, t_ox: f64, eps_si: f64, eps_ox: f64) -> Option<f64> {
    let kmax = (std::f64::consts::PI / t_si).min(std::f64::consts::FRAC_PI_2 / t_ox);
    let f = |k: f64| eps_si * (0.5 * k * t_si).tan() * (k * t_ox).tan() - eps_ox;
    bisect_increasing(f, 0.0, kmax).map(|k| 1.0 / k)
}

/// Exact 1D natural length of a single gate over a body of thickness `t_si`
/// with a floating (zero-field) bottom (Frank, Taur and Wong 1998):
/// lowest root of `eps_Si tan(k t_Si) tan(k t_ox) = eps_ox`, nm.
pub fn ftw_single_gate_floating(t_si: f64, t_ox: f64, eps_si: f64, eps_ox: f64) -> Option<f64> {
    let kmax = (std::f64::consts::FRAC_PI_2 / t_si).min(std::f64::consts::FRAC_PI_2 / t_ox);
    let f = |k: f64| eps_si * (k * t_si).tan() * (k * t_ox).tan() - eps_ox;
    bisect_increasing(f, 0.0, kmax).map(|k| 1.0 / k)
}

/// Exact 1D natural length of a single gate over a body of thickness `t_si`
/// on a grounded plane (Frank, Taur and Wong 1998; bulk: t_Si = depletion
/// depth): the root of `eps_Si tan(k t_ox) + eps_ox tan(k t_Si) = 0` with
/// pi/2 < k t_Si < pi, nm. `None` when t_ox >= t_Si (no root in that range
/// below the oxide's first pole).
pub fn ftw_single_gate_grounded(t_si: f64, t_ox: f64, eps_si: f64, eps_ox: f64) -> Option<f64> {
    if t_ox >= t_si {
        return None;
    }
    let lo = std::f64::consts::FRAC_PI_2 / t_si;
    let hi = (std::f64::consts::PI / t_si).min(std::f64::consts::FRAC_PI_2 / t_ox);
    let f = |k: f64| eps_si * (k * t_ox).tan() + eps_ox * (k * t_si).tan();
    bisect_increasing(f, lo, hi).map(|k| 1.0 / k)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn exact_conditions_reduce_to_the_thin_layer_closed_forms() {
        // With tan x ~ x the double-gate condition gives k^2 t_Si t_ox / 2 = eps_ox/eps_Si,
        // i.e. Suzuki 1993; the floating single gate gives Yan 1992. Check the roots
        // approach them when eps_ox/eps_Si -> 0 (the only way both k t_Si and k t_ox shrink).
        let eps_ox = 3.9e-4;
        let dg = ftw_double_gate(8.0, 1.0, EPS_SI, eps_ox).unwrap();
        let suz = (EPS_SI / (2.0 * eps_ox) * 8.0 * 1.0).sqrt();
        assert!((dg / suz - 1.0).abs() < 1e-4, "{dg} {suz}");
        let sg = ftw_single_gate_floating(8.0, 1.0, EPS_SI, eps_ox).unwrap();
        let yan = (EPS_SI / eps_ox * 8.0 * 1.0).sqrt();
        assert!((sg / yan - 1.0).abs() < 1e-4, "{sg} {yan}");
        // Grounded plane, thin oxide: Lambda = pi lambda close to t_Si + (eps_Si/eps_ox) t_ox
        // (MODEL.md section 6, Frank, Taur and Wong 1998).
        let g = ftw_single_gate_grounded(30.0, 0.1, EPS_SI, EPS_SIO2).unwrap();
        let approx = (30.0 + EPS_SI / EPS_SIO2 * 0.1) / std::f64::consts::PI;
        assert!((g / approx - 1.0).abs() < 2e-3, "{g} {approx}");
    }
}
