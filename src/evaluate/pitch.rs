//! A contacted-gate-pitch study: every split of one pitch
//! `P = L_g + 2 t_spacer + W_contact` into gate, spacers and contact that
//! leaves a positive gate length, solved in parallel, judged against the
//! criteria, and the fastest compliant split (smallest delay estimate).
//!
//! Each split is the base device file with its geometry keys replaced
//! (`geometry.gate_length_nm`, `geometry.gate_pitch_nm`,
//! `geometry.spacer_thickness_nm`, `geometry.spacer`), so it is validated
//! like any device file. The long-channel reference depends on the column
//! under the gate only, which splits do not change; it is solved once.

use rayon::prelude::*;
use serde::Serialize;

use super::capacitance::CapacitanceFigures;
use super::criteria::{Criteria, CriteriaVerdict};
use super::device::evaluate;
use super::reference::Reference;
use super::report::DeviceReport;
use crate::device::{scenario_from_table, DeviceError, Scenario};
use crate::progress::Observer;

/// What to split: one pitch and the lists to combine.
#[derive(Debug, Clone, PartialEq)]
pub struct PitchSpec {
    pub pitch_nm: f64,
    pub spacer_thickness_nm: Vec<f64>,
    /// Spacer material names (as `geometry.spacer`).
    pub spacers: Vec<String>,
    pub contact_width_nm: Vec<f64>,
}

/// One split of the pitch.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Split {
    pub gate_length_nm: f64,
    pub spacer_thickness_nm: f64,
    pub spacer: String,
    pub contact_width_nm: f64,
}

/// One solved (or failed) split: the `pitch --json` row contract.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct PitchRow {
    pub gate_length_nm: f64,
    pub spacer_thickness_nm: f64,
    pub spacer: String,
    pub contact_width_nm: f64,
    #[serde(rename = "vt_sat_V")]
    pub vt_sat_v: Option<f64>,
    #[serde(rename = "dibl_mV_per_V")]
    pub dibl_mv_per_v: Option<f64>,
    #[serde(rename = "ss_lin_mV_per_dec")]
    pub ss_lin_mv_per_dec: Option<f64>,
    #[serde(rename = "ss_sat_mV_per_dec")]
    pub ss_sat_mv_per_dec: Option<f64>,
    pub capacitance: Option<CapacitanceFigures>,
    #[serde(rename = "ion_A_per_um")]
    pub ion_a_per_um: Option<f64>,
    pub tau_ps: Option<f64>,
    /// true: meets every criterion; false: fails one; null: a figure is missing.
    pub meets_criteria: Option<bool>,
    /// "ok" or why figures are missing.
    pub status: String,
    /// Seconds this split took (its 2D solves), for the time-per-split figure.
    pub solve_s: f64,
}

/// The whole study.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct PitchStudy {
    pub pitch_nm: f64,
    pub rows: Vec<PitchRow>,
    /// Index into `rows` of the compliant split with the smallest tau_ps.
    #[serde(skip)]
    pub best_index: Option<usize>,
    /// Splits left out (gate length not positive, or the device file refused them), with why.
    pub skipped: Vec<(Split, String)>,
    pub dibl_max_mv_per_v: Option<f64>,
    pub ss_max_mv_per_dec: Option<f64>,
}

impl PitchStudy {
    pub fn best(&self) -> Option<&PitchRow> {
        self.best_index.map(|i| &self.rows[i])
    }
}

/// Why a study could not start.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum PitchError {
    #[error("{option} = {value}: {reason}")]
    Invalid {
        option: String,
        value: String,
        reason: String,
    },
    #[error(transparent)]
    Device(#[from] DeviceError),
    #[error("no split of the {pitch_nm} nm pitch leaves a valid device: {why}")]
    NoSplit { pitch_nm: f64, why: String },
    #[error("long-channel reference: {0}")]
    Reference(String),
}

/// Every combination of the spec's lists (thickness, then material, then
/// contact width); those whose gate length is not positive go to the second list.
pub fn splits(spec: &PitchSpec) -> (Vec<Split>, Vec<(Split, String)>) {
    let mut ok = Vec::new();
    let mut skipped = Vec::new();
    for &t in &spec.spacer_thickness_nm {
        for m in &spec.spacers {
            for &w in &spec.contact_width_nm {
                let split = Split {
                    gate_length_nm: spec.pitch_nm - 2.0 * t - w,
                    spacer_thickness_nm: t,
                    spacer: m.clone(),
                    contact_width_nm: w,
                };
                if split.gate_length_nm > 0.0 {
                    ok.push(split);
                } else {
                    let why = format!(
                        "gate length {:.3} nm: 2 x {t} nm spacer + {w} nm contact fill the {} nm pitch",
                        split.gate_length_nm, spec.pitch_nm
                    );
                    skipped.push((split, why));
                }
            }
        }
    }
    (ok, skipped)
}

/// The device file `base` with the split's geometry put in.
pub fn split_table(base: &toml::Table, pitch_nm: f64, split: &Split) -> toml::Table {
    let mut root = base.clone();
    let geometry = root
        .entry("geometry")
        .or_insert_with(|| toml::Value::Table(toml::Table::new()));
    if let Some(g) = geometry.as_table_mut() {
        for k in [
            "source_drain_length_nm",
            "spacer_permittivity",
            "contact_width_nm",
        ] {
            g.remove(k);
        }
        g.insert(
            "gate_length_nm".into(),
            toml::Value::Float(split.gate_length_nm),
        );
        g.insert("gate_pitch_nm".into(), toml::Value::Float(pitch_nm));
        g.insert(
            "spacer_thickness_nm".into(),
            toml::Value::Float(split.spacer_thickness_nm),
        );
        g.insert("spacer".into(), toml::Value::String(split.spacer.clone()));
    }
    root
}

/// Checks the spec, naming the command-line option at fault.
fn check(spec: &PitchSpec, base: &Scenario) -> Result<(), PitchError> {
    let bad = |option: &str, value: String, reason: &str| PitchError::Invalid {
        option: option.into(),
        value,
        reason: reason.into(),
    };
    if !base.architecture.is_planar() {
        return Err(bad(
            "architecture",
            base.architecture.to_string(),
            "the pitch study needs a planar device (bulk, thin-body, double-gate); fins are not solved along the channel yet",
        ));
    }
    if !(spec.pitch_nm.is_finite() && spec.pitch_nm > 0.0) {
        return Err(bad(
            "--pitch",
            spec.pitch_nm.to_string(),
            "must be a positive length in nm",
        ));
    }
    for (option, list) in [
        ("--spacer-nm", &spec.spacer_thickness_nm),
        ("--contact-nm", &spec.contact_width_nm),
    ] {
        if list.is_empty() {
            return Err(bad(option, "[]".into(), "give at least one value"));
        }
        if let Some(v) = list.iter().find(|v| !(v.is_finite() && **v > 0.0)) {
            return Err(bad(
                option,
                v.to_string(),
                "every value must be a positive length in nm",
            ));
        }
    }
    if spec.spacers.is_empty() {
        return Err(bad(
            "--spacer-material",
            "[]".into(),
            "give at least one material",
        ));
    }
    Ok(())
}

/// The reference serves every split: they differ only in gate length,
/// spacer and contacts, none of which enters the column under the gate.
fn same_column(a: &Scenario, b: &Scenario) -> bool {
    let blank = |s: &Scenario| {
        let mut c = s.clone();
        c.name.clear();
        c.warnings.clear();
        c.geometry.gate_length_nm = 0.0;
        c.geometry.source_drain_length_nm = 0.0;
        c.geometry.contacts = None;
        c.geometry.spacer_eps = 0.0;
        c.geometry.spacer_material.clear();
        c
    };
    blank(a) == blank(b)
}

/// Runs the study: every split with a positive gate length, in parallel on
/// the current rayon pool; the best compliant split by tau_ps.
pub fn run_pitch(
    base: &toml::Table,
    spec: &PitchSpec,
    criteria: &Criteria,
    observer: &dyn Observer,
) -> Result<PitchStudy, PitchError> {
    let base_scenario = scenario_from_table(base)?;
    check(spec, &base_scenario)?;
    let (todo, mut skipped) = splits(spec);
    let mut scenarios = Vec::new();
    for split in todo {
        match scenario_from_table(&split_table(base, spec.pitch_nm, &split)) {
            Ok(s) => scenarios.push((split, s)),
            Err(e) => skipped.push((split, e.to_string())),
        }
    }
    let Some((_, first)) = scenarios.first() else {
        return Err(PitchError::NoSplit {
            pitch_nm: spec.pitch_nm,
            why: skipped
                .first()
                .map_or("no splits given".to_string(), |(_, w)| w.clone()),
        });
    };
    let reference =
        Reference::of(first, observer).map_err(|e| PitchError::Reference(e.to_string()))?;
    let rows: Vec<PitchRow> = scenarios
        .par_iter()
        .map(|(split, s)| {
            debug_assert!(same_column(s, first));
            let t0 = std::time::Instant::now();
            let result = evaluate(s, &reference, observer);
            let solve_s = t0.elapsed().as_secs_f64();
            match result {
                Ok(e) => row(split, &e.report, criteria, solve_s),
                Err(err) => failed_row(split, err.to_string(), solve_s),
            }
        })
        .collect();
    let best_index = rows
        .iter()
        .enumerate()
        .filter(|(_, r)| r.meets_criteria == Some(true) && r.tau_ps.is_some())
        .min_by(|a, b| a.1.tau_ps.unwrap().total_cmp(&b.1.tau_ps.unwrap()))
        .map(|(i, _)| i);
    Ok(PitchStudy {
        pitch_nm: spec.pitch_nm,
        rows,
        best_index,
        skipped,
        dibl_max_mv_per_v: criteria.dibl_max_mv_per_v,
        ss_max_mv_per_dec: criteria.ss_max_mv_per_dec,
    })
}

fn row(split: &Split, r: &DeviceReport, criteria: &Criteria, solve_s: f64) -> PitchRow {
    let verdict = criteria.judge(
        r.dibl_mv_per_v,
        r.ss_lin_mv_per_dec,
        r.ss_sat_mv_per_dec,
        r.vt_rolloff_mv,
    );
    PitchRow {
        gate_length_nm: split.gate_length_nm,
        spacer_thickness_nm: split.spacer_thickness_nm,
        spacer: split.spacer.clone(),
        contact_width_nm: split.contact_width_nm,
        vt_sat_v: r.vt_sat_v,
        dibl_mv_per_v: r.dibl_mv_per_v,
        ss_lin_mv_per_dec: r.ss_lin_mv_per_dec,
        ss_sat_mv_per_dec: r.ss_sat_mv_per_dec,
        capacitance: r.capacitance.clone(),
        ion_a_per_um: r.ion_a_per_um,
        tau_ps: r.tau_ps,
        meets_criteria: match verdict {
            CriteriaVerdict::Meets => Some(true),
            CriteriaVerdict::Fails => Some(false),
            CriteriaVerdict::Unknown => None,
        },
        status: r.status().to_string(),
        solve_s,
    }
}

fn failed_row(split: &Split, why: String, solve_s: f64) -> PitchRow {
    PitchRow {
        gate_length_nm: split.gate_length_nm,
        spacer_thickness_nm: split.spacer_thickness_nm,
        spacer: split.spacer.clone(),
        contact_width_nm: split.contact_width_nm,
        vt_sat_v: None,
        dibl_mv_per_v: None,
        ss_lin_mv_per_dec: None,
        ss_sat_mv_per_dec: None,
        capacitance: None,
        ion_a_per_um: None,
        tau_ps: None,
        meets_criteria: None,
        status: why,
        solve_s,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn splits_keep_positive_gate_lengths_only() {
        // pitch = L_g + 2 t + W (the contacted-gate-pitch budget).
        let spec = PitchSpec {
            pitch_nm: 40.0,
            spacer_thickness_nm: vec![5.0, 12.0],
            spacers: vec!["SiO2".into()],
            contact_width_nm: vec![10.0, 16.0],
        };
        let (ok, skipped) = splits(&spec);
        let lg: Vec<f64> = ok.iter().map(|s| s.gate_length_nm).collect();
        assert_eq!(lg, vec![20.0, 14.0, 6.0]);
        assert_eq!(skipped.len(), 1);
        // 40 - 2 x 12 - 16 = 0: not positive, skipped with the reason.
        assert_eq!(skipped[0].0.gate_length_nm, 0.0);
        assert!(skipped[0].1.contains("fill the 40 nm pitch"));
    }
}
