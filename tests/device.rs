//! Whole-device checks of the 2D solve and extraction (sources named at each check).

mod common;

use common::*;
use gatehold::device::Scenario;
use gatehold::evaluate::DeviceReport;
use gatehold::physics::{thermal_voltage, EPS0_F_PER_M, EPS_SI, Q_C};
use gatehold::solve::UniformChannel;
use rayon::prelude::*;

fn run(s: &Scenario) -> DeviceReport {
    let r = solve_device(s).report;
    assert!(r.converged, "{}: {:?}", s.name, r.problems);
    assert!(r.problems.is_empty(), "{}: {:?}", s.name, r.problems);
    r
}

fn ideal_ss() -> f64 {
    // ln(10) V_T: the ideal subthreshold swing (Sze and Ng, 2007, ch. 6).
    std::f64::consts::LN_10 * thermal_voltage(300.0) * 1000.0
}

#[test]
fn long_undoped_double_gate_has_ideal_swing() {
    // Undoped double gate, L = 300 nm: SS within 0.5 mV/dec of ln(10) V_T
    // (Sze and Ng, Physics of Semiconductor Devices, 3rd ed., 2007, ch. 6: full gate control).
    let s = double_gate(
        300.0,
        8.0,
        1.0,
        "[bias]\nvgs_start_V = -0.2\nvgs_stop_V = 0.45\nvgs_step_V = 0.02\n[mesh]\nmax_step_nm = 2.0\n",
    );
    let r = run(&s);
    let ideal = ideal_ss();
    println!(
        "SS lin {:?} sat {:?} long {:?} ideal {ideal}",
        r.ss_lin_mv_per_dec, r.ss_sat_mv_per_dec, r.ss_long_mv_per_dec
    );
    for ss in [
        r.ss_lin_mv_per_dec.unwrap(),
        r.ss_sat_mv_per_dec.unwrap(),
        r.ss_long_mv_per_dec.unwrap(),
    ] {
        assert!((ss - ideal).abs() < 0.5, "SS {ss} vs ideal {ideal}");
    }
}

#[test]
fn long_doped_bulk_swing_matches_depletion_capacitance() {
    // Doped bulk: SS = ln(10) V_T (1 + C_dep/C_ox) (Sze and Ng, Physics of
    // Semiconductor Devices, 3rd ed., 2007, ch. 6), C_dep = eps_Si / W_d,
    // W_d = sqrt(2 eps_Si (psi_s - V_T) / (q N_A)) (ch. 4), at the surface
    // potential in the middle of the SS window. That form neglects the
    // psi_s^(-1/2) prefactor of the weak-inversion charge
    // (I ~ psi_s^(-1/2) exp(psi_s/V_T): Taur and Ning, Fundamentals of Modern
    // VLSI Devices, 2nd ed., 2009, ch. 3; from memory), which divides SS by
    // (1 - V_T / (2 (psi_s - V_T))), about 1.5 % here. Checked: the solves
    // within 1 mV/dec of the form with the prefactor, and within 2 mV/dec of
    // the plain form (the difference is reported on the issue).
    let na = 1e18;
    let s = device(&format!(
        r#"
name = "long-bulk"
architecture = "bulk"
[geometry]
gate_length_nm = 500
junction_depth_nm = 10
substrate_depth_nm = 80
[[gate_stack]]
material = "SiO2"
thickness_nm = 1.5
[gate]
workfunction_eV = 4.3
[doping]
channel_cm3 = {na}
[bias]
vgs_start_V = -0.4
vgs_stop_V = 0.7
vgs_step_V = 0.02
[mesh]
max_step_nm = 2.5
"#
    ));
    let r = run(&s);
    let vt = thermal_voltage(300.0);
    // Surface potential (against the neutral bulk) two decades below threshold.
    let vg_mid = r.vt_long_v.unwrap() - 2.0 * r.ss_long_mv_per_dec.unwrap() / 1000.0;
    let mut col = UniformChannel::column(&s).unwrap();
    col.sheet_density(vg_mid, 0.0).unwrap();
    let p = &col.problem;
    let js = p.y.index_of(0.0).unwrap();
    let si = p.silicon;
    let psi_bulk = -si.thermal_v * (na * 1e-21 / (2.0 * si.ni)).asinh();
    let psis = col.potential()[js * p.nx] - psi_bulk;
    let eps_si = EPS_SI * EPS0_F_PER_M * 1e-2; // F/cm
    let wd_cm = (2.0 * eps_si * (psis - vt) / (Q_C * na)).sqrt();
    let cdep = eps_si / wd_cm;
    let cox = s.cox_f_per_cm2();
    let plain = ideal_ss() * (1.0 + cdep / cox);
    let with_prefactor = plain / (1.0 - vt / (2.0 * (psis - vt)));
    let (ss2d, ss1d) = (r.ss_lin_mv_per_dec.unwrap(), r.ss_long_mv_per_dec.unwrap());
    println!(
        "psi_s {psis:.4} V, W_d {:.2} nm, C_dep/C_ox {:.4}: plain {plain:.2}, with prefactor {with_prefactor:.2}, 2D {ss2d:.2}, 1D {ss1d:.2} mV/dec",
        wd_cm * 1e7,
        cdep / cox,
    );
    for ss in [ss2d, ss1d] {
        assert!(
            (ss - with_prefactor).abs() < 1.0,
            "{ss} vs {with_prefactor}"
        );
        assert!((ss - plain).abs() < 2.0, "{ss} vs {plain}");
    }
}

#[test]
fn two_d_threshold_approaches_the_long_channel_reference() {
    // MODEL.md section 5: source/drain electrons spill a fixed length into the
    // channel ends, so the gap to the 1D Pao-Sah reference falls as 1/L:
    // gap(4 um) < gap(1 um) / 2 and < 0.5 mV.
    let gaps: Vec<f64> = [1000.0, 4000.0]
        .par_iter()
        .map(|&l| {
            let s = double_gate(
                l,
                8.0,
                1.0,
                "[bias]\nvgs_start_V = 0.0\nvgs_stop_V = 0.5\nvgs_step_V = 0.02\n[mesh]\nmax_step_nm = 5.0\n",
            );
            let r = run(&s);
            let gap = 1000.0 * (r.vt_lin_v.unwrap() - r.vt_long_v.unwrap());
            println!("L = {l} nm: V_t,lin {:?}, V_t,long {:?}, gap {gap:.4} mV", r.vt_lin_v, r.vt_long_v);
            gap.abs()
        })
        .collect();
    assert!(gaps[1] < 0.5 * gaps[0], "gaps {gaps:?}");
    assert!(gaps[1] < 0.5, "gap at 4 um {} mV", gaps[1]);
}

#[test]
fn p_channel_is_the_mirror_image() {
    // MODEL.md section 3: a p-channel device is the mirror image of the n-channel one.
    let base = device(
        r#"
name = "mirror"
architecture = "thin-body"
[geometry]
gate_length_nm = 20
body_thickness_nm = 6
box_thickness_nm = 10
[[gate_stack]]
material = "SiO2"
thickness_nm = 1.0
[gate]
workfunction_eV = 4.5
back_workfunction_eV = 4.9
[doping]
channel_cm3 = 1e17
junction_gradient_nm_per_decade = 2
[bias]
vgs_start_V = -0.4
vgs_stop_V = 0.6
vgs_step_V = 0.025
[mesh]
max_step_nm = 1.0
"#,
    );
    let n = run(&base);
    let p = run(&common::mirrored(&base));
    let pairs = [
        ("vt_lin", n.vt_lin_v.unwrap(), -p.vt_lin_v.unwrap()),
        ("vt_sat", n.vt_sat_v.unwrap(), -p.vt_sat_v.unwrap()),
        ("vt_long", n.vt_long_v.unwrap(), -p.vt_long_v.unwrap()),
        (
            "ss_lin",
            n.ss_lin_mv_per_dec.unwrap(),
            p.ss_lin_mv_per_dec.unwrap(),
        ),
        (
            "ss_sat",
            n.ss_sat_mv_per_dec.unwrap(),
            p.ss_sat_mv_per_dec.unwrap(),
        ),
        ("dibl", n.dibl_mv_per_v.unwrap(), p.dibl_mv_per_v.unwrap()),
        (
            "barrier_lowering_eV", // in eV, like the potentials
            1e-3 * n.barrier_lowering_mev.unwrap(),
            1e-3 * p.barrier_lowering_mev.unwrap(),
        ),
    ];
    for (name, a, b) in pairs {
        println!("{name}: n {a:.12} p(mirrored) {b:.12}");
        assert!((a - b).abs() < 1e-9, "{name}: {a} vs {b}");
    }
    // Adaptive bias points: a gate voltage solved at one drain bias only is None at the other.
    assert!(
        p.id_lin.iter().flatten().count() > 5 && p.id_lin.iter().flatten().all(|&i| i < 0.0),
        "p-channel drain current is negative"
    );
}

#[test]
fn shorter_gates_lose_control_monotonically() {
    // Physics sanity (Frank, Taur and Wong 1998; common practice): as L_g shrinks,
    // DIBL grows, V_t rolls off, SS grows, and SS is never below ln(10) V_T.
    let lengths = [10.0, 14.0, 20.0, 30.0, 45.0];
    let rs: Vec<DeviceReport> = lengths
        .par_iter()
        .map(|&l| {
            run(&double_gate(
                l,
                8.0,
                1.0,
                "[bias]\nvgs_start_V = -0.7\nvgs_stop_V = 0.5\nvgs_step_V = 0.02\n",
            ))
        })
        .collect();
    for (l, r) in lengths.iter().zip(&rs) {
        println!(
            "L {l:5.1} nm: V_t,lin {:.4} V roll-off {:7.1} mV DIBL {:6.1} mV/V SS {:5.1} mV/dec",
            r.vt_lin_v.unwrap(),
            r.vt_rolloff_mv.unwrap(),
            r.dibl_mv_per_v.unwrap(),
            r.ss_lin_mv_per_dec.unwrap()
        );
    }
    for w in rs.windows(2) {
        let (short, long) = (&w[0], &w[1]);
        assert!(short.dibl_mv_per_v.unwrap() > long.dibl_mv_per_v.unwrap());
        assert!(short.vt_lin_v.unwrap() < long.vt_lin_v.unwrap());
        assert!(short.vt_rolloff_mv.unwrap() < long.vt_rolloff_mv.unwrap());
        assert!(short.ss_lin_mv_per_dec.unwrap() > long.ss_lin_mv_per_dec.unwrap());
    }
    let ideal = ideal_ss();
    for r in &rs {
        for ss in [
            r.ss_lin_mv_per_dec.unwrap(),
            r.ss_sat_mv_per_dec.unwrap(),
            r.ss_long_mv_per_dec.unwrap(),
        ] {
            assert!(ss > ideal - 1e-6, "SS {ss} below the ideal {ideal}");
        }
    }
}

#[test]
fn bad_ranges_are_reported_not_extrapolated() {
    // The sweep stops below threshold: V_t and SS are missing with a reason and a suggestion.
    // (With bias.auto_extend off: the range is not extended by itself.)
    let s = double_gate(20.0, 8.0, 1.0, "[bias]\nvgs_start_V = -0.3\nvgs_stop_V = 0.05\nvgs_step_V = 0.05\nauto_extend = false\n[mesh]\nmax_step_nm = 1.0\n");
    let r = solve_device(&s).report;
    assert!(r.vt_lin_v.is_none() && r.dibl_mv_per_v.is_none());
    assert!(
        r.problems
            .iter()
            .any(|p| p.contains("set bias.vgs_stop_V = ")),
        "{:?}",
        r.problems
    );
    let json = serde_json::to_value(&r).unwrap();
    assert!(json["vt_lin_V"].is_null());
}
