//! Commented starting device files, one per architecture (`gatehold template`).

use super::Architecture;

/// A commented device file for `arch`, every key at a sensible value.
pub fn template(arch: Architecture) -> String {
    let body = match arch {
        Architecture::Bulk => "# body_thickness_nm does not apply to bulk\njunction_depth_nm = 15         # depth of the source/drain wells\nsubstrate_depth_nm = 100       # silicon depth to the substrate contact\n",
        Architecture::ThinBody => "body_thickness_nm = 7          # silicon film\nbox_thickness_nm = 20          # buried oxide under the film; back plane below it\n",
        Architecture::DoubleGate => "body_thickness_nm = 8          # silicon between the two gates\n",
        Architecture::TriGate => "body_thickness_nm = 8          # fin width\nfin_height_nm = 30             # fin height\nbox_thickness_nm = 25          # buried oxide under the fin\n# fin_pitch_nm = 40            # default: fin width + 2 x stack + 20 nm\n",
        Architecture::GateAllAround => "body_thickness_nm = 8          # wire or sheet width\nfin_height_nm = 8              # wire or sheet height\n",
        Architecture::CappedFin => "body_thickness_nm = 8          # fin width\nfin_height_nm = 30             # fin height\ncap_thickness_nm = 10          # dielectric cap on the fin top (gate on the two sides only)\nbox_thickness_nm = 25          # buried oxide under the fin\n",
        Architecture::BulkFin => "body_thickness_nm = 8          # fin width (the sub-fin below has the same width)\nfin_height_nm = 30             # gated fin height, above the isolation top\nisolation_depth_nm = 20        # isolation oxide beside the sub-fin, below the gated fin\nsubstrate_depth_nm = 30        # substrate silicon below the isolation; substrate contact on its bottom face\n# fin_pitch_nm = 40            # default: fin width + 2 x stack + 20 nm\n",
    };
    // The bulk fin's sub-fin and substrate carry a punch-through stopper.
    let subfin = if arch == Architecture::BulkFin {
        "subfin_cm3 = 3e18              # sub-fin and substrate (punch-through stopper); default: channel_cm3\n"
    } else {
        ""
    };
    let doping = if arch == Architecture::Bulk {
        "3e18"
    } else {
        "1e15"
    };
    let wf = match arch {
        Architecture::Bulk => "4.17           # n+ poly-like gate over a doped body",
        _ => "4.61           # near-midgap metal for an undoped body",
    };
    // The bulk template's doped body leaks more at the short default gate:
    // its sweep starts lower so the SS window at V_DS,sat lies inside it.
    let vgs_start = if arch == Architecture::Bulk {
        "-0.6"
    } else {
        "-0.2"
    };
    // Fins and wires are solved in 3D: a 1 nm step and 0.04 V gate steps keep
    // one run to seconds; 0.5 nm and 0.02 V for the mesh-converged figures.
    let (gate_step, mesh_step) = if arch.is_fin() {
        ("0.04", "1.0")
    } else {
        ("0.02", "0.5")
    };
    format!(
        r#"# gatehold device file ({arch}). Lengths nm, doping cm^-3, voltages V, work functions eV.
# Run: gatehold run this.toml   (gatehold run --help for outputs)
name = "my-{arch}"
architecture = "{arch}"      # bulk | thin-body | double-gate | tri-gate | gate-all-around | capped-fin | bulk-fin
polarity = "n"                 # n | p (p: drain and gate biases negative)
temperature_K = 300

[geometry]
gate_length_nm = 25            # gate electrode length L_g
{body}source_drain_length_nm = 15    # silicon of each of source and drain beyond the gate edges
gate_height_nm = 20            # gate electrode height above the stack
spacer = "Si3N4"               # dielectric beside the gate: SiO2 | Si3N4 | SiOC | air, or spacer_permittivity = 3.0
# contact plugs (planar): any two of these three; then drop source_drain_length_nm
# gate_pitch_nm = 54           # contacted gate pitch = L_g + 2 spacer + contact
# spacer_thickness_nm = 8      # gate-to-plug spacer
# contact_width_nm = 14        # plug width

[[gate_stack]]                 # layers from the channel outward
material = "SiO2"              # SiO2 | Si3N4 | Al2O3 | HfO2, or relative_permittivity = 22
thickness_nm = 0.6
[[gate_stack]]
material = "HfO2"
thickness_nm = 2.0

[gate]
workfunction_eV = {wf}

[doping]
channel_cm3 = {doping}             # acceptors for n, donors for p; 0 = undoped
source_drain_cm3 = 1e20
junction_offset_nm = 0         # > 0 overlap under the gate, < 0 underlap
junction_gradient_nm_per_decade = 0   # 0 abrupt
{subfin}
[bias]
vds_lin_V = 0.05
vds_sat_V = 0.8
vgs_start_V = {vgs_start}
vgs_stop_V = 0.8
vgs_step_V = {gate_step}
off_vgs_V = 0.0                # barrier lowering is reported here

[extraction]
current_criterion_A = 1e-7     # V_t where I_D = I_cc W / L_g
mobility_cm2_per_Vs = 200
injection_velocity_cm_per_s = 1e7   # on-current estimate (virtual source)

[mesh]
max_step_nm = {mesh_step}              # no mesh cell larger than this (fins, 3D: 3 x this)
"#
    )
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn every_template_parses() {
        for a in Architecture::ALL {
            let s =
                crate::device::parse_device(&template(a)).unwrap_or_else(|e| panic!("{a}: {e}"));
            assert_eq!(s.architecture, a);
            assert!(s.warnings.is_empty(), "{a}: {:?}", s.warnings);
        }
    }
}
