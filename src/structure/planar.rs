//! Planar devices (bulk, thin-body, double-gate): the along-channel
//! cross-section (DEVICE-FORMAT.md geometry), its doping, and the 1D
//! long-channel column at mid-channel.
//!
//! Coordinates: x from the source contact to the drain contact, y downward from
//! the top silicon surface, nm. Electrode [`GATE`] is the gate (both gates of a double
//! gate), [`BACK_PLANE`] the thin-body back plane. Contacts: [`SOURCE`], [`DRAIN`],
//! and the bulk [`SUBSTRATE`].

use super::{
    lookup, BACK_PLANE, DRAIN, FINE_INTERFACE_NM, FINE_JUNCTION_NM, FINE_OTHER_NM, GATE,
    PLUG_DRAIN, PLUG_SOURCE, SOURCE, SUBSTRATE,
};
use crate::device::{Architecture, Polarity, Scenario};
use crate::discretize::{CellKind, Problem};
use crate::mesh::{zoned_line, FarRule, Line, CORE_MARGIN_NM};
use crate::physics::Silicon;

/// Thickness of the metal slab standing for the thin-body back plane, nm.
const BACK_PLANE_SLAB_NM: f64 = 1.0;

/// Average over [x0, x1] of a profile equal to 1 for x <= edge that falls a
/// decade per `grad` nm beyond it (0 beyond it when `grad` == 0).
pub fn step_tail_avg(x0: f64, x1: f64, edge: f64, grad: f64) -> f64 {
    let w = x1 - x0;
    if w <= 0.0 {
        return if x0 <= edge {
            1.0
        } else if grad > 0.0 {
            10f64.powf(-(x0 - edge) / grad)
        } else {
            0.0
        };
    }
    let flat = (x1.min(edge) - x0).max(0.0);
    let tail = if grad > 0.0 && x1 > edge {
        let a = x0.max(edge);
        let c = grad / std::f64::consts::LN_10;
        c * (10f64.powf(-(a - edge) / grad) - 10f64.powf(-(x1 - edge) / grad))
    } else {
        0.0
    };
    (flat + tail) / w
}

/// Doping of a planar device: net N_D - N_A (for n; mirrored for p) averaged over rectangles, nm^-3.
#[derive(Debug, Clone, Copy)]
pub struct DopingProfile {
    /// Source/drain density, nm^-3.
    pub nsd: f64,
    /// Channel density, nm^-3.
    pub nch: f64,
    pub source_edge: f64,
    pub drain_edge: f64,
    pub grad: f64,
    /// Bulk well depth (None: wells through the whole film).
    pub well_depth: Option<f64>,
    pub polarity: Polarity,
}

impl DopingProfile {
    pub fn of(s: &Scenario) -> Self {
        let g = &s.geometry;
        let d = &s.doping;
        DopingProfile {
            nsd: d.source_drain_per_nm3,
            nch: d.channel_per_nm3,
            source_edge: g.source_drain_length_nm + d.junction_offset_nm,
            drain_edge: g.source_drain_length_nm + g.gate_length_nm - d.junction_offset_nm,
            grad: d.junction_gradient_nm_per_decade,
            well_depth: (s.architecture == Architecture::Bulk).then_some(g.junction_depth_nm),
            polarity: s.polarity,
        }
    }

    /// Source/drain dopant density averaged over the rectangle, nm^-3.
    pub fn sd_avg(&self, x0: f64, x1: f64, y0: f64, y1: f64) -> f64 {
        let lateral = step_tail_avg(x0, x1, self.source_edge, self.grad)
            + step_tail_avg(-x1, -x0, -self.drain_edge, self.grad);
        let vertical = self
            .well_depth
            .map_or(1.0, |xj| step_tail_avg(y0, y1, xj, self.grad));
        self.nsd * lateral * vertical
    }

    /// Net doping averaged over the rectangle (positive: n-type), nm^-3.
    pub fn net_avg(&self, x0: f64, x1: f64, y0: f64, y1: f64) -> f64 {
        self.polarity.sign() * (self.sd_avg(x0, x1, y0, y1) - self.nch)
    }

    /// Metallurgical channel length at the surface: distance between the
    /// points where the source/drain density equals the channel density
    /// (or n_i for an undoped channel), nm.
    pub fn metallurgical_length(&self, ni: f64) -> f64 {
        let target = self.nch.max(ni);
        let f = |x: f64| self.sd_avg(x, x, 0.0, 0.0) - target;
        if self.grad == 0.0 {
            return self.drain_edge - self.source_edge;
        }
        // Source side: f decreasing from the edge; bisection between the edge and mid-channel.
        let mid = 0.5 * (self.source_edge + self.drain_edge);
        if f(mid) >= 0.0 {
            return 0.0; // the junctions merge: no channel of the channel type
        }
        let (mut a, mut b) = (self.source_edge, mid);
        for _ in 0..200 {
            let m = 0.5 * (a + b);
            if f(m) > 0.0 {
                a = m
            } else {
                b = m
            }
        }
        let xs = 0.5 * (a + b);
        // Symmetric device: the drain point mirrors the source point.
        (self.drain_edge + self.source_edge) - 2.0 * xs
    }
}

/// The along-channel structure of a planar device.
#[derive(Debug, Clone)]
pub struct AlongChannel {
    pub problem: Problem,
    /// Gate electrode from `gate_start_nm` to `gate_end_nm` in x.
    pub gate_start_nm: f64,
    pub gate_end_nm: f64,
    /// Gated silicon from y = 0 (a 3D fin: z = 0) to `silicon_bottom_nm`; a
    /// bulk fin's sub-fin and substrate lie below it.
    pub silicon_bottom_nm: f64,
    pub doping: DopingProfile,
    /// Double gate: only the upper half is meshed; the structure mirrors about this y (nm).
    pub mirror_plane_nm: Option<f64>,
    /// Contact plugs (electrodes [`PLUG_SOURCE`], [`PLUG_DRAIN`]); None: ohmic contacts on the outer faces.
    pub plugs: Option<Plugs>,
}

/// The contact plugs of a planar section with `geometry.contacts`: metal
/// from the silicon surface up to the gate top, over x in [0, half_width_nm]
/// (source) and [end - half_width_nm, end] (drain). Each plug sits at the
/// ohmic (charge-neutral) potential of the silicon beneath it, so the silicon
/// surface under it is the ohmic contact; the outer faces x = 0 and x = end
/// are symmetry planes of the pitch.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Plugs {
    /// Half the contact width (the part of each plug inside the section), nm.
    pub half_width_nm: f64,
    /// x of the section's drain end, nm.
    pub end_nm: f64,
    /// Top of the plugs (= top of the gate electrode), y in nm (negative: above the silicon).
    pub top_nm: f64,
    /// Net doping under the source plug and under the drain plug, nm^-3 (positive: n-type).
    pub net_doping_per_nm3: [f64; 2],
}

impl Plugs {
    /// The plugs of scenario `s` (None without `geometry.contacts`).
    pub fn of(s: &Scenario, doping: &DopingProfile) -> Option<Plugs> {
        let c = s.geometry.contacts?;
        let end = 2.0 * s.geometry.source_drain_length_nm + s.geometry.gate_length_nm;
        let w = 0.5 * c.contact_width_nm;
        Some(Plugs {
            half_width_nm: w,
            end_nm: end,
            top_nm: -(s.stack_thickness_nm() + s.geometry.gate_height_nm),
            net_doping_per_nm3: [
                doping.net_avg(0.0, w, 0.0, 0.0),
                doping.net_avg(end - w, end, 0.0, 0.0),
            ],
        })
    }

    /// The plug metal at (x, y), if any.
    pub fn material_at(&self, x: f64, y: f64) -> Option<CellKind> {
        if y >= 0.0 {
            None
        } else if x < self.half_width_nm {
            Some(CellKind::Metal(PLUG_SOURCE))
        } else if x > self.end_nm - self.half_width_nm {
            Some(CellKind::Metal(PLUG_DRAIN))
        } else {
            None
        }
    }

    /// Mesh hard points in x: the plug faces (refined like other electrode corners).
    pub fn hard_points_x(&self) -> [(f64, f64); 2] {
        [
            (self.half_width_nm, FINE_OTHER_NM),
            (self.end_nm - self.half_width_nm, FINE_OTHER_NM),
        ]
    }
}

struct VerticalLayout {
    /// Mesh lines every column keeps (material interfaces), nm.
    hard: Vec<f64>,
    /// (line, finest step) pairs refined toward.
    fine: Vec<(f64, f64)>,
    /// Where the maximum step holds: the gate stack and silicon body with a
    /// margin (far zones elsewhere: gate metal, spacer top, buried oxide, deep substrate).
    cores: Vec<(f64, f64)>,
}

fn stack_layers_down(s: &Scenario, from: f64, down: bool) -> Vec<(f64, f64, f64)> {
    // (y_start, y_end, eps) with y_start < y_end, from the channel outward.
    let mut out = Vec::new();
    let mut y = from;
    for l in &s.stack {
        let y2 = if down {
            y + l.thickness_nm
        } else {
            y - l.thickness_nm
        };
        out.push((y.min(y2), y.max(y2), l.eps_r));
        y = y2;
    }
    out
}

fn vertical_layout(s: &Scenario) -> VerticalLayout {
    let g = &s.geometry;
    let t = s.stack_thickness_nm();
    let mut hard = vec![-(t + g.gate_height_nm), -t, 0.0];
    let mut fine = vec![(0.0, FINE_INTERFACE_NM), (-t, FINE_OTHER_NM)];
    for (y0, _, _) in stack_layers_down(s, 0.0, false) {
        hard.push(y0);
    }
    let tsi = g.body_thickness_nm;
    let m = CORE_MARGIN_NM;
    let body_bottom = match s.architecture {
        Architecture::DoubleGate => {
            // Mirror-symmetric about the body's mid-plane: the upper half is
            // meshed, the mid-plane is its last line (zero normal field).
            hard.push(0.5 * tsi);
            0.5 * tsi
        }
        Architecture::ThinBody => {
            hard.push(tsi);
            fine.push((tsi, FINE_INTERFACE_NM));
            hard.push(tsi + g.box_thickness_nm);
            hard.push(tsi + g.box_thickness_nm + BACK_PLANE_SLAB_NM);
            tsi + m
        }
        Architecture::Bulk => {
            hard.push(g.junction_depth_nm);
            fine.push((g.junction_depth_nm, FINE_JUNCTION_NM));
            hard.push(g.substrate_depth_nm);
            g.junction_depth_nm + m
        }
        _ => 0.0,
    };
    VerticalLayout {
        hard,
        fine,
        cores: vec![(-t - m, body_bottom)],
    }
}

/// The far-zone rule of the scenario's mesh keys.
fn far_rule(s: &Scenario) -> FarRule {
    FarRule {
        max_step_nm: s.mesh.max_step_nm,
        far_step_nm: s.mesh.max_far_step_nm,
        growth: s.mesh.growth,
    }
}

/// Mesh lines in y for a planar device's column (shared by the 2D and 1D problems).
fn y_line(s: &Scenario) -> Line {
    let v = vertical_layout(s);
    let r = s.mesh.refinement;
    zoned_line(&v.hard, |y| lookup(&v.fine, y), &v.cores, far_rule(s), r, 2)
}

/// Material of a planar device at (x, y); `gate` is the x-range of the gate electrode.
fn planar_material(s: &Scenario, x: f64, y: f64, gate: (f64, f64)) -> CellKind {
    let g = &s.geometry;
    let t = s.stack_thickness_nm();
    let tsi = g.body_thickness_nm;
    let under_gate = x > gate.0 && x < gate.1;
    let top_region = |depth_above_si: f64| -> CellKind {
        // depth_above_si > 0: distance from the silicon surface into the stack/gate side.
        if !under_gate {
            return CellKind::Dielectric(g.spacer_eps);
        }
        if depth_above_si > t {
            return CellKind::Metal(GATE);
        }
        let mut acc = 0.0;
        for l in &s.stack {
            acc += l.thickness_nm;
            if depth_above_si < acc {
                return CellKind::Dielectric(l.eps_r);
            }
        }
        CellKind::Metal(GATE)
    };
    if y < 0.0 {
        return top_region(-y);
    }
    match s.architecture {
        Architecture::Bulk => CellKind::Semi,
        Architecture::DoubleGate => {
            if y < tsi {
                CellKind::Semi
            } else {
                top_region(y - tsi)
            }
        }
        Architecture::ThinBody => {
            if y < tsi {
                CellKind::Semi
            } else if y < tsi + g.box_thickness_nm {
                CellKind::Dielectric(g.box_eps)
            } else {
                CellKind::Metal(BACK_PLANE)
            }
        }
        _ => CellKind::Semi,
    }
}

/// Builds the along-channel structure of a bulk, thin-body or double-gate device.
pub fn along_channel(s: &Scenario) -> AlongChannel {
    along_channel_in(s, Line { nodes: vec![0.0] })
}

/// The along-channel section extruded through the 3D path over `depth_nm`
/// in `layers` uniform layers, with zero-flux side faces: every layer
/// reproduces the 2D solve (the extrusion check). Currents are per unit of
/// that depth, as the 2D section's.
pub fn along_channel_extruded(s: &Scenario, depth_nm: f64, layers: usize) -> AlongChannel {
    let mut ac = along_channel_in(s, Line::uniform(0.0, depth_nm, layers));
    ac.problem.current_width_nm = depth_nm;
    ac
}

/// The section on the third-direction line `z` (a single node: the 2D section).
fn along_channel_in(s: &Scenario, z: Line) -> AlongChannel {
    assert!(
        s.architecture.is_planar(),
        "along_channel needs a planar architecture"
    );
    let g = &s.geometry;
    let r = s.mesh.refinement;
    let sd = g.source_drain_length_nm;
    let l = g.gate_length_nm;
    let total = 2.0 * sd + l;
    let doping = DopingProfile::of(s);
    let plugs = Plugs::of(s, &doping);
    let mut hard = vec![0.0, sd, sd + l, total];
    let mut fine = vec![(sd, FINE_JUNCTION_NM), (sd + l, FINE_JUNCTION_NM)];
    for (p, h) in plugs.iter().flat_map(|p| p.hard_points_x()) {
        hard.push(p);
        fine.push((p, h));
    }
    for e in [doping.source_edge, doping.drain_edge] {
        if e > 1e-6 && e < total - 1e-6 {
            hard.push(e);
            fine.push((e, FINE_JUNCTION_NM));
        }
    }
    // The channel and both junctions with a margin keep the maximum step;
    // the far source and drain grow toward their contacts.
    let m = CORE_MARGIN_NM;
    let core = (
        sd.min(doping.source_edge) - m,
        (sd + l).max(doping.drain_edge) + m,
    );
    let x = zoned_line(&hard, |p| lookup(&fine, p), &[core], far_rule(s), r, 2);
    let y = y_line(s);
    let silicon = Silicon::at(s.temperature_k);
    let nx = x.len();
    let ny = y.len();
    let ys = y.nodes.clone();
    let well = g.junction_depth_nm;
    let bulk = s.architecture == Architecture::Bulk;
    let gate = (sd, sd + l);
    let problem = Problem::new_3d(
        x,
        y,
        z,
        silicon,
        |xc, yc, _| {
            plugs
                .and_then(|p| p.material_at(xc, yc))
                .unwrap_or_else(|| planar_material(s, xc, yc, gate))
        },
        |i, j, _| {
            let faces = plugs.is_none(); // with plugs the outer faces are symmetry planes
            if bulk && j == ny - 1 {
                Some(SUBSTRATE)
            } else if faces && i == 0 && (!bulk || ys[j] <= well + 1e-9) {
                Some(SOURCE)
            } else if faces && i == nx - 1 && (!bulk || ys[j] <= well + 1e-9) {
                Some(DRAIN)
            } else {
                None
            }
        },
        |x0, x1, y0, y1, _, _| doping.net_avg(x0, x1, y0, y1),
    );
    let mut problem = problem;
    let mirror_plane_nm = mirror_plane(s);
    if mirror_plane_nm.is_some() {
        problem.symmetry_factor = 2.0;
    }
    let silicon_bottom_nm = match s.architecture {
        Architecture::Bulk => g.substrate_depth_nm,
        Architecture::DoubleGate => 0.5 * g.body_thickness_nm,
        _ => g.body_thickness_nm,
    };
    AlongChannel {
        problem,
        gate_start_nm: sd,
        gate_end_nm: sd + l,
        silicon_bottom_nm,
        doping,
        mirror_plane_nm,
        plugs,
    }
}

/// The symmetry plane of a double gate (only its upper half is solved).
fn mirror_plane(s: &Scenario) -> Option<f64> {
    (s.architecture == Architecture::DoubleGate).then_some(0.5 * s.geometry.body_thickness_nm)
}

/// The 1D long-channel column at mid-channel (a one-cell-wide strip with
/// zero-field sides), channel doping only. Bulk keeps its substrate contact
/// (contact 2); films float, their carriers set by the quasi-Fermi levels.
pub fn long_channel_column(s: &Scenario) -> Problem {
    assert!(
        s.architecture.is_planar(),
        "long_channel_column needs a planar architecture"
    );
    let y = y_line(s);
    let ny = y.len();
    let bulk = s.architecture == Architecture::Bulk;
    let doping = DopingProfile::of(s);
    let x = Line::uniform(0.0, 1.0, 1);
    let mut p = Problem::new(
        x,
        y,
        Silicon::at(s.temperature_k),
        |_, yc| planar_material(s, 0.5, yc, (0.0, 1.0)),
        |_, j| (bulk && j == ny - 1).then_some(SUBSTRATE),
        |_, _, _, _| -doping.polarity.sign() * doping.nch,
    );
    if mirror_plane(s).is_some() {
        p.symmetry_factor = 2.0;
    }
    p
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn step_tail_average_is_exact() {
        // Abrupt: a cell straddling the edge gets the mean of the two sides.
        assert!((step_tail_avg(-1.0, 1.0, 0.0, 0.0) - 0.5).abs() < 1e-15);
        // Graded: average of 10^(-x/2) over [0, 2] = (2/ln10)(1 - 0.1)/2.
        let want = (2.0 / std::f64::consts::LN_10) * 0.9 / 2.0;
        assert!((step_tail_avg(0.0, 2.0, 0.0, 2.0) - want).abs() < 1e-14);
        // Numerical quadrature check on a straddling interval.
        let n = 200_000;
        let (a, b) = (-0.7, 3.1);
        let mut q = 0.0;
        for k in 0..n {
            let x = a + (b - a) * (k as f64 + 0.5) / n as f64;
            q += if x <= 0.0 { 1.0 } else { 10f64.powf(-x / 1.5) };
        }
        assert!((step_tail_avg(a, b, 0.0, 1.5) - q / n as f64).abs() < 1e-9);
    }
}
