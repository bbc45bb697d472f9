//! Progress from the library to whoever listens (the library never prints):
//! finished bias points, and each solve of a kind that costs real time, so
//! that a caller can show progress or count the work done.

/// A solve of a kind worth reporting.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum SolveKind {
    /// One gate ramp of the along-channel section at one drain bias.
    GateRamp,
    /// One long-channel (Pao-Sah) extraction on a cross-section at uniform quasi-Fermi level.
    LongChannel,
    /// One numeric natural length (eigenproblem of a stack or cross-section).
    NaturalLength,
}

/// Receives progress (implementations must be thread-safe: points run in parallel).
pub trait Observer: Sync {
    /// One bias point finished.
    fn bias_point(&self, _vds_v: f64, _vgs_v: f64, _converged: bool) {}
    /// One solve of `kind` finished (converged or not).
    fn solved(&self, _kind: SolveKind) {}
}

/// An observer that ignores everything.
pub struct Silent;
impl Observer for Silent {}
