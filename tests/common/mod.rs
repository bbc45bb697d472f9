//! Shared helpers for integration tests.
#![allow(dead_code)]

use gatehold::device::{parse_device, Scenario};

/// A device from TOML text (panics with the error: tests only).
pub fn device(text: &str) -> Scenario {
    parse_device(text).unwrap_or_else(|e| panic!("bad test device: {e}\n{text}"))
}

/// A small, fast double gate (coarse mesh, 0.04 V gate steps) for sweep,
/// cluster and sweep-file tests.
pub const TINY_DG: &str = r#"
name = "tiny-dg"
architecture = "double-gate"
[geometry]
gate_length_nm = 15
body_thickness_nm = 5
source_drain_length_nm = 8
gate_height_nm = 5
[[gate_stack]]
material = "SiO2"
thickness_nm = 1.0
[gate]
workfunction_eV = 4.6
[bias]
vgs_start_V = -0.3
vgs_stop_V = 0.6
vgs_step_V = 0.04
[mesh]
max_step_nm = 1.0
"#;

/// Undoped symmetric double gate with a single SiO2 layer.
pub fn double_gate(lg_nm: f64, tsi_nm: f64, tox_nm: f64, extra: &str) -> Scenario {
    device(&format!(
        r#"
name = "dg-test"
architecture = "double-gate"
[geometry]
gate_length_nm = {lg_nm}
body_thickness_nm = {tsi_nm}
[[gate_stack]]
material = "SiO2"
thickness_nm = {tox_nm}
[gate]
workfunction_eV = 4.61
[doping]
channel_cm3 = 0
{extra}
"#
    ))
}

/// Relative error.
pub fn rel(a: f64, b: f64) -> f64 {
    ((a - b) / b).abs()
}

/// The natural-length report of a device (solving the long-channel column
/// for a bulk device's depletion depth), as `gatehold lambda` computes it.
pub fn lambda_of(
    s: &Scenario,
) -> Result<gatehold::theory::LambdaReport, gatehold::evaluate::ReferenceError> {
    gatehold::evaluate::natural_length(s, &gatehold::progress::Silent)
}

/// One device solved alone (its reference included).
pub fn solve_device(s: &Scenario) -> gatehold::evaluate::DeviceSolution {
    let r = gatehold::evaluate::Reference::of(s, &gatehold::progress::Silent).expect("reference");
    gatehold::evaluate::device::solve_planar(s, &r, &gatehold::progress::Silent).expect("run")
}

/// The report of `s` solved in 3D at gate length `l_nm` (its own reference).
pub fn solve_fin_at(s: &Scenario, l_nm: f64) -> gatehold::evaluate::DeviceReport {
    let sc = s.with_gate_length(l_nm).unwrap();
    let ev = gatehold::evaluate::evaluate_alone(&sc, &gatehold::progress::Silent).unwrap();
    assert_eq!(ev.report.method, gatehold::evaluate::Method::ThreeDSolve);
    ev.report
}

/// Mesh refinement study (common practice): `s` at `l_nm` against the same
/// device with `mesh.refinement = 2`; V_t,lin within 1 mV and DIBL within
/// 3 %. Prints both solves.
pub fn assert_3d_mesh_converged(label: &str, s: &Scenario, l_nm: f64) {
    let a = solve_fin_at(s, l_nm);
    let mut fine = s.clone();
    fine.mesh.refinement = 2.0;
    let b = solve_fin_at(&fine, l_nm);
    for r in [&a, &b] {
        assert!(r.problems.is_empty(), "{label}: {:?}", r.problems);
    }
    let dvt = 1000.0 * (a.vt_lin_v.unwrap() - b.vt_lin_v.unwrap());
    let ddibl = a.dibl_mv_per_v.unwrap() / b.dibl_mv_per_v.unwrap() - 1.0;
    println!(
        "{label}: V_t {:.5} vs {:.5} V ({dvt:.3} mV), DIBL {:.2} vs {:.2} mV/V ({:.2} %), nodes {} vs {}",
        a.vt_lin_v.unwrap(),
        b.vt_lin_v.unwrap(),
        a.dibl_mv_per_v.unwrap(),
        b.dibl_mv_per_v.unwrap(),
        100.0 * ddibl,
        a.nodes,
        b.nodes
    );
    assert!(dvt.abs() < 1.0, "{label}: {dvt} mV");
    assert!(ddibl.abs() < 0.03, "{label}: {ddibl}");
}
