//! The text of one device's report (`gatehold run`) and its curves as CSV.

use super::fmt;
use crate::evaluate::DeviceReport;

/// A readable summary of one device, with units and the standing caution.
pub fn device_text(r: &DeviceReport) -> String {
    let mut o = String::new();
    let line = |o: &mut String, label: &str, value: String, unit: &str| {
        o.push_str(&format!("  {label:<44} {value:>12} {unit}\n"));
    };
    o.push_str(&format!(
        "{} ({} {}-channel, {} K)\n",
        r.name, r.architecture, r.polarity, r.temperature_k
    ));
    o.push_str(&format!("  method: {}\n", r.method.describe()));
    line(
        &mut o,
        "gate length L_g",
        format!("{:.2}", r.gate_length_nm),
        "nm",
    );
    line(
        &mut o,
        "metallurgical channel length L_met",
        format!("{:.2}", r.l_met_nm),
        "nm",
    );
    line(
        &mut o,
        "electrical channel length L_elec",
        fmt(r.l_elec_nm, 2),
        "nm (N_top int dx/N at 1e-2 I_th, V_DS,lin)",
    );
    line(&mut o, "EOT", format!("{:.3}", r.eot_nm), "nm");
    line(
        &mut o,
        &format!("V_t at V_DS = {} V", r.vds_lin_v),
        fmt(r.vt_lin_v, 4),
        "V",
    );
    line(
        &mut o,
        &format!("V_t at V_DS = {} V", r.vds_sat_v),
        fmt(r.vt_sat_v, 4),
        "V",
    );
    line(
        &mut o,
        "V_t long channel (1D, Pao-Sah)",
        fmt(r.vt_long_v, 4),
        "V",
    );
    line(
        &mut o,
        "V_t roll-off (lin - long)",
        fmt(r.vt_rolloff_mv, 1),
        "mV",
    );
    line(
        &mut o,
        "  electrostatic part (barrier top vs long)",
        fmt(r.vt_rolloff_electrostatic_mv, 1),
        "mV",
    );
    line(
        &mut o,
        "  electrical-length part SS log10(L_elec/L_g)",
        fmt(r.vt_rolloff_length_mv, 1),
        "mV",
    );
    line(
        &mut o,
        "  rest (slope difference, charge at V_t)",
        fmt(r.vt_rolloff_residual_mv, 1),
        "mV (docs/electrical-length.md)",
    );
    line(
        &mut o,
        "SS at V_DS,lin",
        fmt(r.ss_lin_mv_per_dec, 1),
        "mV/dec",
    );
    line(
        &mut o,
        "SS at V_DS,sat",
        fmt(r.ss_sat_mv_per_dec, 1),
        "mV/dec",
    );
    line(
        &mut o,
        "SS long channel",
        fmt(r.ss_long_mv_per_dec, 1),
        "mV/dec",
    );
    line(&mut o, "DIBL", fmt(r.dibl_mv_per_v, 1), "mV/V");
    line(
        &mut o,
        "  of which long-channel floor",
        fmt(r.dibl_long_floor_mv_per_v, 1),
        "mV/V (not subtracted)",
    );
    line(
        &mut o,
        &format!(
            "I_off at V_GS = {} V, V_DS = {} V",
            r.off_vgs_v, r.vds_sat_v
        ),
        r.ioff_a_per_um.map_or("n/a".into(), |x| format!("{x:.3e}")),
        "A/um",
    );
    line(
        &mut o,
        "barrier at V_DS,lin",
        fmt(r.barrier_lin_ev, 4),
        "eV",
    );
    line(
        &mut o,
        "barrier at V_DS,sat",
        fmt(r.barrier_sat_ev, 4),
        "eV",
    );
    line(
        &mut o,
        "barrier lowering",
        fmt(r.barrier_lowering_mev, 1),
        "meV",
    );
    line(
        &mut o,
        "leakiest path depth",
        fmt(r.leakiest_depth_nm, 2),
        "nm below the top Si surface",
    );
    if r.leakiest_y_nm.is_some() {
        line(
            &mut o,
            "leakiest path across the fin (y)",
            fmt(r.leakiest_y_nm, 2),
            "nm from the fin centre",
        );
    }
    line(
        &mut o,
        "natural length (numeric)",
        fmt(r.lambda_numeric_nm, 2),
        "nm",
    );
    line(
        &mut o,
        &format!(
            "natural length ({})",
            r.natural_length_formula.as_deref().unwrap_or("closed form")
        ),
        fmt(r.natural_length_nm, 2),
        "nm (closed form, EOT-based)",
    );
    if let Some(l) = r.lambda_numeric_nm.or(r.natural_length_nm) {
        line(
            &mut o,
            "L_g / natural length",
            format!("{:.1}", r.gate_length_nm / l),
            "(common practice: at least 5-6)",
        );
    }
    o.push_str(&super::pitch::capacitance_text(r));
    o.push_str(&format!(
        "  mesh {} nodes ({} unknowns); {} bias points; {} Newton steps, {} {}; converged: {}\n",
        r.nodes,
        r.unknowns,
        r.bias_points,
        r.newton_steps_total,
        r.factorisations_total,
        match r.linear_solver {
            Some("multigrid-cg") =>
                "multigrid set-ups (linear solver: multigrid-preconditioned CG)",
            _ => "factorisations",
        },
        r.converged
    ));
    o.push_str(&format!(
        "  V_t criterion: I_D = {:.3e} A x W/L_g = {:.3e} A/um; currents in {}\n",
        r.current_criterion_a, r.threshold_current_a_per_um, r.current_unit
    ));
    for w in &r.warnings {
        o.push_str(&format!("  warning: {w}\n"));
    }
    for p in &r.problems {
        o.push_str(&format!("  not computed: {p}\n"));
    }
    o.push_str(&format!("\nCaution: {}\n", r.caution));
    o
}

/// I_D-V_G curves as CSV (units in the header).
pub fn curves_csv(r: &DeviceReport) -> String {
    let mut o = format!(
        "vgs_V,id_lin_A_per_um_at_{}V,id_sat_A_per_um_at_{}V\n",
        r.vds_lin_v, r.vds_sat_v
    );
    let cell = |v: Option<f64>| {
        v.map(|x| format!("{x:.6e}"))
            .unwrap_or_else(|| "NaN".into())
    };
    for (k, v) in r.vgs_v.iter().enumerate() {
        o.push_str(&format!(
            "{v:.6},{},{}\n",
            cell(r.id_lin[k]),
            cell(r.id_sat[k])
        ));
    }
    o
}
