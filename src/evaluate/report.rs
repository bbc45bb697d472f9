//! The one result type of a device ([`DeviceReport`], the `run --json`
//! contract), its scalar figures ([`SCALARS`], from which every list of
//! figure names is derived), and the small enums that outputs serialise to
//! stable strings: [`Status`], [`Method`].

use serde::Serialize;

use crate::device::{Architecture, Polarity};

/// The standing caution printed with every result.
pub const CAUTION: &str =
    "Screening-level estimate: classical (Boltzmann) carriers, no quantum confinement, \
no velocity saturation, constant mobility, quasi-Fermi level uniform over each cross-section. \
Use it to rank geometries before full device simulation; it is not a sign-off figure: defer to \
calibrated device simulation and measured silicon.";

/// Whether a result is complete: "ok", or why something is missing.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum Status {
    Ok,
    /// The reason a figure or point is missing, in words.
    Failed(String),
}

impl Status {
    /// Ok when `problems` is empty, else the problems joined.
    pub fn from_problems(problems: &[String]) -> Status {
        if problems.is_empty() {
            Status::Ok
        } else {
            Status::Failed(problems.join("; "))
        }
    }

    /// The stored form: "ok" or the reason.
    pub fn parse(text: &str) -> Status {
        if text == "ok" {
            Status::Ok
        } else {
            Status::Failed(text.to_string())
        }
    }

    pub fn is_ok(&self) -> bool {
        *self == Status::Ok
    }

    /// "ok" or the reason.
    pub fn as_str(&self) -> &str {
        match self {
            Status::Ok => "ok",
            Status::Failed(why) => why,
        }
    }
}

impl std::fmt::Display for Status {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(self.as_str())
    }
}

impl Serialize for Status {
    fn serialize<S: serde::Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        s.serialize_str(self.as_str())
    }
}

/// How a device's short-channel figures were obtained.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum Method {
    /// The 2D along-channel nonlinear Poisson solve at both drain biases ("2d-solve").
    TwoDSolve,
    /// Fins and wires: the 3D nonlinear Poisson solve along the channel at
    /// both drain biases ("3d-solve").
    ThreeDSolve,
    /// Fins and wires: the long-channel cross-section solve with the Liu et
    /// al. 1993 model from the numeric natural length ("theory").
    Theory,
}

impl Method {
    pub fn name(&self) -> &'static str {
        match self {
            Method::TwoDSolve => "2d-solve",
            Method::ThreeDSolve => "3d-solve",
            Method::Theory => "theory",
        }
    }

    /// One line on what the method is.
    pub fn describe(&self) -> &'static str {
        match self {
            Method::TwoDSolve => "2D along-channel nonlinear Poisson solve at both drain biases",
            Method::ThreeDSolve => {
                "3D nonlinear Poisson solve of the fin or wire along the channel at both drain biases"
            }
            Method::Theory => {
                "long-channel cross-section solve; short-channel figures are THEORY \
                 (Liu et al. 1993 with the numeric natural length)"
            }
        }
    }
}

impl std::fmt::Display for Method {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(self.name())
    }
}

impl Serialize for Method {
    fn serialize<S: serde::Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        s.serialize_str(self.name())
    }
}

/// The JSON-facing result of one device (key names are a contract).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct DeviceReport {
    pub name: String,
    pub architecture: Architecture,
    pub polarity: Polarity,
    #[serde(rename = "temperature_K")]
    pub temperature_k: f64,
    pub gate_length_nm: f64,
    pub l_met_nm: f64,
    pub eot_nm: f64,
    #[serde(rename = "vt_lin_V")]
    pub vt_lin_v: Option<f64>,
    #[serde(rename = "vt_sat_V")]
    pub vt_sat_v: Option<f64>,
    #[serde(rename = "ss_lin_mV_per_dec")]
    pub ss_lin_mv_per_dec: Option<f64>,
    #[serde(rename = "ss_sat_mV_per_dec")]
    pub ss_sat_mv_per_dec: Option<f64>,
    #[serde(rename = "dibl_mV_per_V")]
    pub dibl_mv_per_v: Option<f64>,
    /// Constant-current DIBL of a long device (not subtracted), mV/V.
    #[serde(rename = "dibl_long_floor_mV_per_V")]
    pub dibl_long_floor_mv_per_v: Option<f64>,
    #[serde(rename = "vt_long_V")]
    pub vt_long_v: Option<f64>,
    #[serde(rename = "ss_long_mV_per_dec")]
    pub ss_long_mv_per_dec: Option<f64>,
    #[serde(rename = "vt_rolloff_mV")]
    pub vt_rolloff_mv: Option<f64>,
    #[serde(rename = "barrier_lin_eV")]
    pub barrier_lin_ev: Option<f64>,
    #[serde(rename = "barrier_sat_eV")]
    pub barrier_sat_ev: Option<f64>,
    #[serde(rename = "barrier_lowering_meV")]
    pub barrier_lowering_mev: Option<f64>,
    pub leakiest_depth_nm: Option<f64>,
    /// 3D fins and wires: the leakiest line's position across the fin (y, 0 at
    /// its centre) and below the top silicon surface (z), nm, at V_DS,sat.
    pub leakiest_y_nm: Option<f64>,
    pub leakiest_z_nm: Option<f64>,
    pub natural_length_nm: Option<f64>,
    pub natural_length_formula: Option<String>,
    /// Numeric natural length of the stack (planar) or cross-section (fins), nm.
    pub lambda_numeric_nm: Option<f64>,
    /// The Liu et al. (IEEE TED 40(1), 86, 1993) model with the numeric natural
    /// length at this gate length, beside the figures (computed with them, so
    /// that plots draw it from the stored data).
    #[serde(rename = "theory_rolloff_mV")]
    pub theory_rolloff_mv: Option<f64>,
    #[serde(rename = "theory_dibl_mV_per_V")]
    pub theory_dibl_mv_per_v: Option<f64>,
    #[serde(rename = "theory_ss_mV_per_dec")]
    pub theory_ss_mv_per_dec: Option<f64>,
    /// Electrical channel length N_top int dx/N at V_DS,lin, two decades
    /// below the threshold current, nm (`extract::electrical_length`; planar solves only).
    pub l_elec_nm: Option<f64>,
    /// The part of the roll-off from the barrier-top density against the long channel, mV.
    #[serde(rename = "vt_rolloff_electrostatic_mV")]
    pub vt_rolloff_electrostatic_mv: Option<f64>,
    /// The electrical-length part SS_lin log10(L_elec / L_g), mV (negative when L_elec < L_g).
    #[serde(rename = "vt_rolloff_length_mV")]
    pub vt_rolloff_length_mv: Option<f64>,
    /// Off-state current at V_GS = bias.off_vgs_V and V_DS,sat, A/um (signed like the curves).
    #[serde(rename = "ioff_A_per_um")]
    pub ioff_a_per_um: Option<f64>,
    /// N_top int dx/N at V_t,lin itself (the channel charge there makes the
    /// potential follow the quasi-Fermi level a little), nm.
    pub l_elec_at_vt_nm: Option<f64>,
    /// Roll-off minus its two parts, mV: (SS_long - SS_lin) log10(L_elec/L_g)
    /// + SS_long log10(l_elec_at_vt / L_elec), plus the V_t interpolation error.
    #[serde(rename = "vt_rolloff_residual_mV")]
    pub vt_rolloff_residual_mv: Option<f64>,
    /// The gate voltage of I_off and of the barriers (`bias.off_vgs_V`), V.
    #[serde(rename = "off_vgs_V")]
    pub off_vgs_v: f64,
    /// Gate capacitances per um of width, off and on, at V_DS = 0 (planar
    /// devices; see [`crate::evaluate::capacitance`]).
    pub capacitance: Option<crate::evaluate::capacitance::CapacitanceFigures>,
    /// Screening estimate of the on-current (virtual-source form), A/um.
    #[serde(rename = "ion_A_per_um")]
    pub ion_a_per_um: Option<f64>,
    /// Screening estimate of the delay (C_gg + 2 C_gc) V_DD / I_on, ps.
    pub tau_ps: Option<f64>,
    pub method: Method,
    pub converged: bool,
    pub nodes: usize,
    pub unknowns: usize,
    pub newton_steps_total: usize,
    pub factorisations_total: usize,
    /// The linear solver of the Newton steps: "cholesky" (sparse direct; its
    /// factorisations are counted) or "multigrid-cg" (large 3D meshes; the
    /// count is of preconditioner refreshes); absent for theory devices.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub linear_solver: Option<&'static str>,
    pub bias_points: usize,
    #[serde(rename = "vds_lin_V")]
    pub vds_lin_v: f64,
    #[serde(rename = "vds_sat_V")]
    pub vds_sat_v: f64,
    #[serde(rename = "current_criterion_A")]
    pub current_criterion_a: f64,
    #[serde(rename = "threshold_current_A_per_um")]
    pub threshold_current_a_per_um: f64,
    /// Gate voltages of the curves, ascending, V.
    #[serde(rename = "vgs_V")]
    pub vgs_v: Vec<f64>,
    /// Drain current per um of gate width at V_DS,lin (signed; null: not converged).
    pub id_lin: Vec<Option<f64>>,
    pub id_sat: Vec<Option<f64>>,
    pub current_unit: String,
    /// Why any figure above is null.
    pub problems: Vec<String>,
    pub warnings: Vec<String>,
    pub caution: String,
}

/// Reads one scalar figure of a report.
type Scalar = fn(&DeviceReport) -> Option<f64>;

/// The scalar figures (name with unit as in the JSON contract, reader), in
/// the contract's order. Every list of figure names (sweep columns, the
/// columns of a shard whose points all failed) is derived from this table.
pub const SCALARS: &[(&str, Scalar)] = &[
    ("gate_length_nm", |r| Some(r.gate_length_nm)),
    ("l_met_nm", |r| Some(r.l_met_nm)),
    ("eot_nm", |r| Some(r.eot_nm)),
    ("vt_lin_V", |r| r.vt_lin_v),
    ("vt_sat_V", |r| r.vt_sat_v),
    ("ss_lin_mV_per_dec", |r| r.ss_lin_mv_per_dec),
    ("ss_sat_mV_per_dec", |r| r.ss_sat_mv_per_dec),
    ("dibl_mV_per_V", |r| r.dibl_mv_per_v),
    ("dibl_long_floor_mV_per_V", |r| r.dibl_long_floor_mv_per_v),
    ("vt_long_V", |r| r.vt_long_v),
    ("ss_long_mV_per_dec", |r| r.ss_long_mv_per_dec),
    ("vt_rolloff_mV", |r| r.vt_rolloff_mv),
    ("barrier_lin_eV", |r| r.barrier_lin_ev),
    ("barrier_sat_eV", |r| r.barrier_sat_ev),
    ("barrier_lowering_meV", |r| r.barrier_lowering_mev),
    ("leakiest_depth_nm", |r| r.leakiest_depth_nm),
    ("leakiest_y_nm", |r| r.leakiest_y_nm),
    ("leakiest_z_nm", |r| r.leakiest_z_nm),
    ("natural_length_nm", |r| r.natural_length_nm),
    ("lambda_numeric_nm", |r| r.lambda_numeric_nm),
    ("theory_rolloff_mV", |r| r.theory_rolloff_mv),
    ("theory_dibl_mV_per_V", |r| r.theory_dibl_mv_per_v),
    ("theory_ss_mV_per_dec", |r| r.theory_ss_mv_per_dec),
    ("l_elec_nm", |r| r.l_elec_nm),
    ("vt_rolloff_electrostatic_mV", |r| {
        r.vt_rolloff_electrostatic_mv
    }),
    ("vt_rolloff_length_mV", |r| r.vt_rolloff_length_mv),
    ("ioff_A_per_um", |r| r.ioff_a_per_um),
    ("c_gg_off_F_per_um", |r| {
        r.capacitance.as_ref().map(|c| c.off.gate_total)
    }),
    ("c_gc_off_F_per_um", |r| {
        r.capacitance.as_ref().map(|c| c.off.gate_contact)
    }),
    ("c_gsd_off_F_per_um", |r| {
        r.capacitance.as_ref().map(|c| c.off.gate_source_drain)
    }),
    ("c_gch_off_F_per_um", |r| {
        r.capacitance.as_ref().map(|c| c.off.gate_channel)
    }),
    ("c_gg_on_F_per_um", |r| {
        r.capacitance.as_ref().map(|c| c.on.gate_total)
    }),
    ("c_gc_on_F_per_um", |r| {
        r.capacitance.as_ref().map(|c| c.on.gate_contact)
    }),
    ("c_gsd_on_F_per_um", |r| {
        r.capacitance.as_ref().map(|c| c.on.gate_source_drain)
    }),
    ("c_gch_on_F_per_um", |r| {
        r.capacitance.as_ref().map(|c| c.on.gate_channel)
    }),
    ("ion_A_per_um", |r| r.ion_a_per_um),
    ("tau_ps", |r| r.tau_ps),
];

impl DeviceReport {
    /// The scalar figures (name with unit, value), in the order of [`SCALARS`].
    pub fn scalars(&self) -> Vec<(&'static str, Option<f64>)> {
        SCALARS.iter().map(|(n, f)| (*n, f(self))).collect()
    }

    /// The names of [`DeviceReport::scalars`], without a report.
    pub fn scalar_names() -> impl Iterator<Item = &'static str> {
        SCALARS.iter().map(|(n, _)| *n)
    }

    /// "ok" when every figure is there and every bias point converged, else why not.
    pub fn status(&self) -> Status {
        if !self.problems.is_empty() {
            Status::from_problems(&self.problems)
        } else if !self.converged {
            Status::Failed("some bias points did not converge".into())
        } else {
            Status::Ok
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn statuses_and_methods_keep_their_strings() {
        assert_eq!(Status::parse("ok"), Status::Ok);
        assert_eq!(Status::parse("x failed").as_str(), "x failed");
        assert_eq!(
            serde_json::to_string(&Status::Failed("why".into())).unwrap(),
            "\"why\""
        );
        assert_eq!(
            serde_json::to_string(&Method::TwoDSolve).unwrap(),
            "\"2d-solve\""
        );
        assert_eq!(
            serde_json::to_string(&Method::Theory).unwrap(),
            "\"theory\""
        );
        let names: Vec<&str> = DeviceReport::scalar_names().collect();
        assert_eq!(names.len(), SCALARS.len());
        assert!(names.contains(&"lambda_numeric_nm"));
    }
}
