//! Theory beside the solves: pure functions of solved inputs (no nonlinear
//! solve runs here). Closed-form natural lengths, the numerical natural length
//! of stacks and cross-sections (a linear eigenproblem), and the short-channel
//! model evaluated from a long-channel reference that the caller solved.
//!
//! | what | entry point |
//! |---|---|
//! | closed forms (Yan 1992, Suzuki 1993, Colinge 2004, Frank-Taur-Wong 1998 exact 1D) | [`closed_form`] |
//! | sparse generalised eigen solver (subspace iteration, one Cholesky) | [`eigen::lowest_modes`] |
//! | numeric lambda of a 1D stack / 2D cross-section, the report | [`lambda::Stack::natural_length`], [`lambda::section_natural_lengths`], [`lambda::lambda_report`] |
//! | quasi-2D short-channel model (Liu et al. 1993), lambda fit | [`short_channel::estimate`], [`short_channel::TheoryInputs`], [`short_channel::fit_lambda_from_dibl`] |

pub mod closed_form;
pub mod eigen;
pub mod lambda;
pub mod short_channel;

use crate::device::Architecture;
use crate::structure::CrossSectionError;
use eigen::EigenError;

pub use lambda::{lambda_report, DepthSource, LambdaReport};
pub use short_channel::{ShortChannelEstimate, TheoryInputs};

/// What failed in a theory computation.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum TheoryError {
    #[error("natural-length eigen solve failed: {0}")]
    Eigen(#[from] EigenError),
    #[error("cross-section: {0}")]
    CrossSection(#[from] CrossSectionError),
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
