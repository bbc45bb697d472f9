//! Extraction: the definitions every output uses (MODEL.md section 5).
//!
//! | figure | module | entry point |
//! |---|---|---|
//! | V_t (constant current), SS, DIBL from I_D-V_G curves | [`curve`] | [`curve::threshold`], [`curve::swing`], [`curve::ramp_figures`] |
//! | the gate voltages the extraction needs (adaptive bias points, range extension) | [`adaptive`] | [`adaptive::adaptive_ramp`] |
//! | the leakiest path's barrier | [`barrier`] | [`barrier::barrier`] |
//! | electrical channel length, roll-off split | [`electrical_length`] | [`electrical_length::electrical_length`], [`electrical_length::split_rolloff`] |
//! | long-channel V_t and SS (Pao-Sah), bulk depletion depth | [`long_channel`] | [`long_channel::extract_long_channel`] |

pub mod adaptive;
pub mod barrier;
pub mod curve;
pub mod electrical_length;
pub mod long_channel;

pub use barrier::{band_edge_ev, barrier, line_tops, Barrier};
pub use curve::{
    ascending, dibl, ramp_figures, swing, threshold, union_curves, Curve, ExtractError,
};
pub use long_channel::{extract_long_channel, LongChannel, LongChannelError};
