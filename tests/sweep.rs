//! Sweep integration tests: plans, parallel runs, checkpoints and resume,
//! shards and merge, the HDF5 file read back by an independent reader (h5py),
//! and plots. Every test runs the real solver on small double-gate devices
//! (1 nm mesh, 0.04 V gate steps: ~0.1-0.5 s per point).

mod common;

use std::path::{Path, PathBuf};
use std::process::Command;
use std::sync::OnceLock;

use gatehold::evaluate::Status;
use gatehold::io::hdf5::read_sweep;
use gatehold::io::{AxisValue, SweepFile};
use gatehold::progress::Silent;
use gatehold::sweep::plan::PlanError;
use gatehold::sweep::{self, merge, parse_plan, run_sweep, Quiet, Shard, SweepError, SweepOptions};

const DEVICE: &str = common::TINY_DG;

/// Six points: L_g (3) x zip(body, workfunction) (2); maps for points 1 and 4.
const PLAN: &str = r#"base = "tiny.toml"
[axes]
"geometry.gate_length_nm" = [10, 14, 20]
[zip]
"geometry.body_thickness_nm" = [5, 7]
"gate.workfunction_eV" = [4.6, 4.65]
[output]
maps = [1, 4]
[criteria]
dibl_max_mV_per_V = 100
"#;

fn dir() -> &'static Path {
    static D: OnceLock<tempfile::TempDir> = OnceLock::new();
    D.get_or_init(|| {
        let d = tempfile::tempdir().unwrap();
        std::fs::write(d.path().join("tiny.toml"), DEVICE).unwrap();
        std::fs::write(d.path().join("plan.toml"), PLAN).unwrap();
        // The same points on a mesh four times finer: each point runs long
        // enough (about a second) for a second signal to arrive during it.
        std::fs::write(
            d.path().join("plan-slow.toml"),
            PLAN.replace("[zip]", "\"mesh.refinement\" = [4]\n[zip]"),
        )
        .unwrap();
        d
    })
    .path()
}

fn plan() -> sweep::Plan {
    sweep::load_plan(&dir().join("plan.toml")).unwrap()
}

fn opts(jobs: usize) -> SweepOptions {
    SweepOptions {
        jobs,
        command_line: "test".into(),
        ..Default::default()
    }
}

/// The reference: the whole plan, 2 threads, unsharded, uninterrupted.
fn reference() -> &'static (PathBuf, SweepFile) {
    static R: OnceLock<(PathBuf, SweepFile)> = OnceLock::new();
    R.get_or_init(|| {
        let out = dir().join("reference.h5");
        let s = run_sweep(&plan(), &out, &opts(2), &Quiet).unwrap();
        assert!(s.complete && s.computed == 6, "{s:?}");
        (out.clone(), read_sweep(&out).unwrap())
    })
}

/// Rows equal in everything but wall time.
fn assert_same_points(a: &SweepFile, b: &SweepFile) {
    assert_eq!(a.axes, b.axes);
    assert_eq!(a.figures, b.figures);
    assert_eq!(a.rows.len(), b.rows.len(), "point counts");
    for (x, y) in a.rows.iter().zip(&b.rows) {
        let (mut x, mut y) = (x.clone(), y.clone());
        x.elapsed_s = 0.0;
        y.elapsed_s = 0.0;
        assert_eq!(x, y, "point {} differs", x.index);
    }
}

fn err(text: &str) -> String {
    match parse_plan(text, dir()) {
        Ok(_) => panic!("plan accepted:\n{text}"),
        Err(e) => e.to_string(),
    }
}

#[test]
fn plan_errors_name_key_value_and_reason() {
    let cases: &[(&str, &[&str])] = &[
        ("base = \"tiny.toml\"\n[axis]\n\"geometry.gate_length_nm\" = [10]", &["`axis`", "did you mean `axes`"]),
        ("base = \"tiny.toml\"\n[axes]\n\"geometry.gate_lenth_nm\" = [10]", &["axes.geometry.gate_lenth_nm", "geometry.gate_length_nm"]),
        ("base = \"tiny.toml\"\n[axes]\n\"geometry.gate_length_nm\" = []", &["axes.geometry.gate_length_nm", "at least one value"]),
        (
            "base = \"tiny.toml\"\n[zip]\n\"geometry.gate_length_nm\" = [10, 20]\n\"gate.workfunction_eV\" = [4.5]",
            &["zip.gate.workfunction_eV", "1 values", "equal lengths", "has 2"],
        ),
        (
            "base = \"tiny.toml\"\n[axes]\n\"geometry.gate_length_nm\" = { start = 10, stop = 5, step = 1 }",
            &["axes.geometry.gate_length_nm.step", "= 1", "away from stop = 5"],
        ),
        ("base = \"tiny.toml\"\n[axes]\n\"geometry.gate_length_nm\" = { start = 10, stop = 20, step = 0 }", &["step", "must not be zero"]),
        ("base = \"tiny.toml\"\n[axes]\n\"geometry.gate_length_nm\" = { start = 10, stop = 20, stride = 2 }", &["axes.geometry.gate_length_nm.stride", "unknown key"]),
        ("base = \"tiny.toml\"\n[axes]\n\"gate_stack.3.thickness_nm\" = [1.0]", &["gate_stack.3.thickness_nm", "index 3 out of range", "1 element"]),
        ("base = \"tiny.toml\"\n[axes]\n\"architecture\" = [\"double-gate\", 3]", &["architecture", "mixes numbers and strings"]),
        ("base = \"tiny.toml\"\n[axes]\n\"geometry.gate_length_nm\" = [10]\n[output]\nmaps = [1]", &["output.maps", "= 1", "out of range", "1 points"]),
        ("base = \"tiny.toml\"\n[criteria]\ndibl_max = 100", &["criteria.dibl_max`", "unknown key"]),
        ("base = \"missing.toml\"", &["missing.toml", "cannot read"]),
        ("[axes]\n\"geometry.gate_length_nm\" = [10]", &["`base`", "a plan needs"]),
    ];
    for (text, needles) in cases {
        let e = err(text);
        println!("{e}");
        for n in *needles {
            assert!(e.contains(n), "expected {n:?} in: {e}");
        }
    }
    // An invalid device at one point fails the plan before any solving, naming the point.
    let e = parse_plan("base = \"tiny.toml\"\n[axes]\n\"geometry.gate_length_nm\" = [10, -5]\n\"gate.workfunction_eV\" = [4.5, 4.6]", dir()).unwrap_err();
    match &e {
        PlanError::Point { index, values, .. } => {
            assert_eq!(*index, 2);
            assert_eq!(
                values,
                "geometry.gate_length_nm = -5, gate.workfunction_eV = 4.5"
            );
        }
        other => panic!("expected a point error, got {other}"),
    }
    let e = e.to_string();
    assert!(
        e.contains("plan point 2") && e.contains("geometry.gate_length_nm") && e.contains("-5"),
        "{e}"
    );
}

#[test]
fn product_order_last_axis_fastest_zip_as_one_axis() {
    let p = parse_plan(
        "base = \"tiny.toml\"\n[axes]\n\"geometry.gate_length_nm\" = [10, 20]\n\"geometry.source_drain_length_nm\" = { start = 6, stop = 10, step = 2 }\n[zip]\n\"gate_stack.0.thickness_nm\" = [0.8, 1.2]\n\"gate.workfunction_eV\" = [4.5, 4.7]",
        dir(),
    )
    .unwrap();
    assert_eq!(p.points.len(), 2 * 3 * 2);
    let cols: Vec<&str> = p.columns().iter().map(|c| c.key.as_str()).collect();
    assert_eq!(
        cols,
        [
            "geometry.gate_length_nm",
            "geometry.source_drain_length_nm",
            "gate_stack.0.thickness_nm",
            "gate.workfunction_eV"
        ]
    );
    let num = |v: &AxisValue| {
        if let AxisValue::Number(x) = v {
            *x
        } else {
            panic!()
        }
    };
    let got: Vec<Vec<f64>> = p
        .points
        .iter()
        .map(|q| q.values.iter().map(num).collect())
        .collect();
    let mut want = Vec::new();
    for lg in [10.0, 20.0] {
        for sd in [6.0, 8.0, 10.0] {
            for (t, wf) in [(0.8, 4.5), (1.2, 4.7)] {
                want.push(vec![lg, sd, t, wf]);
            }
        }
    }
    assert_eq!(got, want);
    // The values reach the validated devices.
    let s = &p.points[7].scenario;
    assert_eq!(
        (s.geometry.gate_length_nm, s.gate.workfunction_ev),
        (20.0, 4.7)
    );
    assert!(p.points.iter().enumerate().all(|(k, q)| q.index == k));
}

#[test]
fn completed_file_meets_the_contract_and_jobs_do_not_change_results() {
    let (path, r) = reference();
    // One element per point in plan order, figures and statuses as solved.
    assert_eq!(
        r.rows.iter().map(|x| x.index).collect::<Vec<_>>(),
        (0..6).collect::<Vec<_>>()
    );
    assert!(r.is_complete() && !r.meta.finished.is_empty());
    assert_eq!(r.meta.plan, PLAN);
    for row in &r.rows {
        println!(
            "point {}: {} vt_lin {:?}",
            row.index, row.status, row.figures[3]
        );
        assert_eq!(row.status, Status::Ok, "point {}", row.index);
        assert_eq!(row.curve.vgs_v.len(), 23, "0.04 V steps from -0.3 to 0.6");
    }
    assert_eq!(
        r.rows
            .iter()
            .filter(|x| x.map.is_some())
            .map(|x| x.index)
            .collect::<Vec<_>>(),
        [1, 4]
    );
    // Roll-off: V_t rises with L_g at fixed body and work function.
    let vt = r.figure("vt_lin_V").unwrap();
    assert!(vt[0] < vt[2] && vt[2] < vt[4], "{vt:?}");
    // The figure names equal the report's (new figures flow through generically).
    // (As the sweep does: sweep files store whole curves.)
    let mut sc = plan().points[0].scenario.clone();
    sc.bias.points = sc.bias.points.with_whole_curve();
    let sol = gatehold::evaluate::evaluate_alone(&sc, &Silent).unwrap();
    let names: Vec<String> = sol
        .report
        .scalars()
        .iter()
        .map(|(n, _)| n.to_string())
        .collect();
    assert_eq!(r.figures, names);
    assert_eq!(
        r.rows[0].figures,
        sol.report.scalars().iter().map(|x| x.1).collect::<Vec<_>>()
    );

    let one = dir().join("jobs1.h5");
    run_sweep(&plan(), &one, &opts(1), &Quiet).unwrap();
    assert_same_points(&read_sweep(&one).unwrap(), r);
    // Bitwise-equal physics: also through the file bytes of a figure column.
    assert_eq!(
        read_sweep(&one).unwrap().figure("dibl_mV_per_V"),
        r.figure("dibl_mV_per_V")
    );
    // An existing file is not overwritten without resume.
    let e = run_sweep(&plan(), path, &opts(1), &Quiet).unwrap_err();
    assert!(matches!(e, SweepError::Exists { .. }), "{e}");
}

#[test]
fn interrupted_run_leaves_a_readable_file_and_resume_finishes_it() {
    let (_, r) = reference();
    let out = dir().join("resume.h5");
    let stop = SweepOptions {
        stop_after: Some(2),
        ..opts(2)
    };
    let s = run_sweep(&plan(), &out, &stop, &Quiet).unwrap();
    assert!(!s.complete && s.computed == 2, "{s:?}");
    let part = read_sweep(&out).unwrap();
    assert_eq!(part.rows.len(), 2);
    assert!(part.meta.finished.is_empty());
    assert!(part.rows.windows(2).all(|w| w[0].index < w[1].index));
    for row in &part.rows {
        let full = &r.rows[row.index];
        assert_eq!(
            row.figures, full.figures,
            "checkpointed point {}",
            row.index
        );
    }
    // Resume with a different plan text is refused, naming the reason.
    let other = parse_plan(&PLAN.replace("[10, 14, 20]", "[10, 14, 21]"), dir()).unwrap();
    let e = run_sweep(
        &other,
        &out,
        &SweepOptions {
            resume: true,
            ..opts(2)
        },
        &Quiet,
    )
    .unwrap_err()
    .to_string();
    assert!(e.contains("plan text differs"), "{e}");
    let e = run_sweep(
        &plan(),
        &out,
        &SweepOptions {
            resume: true,
            shard: Shard { index: 1, count: 2 },
            ..opts(2)
        },
        &Quiet,
    )
    .unwrap_err()
    .to_string();
    assert!(e.contains("shard 0/1") && e.contains("1/2"), "{e}");
    // Resume computes only the missing points and ends equal to the uninterrupted run.
    let s = run_sweep(
        &plan(),
        &out,
        &SweepOptions {
            resume: true,
            ..opts(2)
        },
        &Quiet,
    )
    .unwrap();
    assert_eq!((s.resumed, s.computed, s.complete), (2, 4, true), "{s:?}");
    assert_same_points(&read_sweep(&out).unwrap(), r);
}

#[test]
fn shards_merge_into_the_unsharded_result() {
    let (_, r) = reference();
    let mut parts = Vec::new();
    for i in 0..3 {
        let out = dir().join(format!("shard{i}.h5"));
        let s = run_sweep(
            &plan(),
            &out,
            &SweepOptions {
                shard: Shard { index: i, count: 3 },
                ..opts(1)
            },
            &Quiet,
        )
        .unwrap();
        assert!(s.complete && s.in_shard == 2, "{s:?}");
        let f = read_sweep(&out).unwrap();
        assert_eq!(
            f.rows.iter().map(|x| x.index).collect::<Vec<_>>(),
            [i, i + 3]
        );
        parts.push(out);
    }
    let merged = dir().join("merged.h5");
    let p: Vec<&Path> = parts.iter().map(PathBuf::as_path).collect();
    merge(&p, &merged, "test merge").unwrap();
    let m = read_sweep(&merged).unwrap();
    assert_same_points(&m, r);
    assert_eq!((m.meta.shard_index, m.meta.shard_count), (0, 1));
    // A missing shard is named by its indices; a repeated one by the duplicates.
    let e = merge(&p[..2], &dir().join("bad.h5"), "x")
        .unwrap_err()
        .to_string();
    assert!(e.contains("2 missing point(s): 2, 5"), "{e}");
    let e = merge(&[p[0], p[1], p[2], p[1]], &dir().join("bad.h5"), "x")
        .unwrap_err()
        .to_string();
    assert!(
        e.contains("duplicate points: 1 (in") && e.contains("4 (in"),
        "{e}"
    );
}

#[test]
fn failed_points_are_recorded_and_the_sweep_goes_on() {
    // The first point's gate sweep stops below threshold: its V_t, SS and DIBL
    // cannot be extracted (never extrapolated), the reason is its status, and
    // the sweep goes on to the next point.
    let d = dir();
    // (No extension, bias.extend_limit_V = 0: an extended range would reach it.)
    let text = "base = \"tiny.toml\"\n[axes]\n\"bias.vgs_stop_V\" = [0.0, 0.6]\n\"bias.extend_limit_V\" = [0.0]";
    let p = parse_plan(text, d).unwrap();
    let out = d.join("failed.h5");
    let s = run_sweep(&p, &out, &opts(2), &Quiet).unwrap();
    assert_eq!((s.failed, s.complete), (1, true), "{s:?}");
    let f = read_sweep(&out).unwrap();
    assert!(
        f.rows[0].status.as_str().contains("set bias.vgs_stop_V = "),
        "{}",
        f.rows[0].status
    );
    let vt = f.figures.iter().position(|n| n == "vt_lin_V").unwrap();
    assert!(f.rows[0].figures[vt].is_none());
    assert!(f.rows[1].figures[vt].is_some());
    assert_eq!(f.rows[1].status, Status::Ok);
    assert_eq!(f.rows[0].axis[0], AxisValue::Number(0.0));
}

/// Runs tests/h5py_check.py; None when h5py is missing (and CI is not set).
fn h5py(files: &[&Path]) -> Option<serde_json::Value> {
    let script = Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/h5py_check.py");
    let out = match Command::new("python3").arg(&script).args(files).output() {
        Ok(o) => o,
        Err(e) => {
            assert!(
                std::env::var_os("CI").is_none(),
                "CI is set and python3 cannot run: {e}"
            );
            println!("SKIP: python3 not runnable: {e}");
            return None;
        }
    };
    if out.status.code() == Some(77) {
        let why = String::from_utf8_lossy(&out.stderr);
        assert!(
            std::env::var_os("CI").is_none(),
            "CI is set and h5py is missing: {why}"
        );
        println!("SKIP: {why}");
        return None;
    }
    assert!(
        out.status.success(),
        "h5py check failed: {}",
        String::from_utf8_lossy(&out.stderr)
    );
    Some(serde_json::from_slice(&out.stdout).unwrap())
}

#[test]
fn h5py_reads_every_file_kind() {
    let (path, r) = reference();
    let d = dir();
    // A partial file and a shard file of their own (other tests own theirs).
    let part = d.join("h5py_partial.h5");
    run_sweep(
        &plan(),
        &part,
        &SweepOptions {
            stop_after: Some(1),
            ..opts(1)
        },
        &Quiet,
    )
    .unwrap();
    let shard = d.join("h5py_shard.h5");
    run_sweep(
        &plan(),
        &shard,
        &SweepOptions {
            shard: Shard { index: 1, count: 2 },
            ..opts(2)
        },
        &Quiet,
    )
    .unwrap();
    let rest = d.join("h5py_shard0.h5");
    run_sweep(
        &plan(),
        &rest,
        &SweepOptions {
            shard: Shard { index: 0, count: 2 },
            ..opts(2)
        },
        &Quiet,
    )
    .unwrap();
    let merged = d.join("h5py_merged.h5");
    merge(&[shard.as_path(), rest.as_path()], &merged, "m").unwrap();
    let Some(v) = h5py(&[path, &part, &shard, &merged]) else {
        return;
    };
    let full = &v[0];
    assert_eq!(full["points"], 6);
    assert_eq!(full["complete"], 1);
    assert_eq!(full["plan"], PLAN);
    // h5py sees the same numbers the Rust reader does.
    // (JSON text carries the values; compare to 1e-14 relative.)
    let vt: Vec<Option<f64>> = serde_json::from_value(full["columns"]["vt_lin_V"].clone()).unwrap();
    assert_eq!(vt.len(), 6);
    for (a, row) in vt.iter().zip(&r.rows) {
        let (a, b) = (a.unwrap(), row.figures[3].unwrap());
        assert!((a - b).abs() <= 1e-14 * b.abs(), "h5py {a} vs Rust {b}");
    }
    let lg: Vec<f64> =
        serde_json::from_value(full["columns"]["geometry.gate_length_nm"].clone()).unwrap();
    assert_eq!(lg, [10.0, 10.0, 14.0, 14.0, 20.0, 20.0]);
    assert_eq!(full["curve_total"], 6 * 23);
    assert_eq!(
        full["maps"].as_object().unwrap().keys().collect::<Vec<_>>(),
        ["point_000001", "point_000004"]
    );
    // Format 2 additions, as h5py reads them: the method of every point,
    // the base device's text and the hashes of the plan's inputs.
    assert_eq!(full["method"], serde_json::json!(vec!["2d-solve"; 6]));
    assert_eq!(full["base_device"], DEVICE);
    let inputs = full["inputs"].as_array().unwrap();
    assert_eq!(inputs[0]["role"], "plan");
    assert_eq!(inputs[1]["role"], "base");
    assert_eq!(inputs[1]["file"], "tiny.toml");
    assert_eq!(
        inputs[1]["sha256"],
        gatehold::io::sha256_hex(DEVICE.as_bytes())
    );
    assert_eq!(v[1]["points"], 1);
    assert_eq!(v[1]["complete"], 0);
    assert_eq!(v[2]["point_index"], serde_json::json!([1, 3, 5]));
    assert_eq!(v[3]["columns"], full["columns"]);
}

/// Statuses and warnings are stored whole (variable-length UTF-8): a 1000-
/// character reason with non-ASCII text reads back unchanged in Rust and in
/// h5py (format 1 cut them at 255 ASCII bytes).
#[test]
fn statuses_and_warnings_are_stored_whole() {
    let (path, _) = reference();
    let mut f = read_sweep(path).unwrap();
    let long = format!("failed: {} µm body", "x".repeat(1000));
    f.rows[0].status = Status::Failed(long.clone());
    f.rows[0].method = None;
    f.rows[1].warnings = vec!["first caution".into(), "second: 5 nm ≥ body".into()];
    let out = dir().join("long_status.h5");
    gatehold::io::hdf5::write_sweep(&out, &f).unwrap();
    let back = read_sweep(&out).unwrap();
    assert_eq!(back.rows[0].status.as_str(), long);
    assert_eq!(back.rows[0].method, None);
    assert_eq!(back.rows[1].warnings, f.rows[1].warnings);
    assert_eq!(back, f);
    let Some(v) = h5py(&[&out]) else {
        return;
    };
    assert_eq!(v[0]["status"][0], long.as_str());
    assert_eq!(v[0]["method"][0], "");
    assert_eq!(v[0]["warnings"][1], "first caution\nsecond: 5 nm ≥ body");
}

/// A file written before format 2 (the committed fixture, format 1) still
/// reads: its points have no method and no warnings; resuming or merging
/// it is refused with a message that says why.
#[test]
fn format_1_files_read_and_are_refused_for_resume_with_a_reason() {
    let fixture = Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/fixtures/invariant-before.h5");
    let f = read_sweep(&fixture).unwrap();
    assert!(!f.rows.is_empty());
    assert!(f
        .rows
        .iter()
        .all(|r| r.method.is_none() && r.warnings.is_empty()));
    assert!(f.meta.inputs.is_empty() && f.meta.base_device.is_empty());
    let why = sweep::inputs_differ(&f.meta.inputs, &plan().inputs).unwrap();
    assert!(
        why.contains("before format 2") && why.contains("--force"),
        "{why}"
    );
}

#[test]
fn plots_from_a_sweep_file_and_a_device() {
    let (path, _) = reference();
    let f = read_sweep(path).unwrap();
    let out = dir().join("plots");
    // Theory curves stored beside the solved figures: one per series (body
    // thickness and work function zipped), at each of the series' gate
    // lengths, falling with L.
    let labels = gatehold::io::series_labels(&f);
    let lg = f.figure("gate_length_nm").unwrap();
    let th = f.figure("theory_dibl_mV_per_V").unwrap();
    let mut series: Vec<String> = labels.clone();
    series.dedup();
    series.sort();
    series.dedup();
    assert_eq!(series.len(), 2, "{labels:?}");
    for s in &series {
        let pts: Vec<(f64, f64)> = (0..f.rows.len())
            .filter(|&k| &labels[k] == s)
            .map(|k| (lg[k], th[k]))
            .collect();
        let l: Vec<f64> = pts.iter().map(|p| p.0).collect();
        assert_eq!(l, [10.0, 14.0, 20.0], "{s}");
        assert!(pts.windows(2).all(|w| w[1].1 < w[0].1), "{s}: {pts:?}");
    }
    assert!(f
        .figure("theory_ss_mV_per_dec")
        .unwrap()
        .iter()
        .all(|x| x.is_finite()));
    let files = gatehold::plot::sweep_plots(&f, &out).unwrap();
    let names: Vec<String> = files
        .iter()
        .map(|p| p.file_name().unwrap().to_string_lossy().into_owned())
        .collect();
    for want in [
        "vt_rolloff.png",
        "dibl.svg",
        "ss.png",
        "iv_Lg-10nm_tsi-7nm_WF-4.65eV.png",
        "potential_map_Lg-20nm_tsi-5nm_WF-4.6eV.svg",
        "band_Lg-20nm_tsi-5nm_WF-4.6eV.png",
    ] {
        assert!(
            names.iter().any(|n| n == want),
            "{want} missing from {names:?}"
        );
    }
    for p in &files {
        let bytes = std::fs::read(p).unwrap();
        if p.extension().unwrap() == "png" {
            assert_eq!(&bytes[..8], b"\x89PNG\r\n\x1a\n", "{}", p.display());
            assert!(bytes.len() > 5_000, "{} suspiciously small", p.display());
        } else {
            let s = String::from_utf8(bytes).unwrap();
            assert!(s.contains("<svg") && s.contains("<text"), "{}", p.display());
        }
    }
    let dibl_svg = std::fs::read_to_string(out.join("dibl.svg")).unwrap();
    assert!(
        dibl_svg.contains("(theory)"),
        "theory series drawn with its legend"
    );
    let sol = gatehold::evaluate::evaluate_alone(&plan().points[4].scenario, &Silent)
        .unwrap()
        .solution
        .unwrap();
    let dev = gatehold::plot::device_plots(&sol, &dir().join("device_plots")).unwrap();
    assert_eq!(
        dev.len(),
        6,
        "iv, potential_map, band as PNG and SVG: {dev:?}"
    );
}

/// Kills the real `gatehold sweep` mid-run, then resumes it. Needs the
/// subcommand wired into the `gatehold` binary; until then it is skipped
/// (fails if env CI is set).
#[test]
fn killed_binary_leaves_a_resumable_file() {
    let exe = env!("CARGO_BIN_EXE_gatehold");
    let wired = Command::new(exe)
        .args(["sweep", "--help"])
        .output()
        .map(|o| o.status.success())
        .unwrap_or(false);
    if !wired {
        assert!(
            std::env::var_os("CI").is_none(),
            "CI is set and `gatehold sweep` is not wired"
        );
        println!("SKIP: `gatehold sweep` is not wired into the binary yet");
        return;
    }
    let (_, r) = reference();
    let out = dir().join("killed.h5");
    let mut child = spawn_sweep(&out);
    wait_for_a_point(&out);
    child.kill().unwrap();
    child.wait().unwrap();
    let part = read_sweep(&out).unwrap();
    println!("killed with {} of 6 points on disk", part.rows.len());
    assert!(!part.rows.is_empty());
    resume_to_the_reference(&out, r);
}

/// `gatehold sweep plan.toml --out OUT --jobs 1 --quiet`, stderr captured.
fn spawn_sweep(out: &Path) -> std::process::Child {
    spawn_plan("plan.toml", out)
}

/// `gatehold sweep PLAN --out OUT --jobs 1 --quiet`, stderr captured.
fn spawn_plan(plan: &str, out: &Path) -> std::process::Child {
    Command::new(env!("CARGO_BIN_EXE_gatehold"))
        .arg("sweep")
        .arg(dir().join(plan))
        .arg("--out")
        .arg(out)
        .args(["--jobs", "1", "--quiet"])
        .stderr(std::process::Stdio::piped())
        .spawn()
        .unwrap()
}

/// Waits (at most 60 s) until the file on disk holds a finished point.
fn wait_for_a_point(out: &Path) {
    let t = std::time::Instant::now();
    while !read_sweep(out).is_ok_and(|f| !f.rows.is_empty()) && t.elapsed().as_secs() < 60 {
        std::thread::sleep(std::time::Duration::from_millis(10));
    }
}

/// `--resume` through the binary exits 0 with the reference's points.
fn resume_to_the_reference(out: &Path, r: &SweepFile) {
    let st = Command::new(env!("CARGO_BIN_EXE_gatehold"))
        .arg("sweep")
        .arg(dir().join("plan.toml"))
        .arg("--out")
        .arg(out)
        .args(["--resume", "--quiet"])
        .status()
        .unwrap();
    assert_eq!(st.code(), Some(0));
    assert_same_points(&read_sweep(out).unwrap(), r);
}

/// Ctrl-C (SIGINT) to the real binary mid-sweep: no new point starts, the
/// running one is written, the exit code is 3 (stopped early), no `.tmp`
/// file is left, and `--resume` finishes the file with the reference's points.
#[test]
fn ctrl_c_stops_cleanly_with_exit_3_and_resumes() {
    let out = dir().join("interrupted.h5");
    let child = spawn_plan("plan-slow.toml", &out);
    wait_for_a_point(&out);
    let sent = Command::new("kill")
        .args(["-INT", &child.id().to_string()])
        .status()
        .unwrap();
    assert!(sent.success());
    let done = child.wait_with_output().unwrap();
    let stderr = String::from_utf8_lossy(&done.stderr);
    let part = read_sweep(&out).unwrap();
    println!("interrupted with {} of 6 points on disk", part.rows.len());
    assert_eq!(done.status.code(), Some(3), "{stderr}");
    assert!(stderr.contains("interrupted"), "{stderr}");
    assert!(part.rows.len() < 6 && !part.is_complete());
    assert!(!dir().join("interrupted.h5.tmp").exists());
    resume_completes("plan-slow.toml", &out);
}

/// SIGTERM (what Slurm sends at a time limit) is handled like Ctrl-C, and a
/// second signal exits at once with 3: the file on disk is the last
/// checkpoint, readable, with no `.tmp` left.
#[test]
fn sigterm_then_a_second_signal_exits_at_once_leaving_the_last_checkpoint() {
    let out = dir().join("terminated.h5");
    let child = spawn_plan("plan-slow.toml", &out);
    wait_for_a_point(&out);
    for signal in ["-TERM", "-INT"] {
        let sent = Command::new("kill")
            .args([signal, &child.id().to_string()])
            .status()
            .unwrap();
        assert!(sent.success());
        std::thread::sleep(std::time::Duration::from_millis(30));
    }
    let done = child.wait_with_output().unwrap();
    let stderr = String::from_utf8_lossy(&done.stderr);
    assert_eq!(done.status.code(), Some(3), "{stderr}");
    // The second signal came while a point (about a second on this mesh) was still running.
    assert!(
        stderr.contains("interrupted") && stderr.contains("stopped at once"),
        "{stderr}"
    );
    let part = read_sweep(&out).unwrap();
    assert!(!part.rows.is_empty() && !part.is_complete(), "{stderr}");
    assert!(!dir().join("terminated.h5.tmp").exists());
    resume_completes("plan-slow.toml", &out);
}

/// `--resume` through the binary exits 0 with the plan's 6 points, in plan order.
fn resume_completes(plan: &str, out: &Path) {
    let st = Command::new(env!("CARGO_BIN_EXE_gatehold"))
        .arg("sweep")
        .arg(dir().join(plan))
        .arg("--out")
        .arg(out)
        .args(["--resume", "--quiet"])
        .status()
        .unwrap();
    assert_eq!(st.code(), Some(0));
    let done = read_sweep(out).unwrap();
    assert!(done.is_complete() && done.rows.len() == 6);
    assert!(done.rows.iter().enumerate().all(|(k, r)| r.index == k));
}

/// A sweep file knows its device: after the base device file changes,
/// `--resume` and `merge` refuse, naming the changed file (both files hold
/// the same plan text, so only the stored hash can tell).
#[test]
fn resume_and_merge_refuse_a_changed_base_device_naming_it() {
    let d = tempfile::tempdir().unwrap();
    std::fs::write(d.path().join("tiny.toml"), DEVICE).unwrap();
    std::fs::write(d.path().join("plan.toml"), PLAN).unwrap();
    let load = || sweep::load_plan(&d.path().join("plan.toml")).unwrap();
    let a = d.path().join("a.h5");
    let b = d.path().join("b.h5");
    let shard = |index| SweepOptions {
        shard: Shard { index, count: 2 },
        ..opts(2)
    };
    run_sweep(
        &load(),
        &a,
        &SweepOptions {
            stop_after: Some(1),
            ..shard(0)
        },
        &Quiet,
    )
    .unwrap();
    // The body changes from 5 to 9 nm between the two shards.
    std::fs::write(
        d.path().join("tiny.toml"),
        DEVICE.replace("body_thickness_nm = 5", "body_thickness_nm = 9"),
    )
    .unwrap();
    run_sweep(&load(), &b, &shard(1), &Quiet).unwrap();
    let resume_shard_0 = || {
        let resume = SweepOptions {
            resume: true,
            ..shard(0)
        };
        run_sweep(&load(), &a, &resume, &Quiet)
    };
    let e = resume_shard_0().unwrap_err().to_string();
    assert!(
        e.contains("base file tiny.toml changed") && e.contains("sha256"),
        "{e}"
    );
    // Finish shard 0 with the old device, then try to merge it with shard 1.
    std::fs::write(d.path().join("tiny.toml"), DEVICE).unwrap();
    resume_shard_0().unwrap();
    let e = merge(&[a.as_path(), b.as_path()], &d.path().join("m.h5"), "m")
        .unwrap_err()
        .to_string();
    assert!(
        e.contains("different inputs") && e.contains("tiny.toml") && e.contains("a.h5"),
        "{e}"
    );
    assert!(!d.path().join("m.h5").exists());
    // Neither command writes over one of its inputs.
    let e = merge(&[a.as_path()], &a, "m").unwrap_err();
    assert!(matches!(e, SweepError::OverwritesInput { .. }), "{e}");
    let e = run_sweep(
        &load(),
        &d.path().join("tiny.toml"),
        &SweepOptions {
            overwrite: true,
            ..opts(1)
        },
        &Quiet,
    )
    .unwrap_err();
    assert!(e.to_string().contains("base device file"), "{e}");
    assert_eq!(
        std::fs::read_to_string(d.path().join("tiny.toml")).unwrap(),
        DEVICE
    );
    let e = run_sweep(
        &load(),
        &d.path().join("plan.toml"),
        &SweepOptions {
            overwrite: true,
            ..opts(1)
        },
        &Quiet,
    )
    .unwrap_err();
    assert!(e.to_string().contains("plan's own file"), "{e}");
}

/// The CSV export: plain numbers (no exponent) that parse back to the
/// stored values exactly, missing figures empty, the method and warnings
/// columns at the end (common practice for a lossless text export).
#[test]
fn csv_numbers_are_plain_and_round_trip_exactly() {
    let (_, r) = reference();
    let mut buf = Vec::new();
    gatehold::io::csv::write_points(r, &mut buf).unwrap();
    let text = String::from_utf8(buf).unwrap();
    let mut lines = text.lines();
    let head: Vec<&str> = lines.next().unwrap().split(',').collect();
    assert_eq!(
        &head[head.len() - 3..],
        ["meets_criteria", "method", "warnings"]
    );
    let first_fig = 1 + r.axes.len();
    for (row, line) in r.rows.iter().zip(lines) {
        let cells: Vec<&str> = line.split(',').collect();
        for (k, v) in row.figures.iter().enumerate() {
            let cell = cells[first_fig + k];
            assert!(!cell.contains(['e', 'E']), "{cell}");
            match v {
                Some(x) => assert_eq!(
                    cell.parse::<f64>().unwrap().to_bits(),
                    x.to_bits(),
                    "{cell}"
                ),
                None => assert_eq!(cell, ""),
            }
        }
        assert_eq!(cells[cells.len() - 2], "2d-solve");
    }
}

/// Per-point warnings reach the file: a 4 nm body carries the quantum-
/// confinement caution of validation (below about 5 nm, not modelled), a
/// 7 nm body none; both points record their method.
#[test]
fn per_point_warnings_and_method_are_stored() {
    let d = tempfile::tempdir().unwrap();
    std::fs::write(d.path().join("tiny.toml"), DEVICE).unwrap();
    let p = parse_plan(
        "base = \"tiny.toml\"\n[axes]\n\"geometry.body_thickness_nm\" = [4, 7]\n",
        d.path(),
    )
    .unwrap();
    let out = d.path().join("w.h5");
    run_sweep(&p, &out, &opts(2), &Quiet).unwrap();
    let f = read_sweep(&out).unwrap();
    assert!(
        f.rows[0]
            .warnings
            .iter()
            .any(|w| w.contains("quantum confinement")),
        "{:?}",
        f.rows[0].warnings
    );
    assert!(f.rows[1].warnings.is_empty(), "{:?}", f.rows[1].warnings);
    assert!(f
        .rows
        .iter()
        .all(|r| r.method == Some(gatehold::evaluate::Method::TwoDSolve)));
}
