//! Numerical natural (scale) length (MODEL.md section 6).
//!
//! The lowest eigenvalue k^2 of `-div(eps grad u) = k^2 eps u` on the section
//! perpendicular to the channel, u = 0 on gate metal and grounded planes,
//! zero normal field on free boundaries and symmetry planes, gives the
//! natural length lambda = 1/k (nm): the short-channel perturbation decays as
//! exp(-x/lambda) along the channel.
//!
//! Discretisation: the vertex-centred box integration of `discretize.rs`.
//! Stiffness: the Problem's edge coefficients (in 1D eps/h per cell); mass:
//! the eps-weighted box measure of each node (sum over its quarter cells of
//! eps times the quarter's area; in 1D eps h/2 per adjacent cell), i.e.
//! lumped and consistent with the Problem's boxes. Interfaces lie on mesh
//! lines; the eigenvalue converges at second order (a test shows it).
//!
//! Which mode is the natural length: the body natural length is the slowest
//! mode with at least [`BODY_FRACTION`] of its eps-weighted norm
//! (integral of eps u^2) in silicon. When a mode with less decays more
//! slowly, it is reported as the dielectric path (e.g. through a thick
//! buried oxide between the gate metal beside the fin and the back plane),
//! with the region holding most of its norm.
//!
//! Planar stacks (1D, top to bottom, Dirichlet at both ends):
//! - double gate: gate metal / stack (outermost first) / body / stack / gate metal;
//! - thin body: gate metal / stack / body / buried oxide / back plane;
//! - bulk: gate metal / stack / silicon down to a grounded plane at the
//!   depletion depth. The depth comes from the long-channel 1D solve at
//!   V_t,long (V_DS = 0): the depth at which the majority-carrier density
//!   recovers to half the channel doping. That is the depletion edge the
//!   device actually has at threshold, including the gate work function and
//!   any inversion charge; the textbook maximum depletion width W_dm =
//!   sqrt(4 eps_Si V_T ln(N_A/n_i)/(q N_A)) assumes a surface potential of
//!   exactly 2 phi_F. W_dm is used only as a fallback when the long-channel
//!   solve fails (e.g. the gate sweep does not reach the threshold current);
//!   an undoped bulk body has no depletion edge and uses the substrate depth.
//!   Which one was used is reported (`depletion_depth_source`).
//!
//! Limitations: the 1D stacks ignore the lateral extent of the gate (no
//! fringing to spacers); the 2D cross-sections treat the metal as a perfect
//! Dirichlet boundary; classical electrostatics only (no carriers, no
//! quantum confinement).

use std::collections::BTreeMap;

use super::closed_form as cf;
use super::eigen::{lowest_modes, Coupling, EigenError, EigenOptions, Pencil};
use super::TheoryError;
use crate::device::{Architecture, Scenario};
use crate::discretize::{CellKind, NodeKind, Problem};
use crate::mesh::{graded_line, Line};
use crate::physics::EPS_SI;
use crate::structure::{cross_section, CrossSection, Region, FINE_INTERFACE_NM, WIDTH_DEFINITION};

/// A mode counts as the body's when at least this share of its
/// eps-weighted norm lies in silicon (MODEL.md section 6).
pub const BODY_FRACTION: f64 = 0.25;

/// Rule of thumb (common practice): the gate length should be at least 5 to 6
/// natural lengths for acceptable short-channel behaviour.
pub const RULE_OF_THUMB_MIN: f64 = 5.0;
pub const RULE_OF_THUMB_COMFORTABLE: f64 = 6.0;

/// Boundary at one end of a 1D stack.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize)]
pub enum End {
    /// Gate metal or a grounded plane: u = 0.
    Dirichlet,
    /// Floating or symmetry plane: zero normal field.
    ZeroField,
}

/// One layer of a 1D stack.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Layer {
    /// Role in words ("gate stack 1", "body", "buried oxide").
    pub role: String,
    pub eps_r: f64,
    pub thickness_nm: f64,
    /// Counts toward the silicon share of a mode's norm.
    pub silicon: bool,
}

impl Layer {
    pub fn dielectric(role: &str, eps_r: f64, thickness_nm: f64) -> Layer {
        Layer {
            role: role.into(),
            eps_r,
            thickness_nm,
            silicon: false,
        }
    }
    pub fn silicon(role: &str, thickness_nm: f64) -> Layer {
        Layer {
            role: role.into(),
            eps_r: EPS_SI,
            thickness_nm,
            silicon: true,
        }
    }
}

/// A layered 1D stack, top to bottom.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Stack {
    pub layers: Vec<Layer>,
    pub top: End,
    pub bottom: End,
}

/// Mesh of a 1D stack.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum StackMesh {
    /// Each layer uniform with ceil(t / step) cells (at least 2).
    Uniform { step_nm: f64 },
    /// Graded lines as the solver's meshes: refined to `fine_nm` at every
    /// silicon/dielectric interface, never coarser than `max_step_nm`.
    /// `refinement` divides every step (fine, growth, maximum), as in [`crate::mesh::graded_line`].
    Graded {
        max_step_nm: f64,
        fine_nm: f64,
        refinement: f64,
    },
}

/// Natural length of a 1D stack.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct StackLambda {
    pub lambda_nm: f64,
    /// Share of the eps-weighted norm in silicon layers.
    pub silicon_fraction: f64,
    pub nodes: usize,
}

fn check_positive(what: &str, v: f64) -> Result<(), TheoryError> {
    if v.is_finite() && v > 0.0 {
        Ok(())
    } else {
        Err(TheoryError::InvalidInput {
            what: what.into(),
            value: v,
            reason: "must be finite and > 0".into(),
        })
    }
}

impl Stack {
    /// Mesh line through the stack (y downward from 0 at the top).
    pub fn line(&self, mesh: StackMesh) -> Result<(Line, Vec<usize>), TheoryError> {
        if self.layers.is_empty() {
            return Err(TheoryError::InvalidInput {
                what: "stack".into(),
                value: 0.0,
                reason: "has no layers".into(),
            });
        }
        for l in &self.layers {
            check_positive(&format!("{} thickness_nm", l.role), l.thickness_nm)?;
            check_positive(&format!("{} eps_r", l.role), l.eps_r)?;
        }
        let mut nodes = vec![0.0];
        let mut cell_layer = Vec::new();
        let mut y = 0.0;
        for (li, l) in self.layers.iter().enumerate() {
            let seg: Vec<f64> = match mesh {
                StackMesh::Uniform { step_nm } => {
                    check_positive("mesh step_nm", step_nm)?;
                    let n = ((l.thickness_nm / step_nm - 1e-9).ceil() as usize).max(2);
                    (1..=n)
                        .map(|c| y + l.thickness_nm * c as f64 / n as f64)
                        .collect()
                }
                StackMesh::Graded {
                    max_step_nm,
                    fine_nm,
                    refinement,
                } => {
                    check_positive("mesh max_step_nm", max_step_nm)?;
                    check_positive("mesh fine_nm", fine_nm)?;
                    let interface = |k: usize| -> bool {
                        // Boundary k sits between layer k-1 and layer k.
                        k > 0
                            && k < self.layers.len()
                            && self.layers[k - 1].silicon != self.layers[k].silicon
                    };
                    let (top_fine, bottom_fine) = (interface(li), interface(li + 1));
                    let line = graded_line(
                        &[y, y + l.thickness_nm],
                        |p| {
                            if ((p - y).abs() < 1e-9 && top_fine)
                                || ((p - y - l.thickness_nm).abs() < 1e-9 && bottom_fine)
                            {
                                Some(fine_nm)
                            } else {
                                None
                            }
                        },
                        max_step_nm,
                        refinement,
                        2,
                    );
                    line.nodes[1..].to_vec()
                }
            };
            for _ in 0..seg.len() {
                cell_layer.push(li);
            }
            y += l.thickness_nm;
            nodes.extend(seg);
        }
        *nodes.last_mut().expect("at least one layer") = y;
        Ok((Line { nodes }, cell_layer))
    }

    /// Lowest mode of the stack: lambda and the silicon share of its norm.
    pub fn natural_length(&self, mesh: StackMesh) -> Result<StackLambda, TheoryError> {
        if self.top == End::ZeroField && self.bottom == End::ZeroField {
            return Err(TheoryError::InvalidInput {
                what: "stack boundaries".into(),
                value: 0.0,
                reason: "both ends are zero-field: no gate holds the potential, lambda is infinite"
                    .into(),
            });
        }
        let (line, cell_layer) = self.line(mesh)?;
        let h = line.steps();
        let nn = line.len();
        let dirichlet = |k: usize| {
            (k == 0 && self.top == End::Dirichlet) || (k == nn - 1 && self.bottom == End::Dirichlet)
        };
        let mut unknown = vec![usize::MAX; nn];
        let mut count = 0;
        for (k, u) in unknown.iter_mut().enumerate() {
            if !dirichlet(k) {
                *u = count;
                count += 1;
            }
        }
        let mut mass = vec![0.0; count];
        let mut couplings = Vec::with_capacity(nn);
        for (c, &hc) in h.iter().enumerate() {
            let eps = self.layers[cell_layer[c]].eps_r;
            let (a, b) = (unknown[c], unknown[c + 1]);
            for &u in &[a, b] {
                if u != usize::MAX {
                    mass[u] += 0.5 * eps * hc;
                }
            }
            let (a, b) = if a == usize::MAX {
                (b, None)
            } else {
                (a, (b != usize::MAX).then_some(b))
            };
            if a != usize::MAX {
                couplings.push(Coupling { a, b, c: eps / hc });
            }
        }
        let pencil = Pencil::from_couplings(mass, &couplings)?;
        let e = lowest_modes(&pencil, &EigenOptions::lowest(1))?;
        let u = &e.vectors[0];
        let val = |k: usize| {
            if unknown[k] == usize::MAX {
                0.0
            } else {
                u[unknown[k]]
            }
        };
        let (mut si, mut total) = (0.0, 0.0);
        for (c, &hc) in h.iter().enumerate() {
            let l = &self.layers[cell_layer[c]];
            let part = 0.5 * l.eps_r * hc * (val(c).powi(2) + val(c + 1).powi(2));
            total += part;
            if l.silicon {
                si += part;
            }
        }
        Ok(StackLambda {
            lambda_nm: 1.0 / e.values[0].sqrt(),
            silicon_fraction: si / total,
            nodes: nn,
        })
    }
}

/// Where the bulk depletion depth came from.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum DepthSource {
    /// Long-channel 1D solve at V_t,long: majority carriers back to half the doping.
    LongChannelSolve,
    /// Maximum depletion width formula (fallback).
    MaxDepletionWidth,
    /// Undoped body: the whole silicon down to the substrate contact.
    SubstrateDepth,
}

/// The 1D stack of a planar scenario; a bulk device needs its depletion
/// depth (nm, and where it came from), which the caller has solved for.
pub fn planar_stack(
    s: &Scenario,
    depletion: Option<(f64, DepthSource)>,
) -> Result<(Stack, Option<(f64, DepthSource)>), TheoryError> {
    let g = &s.geometry;
    let gate_side: Vec<Layer> = s
        .stack
        .iter()
        .enumerate()
        .rev()
        .map(|(i, l)| {
            Layer::dielectric(
                &format!("gate stack {} ({})", i, l.material),
                l.eps_r,
                l.thickness_nm,
            )
        })
        .collect();
    let mut layers = gate_side.clone();
    let mut depth = None;
    match s.architecture {
        Architecture::DoubleGate => {
            layers.push(Layer::silicon("body", g.body_thickness_nm));
            layers.extend(gate_side.into_iter().rev());
        }
        Architecture::ThinBody => {
            layers.push(Layer::silicon("body", g.body_thickness_nm));
            layers.push(Layer::dielectric(
                "buried oxide",
                g.box_eps,
                g.box_thickness_nm,
            ));
        }
        Architecture::Bulk => {
            let d = depletion.ok_or_else(|| TheoryError::InvalidInput {
                what: "bulk depletion depth nm".into(),
                value: f64::NAN,
                reason: "a bulk stack needs the depletion depth from the long-channel solve".into(),
            })?;
            layers.push(Layer::silicon("depleted silicon", d.0));
            depth = Some(d);
        }
        a => {
            return Err(TheoryError::NotApplicable {
                what: "a 1D planar stack".into(),
                architecture: a,
            })
        }
    }
    Ok((
        Stack {
            layers,
            top: End::Dirichlet,
            bottom: End::Dirichlet,
        },
        depth,
    ))
}

/// The stack mesh a scenario asks for (its max step and refinement).
pub fn scenario_stack_mesh(s: &Scenario) -> StackMesh {
    let r = s.mesh.refinement;
    StackMesh::Graded {
        max_step_nm: s.mesh.max_step_nm,
        fine_nm: FINE_INTERFACE_NM,
        refinement: r,
    }
}

/// One mode of a 2D cross-section.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Mode {
    pub lambda_nm: f64,
    /// Share of the eps-weighted norm in silicon.
    pub silicon_fraction: f64,
    /// The region holding most of the norm.
    pub region: Region,
    /// Share of the norm per region.
    pub fractions: BTreeMap<Region, f64>,
}

/// Natural lengths of a 2D cross-section.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct SectionLambda {
    /// Body natural length: the slowest mode with >= [`BODY_FRACTION`] in silicon.
    pub body: Mode,
    /// The slowest mode with less silicon than that, when it decays more slowly than the body mode.
    pub dielectric_path: Option<Mode>,
    /// The modes computed, slowest first (down to the body mode at least).
    pub modes: Vec<Mode>,
    pub unknowns: usize,
}

/// Stiffness and mass of a Problem's Laplace operator: unknowns are the
/// Free nodes (every other node is held at 0). Returns the pencil and the
/// node of each unknown.
pub fn problem_pencil(p: &Problem) -> Result<(Pencil, Vec<usize>), EigenError> {
    let nx = p.nx;
    let mut unknown = vec![usize::MAX; p.node_count()];
    let mut node_of = Vec::new();
    for (k, kind) in p.nodes.iter().enumerate() {
        if *kind == NodeKind::Free {
            unknown[k] = node_of.len();
            node_of.push(k);
        }
    }
    let mut mass = vec![0.0; node_of.len()];
    for cy in 0..p.ny - 1 {
        for cx in 0..nx - 1 {
            let eps = p.cell(cx, cy).eps();
            let q = 0.25
                * (p.x.nodes[cx + 1] - p.x.nodes[cx])
                * (p.y.nodes[cy + 1] - p.y.nodes[cy])
                * eps;
            for k in [
                cx + cy * nx,
                cx + 1 + cy * nx,
                cx + (cy + 1) * nx,
                cx + 1 + (cy + 1) * nx,
            ] {
                if unknown[k] != usize::MAX {
                    mass[unknown[k]] += q;
                }
            }
        }
    }
    let mut couplings = Vec::with_capacity(2 * node_of.len());
    let mut add = |a: usize, b: usize, c: f64| {
        let (ua, ub) = (unknown[a], unknown[b]);
        match (ua != usize::MAX, ub != usize::MAX) {
            (true, true) => couplings.push(Coupling {
                a: ua,
                b: Some(ub),
                c,
            }),
            (true, false) => couplings.push(Coupling { a: ua, b: None, c }),
            (false, true) => couplings.push(Coupling { a: ub, b: None, c }),
            _ => {}
        }
    };
    for j in 0..p.ny {
        for i in 0..nx - 1 {
            add(i + j * nx, i + 1 + j * nx, p.coef_x[i + j * (nx - 1)]);
        }
    }
    for j in 0..p.ny - 1 {
        for i in 0..nx {
            add(i + j * nx, i + (j + 1) * nx, p.coef_y[i + j * nx]);
        }
    }
    Ok((Pencil::from_couplings(mass, &couplings)?, node_of))
}

/// Lowest `count` modes of a Problem's cross-section, with their norm split
/// by the region `region(cx, cy)` of each cell.
pub fn problem_modes(
    p: &Problem,
    count: usize,
    region: impl Fn(usize, usize) -> Region,
) -> Result<(Vec<Mode>, usize), TheoryError> {
    let (pencil, node_of) = problem_pencil(p)?;
    let e = lowest_modes(&pencil, &EigenOptions::lowest(count.min(pencil.n)))?;
    let nx = p.nx;
    let mut value = vec![0.0; p.node_count()];
    let mut modes = Vec::with_capacity(e.values.len());
    for (mu, u) in e.values.iter().zip(&e.vectors) {
        for (uk, &k) in u.iter().zip(&node_of) {
            value[k] = *uk;
        }
        let mut fr: BTreeMap<Region, f64> = BTreeMap::new();
        let mut total = 0.0;
        for cy in 0..p.ny - 1 {
            for cx in 0..nx - 1 {
                let eps = p.cell(cx, cy).eps();
                if eps == 0.0 {
                    continue;
                }
                let q = 0.25
                    * (p.x.nodes[cx + 1] - p.x.nodes[cx])
                    * (p.y.nodes[cy + 1] - p.y.nodes[cy])
                    * eps;
                let part: f64 = [
                    cx + cy * nx,
                    cx + 1 + cy * nx,
                    cx + (cy + 1) * nx,
                    cx + 1 + (cy + 1) * nx,
                ]
                .iter()
                .map(|&k| q * value[k] * value[k])
                .sum();
                *fr.entry(region(cx, cy)).or_insert(0.0) += part;
                total += part;
            }
        }
        for v in fr.values_mut() {
            *v /= total;
        }
        let region = fr
            .iter()
            .max_by(|a, b| a.1.total_cmp(b.1))
            .map(|(r, _)| *r)
            .unwrap_or(Region::Metal);
        modes.push(Mode {
            lambda_nm: 1.0 / mu.sqrt(),
            silicon_fraction: fr.get(&Region::Silicon).copied().unwrap_or(0.0),
            region,
            fractions: fr,
        });
    }
    Ok((modes, pencil.n))
}

/// Region of a plain Problem's cell from its material (no role information).
pub fn material_region(p: &Problem, cx: usize, cy: usize) -> Region {
    match p.cell(cx, cy) {
        CellKind::Semi => Region::Silicon,
        CellKind::Dielectric(_) => Region::GateStack,
        CellKind::Metal(_) => Region::Metal,
    }
}

/// Body natural length and dielectric path of a cross-section: computes the
/// lowest modes, doubling their number (6, 12, 24, 48) until one has at
/// least [`BODY_FRACTION`] of its norm in silicon.
pub fn section_natural_lengths(cs: &CrossSection) -> Result<SectionLambda, TheoryError> {
    let p = &cs.problem;
    let mut count = 6;
    loop {
        let (modes, unknowns) = problem_modes(p, count, |cx, cy| cs.regions[cx + cy * (p.nx - 1)])?;
        if let Some(ib) = modes
            .iter()
            .position(|m| m.silicon_fraction >= BODY_FRACTION)
        {
            let body = modes[ib].clone();
            let dielectric_path = modes[..ib].first().cloned();
            let modes = modes[..=ib].to_vec();
            return Ok(SectionLambda {
                body,
                dielectric_path,
                modes,
                unknowns,
            });
        }
        if count >= 48 || count >= unknowns {
            return Err(TheoryError::NoBodyMode {
                modes: modes.len(),
                fraction: BODY_FRACTION,
            });
        }
        count *= 2;
    }
}

/// Rule-of-thumb verdict on L_g / lambda (common practice: at least 5-6).
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Verdict {
    /// L_g >= 6 lambda.
    Comfortable,
    /// 5 lambda <= L_g < 6 lambda.
    Marginal,
    /// L_g < 5 lambda: expect strong roll-off and DIBL.
    ShortChannelDominated,
}

impl Verdict {
    pub fn of(lg_over_lambda: f64) -> Verdict {
        if lg_over_lambda >= RULE_OF_THUMB_COMFORTABLE {
            Verdict::Comfortable
        } else if lg_over_lambda >= RULE_OF_THUMB_MIN {
            Verdict::Marginal
        } else {
            Verdict::ShortChannelDominated
        }
    }
    pub fn describe(&self) -> &'static str {
        match self {
            Verdict::Comfortable => "comfortable (L_g >= 6 lambda)",
            Verdict::Marginal => "marginal (5 lambda <= L_g < 6 lambda)",
            Verdict::ShortChannelDominated => "short-channel dominated (L_g < 5 lambda)",
        }
    }
}

/// Summary of one mode for the report.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct ModeSummary {
    pub lambda_nm: f64,
    pub silicon_fraction: f64,
    pub region: String,
}

/// Natural-length report of one scenario (serialisable; `render_text` for the console).
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct LambdaReport {
    pub name: String,
    pub architecture: Architecture,
    /// "1d-stack" (planar) or "2d-cross-section" (fins and wires).
    pub method: String,
    pub gate_length_nm: f64,
    /// Body natural length (numeric), nm.
    pub lambda_numeric_nm: f64,
    /// Share of the body mode's eps-weighted norm in silicon.
    pub body_mode_silicon_fraction: f64,
    /// Slowest dielectric path, nm, when slower than the body mode; else null.
    pub lambda_dielectric_path_nm: Option<f64>,
    /// Where the dielectric path lives ("buried oxide", ...); null when none.
    pub dielectric_path_region: Option<String>,
    /// Closed forms, nm (EOT-based: see `closed_form_note`).
    pub lambda_closed_forms: BTreeMap<String, f64>,
    pub closed_form_note: String,
    pub eot_nm: f64,
    pub stack_thickness_nm: f64,
    /// L_g / lambda_numeric.
    pub lg_over_lambda: f64,
    /// L_g / lambda_dielectric_path (when there is one).
    pub lg_over_lambda_dielectric_path: Option<f64>,
    pub rule_of_thumb: String,
    pub verdict: Verdict,
    pub verdict_text: String,
    /// Bulk: the grounded-plane depth used and where it came from.
    pub depletion_depth_nm: Option<f64>,
    pub depletion_depth_source: Option<DepthSource>,
    /// Fins and wires: the modes computed, slowest first.
    pub modes: Vec<ModeSummary>,
    pub mesh_nodes: usize,
    pub notes: Vec<String>,
}

/// The natural-length report of a scenario: numeric lambda (1D stack for
/// planar devices, 2D cross-section for fins and wires), the dielectric path,
/// every applicable closed form, L_g/lambda and the rule-of-thumb verdict.
///
/// `depletion` is the bulk depletion depth (ignored for other architectures).
/// The eigenproblems are linear and solved here; nothing in this module runs
/// a nonlinear solve.
pub fn lambda_report(
    s: &Scenario,
    depletion: Option<(f64, DepthSource)>,
) -> Result<LambdaReport, TheoryError> {
    if s.architecture.is_planar() {
        let (stack, depth) = planar_stack(s, depletion)?;
        let r = stack.natural_length(scenario_stack_mesh(s))?;
        let mut notes = Vec::new();
        if let Some((_, src)) = depth {
            notes.push(format!(
                "bulk: grounded plane at the depletion depth ({})",
                match src {
                    DepthSource::LongChannelSolve =>
                        "long-channel solve at V_t,long: majority carriers back to half the doping",
                    DepthSource::MaxDepletionWidth =>
                        "max depletion width formula: the long-channel solve failed",
                    DepthSource::SubstrateDepth => "undoped body: substrate depth",
                }
            ));
        }
        notes.push("1D stack: no lateral fringing, no buried-oxide path to the drain".into());
        Ok(report(
            s,
            "1d-stack",
            (r.lambda_nm, r.silicon_fraction),
            None,
            depth,
            Vec::new(),
            r.nodes,
            notes,
        ))
    } else {
        let cs = eigen_section(s)?;
        let sl = section_natural_lengths(&cs)?;
        Ok(section_report(s, &cs, &sl))
    }
}

/// Depth below a bulk fin's gated fin beyond which its sub-fin and substrate
/// are taken as grounded for the natural length, nm: the maximum depletion
/// width at `doping.subfin_cm3` ([`cf::max_depletion_width_nm`], common
/// practice, as the planar bulk stack's grounded plane); None for an undoped
/// sub-fin (then only the substrate contact grounds it) or another architecture.
pub fn bulk_fin_grounded_depth_nm(s: &Scenario) -> Option<f64> {
    if s.architecture != Architecture::BulkFin {
        return None;
    }
    let si = crate::physics::Silicon::at(s.temperature_k);
    cf::max_depletion_width_nm(&si, s.doping.subfin_per_nm3)
}

/// The cross-section whose modes give a fin's natural length: the Poisson
/// cross-section ([`cross_section`]), except that a bulk fin's silicon
/// deeper than [`bulk_fin_grounded_depth_nm`] below the gated fin is a
/// grounded electrode ([`crate::structure::fin::bulk_fin_eigen_section`]).
pub fn eigen_section(s: &Scenario) -> Result<CrossSection, TheoryError> {
    Ok(match bulk_fin_grounded_depth_nm(s) {
        Some(d) => crate::structure::fin::bulk_fin_eigen_section(s, d)?,
        None => cross_section(s)?,
    })
}

/// The report of a fin or wire cross-section whose modes are already computed.
pub fn section_report(s: &Scenario, cs: &CrossSection, sl: &SectionLambda) -> LambdaReport {
    let modes = sl
        .modes
        .iter()
        .map(|m| ModeSummary {
            lambda_nm: m.lambda_nm,
            silicon_fraction: m.silicon_fraction,
            region: m.region.describe().into(),
        })
        .collect();
    report(
        s,
        "2d-cross-section",
        (sl.body.lambda_nm, sl.body.silicon_fraction),
        sl.dielectric_path.as_ref(),
        None,
        modes,
        cs.problem.node_count(),
        {
            let mut notes = vec![format!(
                "fin/wire width convention elsewhere: {WIDTH_DEFINITION}"
            )];
            if s.architecture == Architecture::BulkFin {
                notes.push(match bulk_fin_grounded_depth_nm(s) {
                    Some(d) => format!(
                        "bulk fin: sub-fin and substrate grounded below {d:.1} nm under the gated fin \
                         (maximum depletion width at doping.subfin_cm3; clamped to the substrate contact); \
                         the source/drain stops at the fin bottom, so short-channel theory from this \
                         lambda reads pessimistic: prefer the 3D solve (docs/fins-3d.md)"
                    ),
                    None => "bulk fin: undoped sub-fin, grounded only by the substrate contact".into(),
                });
            }
            notes
        },
    )
}

#[allow(clippy::too_many_arguments)]
fn report(
    s: &Scenario,
    method: &str,
    (body_l, body_si): (f64, f64),
    path: Option<&Mode>,
    depth: Option<(f64, DepthSource)>,
    modes: Vec<ModeSummary>,
    nodes: usize,
    extra_notes: Vec<String>,
) -> LambdaReport {
    let lg = s.geometry.gate_length_nm;
    let mut notes = vec![
        "lambda: decay length of exp(-x/lambda) along the channel (Frank-Taur-Wong Lambda = pi lambda)".to_string(),
    ];
    notes.extend(extra_notes);
    let lg_over = lg / body_l;
    let verdict = Verdict::of(lg_over);
    LambdaReport {
        name: s.name.clone(),
        architecture: s.architecture,
        method: method.into(),
        gate_length_nm: lg,
        lambda_numeric_nm: body_l,
        body_mode_silicon_fraction: body_si,
        lambda_dielectric_path_nm: path.map(|m| m.lambda_nm),
        dielectric_path_region: path.map(|m| m.region.describe().to_string()),
        lambda_closed_forms: cf::table(s, depth.map(|d| d.0)),
        closed_form_note: "closed forms are thin-layer approximations taking the stack through its EOT \
                           (SiO2, eps 3.9): they miss fringing through physically thick high-k layers and \
                           buried-oxide paths"
            .into(),
        eot_nm: s.eot_nm(),
        stack_thickness_nm: s.stack_thickness_nm(),
        lg_over_lambda: lg_over,
        lg_over_lambda_dielectric_path: path.map(|m| lg / m.lambda_nm),
        rule_of_thumb: "common practice: L_g at least 5-6 lambda".into(),
        verdict,
        verdict_text: verdict.describe().into(),
        depletion_depth_nm: depth.map(|d| d.0),
        depletion_depth_source: depth.map(|d| d.1),
        modes,
        mesh_nodes: nodes,
        notes,
    }
}
