//! The text of a natural-length report (`gatehold lambda`).

use crate::theory::LambdaReport;

/// Console text of a [`LambdaReport`], with units.
pub fn render_text(r: &LambdaReport) -> String {
    use std::fmt::Write;
    let mut o = String::new();
    let _ = writeln!(
        o,
        "natural length of {} ({}, {})",
        r.name, r.architecture, r.method
    );
    let _ = writeln!(
        o,
        "  lambda (body, numeric)     {:8.3} nm   ({:.0} % of the mode in silicon)",
        r.lambda_numeric_nm,
        100.0 * r.body_mode_silicon_fraction
    );
    match (r.lambda_dielectric_path_nm, &r.dielectric_path_region) {
        (Some(l), Some(reg)) => {
            let _ = writeln!(o, "  dielectric path            {l:8.3} nm   (slower than the body mode; lives in the {reg})");
        }
        _ => {
            let _ = writeln!(
                o,
                "  dielectric path               none slower than the body mode"
            );
        }
    }
    for (k, v) in &r.lambda_closed_forms {
        let _ = writeln!(o, "  closed form {k:<38} {v:8.3} nm");
    }
    let _ = writeln!(o, "    ({})", r.closed_form_note);
    let _ = writeln!(
        o,
        "  EOT {:.3} nm, physical stack {:.3} nm",
        r.eot_nm, r.stack_thickness_nm
    );
    if let (Some(d), Some(src)) = (r.depletion_depth_nm, r.depletion_depth_source) {
        let _ = writeln!(o, "  depletion depth            {d:8.3} nm   ({src:?})");
    }
    let _ = writeln!(
        o,
        "  L_g = {:.2} nm, L_g/lambda = {:.2}: {}",
        r.gate_length_nm, r.lg_over_lambda, r.verdict_text
    );
    if let Some(x) = r.lg_over_lambda_dielectric_path {
        let _ = writeln!(o, "  L_g/lambda (dielectric path) = {x:.2}");
    }
    let _ = writeln!(o, "  rule of thumb: {}", r.rule_of_thumb);
    if !r.modes.is_empty() {
        let _ = writeln!(o, "  modes, slowest first:");
        for m in &r.modes {
            let _ = writeln!(
                o,
                "    {:8.3} nm  {:5.1} % silicon  mostly {}",
                m.lambda_nm,
                100.0 * m.silicon_fraction,
                m.region
            );
        }
    }
    o
}
