//! Sweep costs: the per-point checkpoint (whole-file rewrite) against the
//! number of finished points, a small real sweep at 1 and 2 threads, and
//! the 200-point double-gate sweep of `benches/dg-200.toml` with 2 jobs
//! (target at most 20 s, goal 10 s on a 2-core machine).
//! Run: cargo bench --bench sweep
//! The 200-point sweep (10 samples, several minutes) runs only when asked:
//! GATEHOLD_BENCH_LONG=1 cargo bench --bench sweep -- sweep_200

use criterion::{criterion_group, criterion_main, Criterion};
use gatehold::evaluate::{CriteriaVerdict, DeviceReport, Method, Status};
use gatehold::io::hdf5::{to_bytes, write_sweep};
use gatehold::io::{AxisColumn, AxisValue, CurveData, PointRow, SweepFile, SweepMeta};
use gatehold::sweep::{parse_plan, run_sweep, Quiet, SweepOptions};

fn synthetic(points: usize) -> SweepFile {
    let v: Vec<f64> = (0..51).map(|k| -0.2 + 0.02 * k as f64).collect();
    let rows = (0..points)
        .map(|i| PointRow {
            index: i,
            axis: vec![
                AxisValue::Number(10.0 + i as f64),
                AxisValue::Text("double-gate".into()),
            ],
            figures: DeviceReport::scalar_names()
                .enumerate()
                .map(|(k, _)| Some(k as f64 * 0.1 + i as f64))
                .collect(),
            status: Status::Ok,
            method: Some(Method::TwoDSolve),
            warnings: Vec::new(),
            meets_criteria: CriteriaVerdict::Meets,
            newton_steps: 400,
            vds_v: (0.05, 0.8),
            elapsed_s: 1.0,
            curve: CurveData {
                vgs_v: v.clone(),
                id_lin: v.iter().map(|x| 1e-9 * (x * 20.0).exp()).collect(),
                id_sat: v.iter().map(|x| 2e-9 * (x * 20.0).exp()).collect(),
            },
            map: None,
        })
        .collect();
    SweepFile {
        meta: SweepMeta {
            tool_version: "bench".into(),
            plan: "base = \"x.toml\"".into(),
            created: String::new(),
            command_line: String::new(),
            model_summary: String::new(),
            started: String::new(),
            finished: String::new(),
            shard_index: 0,
            shard_count: 1,
            points_total: points,
            base_device: String::new(),
            inputs: Vec::new(),
        },
        axes: vec![
            AxisColumn {
                key: "geometry.gate_length_nm".into(),
                numeric: true,
            },
            AxisColumn {
                key: "architecture".into(),
                numeric: false,
            },
        ],
        figures: DeviceReport::scalar_names().map(str::to_string).collect(),
        rows,
    }
}

const PLAN: &str = r#"
[axes]
"geometry.gate_length_nm" = [12, 18]
[base]
name = "bench-dg"
architecture = "double-gate"
[base.geometry]
gate_length_nm = 15
body_thickness_nm = 5
source_drain_length_nm = 8
gate_height_nm = 5
[[base.gate_stack]]
material = "SiO2"
thickness_nm = 1.0
[base.gate]
workfunction_eV = 4.6
[base.bias]
vgs_start_V = -0.3
vgs_stop_V = 0.6
vgs_step_V = 0.04
[base.mesh]
max_step_nm = 1.0
"#;

fn bench(c: &mut Criterion) {
    let dir = tempfile::tempdir().unwrap();
    for n in [100, 1000, 10_000] {
        let f = synthetic(n);
        c.bench_function(&format!("checkpoint_bytes_{n}_points"), |b| {
            b.iter(|| to_bytes(&f).unwrap())
        });
        let path = dir.path().join(format!("c{n}.h5"));
        c.bench_function(&format!("checkpoint_write_fsync_rename_{n}_points"), |b| {
            b.iter(|| write_sweep(&path, &f).unwrap())
        });
    }
    let plan = parse_plan(PLAN, dir.path()).unwrap();
    let mut g = c.benchmark_group("sweep_2_points");
    g.sample_size(10);
    for jobs in [1, 2] {
        let out = dir.path().join(format!("s{jobs}.h5"));
        g.bench_function(format!("jobs_{jobs}"), |b| {
            b.iter(|| {
                run_sweep(
                    &plan,
                    &out,
                    &SweepOptions {
                        jobs,
                        overwrite: true,
                        ..Default::default()
                    },
                    &Quiet,
                )
                .unwrap()
            })
        });
    }
    g.finish();
    if std::env::var_os("GATEHOLD_BENCH_LONG").is_some() {
        let root = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("benches");
        let text = std::fs::read_to_string(root.join("dg-200.toml")).unwrap();
        let plan = parse_plan(&text, &root).unwrap();
        assert_eq!(plan.points.len(), 200);
        let out = dir.path().join("dg200.h5");
        let mut g = c.benchmark_group("sweep_200");
        g.sample_size(10);
        g.bench_function("double_gate_jobs_2", |b| {
            b.iter(|| {
                run_sweep(
                    &plan,
                    &out,
                    &SweepOptions {
                        jobs: 2,
                        overwrite: true,
                        ..Default::default()
                    },
                    &Quiet,
                )
                .unwrap()
            })
        });
        g.finish();
    }
}

criterion_group!(benches, bench);
criterion_main!(benches);
