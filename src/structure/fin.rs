//! The cross-section PERPENDICULAR to the channel of fin and wire devices
//! (DEVICE-FORMAT.md: tri-gate, gate-all-around; plus the capped fin), built
//! as a [`Problem`] (geometry, materials and doping only; the solve is
//! [`crate::solve::UniformChannel`]).
//!
//! Coordinates: x across the fin, centred on it (fin from -W/2 to W/2); y
//! downward from the top silicon surface (fin from 0 to H), nm. Electrode 0
//! ([`GATE`]) is the gate, electrode 1 ([`BACK_PLANE`]) the plane under the
//! buried oxide. There are no ohmic contacts: the body floats and its carriers
//! follow the uniform quasi-Fermi levels of a long channel.
//!
//! Geometry per architecture:
//! - tri-gate: fin on a buried oxide (`box_thickness_nm`, `box_material`);
//!   the gate stack on the top and both sides, wrapping the top corners with
//!   square (L-infinity) corners; the gate metal around that, filling the
//!   space above the buried oxide beside the fin; a 1 nm metal slab under the
//!   buried oxide stands for the back plane. Lateral faces at +-fin_pitch/2
//!   are symmetry planes (zero normal field).
//! - gate-all-around: the stack on all four sides and metal everywhere else.
//!   The metal is Dirichlet, so the domain stops 1 nm into it; fin_pitch and
//!   the buried oxide do not enter.
//! - capped fin: a dielectric cap (`cap_thickness_nm`, `cap_material`) as
//!   wide as the fin on its top; the gate stack wraps the fin-plus-cap core
//!   (its two sides and the cap's top) and the gate metal lies over that;
//!   buried oxide and back plane as for the tri-gate.
//! - bulk fin: the gated fin as a tri-gate's (stack and metal down to y = H),
//!   no buried oxide; below y = H a sub-fin as wide as the fin through an
//!   isolation oxide (SiO2, `isolation_depth_nm`), then substrate silicon
//!   (`substrate_depth_nm`) over the whole width with the substrate contact
//!   ([`SUBSTRATE`], 0 V, neutrality) on its bottom face. The fin holds the
//!   channel doping, the sub-fin and substrate `doping.subfin_cm3`. For the
//!   natural length, [`bulk_fin_eigen_section`] grounds the silicon below the
//!   sub-fin's depletion depth (the neutral, screened part).
//!
//! Device width (needed for a threshold current I_cc W/L): W is per fin (or
//! wire) and equals the gated silicon perimeter: tri-gate 2 H + W_fin,
//! gate-all-around 2 (H + W_fin), capped fin 2 H (see [`WIDTH_DEFINITION`]).
//!
//! Back plane potential: the back work function and bias of the `[gate]`
//! table (defaults 5.17 eV, 0 V). Note: device parsing currently warns that
//! these keys have no effect outside thin-body; they only act through the
//! buried oxide here.

use super::planar::step_tail_avg;
use super::{lookup, BACK_PLANE, FINE_INTERFACE_NM, FINE_OTHER_NM, GATE, SUBSTRATE};
use crate::device::{Architecture, Scenario};
use crate::discretize::{CellKind, Problem};
use crate::mesh::graded_line;
use crate::physics::{Silicon, EPS_SIO2};

/// Thickness of the metal slab that closes the domain (gate top, back plane), nm.
pub const METAL_SLAB_NM: f64 = 1.0;

/// How gatehold defines the width W of a fin or wire device (stated in every output).
pub const WIDTH_DEFINITION: &str =
    "per fin: W = gated silicon perimeter (tri-gate 2 H_fin + W_fin, \
     gate-all-around 2 (H + W), capped fin 2 H_fin, bulk fin 2 H_fin + W_fin)";

/// What a cell of the cross-section is made of, by role.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord, serde::Serialize)]
pub enum Region {
    Silicon,
    GateStack,
    BuriedOxide,
    Cap,
    Metal,
    /// Bulk fin: the isolation oxide beside the sub-fin.
    Isolation,
}

impl Region {
    /// Words for reports.
    pub fn describe(&self) -> &'static str {
        match self {
            Region::Silicon => "silicon body",
            Region::GateStack => "gate stack",
            Region::BuriedOxide => "buried oxide",
            Region::Cap => "fin cap",
            Region::Metal => "metal",
            Region::Isolation => "isolation oxide",
        }
    }
}

/// Failure to build or solve a cross-section.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum CrossSectionError {
    #[error("architecture {0} has no fin or wire cross-section (planar devices use the along-channel section)")]
    NotAFin(Architecture),
}

/// A fin or wire cross-section ready for eigen and Poisson solves.
#[derive(Debug, Clone)]
pub struct CrossSection {
    pub architecture: Architecture,
    pub problem: Problem,
    /// Role of each cell, index `cx + cy * (nx - 1)` as [`Problem::cells`].
    pub regions: Vec<Region>,
    /// Fin (wire) width and height, nm.
    pub fin_width_nm: f64,
    pub fin_height_nm: f64,
    /// Device width W per fin, nm ([`WIDTH_DEFINITION`]).
    pub width_nm: f64,
    /// Node at the top-right silicon corner (x = W/2, y = 0).
    pub corner_node: usize,
    /// Node at the centre of the top silicon face (x = 0, y = 0).
    pub top_centre_node: usize,
    /// Node at the middle of the right side face (x = W/2, y = H/2).
    pub side_centre_node: usize,
}

/// Builds the cross-section of a tri-gate, gate-all-around, capped-fin or bulk-fin scenario.
pub fn cross_section(s: &Scenario) -> Result<CrossSection, CrossSectionError> {
    build(s, None)
}

/// The cross-section of a bulk fin for its natural length: the silicon
/// deeper than `grounded_depth_nm` below the gated fin's bottom (the
/// sub-fin's depletion depth) is a grounded electrode, as a planar bulk
/// stack is grounded at its depletion depth; clamped to the substrate bottom.
/// Other architectures: [`cross_section`].
pub fn bulk_fin_eigen_section(
    s: &Scenario,
    grounded_depth_nm: f64,
) -> Result<CrossSection, CrossSectionError> {
    if s.architecture != Architecture::BulkFin {
        return cross_section(s);
    }
    let g = &s.geometry;
    let below = g.isolation_depth_nm + g.substrate_depth_nm;
    build(s, (grounded_depth_nm < below).then_some(grounded_depth_nm))
}

fn build(s: &Scenario, grounded_depth_nm: Option<f64>) -> Result<CrossSection, CrossSectionError> {
    let arch = s.architecture;
    if !arch.is_fin() {
        return Err(CrossSectionError::NotAFin(arch));
    }
    let g = &s.geometry;
    let w = g.body_thickness_nm;
    let h = g.fin_height_nm;
    let half = 0.5 * w;
    let t = s.stack_thickness_nm();
    let gaa = arch == Architecture::GateAllAround;
    let capped = arch == Architecture::CappedFin;
    let bulk = arch == Architecture::BulkFin;
    let (iso, sub) = (g.isolation_depth_nm, g.substrate_depth_nm);
    let nsub = s.doping.subfin_per_nm3;
    let tc = if capped { g.cap_thickness_nm } else { 0.0 };
    let core_top = -tc;
    let tbox = g.box_thickness_nm;
    let r = s.mesh.refinement;
    let max_step = s.mesh.max_step_nm;
    let cum: Vec<f64> = s
        .stack
        .iter()
        .scan(0.0, |acc, l| {
            *acc += l.thickness_nm;
            Some(*acc)
        })
        .collect();

    // x lines.
    let x_edge = if gaa {
        half + t + METAL_SLAB_NM
    } else {
        0.5 * g.fin_pitch_nm
    };
    let mut xh = vec![-x_edge, x_edge, -half, 0.0, half];
    let mut xf = vec![(-half, FINE_INTERFACE_NM), (half, FINE_INTERFACE_NM)];
    for &c in &cum {
        if half + c < x_edge - 1e-9 {
            xh.push(-(half + c));
            xh.push(half + c);
        }
    }
    if half + t < x_edge - 1e-9 {
        xf.push((-(half + t), FINE_OTHER_NM));
        xf.push((half + t, FINE_OTHER_NM));
    }
    let x = graded_line(&xh, |p| lookup(&xf, p), max_step, r, 2);

    // y lines.
    let mut yh = vec![core_top - t - METAL_SLAB_NM, core_top, 0.0, 0.5 * h, h];
    let mut yf = vec![
        (0.0, FINE_INTERFACE_NM),
        (h, FINE_INTERFACE_NM),
        (core_top - t, FINE_OTHER_NM),
    ];
    for &c in &cum {
        yh.push(core_top - c);
    }
    if gaa {
        for &c in &cum {
            yh.push(h + c);
        }
        yh.push(h + t + METAL_SLAB_NM);
        yf.push((h + t, FINE_OTHER_NM));
    } else if bulk {
        yh.push(h + iso);
        yh.push(h + iso + sub);
        yf.push((h + iso, FINE_INTERFACE_NM));
        if let Some(d) = grounded_depth_nm {
            yh.push(h + d);
        }
    } else {
        yh.push(h + tbox);
        yh.push(h + tbox + METAL_SLAB_NM);
    }
    let y = graded_line(&yh, |p| lookup(&yf, p), max_step, r, 2);

    let stack_region = |d: f64| -> Option<f64> {
        s.stack
            .iter()
            .zip(&cum)
            .find(|(_, &c)| d < c)
            .map(|(l, _)| l.eps_r)
    };
    let region_at = |xc: f64, yc: f64| -> (Region, CellKind) {
        if bulk && yc > h {
            if grounded_depth_nm.is_some_and(|d| yc > h + d) && (xc.abs() < half || yc > h + iso) {
                return (Region::Metal, CellKind::Metal(BACK_PLANE));
            }
            return if xc.abs() < half || yc > h + iso {
                (Region::Silicon, CellKind::Semi)
            } else {
                (Region::Isolation, CellKind::Dielectric(EPS_SIO2))
            };
        }
        if !gaa && yc > h {
            return if yc < h + tbox {
                (Region::BuriedOxide, CellKind::Dielectric(g.box_eps))
            } else {
                (Region::Metal, CellKind::Metal(BACK_PLANE))
            };
        }
        let dx = xc.abs() - half;
        let dy_top = core_top - yc;
        let dy_bottom = if gaa { yc - h } else { f64::NEG_INFINITY };
        if dx < 0.0 && dy_top < 0.0 && dy_bottom < 0.0 {
            return if yc < 0.0 {
                (Region::Cap, CellKind::Dielectric(g.cap_eps))
            } else {
                (Region::Silicon, CellKind::Semi)
            };
        }
        let d = dx.max(dy_top).max(dy_bottom);
        match stack_region(d) {
            Some(eps) => (Region::GateStack, CellKind::Dielectric(eps)),
            None => (Region::Metal, CellKind::Metal(GATE)),
        }
    };
    let silicon = Silicon::at(s.temperature_k);
    let sign = s.polarity.sign();
    let nch = s.doping.channel_per_nm3;
    let ny = y.len();
    let problem = Problem::new(
        x,
        y,
        silicon,
        |xc, yc| region_at(xc, yc).1,
        // Bulk fin: the substrate contact on the bottom face.
        |_, j| (bulk && j == ny - 1).then_some(SUBSTRATE),
        |_, _, y0, y1| {
            if bulk {
                let above = step_tail_avg(y0, y1, h, 0.0);
                -sign * (nch * above + nsub * (1.0 - above))
            } else {
                -sign * nch
            }
        },
    );
    let mut regions = Vec::with_capacity(problem.cells.len());
    for cy in 0..problem.ny - 1 {
        for cx in 0..problem.nx - 1 {
            let xc = 0.5 * (problem.x.nodes[cx] + problem.x.nodes[cx + 1]);
            let yc = 0.5 * (problem.y.nodes[cy] + problem.y.nodes[cy + 1]);
            regions.push(region_at(xc, yc).0);
        }
    }
    let node = |xv: f64, yv: f64| -> usize {
        let i = problem.x.index_of(xv).expect("hard point is a mesh line");
        let j = problem.y.index_of(yv).expect("hard point is a mesh line");
        i + j * problem.nx
    };
    let width_nm = match arch {
        Architecture::GateAllAround => 2.0 * (h + w),
        Architecture::CappedFin => 2.0 * h,
        _ => 2.0 * h + w,
    };
    Ok(CrossSection {
        architecture: arch,
        corner_node: node(half, 0.0),
        top_centre_node: node(0.0, 0.0),
        side_centre_node: node(half, 0.5 * h),
        problem,
        regions,
        fin_width_nm: w,
        fin_height_nm: h,
        width_nm,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::device::parse_device;

    fn fin(arch: &str) -> Scenario {
        parse_device(&format!(
            "name = \"f\"\narchitecture = \"{arch}\"\n[geometry]\ngate_length_nm = 20\nbody_thickness_nm = 8\n\
             fin_height_nm = 30\n[[gate_stack]]\nmaterial = \"SiO2\"\nthickness_nm = 1.0\n[gate]\nworkfunction_eV = 4.6\n"
        ))
        .unwrap()
    }

    #[test]
    fn tri_gate_section_has_the_stated_geometry() {
        let cs = cross_section(&fin("tri-gate")).unwrap();
        let p = &cs.problem;
        // Silicon area = fin area; gate stack area = top + two sides + two corners.
        let area = |r: Region| -> f64 {
            let mut a = 0.0;
            for cy in 0..p.ny - 1 {
                for cx in 0..p.nx - 1 {
                    if cs.regions[cx + cy * (p.nx - 1)] == r {
                        a += (p.x.nodes[cx + 1] - p.x.nodes[cx])
                            * (p.y.nodes[cy + 1] - p.y.nodes[cy]);
                    }
                }
            }
            a
        };
        assert!((area(Region::Silicon) - 8.0 * 30.0).abs() < 1e-9);
        assert!((area(Region::GateStack) - (8.0 + 2.0 * 30.0 + 2.0)).abs() < 1e-9);
        // Default pitch: 8 + 2 + 20 = 30 nm; buried oxide 25 nm under all of it.
        assert!((area(Region::BuriedOxide) - 30.0 * 25.0).abs() < 1e-9);
        assert_eq!(cs.width_nm, 68.0);
        let semi: f64 = p.semi_area.iter().sum();
        assert!((semi - 240.0).abs() < 1e-9);
    }

    #[test]
    fn gate_all_around_is_closed_by_metal() {
        let cs = cross_section(&fin("gate-all-around")).unwrap();
        assert!(!cs.regions.contains(&Region::BuriedOxide));
        let p = &cs.problem;
        // Every boundary node is on the gate.
        for j in 0..p.ny {
            for i in [0, p.nx - 1] {
                assert_eq!(
                    p.nodes[i + j * p.nx],
                    crate::discretize::NodeKind::Electrode(GATE)
                );
            }
        }
    }

    #[test]
    fn bulk_fin_section_has_sub_fin_isolation_and_substrate_contact() {
        let s = parse_device(
            "name = \"f\"\narchitecture = \"bulk-fin\"\n[geometry]\ngate_length_nm = 20\nbody_thickness_nm = 8\n\
             fin_height_nm = 30\nisolation_depth_nm = 12\nsubstrate_depth_nm = 5\n[[gate_stack]]\n\
             material = \"SiO2\"\nthickness_nm = 1.0\n[gate]\nworkfunction_eV = 4.6\n\
             [doping]\nchannel_cm3 = 1e16\nsubfin_cm3 = 3e18\n",
        )
        .unwrap();
        let area = |cs: &CrossSection, r: Region| -> f64 {
            let p = &cs.problem;
            let mut a = 0.0;
            for cy in 0..p.ny - 1 {
                for cx in 0..p.nx - 1 {
                    if cs.regions[cx + cy * (p.nx - 1)] == r {
                        a += (p.x.nodes[cx + 1] - p.x.nodes[cx])
                            * (p.y.nodes[cy + 1] - p.y.nodes[cy]);
                    }
                }
            }
            a
        };
        let cs = cross_section(&s).unwrap();
        let p = &cs.problem;
        // Pitch 8 + 2 + 20 = 30 nm: fin 8 x 30, sub-fin 8 x 12, substrate 30 x 5.
        assert!((area(&cs, Region::Silicon) - (240.0 + 96.0 + 150.0)).abs() < 1e-9);
        assert!((area(&cs, Region::Isolation) - 22.0 * 12.0).abs() < 1e-9);
        assert!((area(&cs, Region::GateStack) - (8.0 + 60.0 + 2.0)).abs() < 1e-9);
        assert_eq!(area(&cs, Region::BuriedOxide), 0.0);
        // The bottom face is the substrate contact; the sub-fin holds the stopper doping.
        let bottom = (p.ny - 1) * p.nx;
        for i in 0..p.nx {
            assert_eq!(
                p.nodes[bottom + i],
                crate::discretize::NodeKind::Contact(SUBSTRATE)
            );
        }
        let centre = p.x.index_of(0.0).unwrap();
        let nearest = |v: f64| {
            (0..p.ny)
                .min_by(|&a, &b| {
                    (p.y.nodes[a] - v)
                        .abs()
                        .total_cmp(&(p.y.nodes[b] - v).abs())
                })
                .unwrap()
        };
        let at = |y: f64| p.net_doping[centre + nearest(y) * p.nx];
        assert!((at(15.0) + 1e16 * 1e-21).abs() < 1e-15);
        assert!((at(36.0) + 3e18 * 1e-21).abs() < 1e-15);
        // Grounded below 4 nm under the fin for the eigenproblem: no silicon below 34 nm.
        let e = bulk_fin_eigen_section(&s, 4.0).unwrap();
        assert!((area(&e, Region::Silicon) - (240.0 + 32.0)).abs() < 1e-9);
        // A depth beyond the substrate leaves the section as it is.
        let same = bulk_fin_eigen_section(&s, 100.0).unwrap();
        assert_eq!(same.problem.node_count(), p.node_count());
    }
}
