//! Sweep results in memory and on disk: the [`SweepFile`] model, its HDF5
//! form ([`hdf5`], schema in `docs/hdf5-schema.md`) and a CSV export ([`csv`]).
//!
//! The model is the same whether it was just computed or read back from a
//! file, so resume, merge and plotting all work on it.

pub mod checksum;
pub mod csv;
pub mod hdf5;
pub mod shortest;

use crate::device::Polarity;
use crate::discretize::CellKind;
use crate::evaluate::{CriteriaVerdict, DeviceSolution, Method, Status};

/// Width in bytes of the fixed-width `status` strings of format-1 files
/// (format 2 stores statuses whole, as variable-length strings).
pub const STATUS_WIDTH: usize = 256;

/// One file a sweep's plan read, with the SHA-256 of its text: resume and
/// merge refuse a file whose inputs differ, naming the input.
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct InputRecord {
    /// "plan" or "base".
    pub role: String,
    /// The file as the user named it (the plan's path, or `base` as written in the plan);
    /// "(inline)" for a `[base]` table inside the plan.
    pub file: String,
    /// SHA-256 of the file's bytes, lowercase hex (FIPS 180-4).
    pub sha256: String,
}

/// SHA-256 of `bytes`, lowercase hex.
pub fn sha256_hex(bytes: &[u8]) -> String {
    use sha2::Digest;
    sha2::Sha256::digest(bytes)
        .iter()
        .map(|b| format!("{b:02x}"))
        .collect()
}

/// What went wrong reading or writing a results file.
#[derive(Debug, thiserror::Error)]
pub enum IoError {
    #[error("{path}: {reason}")]
    File { path: String, reason: String },
    #[error("{path}: HDF5 `{object}`: {reason}")]
    Hdf5 {
        path: String,
        object: String,
        reason: String,
    },
    #[error("{path}: not a gatehold sweep file: {reason}")]
    NotSweep { path: String, reason: String },
    /// A stored checksum (fletcher32 of a dataset's chunk, or the CRC of an
    /// HDF5 metadata block) does not match the bytes read: the file changed
    /// after it was written.
    #[error("{path}: `{object}` is damaged: its bytes no longer match the checksum stored with them ({reason}); the file changed after it was written (disk, copy or transfer): use a good copy, or rerun the sweep")]
    Damaged {
        path: String,
        object: String,
        reason: String,
    },
}

/// One value an axis takes.
#[derive(Debug, Clone, PartialEq)]
pub enum AxisValue {
    Number(f64),
    Text(String),
}

impl std::fmt::Display for AxisValue {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            AxisValue::Number(x) => write!(f, "{x}"),
            AxisValue::Text(s) => write!(f, "\"{s}\""),
        }
    }
}

/// Root metadata of a sweep file.
#[derive(Debug, Clone, PartialEq)]
pub struct SweepMeta {
    pub tool_version: String,
    /// The plan file's text.
    pub plan: String,
    /// RFC 3339 UTC time the file was first created.
    pub created: String,
    pub command_line: String,
    pub model_summary: String,
    /// RFC 3339 UTC start of the (first) run into this file.
    pub started: String,
    /// RFC 3339 UTC end; empty while the file is partial.
    pub finished: String,
    /// This file holds points with `index % shard_count == shard_index`.
    pub shard_index: usize,
    pub shard_count: usize,
    /// Points in the whole plan (all shards).
    pub points_total: usize,
    /// The base device's text as the plan read it (empty in format-1 files).
    pub base_device: String,
    /// Every file the plan read, with its hash (empty in format-1 files).
    pub inputs: Vec<InputRecord>,
}

impl SweepMeta {
    /// Number of plan points that belong to this file's shard.
    pub fn points_in_shard(&self) -> usize {
        (0..self.points_total)
            .filter(|i| i % self.shard_count == self.shard_index)
            .count()
    }
}

/// An axis column: its plan key and whether it is numeric (else text).
#[derive(Debug, Clone, PartialEq)]
pub struct AxisColumn {
    pub key: String,
    pub numeric: bool,
}

/// A point's I_D-V_G curves; NaN marks a bias point that did not converge.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct CurveData {
    /// Gate voltage, ascending, V.
    pub vgs_v: Vec<f64>,
    /// Drain current per um of width at V_DS,lin, A/um.
    pub id_lin: Vec<f64>,
    /// Drain current per um of width at V_DS,sat, A/um.
    pub id_sat: Vec<f64>,
}

/// Potential at the off-state gate voltage on the mesh, with the materials.
#[derive(Debug, Clone, PartialEq)]
pub struct MapData {
    /// Mesh lines, nm (x along the channel from the source contact, y down from the top silicon surface).
    pub x_nm: Vec<f64>,
    pub y_nm: Vec<f64>,
    /// Potential at V_DS,lin / V_DS,sat, V, node (i, j) at `i + j * nx`; None: that point did not converge.
    pub psi_lin_v: Option<Vec<f64>>,
    pub psi_sat_v: Option<Vec<f64>>,
    /// Cell material code, cell (i, j) at `i + j * (nx - 1)`: 0 silicon, 1 dielectric, 2 + k metal electrode k.
    pub material: Vec<i64>,
    /// Relative permittivity per cell (0 in metal).
    pub eps_r: Vec<f64>,
    /// Silicon band gap, eV, and the channel polarity: band edge = eg/2 - s psi
    /// (s = +1 electrons, -1 holes; stored as the attribute `carrier_sign`).
    pub eg_ev: f64,
    pub polarity: Polarity,
    pub gate_start_nm: f64,
    pub gate_end_nm: f64,
    /// Depth of the leakiest row at each drain bias, nm.
    pub leakiest_depth_lin_nm: Option<f64>,
    pub leakiest_depth_sat_nm: Option<f64>,
}

impl MapData {
    pub fn nx(&self) -> usize {
        self.x_nm.len()
    }
    pub fn ny(&self) -> usize {
        self.y_nm.len()
    }

    /// Builds the map of a solved device.
    pub fn of(sol: &DeviceSolution) -> MapData {
        let p = &sol.structure.problem;
        let material = p
            .cells
            .iter()
            .map(|c| match c {
                CellKind::Semi => 0,
                CellKind::Dielectric(_) => 1,
                CellKind::Metal(k) => 2 + *k as i64,
            })
            .collect();
        MapData {
            x_nm: p.x.nodes.clone(),
            y_nm: p.y.nodes.clone(),
            psi_lin_v: sol.lin.off_psi.clone(),
            psi_sat_v: sol.sat.off_psi.clone(),
            material,
            eps_r: p.cells.iter().map(|c| c.eps()).collect(),
            eg_ev: p.silicon.eg_ev,
            polarity: sol.structure.doping.polarity,
            gate_start_nm: sol.structure.gate_start_nm,
            gate_end_nm: sol.structure.gate_end_nm,
            leakiest_depth_lin_nm: sol.barrier_lin.map(|b| b.depth_nm),
            leakiest_depth_sat_nm: sol.barrier_sat.map(|b| b.depth_nm),
        }
    }

    /// Channel-carrier band edge (eV, relative to the source Fermi level) along
    /// the mesh row nearest `depth_nm`, over the nodes that touch silicon.
    pub fn band_along(&self, psi: &[f64], depth_nm: f64) -> Vec<(f64, f64)> {
        let (nx, ny) = (self.nx(), self.ny());
        let j = (0..ny)
            .min_by(|&a, &b| {
                (self.y_nm[a] - depth_nm)
                    .abs()
                    .total_cmp(&(self.y_nm[b] - depth_nm).abs())
            })
            .unwrap_or(0);
        let touches_si = |i: usize| {
            let cells_x = [i.checked_sub(1), (i + 1 < nx).then_some(i)];
            let cells_y = [j.checked_sub(1), (j + 1 < ny).then_some(j)];
            cells_x.iter().flatten().any(|&cx| {
                cells_y
                    .iter()
                    .flatten()
                    .any(|&cy| self.material[cx + cy * (nx - 1)] == 0)
            })
        };
        (0..nx)
            .filter(|&i| touches_si(i))
            .map(|i| {
                (
                    self.x_nm[i],
                    0.5 * self.eg_ev - self.polarity.sign() * psi[i + j * nx],
                )
            })
            .collect()
    }
}

/// One finished point.
#[derive(Debug, Clone, PartialEq)]
pub struct PointRow {
    /// Index in plan order (from 0).
    pub index: usize,
    /// One value per [`SweepFile::axes`] column.
    pub axis: Vec<AxisValue>,
    /// One value per [`SweepFile::figures`] name; None is stored as NaN.
    pub figures: Vec<Option<f64>>,
    /// "ok" or why the point failed / which figures are missing.
    pub status: Status,
    /// How the figures were obtained; None when the point failed before any
    /// (or the file predates the column).
    pub method: Option<Method>,
    /// Cautions about this point's figures (e.g. quantum confinement below 5 nm).
    pub warnings: Vec<String>,
    /// The `[criteria]` verdict (stored as 1, 0, -1).
    pub meets_criteria: CriteriaVerdict,
    pub newton_steps: i64,
    /// Drain biases (lin, sat) of this point, V.
    pub vds_v: (f64, f64),
    /// Wall time of this point, s (the only column that differs between identical runs).
    pub elapsed_s: f64,
    pub curve: CurveData,
    pub map: Option<MapData>,
}

/// A whole (possibly partial) sweep: metadata, column layout and finished points sorted by index.
#[derive(Debug, Clone, PartialEq)]
pub struct SweepFile {
    pub meta: SweepMeta,
    pub axes: Vec<AxisColumn>,
    /// Names (with units) of the scalar figures, as `DeviceReport::scalar_names()`.
    pub figures: Vec<String>,
    pub rows: Vec<PointRow>,
}

impl SweepFile {
    /// Indices of the plan's points (of this shard) that no row holds yet.
    pub fn missing(&self) -> Vec<usize> {
        let have: std::collections::BTreeSet<usize> = self.rows.iter().map(|r| r.index).collect();
        (0..self.meta.points_total)
            .filter(|i| i % self.meta.shard_count == self.meta.shard_index && !have.contains(i))
            .collect()
    }

    pub fn is_complete(&self) -> bool {
        self.missing().is_empty()
    }

    /// A figure column by name (NaN where missing).
    pub fn figure(&self, name: &str) -> Option<Vec<f64>> {
        let k = self.figures.iter().position(|f| f == name)?;
        Some(
            self.rows
                .iter()
                .map(|r| r.figures[k].unwrap_or(f64::NAN))
                .collect(),
        )
    }
}

/// The series label of each row of a sweep file in the figures against L_g:
/// the values of every axis other than `geometry.gate_length_nm` ("solved"
/// when there is none). When one text axis alone tells the series apart (e.g.
/// `architecture` zipped with the doping and work function that go with it),
/// that axis' value is the whole label. Theory series named with these labels
/// take the colour of the solved series.
pub fn series_labels(f: &SweepFile) -> Vec<String> {
    let others: Vec<usize> = f
        .axes
        .iter()
        .enumerate()
        .filter(|(_, a)| a.key != "geometry.gate_length_nm")
        .map(|(k, _)| k)
        .collect();
    if others.is_empty() {
        return vec!["solved".into(); f.rows.len()];
    }
    let full: Vec<String> = f
        .rows
        .iter()
        .map(|r| {
            others
                .iter()
                .map(|&a| {
                    let key = f.axes[a].key.rsplit('.').next().unwrap_or("");
                    match &r.axis[a] {
                        AxisValue::Text(s) => s.clone(),
                        AxisValue::Number(x) => format!("{key}={x}"),
                    }
                })
                .collect::<Vec<_>>()
                .join(", ")
        })
        .collect();
    // A text axis that maps one-to-one onto the full labels names the series alone.
    let text_of = |k: usize, a: usize| match &f.rows[k].axis[a] {
        AxisValue::Text(s) => Some(s.clone()),
        AxisValue::Number(_) => None,
    };
    let one_to_one = |a: usize| {
        let mut pairs = std::collections::BTreeMap::new();
        let mut back = std::collections::BTreeMap::new();
        for (k, l) in full.iter().enumerate() {
            let Some(t) = text_of(k, a) else {
                return false;
            };
            if pairs.insert(t.clone(), l).is_some_and(|p| p != l)
                || back.insert(l, t.clone()).is_some_and(|b| b != t)
            {
                return false;
            }
        }
        true
    };
    if others.len() > 1 {
        if let Some(&a) = others
            .iter()
            .find(|&&a| !f.axes[a].numeric && one_to_one(a))
        {
            return (0..f.rows.len())
                .map(|k| text_of(k, a).unwrap_or_default())
                .collect();
        }
    }
    full
}

/// The stored name of a method ("2d-solve", "theory"), or None.
pub fn method_from_name(name: &str) -> Option<Method> {
    [Method::TwoDSolve, Method::Theory]
        .into_iter()
        .find(|m| m.name() == name)
}

/// What the figures of `gatehold run --json` mean (the `description`
/// attribute of their sweep-file datasets). A figure not listed here (a
/// newer report figure) gets a generic description from its name and units.
const FIGURE_DESCRIPTIONS: &[(&str, &str)] = &[
    ("gate_length_nm", "drawn gate length L_g"),
    (
        "l_met_nm",
        "metallurgical channel length (between the junctions)",
    ),
    (
        "eot_nm",
        "equivalent oxide thickness of the gate stack (SiO2 permittivity 3.9)",
    ),
    ("vt_lin_V", "constant-current threshold voltage at V_DS,lin"),
    ("vt_sat_V", "constant-current threshold voltage at V_DS,sat"),
    (
        "ss_lin_mV_per_dec",
        "subthreshold swing at V_DS,lin (least-squares over 1e-3 to 1e-1 of the threshold current)",
    ),
    ("ss_sat_mV_per_dec", "subthreshold swing at V_DS,sat"),
    (
        "dibl_mV_per_V",
        "drain-induced barrier lowering (V_t,lin - V_t,sat) / (V_DS,sat - V_DS,lin)",
    ),
    (
        "dibl_long_floor_mV_per_V",
        "the constant-current DIBL of the long-channel device (floor, reported, not subtracted)",
    ),
    (
        "vt_long_V",
        "long-channel threshold voltage (1D column, Pao-Sah integral)",
    ),
    ("ss_long_mV_per_dec", "long-channel subthreshold swing"),
    ("vt_rolloff_mV", "threshold roll-off V_t,lin - V_t,long"),
    (
        "barrier_lin_eV",
        "source-channel barrier along the leakiest path at the off-state gate voltage, V_DS,lin",
    ),
    (
        "barrier_sat_eV",
        "source-channel barrier along the leakiest path at the off-state gate voltage, V_DS,sat",
    ),
    (
        "barrier_lowering_meV",
        "barrier lowering between V_DS,lin and V_DS,sat",
    ),
    (
        "leakiest_depth_nm",
        "depth below the top silicon surface of the leakiest path",
    ),
    (
        "leakiest_y_nm",
        "3D fins and wires: the leakiest line's distance across the fin from its centre, at V_DS,sat",
    ),
    (
        "leakiest_z_nm",
        "3D fins and wires: the leakiest line's depth below the top silicon surface, at V_DS,sat",
    ),
    (
        "natural_length_nm",
        "closed-form natural length (the headline formula for the architecture)",
    ),
    (
        "lambda_numeric_nm",
        "numeric natural length (lowest eigenmode of the stack or cross-section)",
    ),
    (
        "theory_rolloff_mV",
        "V_t roll-off from the Liu et al. 1993 model with the numeric natural length",
    ),
    (
        "theory_dibl_mV_per_V",
        "DIBL from the Liu et al. 1993 model with the numeric natural length",
    ),
    (
        "theory_ss_mV_per_dec",
        "SS from the Liu et al. 1993 model with the numeric natural length",
    ),
];

/// The `description` attribute of a figure column.
pub fn describe_figure(name: &str) -> String {
    FIGURE_DESCRIPTIONS
        .iter()
        .find(|(n, _)| *n == name)
        .map(|(_, d)| format!("{d}; NaN when missing (see status)"))
        .unwrap_or_else(|| {
            format!(
                "figure `{name}` of `gatehold run --json` ({}); NaN when missing (see status)",
                units_of(name)
            )
        })
}

/// Units of a column from its name's suffix (the project's naming rule); "1" if dimensionless.
pub fn units_of(name: &str) -> &'static str {
    const SUFFIXES: &[(&str, &str)] = &[
        ("_F_per_um", "F/um"),
        ("_cm_per_s", "cm/s"),
        ("_ps", "ps"),
        ("_mV_per_dec", "mV/dec"),
        ("_mV_per_V", "mV/V"),
        ("_nm_per_decade", "nm/decade"),
        ("_cm2_per_Vs", "cm^2/(V s)"),
        ("_A_per_um", "A/um"),
        ("_cm3", "cm^-3"),
        ("_meV", "meV"),
        ("_mV", "mV"),
        ("_eV", "eV"),
        ("_nm", "nm"),
        ("_K", "K"),
        ("_V", "V"),
        ("_A", "A"),
        ("_s", "s"),
    ];
    SUFFIXES
        .iter()
        .find(|(s, _)| name.ends_with(s))
        .map(|(_, u)| *u)
        .unwrap_or("1")
}

/// Makes `s` printable ASCII of at most `width - 1` bytes (fixed-width string columns).
pub fn ascii_fit(s: &str, width: usize) -> String {
    let mut out: String = s
        .chars()
        .map(|c| {
            if c.is_ascii() && !c.is_ascii_control() {
                c
            } else {
                '?'
            }
        })
        .collect();
    if out.len() >= width {
        out.truncate(width.saturating_sub(4));
        out.push_str("...");
    }
    out
}

/// RFC 3339 UTC timestamp of `t` (seconds resolution).
pub fn rfc3339(t: std::time::SystemTime) -> String {
    let secs = t
        .duration_since(std::time::UNIX_EPOCH)
        .map(|d| d.as_secs() as i64)
        .unwrap_or(0);
    let (days, rem) = (secs.div_euclid(86_400), secs.rem_euclid(86_400));
    // Civil date from days since 1970-01-01 (proleptic Gregorian).
    let z = days + 719_468;
    let era = z.div_euclid(146_097);
    let doe = z - era * 146_097;
    let yoe = (doe - doe / 1460 + doe / 36_524 - doe / 146_096) / 365;
    let doy = doe - (365 * yoe + yoe / 4 - yoe / 100);
    let mp = (5 * doy + 2) / 153;
    let d = doy - (153 * mp + 2) / 5 + 1;
    let m = if mp < 10 { mp + 3 } else { mp - 9 };
    let y = yoe + era * 400 + i64::from(m <= 2);
    format!(
        "{y:04}-{m:02}-{d:02}T{:02}:{:02}:{:02}Z",
        rem / 3600,
        rem / 60 % 60,
        rem % 60
    )
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn timestamps_and_units() {
        let t = std::time::UNIX_EPOCH + std::time::Duration::from_secs(1_798_761_599);
        assert_eq!(rfc3339(t), "2026-12-31T23:59:59Z");
        assert_eq!(
            rfc3339(std::time::UNIX_EPOCH + std::time::Duration::from_secs(951_782_400)),
            "2000-02-29T00:00:00Z"
        );
        assert_eq!(units_of("dibl_mV_per_V"), "mV/V");
        assert_eq!(units_of("vt_lin_V"), "V");
        assert_eq!(units_of("gate_stack.1.thickness_nm"), "nm");
        assert_eq!(units_of("architecture"), "1");
        assert_eq!(ascii_fit("µ ok", 16), "? ok");
        assert_eq!(ascii_fit(&"x".repeat(300), 256).len(), 255);
    }
}
