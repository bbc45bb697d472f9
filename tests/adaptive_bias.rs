//! Adaptive bias points and gate ranges that extend by themselves.
//!
//! - The adaptive choice of gate voltages (`bias.points = "adaptive"`, the
//!   default) gives the figures of the whole grid (`"grid"`): V_t within
//!   0.1 mV and SS within 0.1 mV/decade (the agreement asked by the speed
//!   issue), since both read the same grid points under the definitions of
//!   MODEL.md section 5; and it solves fewer points.
//! - A gate range that misses the off state is extended (`bias.auto_extend`),
//!   says so in a warning, and with the extension off the failure names the
//!   key to change and a value to try (the range-extension check of the
//!   criteria issue: thin body, HfO2 stack, 1 nm overlap, 2 nm/decade grading,
//!   a sweep from -0.2 V; here the shortest length that can be turned off at
//!   bodies 3, 5 and 7 nm, where the range fails first; the whole 28-point set
//!   is run by `cargo test --release --test adaptive_bias -- --ignored`).
//!   At a 7 nm body, 12 and 14 nm gates (merged junctions, L_met = 0) have no
//!   off state within 5 V at V_DS,sat: they fail with the message naming the
//!   key, as any range would; the 28 points are L_g 12-40 nm at 3 and 5 nm
//!   and 16-40 nm at 7 nm.

mod common;

use common::*;
use gatehold::device::{load_device, BiasPoints, Scenario};

fn demo(file: &str) -> Scenario {
    let path = std::path::Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("meshes")
        .join(file);
    load_device(&path).unwrap()
}

fn agree(file: &str) {
    let mut s = demo(file);
    s.bias.points = BiasPoints::Grid;
    let grid = solve_device(&s).report;
    s.bias.points = BiasPoints::Adaptive;
    let adaptive = solve_device(&s).report;
    for r in [&grid, &adaptive] {
        assert!(r.problems.is_empty(), "{file}: {:?}", r.problems);
    }
    let pairs = [
        ("V_t,lin (mV)", grid.vt_lin_v, adaptive.vt_lin_v, 1e3, 0.1),
        ("V_t,sat (mV)", grid.vt_sat_v, adaptive.vt_sat_v, 1e3, 0.1),
        (
            "SS,lin (mV/dec)",
            grid.ss_lin_mv_per_dec,
            adaptive.ss_lin_mv_per_dec,
            1.0,
            0.1,
        ),
        (
            "SS,sat (mV/dec)",
            grid.ss_sat_mv_per_dec,
            adaptive.ss_sat_mv_per_dec,
            1.0,
            0.1,
        ),
        (
            "barrier lowering (meV)",
            grid.barrier_lowering_mev,
            adaptive.barrier_lowering_mev,
            1.0,
            0.01,
        ),
    ];
    for (name, g, a, scale, tol) in pairs {
        let (g, a) = (g.unwrap(), a.unwrap());
        let d = scale * (g - a);
        println!("{file}: {name} grid {g:.6} adaptive {a:.6} ({d:+.2e})");
        assert!(d.abs() < tol, "{file}: {name} differs by {d}");
    }
    println!(
        "{file}: {} grid points, {} adaptive; {} vs {} factorisations",
        grid.bias_points,
        adaptive.bias_points,
        grid.factorisations_total,
        adaptive.factorisations_total
    );
    assert!(
        2 * adaptive.bias_points < grid.bias_points,
        "{file}: adaptive solved {} points, the grid {}",
        adaptive.bias_points,
        grid.bias_points
    );
    // The adaptive curve holds only solved, converged points at the drain bias that solved them.
    assert_eq!(adaptive.vgs_v.len(), adaptive.id_lin.len());
    let solved = adaptive
        .id_lin
        .iter()
        .chain(&adaptive.id_sat)
        .flatten()
        .count();
    assert_eq!(solved, adaptive.bias_points);
}

#[test]
fn adaptive_points_match_the_grid_double_gate() {
    agree("double-gate.toml");
}

#[test]
fn adaptive_points_match_the_grid_thin_body() {
    agree("thin-body.toml");
}

#[test]
fn adaptive_points_match_the_grid_bulk() {
    agree("bulk.toml");
}

/// The criteria issue's thin-body case: 5 nm body by default, SiO2/HfO2
/// stack, junctions 1 nm under the gate graded 2 nm/decade, a gate sweep
/// from -0.2 V that leaks at the off end for short gates.
fn range_case(lg_nm: f64, tsi_nm: f64, extra: &str) -> Scenario {
    device(&format!(
        r#"
name = "range-case"
architecture = "thin-body"
[geometry]
gate_length_nm = {lg_nm}
body_thickness_nm = {tsi_nm}
box_thickness_nm = 20
source_drain_length_nm = 15
[[gate_stack]]
material = "SiO2"
thickness_nm = 0.6
[[gate_stack]]
material = "HfO2"
thickness_nm = 2.0
[gate]
workfunction_eV = 4.6
back_workfunction_eV = 4.6
[doping]
channel_cm3 = 1e15
source_drain_cm3 = 1e20
junction_offset_nm = 1
junction_gradient_nm_per_decade = 2
[bias]
vgs_start_V = -0.2
vgs_stop_V = 0.8
vgs_step_V = 0.02
{extra}
"#
    ))
}

fn range_case_runs(lg_nm: f64, tsi_nm: f64) {
    let s = range_case(lg_nm, tsi_nm, "");
    let sol = solve_device(&s);
    let r = &sol.report;
    assert!(
        r.problems.is_empty(),
        "L_g {lg_nm} nm, body {tsi_nm} nm: {:?}",
        r.problems
    );
    println!(
        "L_g {lg_nm} body {tsi_nm}: V_t,lin {:.4} V, SS {:.1} mV/dec, DIBL {:.1} mV/V, extended to {:?} / {:?}",
        r.vt_lin_v.unwrap(),
        r.ss_lin_mv_per_dec.unwrap(),
        r.dibl_mv_per_v.unwrap(),
        sol.lin.extended_to_v,
        sol.sat.extended_to_v
    );
    let extended = !sol.lin.extended_to_v.is_empty() || !sol.sat.extended_to_v.is_empty();
    assert_eq!(
        extended,
        r.warnings.iter().any(|w| w.contains("bias.auto_extend")),
        "an extension is always said: {:?}",
        r.warnings
    );
}

#[test]
fn short_gates_extend_their_range_by_themselves() {
    for (lg, tsi) in [(12.0, 3.0), (12.0, 5.0), (16.0, 7.0)] {
        range_case_runs(lg, tsi);
    }
    // They need the extension: without it the failure names the key and a
    // value to try.
    let with = solve_device(&range_case(12.0, 3.0, "")).report;
    assert!(with.warnings.iter().any(|w| w.contains("extended to")));
    let s = range_case(12.0, 3.0, "auto_extend = false");
    let r = solve_device(&s).report;
    let all = r.problems.join("\n");
    assert!(
        !r.problems.is_empty(),
        "the -0.2 V start must miss the window"
    );
    assert!(all.contains("set bias.vgs_start_V = -"), "{all}");
    assert!(all.contains("raise bias.extend_limit_V by"), "{all}");
    // Trying the suggested value works (the suggestion is a real value).
    let v: f64 = all
        .split("set bias.vgs_start_V = ")
        .nth(1)
        .and_then(|t| t.split_whitespace().next())
        .and_then(|t| t.parse().ok())
        .expect("a number after the key");
    let mut s2 = s.clone();
    s2.bias.vgs_start_v = v;
    let r2 = solve_device(&s2).report;
    assert!(r2.problems.is_empty(), "with {v} V: {:?}", r2.problems);
    assert!((r2.vt_lin_v.unwrap() - with.vt_lin_v.unwrap()).abs() < 1e-4);
}

#[test]
fn the_whole_grid_extends_too_and_agrees() {
    let mut s = range_case(12.0, 3.0, "");
    let adaptive = solve_device(&s).report;
    s.bias.points = BiasPoints::Grid;
    let sol = solve_device(&s);
    assert!(sol.report.problems.is_empty(), "{:?}", sol.report.problems);
    assert!(!sol.lin.extended_to_v.is_empty() || !sol.sat.extended_to_v.is_empty());
    let d = 1e3 * (sol.report.vt_lin_v.unwrap() - adaptive.vt_lin_v.unwrap());
    let dss = sol.report.ss_sat_mv_per_dec.unwrap() - adaptive.ss_sat_mv_per_dec.unwrap();
    assert!(d.abs() < 0.1 && dss.abs() < 0.1, "{d} mV, {dss} mV/dec");
}

/// The whole range-extension case: 28 points, L_g 12-40 nm at bodies 3 and
/// 5 nm, 16-40 nm at 7 nm (see the top of the file).
#[test]
#[ignore = "about a minute; run with --ignored"]
fn the_whole_range_case_runs_clean() {
    let lengths = [12.0, 14.0, 16.0, 18.0, 20.0, 22.0, 25.0, 28.0, 32.0, 40.0];
    let mut n = 0;
    for tsi in [3.0, 5.0, 7.0] {
        for &lg in lengths.iter().filter(|&&l| tsi < 6.0 || l >= 16.0) {
            range_case_runs(lg, tsi);
            n += 1;
        }
    }
    assert_eq!(n, 28);
}
