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
