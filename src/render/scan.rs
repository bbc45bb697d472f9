//! The console table of a gate-length scan (`gatehold scan`).

use super::fmt;
use crate::evaluate::scan::ScanReport;

/// Console table of a scan.
pub fn render_text(r: &ScanReport) -> String {
    let f = fmt;
    let mut o = format!(
        "{} ({}): {}\n  lambda numeric {:.2} nm{}; closed forms: {}\n",
        r.name,
        r.architecture,
        r.method,
        r.lambda_numeric_nm,
        r.lambda_dielectric_path_nm
            .map(|d| format!(" (dielectric path {d:.2} nm)"))
            .unwrap_or_default(),
        r.lambda_closed_forms
            .iter()
            .map(|(k, v)| format!("{k} {v:.2} nm"))
            .collect::<Vec<_>>()
            .join(", ")
    );
    for (what, fit) in [
        ("barrier lowering", &r.lambda_fitted_barrier),
        ("DIBL", &r.lambda_fitted),
    ] {
        if let Some(fit) = fit {
            o.push_str(&format!(
                "  lambda fitted to the solved {what}: {:.2} nm (R^2 {:.4}, {} lengths)\n",
                fit.lambda_nm, fit.r_squared, fit.points
            ));
        }
    }
    if let Some(p) = &r.lambda_fitted_barrier_fixed_path {
        o.push_str(&format!(
            "  lambda fitted to the solved barrier lowering on one path (y {:.2} nm, z {:.2} nm, the shortest \
             length's leakiest line): {:.2} nm (R^2 {:.4}, {} lengths; {:+.1} % of the numeric lambda)\n",
            p.path_y_nm,
            p.path_z_nm,
            p.fit.lambda_nm,
            p.fit.r_squared,
            p.fit.points,
            100.0 * (p.fit.lambda_nm / r.lambda_numeric_nm - 1.0)
        ));
    }
    o.push_str(&format!(
        "  V_t,long {:.4} V, SS_long {:.1} mV/dec, theory barrier V_bi - phi_s {:.3} V\n\n",
        r.vt_long_v, r.ss_long_mv_per_dec, r.theory_barrier_v
    ));
    o.push_str("   L_g nm  L_g/lambda | roll-off mV  theory | DIBL mV/V  theory | SS mV/dec  theory | status\n");
    for row in &r.rows {
        o.push_str(&format!(
            "  {:7.1}  {:10.2} | {:>11} {:>7} | {:>9} {:>7} | {:>9} {:>7} | {}\n",
            row.gate_length_nm,
            row.lg_over_lambda,
            f(row.vt_rolloff_mv, 1),
            f(row.theory_rolloff_mv, 1),
            f(row.dibl_mv_per_v, 1),
            f(row.theory_dibl_mv_per_v, 1),
            f(row.ss_lin_mv_per_dec, 1),
            f(row.theory_ss_mv_per_dec, 1),
            row.status
        ));
    }
    if r.rows.iter().any(|row| row.l_elec_nm.is_some()) {
        o.push_str("\n   L_g nm  L_met nm  L_elec nm | roll-off mV = electrostatic + length (+ rest) | I_off A/um\n");
        for row in &r.rows {
            let rest = row
                .vt_rolloff_mv
                .zip(row.vt_rolloff_electrostatic_mv)
                .zip(row.vt_rolloff_length_mv)
                .map(|((t, e), l)| t - e - l);
            o.push_str(&format!(
                "  {:7.1}  {:8.2}  {:>9} | {:>11} = {:>13} + {:>6} ({:>5}) | {:>10}\n",
                row.gate_length_nm,
                row.l_met_nm,
                f(row.l_elec_nm, 2),
                f(row.vt_rolloff_mv, 1),
                f(row.vt_rolloff_electrostatic_mv, 1),
                f(row.vt_rolloff_length_mv, 1),
                f(rest, 1),
                row.ioff_a_per_um
                    .map_or("n/a".into(), |x| format!("{x:.3e}")),
            ));
            for w in &row.warnings {
                o.push_str(&format!("      warning: {w}\n"));
            }
        }
        if let Some(t) = &r.terada_muta {
            o.push_str(&format!(
                "  Terada-Muta (channel resistance across the {} lengths at V_G = {:.3} and {:.3} V): \
                 L_g - L_elec = {:.2} nm, R_sd {:.3e} Ohm um\n",
                t.lengths, t.vgs_v.0, t.vgs_v.1, t.delta_l_nm, t.r_sd_ohm_um
            ));
        }
    }
    if let (Some(c), Some(a)) = (&r.criteria, &r.shortest) {
        let crit = crate::evaluate::Criteria {
            dibl_max_mv_per_v: c.dibl_max_mv_per_v,
            ss_max_mv_per_dec: c.ss_max_mv_per_dec,
            vt_rolloff_max_mv: c.vt_rolloff_max_mv,
        };
        o.push('\n');
        o.push_str(&super::shortest::heading(&crit));
        o.push_str("  ");
        o.push_str(&super::shortest::answer_line(
            &r.name,
            a,
            Some(r.lambda_numeric_nm),
        ));
    }
    if r.theory_length == "electrical" {
        o.push_str("\nTheory columns at L = L_elec (--theory-length electrical; pessimistic: L_elec also counts the spill-over).");
    }
    o.push_str(&format!("\nTheory: Liu et al., IEEE TED 40(1), 86, 1993, with the numeric natural length.\nCaution: {}\n", r.caution));
    o
}
