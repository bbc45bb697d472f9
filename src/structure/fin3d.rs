//! Fins and wires solved in 3D: the cross-section extruded along the channel
//! with source and drain (DEVICE-FORMAT.md, "Fins and wires solved in 3D").
//!
//! Coordinates: x along the channel from the source contact (0) to the drain
//! contact (2 S + L_g); y across the fin, centred on it (fin from -W/2 to
//! W/2); z downward from the top silicon surface (fin from 0 to H), nm.
//! Electrode [`GATE`] is the gate, [`BACK_PLANE`] the plane under the buried
//! oxide; contacts [`SOURCE`] and [`DRAIN`] are the fin's silicon end faces
//! (z <= H), and for a bulk fin [`SUBSTRATE`] is the bottom face of its
//! substrate silicon (held at 0 V and charge neutrality, as the planar bulk
//! device's substrate contact).
//!
//! The structure is mirror-symmetric about y = 0: [`along_fin`] meshes the
//! half y >= 0 (the plane y = 0 is its first y line, zero normal field) and
//! counts the other half through [`Problem::symmetry_factor`];
//! [`along_fin_full`] meshes the whole width (for the symmetry check).
//!
//! Mesh: rectilinear and graded as the 2D sections (hard lines at every
//! material interface, the junctions and the gate edges; fine at every
//! silicon/dielectric interface, gate edge and junction; coarse in the buried
//! oxide, spacer and metal), with its own steps ([`FIN3D_FINE_INTERFACE`],
//! [`FIN3D_FINE_JUNCTION`] times `mesh.max_step_nm`, growth [`FIN3D_GROWTH`], the largest step
//! [`FIN3D_STEP_FACTOR`] times `mesh.max_step_nm`), all divided by `mesh.refinement`. docs/fins-3d.md gives the choices.

use super::planar::{step_tail_avg, DopingProfile};
use super::{lookup, AlongChannel, BACK_PLANE, DRAIN, GATE, SOURCE, SUBSTRATE};
use crate::device::{Architecture, Scenario};
use crate::discretize::{CellKind, Problem};
use crate::mesh::{graded_line_with_growth, Line};
use crate::physics::{Silicon, EPS_SIO2};

/// Finest step at a silicon/dielectric interface of a 3D fin, in units of
/// `mesh.max_step_nm` (0.3 nm at the default 0.5 nm; coarser than the 2D
/// sections' 0.02 nm: subthreshold electrostatics of a lightly doped fin vary
/// on the scale of the body; checked by the mesh-convergence test).
pub const FIN3D_FINE_INTERFACE: f64 = 0.6;
/// Finest step at the gate edges and junctions of a 3D fin, in units of `mesh.max_step_nm`.
pub const FIN3D_FINE_JUNCTION: f64 = 1.0;
/// The 3D mesh's largest step is this times `mesh.max_step_nm`.
pub const FIN3D_STEP_FACTOR: f64 = 3.0;
/// Thickness of the metal slab standing for the back plane under the buried oxide, nm.
const BACK_PLANE_SLAB_NM: f64 = 1.0;

/// The parts of the 3D geometry that the mesh and materials need, nm.
struct Geometry3d {
    arch: Architecture,
    half_w: f64,
    h: f64,
    /// Cap thickness (capped fin), else 0.
    tc: f64,
    /// Summed stack thicknesses, from the channel outward.
    cum: Vec<f64>,
    eps: Vec<f64>,
    t: f64,
    gate_height: f64,
    y_edge: f64,
    z_top: f64,
    gate: (f64, f64),
    total_x: f64,
    /// Bulk fin: isolation oxide depth and substrate depth below it, else 0.
    iso: f64,
    sub: f64,
}

impl Geometry3d {
    fn of(s: &Scenario) -> Self {
        let g = &s.geometry;
        let arch = s.architecture;
        let gaa = arch == Architecture::GateAllAround;
        let half_w = 0.5 * g.body_thickness_nm;
        let t = s.stack_thickness_nm();
        let tc = if arch == Architecture::CappedFin {
            g.cap_thickness_nm
        } else {
            0.0
        };
        let cum = s
            .stack
            .iter()
            .scan(0.0, |acc, l| {
                *acc += l.thickness_nm;
                Some(*acc)
            })
            .collect();
        let sd = g.source_drain_length_nm;
        let l = g.gate_length_nm;
        Geometry3d {
            arch,
            half_w,
            h: g.fin_height_nm,
            tc,
            cum,
            eps: s.stack.iter().map(|l| l.eps_r).collect(),
            t,
            gate_height: g.gate_height_nm,
            y_edge: if gaa {
                half_w + t + g.gate_height_nm
            } else {
                0.5 * g.fin_pitch_nm
            },
            z_top: -(tc + t + g.gate_height_nm),
            gate: (sd, sd + l),
            total_x: 2.0 * sd + l,
            iso: if arch == Architecture::BulkFin {
                g.isolation_depth_nm
            } else {
                0.0
            },
            sub: if arch == Architecture::BulkFin {
                g.substrate_depth_nm
            } else {
                0.0
            },
        }
    }

    fn bulk_fin(&self) -> bool {
        self.arch == Architecture::BulkFin
    }

    fn gaa(&self) -> bool {
        self.arch == Architecture::GateAllAround
    }

    /// Bottom of the domain, nm.
    fn z_bottom(&self, s: &Scenario) -> f64 {
        if self.gaa() {
            self.h + self.t + self.gate_height
        } else if self.bulk_fin() {
            self.h + self.iso + self.sub
        } else {
            self.h + s.geometry.box_thickness_nm + BACK_PLANE_SLAB_NM
        }
    }

    /// Material at (x, y, z) (a cell centre).
    fn material(&self, s: &Scenario, x: f64, y: f64, z: f64) -> CellKind {
        let g = &s.geometry;
        if self.bulk_fin() && z > self.h {
            // Below the gated fin: the sub-fin (as wide as the fin) through
            // the isolation oxide, then substrate silicon over the whole width.
            return if y.abs() < self.half_w || z > self.h + self.iso {
                CellKind::Semi
            } else {
                CellKind::Dielectric(EPS_SIO2)
            };
        }
        if !self.gaa() && z > self.h {
            return if z < self.h + g.box_thickness_nm {
                CellKind::Dielectric(g.box_eps)
            } else {
                CellKind::Metal(BACK_PLANE)
            };
        }
        let dy = y.abs() - self.half_w;
        let dz_top = -self.tc - z;
        let dz_bottom = if self.gaa() {
            z - self.h
        } else {
            f64::NEG_INFINITY
        };
        if dy < 0.0 && dz_top < 0.0 && dz_bottom < 0.0 {
            return if z < 0.0 {
                CellKind::Dielectric(g.cap_eps)
            } else {
                CellKind::Semi
            };
        }
        let under_gate = x > self.gate.0 && x < self.gate.1;
        if !under_gate {
            return CellKind::Dielectric(g.spacer_eps);
        }
        let d = dy.max(dz_top).max(dz_bottom);
        match self.cum.iter().position(|&c| d < c) {
            Some(k) => CellKind::Dielectric(self.eps[k]),
            None => CellKind::Metal(GATE),
        }
    }
}

/// Mesh lines along the channel: the planar device's hard points (contacts,
/// gate edges, junctions), refined at the gate edges and junctions, and at
/// the gate centre, where the barrier top of a short device lies (the barrier
/// is a nodal maximum: coarse steps there cannot follow its top moving with
/// the drain bias, docs/fins-3d.md "Verification").
fn x_line(s: &Scenario, geo: &Geometry3d, doping: &DopingProfile, max_step: f64) -> Line {
    let r = s.mesh.refinement;
    let (g0, g1) = geo.gate;
    let fj = FIN3D_FINE_JUNCTION * s.mesh.max_step_nm;
    let mid = 0.5 * (g0 + g1);
    let mut hard = vec![0.0, g0, mid, g1, geo.total_x];
    let mut fine = vec![(g0, fj), (mid, fj), (g1, fj)];
    for e in [doping.source_edge, doping.drain_edge] {
        if e > 1e-6 && e < geo.total_x - 1e-6 {
            hard.push(e);
            fine.push((e, fj));
        }
    }
    graded_line_with_growth(&hard, |p| lookup(&fine, p), max_step, r, 2, FIN3D_GROWTH)
}

/// Mesh lines across the fin, y >= 0 (the half domain).
fn y_half_line(s: &Scenario, geo: &Geometry3d, max_step: f64) -> Line {
    let r = s.mesh.refinement;
    let hw = geo.half_w;
    let (fi, fj) = fine_steps(s);
    let mut hard = vec![0.0, hw, geo.y_edge];
    let mut fine = vec![(hw, fi)];
    for &c in &geo.cum {
        if hw + c < geo.y_edge - 1e-9 {
            hard.push(hw + c);
        }
    }
    if hw + geo.t < geo.y_edge - 1e-9 {
        fine.push((hw + geo.t, fj));
    }
    graded_line_with_growth(&hard, |p| lookup(&fine, p), max_step, r, 2, FIN3D_GROWTH)
}

/// Mesh lines in depth, from the top face down.
fn z_line(s: &Scenario, geo: &Geometry3d, max_step: f64) -> Line {
    let r = s.mesh.refinement;
    let core_top = -geo.tc;
    let (fi, fj) = fine_steps(s);
    let mut hard = vec![geo.z_top, core_top, 0.0, geo.h, geo.z_bottom(s)];
    let mut fine = vec![(0.0, fi), (geo.h, fi), (core_top - geo.t, fj)];
    if geo.tc > 0.0 {
        fine.push((core_top, fi));
    }
    for &c in &geo.cum {
        hard.push(core_top - c);
    }
    if geo.gaa() {
        for &c in &geo.cum {
            hard.push(geo.h + c);
        }
        fine.push((geo.h + geo.t, fj));
    } else if geo.bulk_fin() {
        // The isolation bottom (substrate top) is a silicon/dielectric interface.
        hard.push(geo.h + geo.iso);
        fine.push((geo.h + geo.iso, fi));
    } else {
        hard.push(geo.h + s.geometry.box_thickness_nm);
    }
    graded_line_with_growth(&hard, |p| lookup(&fine, p), max_step, r, 2, FIN3D_GROWTH)
}

/// Device width W per fin or wire for currents, nm: the gated silicon
/// perimeter (tri-gate 2 H + W, gate-all-around 2 (H + W), capped fin 2 H;
/// [`super::WIDTH_DEFINITION`]).
pub fn fin_width_nm(s: &Scenario) -> f64 {
    let g = &s.geometry;
    let (w, h) = (g.body_thickness_nm, g.fin_height_nm);
    match s.architecture {
        Architecture::GateAllAround => 2.0 * (h + w),
        Architecture::CappedFin => 2.0 * h,
        _ => 2.0 * h + w,
    }
}

/// Net doping of a bulk fin averaged over the box part [x0, x1] x [z0, z1],
/// nm^-3 (positive: n-type): the source/drain profile is uniform over the
/// gated fin and stops at z = H (`doping.well_depth`), graded below it as
/// along x; the channel dopants fill the gated fin (z <= H) and the sub-fin
/// dopants (`doping.subfin_cm3`) the sub-fin and substrate below.
fn bulk_fin_net_avg(d: &DopingProfile, subfin: f64, h: f64, x: (f64, f64), z: (f64, f64)) -> f64 {
    let above = step_tail_avg(z.0, z.1, h, 0.0);
    let dopants = d.nch * above + subfin * (1.0 - above);
    d.polarity.sign() * (d.sd_avg(x.0, x.1, z.0, z.1) - dopants)
}

/// Finest steps (interface, junction) of the 3D mesh before refinement, nm.
fn fine_steps(s: &Scenario) -> (f64, f64) {
    (
        FIN3D_FINE_INTERFACE * s.mesh.max_step_nm,
        FIN3D_FINE_JUNCTION * s.mesh.max_step_nm,
    )
}

/// Growth of the 3D mesh step per nm away from a refined line.
pub const FIN3D_GROWTH: f64 = 0.5;

/// The largest step of the 3D mesh before refinement, nm.
pub fn fin3d_max_step_nm(s: &Scenario) -> f64 {
    FIN3D_STEP_FACTOR * s.mesh.max_step_nm
}

/// Builds the 3D structure of a tri-gate, gate-all-around or capped-fin
/// device on the half domain y >= 0 (mirror plane y = 0).
pub fn along_fin(s: &Scenario) -> AlongChannel {
    build(s, true)
}

/// [`along_fin`] on the full width -y_edge <= y <= y_edge (no mirror).
pub fn along_fin_full(s: &Scenario) -> AlongChannel {
    build(s, false)
}

fn build(s: &Scenario, half: bool) -> AlongChannel {
    assert!(
        s.architecture.is_fin(),
        "along_fin needs a fin or wire architecture"
    );
    let geo = Geometry3d::of(s);
    let mut doping = DopingProfile::of(s);
    if geo.bulk_fin() {
        // The source/drain profile stops at the gated fin's bottom plane.
        doping.well_depth = Some(geo.h);
    }
    let bulk_fin = geo.bulk_fin();
    let subfin = s.doping.subfin_per_nm3;
    let max_step = fin3d_max_step_nm(s);
    let x = x_line(s, &geo, &doping, max_step);
    let yh = y_half_line(s, &geo, max_step);
    let y = if half {
        yh
    } else {
        let mut nodes: Vec<f64> = yh.nodes[1..].iter().rev().map(|v| -v).collect();
        nodes.extend_from_slice(&yh.nodes);
        Line { nodes }
    };
    let z = z_line(s, &geo, max_step);
    let nx = x.len();
    let nz = z.len();
    let zs = z.nodes.clone();
    let h = geo.h;
    let mut problem = Problem::new_3d(
        x,
        y,
        z,
        Silicon::at(s.temperature_k),
        |xc, yc, zc| geo.material(s, xc, yc, zc),
        |i, _, k| {
            // Ohmic contacts: the fin's silicon end faces (edge nodes
            // included); a bulk fin's substrate contact is its bottom face.
            if bulk_fin && k == nz - 1 {
                Some(SUBSTRATE)
            } else if zs[k] > h + 1e-9 {
                None
            } else if i == 0 {
                Some(SOURCE)
            } else if i == nx - 1 {
                Some(DRAIN)
            } else {
                None
            }
        },
        |x0, x1, _, _, z0, z1| {
            if bulk_fin {
                bulk_fin_net_avg(&doping, subfin, h, (x0, x1), (z0, z1))
            } else {
                doping.net_avg(x0, x1, 0.0, 0.0)
            }
        },
    );
    if half {
        problem.symmetry_factor = 2.0;
    }
    problem.current_width_nm = fin_width_nm(s);
    AlongChannel {
        problem,
        gate_start_nm: geo.gate.0,
        gate_end_nm: geo.gate.1,
        silicon_bottom_nm: h,
        doping,
        mirror_plane_nm: None,
        plugs: None,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_budget_estimate_uses_this_mesh_step() {
        assert_eq!(crate::device::FIN3D_STEP_FACTOR_ESTIMATE, FIN3D_STEP_FACTOR);
    }

    #[test]
    fn the_3d_estimate_is_a_lower_bound_of_the_built_mesh() {
        use crate::device::Architecture;
        for arch in [
            Architecture::TriGate,
            Architecture::GateAllAround,
            Architecture::CappedFin,
            Architecture::BulkFin,
        ] {
            let s = crate::device::parse_device(&crate::device::template::template(arch)).unwrap();
            let (est, _) = crate::device::estimate_nodes_3d(&s);
            let built = along_fin(&s).problem.node_count() as f64;
            assert!(
                est <= built,
                "{arch}: estimate {est} above the built {built} nodes"
            );
        }
    }
    use crate::device::parse_device;
    use crate::discretize::NodeKind;

    fn fin(arch: &str) -> Scenario {
        parse_device(&format!(
            "name = \"f\"\narchitecture = \"{arch}\"\n[geometry]\ngate_length_nm = 20\nbody_thickness_nm = 8\n\
             fin_height_nm = 20\nsource_drain_length_nm = 10\n[[gate_stack]]\nmaterial = \"SiO2\"\nthickness_nm = 1.0\n\
             [gate]\nworkfunction_eV = 4.6\n[mesh]\nmax_step_nm = 1.0\n"
        ))
        .unwrap()
    }

    /// Volume of the cells of one kind, nm^3 (half domain).
    fn volume(p: &Problem, pred: impl Fn(CellKind) -> bool) -> f64 {
        let (hx, hy, hz) = (p.x.steps(), p.y.steps(), p.z.steps());
        let mut v = 0.0;
        for (cz, dz) in hz.iter().enumerate() {
            for (cy, dy) in hy.iter().enumerate() {
                for (cx, dx) in hx.iter().enumerate() {
                    if pred(p.cell_3d(cx, cy, cz)) {
                        v += dx * dy * dz;
                    }
                }
            }
        }
        v
    }

    #[test]
    fn tri_gate_volumes_follow_the_contract() {
        let s = fin("tri-gate");
        let st = along_fin(&s);
        let p = &st.problem;
        // Silicon: half the fin (4 x 20) over the whole length 40 nm.
        let si = volume(p, |c| c == CellKind::Semi);
        assert!((si - 4.0 * 20.0 * 40.0).abs() < 1e-6, "silicon {si}");
        let semi: f64 = p.semi_area.iter().sum();
        assert!((semi - si).abs() < 1e-6);
        // Gate stack (eps 3.9 under the gate only): half of top + side + corner, times L.
        let stack = volume(p, |c| c == CellKind::Dielectric(3.9));
        let box_v = s.geometry.box_thickness_nm * 0.5 * s.geometry.fin_pitch_nm * 40.0;
        assert!(
            (stack - box_v - (4.0 + 20.0 + 1.0) * 20.0).abs() < 1e-6,
            "stack {stack}"
        );
        // Contacts only on the silicon end faces.
        for (n, kind) in p.nodes.iter().enumerate() {
            if let NodeKind::Contact(_) = kind {
                let (x, y, z) = p.coords_nm(n);
                assert!(x == 0.0 || x == 40.0);
                assert!(y <= 4.0 + 1e-9 && (0.0..=20.0 + 1e-9).contains(&z));
            }
        }
    }

    #[test]
    fn gate_all_around_wire_is_wrapped_under_the_gate() {
        let s = fin("gate-all-around");
        let p = &along_fin(&s).problem;
        let si = volume(p, |c| c == CellKind::Semi);
        assert!((si - 4.0 * 20.0 * 40.0).abs() < 1e-6);
        // Stack: half of the ring of width 1 around 8 x 20, times L.
        let ring = (10.0 * 22.0 - 8.0 * 20.0) / 2.0 * 20.0;
        let stack = volume(p, |c| c == CellKind::Dielectric(3.9));
        assert!((stack - ring).abs() < 1e-6, "stack {stack} vs {ring}");
    }

    #[test]
    fn bulk_fin_volumes_contacts_and_doping_follow_the_contract() {
        // 8 nm fin, 20 nm tall, 1 nm SiO2, default pitch 8 + 2 + 20 = 30 nm
        // (half 15 nm); isolation 6 nm, substrate 4 nm; L = 20, S = 10.
        let s = parse_device(
            "name = \"f\"\narchitecture = \"bulk-fin\"\n[geometry]\ngate_length_nm = 20\nbody_thickness_nm = 8\n\
             fin_height_nm = 20\nisolation_depth_nm = 6\nsubstrate_depth_nm = 4\nsource_drain_length_nm = 10\n\
             [[gate_stack]]\nmaterial = \"SiO2\"\nthickness_nm = 1.0\n[gate]\nworkfunction_eV = 4.6\n\
             [doping]\nchannel_cm3 = 1e16\nsubfin_cm3 = 2e18\n[mesh]\nmax_step_nm = 1.0\n",
        )
        .unwrap();
        let p = &along_fin(&s).problem;
        let len = 40.0;
        // Silicon: half fin (4 x 20) + half sub-fin (4 x 6) + half substrate (15 x 4), all along L.
        let si = volume(p, |c| c == CellKind::Semi);
        let want = (4.0 * 20.0 + 4.0 * 6.0 + 15.0 * 4.0) * len;
        assert!((si - want).abs() < 1e-6, "silicon {si} vs {want}");
        // Isolation oxide beside the sub-fin over the whole length, plus the
        // gate stack (SiO2 too) under the gate only.
        let ox = volume(p, |c| c == CellKind::Dielectric(3.9));
        let want_ox = 11.0 * 6.0 * len + (4.0 + 20.0 + 1.0) * 20.0;
        assert!((ox - want_ox).abs() < 1e-6, "oxide {ox} vs {want_ox}");
        // No metal below the isolation top; no back plane.
        let (hx, hy, hz) = (p.x.steps(), p.y.steps(), p.z.steps());
        for cz in 0..hz.len() {
            for cy in 0..hy.len() {
                for cx in 0..hx.len() {
                    let zc = 0.5 * (p.z.nodes[cz] + p.z.nodes[cz + 1]);
                    if zc > 20.0 {
                        assert!(!matches!(p.cell_3d(cx, cy, cz), CellKind::Metal(_)));
                    }
                }
            }
        }
        let bottom = *p.z.nodes.last().unwrap();
        assert!((bottom - 30.0).abs() < 1e-9);
        for (n, kind) in p.nodes.iter().enumerate() {
            let (x, y, z) = p.coords_nm(n);
            match kind {
                NodeKind::Contact(c) if *c == SUBSTRATE => assert!((z - bottom).abs() < 1e-9),
                NodeKind::Contact(_) => {
                    assert!(x == 0.0 || x == len);
                    assert!(y <= 4.0 + 1e-9 && (0.0..=20.0 + 1e-9).contains(&z));
                }
                _ => assert!((z - bottom).abs() > 1e-9 || p.semi_area[n] == 0.0),
            }
        }
        // Doping: source/drain donors over the gated fin only; sub-fin acceptors below.
        let nearest = |l: &Line, v: f64| {
            (0..l.len())
                .min_by(|&a, &b| (l.nodes[a] - v).abs().total_cmp(&(l.nodes[b] - v).abs()))
                .unwrap()
        };
        let ni = |x: f64, z: f64| {
            let (i, k) = (nearest(&p.x, x), nearest(&p.z, z));
            p.net_doping[i + p.nx * p.ny * k]
        };
        assert!((ni(1.0, 10.0) - (1e20 - 1e16) * 1e-21).abs() < 1e-9);
        assert!((ni(20.0, 10.0) + 1e16 * 1e-21).abs() < 1e-12);
        assert!((ni(1.0, 24.0) + 2e18 * 1e-21).abs() < 1e-12);
        assert!((ni(20.0, 24.0) + 2e18 * 1e-21).abs() < 1e-12);
    }
}
