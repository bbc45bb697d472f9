//! Device files: parsing, validation and the [`Scenario`] the solver sees.
//!
//! Two stages: the TOML text becomes a `toml::Value`, every key is checked
//! against the contract (`DEVICE-FORMAT.md`; unknown keys fail with the
//! closest known key), then [`scenario_from_value`] converts and validates
//! every value into a [`Scenario`]. Errors name the key, the value and why.

mod scenario;
mod show;
pub mod template;

pub use scenario::*;
pub use show::show_number;

use crate::physics::{dielectric_permittivity, CM2_TO_NM2, KNOWN_DIELECTRICS, PER_CM3_TO_PER_NM3};
use toml::Value;

/// What went wrong with a device file.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum DeviceError {
    #[error("cannot read {path}: {reason}")]
    Io { path: String, reason: String },
    #[error("not valid TOML: {0}")]
    Syntax(String),
    #[error("unknown key `{key}`{}", suggestion.as_ref().map(|s| format!(" (did you mean `{s}`?)")).unwrap_or_default())]
    UnknownKey {
        key: String,
        suggestion: Option<String>,
    },
    #[error("missing key `{key}`: {reason}")]
    Missing { key: String, reason: String },
    #[error("`{key}` = {value}: {reason}")]
    Invalid {
        key: String,
        value: String,
        reason: String,
    },
}

fn invalid(key: &str, value: impl std::fmt::Display, reason: impl Into<String>) -> DeviceError {
    DeviceError::Invalid {
        key: key.into(),
        // Computed values print short (0.3, not 0.30000000000000004).
        value: show::tidy_numbers(&value.to_string()),
        reason: show::tidy_numbers(&reason.into()),
    }
}

/// Top-level keys and the keys of each table, as in the contract (plus our extensions).
const TOP_KEYS: &[&str] = &[
    "name",
    "architecture",
    "polarity",
    "temperature_K",
    "geometry",
    "gate_stack",
    "gate",
    "doping",
    "bias",
    "extraction",
    "mesh",
];
const TABLE_KEYS: &[(&str, &[&str])] = &[
    (
        "geometry",
        &[
            "gate_length_nm",
            "body_thickness_nm",
            "fin_height_nm",
            "fin_pitch_nm",
            "box_thickness_nm",
            "source_drain_length_nm",
            "junction_depth_nm",
            "substrate_depth_nm",
            "gate_height_nm",
            "spacer",
            "box_material",
            "cap_thickness_nm",
            "cap_material",
            "gate_pitch_nm",
            "spacer_thickness_nm",
            "contact_width_nm",
            "spacer_permittivity",
            "isolation_depth_nm",
        ],
    ),
    (
        "gate",
        &["workfunction_eV", "back_workfunction_eV", "back_bias_V"],
    ),
    (
        "doping",
        &[
            "channel_cm3",
            "source_drain_cm3",
            "junction_offset_nm",
            "junction_gradient_nm_per_decade",
            "subfin_cm3",
        ],
    ),
    (
        "bias",
        &[
            "vds_lin_V",
            "vds_sat_V",
            "vgs_start_V",
            "vgs_stop_V",
            "vgs_step_V",
            "off_vgs_V",
            "points",
            "auto_extend",
            "extend_limit_V",
        ],
    ),
    (
        "extraction",
        &[
            "current_criterion_A",
            "mobility_cm2_per_Vs",
            "injection_velocity_cm_per_s",
        ],
    ),
    (
        "mesh",
        &[
            "max_step_nm",
            "refinement",
            "max_nodes",
            "growth",
            "max_far_step_nm",
        ],
    ),
];
const LAYER_KEYS: &[&str] = &["material", "relative_permittivity", "thickness_nm"];

/// Every dotted key a device file may hold (array elements as `gate_stack.N.key`).
pub fn known_keys() -> Vec<String> {
    let mut keys: Vec<String> = TOP_KEYS.iter().map(|s| s.to_string()).collect();
    for (t, ks) in TABLE_KEYS {
        keys.extend(ks.iter().map(|k| format!("{t}.{k}")));
    }
    keys.extend(LAYER_KEYS.iter().map(|k| format!("gate_stack.N.{k}")));
    keys
}

/// Edit distance with adjacent transpositions (optimal string alignment).
fn edit_distance(a: &str, b: &str) -> usize {
    let a: Vec<char> = a.chars().collect();
    let b: Vec<char> = b.chars().collect();
    let mut d = vec![vec![0usize; b.len() + 1]; a.len() + 1];
    for (i, row) in d.iter_mut().enumerate() {
        row[0] = i;
    }
    for (j, v) in d[0].iter_mut().enumerate() {
        *v = j;
    }
    for i in 1..=a.len() {
        for j in 1..=b.len() {
            let cost = usize::from(a[i - 1] != b[j - 1]);
            let mut v = (d[i - 1][j] + 1)
                .min(d[i][j - 1] + 1)
                .min(d[i - 1][j - 1] + cost);
            if i > 1 && j > 1 && a[i - 1] == b[j - 2] && a[i - 2] == b[j - 1] {
                v = v.min(d[i - 2][j - 2] + 1);
            }
            d[i][j] = v;
        }
    }
    d[a.len()][b.len()]
}

/// The closest of `candidates` to `key` (case-insensitive edit distance), if reasonably close.
pub fn closest<'a>(key: &str, candidates: impl IntoIterator<Item = &'a str>) -> Option<String> {
    let lower = key.to_lowercase();
    candidates
        .into_iter()
        .map(|c| (edit_distance(&lower, &c.to_lowercase()), c))
        .min()
        .filter(|(d, c)| *d <= (c.len() / 2).max(3))
        .map(|(_, c)| c.to_string())
}

/// Checks that every key of a device table is known (the closest known key
/// is suggested otherwise); values are not checked.
pub fn check_keys(root: &toml::Table) -> Result<(), DeviceError> {
    for (k, v) in root {
        if !TOP_KEYS.contains(&k.as_str()) {
            let all = known_keys();
            return Err(DeviceError::UnknownKey {
                key: k.clone(),
                suggestion: closest(k, all.iter().map(|s| s.as_str())),
            });
        }
        if let Some((_, allowed)) = TABLE_KEYS.iter().find(|(t, _)| t == k) {
            let table = v
                .as_table()
                .ok_or_else(|| invalid(k, v, "must be a table ([section])"))?;
            for sub in table.keys() {
                if !allowed.contains(&sub.as_str()) {
                    return Err(DeviceError::UnknownKey {
                        key: format!("{k}.{sub}"),
                        suggestion: closest(sub, allowed.iter().copied())
                            .map(|s| format!("{k}.{s}")),
                    });
                }
            }
        }
        if k == "gate_stack" {
            let layers = v
                .as_array()
                .ok_or_else(|| invalid(k, v, "must be an array of tables ([[gate_stack]])"))?;
            for (i, layer) in layers.iter().enumerate() {
                let t = layer
                    .as_table()
                    .ok_or_else(|| invalid(&format!("gate_stack.{i}"), layer, "must be a table"))?;
                for sub in t.keys() {
                    if !LAYER_KEYS.contains(&sub.as_str()) {
                        return Err(DeviceError::UnknownKey {
                            key: format!("gate_stack.{i}.{sub}"),
                            suggestion: closest(sub, LAYER_KEYS.iter().copied())
                                .map(|s| format!("gate_stack.{i}.{s}")),
                        });
                    }
                }
            }
        }
    }
    Ok(())
}

/// Typed, checked reads from the value tree; records which keys were given.
struct Reader<'a> {
    root: &'a toml::Table,
}

impl<'a> Reader<'a> {
    fn get(&self, key: &str) -> Option<&'a Value> {
        let mut parts = key.split('.');
        let first = parts.next()?;
        let mut v = self.root.get(first)?;
        for p in parts {
            v = v.as_table()?.get(p)?;
        }
        Some(v)
    }

    fn given(&self, key: &str) -> bool {
        self.get(key).is_some()
    }

    fn number(&self, key: &str) -> Result<Option<f64>, DeviceError> {
        match self.get(key) {
            None => Ok(None),
            Some(v) => {
                let x = match v {
                    Value::Integer(i) => *i as f64,
                    Value::Float(f) => *f,
                    other => return Err(invalid(key, other, "must be a number")),
                };
                if !x.is_finite() {
                    return Err(invalid(key, x, "must be finite"));
                }
                Ok(Some(x))
            }
        }
    }

    fn boolean(&self, key: &str) -> Result<Option<bool>, DeviceError> {
        match self.get(key) {
            None => Ok(None),
            Some(Value::Boolean(b)) => Ok(Some(*b)),
            Some(other) => Err(invalid(key, other, "must be true or false")),
        }
    }

    fn string(&self, key: &str) -> Result<Option<&'a str>, DeviceError> {
        match self.get(key) {
            None => Ok(None),
            Some(Value::String(s)) => Ok(Some(s.as_str())),
            Some(other) => Err(invalid(key, other, "must be a string")),
        }
    }

    fn required_number(&self, key: &str, why: &str) -> Result<f64, DeviceError> {
        self.number(key)?.ok_or_else(|| DeviceError::Missing {
            key: key.into(),
            reason: why.into(),
        })
    }
}

fn positive(key: &str, x: f64) -> Result<f64, DeviceError> {
    if x > 0.0 {
        Ok(x)
    } else {
        Err(invalid(key, show_number(x), "must be greater than zero"))
    }
}

fn in_range(key: &str, x: f64, lo: f64, hi: f64, unit: &str) -> Result<f64, DeviceError> {
    if x >= lo && x <= hi {
        Ok(x)
    } else {
        Err(invalid(
            key,
            show_number(x),
            format!("outside the accepted range {lo} to {hi} {unit}"),
        ))
    }
}

/// Most layers a gate stack may have (each adds mesh lines).
pub const MAX_STACK_LAYERS: usize = 16;

/// Largest input file (device or plan) read, bytes: a device file is a few
/// kB; anything larger is refused before it is read.
pub const MAX_INPUT_BYTES: u64 = 1 << 20;

/// Reads a device or plan file: only regular files (not `/dev/zero`, a FIFO
/// or a folder) of at most [`MAX_INPUT_BYTES`], read with that limit so that
/// a file growing while read cannot exhaust memory. Errors are (full path, why).
pub fn read_input_file(path: &std::path::Path) -> Result<String, (String, String)> {
    use std::io::Read;
    let name = path.display().to_string();
    let meta = std::fs::metadata(path).map_err(|e| (name.clone(), e.to_string()))?;
    if !meta.is_file() {
        return Err((
            name,
            "not a regular file (devices, FIFOs and folders are refused)".into(),
        ));
    }
    if meta.len() > MAX_INPUT_BYTES {
        return Err((
            name,
            format!(
                "{} bytes: larger than the {} byte limit for device and plan files",
                meta.len(),
                MAX_INPUT_BYTES
            ),
        ));
    }
    let mut buf = Vec::new();
    std::fs::File::open(path)
        .and_then(|f| f.take(MAX_INPUT_BYTES + 1).read_to_end(&mut buf))
        .map_err(|e| (name.clone(), e.to_string()))?;
    if buf.len() as u64 > MAX_INPUT_BYTES {
        return Err((
            name,
            format!("larger than the {MAX_INPUT_BYTES} byte limit for device and plan files"),
        ));
    }
    String::from_utf8(buf).map_err(|e| (name, format!("not UTF-8 text: {e}")))
}

/// The accepted range of one numeric key: the validator checks every value
/// against it, and the device-file reference (`docs/device-reference.md`) is
/// generated from it.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Limit {
    /// Dotted key (`gate_stack.N.thickness_nm` for every layer).
    pub key: &'static str,
    pub min: f64,
    pub max: f64,
    pub unit: &'static str,
    /// Why the range is what it is.
    pub why: &'static str,
}

/// Sane bounds on every length, size, bias magnitude and criterion: values
/// outside them would build absurd meshes (memory, time) or leave every
/// figure empty, so they are refused before anything is allocated.
pub const LIMITS: &[Limit] = &[
    Limit { key: "geometry.gate_length_nm", min: 0.1, max: 100_000.0, unit: "nm", why: "at least 2 mesh cells; at most 100 um" },
    Limit { key: "geometry.body_thickness_nm", min: 1.0, max: 500.0, unit: "nm", why: "below 1 nm classical carriers are meaningless; above 500 nm the body is not thin and the mesh explodes" },
    Limit { key: "geometry.fin_height_nm", min: 1.0, max: 500.0, unit: "nm", why: "a fin or wire between 1 nm and 500 nm tall" },
    Limit { key: "geometry.fin_pitch_nm", min: 1.0, max: 5_000.0, unit: "nm", why: "the lateral period of a fin array, at most 5 um" },
    Limit { key: "geometry.box_thickness_nm", min: 1.0, max: 2_000.0, unit: "nm", why: "buried oxide between 1 nm and 2 um" },
    Limit { key: "geometry.source_drain_length_nm", min: 2.0, max: 5_000.0, unit: "nm", why: "source/drain silicon between 2 nm and 5 um" },
    Limit { key: "geometry.junction_depth_nm", min: 1.0, max: 2_000.0, unit: "nm", why: "bulk wells between 1 nm and 2 um deep" },
    Limit { key: "geometry.substrate_depth_nm", min: 2.0, max: 10_000.0, unit: "nm", why: "substrate between 2 nm and 10 um deep" },
    Limit { key: "geometry.gate_height_nm", min: 1.0, max: 2_000.0, unit: "nm", why: "a gate electrode thinner than 1 nm is not an electrode; above 2 um it only adds mesh" },
    Limit { key: "geometry.cap_thickness_nm", min: 0.5, max: 500.0, unit: "nm", why: "fin cap between 0.5 nm and 500 nm" },
    Limit { key: "geometry.isolation_depth_nm", min: 1.0, max: 500.0, unit: "nm", why: "bulk fin: isolation oxide beside the sub-fin between 1 nm and 500 nm deep" },
    Limit { key: "gate_stack.N.thickness_nm", min: 0.1, max: 200.0, unit: "nm", why: "below 0.1 nm (one atomic layer) the mesh cannot resolve it; above 200 nm it is not a gate dielectric" },
    Limit { key: "gate_stack.N.relative_permittivity", min: 1.0, max: 1_000.0, unit: "", why: "a dielectric's relative permittivity" },
    Limit { key: "temperature_K", min: 50.0, max: 600.0, unit: "K", why: "the silicon models hold from 50 K to 600 K" },
    Limit { key: "gate.workfunction_eV", min: 3.0, max: 6.5, unit: "eV", why: "metal and poly gate work functions" },
    Limit { key: "gate.back_workfunction_eV", min: 3.0, max: 6.5, unit: "eV", why: "metal and poly gate work functions" },
    Limit { key: "gate.back_bias_V", min: -20.0, max: 20.0, unit: "V", why: "back-plane bias" },
    Limit { key: "doping.source_drain_cm3", min: 1e17, max: 5e21, unit: "cm^-3", why: "degenerate source/drain doping" },
    Limit { key: "doping.junction_gradient_nm_per_decade", min: 0.0, max: 20.0, unit: "nm/decade", why: "0 abrupt, up to 20 nm per decade" },
    Limit { key: "bias.vds_lin_V", min: 0.001, max: 5.0, unit: "V (magnitude)", why: "below 1 mV the drain current is lost in the numerical noise" },
    Limit { key: "bias.vds_sat_V", min: 0.001, max: 5.0, unit: "V (magnitude)", why: "drain bias magnitude" },
    Limit { key: "bias.vgs_start_V", min: -5.0, max: 5.0, unit: "V", why: "the gate sweep stays within -5 V to 5 V" },
    Limit { key: "bias.vgs_stop_V", min: -5.0, max: 5.0, unit: "V", why: "the gate sweep stays within -5 V to 5 V" },
    Limit { key: "bias.vgs_step_V", min: 1e-4, max: 0.2, unit: "V", why: "SS needs several points per decade; at most 2000 gate voltages" },
    Limit { key: "bias.off_vgs_V", min: -5.0, max: 5.0, unit: "V", why: "inside the gate sweep" },
    Limit { key: "extraction.current_criterion_A", min: 1e-12, max: 1e-4, unit: "A", why: "I_cc per square: outside 1 pA to 100 uA no gate sweep in range reaches it (every V_t would be missing)" },
    Limit { key: "extraction.mobility_cm2_per_Vs", min: 1.0, max: 1e5, unit: "cm^2/Vs", why: "constant mobility" },
    Limit { key: "extraction.injection_velocity_cm_per_s", min: 1e5, max: 1e8, unit: "cm/s", why: "virtual-source injection velocity: silicon devices report 0.5e7 to 1.5e7 cm/s; outside 1e5 to 1e8 cm/s it is not a carrier velocity" },
    Limit { key: "geometry.gate_pitch_nm", min: 3.0, max: 10_000.0, unit: "nm", why: "contacted gate pitch: gate, two spacers and a contact, at most 10 um" },
    Limit { key: "geometry.spacer_thickness_nm", min: 0.5, max: 1_000.0, unit: "nm", why: "spacer between gate and contact plug: thinner than 0.5 nm is no insulator; above 1 um only adds mesh" },
    Limit { key: "geometry.contact_width_nm", min: 1.0, max: 5_000.0, unit: "nm", why: "contact plug width: at least 1 nm (two mesh cells), at most 5 um" },
    Limit { key: "geometry.spacer_permittivity", min: 1.0, max: 100.0, unit: "", why: "a spacer dielectric's relative permittivity (air 1)" },
    Limit { key: "mesh.max_step_nm", min: 0.05, max: 5.0, unit: "nm", why: "largest mesh cell" },
    Limit { key: "mesh.refinement", min: 1.0, max: 8.0, unit: "", why: "divides every mesh step" },
    Limit { key: "mesh.max_nodes", min: 1_000.0, max: 1e8, unit: "nodes", why: "the node budget checked before any mesh is built" },
    Limit { key: "mesh.growth", min: 1.0, max: 2.0, unit: "", why: "cell-to-cell ratio away from the channel: 1 keeps mesh.max_step_nm everywhere; above 2 the box integration loses accuracy" },
    Limit { key: "mesh.max_far_step_nm", min: 0.05, max: 50.0, unit: "nm", why: "largest cell far from the channel, interfaces and junctions" },
    Limit { key: "bias.extend_limit_V", min: 0.0, max: 5.0, unit: "V", why: "how far the gate range may grow beyond each end (0: never)" },
];

/// The limit of `key` (layer keys as `gate_stack.N.key`).
pub fn limit_of(key: &str) -> Option<&'static Limit> {
    let generic = match key.split('.').collect::<Vec<_>>().as_slice() {
        ["gate_stack", _, k] => format!("gate_stack.N.{k}"),
        _ => key.to_string(),
    };
    LIMITS.iter().find(|l| l.key == generic)
}

/// Checks `x` (its magnitude for a `(magnitude)` unit) against the limit of `key`.
fn bounded(key: &str, x: f64) -> Result<f64, DeviceError> {
    let l = limit_of(key).expect("every bounded key has a limit");
    let m = if l.unit.ends_with("(magnitude)") {
        x.abs()
    } else {
        x
    };
    if m >= l.min && m <= l.max {
        Ok(x)
    } else {
        Err(invalid(
            key,
            show_number(x),
            format!(
                "outside the accepted range {} to {} {}: {}",
                l.min, l.max, l.unit, l.why
            ),
        ))
    }
}

/// Default cell-to-cell growth ratio away from the channel (`mesh.growth`),
/// chosen by measurement: the default mesh stays within 0.5 mV (V_t) and 2 %
/// (DIBL) of a mesh twice as fine for every planar demo device
/// (tests/mesh_convergence.rs).
pub const DEFAULT_MESH_GROWTH: f64 = 1.3;

/// Default far cap (`mesh.max_far_step_nm`), nm, chosen with [`DEFAULT_MESH_GROWTH`].
pub const DEFAULT_MAX_FAR_STEP_NM: f64 = 4.0;

/// Default furthest extension of the gate range beyond each end (`bias.extend_limit_V`), V.
pub const DEFAULT_EXTEND_LIMIT_V: f64 = 3.0;

/// Bulk fin: default isolation oxide depth below the gated fin (`geometry.isolation_depth_nm`), nm.
pub const DEFAULT_ISOLATION_DEPTH_NM: f64 = 20.0;

/// Bulk fin: default substrate silicon below the isolation (`geometry.substrate_depth_nm`), nm.
pub const DEFAULT_BULK_FIN_SUBSTRATE_DEPTH_NM: f64 = 30.0;

/// Default node budget (`mesh.max_nodes`): about 120 times the demo bulk device (about 8 GB by the estimate below).
pub const DEFAULT_MAX_NODES: f64 = 4_000_000.0;

/// Rough memory per mesh node, bytes (Jacobian, its sparse Cholesky factor
/// and the solver's vectors; an estimate for the budget message, not a measurement).
pub const BYTES_PER_NODE_ESTIMATE: f64 = 2_000.0;

/// Estimated mesh nodes of the scenario's largest 2D problem, from the
/// geometry and mesh keys alone (before anything is built), and the key that
/// dominates it. A lower estimate: every cell is at most the maximum step, so
/// a domain of extents X by Y has at least (X/h + 1)(Y/h + 1) nodes; planar
/// devices count their far zones (beyond the channel, the interfaces and the
/// junctions) at the far cap `mesh.max_far_step_nm` instead.
pub fn estimate_nodes(s: &Scenario) -> (f64, &'static str) {
    let g = &s.geometry;
    let h = s.mesh.max_step_nm / s.mesh.refinement;
    let t = s.stack_thickness_nm();
    let layers = 2.0 * (s.stack.len() as f64 + 4.0);
    let (x, y, mut parts): (f64, f64, Vec<(&'static str, f64)>) = if s.architecture.is_planar() {
        let x = 2.0 * g.source_drain_length_nm + g.gate_length_nm;
        let (below, key, v) = match s.architecture {
            Architecture::Bulk => (
                g.substrate_depth_nm,
                "geometry.substrate_depth_nm",
                g.substrate_depth_nm,
            ),
            Architecture::ThinBody => (
                g.body_thickness_nm + g.box_thickness_nm,
                if g.box_thickness_nm > g.body_thickness_nm {
                    "geometry.box_thickness_nm"
                } else {
                    "geometry.body_thickness_nm"
                },
                g.box_thickness_nm.max(g.body_thickness_nm),
            ),
            _ => (
                g.body_thickness_nm / 2.0,
                "geometry.body_thickness_nm",
                g.body_thickness_nm / 2.0,
            ),
        };
        let y = g.gate_height_nm + t + below;
        (
            x,
            y,
            vec![
                ("geometry.gate_length_nm", g.gate_length_nm * y),
                (
                    "geometry.source_drain_length_nm",
                    2.0 * g.source_drain_length_nm * y,
                ),
                ("geometry.gate_height_nm", g.gate_height_nm * x),
                (key, v * x),
                ("gate_stack.0.thickness_nm", t * x),
            ],
        )
    } else {
        let gaa = s.architecture == Architecture::GateAllAround;
        let (x, y) = fin_cross_section_extent_nm(s);
        (
            x,
            y,
            vec![
                (
                    if gaa {
                        "geometry.body_thickness_nm"
                    } else {
                        "geometry.fin_pitch_nm"
                    },
                    x * y,
                ),
                ("geometry.fin_height_nm", g.fin_height_nm * x),
                ("geometry.gate_height_nm", g.gate_height_nm * (x + y)),
                (
                    if s.architecture == Architecture::BulkFin {
                        "geometry.substrate_depth_nm"
                    } else {
                        "geometry.box_thickness_nm"
                    },
                    if gaa { 0.0 } else { below_fin_nm(s) * x },
                ),
                ("gate_stack.0.thickness_nm", t * (x + y)),
            ],
        )
    };
    let nodes = if s.architecture.is_planar() {
        // Far zones (mesh.growth, mesh.max_far_step_nm): outside the channel,
        // the interfaces and the junctions no cell is larger than the far cap,
        // so the far extents count at least (extent / far cap) cells.
        let hf = (s.mesh.max_far_step_nm / s.mesh.refinement).max(h);
        let m = crate::mesh::CORE_MARGIN_NM;
        let x_core = (g.gate_length_nm + 2.0 * (m + s.doping.junction_offset_nm.abs())).min(x);
        let y_body = match s.architecture {
            Architecture::Bulk => g.junction_depth_nm + m,
            Architecture::ThinBody => g.body_thickness_nm + m,
            _ => g.body_thickness_nm / 2.0,
        };
        let y_core = (t + m + y_body).min(y);
        let cells = |core: f64, all: f64| core / h + (all - core) / hf;
        (cells(x_core, x) + 1.0 + layers) * (cells(y_core, y) + 1.0 + layers)
    } else {
        (x / h + 1.0 + layers) * (y / h + 1.0 + layers)
    };
    parts.sort_by(|a, b| b.1.total_cmp(&a.1));
    (nodes, parts[0].0)
}

/// The 3D fin mesh's largest step in units of `mesh.max_step_nm` (the same
/// number as `structure::fin3d::FIN3D_STEP_FACTOR`; a test holds them equal).
pub const FIN3D_STEP_FACTOR_ESTIMATE: f64 = 3.0;

/// Share of `mesh.max_nodes` a 3D fin mesh may use: a 3D factorisation fills
/// far more per node than a 2D one (seen here: about 8 kB per node at 512k
/// nodes against about 2 kB in 2D), so its budget is a tenth of the 2D one.
pub const FIN3D_BUDGET_SHARE: f64 = 0.1;

/// The meshed half of a fin or wire cross-section: its width (the mirror
/// half: half the fin pitch, or half a wire with its stack and gate) and its
/// height from the gate top through the buried oxide (or the gate below a
/// wire), nm.
fn fin_cross_section_extent_nm(s: &Scenario) -> (f64, f64) {
    let g = &s.geometry;
    let t = s.stack_thickness_nm();
    if s.architecture == Architecture::GateAllAround {
        (
            g.body_thickness_nm / 2.0 + t + g.gate_height_nm,
            g.gate_height_nm + t + g.fin_height_nm + t + g.gate_height_nm,
        )
    } else {
        (
            g.fin_pitch_nm / 2.0,
            g.gate_height_nm + t + g.fin_height_nm + below_fin_nm(s),
        )
    }
}

/// Depth of the domain below the fin's bottom plane, nm: the buried oxide,
/// or for a bulk fin the isolation oxide and the substrate silicon.
fn below_fin_nm(s: &Scenario) -> f64 {
    let g = &s.geometry;
    if s.architecture == Architecture::BulkFin {
        g.isolation_depth_nm + g.substrate_depth_nm
    } else {
        g.box_thickness_nm
    }
}

/// Lower estimate of a fin's 3D mesh nodes (mirror half; every cell at most
/// [`FIN3D_STEP_FACTOR_ESTIMATE`] times the maximum step), and the key that
/// dominates it.
pub fn estimate_nodes_3d(s: &Scenario) -> (f64, &'static str) {
    let g = &s.geometry;
    let h = FIN3D_STEP_FACTOR_ESTIMATE * s.mesh.max_step_nm / s.mesh.refinement;
    let gaa = s.architecture == Architecture::GateAllAround;
    let (y, z) = fin_cross_section_extent_nm(s);
    let x = 2.0 * g.source_drain_length_nm + g.gate_length_nm;
    let nodes = (x / h + 1.0) * (y / h + 1.0) * (z / h + 1.0);
    let mut parts = [
        ("geometry.gate_length_nm", g.gate_length_nm * y * z),
        (
            "geometry.source_drain_length_nm",
            2.0 * g.source_drain_length_nm * y * z,
        ),
        (
            if gaa {
                "geometry.body_thickness_nm"
            } else {
                "geometry.fin_pitch_nm"
            },
            x * y * z / 2.0,
        ),
        ("geometry.fin_height_nm", g.fin_height_nm * x * y),
        ("geometry.gate_height_nm", g.gate_height_nm * x * y),
        (
            "geometry.substrate_depth_nm",
            if s.architecture == Architecture::BulkFin {
                below_fin_nm(s) * x * y
            } else {
                0.0
            },
        ),
    ];
    parts.sort_by(|a, b| b.1.total_cmp(&a.1));
    (nodes, parts[0].0)
}

/// Refuses a fin whose 3D mesh would exceed its share of the node budget
/// ([`FIN3D_BUDGET_SHARE`] of `mesh.max_nodes`), naming the estimate and the
/// key that dominates it. Checked before a 3D mesh is built.
pub fn check_size_3d(s: &Scenario) -> Result<(), DeviceError> {
    let (nodes, key) = estimate_nodes_3d(s);
    let budget = FIN3D_BUDGET_SHARE * s.mesh.max_nodes;
    if nodes > budget {
        return Err(invalid(
            key,
            geometry_value(s, key),
            format!(
                "the 3D fin mesh would hold at least {nodes:.0} nodes, beyond the 3D budget of {budget:.0} \
                 (a tenth of mesh.max_nodes = {:.0}); shrink {key}, coarsen mesh.max_step_nm (now {}), \
                 use --fins theory (plan key fins = \"theory\") or, on a big machine, raise mesh.max_nodes",
                s.mesh.max_nodes, s.mesh.max_step_nm
            ),
        ));
    }
    Ok(())
}

/// Refuses a scenario whose estimated mesh exceeds its node budget
/// (`mesh.max_nodes`), naming the estimate, the memory it implies and the
/// key that dominates it.
pub fn check_size(s: &Scenario) -> Result<(), DeviceError> {
    let (nodes, key) = estimate_nodes(s);
    if nodes > s.mesh.max_nodes {
        let value = if key == "gate_stack.0.thickness_nm" {
            s.stack_thickness_nm()
        } else {
            geometry_value(s, key)
        };
        return Err(invalid(
            key,
            value,
            format!(
                "the mesh would hold at least {:.0} nodes (about {:.1} GB), beyond the budget mesh.max_nodes = {:.0}; \
                 shrink {key}, coarsen mesh.max_step_nm (now {}) or, on a big machine, raise mesh.max_nodes",
                nodes,
                nodes * BYTES_PER_NODE_ESTIMATE / 1e9,
                s.mesh.max_nodes,
                s.mesh.max_step_nm
            ),
        ));
    }
    Ok(())
}

fn geometry_value(s: &Scenario, key: &str) -> f64 {
    let g = &s.geometry;
    match key {
        "geometry.gate_length_nm" => g.gate_length_nm,
        "geometry.source_drain_length_nm" => g.source_drain_length_nm,
        "geometry.gate_height_nm" => g.gate_height_nm,
        "geometry.substrate_depth_nm" => g.substrate_depth_nm,
        "geometry.box_thickness_nm" => g.box_thickness_nm,
        "geometry.body_thickness_nm" => g.body_thickness_nm,
        "geometry.fin_height_nm" => g.fin_height_nm,
        "geometry.fin_pitch_nm" => g.fin_pitch_nm,
        _ => f64::NAN,
    }
}

fn dielectric(key: &str, name: &str) -> Result<f64, DeviceError> {
    dielectric_permittivity(name).ok_or_else(|| {
        invalid(
            key,
            format!("\"{name}\""),
            format!(
                "unknown dielectric{}; known: {}",
                closest(name, KNOWN_DIELECTRICS.iter().copied())
                    .map(|s| format!(" (did you mean \"{s}\"?)"))
                    .unwrap_or_default(),
                KNOWN_DIELECTRICS.join(", ")
            ),
        )
    })
}

/// Default virtual-source injection velocity, cm/s (common practice for
/// silicon n-channel devices; Khakifirooz, Nayfeh and Antoniadis, IEEE TED
/// 56(8), 1674, 2009 extract about 1e7 cm/s at these nodes).
pub const DEFAULT_INJECTION_VELOCITY_CM_PER_S: f64 = 1.0e7;

/// Tolerance on `gate_pitch_nm = gate_length_nm + 2 spacer_thickness_nm +
/// contact_width_nm` when all three are given, nm.
pub const PITCH_TOLERANCE_NM: f64 = 1e-3;

/// The spacer: a named material (`geometry.spacer`) or an explicit
/// `geometry.spacer_permittivity`, not both.
fn spacer(r: &Reader) -> Result<(String, f64), DeviceError> {
    let name = r.string("geometry.spacer")?;
    match (name, r.number("geometry.spacer_permittivity")?) {
        (Some(_), Some(e)) => Err(invalid(
            "geometry.spacer_permittivity",
            e,
            "give either geometry.spacer (a material) or geometry.spacer_permittivity, not both",
        )),
        (None, Some(e)) => {
            let e = bounded("geometry.spacer_permittivity", e)?;
            Ok((format!("eps={e}"), e))
        }
        (name, None) => {
            let name = name.unwrap_or("Si3N4");
            Ok((name.to_string(), dielectric("geometry.spacer", name)?))
        }
    }
}

/// Contact plugs of a planar section: any two of `gate_pitch_nm`,
/// `spacer_thickness_nm` and `contact_width_nm` give the third (with the gate
/// length); all three given must agree to [`PITCH_TOLERANCE_NM`]. None when
/// neither the pitch nor the contact width is given.
fn contacts(r: &Reader, gate_length_nm: f64) -> Result<Option<Contacts>, DeviceError> {
    let read = |key: &str| -> Result<Option<f64>, DeviceError> {
        r.number(key)?
            .map(|x| bounded(key, positive(key, x)?))
            .transpose()
    };
    let pitch = read("geometry.gate_pitch_nm")?;
    let spacer = read("geometry.spacer_thickness_nm")?;
    let width = read("geometry.contact_width_nm")?;
    if pitch.is_none() && width.is_none() {
        if let Some(t) = spacer {
            return Err(invalid(
                "geometry.spacer_thickness_nm",
                t,
                "contact plugs need geometry.gate_pitch_nm or geometry.contact_width_nm as well",
            ));
        }
        return Ok(None);
    }
    if r.given("geometry.source_drain_length_nm") {
        return Err(invalid(
            "geometry.source_drain_length_nm",
            r.number("geometry.source_drain_length_nm")?.unwrap_or(f64::NAN),
            "with contact plugs the source/drain silicon is spacer_thickness_nm + contact_width_nm / 2; remove this key",
        ));
    }
    let (spacer, width) = match (pitch, spacer, width) {
        (Some(p), Some(t), Some(w)) => {
            let sum = gate_length_nm + 2.0 * t + w;
            if (sum - p).abs() > PITCH_TOLERANCE_NM {
                return Err(invalid(
                    "geometry.gate_pitch_nm",
                    p,
                    format!(
                        "disagrees with gate_length_nm + 2 spacer_thickness_nm + contact_width_nm = {sum} nm; give any two of the three"
                    ),
                ));
            }
            (t, w)
        }
        (Some(p), Some(t), None) => (t, p - gate_length_nm - 2.0 * t),
        (Some(p), None, Some(w)) => (0.5 * (p - gate_length_nm - w), w),
        (None, Some(t), Some(w)) => (t, w),
        (Some(p), None, None) => {
            return Err(invalid(
                "geometry.gate_pitch_nm",
                p,
                "also give geometry.spacer_thickness_nm or geometry.contact_width_nm (any two of the three)",
            ))
        }
        (None, None, Some(w)) => {
            return Err(invalid(
                "geometry.contact_width_nm",
                w,
                "also give geometry.spacer_thickness_nm or geometry.gate_pitch_nm (any two of the three)",
            ))
        }
        (None, _, None) => unreachable!("handled above"),
    };
    let limit = |key: &str, x: f64| {
        bounded(key, x).map_err(|_| {
        invalid(
            key,
            x,
            format!(
                "derived from geometry.gate_pitch_nm = {} and gate_length_nm = {gate_length_nm}: the pitch leaves no room for it",
                pitch.unwrap_or(f64::NAN)
            ),
        )
    })
    };
    Ok(Some(Contacts {
        spacer_thickness_nm: limit("geometry.spacer_thickness_nm", spacer)?,
        contact_width_nm: limit("geometry.contact_width_nm", width)?,
    }))
}

/// The rules on the gate length (shared by validation and
/// [`Scenario::with_gate_length`]): positive, at least two mesh cells, at
/// most 100 um, and long enough that overlapping junctions do not meet.
pub(crate) fn check_gate_length(
    gate_length_nm: f64,
    mesh: &MeshSettings,
    junction_offset_nm: f64,
) -> Result<(), DeviceError> {
    let key = "geometry.gate_length_nm";
    if !(gate_length_nm.is_finite() && gate_length_nm > 0.0) {
        return Err(invalid(key, gate_length_nm, "must be greater than zero"));
    }
    if gate_length_nm < 2.0 * mesh.max_step_nm / mesh.refinement {
        return Err(invalid(
            key,
            gate_length_nm,
            format!(
                "shorter than 2 mesh cells of mesh.max_step_nm = {}",
                mesh.max_step_nm
            ),
        ));
    }
    if gate_length_nm > 100_000.0 {
        return Err(invalid(key, gate_length_nm, "longer than 100 um"));
    }
    if junction_offset_nm >= 0.5 * gate_length_nm {
        return Err(invalid(
            "doping.junction_offset_nm",
            junction_offset_nm,
            format!("overlaps of both junctions would meet under a {gate_length_nm} nm gate"),
        ));
    }
    Ok(())
}

/// Reads a device file from disk.
pub fn load_device(path: &std::path::Path) -> Result<Scenario, DeviceError> {
    let text = read_input_file(path).map_err(|(path, reason)| DeviceError::Io { path, reason })?;
    parse_device(&text)
}

/// Parses device-file text into a table (syntax only).
pub fn parse_table(text: &str) -> Result<toml::Table, DeviceError> {
    text.parse::<toml::Table>()
        .map_err(|e| DeviceError::Syntax(e.to_string()))
}

/// Parses and validates device-file text.
pub fn parse_device(text: &str) -> Result<Scenario, DeviceError> {
    scenario_from_table(&parse_table(text)?)
}

/// Validates a parsed device table into a [`Scenario`].
pub fn scenario_from_table(root: &toml::Table) -> Result<Scenario, DeviceError> {
    check_keys(root)?;
    let r = Reader { root };
    let mut warnings = Vec::new();

    let name = r
        .string("name")?
        .ok_or_else(|| DeviceError::Missing {
            key: "name".into(),
            reason: "every device needs a name".into(),
        })?
        .to_string();
    let arch_name = r
        .string("architecture")?
        .ok_or_else(|| DeviceError::Missing {
            key: "architecture".into(),
            reason: "one of bulk, thin-body, double-gate, tri-gate, gate-all-around, capped-fin, bulk-fin"
                .into(),
        })?;
    let architecture = Architecture::from_name(arch_name).ok_or_else(|| {
        invalid(
            "architecture",
            format!("\"{arch_name}\""),
            format!(
                "unknown architecture{}; known: {}",
                closest(arch_name, Architecture::ALL.iter().map(|a| a.name()))
                    .map(|s| format!(" (did you mean \"{s}\"?)"))
                    .unwrap_or_default(),
                Architecture::ALL.map(|a| a.name()).join(", ")
            ),
        )
    })?;
    let polarity = match r.string("polarity")?.unwrap_or("n") {
        "n" => Polarity::N,
        "p" => Polarity::P,
        other => {
            return Err(invalid(
                "polarity",
                format!("\"{other}\""),
                "must be \"n\" or \"p\"",
            ))
        }
    };
    let s = polarity.sign();
    let temperature_k = in_range(
        "temperature_K",
        r.number("temperature_K")?.unwrap_or(300.0),
        50.0,
        600.0,
        "K",
    )?;

    // Geometry.
    let arch = architecture;
    let uses = |key: &str| -> bool {
        match key {
            "body_thickness_nm" => arch != Architecture::Bulk,
            "fin_height_nm" | "fin_pitch_nm" => arch.is_fin(),
            "box_thickness_nm" => matches!(
                arch,
                Architecture::ThinBody | Architecture::TriGate | Architecture::CappedFin
            ),
            "box_material" => matches!(
                arch,
                Architecture::ThinBody | Architecture::TriGate | Architecture::CappedFin
            ),
            "junction_depth_nm" => arch == Architecture::Bulk,
            "substrate_depth_nm" => matches!(arch, Architecture::Bulk | Architecture::BulkFin),
            "isolation_depth_nm" => arch == Architecture::BulkFin,
            "cap_thickness_nm" | "cap_material" => arch == Architecture::CappedFin,
            "gate_pitch_nm" | "spacer_thickness_nm" | "contact_width_nm" => arch.is_planar(),
            _ => true,
        }
    };
    for key in TABLE_KEYS[0].1 {
        if r.given(&format!("geometry.{key}")) && !uses(key) {
            warnings.push(format!(
                "geometry.{key} has no effect for architecture {arch}"
            ));
        }
    }
    let g = |key: &str, default: f64| -> Result<f64, DeviceError> {
        let full = format!("geometry.{key}");
        bounded(&full, positive(&full, r.number(&full)?.unwrap_or(default))?)
    };
    let gate_length_nm = positive(
        "geometry.gate_length_nm",
        r.required_number(
            "geometry.gate_length_nm",
            "the gate length is what gatehold studies",
        )?,
    )?;
    let body_thickness_nm = if arch == Architecture::Bulk {
        r.number("geometry.body_thickness_nm")?
            .unwrap_or(0.0)
            .max(0.0)
    } else {
        bounded(
            "geometry.body_thickness_nm",
            positive(
                "geometry.body_thickness_nm",
                r.required_number(
                    "geometry.body_thickness_nm",
                    &format!("{arch} needs its body (or fin) thickness"),
                )?,
            )?,
        )?
    };
    let fin_height_nm = if arch.is_fin() {
        bounded(
            "geometry.fin_height_nm",
            positive(
                "geometry.fin_height_nm",
                r.required_number(
                    "geometry.fin_height_nm",
                    &format!("{arch} needs the fin or wire height"),
                )?,
            )?,
        )?
    } else {
        r.number("geometry.fin_height_nm")?.unwrap_or(0.0)
    };

    // Gate stack.
    let layers = root
        .get("gate_stack")
        .and_then(|v| v.as_array())
        .cloned()
        .unwrap_or_default();
    if layers.len() > MAX_STACK_LAYERS {
        return Err(invalid(
            "gate_stack",
            format!("{} layers", layers.len()),
            format!("at most {MAX_STACK_LAYERS} layers"),
        ));
    }
    if layers.is_empty() {
        return Err(DeviceError::Missing {
            key: "gate_stack".into(),
            reason: "at least one [[gate_stack]] layer (material or relative_permittivity, and thickness_nm)".into(),
        });
    }
    let mut stack = Vec::new();
    for (i, layer) in layers.iter().enumerate() {
        let mk = format!("gate_stack.{i}.material");
        let ek = format!("gate_stack.{i}.relative_permittivity");
        let tk = format!("gate_stack.{i}.thickness_nm");
        let t = layer.as_table().expect("checked above");
        let get_num = |k: &str, full: &str| -> Result<Option<f64>, DeviceError> {
            match t.get(k) {
                None => Ok(None),
                Some(Value::Integer(x)) => Ok(Some(*x as f64)),
                Some(Value::Float(x)) if x.is_finite() => Ok(Some(*x)),
                Some(other) => Err(invalid(full, other, "must be a finite number")),
            }
        };
        let material = match t.get("material") {
            None => None,
            Some(Value::String(m)) => Some(m.clone()),
            Some(other) => return Err(invalid(&mk, other, "must be a string")),
        };
        let eps = get_num("relative_permittivity", &ek)?;
        let (material, eps_r) = match (material, eps) {
            (Some(m), None) => {
                let e = dielectric(&mk, &m)?;
                (m, e)
            }
            (None, Some(e)) => (format!("eps={e}"), in_range(&ek, e, 1.0, 1000.0, "")?),
            (Some(_), Some(_)) => {
                return Err(invalid(
                    &ek,
                    eps.unwrap(),
                    "give either material or relative_permittivity, not both",
                ))
            }
            (None, None) => {
                return Err(DeviceError::Missing {
                    key: mk,
                    reason: "each layer needs a material or a relative_permittivity".into(),
                })
            }
        };
        let thickness_nm = positive(
            &tk,
            get_num("thickness_nm", &tk)?.ok_or_else(|| DeviceError::Missing {
                key: tk.clone(),
                reason: "each layer needs its thickness".into(),
            })?,
        )?;
        if thickness_nm < 0.1 {
            return Err(invalid(
                &tk,
                thickness_nm,
                "thinner than 0.1 nm: below one atomic layer, the mesh cannot resolve it",
            ));
        }
        bounded(&tk, thickness_nm)?;
        stack.push(StackLayer {
            material,
            eps_r,
            thickness_nm,
        });
    }
    let stack_t: f64 = stack.iter().map(|l| l.thickness_nm).sum();

    let (spacer_material, spacer_eps) = spacer(&r)?;
    let contacts = contacts(&r, gate_length_nm)?;
    let box_material = r.string("geometry.box_material")?.unwrap_or("SiO2");
    let box_eps = dielectric("geometry.box_material", box_material)?;
    let cap_material = r.string("geometry.cap_material")?.unwrap_or("SiO2");
    let cap_eps = dielectric("geometry.cap_material", cap_material)?;
    let geometry = Geometry {
        gate_length_nm,
        body_thickness_nm,
        fin_height_nm,
        // The default pitch follows the fin; other architectures do not use it.
        fin_pitch_nm: g(
            "fin_pitch_nm",
            if arch.is_fin() {
                body_thickness_nm + 2.0 * stack_t + 20.0
            } else {
                2.0 * stack_t + 20.0
            },
        )?,
        box_thickness_nm: g("box_thickness_nm", 25.0)?,
        source_drain_length_nm: match &contacts {
            Some(c) => c.source_drain_length_nm(),
            None => g("source_drain_length_nm", 15.0)?,
        },
        junction_depth_nm: g("junction_depth_nm", 15.0)?,
        substrate_depth_nm: g(
            "substrate_depth_nm",
            if arch == Architecture::BulkFin {
                DEFAULT_BULK_FIN_SUBSTRATE_DEPTH_NM
            } else {
                100.0
            },
        )?,
        gate_height_nm: g("gate_height_nm", 20.0)?,
        spacer_eps,
        spacer_material,
        box_eps,
        cap_thickness_nm: g("cap_thickness_nm", 10.0)?,
        cap_eps,
        isolation_depth_nm: g("isolation_depth_nm", DEFAULT_ISOLATION_DEPTH_NM)?,
        contacts,
    };
    if arch == Architecture::Bulk && geometry.junction_depth_nm >= geometry.substrate_depth_nm {
        return Err(invalid(
            "geometry.junction_depth_nm",
            geometry.junction_depth_nm,
            format!(
                "must be shallower than geometry.substrate_depth_nm = {}",
                geometry.substrate_depth_nm
            ),
        ));
    }
    if arch.is_fin() && geometry.fin_pitch_nm < body_thickness_nm + 2.0 * stack_t {
        return Err(invalid(
            "geometry.fin_pitch_nm",
            geometry.fin_pitch_nm,
            format!(
                "narrower than the fin plus its gate stack ({} nm)",
                body_thickness_nm + 2.0 * stack_t
            ),
        ));
    }

    // Gate.
    let workfunction_ev = in_range(
        "gate.workfunction_eV",
        r.required_number(
            "gate.workfunction_eV",
            "the gate work function sets the threshold",
        )?,
        3.0,
        6.5,
        "eV",
    )?;
    if !matches!(
        arch,
        Architecture::ThinBody | Architecture::TriGate | Architecture::CappedFin
    ) {
        for k in ["gate.back_workfunction_eV", "gate.back_bias_V"] {
            if r.given(k) {
                warnings.push(format!("{k} has no effect for architecture {arch}"));
            }
        }
    }
    let gate = Gate {
        workfunction_ev,
        back_workfunction_ev: in_range(
            "gate.back_workfunction_eV",
            r.number("gate.back_workfunction_eV")?
                .unwrap_or(if s > 0.0 {
                    5.17
                } else {
                    2.0 * crate::physics::Silicon::at(temperature_k).phi_i_ev - 5.17
                }),
            3.0,
            6.5,
            "eV",
        )?,
        back_bias_v: in_range(
            "gate.back_bias_V",
            r.number("gate.back_bias_V")?.unwrap_or(0.0),
            -20.0,
            20.0,
            "V",
        )?,
    };

    // Doping.
    let channel_cm3 = r.number("doping.channel_cm3")?.unwrap_or(1e15);
    if !(channel_cm3 == 0.0 || (1e10..=5e20).contains(&channel_cm3)) {
        return Err(invalid(
            "doping.channel_cm3",
            channel_cm3,
            "must be 0 (undoped) or between 1e10 and 5e20 cm^-3",
        ));
    }
    let source_drain_cm3 = in_range(
        "doping.source_drain_cm3",
        r.number("doping.source_drain_cm3")?.unwrap_or(1e20),
        1e17,
        5e21,
        "cm^-3",
    )?;
    if source_drain_cm3 <= 10.0 * channel_cm3 {
        return Err(invalid(
            "doping.source_drain_cm3",
            source_drain_cm3,
            format!(
                "must exceed the channel doping ({channel_cm3:e} cm^-3) tenfold to form junctions"
            ),
        ));
    }
    let junction_offset_nm = r.number("doping.junction_offset_nm")?.unwrap_or(0.0);
    if -junction_offset_nm >= geometry.source_drain_length_nm {
        return Err(invalid(
            "doping.junction_offset_nm",
            junction_offset_nm,
            "underlap longer than the source/drain silicon",
        ));
    }
    let junction_gradient_nm_per_decade = r
        .number("doping.junction_gradient_nm_per_decade")?
        .unwrap_or(0.0);
    if !(0.0..=20.0).contains(&junction_gradient_nm_per_decade) {
        return Err(invalid(
            "doping.junction_gradient_nm_per_decade",
            junction_gradient_nm_per_decade,
            "must be 0 (abrupt) or up to 20 nm/decade",
        ));
    }
    let subfin_cm3 = r.number("doping.subfin_cm3")?.unwrap_or(channel_cm3);
    if !(subfin_cm3 == 0.0 || (1e10..=5e20).contains(&subfin_cm3)) {
        return Err(invalid(
            "doping.subfin_cm3",
            show_number(subfin_cm3),
            "must be 0 (undoped) or between 1e10 and 5e20 cm^-3 (sub-fin and substrate dopants, the channel's type)",
        ));
    }
    if arch != Architecture::BulkFin && r.given("doping.subfin_cm3") {
        warnings.push(format!(
            "doping.subfin_cm3 has no effect for architecture {arch}"
        ));
    }
    let doping = Doping {
        channel_per_nm3: channel_cm3 * PER_CM3_TO_PER_NM3,
        subfin_per_nm3: subfin_cm3 * PER_CM3_TO_PER_NM3,
        source_drain_per_nm3: source_drain_cm3 * PER_CM3_TO_PER_NM3,
        junction_offset_nm,
        junction_gradient_nm_per_decade,
    };

    // Bias: defaults mirrored for p-channel devices.
    let b = |k: &str, default: f64| -> Result<f64, DeviceError> {
        Ok(r.number(&format!("bias.{k}"))?.unwrap_or(default))
    };
    let bias = Bias {
        vds_lin_v: b("vds_lin_V", 0.05 * s)?,
        vds_sat_v: b("vds_sat_V", 0.8 * s)?,
        vgs_start_v: b("vgs_start_V", if s > 0.0 { -0.2 } else { -0.8 })?,
        vgs_stop_v: b("vgs_stop_V", if s > 0.0 { 0.8 } else { 0.2 })?,
        vgs_step_v: b("vgs_step_V", 0.02)?,
        off_vgs_v: b("off_vgs_V", 0.0)?,
        points: match r.string("bias.points")? {
            None | Some("auto") => BiasPoints::Auto,
            Some("adaptive") => BiasPoints::Adaptive,
            Some("grid") => BiasPoints::Grid,
            Some(other) => {
                return Err(invalid(
                    "bias.points",
                    format!("\"{other}\""),
                    "must be \"auto\" (adaptive unless an output stores the whole curve), \
                     \"adaptive\" (only the gate voltages the extraction needs) \
                     or \"grid\" (every gate voltage of the sweep)",
                ))
            }
        },
        auto_extend: r.boolean("bias.auto_extend")?.unwrap_or(true),
        extend_limit_v: bounded(
            "bias.extend_limit_V",
            r.number("bias.extend_limit_V")?
                .unwrap_or(DEFAULT_EXTEND_LIMIT_V),
        )?,
    };
    for (k, v) in [
        ("bias.vgs_start_V", bias.vgs_start_v),
        ("bias.vgs_stop_V", bias.vgs_stop_v),
        ("bias.off_vgs_V", bias.off_vgs_v),
    ] {
        bounded(k, v)?;
    }
    for (k, v) in [
        ("bias.vds_lin_V", bias.vds_lin_v),
        ("bias.vds_sat_V", bias.vds_sat_v),
    ] {
        if v * s <= 0.0 || v.abs() > 5.0 {
            return Err(invalid(
                k,
                v,
                if s > 0.0 {
                    "an n-channel drain bias must be above 0 and at most 5 V"
                } else {
                    "a p-channel drain bias must be below 0 and at least -5 V"
                },
            ));
        }
        bounded(k, v)?;
    }
    if bias.vds_sat_v.abs() <= bias.vds_lin_v.abs() {
        return Err(invalid(
            "bias.vds_sat_V",
            bias.vds_sat_v,
            format!(
                "must be larger in magnitude than bias.vds_lin_V = {}",
                bias.vds_lin_v
            ),
        ));
    }
    if bias.vgs_step_v <= 0.0 || bias.vgs_step_v > 0.2 {
        return Err(invalid(
            "bias.vgs_step_V",
            bias.vgs_step_v,
            "must be above 0 and at most 0.2 V (SS needs several points per decade)",
        ));
    }
    if bias.vgs_stop_v <= bias.vgs_start_v {
        return Err(invalid(
            "bias.vgs_stop_V",
            bias.vgs_stop_v,
            format!(
                "must be above bias.vgs_start_V = {} (the range is empty or reversed)",
                bias.vgs_start_v
            ),
        ));
    }
    if bias.vgs_start_v < -5.0 || bias.vgs_stop_v > 5.0 {
        return Err(invalid(
            "bias.vgs_start_V",
            bias.vgs_start_v,
            "gate sweep must stay within -5 V to 5 V",
        ));
    }
    let npts = (bias.vgs_stop_v - bias.vgs_start_v) / bias.vgs_step_v;
    if npts > 2000.0 {
        return Err(invalid(
            "bias.vgs_step_V",
            bias.vgs_step_v,
            format!("gives {} gate voltages; at most 2000", npts as usize),
        ));
    }
    if npts < 4.0 {
        return Err(invalid(
            "bias.vgs_step_V",
            bias.vgs_step_v,
            "gives fewer than 5 gate voltages",
        ));
    }
    // With bias.auto_extend the range may grow to reach the off-state point.
    let reach = if bias.auto_extend {
        bias.extend_limit_v
    } else {
        0.0
    };
    if bias.off_vgs_v < bias.vgs_start_v - reach - 1e-12
        || bias.off_vgs_v > bias.vgs_stop_v + reach + 1e-12
    {
        return Err(invalid(
            "bias.off_vgs_V",
            bias.off_vgs_v,
            format!(
                "must lie within the gate sweep {} to {} V (extended by bias.extend_limit_V = {reach} V when bias.auto_extend = true); \
                 set bias.off_vgs_V inside it or widen bias.vgs_start_V/bias.vgs_stop_V",
                bias.vgs_start_v, bias.vgs_stop_v
            ),
        ));
    }

    let extraction = Extraction {
        current_criterion_a: bounded(
            "extraction.current_criterion_A",
            positive(
                "extraction.current_criterion_A",
                r.number("extraction.current_criterion_A")?.unwrap_or(1e-7),
            )?,
        )?,
        mobility_nm2_per_vs: CM2_TO_NM2
            * in_range(
                "extraction.mobility_cm2_per_Vs",
                r.number("extraction.mobility_cm2_per_Vs")?.unwrap_or(200.0),
                1.0,
                1e5,
                "cm^2/Vs",
            )?,
        injection_velocity_nm_per_s: 1e7
            * bounded(
                "extraction.injection_velocity_cm_per_s",
                r.number("extraction.injection_velocity_cm_per_s")?
                    .unwrap_or(DEFAULT_INJECTION_VELOCITY_CM_PER_S),
            )?,
    };
    let mesh = MeshSettings {
        max_step_nm: in_range(
            "mesh.max_step_nm",
            r.number("mesh.max_step_nm")?.unwrap_or(0.5),
            0.05,
            5.0,
            "nm",
        )?,
        refinement: in_range(
            "mesh.refinement",
            r.number("mesh.refinement")?.unwrap_or(1.0),
            1.0,
            8.0,
            "",
        )?,
        max_nodes: bounded(
            "mesh.max_nodes",
            r.number("mesh.max_nodes")?.unwrap_or(DEFAULT_MAX_NODES),
        )?,
        growth: bounded(
            "mesh.growth",
            r.number("mesh.growth")?.unwrap_or(DEFAULT_MESH_GROWTH),
        )?,
        max_far_step_nm: bounded(
            "mesh.max_far_step_nm",
            r.number("mesh.max_far_step_nm")?
                .unwrap_or(DEFAULT_MAX_FAR_STEP_NM),
        )?,
    };
    let mut mesh = mesh;
    if !r.given("mesh.max_far_step_nm") {
        // The default far cap never undercuts a coarse mesh.max_step_nm.
        mesh.max_far_step_nm = mesh.max_far_step_nm.max(mesh.max_step_nm);
    }
    if mesh.max_far_step_nm < mesh.max_step_nm {
        return Err(invalid(
            "mesh.max_far_step_nm",
            mesh.max_far_step_nm,
            format!(
                "must be at least mesh.max_step_nm = {} (the far cells are never finer than the channel's)",
                mesh.max_step_nm
            ),
        ));
    }
    check_gate_length(gate_length_nm, &mesh, junction_offset_nm)?;
    if arch != Architecture::Bulk && body_thickness_nm < 1.0 {
        return Err(invalid(
            "geometry.body_thickness_nm",
            body_thickness_nm,
            "below 1 nm; classical carriers are meaningless there",
        ));
    }
    if arch != Architecture::Bulk && body_thickness_nm < 5.0 {
        warnings.push(format!(
            "body {body_thickness_nm} nm thick: quantum confinement (not modelled) matters below about 5 nm"
        ));
    }

    let scenario = Scenario {
        name,
        architecture,
        polarity,
        temperature_k,
        geometry,
        stack,
        gate,
        doping,
        bias,
        extraction,
        mesh,
        fin_method: FinMethod::default(),
        warnings,
    };
    check_size(&scenario)?;
    Ok(scenario)
}

#[cfg(test)]
mod tests {
    use super::*;

    const MIN: &str = r#"
name = "t"
architecture = "double-gate"
[geometry]
gate_length_nm = 25
body_thickness_nm = 8
[[gate_stack]]
material = "SiO2"
thickness_nm = 1.0
[gate]
workfunction_eV = 4.6
"#;

    #[test]
    fn minimal_device_gets_contract_defaults() {
        let s = parse_device(MIN).unwrap();
        assert_eq!(s.geometry.source_drain_length_nm, 15.0);
        assert_eq!(s.bias.vds_sat_v, 0.8);
        assert_eq!(s.extraction.current_criterion_a, 1e-7);
        assert_eq!(s.mesh.max_step_nm, 0.5);
        assert_eq!(s.geometry.spacer_eps, 7.5);
        assert!((s.eot_nm() - 1.0).abs() < 1e-12);
    }

    #[test]
    fn unknown_key_names_the_closest() {
        let e = parse_device(&MIN.replace("gate_length_nm", "gate_lenght_nm")).unwrap_err();
        assert_eq!(
            e,
            DeviceError::UnknownKey {
                key: "geometry.gate_lenght_nm".into(),
                suggestion: Some("geometry.gate_length_nm".into())
            }
        );
        let e = parse_device(&format!("temprature_K = 300\n{MIN}")).unwrap_err();
        assert!(e.to_string().contains("temperature_K"), "{e}");
    }

    #[test]
    fn bad_values_name_key_value_and_reason() {
        let e =
            parse_device(&MIN.replace("thickness_nm = 1.0", "thickness_nm = -1.0")).unwrap_err();
        assert!(
            matches!(&e, DeviceError::Invalid { key, .. } if key == "gate_stack.0.thickness_nm"),
            "{e}"
        );
        let e = parse_device(&format!(
            "{MIN}[bias]\nvgs_start_V = 0.5\nvgs_stop_V = 0.1\n"
        ))
        .unwrap_err();
        assert!(
            e.to_string().contains("bias.vgs_stop_V") && e.to_string().contains("reversed"),
            "{e}"
        );
        let e = parse_device(&format!("{MIN}[doping]\nchannel_cm3 = 1e24\n")).unwrap_err();
        assert!(e.to_string().contains("doping.channel_cm3"), "{e}");
        let e =
            parse_device(&MIN.replace("gate_length_nm = 25", "gate_length_nm = 0.6")).unwrap_err();
        assert!(e.to_string().contains("2 mesh cells"), "{e}");
        let e = parse_device(&MIN.replace("\"SiO2\"", "\"SiO3\"")).unwrap_err();
        assert!(e.to_string().contains("SiO2"), "{e}");
        let e = parse_device(&MIN.replace("double-gate", "dual-gate")).unwrap_err();
        assert!(e.to_string().contains("double-gate"), "{e}");
    }

    #[test]
    fn p_channel_defaults_are_mirrored_and_undoped_body_is_valid() {
        let s = parse_device(&format!(
            "polarity = \"p\"\n{MIN}[doping]\nchannel_cm3 = 0\n"
        ))
        .unwrap();
        assert_eq!(s.bias.vds_lin_v, -0.05);
        assert_eq!(s.bias.vds_sat_v, -0.8);
        assert_eq!(s.doping.channel_per_nm3, 0.0);
    }

    #[test]
    fn unused_keys_warn() {
        let s = parse_device(&MIN.replace(
            "body_thickness_nm = 8",
            "body_thickness_nm = 8\njunction_depth_nm = 10",
        ))
        .unwrap();
        assert!(s.warnings.iter().any(|w| w.contains("junction_depth_nm")));
    }
}
