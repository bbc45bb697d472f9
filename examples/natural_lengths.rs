//! Natural length (lambda) of several gate stacks and bodies side by side:
//! the numeric value (1D stack eigenproblem for planar devices, 2D
//! cross-section for the tri-gate) beside every closed form that applies.
//! Thinner EOT and more gates shorten lambda; L_g / lambda of about 5 or more
//! is the usual rule of thumb for a well-behaved device.
//!
//! Run: `cargo run --release --example natural_lengths`  (under 1 s)
//!
//! It should print (gatehold 0.1.0; L_g = 25 nm):
//!   architecture body nm  EOT nm  lambda nm  L_g/lam  stack                  closed forms, nm
//!   double-gate      8.0   1.000      4.231     5.91  SiO2 1 nm              frank-taur-wong-1998-double-gate-exact 4.23, suzuki-1993-double-gate 3.46
//!   double-gate      8.0   0.955      4.207     5.94  SiO2 0.6 + HfO2 2 nm   frank-taur-wong-1998-double-gate-exact 4.17, suzuki-1993-double-gate 3.38
//!   thin-body        6.0   0.955      7.866     3.18  SiO2 0.6 + HfO2 2 nm   frank-taur-wong-1998-floating-bottom-exact 5.52, yan-1992-single-gate 4.15
//!   tri-gate         8.0   0.955      4.234     5.90  SiO2 0.6 + HfO2 2 nm   colinge-2004-n3 2.76
//! The high-k stack with a slightly smaller EOT barely changes the double-gate
//! lambda (the physically thick HfO2 fringes); the thin body on 20 nm of buried
//! oxide is much longer than its closed forms (the field reaches through the oxide).

use gatehold::device::parse_device;
use gatehold::evaluate::natural_length;
use gatehold::progress::Silent;

/// A device at L_g = 25 nm: architecture, body (or fin) nm, and the gate-stack TOML.
fn device(arch: &str, body_nm: f64, stack: &str) -> String {
    format!(
        r#"
name = "{arch}"
architecture = "{arch}"
[geometry]
gate_length_nm = 25
body_thickness_nm = {body_nm}
fin_height_nm = 30
box_thickness_nm = 20
{stack}
[gate]
workfunction_eV = 4.55
[doping]
channel_cm3 = 1e15
[mesh]
max_step_nm = 0.5
"#
    )
}

const SIO2_1NM: &str = "[[gate_stack]]\nmaterial = \"SiO2\"\nthickness_nm = 1.0";
const HIGH_K: &str = "[[gate_stack]]\nmaterial = \"SiO2\"\nthickness_nm = 0.6\n[[gate_stack]]\nmaterial = \"HfO2\"\nthickness_nm = 2.0";

fn main() -> Result<(), Box<dyn std::error::Error>> {
    let cases = [
        ("double-gate", 8.0, "SiO2 1 nm", SIO2_1NM),
        ("double-gate", 8.0, "SiO2 0.6 + HfO2 2 nm", HIGH_K),
        ("thin-body", 6.0, "SiO2 0.6 + HfO2 2 nm", HIGH_K),
        ("tri-gate", 8.0, "SiO2 0.6 + HfO2 2 nm", HIGH_K),
    ];
    println!(
        "{:<12} {:>7} {:>7} {:>10} {:>8}  {:<22} closed forms, nm",
        "architecture", "body nm", "EOT nm", "lambda nm", "L_g/lam", "stack"
    );
    for (arch, body, stack_name, stack) in cases {
        let s = parse_device(&device(arch, body, stack))?;
        let r = natural_length(&s, &Silent)?;
        let forms: Vec<String> = r
            .lambda_closed_forms
            .iter()
            .map(|(k, v)| format!("{k} {v:.2}"))
            .collect();
        println!(
            "{:<12} {:>7.1} {:>7.3} {:>10.3} {:>8.2}  {:<22} {}",
            arch,
            body,
            r.eot_nm,
            r.lambda_numeric_nm,
            r.lg_over_lambda,
            stack_name,
            forms.join(", ")
        );
    }
    Ok(())
}
