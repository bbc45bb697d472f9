//! The pipeline's own promises: length-independent work is done once per
//! cross-section, a sweep writes the same file as before the restructuring,
//! a shard whose points all failed merges with a good one, and every exit
//! code comes out of the binary as documented.

mod common;

use std::collections::HashMap;
use std::path::Path;
use std::process::Command;
use std::sync::Mutex;

use common::*;
use gatehold::evaluate::scan::scan;
use gatehold::evaluate::Status;
use gatehold::io::hdf5::{read_sweep, write_sweep};
use gatehold::progress::{Observer, SolveKind};
use gatehold::sweep::{self, load_plan, merge, run_sweep, Quiet, Shard, SweepOptions};

/// Counts the solves reported to it.
#[derive(Default)]
struct Counter(Mutex<HashMap<SolveKind, usize>>);

impl Observer for Counter {
    fn solved(&self, kind: SolveKind) {
        *self.0.lock().unwrap().entry(kind).or_default() += 1;
    }
}

impl Counter {
    fn get(&self, kind: SolveKind) -> usize {
        self.0.lock().unwrap().get(&kind).copied().unwrap_or(0)
    }
}

fn fixture(name: &str) -> std::path::PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("tests/fixtures")
        .join(name)
}

#[test]
fn a_scan_solves_the_length_independent_pieces_once() {
    // Bulk is the case that used to solve its long-channel column twice per
    // length (once for V_t,long, once for the depletion depth of lambda).
    let lengths = [20.0, 25.0, 30.0, 40.0, 60.0];
    let bulk = device(
        r#"
name = "count-bulk"
architecture = "bulk"
[geometry]
gate_length_nm = 25
junction_depth_nm = 10
substrate_depth_nm = 40
[[gate_stack]]
material = "SiO2"
thickness_nm = 1.2
[gate]
workfunction_eV = 4.17
[doping]
channel_cm3 = 3e18
[bias]
vgs_start_V = -1.2
vgs_stop_V = 0.8
vgs_step_V = 0.025
[mesh]
max_step_nm = 1.0
"#,
    );
    let dg = double_gate(
        25.0,
        8.0,
        1.0,
        "[bias]\nvgs_start_V = -0.4\nvgs_stop_V = 0.5\nvgs_step_V = 0.025\n[mesh]\nmax_step_nm = 1.0\n",
    );
    for s in [&bulk, &dg] {
        let c = Counter::default();
        let r = scan(s, &lengths, &c).unwrap();
        let (ramps, long, lambda) = (
            c.get(SolveKind::GateRamp),
            c.get(SolveKind::LongChannel),
            c.get(SolveKind::NaturalLength),
        );
        println!(
            "{}: {ramps} gate ramps, {long} long-channel extractions, {lambda} natural lengths for {} lengths",
            s.architecture,
            lengths.len()
        );
        // Two drain biases per length; the reference once for the whole scan.
        assert_eq!(ramps, 2 * lengths.len());
        assert_eq!(long, 1);
        assert_eq!(lambda, 1);
        for row in &r.rows {
            assert_eq!(
                row.status,
                Status::Ok,
                "{}: {}",
                row.gate_length_nm,
                row.status
            );
        }
    }
}

#[test]
fn the_invariant_sweep_writes_the_file_it_wrote_before_the_restructuring() {
    // tests/fixtures/invariant-before.h5 was written by the tool before the
    // layout changed (same plan), and written again by the tool when the
    // default mesh gained far zones (mesh.growth, mesh.max_far_step_nm): that
    // mesh legitimately moves every figure, curve and Newton count. Sweeps
    // still solve the whole gate grid (bias.points = "auto" stores whole
    // curves), so the curve lengths are those of before. Every column it has
    // must come out the same:
    // figures to 1e-9 relative (bit-identical on the machine that made it;
    // another CPU's vector kernels may round differently), axes, statuses and
    // verdicts exactly. elapsed_s is the only column that may differ.
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("after.h5");
    let plan = load_plan(&fixture("invariant-plan.toml")).unwrap();
    let opts = SweepOptions {
        jobs: 2,
        ..SweepOptions::default()
    };
    run_sweep(&plan, &out, &opts, &Quiet).unwrap();
    let before = read_sweep(&fixture("invariant-before.h5")).unwrap();
    let after = read_sweep(&out).unwrap();
    assert_eq!(before.rows.len(), 8);
    assert_eq!(after.rows.len(), before.rows.len());
    assert_eq!(after.axes, before.axes);
    assert_eq!(after.meta.plan, before.meta.plan);
    let close = |a: f64, b: f64| {
        (a.is_nan() && b.is_nan()) || (a - b).abs() <= 1e-9 * a.abs().max(b.abs()).max(1e-30)
    };
    for name in &before.figures {
        let (a, b) = (
            before.figure(name).unwrap(),
            after
                .figure(name)
                .unwrap_or_else(|| panic!("column {name} missing")),
        );
        for (k, (x, y)) in a.iter().zip(&b).enumerate() {
            assert!(close(*x, *y), "{name}[{k}]: before {x}, after {y}");
        }
    }
    for (r0, r1) in before.rows.iter().zip(&after.rows) {
        assert_eq!(r0.index, r1.index);
        assert_eq!(r0.axis, r1.axis);
        assert_eq!(r0.status, r1.status);
        assert_eq!(r0.meets_criteria, r1.meets_criteria);
        assert_eq!(r0.vds_v, r1.vds_v);
        assert_eq!(r0.newton_steps, r1.newton_steps, "point {}", r0.index);
        for (c0, c1) in [
            (&r0.curve.vgs_v, &r1.curve.vgs_v),
            (&r0.curve.id_lin, &r1.curve.id_lin),
            (&r0.curve.id_sat, &r1.curve.id_sat),
        ] {
            assert_eq!(c0.len(), c1.len());
            assert!(
                c0.iter().zip(c1).all(|(a, b)| close(*a, *b)),
                "point {} curves",
                r0.index
            );
        }
        assert_eq!(r0.map.is_some(), r1.map.is_some());
    }
    // New columns only extend the file.
    for extra in [
        "theory_rolloff_mV",
        "theory_dibl_mV_per_V",
        "theory_ss_mV_per_dec",
    ] {
        assert!(after.figures.iter().any(|f| f == extra), "{extra}");
    }
}

#[test]
fn a_shard_whose_points_all_failed_merges_with_a_good_one() {
    // A point that produced no report still gets every figure column (the
    // list is derived from the report type), so its shard merges.
    let dir = tempfile::tempdir().unwrap();
    let plan_path = dir.path().join("plan.toml");
    std::fs::write(
        &plan_path,
        format!(
            "base = \"{}\"\n[axes]\n\"geometry.gate_length_nm\" = [20, 30]\n\"mesh.max_step_nm\" = [1.0]\n",
            Path::new(env!("CARGO_MANIFEST_DIR"))
                .join("meshes/double-gate.toml")
                .display()
        ),
    )
    .unwrap();
    let plan = load_plan(&plan_path).unwrap();
    let good = dir.path().join("good.h5");
    let shard = |index| SweepOptions {
        shard: Shard { index, count: 2 },
        ..SweepOptions::default()
    };
    run_sweep(&plan, &good, &shard(0), &Quiet).unwrap();
    // Shard 1/2: its one point fails before any report exists.
    let bad = dir.path().join("bad.h5");
    let mut file = sweep::new_file(&plan, &shard(1));
    let failed: Result<gatehold::evaluate::Reference, String> =
        Err("the reference could not be built (made to fail by the test)".into());
    let (row, named) = sweep::run_plan_point(&plan, 1, &failed, false);
    assert!(named.is_empty());
    assert!(!row.status.is_ok());
    sweep::place_row(&mut file, row, &named);
    write_sweep(&bad, &file).unwrap();
    let (g, b) = (read_sweep(&good).unwrap(), read_sweep(&bad).unwrap());
    assert_eq!(
        g.figures, b.figures,
        "same columns with and without a report"
    );
    let merged = merge(&[&good, &bad], &dir.path().join("all.h5"), "test").unwrap();
    assert_eq!(merged.rows.len(), 2);
    assert!(merged.rows[0].status.is_ok());
    assert!(merged.rows[1].status.as_str().contains("made to fail"));
    assert!(merged.figure("vt_lin_V").unwrap()[1].is_nan());
    assert!(merged.figure("lambda_numeric_nm").unwrap()[0].is_finite());
}

fn gatehold() -> Command {
    Command::new(env!("CARGO_BIN_EXE_gatehold"))
}

#[test]
fn exit_codes_through_the_binary() {
    let dir = tempfile::tempdir().unwrap();
    let dg = std::fs::read_to_string(
        Path::new(env!("CARGO_MANIFEST_DIR")).join("meshes/double-gate.toml"),
    )
    .unwrap();
    // 0: done.
    let ok = dir.path().join("ok.toml");
    std::fs::write(&ok, dg.replace("vgs_step_V = 0.02", "vgs_step_V = 0.05")).unwrap();
    let st = gatehold()
        .args(["run", "--quiet"])
        .arg(&ok)
        .output()
        .unwrap();
    assert_eq!(
        st.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&st.stderr)
    );
    // 2: finished, figures missing (the gate ramp stops short of the threshold
    // current; bias.auto_extend off, else the range would extend by itself).
    let short = dir.path().join("short.toml");
    std::fs::write(
        &short,
        dg.replace("vgs_stop_V = 0.8", "vgs_stop_V = 0.1\nauto_extend = false"),
    )
    .unwrap();
    let st = gatehold()
        .args(["run", "--quiet"])
        .arg(&short)
        .output()
        .unwrap();
    let text = String::from_utf8_lossy(&st.stdout);
    assert_eq!(st.status.code(), Some(2), "{text}");
    assert!(text.contains("threshold current"), "{text}");
    // 3: a sweep stopped before its shard was complete.
    let plan = dir.path().join("plan.toml");
    std::fs::write(
        &plan,
        format!(
            "base = \"{}\"\n[axes]\n\"geometry.gate_length_nm\" = [20, 30, 40]\n",
            ok.display()
        ),
    )
    .unwrap();
    let st = gatehold()
        .args([
            "sweep",
            "--quiet",
            "--jobs",
            "1",
            "--stop-after",
            "1",
            "--out",
        ])
        .arg(dir.path().join("s.h5"))
        .arg(&plan)
        .output()
        .unwrap();
    assert_eq!(
        st.status.code(),
        Some(3),
        "{}",
        String::from_utf8_lossy(&st.stderr)
    );
    // 1: bad input.
    let st = gatehold()
        .args(["run", "/nonexistent.toml"])
        .output()
        .unwrap();
    assert_eq!(st.status.code(), Some(1));
    // 64: a usage error is none of the above (a sweep chain must not read it as "points missing").
    for args in [
        vec!["sweep", "--shard", "-1/2"],
        vec!["run"],
        vec!["frobnicate"],
    ] {
        let st = gatehold().args(&args).output().unwrap();
        assert_eq!(st.status.code(), Some(64), "{args:?}");
    }
    // --help is not an error.
    assert_eq!(
        gatehold().arg("--help").output().unwrap().status.code(),
        Some(0)
    );
}

/// The one exit-code table (README, "Exit codes"), for every command through
/// the binary: 0 done; 1 bad input or failure; 2 finished with points or
/// figures missing; 3 stopped early (sweep; Ctrl-C in `tests/sweep.rs`);
/// 64 usage error. Small double-gate devices (1 nm mesh, 0.03 V steps).
#[test]
fn every_command_follows_the_exit_code_table() {
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    let dg = std::fs::read_to_string(
        Path::new(env!("CARGO_MANIFEST_DIR")).join("meshes/double-gate.toml"),
    )
    .unwrap()
    .replace("vgs_step_V = 0.02", "vgs_step_V = 0.03")
        + "\n[mesh]\nmax_step_nm = 1.0\n";
    std::fs::write(d.join("ok.toml"), &dg).unwrap();
    // Stops short of the threshold current: V_t (and so several figures)
    // missing (bias.auto_extend off, else the range would extend by itself).
    std::fs::write(
        d.join("short.toml"),
        dg.replace("vgs_stop_V = 0.8", "vgs_stop_V = 0.1\nauto_extend = false"),
    )
    .unwrap();
    // Too coarse at 40 nm: only 2 bias points in the SS window (SS missing there).
    std::fs::write(
        d.join("coarse.toml"),
        dg.replace("vgs_step_V = 0.03", "vgs_step_V = 0.05"),
    )
    .unwrap();
    std::fs::write(
        d.join("bad.toml"),
        dg.replace("body_thickness_nm = 8", "body_thickness_nm = -8"),
    )
    .unwrap();
    std::fs::write(
        d.join("plan.toml"),
        "base = \"ok.toml\"\n[axes]\n\"geometry.gate_length_nm\" = [25, 40]\n",
    )
    .unwrap();
    std::fs::write(
        d.join("plan-short.toml"),
        "base = \"short.toml\"\n[axes]\n\"geometry.gate_length_nm\" = [25, 40]\n",
    )
    .unwrap();
    std::fs::write(d.join("not.h5"), "not an HDF5 file").unwrap();
    let p = |name: &str| d.join(name).display().to_string();
    // `gatehold pitch DEVICE` and the options (split at spaces).
    let pitch = |device: &str, options: &str| -> Vec<String> {
        let mut v = vec!["pitch".to_string(), p(device)];
        v.extend(options.split_whitespace().map(String::from));
        v
    };
    let cases: Vec<(Vec<String>, u8)> = vec![
        // run
        (vec!["run".into(), "--quiet".into(), p("ok.toml")], 0),
        (vec!["run".into(), "--quiet".into(), p("short.toml")], 2),
        (vec!["run".into(), p("bad.toml")], 1),
        (vec!["run".into(), "--frobnicate".into(), p("ok.toml")], 64),
        // lambda
        (vec!["lambda".into(), p("ok.toml")], 0),
        (vec!["lambda".into(), p("bad.toml")], 1),
        (vec!["lambda".into()], 64),
        // scan
        (
            vec![
                "scan".into(),
                p("ok.toml"),
                "--lengths".into(),
                "30,40".into(),
            ],
            0,
        ),
        (
            vec![
                "scan".into(),
                p("coarse.toml"),
                "--lengths".into(),
                "30,40".into(),
            ],
            2,
        ),
        (
            vec![
                "scan".into(),
                p("short.toml"),
                "--lengths".into(),
                "30".into(),
            ],
            1,
        ), // no reference
        (vec!["scan".into(), p("ok.toml"), "--lengths=-3".into()], 1),
        (
            vec!["scan".into(), p("ok.toml"), "--lengths".into(), "x".into()],
            64,
        ),
        // sweep
        (
            vec![
                "sweep".into(),
                "-q".into(),
                p("plan.toml"),
                "--out".into(),
                p("s.h5"),
            ],
            0,
        ),
        (
            vec![
                "sweep".into(),
                "-q".into(),
                p("plan-short.toml"),
                "--out".into(),
                p("f.h5"),
            ],
            2,
        ),
        (
            vec![
                "sweep".into(),
                "-q".into(),
                p("plan.toml"),
                "--out".into(),
                p("t.h5"),
                "--stop-after".into(),
                "1".into(),
                "--jobs".into(),
                "1".into(),
            ],
            3,
        ),
        (
            vec![
                "sweep".into(),
                "-q".into(),
                p("plan.toml"),
                "--out".into(),
                p("s.h5"),
            ],
            1,
        ), // exists
        (
            vec![
                "sweep".into(),
                "-q".into(),
                p("plan.toml"),
                "--out".into(),
                p("ok.toml"),
                "--force".into(),
            ],
            1,
        ), // its own base
        (
            vec![
                "sweep".into(),
                p("plan.toml"),
                "--out".into(),
                p("u.h5"),
                "--shard".into(),
                "2/2".into(),
            ],
            64,
        ),
        // merge
        (
            vec!["merge".into(), p("s.h5"), "--out".into(), p("m.h5")],
            0,
        ),
        (
            vec!["merge".into(), p("f.h5"), "--out".into(), p("mf.h5")],
            2,
        ),
        (
            vec!["merge".into(), p("t.h5"), "--out".into(), p("mt.h5")],
            1,
        ), // a point missing
        (
            vec!["merge".into(), p("s.h5"), "--out".into(), p("s.h5")],
            1,
        ), // its own input
        (vec!["merge".into(), p("s.h5")], 64),
        // plot
        (vec!["plot".into(), p("s.h5"), "--out".into(), p("fig")], 0),
        (
            vec!["plot".into(), p("not.h5"), "--out".into(), p("fig2")],
            1,
        ),
        (vec!["plot".into(), p("s.h5")], 64),
        // demo (a complete demo run is tests/demo.rs)
        (
            vec![
                "demo".into(),
                "--lengths=-5".into(),
                "--out".into(),
                p("demo"),
            ],
            1,
        ),
        (vec!["demo".into(), "--jobs".into(), "many".into()], 64),
        // pitch: a bad option value, a missing option, or options that leave
        // no gate are usage errors (64); a bad device file is bad input (1).
        (
            pitch(
                "ok.toml",
                "--quiet --pitch 60 --spacer-nm 8 --contact-nm 12",
            ),
            0,
        ),
        (
            pitch("bad.toml", "--pitch 60 --spacer-nm 8 --contact-nm 12"),
            1,
        ),
        (pitch("ok.toml", "--pitch -5"), 64),
        (pitch("ok.toml", "--pitch=0"), 64),
        (pitch("ok.toml", "--pitch 60 --spacer-nm abc"), 64),
        (
            pitch("ok.toml", "--pitch 60 --spacer-nm= --contact-nm 12"),
            64,
        ),
        (
            pitch(
                "ok.toml",
                "--pitch 60 --spacer-nm 8 --contact-nm 12 --spacer-material xx",
            ),
            64,
        ),
        (
            pitch(
                "ok.toml",
                "--pitch 60 --spacer-nm 8 --contact-nm 12 --spacer-material=",
            ),
            64,
        ),
        (pitch("ok.toml", "--pitch 60 --spacer-nm 8"), 64), // no contact width anywhere
        (
            pitch("ok.toml", "--pitch 20 --spacer-nm 5 --contact-nm 12"),
            64,
        ), // no gate left
        // template
        (vec!["template".into(), "double-gate".into()], 0),
        (vec!["template".into(), "quad-gate".into()], 1),
        (vec!["template".into()], 64),
    ];
    for (args, code) in cases {
        let out = gatehold().args(&args).output().unwrap();
        assert_eq!(
            out.status.code(),
            Some(i32::from(code)),
            "gatehold {}\nstdout: {}\nstderr: {}",
            args.join(" "),
            String::from_utf8_lossy(&out.stdout),
            String::from_utf8_lossy(&out.stderr)
        );
        if code == 1 || code == 64 {
            assert!(
                String::from_utf8_lossy(&out.stderr).contains("error"),
                "gatehold {}: a refusal says why on stderr",
                args.join(" ")
            );
        }
    }
    // The base device was not overwritten by the refused sweep.
    assert_eq!(std::fs::read_to_string(d.join("ok.toml")).unwrap(), dg);
}
