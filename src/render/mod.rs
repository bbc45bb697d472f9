//! Every text table and summary the tool prints: consumers of results,
//! never computing them.
//!
//! | text | module | entry point |
//! |---|---|---|
//! | one device (`run`), its curves as CSV | [`device`] | [`device::device_text`], [`device::curves_csv`] |
//! | a gate-length scan | [`scan`] | [`scan::render_text`] |
//! | a natural-length report | [`lambda`] | [`lambda::render_text`] |
//! | the device-file and plan reference (`docs/device-file.md`) | [`keys`] | [`keys::reference_markdown`] |
//! | a contacted-gate-pitch study (`pitch`) | [`pitch`] | [`pitch::pitch_text`], [`pitch::pitch_json`] |
//! | the demo's summary, shortest compliant lengths of a sweep | [`summary`] | [`summary::demo_text`], [`summary::shortest_text`] |

pub mod device;
pub mod keys;
pub mod lambda;
pub mod pitch;
pub mod scan;
pub mod shortest;
pub mod summary;

/// A value with `digits` decimals, or "n/a".
pub fn fmt(v: Option<f64>, digits: usize) -> String {
    match v {
        Some(x) => format!("{x:.digits$}"),
        None => "n/a".into(),
    }
}
