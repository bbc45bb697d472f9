//! One double-gate device, end to end: the device file as TOML text, the 2D
//! along-channel solve at both drain biases, and every figure with its unit.
//!
//! Run: `cargo run --release --example one_device`  (about 1-2 s)
//!
//! It should print (gatehold 0.1.0; an invented 8 nm undoped body, 20 nm gate,
//! SiO2 0.6 nm + HfO2 2 nm, default 0.5 nm mesh):
//!   V_t,lin        0.3133 V
//!   V_t,sat        0.2504 V
//!   V_t,long       0.3739 V
//!   SS lin/sat     74.9 / 73.9 mV/dec
//!   DIBL           84.0 mV/V
//!   roll-off       -60.6 mV
//!   lambda numeric 4.2072 nm
//!

use gatehold::device::parse_device;
use gatehold::evaluate::{evaluate_alone, CAUTION};
use gatehold::progress::Silent;

const DEVICE: &str = r#"
name = "example-dg"
architecture = "double-gate"
[geometry]
gate_length_nm = 20
body_thickness_nm = 8
[[gate_stack]]
material = "SiO2"
thickness_nm = 0.6
[[gate_stack]]
material = "HfO2"
thickness_nm = 2.0
[gate]
workfunction_eV = 4.55
[doping]
channel_cm3 = 1e15
[bias]
vgs_start_V = -0.2
vgs_stop_V = 0.6
vgs_step_V = 0.025
"#;

fn main() -> Result<(), Box<dyn std::error::Error>> {
    let s = parse_device(DEVICE)?;
    let r = evaluate_alone(&s, &Silent)?.report;
    let v = |x: Option<f64>| x.map_or("n/a".to_string(), |x| format!("{x:.4}"));
    let m = |x: Option<f64>| x.map_or("n/a".to_string(), |x| format!("{x:.1}"));
    println!(
        "{} ({}, L_g = {} nm, EOT = {:.3} nm, {})",
        r.name, r.architecture, r.gate_length_nm, r.eot_nm, r.method
    );
    println!("V_t,lin        {} V", v(r.vt_lin_v));
    println!("V_t,sat        {} V", v(r.vt_sat_v));
    println!("V_t,long       {} V", v(r.vt_long_v));
    println!(
        "SS lin/sat     {} / {} mV/dec",
        m(r.ss_lin_mv_per_dec),
        m(r.ss_sat_mv_per_dec)
    );
    println!("DIBL           {} mV/V", m(r.dibl_mv_per_v));
    println!("roll-off       {} mV", m(r.vt_rolloff_mv));
    println!("lambda numeric {} nm", v(r.lambda_numeric_nm));
    for p in &r.problems {
        println!("problem: {p}");
    }
    println!("caution: {CAUTION}");
    Ok(())
}
