//! Whole devices and scans: the stage that turns a checked scenario into a
//! result, orchestrating structure, solve, extraction and theory.
//!
//! | piece | module | entry point |
//! |---|---|---|
//! | length-independent results, once per cross-section | [`reference`] | [`Reference::of`], [`natural_length`] |
//! | one device at one gate length | [`device`] | [`evaluate`], [`evaluate_alone`] |
//! | the report type and its enums | [`report`] | [`DeviceReport`], [`Status`], [`Method`] |
//! | screening criteria and their verdict | [`criteria`] | [`Criteria::judge`] |
//! | gate-length scans | [`scan`] | [`scan::scan`] |
//! | capacitances, on-current and delay estimates | [`capacitance`] | [`capacitance::device_capacitance`] |
//! | splits of a contacted gate pitch | [`pitch`] | [`pitch::run_pitch`] |

pub mod capacitance;
pub mod criteria;
pub mod device;
pub mod pitch;
pub mod reference;
pub mod report;
pub mod scan;

pub use criteria::{
    shortest_compliant, AnswerKind, Criteria, CriteriaError, CriteriaVerdict, Criterion,
    LengthPoint, ShortestAnswer,
};
pub use device::{evaluate, evaluate_alone, DeviceSolution, EvaluateError, Evaluation};
pub use reference::{natural_length, FinSection, Reference, ReferenceError};
pub use report::{DeviceReport, Method, Status, CAUTION};
