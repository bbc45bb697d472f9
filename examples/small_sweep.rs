//! A small sweep: a double-gate device at four gate lengths, run in parallel
//! into an HDF5 file in the system temporary folder, then read back and
//! printed row by row.
//!
//! Run: `cargo run --release --example small_sweep`  (a few seconds)
//!
//! It should print (gatehold 0.1.0; the folder name and time vary):
//!   wrote /tmp/gatehold-small-sweep-NNNN/sweep.h5: 4 points, 0 failed, 1.1 s
//!     L_g nm   V_t,lin V   DIBL mV/V   SS mV/dec   meets  status
//!       15.0      0.2649       166.1        86.8       0  ok
//!       20.0      0.3131        84.3        74.0       1  ok
//!       30.0      0.3454        33.4        64.8       1  ok
//!       45.0      0.3589        17.2        61.4       1  ok
//! (`meets`: 1 when DIBL <= 100 mV/V and SS <= 80 mV/dec, the plan's [criteria].)

use gatehold::io::hdf5::read_sweep;
use gatehold::sweep::{parse_plan, run_sweep, Quiet, SweepOptions};

const PLAN: &str = r#"
[base]
name = "small-sweep-dg"
architecture = "double-gate"
[base.geometry]
gate_length_nm = 20
body_thickness_nm = 8
[[base.gate_stack]]
material = "SiO2"
thickness_nm = 0.6
[[base.gate_stack]]
material = "HfO2"
thickness_nm = 2.0
[base.gate]
workfunction_eV = 4.55
[base.doping]
channel_cm3 = 1e15
[base.bias]
vgs_start_V = -0.4
vgs_stop_V = 0.6
vgs_step_V = 0.025
[base.mesh]
max_step_nm = 1.0

[axes]
"geometry.gate_length_nm" = [15, 20, 30, 45]

[criteria]
dibl_max_mV_per_V = 100
ss_max_mV_per_dec = 80
"#;

fn main() -> Result<(), Box<dyn std::error::Error>> {
    let dir = std::env::temp_dir().join(format!("gatehold-small-sweep-{}", std::process::id()));
    std::fs::create_dir_all(&dir)?;
    let out = dir.join("sweep.h5");
    let plan = parse_plan(PLAN, &dir)?;
    let opts = SweepOptions {
        overwrite: true,
        ..SweepOptions::default()
    };
    let summary = run_sweep(&plan, &out, &opts, &Quiet)?;
    println!(
        "wrote {}: {} points, {} failed, {:.1} s",
        out.display(),
        summary.computed,
        summary.failed,
        summary.elapsed_s
    );
    let f = read_sweep(&out)?;
    let col = |n: &str| f.figure(n).ok_or(format!("no column {n}"));
    let (lg, vt, dibl, ss) = (
        col("gate_length_nm")?,
        col("vt_lin_V")?,
        col("dibl_mV_per_V")?,
        col("ss_sat_mV_per_dec")?,
    );
    println!("  L_g nm   V_t,lin V   DIBL mV/V   SS mV/dec   meets  status");
    for (k, r) in f.rows.iter().enumerate() {
        println!(
            "  {:6.1}   {:9.4}   {:9.1}   {:9.1}   {:5}  {}",
            lg[k],
            vt[k],
            dibl[k],
            ss[k],
            r.meets_criteria.code(),
            r.status
        );
    }
    std::fs::remove_dir_all(&dir)?;
    Ok(())
}
