//! The `shortest` group of a sweep file: one element per series (every
//! combination of the axes other than the gate length), the shortest
//! compliant gate length and what sets it. One 1D dataset per field, each
//! with `units` and `description` attributes (docs/hdf5-schema.md).

use std::path::Path;

use hdf5_pure::{AttrValue, File, FileBuilder};

use super::{ascii_fit, IoError};

/// One series' answer, as stored.
#[derive(Debug, Clone, PartialEq)]
pub struct ShortestRow {
    pub series: String,
    /// Shortest compliant gate length, nm (None: none compliant).
    pub gate_length_nm: Option<f64>,
    /// "interpolated", "at-shortest-solved", "swept", "none-compliant" or "unknown".
    pub kind: String,
    /// "dibl", "ss", "vt_rolloff" or "none".
    pub limiting_criterion: String,
    pub lambda_numeric_nm: Option<f64>,
    pub lg_over_lambda: Option<f64>,
    pub bracket_short_nm: Option<f64>,
    pub bracket_long_nm: Option<f64>,
    pub swept_shortest_nm: Option<f64>,
    pub dibl_mv_per_v: Option<f64>,
    pub ss_mv_per_dec: Option<f64>,
    pub vt_rolloff_abs_mv: Option<f64>,
    pub failed_points: usize,
    pub notes: String,
}

/// Every series' answer and the criteria they were judged by.
#[derive(Debug, Clone, PartialEq)]
pub struct ShortestTable {
    pub dibl_max_mv_per_v: Option<f64>,
    pub ss_max_mv_per_dec: Option<f64>,
    pub vt_rolloff_max_mv: Option<f64>,
    /// How each figure is interpolated between solved lengths.
    pub interpolation: String,
    pub rows: Vec<ShortestRow>,
}

type Num = fn(&ShortestRow) -> Option<f64>;
type Text = fn(&ShortestRow) -> &str;

/// Numeric datasets: name, units, description, reader.
const NUMBERS: &[(&str, &str, &str, Num)] = &[
    ("gate_length_nm", "nm", "shortest compliant gate length (interpolated when kind = interpolated); NaN: none compliant", |r| r.gate_length_nm),
    ("lambda_numeric_nm", "nm", "numeric natural length of the series", |r| r.lambda_numeric_nm),
    ("lg_over_lambda", "1", "gate_length_nm / lambda_numeric_nm", |r| r.lg_over_lambda),
    ("bracket_short_nm", "nm", "solved length just shorter than the answer (fails the criteria); NaN unless interpolated", |r| r.bracket_short_nm),
    ("bracket_long_nm", "nm", "shortest solved length that meets the criteria; NaN unless interpolated", |r| r.bracket_long_nm),
    ("swept_shortest_nm", "nm", "shortest solved (swept) length that meets every criterion; NaN: none", |r| r.swept_shortest_nm),
    ("dibl_mV_per_V", "mV/V", "DIBL at the answer, interpolated log-linearly", |r| r.dibl_mv_per_v),
    ("ss_mV_per_dec", "mV/dec", "larger of SS at V_DS,lin and V_DS,sat at the answer, interpolated linearly", |r| r.ss_mv_per_dec),
    ("vt_rolloff_abs_mV", "mV", "|V_t roll-off| at the answer, interpolated log-linearly", |r| r.vt_rolloff_abs_mv),
];

/// Text datasets: name, description, reader.
const TEXTS: &[(&str, &str, Text)] = &[
    ("series", "series label: the values of every axis other than the gate length", |r| &r.series),
    ("kind", "interpolated | at-shortest-solved (shorter lengths not solved) | swept (next shorter length lacks a figure) | none-compliant | unknown", |r| &r.kind),
    ("limiting_criterion", "dibl | ss | vt_rolloff | none: the criterion that sets the answer (none compliant: the one most exceeded at the longest length)", |r| &r.limiting_criterion),
    ("notes", "cautions, e.g. a longer length that fails again", |r| &r.notes),
];

fn vs(s: &str) -> AttrValue {
    AttrValue::VarLenString(s.to_string())
}

/// Adds the `shortest` group to a file being built (nothing when `t` has no rows).
pub fn add_group(fb: &mut FileBuilder, t: &ShortestTable) -> Result<(), String> {
    let n = t.rows.len();
    if n == 0 {
        return Ok(());
    }
    let mut g = fb.create_group("shortest");
    g.set_attr(
        "description",
        vs("per series, the shortest gate length meeting every given criterion, interpolated between solved lengths"),
    );
    g.set_attr("interpolation", vs(&t.interpolation));
    for (name, v) in [
        ("dibl_max_mV_per_V", t.dibl_max_mv_per_v),
        ("ss_max_mV_per_dec", t.ss_max_mv_per_dec),
        ("vt_rolloff_max_mV", t.vt_rolloff_max_mv),
    ] {
        g.set_attr(name, AttrValue::F64(v.unwrap_or(f64::NAN)));
    }
    for (name, units, description, read) in NUMBERS {
        let v: Vec<f64> = t.rows.iter().map(|r| read(r).unwrap_or(f64::NAN)).collect();
        let ds = g.create_dataset(name);
        super::checksum::checksummed(ds, &[n as u64])
            .with_f64_data(&v)
            .with_shape(&[n as u64]);
        ds.set_attr("units", vs(units));
        ds.set_attr("description", vs(description));
    }
    let failed: Vec<i64> = t.rows.iter().map(|r| r.failed_points as i64).collect();
    let ds = g.create_dataset("failed_points");
    super::checksum::checksummed(ds, &[n as u64])
        .with_i64_data(&failed)
        .with_shape(&[n as u64]);
    ds.set_attr("units", vs("1"));
    ds.set_attr(
        "description",
        vs("points of the series whose status is not ok"),
    );
    for (name, description, read) in TEXTS {
        let owned: Vec<String> = t.rows.iter().map(|r| ascii_fit(read(r), 1024)).collect();
        let v: Vec<&str> = owned.iter().map(String::as_str).collect();
        let w = v
            .iter()
            .map(|s| s.len())
            .max()
            .unwrap_or(0)
            .max(16)
            .next_power_of_two();
        let ds = g.create_dataset(name);
        ds.with_ascii_strings_sized(&v, w as u32)
            .map_err(|e| format!("shortest/{name}: {e}"))?;
        super::checksum::checksummed(ds, &[n as u64]).with_shape(&[n as u64]);
        ds.set_attr("units", vs("1"));
        ds.set_attr("description", vs(description));
    }
    fb.add_group(g.finish());
    Ok(())
}

/// Reads the `shortest` group back (None when the file has none).
pub fn read_shortest(path: &Path) -> Result<Option<ShortestTable>, IoError> {
    let err = |object: &str, e: hdf5_pure::Error| super::checksum::read_error(path, object, e);
    let file = File::open(path).map_err(|e| IoError::File {
        path: path.display().to_string(),
        reason: e.to_string(),
    })?;
    let group = match file.group("shortest") {
        Ok(g) => g,
        // No such group; a damaged header is an error, not "none".
        Err(e) => {
            return match err("shortest", e) {
                d @ IoError::Damaged { .. } => Err(d),
                _ => Ok(None),
            }
        }
    };
    let attrs = group.attrs().map_err(|e| err("shortest", e))?;
    let num = |name: &str| match attrs.get(name) {
        Some(AttrValue::F64(x)) if x.is_finite() => Some(*x),
        _ => None,
    };
    let f64s = |name: &str| {
        let o = format!("shortest/{name}");
        file.dataset(&o)
            .and_then(|d| d.read_f64())
            .map_err(|e| err(&o, e))
    };
    let strs = |name: &str| -> Result<Vec<String>, IoError> {
        let o = format!("shortest/{name}");
        Ok(file
            .dataset(&o)
            .and_then(|d| d.read_string())
            .map_err(|e| err(&o, e))?
            .into_iter()
            .map(|s| s.trim_end_matches(['\0', ' ']).to_string())
            .collect())
    };
    let fin = |x: f64| x.is_finite().then_some(x);
    let col = |name: &str| -> Result<Vec<Option<f64>>, IoError> {
        Ok(f64s(name)?.into_iter().map(fin).collect())
    };
    let series = strs("series")?;
    let (kind, limiting, notes) = (strs("kind")?, strs("limiting_criterion")?, strs("notes")?);
    let o = "shortest/failed_points";
    let failed = file
        .dataset(o)
        .and_then(|d| d.read_i64())
        .map_err(|e| err(o, e))?;
    let c: Vec<Vec<Option<f64>>> = NUMBERS
        .iter()
        .map(|(name, ..)| col(name))
        .collect::<Result<_, _>>()?;
    let n = series.len();
    let lengths = [("kind", kind.len()), ("limiting_criterion", limiting.len())]
        .into_iter()
        .chain([("notes", notes.len()), ("failed_points", failed.len())])
        .chain(
            NUMBERS
                .iter()
                .zip(&c)
                .map(|((name, ..), v)| (*name, v.len())),
        );
    for (name, len) in lengths {
        if len != n {
            return Err(IoError::NotSweep {
                path: path.display().to_string(),
                reason: format!("shortest/{name} holds {len} elements, shortest/series {n}"),
            });
        }
    }
    let rows = (0..n)
        .map(|k| ShortestRow {
            series: series[k].clone(),
            gate_length_nm: c[0][k],
            kind: kind[k].clone(),
            limiting_criterion: limiting[k].clone(),
            lambda_numeric_nm: c[1][k],
            lg_over_lambda: c[2][k],
            bracket_short_nm: c[3][k],
            bracket_long_nm: c[4][k],
            swept_shortest_nm: c[5][k],
            dibl_mv_per_v: c[6][k],
            ss_mv_per_dec: c[7][k],
            vt_rolloff_abs_mv: c[8][k],
            failed_points: failed[k].max(0) as usize,
            notes: notes[k].clone(),
        })
        .collect();
    let interpolation = match attrs.get("interpolation") {
        Some(AttrValue::VarLenString(s) | AttrValue::String(s) | AttrValue::AsciiString(s)) => {
            s.clone()
        }
        _ => String::new(),
    };
    Ok(Some(ShortestTable {
        dibl_max_mv_per_v: num("dibl_max_mV_per_V"),
        ss_max_mv_per_dec: num("ss_max_mV_per_dec"),
        vt_rolloff_max_mv: num("vt_rolloff_max_mV"),
        interpolation,
        rows,
    }))
}
