//! Theory beside the solves: closed-form natural lengths and short-channel estimates.

pub mod closed_form;
