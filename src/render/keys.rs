//! The device-file and plan reference (`docs/device-file.md`), rendered from
//! the validator's own tables so that it cannot drift: the key list
//! ([`crate::device::known_keys`]), the accepted ranges
//! ([`crate::device::LIMITS`]), the input-size and node budgets, and the plan
//! keys of [`crate::sweep::plan`]. Regenerate with
//! `cargo run --release -- keys > docs/device-file.md`; a test fails when the
//! committed file differs.

use std::fmt::Write;

use crate::device::{
    known_keys, limit_of, Architecture, DEFAULT_MAX_NODES, LIMITS, MAX_INPUT_BYTES,
};
use crate::physics::KNOWN_DIELECTRICS;
use crate::sweep::plan::{CRITERIA_KEYS, MAX_POINTS, OUTPUT_KEYS, PLAN_KEYS};

/// What the keys without a numeric range accept (the validator checks each
/// in `device::scenario_from_table`). A key missing here still appears in
/// the reference, pointing to the template.
fn note(key: &str) -> Option<String> {
    let dielectrics = KNOWN_DIELECTRICS
        .iter()
        .map(|d| format!("`{d}`"))
        .collect::<Vec<_>>()
        .join(", ");
    Some(match key {
        "name" => "text, required: names the device in every output".into(),
        "architecture" => format!(
            "required, one of {}",
            Architecture::ALL
                .iter()
                .map(|a| format!("`{}`", a.name()))
                .collect::<Vec<_>>()
                .join(", ")
        ),
        "polarity" => "`n` (default) or `p`; p-channel biases are typed negative".into(),
        "geometry.spacer" | "geometry.box_material" | "geometry.cap_material" => {
            format!("a dielectric name: {dielectrics}")
        }
        "gate_stack.N.material" => format!(
            "a dielectric name ({dielectrics}); give it or `relative_permittivity`, not both"
        ),
        "doping.channel_cm3" => "0 (undoped) or 1e10 to 5e20 cm^-3".into(),
        "doping.subfin_cm3" => "bulk-fin: dopants of the sub-fin and substrate (the punch-through \
             stopper, the channel's type), 0 (undoped) or 1e10 to 5e20 cm^-3; default: \
             doping.channel_cm3"
            .into(),
        "doping.junction_offset_nm" => {
            "nm; positive: the junctions reach under the gate (overlap), negative: underlap; \
             less than half the gate length and an underlap shorter than the source/drain silicon"
                .into()
        }
        "bias.points" => "`auto` (default: adaptive unless an output stores the whole curve), \
             `adaptive` (only the gate voltages the extraction needs) or `grid` (every gate \
             voltage from vgs_start_V to vgs_stop_V)"
            .into(),
        "bias.auto_extend" => "`true` (default) or `false`: extend the gate range by itself, \
             up to bias.extend_limit_V beyond each end, when a drain sweep misses the threshold \
             current, the SS window or the off-state point"
            .into(),
        _ => return None,
    })
}

fn is_table(key: &str, keys: &[String]) -> bool {
    keys.iter().any(|k| k.starts_with(&format!("{key}.")))
}

fn range_text(min: f64, max: f64) -> String {
    format!(
        "{} to {}",
        crate::device::show_number(min),
        crate::device::show_number(max)
    )
}

/// The whole reference as markdown.
pub fn reference_markdown() -> String {
    let keys = known_keys();
    let mut s = String::new();
    let w = &mut s;
    let _ = writeln!(w, "# Device-file and plan reference");
    let _ = writeln!(w);
    let _ = writeln!(
        w,
        "Generated from the validator's own tables (`device::known_keys`, `device::LIMITS`, \
         `sweep::plan`); do not edit by hand. Regenerate with \
         `cargo run --release -- keys > docs/device-file.md`."
    );
    let _ = writeln!(w);
    let _ = writeln!(
        w,
        "A device file is TOML: every length in nm, doping in cm^-3, voltages in V, work \
         functions in eV. `gatehold template ARCHITECTURE` prints a commented file with the \
         defaults. Unknown keys are errors naming the closest known key; a value outside its \
         range is an error naming the key, the value, the range and why. Keys that an \
         architecture does not use are accepted with a warning."
    );
    let _ = writeln!(w);
    let _ = writeln!(w, "## Device keys");
    let _ = writeln!(w);
    let _ = writeln!(w, "| key | unit | accepted | why |");
    let _ = writeln!(w, "|---|---|---|---|");
    for k in &keys {
        if is_table(k, &keys) {
            continue;
        }
        match (limit_of(k), note(k)) {
            (Some(l), _) => {
                let _ = writeln!(
                    w,
                    "| `{k}` | {} | {} | {} |",
                    if l.unit.is_empty() { "1" } else { l.unit },
                    range_text(l.min, l.max),
                    l.why
                );
            }
            (None, Some(n)) => {
                let _ = writeln!(w, "| `{k}` | | {n} | |");
            }
            (None, None) => {
                let _ = writeln!(w, "| `{k}` | | see `gatehold template` | |");
            }
        }
    }
    let _ = writeln!(w);
    let _ = writeln!(
        w,
        "`gate_stack` is an array of tables (`[[gate_stack]]`, layers from the channel outward); \
         `gate_stack.N` is layer N, counted from 0, in plan keys."
    );
    let _ = writeln!(w);
    let _ = writeln!(w, "## Budgets checked before anything is built");
    let _ = writeln!(w);
    let _ = writeln!(
        w,
        "- Device and plan files (and a plan's `base`) must be regular files of at most \
         {MAX_INPUT_BYTES} bytes."
    );
    let _ = writeln!(
        w,
        "- The mesh node count is estimated from the geometry and mesh keys; beyond \
         `mesh.max_nodes` (default {}) the device is refused naming the estimate and the key \
         that dominates it.",
        crate::device::show_number(DEFAULT_MAX_NODES)
    );
    let _ = writeln!(w, "- A plan expands to at most {MAX_POINTS} points.");
    let _ = writeln!(w);
    let _ = writeln!(w, "## Plan files");
    let _ = writeln!(w);
    let _ = writeln!(
        w,
        "Top-level keys: {}. `base` is a device file path (relative to the plan) or an inline \
         `[base]` table. `[axes]` and `[zip]` map device keys (as in the table above, \
         `gate_stack.N.key` with the layer's index) to an array of values or a range \
         `{{ start, stop, step }}` (stop included). `[output]` keys: {}. `[criteria]` keys \
         (each optional, positive): {}. See `docs/hdf5-schema.md` for the point order and the \
         output file.",
        list(PLAN_KEYS),
        list(OUTPUT_KEYS),
        list(CRITERIA_KEYS)
    );
    let _ = writeln!(w);
    debug_assert!(LIMITS.iter().all(|l| l.min <= l.max));
    s
}

fn list(keys: &[&str]) -> String {
    keys.iter()
        .map(|k| format!("`{k}`"))
        .collect::<Vec<_>>()
        .join(", ")
}
