//! The built-in demonstration scenario, as data: an invented node,
//! "ridge-7", built four ways (bulk, thin-body, double-gate, tri-gate) and
//! swept over gate length. Its base device ([`BASE_DEVICE`],
//! `src/demo/ridge-7.toml`) and plan ([`PLAN`], `src/demo/plan.toml`) are
//! ordinary files included in the binary; [`plan`] parses them with the
//! ordinary plan parser, and `gatehold demo` runs the result through the
//! ordinary sweep, plots and summary ([`crate::sweep::run_sweep`],
//! [`crate::plot::sweep_plots`], [`crate::sweep::shortest`],
//! [`crate::render::summary::demo_text`]).
//!
//! The demo data is invented; its targets (DIBL <= 100 mV/V, SS <= 80 mV/dec
//! by default) are common-practice screening targets, not standards.

pub mod pitch;

use crate::evaluate::Criteria;
use crate::sweep::plan::{parse_plan_with, Plan, PlanError};

/// The base device file of the demo plan.
pub const BASE_DEVICE: &str = include_str!("ridge-7.toml");
/// Its file name, as the plan names it.
pub const BASE_DEVICE_NAME: &str = "ridge-7.toml";
/// The demo plan file.
pub const PLAN: &str = include_str!("plan.toml");
/// Name of the sweep file in the output folder.
pub const SWEEP_FILE: &str = "sweep.h5";
/// Name of the summary in the output folder.
pub const SUMMARY_FILE: &str = "summary.txt";

/// What may change from the plan file's own values.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct DemoOptions {
    /// Gate lengths, nm (None: the plan's).
    pub lengths_nm: Option<Vec<f64>>,
    /// Screening target: DIBL at most this, mV/V (None: the plan's).
    pub dibl_max_mv_per_v: Option<f64>,
    /// Screening target: the larger of SS at V_DS,lin and V_DS,sat at most this, mV/dec (None: the plan's).
    pub ss_max_mv_per_dec: Option<f64>,
    /// How the fins are evaluated (None: the plan's, i.e. the 3D solve).
    pub fins: Option<crate::device::FinMethod>,
}

impl DemoOptions {
    /// Checks the options, naming the command-line option at fault.
    pub fn validate(&self) -> Result<(), PlanError> {
        for (key, v) in [
            ("--dibl-max (mV/V)", self.dibl_max_mv_per_v),
            ("--ss-max (mV/dec)", self.ss_max_mv_per_dec),
        ] {
            if let Some(v) = v.filter(|v| !(v.is_finite() && *v > 0.0)) {
                return Err(PlanError::Invalid {
                    key: key.into(),
                    value: v.to_string(),
                    reason: "must be a finite number > 0".into(),
                });
            }
        }
        Ok(())
    }
}

/// The demo plan: the plan file as written, or with the options' gate
/// lengths and criteria put in (the stored plan text then says so).
pub fn plan_text(o: &DemoOptions) -> Result<String, PlanError> {
    o.validate()?;
    if *o == DemoOptions::default() {
        return Ok(PLAN.to_string());
    }
    let mut root: toml::Table = PLAN.parse().expect("the demo plan is valid TOML");
    let bad = |key: &str, value: String, reason: &str| PlanError::Invalid {
        key: key.into(),
        value,
        reason: reason.into(),
    };
    if let Some(l) = &o.lengths_nm {
        if l.is_empty() {
            return Err(bad(
                "--lengths",
                "[]".into(),
                "give at least one gate length",
            ));
        }
        let axes = root["axes"].as_table_mut().expect("[axes] table");
        axes.insert(
            "geometry.gate_length_nm".into(),
            toml::Value::Array(l.iter().map(|&x| toml::Value::Float(x)).collect()),
        );
    }
    let crit = root["criteria"].as_table_mut().expect("[criteria] table");
    for (key, v) in [
        ("dibl_max_mV_per_V", o.dibl_max_mv_per_v),
        ("ss_max_mV_per_dec", o.ss_max_mv_per_dec),
    ] {
        if let Some(v) = v {
            crit.insert(key.into(), toml::Value::Float(v));
        }
    }
    Ok(format!(
        "# gatehold demo plan with options from the command line\n{}",
        toml::to_string(&root).expect("a TOML table serialises")
    ))
}

/// The parsed, validated demo plan.
pub fn plan(o: &DemoOptions) -> Result<Plan, PlanError> {
    let mut text = plan_text(o)?;
    if let Some(m) = o.fins {
        text = crate::sweep::plan::with_fins(&text, m)?;
    }
    parse_plan_with(&text, &|name: &str| {
        if name == BASE_DEVICE_NAME {
            Ok(BASE_DEVICE.to_string())
        } else {
            Err((name.to_string(), "not a file of the built-in demo".into()))
        }
    })
}

/// The demo point whose 3D solution is drawn (cross-section at the barrier,
/// slice along the leakiest line): the shortest fin or wire point solved in
/// 3D (the first of equals), i.e. the shortest tri-gate, where short-channel
/// effects show most. None when the fins are theory points.
pub fn fin_figure_point(p: &Plan) -> Option<usize> {
    p.points
        .iter()
        .filter(|q| {
            q.scenario.architecture.is_fin()
                && q.scenario.fin_method == crate::device::FinMethod::Solve3d
        })
        .min_by(|a, b| {
            let l = |q: &&crate::sweep::plan::PlanPoint| q.scenario.geometry.gate_length_nm;
            l(a).total_cmp(&l(b))
        })
        .map(|q| q.index)
}

/// The criteria the demo judges by (the plan's `[criteria]`).
pub fn criteria(p: &Plan) -> &Criteria {
    &p.criteria
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_plan_file_gives_one_point_per_length_and_architecture() {
        let plan = plan(&DemoOptions::default()).unwrap();
        assert_eq!(plan.text, PLAN);
        assert_eq!(plan.points.len(), 32);
        let names: Vec<&str> = plan.points[..4]
            .iter()
            .map(|p| p.scenario.architecture.name())
            .collect();
        assert_eq!(names, ["bulk", "thin-body", "double-gate", "tri-gate"]);
        assert_eq!(plan.criteria.dibl_max_mv_per_v, Some(100.0));
        assert_eq!(plan.criteria.ss_max_mv_per_dec, Some(80.0));
        let o = DemoOptions {
            lengths_nm: Some(vec![20.0, 40.0]),
            ss_max_mv_per_dec: Some(75.0),
            ..DemoOptions::default()
        };
        let p = super::plan(&o).unwrap();
        assert_eq!(p.points.len(), 8);
        assert_eq!(p.points[5].scenario.geometry.gate_length_nm, 40.0);
        assert_eq!(p.criteria.ss_max_mv_per_dec, Some(75.0));
        assert_eq!(p.criteria.dibl_max_mv_per_v, Some(100.0));
    }

    #[test]
    fn the_fin_figures_show_the_shortest_tri_gate_solved_in_3d() {
        // Common practice (short-channel effects show most at the shortest length).
        let p = plan(&DemoOptions::default()).unwrap();
        let k = fin_figure_point(&p).unwrap();
        assert_eq!(k, 3);
        assert_eq!(p.points[k].scenario.architecture.name(), "tri-gate");
        assert_eq!(p.points[k].scenario.geometry.gate_length_nm, 14.0);
        let o = DemoOptions {
            lengths_nm: Some(vec![45.0, 18.0, 26.0]),
            ..DemoOptions::default()
        };
        let p = plan(&o).unwrap();
        let k = fin_figure_point(&p).unwrap();
        assert_eq!(p.points[k].scenario.geometry.gate_length_nm, 18.0);
        assert_eq!(p.points[k].scenario.architecture.name(), "tri-gate");
        let o = DemoOptions {
            fins: Some(crate::device::FinMethod::Theory),
            ..DemoOptions::default()
        };
        assert_eq!(fin_figure_point(&plan(&o).unwrap()), None);
    }

    #[test]
    fn bad_options_name_the_key_and_value() {
        for (o, key) in [
            (
                DemoOptions {
                    dibl_max_mv_per_v: Some(-1.0),
                    ..DemoOptions::default()
                },
                "--dibl-max",
            ),
            (
                DemoOptions {
                    lengths_nm: Some(vec![10.0, 0.0]),
                    ..DemoOptions::default()
                },
                "gate_length_nm",
            ),
            (
                DemoOptions {
                    lengths_nm: Some(vec![]),
                    ..DemoOptions::default()
                },
                "--lengths",
            ),
        ] {
            let e = plan(&o).unwrap_err().to_string();
            assert!(e.contains(key), "{e}");
        }
    }
}
