//! The built-in demonstration (`gatehold demo`): an invented node, "ridge-7",
//! built four ways (bulk, thin-body, double-gate, tri-gate) and swept over
//! gate length. Everything it needs is in this module: the plan, with its
//! base device inline, is generated here ([`plan_text`]) and run through the
//! ordinary sweep ([`crate::sweep::run_sweep`]), so `sweep.h5` is a normal
//! sweep file.
//!
//! Entry point: [`run_demo`] writes into one folder
//! - `sweep.h5`: the sweep (one point per architecture and gate length);
//! - the figures of [`crate::plot::sweep_plots`] with the theory curves filled
//!   in: for each architecture the Liu et al. (IEEE TED 40(1), 86, 1993)
//!   estimates from the numeric natural length, at each swept length
//!   ([`crate::theory::short_channel::estimate`]);
//! - `summary.txt` ([`summary_text`]): per architecture, the shortest swept gate
//!   length meeting the screening targets ([`shortest_compliant`]).
//!
//! Planar devices are 2D along-channel solves; tri-gate figures are theory
//! (cross-section solve for the long channel, then the Liu et al. model), as
//! in [`crate::run::evaluate`]. The mesh (1 nm cells) and gate sweeps
//! (0.025 V steps, each architecture starting far enough toward off for its
//! shortest device) are coarser than the defaults so the demo runs in well
//! under a minute on two cores. The tri-gate long-channel cross-section solve
//! does not depend on L_g but is repeated for every tri-gate point, because
//! the sweep evaluates each point on its own.
//!
//! The demo data is invented; the targets (DIBL <= 100 mV/V, SS <= 80 mV/dec
//! by default) are common-practice screening targets, not standards.

use std::path::{Path, PathBuf};

use rayon::prelude::*;

use crate::io::hdf5::read_sweep;
use crate::io::{AxisValue, IoError, SweepFile};
use crate::plot::{series_labels, sweep_plots, PlotError, Series, Theory};
use crate::run::CAUTION;
use crate::sweep::{parse_plan, run_sweep, PlanError, SweepError, SweepObserver, SweepOptions};
use crate::theory::short_channel::{theory_inputs, ShortChannelEstimate, TheoryInputs};
use crate::theory::TheoryError;

/// Gate lengths of the full demo, nm.
pub const DEMO_LENGTHS_NM: [f64; 8] = [14.0, 18.0, 22.0, 26.0, 32.0, 38.0, 45.0, 60.0];
/// Default screening target on DIBL, mV/V (common practice, not a standard).
pub const DEFAULT_DIBL_MAX_MV_PER_V: f64 = 100.0;
/// Default screening target on SS, mV/dec (common practice, not a standard).
pub const DEFAULT_SS_MAX_MV_PER_DEC: f64 = 80.0;
/// Name of the sweep file in the output folder.
pub const SWEEP_FILE: &str = "sweep.h5";
/// Name of the summary in the output folder.
pub const SUMMARY_FILE: &str = "summary.txt";

/// The architectures, in plan order, with what differs between them:
/// (architecture, body or fin thickness nm, channel doping cm^-3, gate work
/// function eV, first gate voltage V). Bulk: a doped body under an n+-poly-like
/// gate; the others: undoped bodies under near-midgap metal. The first gate
/// voltage reaches far enough toward off for the SS window at the shortest length.
type Variant = (&'static str, f64, &'static str, f64, f64);

const VARIANTS: [Variant; 4] = [
    ("bulk", 8.0, "3e18", 4.17, -1.4),
    ("thin-body", 6.0, "1e15", 4.50, -0.8),
    ("double-gate", 8.0, "1e15", 4.55, -0.5),
    ("tri-gate", 8.0, "1e15", 4.55, -0.2),
];

/// The base device of the demo plan (invented "ridge-7" node); the
/// architecture-specific keys are set by the plan's `[zip]`. Keys an
/// architecture does not use are accepted with a warning (DEVICE-FORMAT.md).
const BASE_DEVICE: &str = r#"[base]
name = "ridge-7"
architecture = "double-gate"
polarity = "n"
temperature_K = 300

[base.geometry]
gate_length_nm = 20
body_thickness_nm = 8
fin_height_nm = 30
box_thickness_nm = 20
source_drain_length_nm = 15
junction_depth_nm = 10
substrate_depth_nm = 60
gate_height_nm = 20
spacer = "Si3N4"

[[base.gate_stack]]
material = "SiO2"
thickness_nm = 0.6
[[base.gate_stack]]
material = "HfO2"
thickness_nm = 2.0

[base.gate]
workfunction_eV = 4.55
back_workfunction_eV = 5.17
back_bias_V = 0.0

[base.doping]
channel_cm3 = 1e15
source_drain_cm3 = 1e20

[base.bias]
vds_lin_V = 0.05
vds_sat_V = 0.8
vgs_start_V = -0.2
vgs_stop_V = 0.6
vgs_step_V = 0.025
off_vgs_V = 0.0

[base.mesh]
max_step_nm = 1.0
"#;

/// What the demo runs.
#[derive(Debug, Clone, PartialEq)]
pub struct DemoOptions {
    /// Gate lengths, nm (each finite and > 0).
    pub lengths_nm: Vec<f64>,
    /// Screening target: DIBL at most this, mV/V.
    pub dibl_max_mv_per_v: f64,
    /// Screening target: SS (the larger of lin and sat) at most this, mV/dec.
    pub ss_max_mv_per_dec: f64,
    /// Points solved at once; 0 = all cores.
    pub jobs: usize,
}

impl Default for DemoOptions {
    fn default() -> Self {
        DemoOptions {
            lengths_nm: DEMO_LENGTHS_NM.to_vec(),
            dibl_max_mv_per_v: DEFAULT_DIBL_MAX_MV_PER_V,
            ss_max_mv_per_dec: DEFAULT_SS_MAX_MV_PER_DEC,
            jobs: 0,
        }
    }
}

/// Why the demo could not run (a failed point is not an error: it is in the file).
#[derive(Debug, thiserror::Error)]
pub enum DemoError {
    #[error("demo option `{key}` = {value}: {reason}")]
    Invalid {
        key: String,
        value: String,
        reason: String,
    },
    #[error("demo plan: {0}")]
    Plan(#[from] PlanError),
    #[error("demo sweep: {0}")]
    Sweep(#[from] SweepError),
    #[error("demo sweep file: {0}")]
    Io(#[from] IoError),
    #[error("demo theory for {architecture}: {error}")]
    Theory {
        architecture: String,
        error: TheoryError,
    },
    #[error("demo plots: {0}")]
    Plot(#[from] PlotError),
    #[error("{path}: {reason}")]
    Write { path: String, reason: String },
}

fn invalid(key: &str, value: impl std::fmt::Display, reason: &str) -> DemoError {
    DemoError::Invalid {
        key: key.into(),
        value: value.to_string(),
        reason: reason.into(),
    }
}

impl DemoOptions {
    /// Checks the options (the CLI passes user input straight through).
    pub fn validate(&self) -> Result<(), DemoError> {
        if self.lengths_nm.is_empty() {
            return Err(invalid("lengths_nm", "[]", "give at least one gate length"));
        }
        for &l in &self.lengths_nm {
            if !(l.is_finite() && l > 0.0) {
                return Err(invalid(
                    "lengths_nm",
                    l,
                    "each gate length must be finite and > 0 nm",
                ));
            }
        }
        for (key, v) in [
            ("dibl-max (mV/V)", self.dibl_max_mv_per_v),
            ("ss-max (mV/dec)", self.ss_max_mv_per_dec),
        ] {
            if !(v.is_finite() && v > 0.0) {
                return Err(invalid(key, v, "must be a finite number > 0"));
            }
        }
        Ok(())
    }
}

fn toml_list<T: std::fmt::Display>(v: impl Iterator<Item = T>) -> String {
    format!(
        "[{}]",
        v.map(|x| x.to_string()).collect::<Vec<_>>().join(", ")
    )
}

/// The demo's plan file text: the inline base device, gate length as the
/// first axis, the architectures (with the keys that go with each) as the
/// `[zip]` axis, and the screening targets as `[criteria]`. Point `k` is
/// length `k / 4`, architecture `k % 4`.
pub fn plan_text(o: &DemoOptions) -> Result<String, DemoError> {
    o.validate()?;
    let col = |f: &dyn Fn(&Variant) -> String| toml_list(VARIANTS.iter().map(f));
    Ok(format!(
        "# gatehold demo: the invented \"ridge-7\" node built four ways, over gate length.\n\
         {BASE_DEVICE}\n\
         [axes]\n\
         \"geometry.gate_length_nm\" = {}\n\n\
         [zip]\n\
         \"architecture\" = {}\n\
         \"geometry.body_thickness_nm\" = {}\n\
         \"doping.channel_cm3\" = {}\n\
         \"gate.workfunction_eV\" = {}\n\
         \"bias.vgs_start_V\" = {}\n\n\
         [output]\n\
         maps = [2]  # potential map of the shortest double-gate device\n\n\
         [criteria]  # common-practice screening targets, not standards\n\
         dibl_max_mV_per_V = {:?}\n\
         ss_max_mV_per_dec = {:?}\n",
        toml_list(o.lengths_nm.iter().map(|l| format!("{l:?}"))),
        col(&|v| format!("\"{}\"", v.0)),
        col(&|v| format!("{:?}", v.1)),
        col(&|v| v.2.to_string()),
        col(&|v| format!("{:?}", v.3)),
        col(&|v| format!("{:?}", v.4)),
        o.dibl_max_mv_per_v,
        o.ss_max_mv_per_dec,
    ))
}

/// The shortest compliant length of one architecture, with the figures there.
#[derive(Debug, Clone, PartialEq)]
pub struct Compliant {
    pub gate_length_nm: f64,
    pub dibl_mv_per_v: f64,
    /// The larger of SS at V_DS,lin and V_DS,sat, mV/dec.
    pub ss_mv_per_dec: f64,
    pub lambda_numeric_nm: f64,
    pub lg_over_lambda: f64,
}

/// One architecture's outcome.
#[derive(Debug, Clone, PartialEq)]
pub struct ArchitectureResult {
    pub architecture: String,
    /// "2d-solve" or "theory" (how the swept figures were obtained).
    pub method: String,
    /// Numeric natural length of the stack (planar) or cross-section (tri-gate), nm.
    pub lambda_numeric_nm: f64,
    /// None: no swept length meets the targets.
    pub shortest_compliant: Option<Compliant>,
    /// Theory at each swept length where the model holds.
    pub theory: Vec<ShortChannelEstimate>,
    /// Swept points of this architecture whose status is not "ok".
    pub failed_points: usize,
}

/// Everything the demo did.
#[derive(Debug, Clone)]
pub struct DemoReport {
    pub out_dir: PathBuf,
    pub sweep_file: PathBuf,
    pub summary_file: PathBuf,
    pub plots: Vec<PathBuf>,
    pub options: DemoOptions,
    pub architectures: Vec<ArchitectureResult>,
    pub points: usize,
    pub failed_points: usize,
    pub elapsed_s: f64,
}

/// The shortest gate length of `architecture` in `f` (rows with status "ok")
/// with DIBL <= `dibl_max` and max(SS_lin, SS_sat) <= `ss_max`; None when no
/// row meets both. Reads the figures from the file, nothing else.
pub fn shortest_compliant(
    f: &SweepFile,
    architecture: &str,
    dibl_max_mv_per_v: f64,
    ss_max_mv_per_dec: f64,
) -> Option<Compliant> {
    let arch_col = f.axes.iter().position(|a| a.key == "architecture")?;
    let col = |name: &str| {
        f.figure(name)
            .unwrap_or_else(|| vec![f64::NAN; f.rows.len()])
    };
    let (lg, dibl, ss_lin, ss_sat, lam) = (
        col("gate_length_nm"),
        col("dibl_mV_per_V"),
        col("ss_lin_mV_per_dec"),
        col("ss_sat_mV_per_dec"),
        col("lambda_numeric_nm"),
    );
    f.rows
        .iter()
        .enumerate()
        .filter(|(_, r)| {
            r.status == "ok" && matches!(&r.axis[arch_col], AxisValue::Text(a) if a == architecture)
        })
        .filter_map(|(k, _)| {
            let ss = ss_lin[k].max(ss_sat[k]);
            (dibl[k] <= dibl_max_mv_per_v && ss <= ss_max_mv_per_dec).then(|| Compliant {
                gate_length_nm: lg[k],
                dibl_mv_per_v: dibl[k],
                ss_mv_per_dec: ss,
                lambda_numeric_nm: lam[k],
                lg_over_lambda: lg[k] / lam[k],
            })
        })
        .min_by(|a, b| a.gate_length_nm.total_cmp(&b.gate_length_nm))
}

/// Runs the demo into `out_dir` (created if missing; `sweep.h5`, the figures
/// and `summary.txt` in it are overwritten). Progress goes to `observer`.
pub fn run_demo(
    out_dir: &Path,
    o: &DemoOptions,
    observer: &dyn SweepObserver,
) -> Result<DemoReport, DemoError> {
    let t0 = std::time::Instant::now();
    let text = plan_text(o)?;
    let plan = parse_plan(&text, out_dir)?;
    std::fs::create_dir_all(out_dir).map_err(|e| DemoError::Write {
        path: out_dir.display().to_string(),
        reason: e.to_string(),
    })?;
    let sweep_file = out_dir.join(SWEEP_FILE);
    let opts = SweepOptions {
        jobs: o.jobs,
        overwrite: true,
        command_line: "gatehold demo".into(),
        ..SweepOptions::default()
    };
    let summary = run_sweep(&plan, &sweep_file, &opts, observer)?;
    let file = read_sweep(&sweep_file)?;

    // Theory per architecture, from the first point of each (lambda, the
    // barrier and SS_long do not depend on L_g), then at every swept length.
    let pool = rayon::ThreadPoolBuilder::new()
        .num_threads(o.jobs)
        .build()
        .map_err(|e| DemoError::Sweep(SweepError::Pool(e.to_string())))?;
    let inputs: Vec<Result<TheoryInputs, DemoError>> = pool.install(|| {
        VARIANTS
            .par_iter()
            .map(|v| {
                let s = &plan
                    .points
                    .iter()
                    .find(|p| p.scenario.architecture.name() == v.0)
                    .expect("every architecture is in the plan")
                    .scenario;
                theory_inputs(s).map_err(|error| DemoError::Theory {
                    architecture: v.0.into(),
                    error,
                })
            })
            .collect()
    });
    let labels = series_labels(&file);
    let arch_col = file.axes.iter().position(|a| a.key == "architecture");
    let label_of = |arch: &str| {
        file.rows
            .iter()
            .zip(&labels)
            .find(|(r, _)| {
                arch_col.is_some_and(|c| matches!(&r.axis[c], AxisValue::Text(a) if a == arch))
            })
            .map(|(_, l)| l.clone())
            .unwrap_or_else(|| arch.to_string())
    };
    let mut theory = Theory::default();
    let mut architectures = Vec::new();
    let mut lengths = o.lengths_nm.clone();
    lengths.sort_by(f64::total_cmp);
    for (v, inp) in VARIANTS.iter().zip(inputs) {
        let inp = inp?;
        let lambda = inp.lambda_nm;
        let s = &plan
            .points
            .iter()
            .find(|p| p.scenario.architecture.name() == v.0)
            .expect("every architecture is in the plan")
            .scenario;
        let est: Vec<ShortChannelEstimate> =
            lengths.iter().filter_map(|&l| inp.at(l).ok()).collect();
        let label = label_of(v.0);
        let series = |f: &dyn Fn(&ShortChannelEstimate) -> f64| Series {
            label: label.clone(),
            points: est.iter().map(|e| (e.gate_length_nm, f(e))).collect(),
        };
        theory
            .vt_rolloff_mv
            .push(series(&|e| 1000.0 * e.roll_off_lin_v));
        theory.dibl_mv_per_v.push(series(&|e| e.dibl_mv_per_v));
        theory.ss_mv_per_dec.push(series(&|e| e.ss_mv_per_dec));
        let failed_points = match arch_col {
            Some(c) => file
                .rows
                .iter()
                .filter(|r| {
                    matches!(&r.axis[c], AxisValue::Text(a) if a == v.0) && r.status != "ok"
                })
                .count(),
            None => 0,
        };
        architectures.push(ArchitectureResult {
            architecture: v.0.into(),
            method: if s.architecture.is_planar() {
                "2d-solve".into()
            } else {
                "theory".into()
            },
            lambda_numeric_nm: lambda,
            shortest_compliant: shortest_compliant(
                &file,
                v.0,
                o.dibl_max_mv_per_v,
                o.ss_max_mv_per_dec,
            ),
            theory: est,
            failed_points,
        });
    }
    let plots = sweep_plots(&file, out_dir, &theory)?;
    let summary_file = out_dir.join(SUMMARY_FILE);
    let mut report = DemoReport {
        out_dir: out_dir.to_path_buf(),
        sweep_file,
        summary_file: summary_file.clone(),
        plots,
        options: o.clone(),
        architectures,
        points: file.rows.len(),
        failed_points: summary.failed,
        elapsed_s: 0.0,
    };
    report.elapsed_s = t0.elapsed().as_secs_f64();
    std::fs::write(&summary_file, summary_text(&report)).map_err(|e| DemoError::Write {
        path: summary_file.display().to_string(),
        reason: e.to_string(),
    })?;
    Ok(report)
}

/// The demo's summary (printed by the CLI and written to `summary.txt`).
pub fn summary_text(r: &DemoReport) -> String {
    let o = &r.options;
    let (lo, hi) = o
        .lengths_nm
        .iter()
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), &l| {
            (a.min(l), b.max(l))
        });
    let mut t = format!(
        "gatehold demo: the invented \"ridge-7\" node built four ways, {} gate lengths from {lo} to {hi} nm\n\
         ({} points, {} failed; {:.1} s).\n\
         Shortest swept gate length with DIBL <= {} mV/V and SS <= {} mV/dec (the larger of SS at\n\
         V_DS,lin and V_DS,sat). These are common-practice screening targets, not standards.\n\n",
        o.lengths_nm.len(),
        r.points,
        r.failed_points,
        r.elapsed_s,
        o.dibl_max_mv_per_v,
        o.ss_max_mv_per_dec,
    );
    t.push_str(
        "  architecture  method    lambda nm  shortest L_g nm  L_g/lambda  DIBL mV/V  SS mV/dec\n",
    );
    for a in &r.architectures {
        match &a.shortest_compliant {
            Some(c) => t.push_str(&format!(
                "  {:<12}  {:<8}  {:>9.2}  {:>15.1}  {:>10.2}  {:>9.1}  {:>9.1}\n",
                a.architecture,
                a.method,
                c.lambda_numeric_nm,
                c.gate_length_nm,
                c.lg_over_lambda,
                c.dibl_mv_per_v,
                c.ss_mv_per_dec
            )),
            None => t.push_str(&format!(
                "  {:<12}  {:<8}  {:>9.2}  none in the range ({lo} to {hi} nm)\n",
                a.architecture, a.method, a.lambda_numeric_nm
            )),
        }
        if a.failed_points > 0 {
            t.push_str(&format!(
                "      ({} point(s) of {} failed; see `status` in {})\n",
                a.failed_points, a.architecture, SWEEP_FILE
            ));
        }
    }
    t.push_str(
        "\nmethod: 2d-solve = along-channel 2D nonlinear Poisson solve at each length; theory = the\n\
         long-channel cross-section solve with the Liu et al. (IEEE TED 40(1), 86, 1993) model from the\n\
         numeric natural length (dashed curves in the figures, for every architecture).\n",
    );
    t.push_str(&format!(
        "\nwritten: {} ({} figure files), {}\n\nCaution: {CAUTION}\n",
        r.sweep_file.display(),
        r.plots.len(),
        r.summary_file.display()
    ));
    t
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn plan_text_parses_into_one_point_per_length_and_architecture() {
        let o = DemoOptions {
            lengths_nm: vec![20.0, 40.0],
            ..DemoOptions::default()
        };
        let plan = parse_plan(&plan_text(&o).unwrap(), Path::new(".")).unwrap();
        assert_eq!(plan.points.len(), 8);
        let names: Vec<&str> = plan
            .points
            .iter()
            .map(|p| p.scenario.architecture.name())
            .collect();
        assert_eq!(
            names,
            ["bulk", "thin-body", "double-gate", "tri-gate"].repeat(2)
        );
        assert_eq!(plan.points[5].scenario.geometry.gate_length_nm, 40.0);
        assert_eq!(plan.criteria.dibl_max_mv_per_v, Some(100.0));
        assert_eq!(plan.criteria.ss_max_mv_per_dec, Some(80.0));
    }

    #[test]
    fn bad_options_name_the_key_and_value() {
        for (o, key) in [
            (
                DemoOptions {
                    dibl_max_mv_per_v: -1.0,
                    ..DemoOptions::default()
                },
                "dibl-max",
            ),
            (
                DemoOptions {
                    ss_max_mv_per_dec: f64::NAN,
                    ..DemoOptions::default()
                },
                "ss-max",
            ),
            (
                DemoOptions {
                    lengths_nm: vec![10.0, 0.0],
                    ..DemoOptions::default()
                },
                "lengths_nm",
            ),
        ] {
            let e = plan_text(&o).unwrap_err().to_string();
            assert!(e.contains(key), "{e}");
        }
    }
}
