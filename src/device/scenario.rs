//! The checked, unit-converted description of one device: what the solver sees.
//!
//! Internal units (those of [`crate::physics`]): lengths nm, potentials V,
//! energies eV, densities nm^-3, mobility nm^2/(V s), currents A. The device
//! file's cm^-3 and cm^2/(V s) are converted once, in validation; nothing
//! downstream converts them again.

use serde::Serialize;

/// Device architecture (serialised as the contract's names).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum Architecture {
    Bulk,
    ThinBody,
    DoubleGate,
    TriGate,
    GateAllAround,
    /// A fin gated on its two sides only, under a thick dielectric cap.
    CappedFin,
    /// A tri-gated fin on a bulk substrate: a sub-fin through an isolation
    /// oxide down to substrate silicon with a contact on its bottom face.
    BulkFin,
}

impl Architecture {
    pub const ALL: [Architecture; 7] = [
        Architecture::Bulk,
        Architecture::ThinBody,
        Architecture::DoubleGate,
        Architecture::TriGate,
        Architecture::GateAllAround,
        Architecture::CappedFin,
        Architecture::BulkFin,
    ];

    pub fn name(&self) -> &'static str {
        match self {
            Architecture::Bulk => "bulk",
            Architecture::ThinBody => "thin-body",
            Architecture::DoubleGate => "double-gate",
            Architecture::TriGate => "tri-gate",
            Architecture::GateAllAround => "gate-all-around",
            Architecture::CappedFin => "capped-fin",
            Architecture::BulkFin => "bulk-fin",
        }
    }

    pub fn from_name(s: &str) -> Option<Self> {
        Self::ALL.into_iter().find(|a| a.name() == s)
    }

    /// Solved as a 2D along-channel cross-section.
    pub fn is_planar(&self) -> bool {
        matches!(
            self,
            Architecture::Bulk | Architecture::ThinBody | Architecture::DoubleGate
        )
    }

    /// Fin or wire: analysed through the cross-section perpendicular to the channel.
    pub fn is_fin(&self) -> bool {
        !self.is_planar()
    }
}

impl std::fmt::Display for Architecture {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(self.name())
    }
}

/// Channel polarity (serialised as "n" or "p").
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum Polarity {
    N,
    P,
}

impl Polarity {
    /// +1 for n-channel, -1 for p-channel.
    pub fn sign(&self) -> f64 {
        match self {
            Polarity::N => 1.0,
            Polarity::P => -1.0,
        }
    }

    pub fn name(&self) -> &'static str {
        match self {
            Polarity::N => "n",
            Polarity::P => "p",
        }
    }
}

impl std::fmt::Display for Polarity {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(self.name())
    }
}

impl Serialize for Architecture {
    fn serialize<S: serde::Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        s.serialize_str(self.name())
    }
}

impl Serialize for Polarity {
    fn serialize<S: serde::Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        s.serialize_str(self.name())
    }
}

/// One gate-stack layer, from the channel outward.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct StackLayer {
    /// Material name, or "eps=<value>" when given by permittivity.
    pub material: String,
    pub eps_r: f64,
    pub thickness_nm: f64,
}

/// Geometry, nm.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Geometry {
    pub gate_length_nm: f64,
    /// Silicon thickness (thin-body, double-gate) or fin/wire width (fins).
    pub body_thickness_nm: f64,
    pub fin_height_nm: f64,
    pub fin_pitch_nm: f64,
    pub box_thickness_nm: f64,
    pub source_drain_length_nm: f64,
    pub junction_depth_nm: f64,
    pub substrate_depth_nm: f64,
    pub gate_height_nm: f64,
    pub spacer_eps: f64,
    pub spacer_material: String,
    pub box_eps: f64,
    /// Capped fin: dielectric cap thickness on the fin top.
    pub cap_thickness_nm: f64,
    pub cap_eps: f64,
    /// Bulk fin: isolation oxide beside the sub-fin, below the gated fin, nm.
    pub isolation_depth_nm: f64,
    /// Contact plugs beside the gate (planar sections); None: the section
    /// without plugs, its ohmic contacts on the outer silicon faces.
    pub contacts: Option<Contacts>,
}

/// Contact plugs of a planar along-channel section (one period of the
/// contacted gate pitch: half a plug, spacer, gate, spacer, half a plug).
/// The source/drain silicon is `spacer_thickness_nm + contact_width_nm / 2`
/// long; the ohmic contact is the silicon surface under each plug.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Contacts {
    /// Spacer between the gate electrode and each plug, nm.
    pub spacer_thickness_nm: f64,
    /// Full width of one plug (the section holds half of each), nm.
    pub contact_width_nm: f64,
}

impl Contacts {
    /// Source (or drain) silicon length beyond the gate edge, nm.
    pub fn source_drain_length_nm(&self) -> f64 {
        self.spacer_thickness_nm + 0.5 * self.contact_width_nm
    }

    /// Contacted gate pitch for gate length `gate_length_nm`, nm.
    pub fn pitch_nm(&self, gate_length_nm: f64) -> f64 {
        gate_length_nm + 2.0 * self.spacer_thickness_nm + self.contact_width_nm
    }
}

/// Gate electrodes.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Gate {
    pub workfunction_ev: f64,
    pub back_workfunction_ev: f64,
    pub back_bias_v: f64,
}

/// Doping in internal units (the file's cm^-3 converted once, at validation).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Doping {
    /// Channel dopant density (acceptors for n, donors for p), nm^-3.
    pub channel_per_nm3: f64,
    /// Source/drain dopant density, nm^-3.
    pub source_drain_per_nm3: f64,
    /// > 0: junctions extend under the gate.
    pub junction_offset_nm: f64,
    /// 0: abrupt; else a decade per this length.
    pub junction_gradient_nm_per_decade: f64,
    /// Bulk fin: dopant density of the sub-fin and substrate (the
    /// punch-through stopper, same type as the channel), nm^-3.
    pub subfin_per_nm3: f64,
}

/// Bias plan, V, as the user typed it (for p-channel devices these are negative).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Bias {
    pub vds_lin_v: f64,
    pub vds_sat_v: f64,
    pub vgs_start_v: f64,
    pub vgs_stop_v: f64,
    pub vgs_step_v: f64,
    pub off_vgs_v: f64,
    /// Which gate voltages are solved (`bias.points`).
    pub points: BiasPoints,
    /// Extend the gate range by itself when it does not reach the threshold
    /// current, the SS window or the off-state point (`bias.auto_extend`).
    pub auto_extend: bool,
    /// Furthest the range may be extended beyond each end, V (`bias.extend_limit_V`).
    pub extend_limit_v: f64,
}

/// Which gate voltages of the grid `vgs_start_V + k vgs_step_V` a drain sweep solves.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum BiasPoints {
    /// Adaptive unless an output needs the whole curve (`run --curves`,
    /// `run --plots`, sweep files, which store curves): the default.
    Auto,
    /// Only the grid points the extraction needs: the threshold bracket, the
    /// SS window and one point below it, and the off-state point.
    Adaptive,
    /// Every grid point (the whole I_D-V_G curve).
    Grid,
}

impl BiasPoints {
    /// The stable string of the device-file key `bias.points`.
    pub fn as_str(self) -> &'static str {
        match self {
            BiasPoints::Auto => "auto",
            BiasPoints::Adaptive => "adaptive",
            BiasPoints::Grid => "grid",
        }
    }

    /// What `auto` becomes when the caller stores or draws the whole curve.
    pub fn with_whole_curve(self) -> Self {
        match self {
            BiasPoints::Auto => BiasPoints::Grid,
            other => other,
        }
    }
}

impl Bias {
    /// Gate voltages from start to stop in steps (stop included when it falls on the grid).
    pub fn gate_voltages(&self) -> Vec<f64> {
        let n = ((self.vgs_stop_v - self.vgs_start_v) / self.vgs_step_v + 1e-9).floor() as usize;
        (0..=n)
            .map(|k| self.vgs_start_v + k as f64 * self.vgs_step_v)
            .collect()
    }
}

/// Extraction settings.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Extraction {
    /// I_cc in V_t: I_D = I_cc W / L_g, A.
    pub current_criterion_a: f64,
    /// Constant mobility, nm^2/(V s) (the file's cm^2/(V s) converted at validation).
    pub mobility_nm2_per_vs: f64,
    /// Virtual-source injection velocity for the on-current estimate, nm/s
    /// (the file's cm/s converted at validation).
    pub injection_velocity_nm_per_s: f64,
}

/// Mesh settings.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct MeshSettings {
    pub max_step_nm: f64,
    /// Every step divided by this (1: default mesh; 2: twice as fine).
    pub refinement: f64,
    /// Node budget: a scenario whose estimated mesh is larger is refused
    /// before anything is built ([`super::check_size`]); key `mesh.max_nodes`.
    pub max_nodes: f64,
    /// Cell-to-cell growth ratio away from the channel, interfaces and junctions (`mesh.growth`).
    pub growth: f64,
    /// Largest cell far from the channel, interfaces and junctions, nm (`mesh.max_far_step_nm`).
    pub max_far_step_nm: f64,
}

/// How fins and wires are evaluated (planar devices are always solved in 2D).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Default)]
pub enum FinMethod {
    /// The 3D solve along the channel ("3d-solve", the default).
    #[default]
    Solve3d,
    /// The cross-section and the Liu et al. 1993 theory alone ("theory"): for very large sweeps.
    Theory,
}

impl FinMethod {
    pub fn name(&self) -> &'static str {
        match self {
            FinMethod::Solve3d => "3d-solve",
            FinMethod::Theory => "theory",
        }
    }

    pub fn from_name(s: &str) -> Option<Self> {
        [FinMethod::Solve3d, FinMethod::Theory]
            .into_iter()
            .find(|m| m.name() == s)
    }
}

/// A validated device, ready for the solver.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Scenario {
    pub name: String,
    pub architecture: Architecture,
    pub polarity: Polarity,
    pub temperature_k: f64,
    pub geometry: Geometry,
    pub stack: Vec<StackLayer>,
    pub gate: Gate,
    pub doping: Doping,
    pub bias: Bias,
    pub extraction: Extraction,
    pub mesh: MeshSettings,
    /// Fins and wires: 3D solve or theory alone (set by the caller: the
    /// `--fins` option or the plan key `fins`; not a device-file key).
    #[serde(skip)]
    pub fin_method: FinMethod,
    /// Warnings raised during validation (keys without effect, etc.).
    pub warnings: Vec<String>,
}

impl Scenario {
    /// Physical thickness of the gate stack, nm.
    pub fn stack_thickness_nm(&self) -> f64 {
        self.stack.iter().map(|l| l.thickness_nm).sum()
    }

    /// Equivalent oxide thickness, nm: 3.9 sum(t_i / eps_i).
    pub fn eot_nm(&self) -> f64 {
        crate::physics::EPS_SIO2
            * self
                .stack
                .iter()
                .map(|l| l.thickness_nm / l.eps_r)
                .sum::<f64>()
    }

    /// Gate oxide capacitance per area, F/cm^2 (series stack).
    pub fn cox_f_per_cm2(&self) -> f64 {
        crate::physics::EPS0_F_PER_M * 1e-2 * crate::physics::EPS_SIO2 / (self.eot_nm() * 1e-7)
    }
}

impl Scenario {
    /// The same device at another gate length, with the length-dependent
    /// rules of the device file re-checked.
    pub fn with_gate_length(&self, gate_length_nm: f64) -> Result<Scenario, super::DeviceError> {
        super::check_gate_length(gate_length_nm, &self.mesh, self.doping.junction_offset_nm)?;
        let mut s = self.clone();
        s.geometry.gate_length_nm = gate_length_nm;
        super::check_size(&s)?;
        Ok(s)
    }

    /// True when `other` has the same cross-section as `self`: everything but
    /// the gate length, the name and the validation warnings is equal, so the
    /// length-independent results (long-channel reference, numeric natural
    /// length, fin cross-section) of one serve the other.
    pub fn same_cross_section(&self, other: &Scenario) -> bool {
        let blank = |s: &Scenario| {
            let mut c = s.clone();
            c.name.clear();
            c.warnings.clear();
            c.geometry.gate_length_nm = 0.0;
            c
        };
        blank(self) == blank(other)
    }
}
