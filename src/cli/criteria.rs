//! The screening-criteria options shared by `scan` and `sweep` (`demo` has its own defaults).

use clap::Args;

use gatehold::evaluate::{Criteria, CriteriaError};

/// `--dibl-max`, `--ss-max`, `--vt-rolloff-max` (each over the plan's `[criteria]` key).
#[derive(Debug, Clone, Default, Args)]
pub struct CriteriaArgs {
    /// Screening target on DIBL, mV/V (default: the plan's `[criteria]`; the demo's 100 mV/V; common practice, not a standard).
    #[arg(long, value_name = "MV_PER_V")]
    pub dibl_max: Option<f64>,
    /// Screening target on the larger of SS at V_DS,lin and V_DS,sat, mV/dec (default: the plan's; the demo's 80).
    #[arg(long, value_name = "MV_PER_DEC")]
    pub ss_max: Option<f64>,
    /// Screening target on |V_t roll-off|, mV (optional).
    #[arg(long, value_name = "MV")]
    pub vt_rolloff_max: Option<f64>,
}

impl CriteriaArgs {
    /// `base` with the given options put in place (each checked to be a positive number).
    pub fn over(&self, base: &Criteria) -> Result<Criteria, CriteriaError> {
        base.overridden(self.dibl_max, self.ss_max, self.vt_rolloff_max)
    }
}
