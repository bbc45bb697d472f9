//! The demo's pitch study, as data: the invented ridge-7 node's double gate
//! at one contacted gate pitch, split three ways in spacer material (and
//! two spacer thicknesses, so that the trade-off between gate length and
//! spacer shows), run through the ordinary [`crate::evaluate::pitch::run_pitch`].

use crate::evaluate::pitch::PitchSpec;

/// The pitch of the demo node, nm (invented).
pub const PITCH_NM: f64 = 48.0;
/// Spacer thicknesses, nm.
pub const SPACER_THICKNESS_NM: [f64; 2] = [5.0, 8.0];
/// The three spacer materials: nitride, a low-k oxide, an air gap.
pub const SPACERS: [&str; 3] = ["Si3N4", "SiOC", "air"];
/// Contact width, nm.
pub const CONTACT_WIDTH_NM: f64 = 16.0;
/// Name of the pitch table in the demo's output folder.
pub const PITCH_FILE: &str = "pitch.txt";

/// The base device of the study: the demo's device file as a double gate
/// (its gate sweep starting at -0.5 V, as the demo plan does for the double
/// gate, so that the shortest split's SS window is inside the sweep).
pub fn base_table() -> toml::Table {
    let mut root: toml::Table = super::BASE_DEVICE
        .parse()
        .expect("the demo device is valid TOML");
    root.insert(
        "architecture".into(),
        toml::Value::String("double-gate".into()),
    );
    if let Some(b) = root.get_mut("bias").and_then(|b| b.as_table_mut()) {
        b.insert("vgs_start_V".into(), toml::Value::Float(-0.5));
    }
    root
}

/// The splits of the study.
pub fn spec() -> PitchSpec {
    PitchSpec {
        pitch_nm: PITCH_NM,
        spacer_thickness_nm: SPACER_THICKNESS_NM.to_vec(),
        spacers: SPACERS.iter().map(|s| s.to_string()).collect(),
        contact_width_nm: vec![CONTACT_WIDTH_NM],
    }
}
