//! From a checked [`crate::device::Scenario`] to discretised structures
//! (materials, node roles, doping on a mesh):
//!
//! | structure | module | entry point |
//! |---|---|---|
//! | along-channel section of a planar device, its doping | [`planar`] | [`planar::along_channel`] |
//! | 1D long-channel column at mid-channel | [`planar`] | [`planar::long_channel_column`] |
//! | fin or wire cross-section perpendicular to the channel | [`fin`] | [`fin::cross_section`] |
//! | fin or wire in 3D along the channel (half domain) | [`fin3d`] | [`fin3d::along_fin`] |

pub mod fin;
pub mod fin3d;
pub mod planar;

pub use fin::{cross_section, CrossSection, CrossSectionError, Region, WIDTH_DEFINITION};
pub use fin3d::{along_fin, along_fin_full};
pub use planar::{
    along_channel, along_channel_extruded, long_channel_column, AlongChannel, DopingProfile, Plugs,
};

/// Electrode numbers.
pub const GATE: usize = 0;
pub const BACK_PLANE: usize = 1;
/// Contact plug over the source (planar sections with contacts).
pub const PLUG_SOURCE: usize = 2;
/// Contact plug over the drain.
pub const PLUG_DRAIN: usize = 3;
/// Number of electrode numbers in use (the length of an electrode-potential array).
pub const ELECTRODES: usize = 4;
/// Contact numbers.
pub const SOURCE: usize = 0;
pub const DRAIN: usize = 1;
pub const SUBSTRATE: usize = 2;

/// Finest step at a silicon/dielectric interface, nm (inversion layer ~1 nm; common practice).
pub const FINE_INTERFACE_NM: f64 = 0.02;
/// Finest step at junctions and gate edges, nm.
pub const FINE_JUNCTION_NM: f64 = 0.2;
/// Finest step at other refined points (gate electrode corners, well bottoms), nm.
pub const FINE_OTHER_NM: f64 = 0.25;

/// The finest step requested at hard point `x` among `fine` (point, step) pairs.
pub(crate) fn lookup(fine: &[(f64, f64)], x: f64) -> Option<f64> {
    fine.iter()
        .filter(|(p, _)| (p - x).abs() < 1e-9)
        .map(|(_, h)| *h)
        .reduce(f64::min)
}
