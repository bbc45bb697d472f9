//! Theory beside the solves: closed-form natural lengths, the numerical
//! natural length of stacks and cross-sections, and short-channel estimates.
//!
//! | what | entry point |
//! |---|---|
//! | closed forms (Yan 1992, Suzuki 1993, Colinge 2004, Frank-Taur-Wong 1998 exact 1D) | [`closed_form`] |
//! | sparse generalised eigen solver (subspace iteration, one Cholesky) | [`eigen::lowest_modes`] |
//! | numeric lambda of a 1D stack / 2D cross-section, the report | [`lambda::Stack::natural_length`], [`lambda::section_natural_lengths`], [`lambda::lambda_report`] |
//! | quasi-2D short-channel model (Liu et al. 1993), lambda fit, fin predictions | [`short_channel`], [`short_channel::predict_fin`] |

pub mod closed_form;
pub mod eigen;
pub mod lambda;
pub mod short_channel;

use crate::crosssection::CrossSectionError;
use crate::device::Architecture;
use crate::long_channel::LongChannelError;
use eigen::EigenError;

pub use lambda::{lambda_report, render_text, LambdaReport};
pub use short_channel::{predict_fin, FinPrediction};

/// What failed in a theory computation.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum TheoryError {
    #[error("natural-length eigen solve failed: {0}")]
    Eigen(#[from] EigenError),
    #[error("cross-section: {0}")]
    CrossSection(#[from] CrossSectionError),
    #[error("long-channel reference failed: {0}")]
    LongChannel(#[from] LongChannelError),
    #[error("{what} does not apply to architecture {architecture}")]
    NotApplicable {
        what: String,
        architecture: Architecture,
    },
    #[error("{what} = {value}: {reason}")]
    InvalidInput {
        what: String,
        value: f64,
        reason: String,
    },
    #[error(
        "none of the {modes} slowest cross-section modes has {fraction} of its eps-weighted norm in silicon; \
         the body mode lies deeper (refine the mesh or check the geometry)"
    )]
    NoBodyMode { modes: usize, fraction: f64 },
    #[error("the short-channel model breaks down: {0}")]
    ModelBreakdown(String),
}
