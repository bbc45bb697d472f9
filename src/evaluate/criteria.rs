//! Screening criteria (DIBL, SS, |V_t roll-off| bounds) and their verdict on one device.

/// Pass/fail thresholds (each optional; common-practice screening targets, not standards).
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Criteria {
    pub dibl_max_mv_per_v: Option<f64>,
    /// Bound on the larger of SS at V_DS,lin and V_DS,sat, mV/dec.
    pub ss_max_mv_per_dec: Option<f64>,
    /// Bound on |V_t roll-off|, mV.
    pub vt_rolloff_max_mv: Option<f64>,
}

/// The verdict of [`Criteria::judge`] (stored as 1, 0, -1: [`CriteriaVerdict::code`]).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum CriteriaVerdict {
    /// Every criterion met.
    Meets,
    /// At least one criterion failed.
    Fails,
    /// A needed figure is missing, or no criteria were given.
    Unknown,
}

impl CriteriaVerdict {
    /// The stored integer: 1 meets, 0 fails, -1 unknown.
    pub fn code(&self) -> i64 {
        match self {
            CriteriaVerdict::Meets => 1,
            CriteriaVerdict::Fails => 0,
            CriteriaVerdict::Unknown => -1,
        }
    }

    /// From the stored integer (anything but 1 and 0 is unknown).
    pub fn from_code(code: i64) -> Self {
        match code {
            1 => CriteriaVerdict::Meets,
            0 => CriteriaVerdict::Fails,
            _ => CriteriaVerdict::Unknown,
        }
    }
}

impl Criteria {
    pub fn is_empty(&self) -> bool {
        *self == Criteria::default()
    }

    /// Judges one device's figures against every given criterion.
    pub fn judge(
        &self,
        dibl: Option<f64>,
        ss_lin: Option<f64>,
        ss_sat: Option<f64>,
        rolloff: Option<f64>,
    ) -> CriteriaVerdict {
        if self.is_empty() {
            return CriteriaVerdict::Unknown;
        }
        let mut checks: Vec<Option<bool>> = Vec::new();
        if let Some(m) = self.dibl_max_mv_per_v {
            checks.push(dibl.map(|d| d <= m));
        }
        if let Some(m) = self.ss_max_mv_per_dec {
            checks.push(ss_lin.zip(ss_sat).map(|(a, b)| a.max(b) <= m));
        }
        if let Some(m) = self.vt_rolloff_max_mv {
            checks.push(rolloff.map(|r| r.abs() <= m));
        }
        if checks.contains(&Some(false)) {
            CriteriaVerdict::Fails
        } else if checks.iter().all(|c| c.is_some()) {
            CriteriaVerdict::Meets
        } else {
            CriteriaVerdict::Unknown
        }
    }
}
