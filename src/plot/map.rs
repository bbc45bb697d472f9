//! The potential map's description: the regions of the planar structure
//! rebuilt from the stored map (materials, permittivities, gate edges and the
//! potential held at the contacts), their outlines and names, and the colour
//! bar's tick text. The 2D slices of a 3D fin ([`super::fin`]) use the same
//! description with their regions given ([`MapFigure::with_regions`]), their
//! own axis titles, and marked points and guide lines.

use crate::io::MapData;
use crate::structure::{BACK_PLANE, GATE};

/// A region of the along-channel section, per cell.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Region {
    Silicon,
    /// A gate-stack layer (dielectric between the gate and the silicon), by permittivity.
    GateStack(f64),
    /// Dielectric beside the gate, above the silicon.
    Spacer,
    /// Dielectric below the silicon.
    BuriedOxide,
    /// Metal electrode k (the structure's electrode numbering).
    Electrode(usize),
    /// Dielectric on top of a fin, inside the gate stack (capped fin).
    Cap,
    /// Dielectric beside a sub-fin (a fin on a bulk substrate).
    Isolation,
    /// Silicon below the gated fin (a fin on a bulk substrate).
    SubFin,
}

/// A line segment in nm, in the map's coordinates (planar maps: x along the
/// channel, y down from the silicon surface; fin slices: see [`super::fin`]).
pub type Segment = [(f64, f64); 2];

/// A named contact drawn as a bar on the boundary.
#[derive(Debug, Clone, PartialEq)]
pub struct Contact {
    pub name: &'static str,
    pub segment: Segment,
}

/// A region name written at a place in the section.
#[derive(Debug, Clone, PartialEq)]
pub struct RegionLabel {
    pub text: &'static str,
    pub at: (f64, f64),
}

/// A point singled out on a map (a ring and a boxed label).
#[derive(Debug, Clone, PartialEq)]
pub struct MapMark {
    pub at: (f64, f64),
    pub label: String,
}

/// A dashed guide line on a map, labelled at its first end.
#[derive(Debug, Clone, PartialEq)]
pub struct MapGuide {
    pub segment: Segment,
    pub label: String,
}

/// The potential map, described.
#[derive(Debug, Clone)]
pub struct MapFigure<'a> {
    pub stem: String,
    pub title: String,
    pub map: &'a MapData,
    /// Node potential, V (`i + j * nx`).
    pub psi: &'a [f64],
    /// Potential range over finite values, V.
    pub range_v: (f64, f64),
    /// Boundaries between different regions (stack layers included).
    pub outlines: Vec<Segment>,
    pub contacts: Vec<Contact>,
    pub labels: Vec<RegionLabel>,
    /// Region of each cell (`i + j * (nx - 1)`).
    pub regions: Vec<Region>,
    /// Axis titles with units: across (x), down (y), and the colour bar.
    pub x_desc: String,
    pub y_desc: String,
    pub value_desc: String,
    pub marks: Vec<MapMark>,
    pub guides: Vec<MapGuide>,
}

fn region(m: &MapData, i: usize, j: usize) -> Region {
    let nx = m.nx();
    let code = m.material[i + j * (nx - 1)];
    let xc = 0.5 * (m.x_nm[i] + m.x_nm[i + 1]);
    let yc = 0.5 * (m.y_nm[j] + m.y_nm[j + 1]);
    match code {
        0 => Region::Silicon,
        c if c >= 2 => Region::Electrode((c - 2) as usize),
        _ if yc > 0.0 => Region::BuriedOxide,
        _ if xc > m.gate_start_nm && xc < m.gate_end_nm => {
            Region::GateStack(m.eps_r[i + j * (nx - 1)])
        }
        _ => Region::Spacer,
    }
}

/// Tolerance for "held at the contact's potential", V.
const HELD_V: f64 = 1e-9;

impl<'a> MapFigure<'a> {
    /// Describes the map of `psi` on `map`; None when the sizes disagree or
    /// no value is finite.
    pub fn new(stem: &str, title: &str, map: &'a MapData, psi: &'a [f64]) -> Option<Self> {
        let (nx, ny) = (map.nx(), map.ny());
        if nx < 2 || ny < 2 || map.material.len() != (nx - 1) * (ny - 1) {
            return None;
        }
        let regions = (0..ny - 1)
            .flat_map(|j| (0..nx - 1).map(move |i| (i, j)))
            .map(|(i, j)| region(map, i, j))
            .collect();
        Self::with_regions(stem, title, map, psi, regions, true)
    }

    /// Describes the map of `psi` on `map` with the region of each cell
    /// given (`i + j * (nx - 1)`); `end_contacts`: look for source and drain
    /// contacts on the first and last x line. None when the sizes disagree
    /// or no value is finite.
    pub fn with_regions(
        stem: &str,
        title: &str,
        map: &'a MapData,
        psi: &'a [f64],
        regions: Vec<Region>,
        end_contacts: bool,
    ) -> Option<Self> {
        let (nx, ny) = (map.nx(), map.ny());
        if nx < 2
            || ny < 2
            || psi.len() != nx * ny
            || map.material.len() != (nx - 1) * (ny - 1)
            || regions.len() != (nx - 1) * (ny - 1)
        {
            return None;
        }
        let (lo, hi) = psi
            .iter()
            .filter(|v| v.is_finite())
            .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), &v| {
                (a.min(v), b.max(v))
            });
        if !lo.is_finite() {
            return None;
        }
        let reg = |i: usize, j: usize| regions[i + j * (nx - 1)];
        let (x, y) = (&map.x_nm, &map.y_nm);
        let mut outlines = Vec::new();
        for j in 0..ny - 1 {
            for i in 0..nx - 1 {
                if i + 1 < nx - 1 && reg(i + 1, j) != reg(i, j) {
                    outlines.push([(x[i + 1], y[j]), (x[i + 1], y[j + 1])]);
                }
                if j + 1 < ny - 1 && reg(i, j + 1) != reg(i, j) {
                    outlines.push([(x[i], y[j + 1]), (x[i + 1], y[j + 1])]);
                }
            }
        }
        // Contacts: boundary nodes of silicon held at one potential (the
        // solver fixes contact nodes; floating boundary nodes vary).
        let mut contacts = Vec::new();
        let si_node = |i: usize, j: usize| {
            let cx = [i.checked_sub(1), (i + 1 < nx).then_some(i)];
            let cy = [j.checked_sub(1), (j + 1 < ny).then_some(j)];
            cx.iter()
                .flatten()
                .any(|&a| cy.iter().flatten().any(|&b| reg(a, b) == Region::Silicon))
        };
        let top = (0..ny).find(|&j| y[j] >= 0.0);
        let ends: &[(&'static str, usize)] = if end_contacts {
            &[("source", 0), ("drain", nx - 1)]
        } else {
            &[]
        };
        for &(name, i) in ends {
            let Some(j0) = top.filter(|&j| si_node(i, j)) else {
                continue;
            };
            let held = psi[i + j0 * nx];
            let mut j1 = j0;
            while j1 + 1 < ny
                && si_node(i, j1 + 1)
                && (psi[i + (j1 + 1) * nx] - held).abs() <= HELD_V
            {
                j1 += 1;
            }
            if j1 > j0 {
                contacts.push(Contact {
                    name,
                    segment: [(x[i], y[j0]), (x[i], y[j1])],
                });
            }
        }
        let jb = ny - 1;
        let bottom_si =
            (0..nx - 1).all(|i| matches!(reg(i, jb - 1), Region::Silicon | Region::SubFin));
        let held = psi[jb * nx];
        if bottom_si && (0..nx).all(|i| (psi[i + jb * nx] - held).abs() <= HELD_V) {
            contacts.push(Contact {
                name: "substrate",
                segment: [(x[0], y[jb]), (x[nx - 1], y[jb])],
            });
        }
        // Names at the area-weighted centre of each region (spacers on
        // either side of the gate apart), or at the region's cell nearest
        // that centre when the centre lies outside it (a gate wrapped
        // around a fin).
        let mut labels = Vec::new();
        let mut centre = |text: &'static str, keep: &dyn Fn(Region, f64) -> bool| {
            let (mut a, mut sx, mut sy) = (0.0, 0.0, 0.0);
            let mut inside = Vec::new();
            for j in 0..ny - 1 {
                for i in 0..nx - 1 {
                    let xc = 0.5 * (x[i] + x[i + 1]);
                    if keep(reg(i, j), xc) {
                        let w = (x[i + 1] - x[i]) * (y[j + 1] - y[j]);
                        a += w;
                        sx += w * xc;
                        sy += w * 0.5 * (y[j] + y[j + 1]);
                        inside.push((i, j));
                    }
                }
            }
            if a > 0.0 {
                let c = (sx / a, sy / a);
                let holds = |&(i, j): &(usize, usize)| {
                    x[i] <= c.0 && c.0 <= x[i + 1] && y[j] <= c.1 && c.1 <= y[j + 1]
                };
                let at = if inside.iter().any(holds) {
                    c
                } else {
                    let mid = |&(i, j): &(usize, usize)| {
                        (0.5 * (x[i] + x[i + 1]), 0.5 * (y[j] + y[j + 1]))
                    };
                    let d = |p: (f64, f64)| (p.0 - c.0).powi(2) + (p.1 - c.1).powi(2);
                    inside
                        .iter()
                        .map(mid)
                        .min_by(|p, q| d(*p).total_cmp(&d(*q)))
                        .unwrap_or(c)
                };
                labels.push(RegionLabel { text, at });
            }
        };
        let (g0, g1) = (map.gate_start_nm, map.gate_end_nm);
        centre("gate", &|r, _| r == Region::Electrode(GATE));
        centre("back plane", &|r, _| r == Region::Electrode(BACK_PLANE));
        centre("spacer", &|r, xc| r == Region::Spacer && xc < g0);
        centre("spacer", &|r, xc| r == Region::Spacer && xc > g1);
        centre("buried oxide", &|r, _| r == Region::BuriedOxide);
        centre("cap", &|r, _| r == Region::Cap);
        centre("isolation", &|r, _| r == Region::Isolation);
        centre("sub-fin and substrate Si", &|r, _| r == Region::SubFin);
        Some(MapFigure {
            stem: stem.into(),
            title: title.into(),
            map,
            psi,
            range_v: (lo, hi),
            outlines,
            contacts,
            labels,
            regions,
            x_desc: "x along the channel (nm)".into(),
            y_desc: "y below the silicon surface (nm)".into(),
            value_desc: "potential (V)".into(),
            marks: Vec::new(),
            guides: Vec::new(),
        })
    }

    /// Decimals for the colour bar's ticks: enough to tell ~8 ticks apart.
    pub fn tick_decimals(&self) -> usize {
        let step = (self.range_v.1 - self.range_v.0).max(1e-12) / 8.0;
        (-step.log10().floor()).clamp(0.0, 6.0) as usize
    }

    /// The region of cell (i, j).
    pub fn region_of(&self, i: usize, j: usize) -> Region {
        self.regions[i + j * (self.map.nx() - 1)]
    }
}

/// A colour-bar tick: `v` with `decimals` decimals, never "-0.0" (a value
/// that rounds to zero is written without a sign).
pub fn tick_text(v: f64, decimals: usize) -> String {
    let s = format!("{v:.decimals$}");
    if s.starts_with('-') && s[1..].chars().all(|c| c == '0' || c == '.') {
        s[1..].to_string()
    } else {
        s
    }
}

/// An axis tick with `decimals` decimals, or one more when the value needs
/// it (a tick at 17.5 on an axis of whole numbers); never "-0".
pub fn axis_text(v: f64, decimals: usize) -> String {
    let s = tick_text(v, decimals + 1);
    match s.strip_suffix('0') {
        Some(t) if s.contains('.') => t.strip_suffix('.').unwrap_or(t).to_string(),
        _ => s,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn axis_ticks_keep_needed_digits() {
        // Source: common practice (ticks as short as they can be without rounding).
        assert_eq!(axis_text(15.0, 0), "15");
        assert_eq!(axis_text(17.5, 0), "17.5");
        assert_eq!(axis_text(-0.0, 1), "0.0");
        assert_eq!(axis_text(-1e-17, 1), "0.0");
        assert_eq!(axis_text(0.25, 1), "0.25");
        assert_eq!(axis_text(-0.2, 1), "-0.2");
    }

    #[test]
    fn ticks_never_show_negative_zero() {
        // Source: common practice (a signed zero on an axis reads as a bug).
        assert_eq!(tick_text(-0.0, 1), "0.0");
        assert_eq!(tick_text(-0.04, 1), "0.0");
        assert_eq!(tick_text(-1e-17, 2), "0.00");
        assert_eq!(tick_text(-0.06, 1), "-0.1");
        assert_eq!(tick_text(0.25, 2), "0.25");
        assert_eq!(tick_text(-0.0, 0), "0");
    }
}
