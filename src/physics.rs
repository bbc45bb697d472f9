//! Physical constants, materials and silicon's temperature model.
//!
//! Internal unit system (used by every numerical module):
//! - length: nm
//! - potential: V (energies in eV are the same numbers)
//! - concentration: nm^-3 (1 cm^-3 = 1e-21 nm^-3)
//! - permittivity: relative (eps_r); Poisson reads
//!   `div(eps_r grad psi) = -(q/eps0) rho` with `q/eps0` in V nm ([`Q_OVER_EPS0_V_NM`]).
//!
//! Conversions happen only at the edges (device-file parsing and outputs).

/// Elementary charge, C (CODATA 2018, exact).
pub const Q_C: f64 = 1.602176634e-19;
/// Boltzmann constant, J/K (CODATA 2018, exact).
pub const K_B_J_PER_K: f64 = 1.380649e-23;
/// Vacuum permittivity, F/m (CODATA 2018).
pub const EPS0_F_PER_M: f64 = 8.8541878128e-12;
/// Vacuum permittivity, F/nm.
pub const EPS0_F_PER_NM: f64 = EPS0_F_PER_M * 1e-9;
/// q/eps0 in V nm: the source strength of one elementary charge per nm^3.
pub const Q_OVER_EPS0_V_NM: f64 = Q_C / EPS0_F_PER_NM;
/// cm^-3 to nm^-3.
pub const PER_CM3_TO_PER_NM3: f64 = 1e-21;
/// cm^2/(V s) to nm^2/(V s).
pub const CM2_TO_NM2: f64 = 1e14;

/// Silicon relative permittivity (MODEL.md table).
pub const EPS_SI: f64 = 11.7;
/// Silicon dioxide relative permittivity (common practice).
pub const EPS_SIO2: f64 = 3.9;
/// Silicon electron affinity, eV.
pub const CHI_SI_EV: f64 = 4.05;
/// Silicon band gap at 300 K, eV.
pub const EG_SI_300_EV: f64 = 1.12;
/// Silicon intrinsic density at 300 K, cm^-3 (Sproul and Green, J. Appl. Phys. 70, 846, 1991).
pub const NI_SI_300_CM3: f64 = 1.0e10;

/// Thermal voltage k_B T / q in V.
pub fn thermal_voltage(temperature_k: f64) -> f64 {
    K_B_J_PER_K * temperature_k / Q_C
}

/// Varshni term with Thurmond's silicon parameters (J. Electrochem. Soc. 122, 1133, 1975).
fn varshni_ev(t: f64) -> f64 {
    1.170 - 4.73e-4 * t * t / (t + 636.0)
}

/// Silicon band gap in eV: 1.12 eV at 300 K shifted by Varshni's law.
pub fn band_gap_ev(temperature_k: f64) -> f64 {
    EG_SI_300_EV + varshni_ev(temperature_k) - varshni_ev(300.0)
}

/// Intrinsic density in cm^-3 (common practice scaling from the 300 K value).
pub fn intrinsic_density_cm3(temperature_k: f64) -> f64 {
    let kt300 = K_B_J_PER_K * 300.0 / Q_C;
    let kt = thermal_voltage(temperature_k);
    NI_SI_300_CM3
        * (temperature_k / 300.0).powf(1.5)
        * (EG_SI_300_EV / (2.0 * kt300) - band_gap_ev(temperature_k) / (2.0 * kt)).exp()
}

/// Silicon at one temperature: everything the solver needs, in internal units.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Silicon {
    pub temperature_k: f64,
    /// Thermal voltage, V.
    pub thermal_v: f64,
    /// Band gap, eV.
    pub eg_ev: f64,
    /// Intrinsic density, nm^-3.
    pub ni: f64,
    /// Intrinsic-level work function chi + E_g/2 (midgap approximation), eV.
    pub phi_i_ev: f64,
}

impl Silicon {
    pub fn at(temperature_k: f64) -> Self {
        let eg = band_gap_ev(temperature_k);
        Silicon {
            temperature_k,
            thermal_v: thermal_voltage(temperature_k),
            eg_ev: eg,
            ni: intrinsic_density_cm3(temperature_k) * PER_CM3_TO_PER_NM3,
            phi_i_ev: CHI_SI_EV + 0.5 * eg,
        }
    }

    /// Potential of a metal electrode at `bias_v` with work function `wf_ev`: V - (W_M - Phi_i)/q.
    pub fn electrode_potential(&self, bias_v: f64, wf_ev: f64) -> f64 {
        bias_v - (wf_ev - self.phi_i_ev)
    }

    /// Ohmic-contact potential for net doping `net` (nm^-3) at quasi-Fermi level `v`.
    pub fn ohmic_potential(&self, v: f64, net: f64) -> f64 {
        v + self.thermal_v * (net / (2.0 * self.ni)).asinh()
    }
}

/// Known dielectric materials and their relative permittivity.
pub fn dielectric_permittivity(name: &str) -> Option<f64> {
    match name {
        "SiO2" => Some(EPS_SIO2), // common practice
        "Si3N4" => Some(7.5),     // common practice (spacers)
        "Al2O3" => Some(9.0),     // common practice, from memory
        "HfO2" => Some(22.0),     // common practice; 20-25 reported by phase; from memory
        "air" | "vacuum" => Some(1.0),
        // Carbon-doped oxide, the usual low-k spacer: 2.7-3.3 reported; 3.0 common practice.
        "SiOC" => Some(3.0),
        _ => None,
    }
}

/// Names accepted by [`dielectric_permittivity`].
pub const KNOWN_DIELECTRICS: &[&str] = &["SiO2", "Si3N4", "Al2O3", "HfO2", "air", "vacuum", "SiOC"];

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn thermal_voltage_at_300k_matches_model_md() {
        // MODEL.md section 1: 0.025852 V at 300 K (CODATA 2018 constants).
        assert!((thermal_voltage(300.0) - 0.025852).abs() < 1e-6);
    }

    #[test]
    fn q_over_eps0_in_v_nm() {
        // 1.602176634e-19 / 8.8541878128e-21 = 18.0951 V nm.
        assert!((Q_OVER_EPS0_V_NM - 18.09512).abs() < 1e-4);
    }

    #[test]
    fn temperature_model_is_anchored_at_300k() {
        assert!((band_gap_ev(300.0) - 1.12).abs() < 1e-12);
        assert!((intrinsic_density_cm3(300.0) - 1.0e10).abs() < 1e-2);
        // Band gap shrinks and n_i grows with temperature.
        assert!(band_gap_ev(400.0) < 1.12);
        let ni400 = intrinsic_density_cm3(400.0);
        // Order of magnitude from memory: about 4-8e12 cm^-3 at 400 K.
        assert!(ni400 > 1e12 && ni400 < 1e13, "{ni400}");
    }
}
