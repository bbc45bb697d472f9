//! The HDF5 form of a [`SweepFile`] (pure Rust, hdf5-pure; schema in `docs/hdf5-schema.md`).
//!
//! Every write builds the whole file in memory, writes it to `FILE.tmp`,
//! syncs it and renames it over `FILE`, so a reader (or a killed run) only
//! ever sees a complete file: the previous checkpoint or the new one. Rows are
//! always written sorted by `point_index`, so a complete file holds one
//! element per point in plan order, and a partial one holds the finished
//! points in plan order.

use std::collections::HashMap;
use std::io::Write;
use std::path::{Path, PathBuf};

use hdf5_pure::{AttrValue, File, FileBuilder, MaxExtent};

use crate::device::Polarity;
use crate::evaluate::{CriteriaVerdict, Status};

pub use super::checksum::FLETCHER32;
use super::checksum::{checksummed, h5err, read_error};
use super::shortest::ShortestTable;
use super::{
    ascii_fit, units_of, AxisColumn, AxisValue, CurveData, IoError, MapData, PointRow, SweepFile,
    SweepMeta,
};

/// Value of the root attribute `format` this version writes. Format 2 adds
/// to format 1 (nothing renamed): the root attributes `base_device` and
/// `inputs`, the columns `method` and `warnings`, a `description` on every
/// dataset, and statuses stored whole as variable-length strings.
pub const FORMAT: &str = "gatehold-sweep 2";

/// Formats this version reads (format 1 files lack the additions above:
/// their points read with no method and no warnings, and they cannot be
/// resumed or merged with format 2 files, having no base device stored).
pub const FORMATS_READ: &[&str] = &["gatehold-sweep 1", FORMAT];

fn vs(s: &str) -> AttrValue {
    AttrValue::VarLenString(s.to_string())
}

/// Attribute of each variable-length text dataset: the SHA-256 (FIPS 180-4)
/// of its text, which fletcher32 does not cover (HDF5 keeps the strings in
/// its global heap, outside the chunks).
pub const TEXT_SHA256: &str = "text_sha256";

/// SHA-256 of text elements in a canonical form: each element's UTF-8
/// bytes without trailing NULs or spaces, followed by one 0 byte.
pub fn text_sha256<S: AsRef<str>>(elements: &[S]) -> String {
    let mut bytes = Vec::new();
    for e in elements {
        bytes.extend_from_slice(e.as_ref().trim_end_matches(['\0', ' ']).as_bytes());
        bytes.push(0);
    }
    super::sha256_hex(&bytes)
}

fn chunk(n: usize, max: usize) -> u64 {
    n.clamp(16, max) as u64
}

/// Kinds of column data under `points/`.
enum Col<'a> {
    F64(Vec<f64>),
    I64(Vec<i64>),
    Text(Vec<&'a str>, usize),
    /// Variable-length UTF-8 strings (stored whole).
    VText(Vec<&'a str>),
}

/// Builds the file's bytes.
pub fn to_bytes(f: &SweepFile) -> Result<Vec<u8>, String> {
    to_bytes_with(f, None)
}

/// Builds the file's bytes, with the `shortest` group when given.
pub fn to_bytes_with(f: &SweepFile, shortest: Option<&ShortestTable>) -> Result<Vec<u8>, String> {
    let m = &f.meta;
    let mut fb = FileBuilder::new();
    fb.set_attr("format", vs(FORMAT));
    fb.set_attr("tool_version", vs(&m.tool_version));
    fb.set_attr("plan", vs(&m.plan));
    fb.set_attr("created", vs(&m.created));
    fb.set_attr("command_line", vs(&m.command_line));
    fb.set_attr("model_summary", vs(&m.model_summary));
    fb.set_attr("started", vs(&m.started));
    fb.set_attr("finished", vs(&m.finished));
    fb.set_attr("shard", vs(&format!("{}/{}", m.shard_index, m.shard_count)));
    fb.set_attr("points_total", AttrValue::I64(m.points_total as i64));
    fb.set_attr("points_done", AttrValue::I64(f.rows.len() as i64));
    fb.set_attr("complete", AttrValue::I64(i64::from(f.is_complete())));
    let axes_json = serde_json::to_string(&f.axes.iter().map(|a| &a.key).collect::<Vec<_>>())
        .map_err(|e| e.to_string())?;
    fb.set_attr("axis_columns", vs(&axes_json));
    fb.set_attr("base_device", vs(&m.base_device));
    fb.set_attr(
        "inputs",
        vs(&serde_json::to_string(&m.inputs).map_err(|e| e.to_string())?),
    );
    fb.set_attr(
        "figure_columns",
        vs(&serde_json::to_string(&f.figures).map_err(|e| e.to_string())?),
    );

    // points/
    let n = f.rows.len();
    // name, units, role, description, data
    let mut cols: Vec<(String, &str, &str, String, Col)> = Vec::new();
    cols.push((
        "point_index".into(),
        "1",
        "index",
        "index of the point in plan order (from 0)".into(),
        Col::I64(f.rows.iter().map(|r| r.index as i64).collect()),
    ));
    let axis_text: Vec<Vec<String>> = f
        .axes
        .iter()
        .enumerate()
        .map(|(k, _)| {
            f.rows
                .iter()
                .map(|r| match &r.axis[k] {
                    AxisValue::Text(s) => ascii_fit(s, 1024),
                    AxisValue::Number(x) => x.to_string(),
                })
                .collect()
        })
        .collect();
    for (k, a) in f.axes.iter().enumerate() {
        if a.numeric {
            let v = f
                .rows
                .iter()
                .map(|r| {
                    if let AxisValue::Number(x) = r.axis[k] {
                        x
                    } else {
                        f64::NAN
                    }
                })
                .collect();
            cols.push((
                a.key.clone(),
                units_of(&a.key),
                "axis",
                format!("plan axis: device key `{}` of the point", a.key),
                Col::F64(v),
            ));
        } else {
            let v: Vec<&str> = axis_text[k].iter().map(String::as_str).collect();
            let w = v
                .iter()
                .map(|s| s.len())
                .max()
                .unwrap_or(0)
                .max(16)
                .next_power_of_two();
            cols.push((
                a.key.clone(),
                "1",
                "axis",
                format!("plan axis: device key `{}` of the point", a.key),
                Col::Text(v, w),
            ));
        }
    }
    for (k, name) in f.figures.iter().enumerate() {
        cols.push((
            name.clone(),
            units_of(name),
            "figure",
            super::describe_figure(name),
            Col::F64(
                f.rows
                    .iter()
                    .map(|r| r.figures[k].unwrap_or(f64::NAN))
                    .collect(),
            ),
        ));
    }
    let warnings: Vec<String> = f.rows.iter().map(|r| r.warnings.join("\n")).collect();
    cols.push((
        "status".into(),
        "1",
        "status",
        "\"ok\", or why the point failed or which figures are missing (whole, UTF-8)".into(),
        Col::VText(f.rows.iter().map(|r| r.status.as_str()).collect()),
    ));
    cols.push((
        "method".into(),
        "1",
        "method",
        "how the figures were obtained: \"2d-solve\" (along-channel solve), \"theory\" (fins and wires: cross-section solve and the Liu et al. 1993 model), empty when the point failed first".into(),
        Col::VText(
            f.rows
                .iter()
                .map(|r| r.method.map(|m| m.name()).unwrap_or(""))
                .collect(),
        ),
    ));
    cols.push((
        "warnings".into(),
        "1",
        "warnings",
        "cautions about the point's figures, one per line (empty: none)".into(),
        Col::VText(warnings.iter().map(String::as_str).collect()),
    ));
    cols.push((
        "meets_criteria".into(),
        "1",
        "bookkeeping",
        "the plan's [criteria]: 1 all met, 0 one failed, -1 unknown or no criteria".into(),
        Col::I64(f.rows.iter().map(|r| r.meets_criteria.code()).collect()),
    ));
    cols.push((
        "newton_steps_total".into(),
        "1",
        "bookkeeping",
        "Newton steps of the point's solves (solver effort)".into(),
        Col::I64(f.rows.iter().map(|r| r.newton_steps).collect()),
    ));
    cols.push((
        "vds_lin_V".into(),
        "V",
        "bookkeeping",
        "low drain bias V_DS,lin of the point".into(),
        Col::F64(f.rows.iter().map(|r| r.vds_v.0).collect()),
    ));
    cols.push((
        "vds_sat_V".into(),
        "V",
        "bookkeeping",
        "high drain bias V_DS,sat of the point".into(),
        Col::F64(f.rows.iter().map(|r| r.vds_v.1).collect()),
    ));
    cols.push((
        "elapsed_s".into(),
        "s",
        "bookkeeping",
        "wall time of the point (the only column that differs between identical runs)".into(),
        Col::F64(f.rows.iter().map(|r| r.elapsed_s).collect()),
    ));
    let mut offsets = Vec::with_capacity(n);
    let mut off = 0i64;
    for r in &f.rows {
        offsets.push(off);
        off += r.curve.vgs_v.len() as i64;
    }
    cols.push((
        "curve_offset".into(),
        "1",
        "bookkeeping",
        "first element of the point's curve in curves/*".into(),
        Col::I64(offsets),
    ));
    cols.push((
        "curve_length".into(),
        "1",
        "bookkeeping",
        "number of gate voltages of the point's curve in curves/*".into(),
        Col::I64(f.rows.iter().map(|r| r.curve.vgs_v.len() as i64).collect()),
    ));

    let mut g = fb.create_group("points");
    g.set_attr(
        "order",
        vs("one element per finished point, sorted by point_index (plan order)"),
    );
    for (name, units, role, description, data) in &cols {
        let ds = g.create_dataset(name);
        match data {
            Col::F64(v) => {
                ds.with_f64_data(v);
            }
            Col::I64(v) => {
                ds.with_i64_data(v);
            }
            Col::Text(v, w) => {
                ds.with_ascii_strings_sized(v, *w as u32)
                    .map_err(|e| format!("points/{name}: {e}"))?;
            }
            Col::VText(v) => {
                ds.with_vlen_strings(v);
                ds.set_attr(TEXT_SHA256, AttrValue::AsciiString(text_sha256(v)));
            }
        }
        ds.with_shape(&[n as u64])
            .with_maxshape(&[MaxExtent::Unlimited]);
        checksummed(ds, &[chunk(n, 1024)]);
        ds.set_attr("units", vs(units));
        ds.set_attr("role", vs(role));
        ds.set_attr("description", vs(description));
    }
    fb.add_group(g.finish());

    // curves/
    let total = off as usize;
    let mut pi = Vec::with_capacity(total);
    let (mut v, mut il, mut is) = (
        Vec::with_capacity(total),
        Vec::with_capacity(total),
        Vec::with_capacity(total),
    );
    for r in &f.rows {
        pi.extend(std::iter::repeat_n(r.index as i64, r.curve.vgs_v.len()));
        v.extend_from_slice(&r.curve.vgs_v);
        il.extend_from_slice(&r.curve.id_lin);
        is.extend_from_slice(&r.curve.id_sat);
    }
    let mut g = fb.create_group("curves");
    g.set_attr("layout", vs("flattened: point k's samples are [curve_offset[k], curve_offset[k] + curve_length[k]) of each dataset (points/curve_offset, points/curve_length); NaN = bias point not converged"));
    for (name, units, description, data) in [
        ("vgs_V", "V", "gate voltage, ascending within each point", &v),
        (
            "id_lin_A_per_um",
            "A/um",
            "drain current per um of gate width at V_DS,lin (signed; NaN: bias point not converged)",
            &il,
        ),
        (
            "id_sat_A_per_um",
            "A/um",
            "drain current per um of gate width at V_DS,sat (signed; NaN: bias point not converged)",
            &is,
        ),
    ] {
        let ds = g.create_dataset(name);
        ds.with_f64_data(data)
            .with_shape(&[total as u64])
            .with_maxshape(&[MaxExtent::Unlimited]);
        checksummed(ds, &[chunk(total, 4096)])
            .set_attr("units", vs(units))
            .set_attr("description", vs(description));
    }
    let ds = g.create_dataset("point_index");
    ds.with_i64_data(&pi)
        .with_shape(&[total as u64])
        .with_maxshape(&[MaxExtent::Unlimited]);
    checksummed(ds, &[chunk(total, 4096)])
        .set_attr("units", vs("1"))
        .set_attr(
            "description",
            vs("plan index of the point each sample belongs to"),
        );
    fb.add_group(g.finish());

    // maps/
    let mut g = fb.create_group("maps");
    g.set_attr("layout", vs("maps/point_NNNNNN: potential at the off-state gate voltage; 2D arrays are [ny, nx] (nodes) or [ny-1, nx-1] (cells), row-major, x fastest"));
    for r in &f.rows {
        if let Some(map) = &r.map {
            let mut mg = g.create_group(&map_name(r.index));
            write_map(&mut mg, map);
            g.add_group(mg.finish());
        }
    }
    fb.add_group(g.finish());
    if let Some(t) = shortest {
        super::shortest::add_group(&mut fb, t)?;
    }
    fb.finish().map_err(|e| e.to_string())
}

/// Group name of a point's map.
pub fn map_name(index: usize) -> String {
    format!("point_{index:06}")
}

fn write_map(g: &mut hdf5_pure::GroupBuilder, m: &MapData) {
    let (nx, ny) = (m.nx() as u64, m.ny() as u64);
    checksummed(g.create_dataset("x_nm"), &[nx])
        .with_f64_data(&m.x_nm)
        .with_shape(&[nx])
        .set_attr("units", vs("nm"))
        .set_attr(
            "description",
            vs("mesh lines along the channel, from the source contact"),
        );
    checksummed(g.create_dataset("y_nm"), &[ny])
        .with_f64_data(&m.y_nm)
        .with_shape(&[ny])
        .set_attr("units", vs("nm"))
        .set_attr(
            "description",
            vs("mesh lines downward from the top silicon surface"),
        );
    for (name, psi) in [("psi_lin_V", &m.psi_lin_v), ("psi_sat_V", &m.psi_sat_v)] {
        if let Some(p) = psi {
            checksummed(g.create_dataset(name), &[ny, nx])
                .with_f64_data(p)
                .with_shape(&[ny, nx])
                .set_attr("units", vs("V"))
                .set_attr(
                    "description",
                    vs("electrostatic potential at the off-state gate voltage, node (j, i) = (y, x)"),
                );
        }
    }
    checksummed(g.create_dataset("material_code"), &[ny - 1, nx - 1])
        .with_i64_data(&m.material)
        .with_shape(&[ny - 1, nx - 1])
        .set_attr(
            "units",
            vs("1 (0 silicon, 1 dielectric, 2+k metal electrode k)"),
        )
        .set_attr(
            "description",
            vs("material of each mesh cell: 0 silicon, 1 dielectric, 2+k metal electrode k"),
        );
    checksummed(g.create_dataset("eps_r"), &[ny - 1, nx - 1])
        .with_f64_data(&m.eps_r)
        .with_shape(&[ny - 1, nx - 1])
        .set_attr("units", vs("1"))
        .set_attr(
            "description",
            vs("relative permittivity of each mesh cell (0 in metal)"),
        );
    g.set_attr("eg_eV", AttrValue::F64(m.eg_ev));
    g.set_attr("carrier_sign", AttrValue::F64(m.polarity.sign()));
    g.set_attr("gate_start_nm", AttrValue::F64(m.gate_start_nm));
    g.set_attr("gate_end_nm", AttrValue::F64(m.gate_end_nm));
    g.set_attr(
        "leakiest_depth_lin_nm",
        AttrValue::F64(m.leakiest_depth_lin_nm.unwrap_or(f64::NAN)),
    );
    g.set_attr(
        "leakiest_depth_sat_nm",
        AttrValue::F64(m.leakiest_depth_sat_nm.unwrap_or(f64::NAN)),
    );
}

/// Held while a sweep file is written (temporary file, fsync, rename): a
/// process that must exit at once (a second Ctrl-C) takes it first, so that
/// it never leaves a temporary file behind.
pub static WRITING: std::sync::Mutex<()> = std::sync::Mutex::new(());

/// Writes `f` to `path` atomically (temporary file, fsync, rename).
pub fn write_sweep(path: &Path, f: &SweepFile) -> Result<(), IoError> {
    write_sweep_with(path, f, None)
}

/// [`write_sweep`] with the `shortest` group when given (a complete file with criteria).
pub fn write_sweep_with(
    path: &Path,
    f: &SweepFile,
    shortest: Option<&ShortestTable>,
) -> Result<(), IoError> {
    let bytes = to_bytes_with(f, shortest).map_err(|e| h5err(path, "/", e))?;
    let _writing = WRITING.lock().unwrap_or_else(|e| e.into_inner());
    let tmp = tmp_path(path);
    let fe = |e: std::io::Error| IoError::File {
        path: tmp.display().to_string(),
        reason: e.to_string(),
    };
    {
        let mut out = std::fs::File::create(&tmp).map_err(fe)?;
        out.write_all(&bytes).map_err(fe)?;
        out.sync_all().map_err(fe)?;
    }
    std::fs::rename(&tmp, path).map_err(|e| IoError::File {
        path: path.display().to_string(),
        reason: format!("cannot replace with {}: {e}", tmp.display()),
    })
}

/// The temporary file a checkpoint is written to before it is renamed over `path`.
pub fn tmp_path(path: &Path) -> PathBuf {
    let mut s = path.as_os_str().to_owned();
    s.push(".tmp");
    PathBuf::from(s)
}

fn attr_string(attrs: &HashMap<String, AttrValue>, name: &str) -> Option<String> {
    match attrs.get(name)? {
        AttrValue::VarLenString(s) | AttrValue::String(s) | AttrValue::AsciiString(s) => {
            Some(s.clone())
        }
        _ => None,
    }
}

fn attr_f64(attrs: &HashMap<String, AttrValue>, name: &str) -> Option<f64> {
    match attrs.get(name)? {
        AttrValue::F64(x) => Some(*x),
        AttrValue::I64(x) => Some(*x as f64),
        _ => None,
    }
}

fn finite(x: f64) -> Option<f64> {
    x.is_finite().then_some(x)
}

/// Every dataset of the sweep file at `path` (full paths such as
/// `points/dibl_mV_per_V`, sorted) that carries no fletcher32 checksum: all
/// of them in files written before checksums were added (format 1, and
/// format 2 before this version), none in a file this version wrote. Such a
/// file reads as before, but damage to its numbers cannot be detected;
/// rewriting it (`--resume`, `merge`) adds the checksums.
pub fn unchecksummed_datasets(path: &Path) -> Result<Vec<String>, IoError> {
    let file = File::open(path).map_err(|e| IoError::File {
        path: path.display().to_string(),
        reason: e.to_string(),
    })?;
    let mut out = Vec::new();
    let mut groups = vec![String::new()];
    while let Some(g) = groups.pop() {
        let group = if g.is_empty() {
            file.root()
        } else {
            file.group(&g).map_err(|e| read_error(path, &g, e))?
        };
        let full = |name: &str| {
            let leaf = name.rsplit('/').next().unwrap_or(name);
            if g.is_empty() {
                leaf.to_string()
            } else {
                format!("{g}/{leaf}")
            }
        };
        for d in group.datasets().map_err(|e| read_error(path, &g, e))? {
            let d = full(&d);
            let ds = file.dataset(&d).map_err(|e| read_error(path, &d, e))?;
            if !ds.filters().contains(&FLETCHER32) {
                out.push(d);
            }
        }
        for sub in group.groups().map_err(|e| read_error(path, &g, e))? {
            groups.push(full(&sub));
        }
    }
    out.sort();
    Ok(out)
}

/// Reads a sweep file back (any file this module wrote, partial or complete).
pub fn read_sweep(path: &Path) -> Result<SweepFile, IoError> {
    let meta = std::fs::metadata(path).map_err(|e| IoError::File {
        path: path.display().to_string(),
        reason: e.to_string(),
    })?;
    if !meta.is_file() {
        return Err(IoError::File {
            path: path.display().to_string(),
            reason: "not a regular file (devices, FIFOs and folders are refused)".into(),
        });
    }
    let file = File::open(path).map_err(|e| IoError::File {
        path: path.display().to_string(),
        reason: e.to_string(),
    })?;
    let root = file.root().attrs().map_err(|e| read_error(path, "/", e))?;
    let not = |reason: String| IoError::NotSweep {
        path: path.display().to_string(),
        reason,
    };
    let req = |name: &str| {
        attr_string(&root, name).ok_or_else(|| not(format!("root attribute `{name}` missing")))
    };
    let format = req("format")?;
    if !FORMATS_READ.contains(&format.as_str()) {
        return Err(not(format!(
            "root attribute `format` is \"{format}\"; this gatehold {} reads {}",
            env!("CARGO_PKG_VERSION"),
            FORMATS_READ.join(", ")
        )));
    }
    let shard = req("shard")?;
    let (si, sc) = shard
        .split_once('/')
        .and_then(|(a, b)| Some((a.parse::<usize>().ok()?, b.parse::<usize>().ok()?)))
        .filter(|(a, b)| a < b)
        .ok_or_else(|| not(format!("bad shard attribute \"{shard}\"")))?;
    let meta = SweepMeta {
        tool_version: req("tool_version")?,
        plan: req("plan")?,
        created: req("created")?,
        command_line: req("command_line")?,
        model_summary: req("model_summary")?,
        started: req("started")?,
        finished: req("finished")?,
        shard_index: si,
        shard_count: sc,
        points_total: attr_f64(&root, "points_total")
            .ok_or_else(|| not("root attribute `points_total` missing".into()))?
            as usize,
        base_device: attr_string(&root, "base_device").unwrap_or_default(),
        inputs: match attr_string(&root, "inputs") {
            Some(j) => serde_json::from_str(&j).map_err(|e| not(format!("inputs: {e}")))?,
            None => Vec::new(),
        },
    };
    let axis_keys: Vec<String> = serde_json::from_str(&req("axis_columns")?)
        .map_err(|e| not(format!("axis_columns: {e}")))?;
    let figures: Vec<String> = serde_json::from_str(&req("figure_columns")?)
        .map_err(|e| not(format!("figure_columns: {e}")))?;

    let ds = |name: &str| file.dataset(name).map_err(|e| read_error(path, name, e));
    let f64s = |name: &str| ds(name)?.read_f64().map_err(|e| read_error(path, name, e));
    let i64s = |name: &str| ds(name)?.read_i64().map_err(|e| read_error(path, name, e));
    let strs = |name: &str| -> Result<Vec<String>, IoError> {
        let d = ds(name)?;
        let v: Vec<String> = d
            .read_string()
            .map_err(|e| read_error(path, name, e))?
            .into_iter()
            .map(|s| s.trim_end_matches(['\0', ' ']).to_string())
            .collect();
        // Verified when stored (files before it have none).
        let attrs = d.attrs().map_err(|e| read_error(path, name, e))?;
        if let Some(want) = attr_string(&attrs, TEXT_SHA256) {
            let got = text_sha256(&v);
            if got != want.trim_end_matches(['\0', ' ']) {
                return Err(IoError::Damaged {
                    path: path.display().to_string(),
                    object: name.to_string(),
                    reason: format!("SHA-256 of its text {got}, stored {TEXT_SHA256} {want}"),
                });
            }
        }
        Ok(v)
    };
    let index = i64s("points/point_index")?;
    let n = index.len();
    let mut axes = Vec::new();
    let mut axis_vals: Vec<Vec<AxisValue>> = Vec::new();
    for key in &axis_keys {
        let name = format!("points/{key}");
        // Numeric or text by the stored type (a read error is never taken for text).
        let numeric = matches!(
            ds(&name)?.dtype().map_err(|e| read_error(path, &name, e))?,
            hdf5_pure::DType::F64 | hdf5_pure::DType::F32
        );
        let vals = if numeric {
            f64s(&name)?.into_iter().map(AxisValue::Number).collect()
        } else {
            strs(&name)?.into_iter().map(AxisValue::Text).collect()
        };
        axes.push(AxisColumn {
            key: key.clone(),
            numeric,
        });
        axis_vals.push(vals);
    }
    let fig_vals: Vec<Vec<f64>> = figures
        .iter()
        .map(|f| f64s(&format!("points/{f}")))
        .collect::<Result<_, _>>()?;
    let status = strs("points/status")?;
    // Format-1 files have neither column.
    let optional = |name: &str| -> Result<Vec<String>, IoError> {
        match file.dataset(name) {
            Ok(_) => strs(name),
            Err(_) => Ok(vec![String::new(); n]),
        }
    };
    let methods = optional("points/method")?;
    let warnings = optional("points/warnings")?;
    for (name, v) in [
        ("status", &status),
        ("method", &methods),
        ("warnings", &warnings),
    ] {
        if v.len() != n {
            return Err(not(format!(
                "points/{name} holds {} elements, points/point_index {n}",
                v.len()
            )));
        }
    }
    let meets = i64s("points/meets_criteria")?;
    let steps = i64s("points/newton_steps_total")?;
    let elapsed = f64s("points/elapsed_s")?;
    let (vl, vsat) = (f64s("points/vds_lin_V")?, f64s("points/vds_sat_V")?);
    let offs = i64s("points/curve_offset")?;
    let lens = i64s("points/curve_length")?;
    // A damaged or foreign file must give a named error, never an index panic.
    let lengths = [
        ("meets_criteria", meets.len()),
        ("newton_steps_total", steps.len()),
        ("elapsed_s", elapsed.len()),
        ("vds_lin_V", vl.len()),
        ("vds_sat_V", vsat.len()),
        ("curve_offset", offs.len()),
        ("curve_length", lens.len()),
    ]
    .into_iter()
    .chain(
        axis_keys
            .iter()
            .zip(&axis_vals)
            .map(|(k, v)| (k.as_str(), v.len())),
    )
    .chain(
        figures
            .iter()
            .zip(&fig_vals)
            .map(|(k, v)| (k.as_str(), v.len())),
    );
    for (name, len) in lengths {
        if len != n {
            return Err(not(format!(
                "points/{name} holds {len} elements, points/point_index {n}"
            )));
        }
    }
    if let Some(&i) = index
        .iter()
        .find(|&&i| i < 0 || i as usize >= meta.points_total)
    {
        return Err(not(format!(
            "point_index {i} outside the plan's {} points",
            meta.points_total
        )));
    }
    let (cv, cl, cs) = (
        f64s("curves/vgs_V")?,
        f64s("curves/id_lin_A_per_um")?,
        f64s("curves/id_sat_A_per_um")?,
    );
    let map_groups: Vec<String> = file
        .group("maps")
        .and_then(|g| g.groups())
        .map_err(|e| read_error(path, "maps", e))?;
    let mut rows = Vec::with_capacity(n);
    for k in 0..n {
        let idx = index[k] as usize;
        let (o, l) = (offs[k].max(0) as usize, lens[k].max(0) as usize);
        if o.saturating_add(l) > cv.len() || cl.len() != cv.len() || cs.len() != cv.len() {
            return Err(not(format!(
                "point {idx}: curve slice {o}+{l} beyond curves length {}",
                cv.len()
            )));
        }
        let name = map_name(idx);
        let map = if map_groups
            .iter()
            .any(|g| g.trim_start_matches('/').ends_with(&name))
        {
            Some(read_map(&file, path, &format!("maps/{name}"))?)
        } else {
            None
        };
        rows.push(PointRow {
            index: idx,
            axis: axis_vals.iter().map(|v| v[k].clone()).collect(),
            figures: fig_vals.iter().map(|v| finite(v[k])).collect(),
            status: Status::parse(&status[k]),
            method: super::method_from_name(&methods[k]),
            warnings: warnings[k]
                .lines()
                .filter(|l| !l.is_empty())
                .map(str::to_string)
                .collect(),
            meets_criteria: CriteriaVerdict::from_code(meets[k]),
            newton_steps: steps[k],
            vds_v: (vl[k], vsat[k]),
            elapsed_s: elapsed[k],
            curve: CurveData {
                vgs_v: cv[o..o + l].to_vec(),
                id_lin: cl[o..o + l].to_vec(),
                id_sat: cs[o..o + l].to_vec(),
            },
            map,
        });
    }
    rows.sort_by_key(|r| r.index);
    Ok(SweepFile {
        meta,
        axes,
        figures,
        rows,
    })
}

fn read_map(file: &File, path: &Path, g: &str) -> Result<MapData, IoError> {
    let ds = |name: &str| file.dataset(&format!("{g}/{name}"));
    let f = |name: &str| {
        ds(name)
            .and_then(|d| d.read_f64())
            .map_err(|e| read_error(path, &format!("{g}/{name}"), e))
    };
    // A potential is absent when that drain bias did not converge; when
    // present, a read error is an error.
    let optional = |name: &str| ds(name).ok().map(|_| f(name)).transpose();
    let attrs = file
        .group(g)
        .and_then(|x| x.attrs())
        .map_err(|e| read_error(path, g, e))?;
    let a = |name: &str| attr_f64(&attrs, name).unwrap_or(f64::NAN);
    Ok(MapData {
        x_nm: f("x_nm")?,
        y_nm: f("y_nm")?,
        psi_lin_v: optional("psi_lin_V")?,
        psi_sat_v: optional("psi_sat_V")?,
        material: ds("material_code")
            .and_then(|d| d.read_i64())
            .map_err(|e| read_error(path, &format!("{g}/material_code"), e))?,
        eps_r: f("eps_r")?,
        eg_ev: a("eg_eV"),
        polarity: if a("carrier_sign") < 0.0 {
            Polarity::P
        } else {
            Polarity::N
        },
        gate_start_nm: a("gate_start_nm"),
        gate_end_nm: a("gate_end_nm"),
        leakiest_depth_lin_nm: finite(a("leakiest_depth_lin_nm")),
        leakiest_depth_sat_nm: finite(a("leakiest_depth_sat_nm")),
    })
}
