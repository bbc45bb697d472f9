//! The `gatehold pitch` table and its JSON object.

use serde::Serialize;

use super::fmt;
use crate::evaluate::pitch::{PitchRow, PitchStudy};
use crate::evaluate::{DeviceReport, CAUTION};

/// The `pitch --json` object: `rows` and `best` (one of the rows, or null) are the contract.
#[derive(Debug, Serialize)]
pub struct PitchJson<'a> {
    #[serde(rename = "pitch_nm")]
    pub pitch_nm: f64,
    pub rows: &'a [PitchRow],
    pub best: Option<&'a PitchRow>,
    /// How `best` is chosen.
    pub best_rule: &'static str,
    #[serde(rename = "dibl_max_mV_per_V")]
    pub dibl_max_mv_per_v: Option<f64>,
    #[serde(rename = "ss_max_mV_per_dec")]
    pub ss_max_mv_per_dec: Option<f64>,
    pub skipped: Vec<String>,
    pub estimate_note: &'static str,
    pub caution: &'static str,
}

/// How the best split is chosen.
pub const BEST_RULE: &str =
    "the split meeting every criterion with the smallest tau_ps (ties: the first listed)";

/// What the on-current and delay are.
pub const ESTIMATE_NOTE: &str = "I_on and tau are screening estimates: virtual-source I_on/W = C_inv (V_DD - V_t,sat) v_x0 \
(Khakifirooz, Nayfeh and Antoniadis, IEEE TED 56(8), 1674, 2009) with C_inv from the solve and an input injection velocity; \
tau = (C_gg + 2 C_gc) V_DD / I_on with C_gg, C_gc the means of their off and on values; capacitances per um of width at V_DS = 0, C_gc to one plug";

pub fn pitch_json(study: &PitchStudy) -> PitchJson<'_> {
    PitchJson {
        pitch_nm: study.pitch_nm,
        rows: &study.rows,
        best: study.best(),
        best_rule: BEST_RULE,
        dibl_max_mv_per_v: study.dibl_max_mv_per_v,
        ss_max_mv_per_dec: study.ss_max_mv_per_dec,
        skipped: study
            .skipped
            .iter()
            .map(|(s, why)| {
                format!(
                    "spacer {} nm {}, contact {} nm: {why}",
                    s.spacer_thickness_nm, s.spacer, s.contact_width_nm
                )
            })
            .collect(),
        estimate_note: ESTIMATE_NOTE,
        caution: CAUTION,
    }
}

fn af(v: Option<f64>, scale: f64, digits: usize) -> String {
    fmt(v.map(|x| x * scale), digits)
}

/// The table: one line per split, the best marked, then the best in words.
pub fn pitch_text(study: &PitchStudy) -> String {
    let mut out = format!(
        "Contacted gate pitch {} nm = L_g + 2 t_spacer + W_contact; criteria: DIBL <= {} mV/V, SS <= {} mV/dec\n\n",
        study.pitch_nm,
        fmt(study.dibl_max_mv_per_v, 0),
        fmt(study.ss_max_mv_per_dec, 0)
    );
    out.push_str(&format!(
        "  {:>6} {:>6} {:<8} {:>6} {:>7} {:>6} {:>6} {:>8} {:>8} {:>8} {:>7} {:<5}\n",
        "L_g",
        "t_sp",
        "spacer",
        "W_c",
        "V_t,sat",
        "SS",
        "DIBL",
        "C_gc",
        "C_gg",
        "I_on",
        "tau",
        "meets"
    ));
    out.push_str(&format!(
        "  {:>6} {:>6} {:<8} {:>6} {:>7} {:>6} {:>6} {:>8} {:>8} {:>8} {:>7} {:<5}\n",
        "nm", "nm", "", "nm", "V", "mV/dec", "mV/V", "aF/um", "aF/um", "uA/um", "ps", ""
    ));
    for (i, r) in study.rows.iter().enumerate() {
        let mark = if Some(i) == study.best_index {
            "*"
        } else {
            " "
        };
        let c = r.capacitance.as_ref();
        let ss = r
            .ss_lin_mv_per_dec
            .zip(r.ss_sat_mv_per_dec)
            .map(|(a, b)| a.max(b));
        out.push_str(&format!(
            "{mark} {:>6.2} {:>6.2} {:<8} {:>6.2} {:>7} {:>6} {:>6} {:>8} {:>8} {:>8} {:>7} {:<5}\n",
            r.gate_length_nm,
            r.spacer_thickness_nm,
            r.spacer,
            r.contact_width_nm,
            fmt(r.vt_sat_v, 3),
            fmt(ss, 1),
            fmt(r.dibl_mv_per_v, 1),
            af(c.map(|c| c.on.gate_contact), 1e18, 1),
            af(c.map(|c| c.on.gate_total), 1e18, 1),
            af(r.ion_a_per_um, 1e6, 0),
            fmt(r.tau_ps, 3),
            match r.meets_criteria {
                Some(true) => "yes",
                Some(false) => "no",
                None => "n/a",
            }
        ));
        if r.status != "ok" {
            out.push_str(&format!("         ({})\n", r.status));
        }
    }
    out.push_str(
        "\nSS: the larger of SS at V_DS,lin and V_DS,sat. C_gc (one plug) and C_gg: on state (V_G = V_DD, V_DS = 0), per um of width.\n",
    );
    for (s, why) in &study.skipped {
        out.push_str(&format!(
            "skipped: spacer {} nm {}, contact {} nm: {why}\n",
            s.spacer_thickness_nm, s.spacer, s.contact_width_nm
        ));
    }
    match study.best() {
        Some(b) => out.push_str(&format!(
            "\nBest compliant split (*): L_g = {:.2} nm, {} nm {} spacers, {} nm contact: tau = {} ps, I_on = {} uA/um, DIBL = {} mV/V.\n",
            b.gate_length_nm,
            b.spacer_thickness_nm,
            b.spacer,
            b.contact_width_nm,
            fmt(b.tau_ps, 3),
            af(b.ion_a_per_um, 1e6, 0),
            fmt(b.dibl_mv_per_v, 1)
        )),
        None => out.push_str("\nNo split meets the criteria.\n"),
    }
    out.push_str(&format!("\n{ESTIMATE_NOTE}.\n{CAUTION}\n"));
    out
}

/// The capacitance and estimate lines of `gatehold run` (empty for fins).
pub fn capacitance_text(r: &DeviceReport) -> String {
    let Some(c) = &r.capacitance else {
        return String::new();
    };
    let mut o = String::from(
        "  gate capacitance, aF/um of width (V_DS = 0)    off (V_G = 0)   on (V_G = V_DD)\n",
    );
    for (label, off, on) in [
        ("C_gg total", c.off.gate_total, c.on.gate_total),
        (
            "to one contact plug (C_gc)",
            c.off.gate_contact,
            c.on.gate_contact,
        ),
        (
            "to one side's source/drain silicon",
            c.off.gate_source_drain,
            c.on.gate_source_drain,
        ),
        (
            "to the channel (intrinsic)",
            c.off.gate_channel,
            c.on.gate_channel,
        ),
        (
            "other (back plane, substrate, body)",
            c.off.gate_other,
            c.on.gate_other,
        ),
    ] {
        // aF/um; rounding noise (|C| < 1e-3 aF/um) shown as 0, not -0.0.
        let af = |v: f64| if v.abs() < 1e-21 { 0.0 } else { 1e18 * v };
        o.push_str(&format!(
            "    {label:<42} {:>12.1} {:>15.1}\n",
            af(off),
            af(on)
        ));
    }
    o.push_str(&format!(
        "  I_on estimate (virtual source, v_x0 input)   {:>12} uA/um (screening estimate)\n",
        fmt(r.ion_a_per_um.map(|i| 1e6 * i), 0)
    ));
    o.push_str(&format!(
        "  delay estimate (C_gg + 2 C_gc) V_DD / I_on   {:>12} ps (screening estimate)\n",
        fmt(r.tau_ps, 3)
    ));
    o
}
