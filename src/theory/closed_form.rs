//! Closed-form natural lengths (MODEL.md section 6), thin-layer approximations
//! taking a layered stack through its EOT: they cannot see fringing through a
//! physically thick high-k layer or the buried-oxide path.
//!
//! Convention: the short-channel perturbation decays as exp(-x/lambda).

use crate::device::{Architecture, Scenario};
use crate::physics::{Silicon, EPS_SI, EPS_SIO2, PER_CM3_TO_PER_NM3, Q_OVER_EPS0_V_NM};

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
pub fn max_depletion_width_nm(si: &Silicon, channel_cm3: f64) -> Option<f64> {
    let na = channel_cm3 * PER_CM3_TO_PER_NM3;
    if na <= si.ni {
        return None;
    }
    Some((4.0 * EPS_SI * si.vt * (na / si.ni).ln() / (Q_OVER_EPS0_V_NM * na)).sqrt())
}

/// The architecture's headline closed form: (formula name, lambda in nm).
pub fn natural_length(s: &Scenario) -> Option<(&'static str, f64)> {
    let eot = s.eot_nm();
    let t = s.geometry.body_thickness_nm;
    match s.architecture {
        Architecture::DoubleGate => Some(("suzuki-1993-double-gate", double_gate_suzuki(t, eot))),
        Architecture::ThinBody => Some(("yan-1992-single-gate", single_gate_yan(t, eot))),
        Architecture::Bulk => {
            let si = Silicon::at(s.temperature_k);
            // A bulk body's depth of gate control is the maximum depletion width.
            let wdm = max_depletion_width_nm(&si, s.doping.channel_cm3)?;
            Some((
                "yan-1992-bulk-depletion",
                single_gate_yan(wdm.min(s.geometry.substrate_depth_nm), eot),
            ))
        }
        Architecture::TriGate => Some(("colinge-2004-n3", multi_gate_colinge(t, eot, 3.0))),
        Architecture::GateAllAround => Some(("colinge-2004-n4", multi_gate_colinge(t, eot, 4.0))),
        Architecture::CappedFin => Some(("colinge-2004-n2", multi_gate_colinge(t, eot, 2.0))),
    }
}
