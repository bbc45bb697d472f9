//! Plan files: a base device and the axes that vary it (DEVICE-FORMAT.md, "Plan files").
//!
//! Order of points (a contract of this module): the axes in the order written
//! in `[axes]`, then the `[zip]` group as one more axis; the **last axis varies
//! fastest** (as nested loops written in that order). Point `k` is the `k`-th
//! element of that product, counting from 0.
//!
//! Every point's device is built and validated with
//! [`crate::device::scenario_from_table`] when the plan is parsed, before any
//! solving: a single invalid point fails the whole plan up front with the
//! point's index and axis values ([`PlanError::Point`]).

use std::collections::BTreeSet;
use std::path::{Path, PathBuf};

use toml::Value;

use crate::device::{
    closest, known_keys, parse_table, scenario_from_table, DeviceError, FinMethod, Scenario,
};

/// Keys a plan file may hold at its top level.
pub const PLAN_KEYS: &[&str] = &["base", "axes", "zip", "output", "criteria", "fins"];
/// Keys of `[output]`.
pub const OUTPUT_KEYS: &[&str] = &["maps"];
/// Keys of `[criteria]` (screening pass/fail thresholds; each optional).
pub const CRITERIA_KEYS: &[&str] = &[
    "dibl_max_mV_per_V",
    "ss_max_mV_per_dec",
    "vt_rolloff_max_mV",
];
/// Largest number of points a plan may expand to.
pub const MAX_POINTS: usize = 10_000_000;

/// What is wrong with a plan file.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum PlanError {
    #[error("cannot read {path}: {reason}")]
    Io { path: String, reason: String },
    #[error("plan is not valid TOML: {0}")]
    Syntax(String),
    #[error("plan: unknown key `{key}`{}", suggestion.as_ref().map(|s| format!(" (did you mean `{s}`?)")).unwrap_or_default())]
    UnknownKey {
        key: String,
        suggestion: Option<String>,
    },
    #[error("plan: `{key}` = {value}: {reason}")]
    Invalid {
        key: String,
        value: String,
        reason: String,
    },
    #[error("plan: base device `{path}`: {error}")]
    Base { path: String, error: DeviceError },
    #[error("plan point {index} ({values}): {error}")]
    Point {
        index: usize,
        values: String,
        error: DeviceError,
    },
}

fn invalid(key: &str, value: impl std::fmt::Display, reason: impl Into<String>) -> PlanError {
    PlanError::Invalid {
        key: key.into(),
        value: value.to_string(),
        reason: reason.into(),
    }
}

pub use crate::io::AxisValue;

fn to_toml(v: &AxisValue) -> Value {
    match v {
        AxisValue::Number(x) if x.fract() == 0.0 && x.abs() < 9e15 => Value::Integer(*x as i64),
        AxisValue::Number(x) => Value::Float(*x),
        AxisValue::Text(s) => Value::String(s.clone()),
    }
}

/// One varied key: its dotted path and the values it takes, in order.
#[derive(Debug, Clone, PartialEq)]
pub struct AxisKey {
    pub key: String,
    pub values: Vec<AxisValue>,
    /// True when every value is a number (the HDF5 column is f64), else every value is text.
    pub numeric: bool,
}

/// One axis of the product: a single `[axes]` key, or the whole `[zip]` group.
#[derive(Debug, Clone, PartialEq)]
pub struct Axis {
    pub keys: Vec<AxisKey>,
}

impl Axis {
    pub fn len(&self) -> usize {
        self.keys[0].values.len()
    }
    pub fn is_empty(&self) -> bool {
        self.len() == 0
    }
}

pub use crate::evaluate::{Criteria, CriteriaVerdict};

/// One point of the product with its validated device.
#[derive(Debug, Clone)]
pub struct PlanPoint {
    pub index: usize,
    /// One value per column of [`Plan::columns`].
    pub values: Vec<AxisValue>,
    pub scenario: Scenario,
}

/// A parsed, fully validated plan.
#[derive(Debug, Clone)]
pub struct Plan {
    /// The plan file's text (stored in outputs; resume and merge compare it).
    pub text: String,
    /// The base device table (with no axis applied).
    pub base: toml::Table,
    /// The base device's text: the file's text, or the inline `[base]`
    /// table written out (stored in sweep files; resume and merge compare its hash).
    pub base_text: String,
    /// Every file the plan read (the plan, then its base), with hashes.
    pub inputs: Vec<crate::io::InputRecord>,
    /// Paths on disk of the files the plan read (a sweep refuses to write over any of them).
    pub input_paths: Vec<PathBuf>,
    pub axes: Vec<Axis>,
    pub points: Vec<PlanPoint>,
    /// Point indices whose potential maps are stored.
    pub maps: BTreeSet<usize>,
    pub criteria: Criteria,
}

impl Plan {
    /// Every varied key in column order (axes as written, then the zip keys).
    pub fn columns(&self) -> Vec<&AxisKey> {
        self.axes.iter().flat_map(|a| a.keys.iter()).collect()
    }

    /// "key = value, ..." for one point.
    pub fn describe(&self, index: usize) -> String {
        describe(&self.columns(), &self.points[index].values)
    }
}

fn describe(cols: &[&AxisKey], values: &[AxisValue]) -> String {
    cols.iter()
        .zip(values)
        .map(|(c, v)| format!("{} = {v}", c.key))
        .collect::<Vec<_>>()
        .join(", ")
}

/// Reads and validates a plan file; `base` is resolved relative to its folder.
pub fn load_plan(path: &Path) -> Result<Plan, PlanError> {
    load_plan_with_fins(path, None)
}

/// Reads a plan's `base` device by the path the plan gives: the file's text,
/// or (the file's full name, why it cannot be read).
pub type BaseReader<'a> = dyn Fn(&str) -> Result<String, (String, String)> + 'a;

/// Parses and validates plan text; a `base` path is resolved relative to `base_dir`.
pub fn parse_plan(text: &str, base_dir: &Path) -> Result<Plan, PlanError> {
    let mut plan = parse_plan_with(text, &|p: &str| {
        let path = base_dir.join(p);
        crate::device::read_input_file(&path)
    })?;
    if let Some(Value::String(p)) = text
        .parse::<toml::Table>()
        .ok()
        .and_then(|t| t.get("base").cloned())
    {
        plan.input_paths.push(base_dir.join(p));
    }
    Ok(plan)
}

/// Parses and validates plan text, reading a `base` device path through
/// `read_base` (which returns the file's text, or its full name and why it
/// cannot be read): plans whose devices are files elsewhere than on disk,
/// such as the built-in demo, use the ordinary parser.
pub fn parse_plan_with(text: &str, read_base: &BaseReader<'_>) -> Result<Plan, PlanError> {
    let root: toml::Table = text
        .parse()
        .map_err(|e: toml::de::Error| PlanError::Syntax(e.to_string()))?;
    for k in root.keys() {
        if !PLAN_KEYS.contains(&k.as_str()) {
            return Err(PlanError::UnknownKey {
                key: k.clone(),
                suggestion: closest(k, PLAN_KEYS.iter().copied()),
            });
        }
    }
    let mut inputs = vec![crate::io::InputRecord {
        role: "plan".into(),
        file: "(plan text)".into(),
        sha256: crate::io::sha256_hex(text.as_bytes()),
    }];
    let base_text: String;
    let base = match root.get("base") {
        None => {
            return Err(invalid(
                "base",
                "(missing)",
                "a plan needs `base = \"device.toml\"` or an inline [base] table",
            ))
        }
        Some(Value::String(p)) => {
            let t = read_base(p).map_err(|(path, reason)| PlanError::Base {
                path: path.clone(),
                error: DeviceError::Io { path, reason },
            })?;
            inputs.push(crate::io::InputRecord {
                role: "base".into(),
                file: p.clone(),
                sha256: crate::io::sha256_hex(t.as_bytes()),
            });
            let table = parse_table(&t)
                .and_then(|table| crate::device::check_keys(&table).map(|()| table))
                .map_err(|error| PlanError::Base {
                    path: p.clone(),
                    error,
                })?;
            base_text = t;
            table
        }
        Some(Value::Table(t)) => {
            base_text = toml::to_string(t).unwrap_or_default();
            inputs.push(crate::io::InputRecord {
                role: "base".into(),
                file: "(inline [base] table)".into(),
                sha256: crate::io::sha256_hex(base_text.as_bytes()),
            });
            t.clone()
        }
        Some(other) => {
            return Err(invalid(
                "base",
                other,
                "must be a device file path (string) or a [base] table",
            ))
        }
    };

    let mut axes = Vec::new();
    let mut seen = BTreeSet::new();
    if let Some(v) = root.get("axes") {
        let t = v
            .as_table()
            .ok_or_else(|| invalid("axes", v, "must be a table ([axes])"))?;
        for (k, v) in t {
            let full = format!("axes.{k}");
            let key = axis_key(&base, k, v, &full)?;
            seen.insert(k.clone());
            axes.push(Axis { keys: vec![key] });
        }
    }
    if let Some(v) = root.get("zip") {
        let t = v
            .as_table()
            .ok_or_else(|| invalid("zip", v, "must be a table ([zip])"))?;
        let mut keys: Vec<AxisKey> = Vec::new();
        for (k, v) in t {
            let full = format!("zip.{k}");
            if seen.contains(k) {
                return Err(invalid(
                    &full,
                    v,
                    "this key is already an [axes] key; a key may vary in one place only",
                ));
            }
            let key = axis_key(&base, k, v, &full)?;
            if let Some(first) = keys.first() {
                if first.values.len() != key.values.len() {
                    return Err(invalid(
                        &full,
                        format!("{} values", key.values.len()),
                        format!(
                            "[zip] keys vary together and need equal lengths: `zip.{}` has {}",
                            first.key,
                            first.values.len()
                        ),
                    ));
                }
            }
            keys.push(key);
        }
        if !keys.is_empty() {
            axes.push(Axis { keys });
        }
    }

    let criteria = parse_criteria(&root)?;
    let fins = parse_fins(&root)?;
    let total = axes
        .iter()
        .try_fold(1usize, |acc, a| acc.checked_mul(a.len()))
        .unwrap_or(usize::MAX);
    if total > MAX_POINTS {
        return Err(invalid(
            "axes",
            format!("{total} points"),
            format!("more than {MAX_POINTS} points"),
        ));
    }
    let maps = parse_maps(&root, total)?;

    // Expand the product (last axis fastest) and validate every point's device.
    let cols: Vec<&AxisKey> = axes.iter().flat_map(|a| a.keys.iter()).collect();
    let mut points = Vec::with_capacity(total);
    let mut digits = vec![0usize; axes.len()];
    for index in 0..total {
        let mut rem = index;
        for (a, d) in axes.iter().zip(digits.iter_mut()).rev() {
            *d = rem % a.len();
            rem /= a.len();
        }
        let mut values = Vec::with_capacity(cols.len());
        let mut table = base.clone();
        for (a, &d) in axes.iter().zip(&digits) {
            for k in &a.keys {
                let v = k.values[d].clone();
                set_path(&mut table, &k.key, to_toml(&v))
                    .map_err(|reason| invalid(&k.key, &v, reason))?;
                values.push(v);
            }
        }
        let mut scenario = scenario_from_table(&table).map_err(|error| PlanError::Point {
            index,
            values: describe(&cols, &values),
            error,
        })?;
        scenario.fin_method = fins;
        points.push(PlanPoint {
            index,
            values,
            scenario,
        });
    }
    Ok(Plan {
        text: text.to_string(),
        base,
        base_text,
        inputs,
        input_paths: Vec::new(),
        axes,
        points,
        maps,
        criteria,
    })
}

/// The `[criteria]` of a plan's text (as stored in a sweep file's `plan` attribute).
pub fn criteria_of_text(text: &str) -> Result<Criteria, PlanError> {
    let root: toml::Table = text
        .parse()
        .map_err(|e: toml::de::Error| PlanError::Syntax(e.to_string()))?;
    parse_criteria(&root)
}

/// The plan key `fins` ("3d-solve", the default, or "theory" for very large sweeps).
fn parse_fins(root: &toml::Table) -> Result<FinMethod, PlanError> {
    match root.get("fins") {
        None => Ok(FinMethod::default()),
        Some(Value::String(v)) => FinMethod::from_name(v).ok_or_else(|| {
            invalid(
                "fins",
                v,
                "must be \"3d-solve\" (fins and wires solved in 3D) or \"theory\" (cross-section and theory only)",
            )
        }),
        Some(other) => Err(invalid(
            "fins",
            other,
            "must be a string: \"3d-solve\" or \"theory\"",
        )),
    }
}

/// Plan text with the `fins` key set to `m` (from the `--fins` option): put
/// in when absent, so that the stored plan text names the method; a plan
/// that already names another method is an error naming both.
pub fn with_fins(text: &str, m: FinMethod) -> Result<String, PlanError> {
    let root: toml::Table = text
        .parse()
        .map_err(|e: toml::de::Error| PlanError::Syntax(e.to_string()))?;
    match root.get("fins") {
        None => Ok(format!("fins = \"{}\"  # from --fins\n{text}", m.name())),
        Some(_) if parse_fins(&root)? == m => Ok(text.to_string()),
        Some(v) => Err(invalid(
            "fins",
            v,
            format!(
                "the plan says this but --fins says \"{}\"; drop one",
                m.name()
            ),
        )),
    }
}

/// [`load_plan`] with the `--fins` option applied ([`with_fins`]).
pub fn load_plan_with_fins(path: &Path, fins: Option<FinMethod>) -> Result<Plan, PlanError> {
    let text = crate::device::read_input_file(path)
        .map_err(|(path, reason)| PlanError::Io { path, reason })?;
    let dir = path
        .parent()
        .map(Path::to_path_buf)
        .unwrap_or_else(|| PathBuf::from("."));
    let text = match fins {
        Some(m) => with_fins(&text, m)?,
        None => text,
    };
    let mut plan = parse_plan(&text, &dir)?;
    plan.inputs[0].file = path.display().to_string();
    plan.input_paths.insert(0, path.to_path_buf());
    Ok(plan)
}

fn parse_criteria(root: &toml::Table) -> Result<Criteria, PlanError> {
    let mut c = Criteria::default();
    let Some(v) = root.get("criteria") else {
        return Ok(c);
    };
    let t = v
        .as_table()
        .ok_or_else(|| invalid("criteria", v, "must be a table ([criteria])"))?;
    for (k, v) in t {
        let full = format!("criteria.{k}");
        let x = match v {
            Value::Integer(i) => *i as f64,
            Value::Float(f) => *f,
            other => {
                if !CRITERIA_KEYS.contains(&k.as_str()) {
                    return Err(PlanError::UnknownKey {
                        key: full,
                        suggestion: closest(k, CRITERIA_KEYS.iter().copied())
                            .map(|s| format!("criteria.{s}")),
                    });
                }
                return Err(invalid(&full, other, "must be a number"));
            }
        };
        if !x.is_finite() || x <= 0.0 {
            return Err(invalid(&full, x, "must be a positive number"));
        }
        match k.as_str() {
            "dibl_max_mV_per_V" => c.dibl_max_mv_per_v = Some(x),
            "ss_max_mV_per_dec" => c.ss_max_mv_per_dec = Some(x),
            "vt_rolloff_max_mV" => c.vt_rolloff_max_mv = Some(x),
            _ => {
                return Err(PlanError::UnknownKey {
                    key: full,
                    suggestion: closest(k, CRITERIA_KEYS.iter().copied())
                        .map(|s| format!("criteria.{s}")),
                })
            }
        }
    }
    Ok(c)
}

/// The `[criteria]` of a plan's text alone (e.g. the plan stored in a sweep
/// file, whose base device may no longer be at hand); none given: empty.
pub fn criteria_from_text(text: &str) -> Result<Criteria, PlanError> {
    let root: toml::Table = text
        .parse()
        .map_err(|e: toml::de::Error| PlanError::Syntax(e.to_string()))?;
    parse_criteria(&root)
}

fn parse_maps(root: &toml::Table, total: usize) -> Result<BTreeSet<usize>, PlanError> {
    let mut maps = BTreeSet::new();
    let Some(v) = root.get("output") else {
        return Ok(maps);
    };
    let t = v
        .as_table()
        .ok_or_else(|| invalid("output", v, "must be a table ([output])"))?;
    for k in t.keys() {
        if !OUTPUT_KEYS.contains(&k.as_str()) {
            return Err(PlanError::UnknownKey {
                key: format!("output.{k}"),
                suggestion: closest(k, OUTPUT_KEYS.iter().copied()).map(|s| format!("output.{s}")),
            });
        }
    }
    match t.get("maps") {
        None => {}
        Some(Value::String(s)) if s == "all" => maps.extend(0..total),
        Some(Value::Array(a)) => {
            for x in a {
                match x.as_integer() {
                    Some(i) if i >= 0 && (i as usize) < total => {
                        maps.insert(i as usize);
                    }
                    Some(i) => {
                        return Err(invalid(
                            "output.maps",
                            i,
                            format!(
                                "point index out of range: the plan has {total} points (0 to {})",
                                total.saturating_sub(1)
                            ),
                        ))
                    }
                    None => {
                        return Err(invalid(
                            "output.maps",
                            x,
                            "must be point indices (integers from 0) or \"all\"",
                        ))
                    }
                }
            }
        }
        Some(other) => {
            return Err(invalid(
                "output.maps",
                other,
                "must be an array of point indices or \"all\"",
            ))
        }
    }
    Ok(maps)
}

/// The known-keys form of a dotted path: numeric segments become `N`.
fn generic_path(key: &str) -> String {
    key.split('.')
        .map(|s| {
            if !s.is_empty() && s.bytes().all(|b| b.is_ascii_digit()) {
                "N"
            } else {
                s
            }
        })
        .collect::<Vec<_>>()
        .join(".")
}

fn axis_key(base: &toml::Table, key: &str, v: &Value, full: &str) -> Result<AxisKey, PlanError> {
    let known = known_keys();
    let generic = generic_path(key);
    if !known.contains(&generic) {
        let suggestion = closest(&generic, known.iter().map(String::as_str)).map(|s| {
            // Put the user's array index back into the suggestion.
            match key
                .split('.')
                .find(|s| s.bytes().all(|b| b.is_ascii_digit()))
            {
                Some(n) => s.replace(".N.", &format!(".{n}.")),
                None => s,
            }
        });
        return Err(PlanError::UnknownKey {
            key: full.to_string(),
            suggestion: suggestion
                .map(|s| format!("{}.{s}", full.split('.').next().unwrap_or("axes"))),
        });
    }
    let values = match v {
        Value::Array(a) => {
            if a.is_empty() {
                return Err(invalid(full, "[]", "an axis needs at least one value"));
            }
            a.iter()
                .map(|x| match x {
                    Value::Integer(i) => Ok(AxisValue::Number(*i as f64)),
                    Value::Float(f) if f.is_finite() => Ok(AxisValue::Number(*f)),
                    Value::String(s) => Ok(AxisValue::Text(s.clone())),
                    other => Err(invalid(
                        full,
                        other,
                        "axis values must be finite numbers or strings",
                    )),
                })
                .collect::<Result<Vec<_>, _>>()?
        }
        Value::Table(t) => range(t, full)?,
        other => {
            return Err(invalid(
                full,
                other,
                "must be an array of values or a range { start, stop, step }",
            ))
        }
    };
    let numeric = values.iter().all(|x| matches!(x, AxisValue::Number(_)));
    if !numeric && !values.iter().all(|x| matches!(x, AxisValue::Text(_))) {
        return Err(invalid(
            full,
            v,
            "mixes numbers and strings; an axis holds one kind",
        ));
    }
    // The path must be settable in the base (array indices must exist).
    let mut probe = base.clone();
    set_path(&mut probe, key, to_toml(&values[0])).map_err(|reason| invalid(full, v, reason))?;
    Ok(AxisKey {
        key: key.to_string(),
        values,
        numeric,
    })
}

fn range(t: &toml::Table, full: &str) -> Result<Vec<AxisValue>, PlanError> {
    const KEYS: [&str; 3] = ["start", "stop", "step"];
    for k in t.keys() {
        if !KEYS.contains(&k.as_str()) {
            return Err(PlanError::UnknownKey {
                key: format!("{full}.{k}"),
                suggestion: closest(k, KEYS).map(|s| format!("{full}.{s}")),
            });
        }
    }
    let num = |k: &str| -> Result<f64, PlanError> {
        match t.get(k) {
            Some(Value::Integer(i)) => Ok(*i as f64),
            Some(Value::Float(f)) if f.is_finite() => Ok(*f),
            Some(other) => Err(invalid(
                &format!("{full}.{k}"),
                other,
                "must be a finite number",
            )),
            None => Err(invalid(
                &format!("{full}.{k}"),
                "(missing)",
                "a range needs start, stop and step",
            )),
        }
    };
    let (a, b, s) = (num("start")?, num("stop")?, num("step")?);
    if s == 0.0 {
        return Err(invalid(&format!("{full}.step"), s, "must not be zero"));
    }
    if (b - a) * s < 0.0 {
        return Err(invalid(
            &format!("{full}.step"),
            s,
            format!("goes away from stop = {b} (start = {a})"),
        ));
    }
    let n = ((b - a) / s + 1e-9).floor() + 1.0;
    if n > MAX_POINTS as f64 {
        return Err(invalid(
            &format!("{full}.step"),
            s,
            format!("gives {n} values; at most {MAX_POINTS}"),
        ));
    }
    // Values rounded to 12 significant digits so 0.1 steps print as typed.
    Ok((0..n as usize)
        .map(|k| AxisValue::Number(round12(a + k as f64 * s)))
        .collect())
}

fn round12(x: f64) -> f64 {
    if x == 0.0 {
        return 0.0;
    }
    let e = 11 - x.abs().log10().floor() as i32;
    let m = 10f64.powi(e);
    (x * m).round() / m
}

/// Sets a dotted path in a device table, creating missing sub-tables; array
/// elements are addressed by index and must exist.
fn set_path(table: &mut toml::Table, key: &str, value: Value) -> Result<(), String> {
    let parts: Vec<&str> = key.split('.').collect();
    let (last, inner) = parts.split_last().ok_or("empty key")?;
    let mut cur: &mut Value = table
        .entry(parts[0].to_string())
        .or_insert_with(|| Value::Table(Default::default()));
    if inner.is_empty() {
        *cur = value;
        return Ok(());
    }
    for (depth, p) in parts.iter().enumerate().skip(1) {
        let here = parts[..depth].join(".");
        let is_last = depth == parts.len() - 1;
        cur = match cur {
            Value::Table(t) => {
                if is_last {
                    t.insert(last.to_string(), value);
                    return Ok(());
                }
                t.entry(p.to_string())
                    .or_insert_with(|| Value::Table(Default::default()))
            }
            Value::Array(a) => {
                let i: usize = p.parse().map_err(|_| {
                    format!("`{here}` is an array: address its elements by index (e.g. `{here}.0`)")
                })?;
                let n = a.len();
                let el = a.get_mut(i).ok_or_else(|| {
                    format!("index {i} out of range: the base device's `{here}` has {n} element(s)")
                })?;
                if is_last {
                    *el = value;
                    return Ok(());
                }
                el
            }
            other => {
                return Err(format!(
                    "`{here}` is a {} in the base device, not a table or array",
                    other.type_str()
                ))
            }
        };
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    const BASE: &str = r#"
[base]
name = "t"
architecture = "double-gate"
[base.geometry]
gate_length_nm = 20
body_thickness_nm = 6
[[base.gate_stack]]
material = "SiO2"
thickness_nm = 0.8
[[base.gate_stack]]
material = "HfO2"
thickness_nm = 2.0
[base.gate]
workfunction_eV = 4.55
"#;

    fn plan(rest: &str) -> Result<Plan, PlanError> {
        parse_plan(&format!("{rest}\n{BASE}"), Path::new("."))
    }

    #[test]
    fn range_inclusive_of_stop_and_rounded() {
        let p = plan("[axes]\n\"bias.vgs_step_V\" = { start = 0.01, stop = 0.05, step = 0.01 }")
            .unwrap();
        let v: Vec<String> = p.axes[0].keys[0]
            .values
            .iter()
            .map(|v| v.to_string())
            .collect();
        assert_eq!(v, ["0.01", "0.02", "0.03", "0.04", "0.05"]);
    }

    #[test]
    fn set_path_indexes_arrays() {
        let p = plan("[axes]\n\"gate_stack.1.thickness_nm\" = [1.0, 3.0]").unwrap();
        assert_eq!(p.points.len(), 2);
        assert!(p.points[1].scenario.eot_nm() > p.points[0].scenario.eot_nm());
        let e = plan("[axes]\n\"gate_stack.2.thickness_nm\" = [1.0]")
            .unwrap_err()
            .to_string();
        assert!(
            e.contains("index 2 out of range") && e.contains("2 element"),
            "{e}"
        );
    }
}
