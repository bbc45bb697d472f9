//! The figures of a fin or wire solved in 3D, described from its solution:
//! the potential on the cross-section (y-z plane) at the barrier's position,
//! the potential on the along-channel slice (x-z plane) through the leakiest
//! line, and the band edge along the leakiest line at both drain biases.
//!
//! Each slice is a 2D [`MapData`] cut from the 3D problem (nodes of the mesh
//! plane nearest the requested position, cells of the layer beside it) and
//! drawn by the ordinary map machinery ([`MapFigure::with_regions`]). The
//! cross-section shows the mirror half mirrored to the full width. Regions
//! come from the problem's materials alone, so every fin architecture gets
//! them: silicon, electrodes, and dielectrics told apart by comparing each
//! cell with the cell at the same (y, z) beside the gate (what changes along
//! x is the gate stack; what does not is cap, buried oxide or isolation).
//! A stack layer of the spacer's own permittivity cannot be told from the
//! spacer this way (its outline is still drawn where the permittivity
//! changes).
//!
//! The along-channel slice is the x-z plane: it holds the gate above the
//! fin, the spacers beside it, the depth of the leakiest line and what lies
//! under the fin (buried oxide, sub-fin), which an x-y plane (seen from
//! above) would not show.
//!
//! Pure: no drawing, no files ([`super::fin_plots`] writes them).

use super::describe::{band_lines_figure, device_name, report_iv_figure, BandTrace, Omission};
use super::figure::{short_number, Figure};
use super::map::{tick_text, MapFigure, MapGuide, MapMark, Region};
use crate::discretize::{CellKind, Problem};
use crate::evaluate::DeviceSolution;
use crate::extract::{band_edge_ev, Barrier};
use crate::io::MapData;
use crate::structure::AlongChannel;

/// Which plane a slice shows.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Plane {
    /// The y-z plane at one x (across the fin).
    CrossSection,
    /// The x-z plane at one y (along the channel).
    AlongChannel,
}

/// One 2D slice of the 3D solution at the off state, ready to describe.
#[derive(Debug, Clone)]
pub struct Slice {
    pub stem: String,
    pub title: String,
    pub plane: Plane,
    /// Position of the mesh plane shown: x of the cross-section, y of the
    /// along-channel slice, nm.
    pub position_nm: f64,
    /// The position asked for: the barrier's x, the leakiest line's y, nm.
    pub target_nm: f64,
    /// Largest mesh step beside the plane shown, nm (the plane is the mesh
    /// line nearest the target, so it lies within half of this).
    pub step_nm: f64,
    /// Drain bias of the potential shown, V.
    pub vds_v: f64,
    /// True when the mirror half was mirrored to the full width.
    pub mirrored: bool,
    /// The slice's mesh (x_nm across, y_nm = z down), materials and permittivities.
    pub map: MapData,
    /// Node potential on the slice, V (`i + j * nx`).
    pub psi_v: Vec<f64>,
    /// Region of each slice cell (`i + j * (nx - 1)`).
    pub regions: Vec<Region>,
    pub marks: Vec<MapMark>,
    pub guides: Vec<MapGuide>,
}

impl Slice {
    /// The map description of this slice (outlines, region names, contacts,
    /// marks, guides, axis titles); None when no potential value is finite.
    pub fn figure(&self) -> Option<MapFigure<'_>> {
        let mut f = MapFigure::with_regions(
            &self.stem,
            &self.title,
            &self.map,
            &self.psi_v,
            self.regions.clone(),
            self.plane == Plane::AlongChannel,
        )?;
        match self.plane {
            Plane::CrossSection => {
                f.x_desc = "y across the fin, 0 at its centre (nm)".into();
                f.y_desc = "z below the top silicon surface (nm)".into();
            }
            Plane::AlongChannel => {
                f.x_desc = "x along the channel (nm)".into();
                f.y_desc = "z below the top silicon surface (nm)".into();
            }
        }
        f.marks = self.marks.clone();
        f.guides = self.guides.clone();
        Some(f)
    }
}

/// Every figure of one device solved in 3D, and what was left out.
#[derive(Debug, Clone, Default)]
pub struct FinFigures {
    pub iv: Option<Figure>,
    pub cross_section: Option<Slice>,
    pub along_channel: Option<Slice>,
    pub band: Option<Figure>,
    pub notes: Vec<Omission>,
}

/// Region of each cell of a 3D problem, from its materials.
struct Regions<'p> {
    p: &'p Problem,
    gate_nm: (f64, f64),
    /// Bottom of the gated silicon, nm.
    bottom_nm: f64,
    /// A cell layer at the gate's middle and one beside the gate (source side).
    gate_cx: Option<usize>,
    spacer_cx: Option<usize>,
    /// Silicon below the gated fin exists (a sub-fin).
    sub_fin: bool,
}

fn mid(line: &[f64], c: usize) -> f64 {
    0.5 * (line[c] + line[c + 1])
}

impl<'p> Regions<'p> {
    fn of(st: &'p AlongChannel) -> Self {
        let p = &st.problem;
        let x = &p.x.nodes;
        let gate_nm = (st.gate_start_nm, st.gate_end_nm);
        let gm = 0.5 * (gate_nm.0 + gate_nm.1);
        let gate_cx = (0..p.nx - 1).find(|&c| x[c] <= gm && gm <= x[c + 1]);
        let spacer_cx = (0..p.nx - 1).rev().find(|&c| mid(x, c) < gate_nm.0);
        let bottom_nm = st.silicon_bottom_nm;
        let sub_fin = (0..p.nz - 1).any(|cz| {
            mid(&p.z.nodes, cz) > bottom_nm
                && (0..(p.nx - 1) * (p.ny - 1))
                    .any(|c| p.cells[c + (p.nx - 1) * (p.ny - 1) * cz] == CellKind::Semi)
        });
        Regions {
            p,
            gate_nm,
            bottom_nm,
            gate_cx,
            spacer_cx,
            sub_fin,
        }
    }

    fn cell(&self, cx: usize, cy: usize, cz: usize) -> CellKind {
        let p = self.p;
        p.cells[cx + (p.nx - 1) * (cy + (p.ny - 1) * cz)]
    }

    fn region(&self, cx: usize, cy: usize, cz: usize) -> Region {
        let zc = mid(&self.p.z.nodes, cz);
        match self.cell(cx, cy, cz) {
            CellKind::Semi if zc > self.bottom_nm => Region::SubFin,
            CellKind::Semi => Region::Silicon,
            CellKind::Metal(k) => Region::Electrode(k),
            CellKind::Dielectric(e) => {
                let varies = match (self.gate_cx, self.spacer_cx) {
                    (Some(g), Some(s)) => self.cell(g, cy, cz) != self.cell(s, cy, cz),
                    _ => false,
                };
                let xc = mid(&self.p.x.nodes, cx);
                if varies {
                    if xc > self.gate_nm.0 && xc < self.gate_nm.1 {
                        Region::GateStack(e)
                    } else {
                        Region::Spacer
                    }
                } else if zc > self.bottom_nm {
                    if self.sub_fin {
                        Region::Isolation
                    } else {
                        Region::BuriedOxide
                    }
                } else if zc < 0.0 {
                    Region::Cap
                } else {
                    Region::Spacer
                }
            }
        }
    }
}

/// The stored material code of a cell (as [`MapData::material`]).
fn code(c: CellKind) -> i64 {
    match c {
        CellKind::Semi => 0,
        CellKind::Dielectric(_) => 1,
        CellKind::Metal(k) => 2 + k as i64,
    }
}

/// Index of the node of `line` nearest `v`.
fn nearest(line: &[f64], v: f64) -> usize {
    (0..line.len())
        .min_by(|&a, &b| (line[a] - v).abs().total_cmp(&(line[b] - v).abs()))
        .unwrap_or(0)
}

/// Of the (up to two) cell layers beside node `i` of `line`, the one whose
/// centre is nearest `toward`.
fn layer_beside(line: &[f64], i: usize, toward: f64) -> usize {
    [i.checked_sub(1), (i + 1 < line.len()).then_some(i)]
        .into_iter()
        .flatten()
        .min_by(|&a, &b| {
            (mid(line, a) - toward)
                .abs()
                .total_cmp(&(mid(line, b) - toward).abs())
        })
        .unwrap_or(0)
}

/// Largest mesh step next to node `i`, nm.
fn step_at(line: &[f64], i: usize) -> f64 {
    let before = i.checked_sub(1).map(|a| line[i] - line[a]);
    let after = (i + 1 < line.len()).then(|| line[i + 1] - line[i]);
    before.into_iter().chain(after).fold(0.0, f64::max)
}

/// The slice map of `p` with `x_nm` across and the z line down.
fn slice_map(
    sol: &DeviceSolution,
    x_nm: Vec<f64>,
    cells: &[CellKind],
    gate: (f64, f64),
) -> MapData {
    let p = &sol.structure.problem;
    MapData {
        x_nm,
        y_nm: p.z.nodes.clone(),
        psi_lin_v: None,
        psi_sat_v: None,
        material: cells.iter().map(|&c| code(c)).collect(),
        eps_r: cells.iter().map(|c| c.eps()).collect(),
        eg_ev: p.silicon.eg_ev,
        polarity: sol.structure.doping.polarity,
        gate_start_nm: gate.0,
        gate_end_nm: gate.1,
        leakiest_depth_lin_nm: None,
        leakiest_depth_sat_nm: None,
    }
}

/// The off state shown on the maps: V_DS,sat if it converged, else V_DS,lin.
fn off_state(sol: &DeviceSolution) -> Option<(&[f64], Barrier, f64)> {
    [
        (&sol.sat.off_psi, sol.barrier_sat, sol.sat.vds_v),
        (&sol.lin.off_psi, sol.barrier_lin, sol.lin.vds_v),
    ]
    .into_iter()
    .find_map(|(psi, b, v)| Some((psi.as_deref()?, b?, v)))
}

/// A position in nm with one decimal, never "-0.0".
fn nm1(v: f64) -> String {
    tick_text(v, 1)
}

/// "off state V_GS = -0.2 V, V_DS = 0.7 V"
fn bias_text(sol: &DeviceSolution, vds: f64) -> String {
    format!(
        "V_GS = {} V (off), V_DS = {} V",
        short_number(sol.report.off_vgs_v),
        short_number(vds)
    )
}

/// The cross-section (y-z plane) at the mesh x nearest the barrier's top.
fn cross_section(
    sol: &DeviceSolution,
    reg: &Regions,
    off: (&[f64], Barrier, f64),
    suffix: &str,
) -> Slice {
    let p = &sol.structure.problem;
    let (psi, b, vds) = off;
    let (nx, ny, nz) = (p.nx, p.ny, p.nz);
    let x = &p.x.nodes;
    let y = &p.y.nodes;
    let ib = nearest(x, b.x_nm);
    let gm = 0.5 * (reg.gate_nm.0 + reg.gate_nm.1);
    let cx = layer_beside(x, ib, gm);
    // Mirror half (the plane y = 0 is the first y line): mirrored to the full width.
    let mirrored = p.symmetry_factor == 2.0 && y[0].abs() < 1e-12 && ny > 1;
    let (node_of, cell_of): (Vec<usize>, Vec<usize>) = if mirrored {
        (
            (1..ny).rev().chain(0..ny).collect(),
            (0..ny - 1).rev().chain(0..ny - 1).collect(),
        )
    } else {
        ((0..ny).collect(), (0..ny - 1).collect())
    };
    let ys: Vec<f64> = node_of
        .iter()
        .enumerate()
        .map(|(n, &j)| if mirrored && n + 1 < ny { -y[j] } else { y[j] })
        .collect();
    let nyf = ys.len();
    let ncf = cell_of.len();
    let psi_v = (0..nz)
        .flat_map(|k| node_of.iter().map(move |&j| (j, k)))
        .map(|(j, k)| psi[ib + nx * (j + ny * k)])
        .collect();
    let cells: Vec<(usize, usize)> = (0..nz - 1)
        .flat_map(|cz| cell_of.iter().map(move |&cy| (cy, cz)))
        .collect();
    let kinds: Vec<CellKind> = cells.iter().map(|&(cy, cz)| reg.cell(cx, cy, cz)).collect();
    let regions = cells
        .iter()
        .map(|&(cy, cz)| reg.region(cx, cy, cz))
        .collect();
    debug_assert_eq!(kinds.len(), ncf * (nz - 1));
    debug_assert_eq!(nyf, ncf + 1);
    let map = slice_map(sol, ys, &kinds, (0.0, 0.0));
    let (yl, zl) = (b.y_nm, b.z_nm);
    let pm = if mirrored && yl.abs() > 1e-9 {
        "±"
    } else {
        ""
    };
    let mut marks = vec![MapMark {
        at: (yl, zl),
        label: format!(
            "leakiest line y = {pm}{} nm, z = {} nm",
            nm1(yl.abs()),
            nm1(zl)
        ),
    }];
    if !pm.is_empty() {
        marks.push(MapMark {
            at: (-yl, zl),
            label: String::new(),
        });
    }
    Slice {
        stem: format!("cross_section{suffix}"),
        title: format!(
            "Cross-section at the barrier, x = {} nm, {}: {}",
            nm1(x[ib]),
            bias_text(sol, vds),
            device_name(&sol.report)
        ),
        plane: Plane::CrossSection,
        position_nm: x[ib],
        target_nm: b.x_nm,
        step_nm: step_at(x, ib),
        vds_v: vds,
        mirrored,
        map,
        psi_v,
        regions,
        marks,
        guides: Vec::new(),
    }
}

/// The along-channel slice (x-z plane) at the leakiest line's y.
fn along_channel(
    sol: &DeviceSolution,
    reg: &Regions,
    off: (&[f64], Barrier, f64),
    suffix: &str,
) -> Slice {
    let st = &sol.structure;
    let p = &st.problem;
    let (psi, b, vds) = off;
    let (nx, ny, nz) = (p.nx, p.ny, p.nz);
    let x = &p.x.nodes;
    let y = &p.y.nodes;
    let z = &p.z.nodes;
    let jl = (b.line % ny).min(ny - 1);
    // The cell layer on the fin-centre side, so that a line on the fin's
    // side face shows the fin's silicon.
    let cy = layer_beside(y, jl, 0.0);
    let psi_v = (0..nz)
        .flat_map(|k| (0..nx).map(move |i| (i, k)))
        .map(|(i, k)| psi[i + nx * (jl + ny * k)])
        .collect();
    let cells: Vec<(usize, usize)> = (0..nz - 1)
        .flat_map(|cz| (0..nx - 1).map(move |cx| (cx, cz)))
        .collect();
    let kinds: Vec<CellKind> = cells.iter().map(|&(cx, cz)| reg.cell(cx, cy, cz)).collect();
    let regions = cells
        .iter()
        .map(|&(cx, cz)| reg.region(cx, cy, cz))
        .collect();
    let map = slice_map(sol, x.clone(), &kinds, reg.gate_nm);
    let (x0, x1) = (x[0], x[nx - 1]);
    let mut guides = vec![MapGuide {
        segment: [(x0, b.z_nm), (x1, b.z_nm)],
        label: format!("leakiest line z = {} nm", nm1(b.z_nm)),
    }];
    for (e, name) in [
        (st.doping.source_edge, "source junction"),
        (st.doping.drain_edge, "drain junction"),
    ] {
        if e > x0 + 1e-9 && e < x1 - 1e-9 {
            guides.push(MapGuide {
                segment: [(e, 0.0), (e, reg.bottom_nm)],
                label: name.into(),
            });
        }
    }
    for g in [reg.gate_nm.0, reg.gate_nm.1] {
        guides.push(MapGuide {
            segment: [(g, z[0]), (g, 0.0)],
            label: "gate edge".into(),
        });
    }
    Slice {
        stem: format!("along_channel{suffix}"),
        title: format!(
            "Along the channel through the leakiest line, y = {} nm, {}: {}",
            nm1(y[jl]),
            bias_text(sol, vds),
            device_name(&sol.report)
        ),
        plane: Plane::AlongChannel,
        position_nm: y[jl],
        target_nm: b.y_nm,
        step_nm: step_at(y, jl),
        vds_v: vds,
        mirrored: false,
        map,
        psi_v,
        regions,
        marks: vec![MapMark {
            at: (b.x_nm, b.z_nm),
            label: format!("barrier top {:.3} eV", b.height_ev),
        }],
        guides,
    }
}

/// The band edge along the leakiest line of each drain bias, over the nodes
/// that touch silicon (as the barrier extraction takes it).
fn band_trace(
    sol: &DeviceSolution,
    psi: Option<&[f64]>,
    b: Option<Barrier>,
    vds: f64,
) -> Option<BandTrace> {
    let p = &sol.structure.problem;
    let (psi, b) = (psi?, b?);
    let points = (0..p.nx)
        .map(|i| i + p.nx * b.line)
        .filter(|&n| n < psi.len() && p.semi_area[n] > 0.0)
        .map(|n| {
            (
                p.x.nodes[n % p.nx],
                band_edge_ev(p, psi[n], sol.structure.doping.polarity),
            )
        })
        .collect();
    Some(BandTrace {
        vds_v: vds,
        line: format!("line y = {} nm, z = {} nm", nm1(b.y_nm), nm1(b.z_nm)),
        points,
    })
}

/// Every figure of a device solved in 3D, stems ending in `suffix`
/// (`iv`, `cross_section`, `along_channel`, `band`). A figure the data
/// cannot hold (no converged off state, no current) is left out with a note.
pub fn fin_figures(sol: &DeviceSolution, suffix: &str) -> FinFigures {
    let mut out = FinFigures::default();
    let name = device_name(&sol.report);
    let p = &sol.structure.problem;
    if !p.is_3d() {
        out.notes.push(Omission::missing(format!(
            "{name}: not a 3D solution, no cross-section or along-channel figure"
        )));
        return out;
    }
    out.iv = report_iv_figure(&sol.report, &format!("iv{suffix}"));
    if out.iv.is_none() {
        out.notes.push(Omission::missing(format!(
            "{name}: no converged drain current, no I_D-V_G figure"
        )));
    }
    let reg = Regions::of(&sol.structure);
    match off_state(sol) {
        Some(off) if off.0.len() == p.node_count() => {
            out.cross_section = Some(cross_section(sol, &reg, off, suffix));
            out.along_channel = Some(along_channel(sol, &reg, off, suffix));
        }
        _ => out.notes.push(Omission::missing(format!(
            "{name}: no converged off-state potential at either drain bias, no cross-section or along-channel figure"
        ))),
    }
    let traces = [
        band_trace(
            sol,
            sol.lin.off_psi.as_deref(),
            sol.barrier_lin,
            sol.lin.vds_v,
        ),
        band_trace(
            sol,
            sol.sat.off_psi.as_deref(),
            sol.barrier_sat,
            sol.sat.vds_v,
        ),
    ];
    out.band = band_lines_figure(
        &format!("band{suffix}"),
        &format!("Band edge along the leakiest line, off state: {name}"),
        &traces,
        reg.gate_nm,
    );
    if out.band.is_none() {
        out.notes.push(Omission::missing(format!(
            "{name}: no converged off-state potential, no band-edge figure"
        )));
    }
    for s in [&out.cross_section, &out.along_channel]
        .into_iter()
        .flatten()
    {
        if !s.psi_v.iter().any(|v| v.is_finite()) {
            out.notes.push(Omission::missing(format!(
                "{name}: {}: no finite potential, figure left out",
                s.stem
            )));
        }
    }
    out
}
