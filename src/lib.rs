//! # gatehold
//!
//! Screening-level electrostatic integrity of short-gate transistors: a real
//! 2D nonlinear Poisson solve per geometry gives threshold roll-off, DIBL,
//! subthreshold swing and barrier lowering; the natural length of any stack
//! or fin cross-section is computed numerically beside the published closed forms.
//!
//! Data flows one way:
//!
//! | stage | module | entry point |
//! |---|---|---|
//! | constants, materials | [`physics`] | [`physics::Silicon::at`] |
//! | device file to checked scenario | [`device`] | [`device::load_device`], [`device::parse_device`] |
//! | mesh lines | [`mesh`] | [`mesh::graded_line`] |
//! | structure (materials, nodes, doping) | [`structure`] | [`structure::along_channel`], [`structure::long_channel_column`] |
//! | box-integration discretisation | [`discretize`] | [`discretize::Problem`] |
//! | Newton solve, sparse Cholesky | [`solve`] | [`solve::PoissonSolver`] |
//! | quasi-Fermi level and current | [`transport`] | [`transport::quasi_fermi`] |
//! | bias sweeps and the whole device | [`run`] | [`run::run_device`] |
//! | V_t, SS, DIBL, barriers | [`extract`] | [`extract::threshold`] |
//! | closed forms, natural length | [`theory`] | [`theory::closed_form`] |
//! | the built-in demonstration | [`demo`] | [`demo::run_demo`] |
//!
//! Limitations: classical (Boltzmann) carriers, no quantum confinement, no
//! velocity saturation, constant mobility, a quasi-Fermi level uniform over
//! each cross-section. Results rank geometries before full device simulation;
//! they are not sign-off figures.

pub mod crosssection;
pub mod demo;
pub mod device;
pub mod discretize;
pub mod extract;
pub mod io;
pub mod long_channel;
pub mod mesh;
pub mod physics;
pub mod plot;
pub mod run;
pub mod scan;
pub mod solve;
pub mod structure;
pub mod summary;
pub mod sweep;
pub mod theory;
pub mod transport;
