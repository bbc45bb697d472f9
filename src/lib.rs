//! # gatehold
//!
//! Screening-level electrostatic integrity of short-gate transistors: a real
//! 2D nonlinear Poisson solve per geometry gives threshold roll-off, DIBL,
//! subthreshold swing and barrier lowering; the natural length of any stack
//! or fin cross-section is computed numerically beside the published closed forms.
//!
//! Data flows one way; each folder is one stage:
//!
//! | stage | module | entry point |
//! |---|---|---|
//! | constants, materials, internal units | [`physics`] | [`physics::Silicon::at`] |
//! | device file to checked scenario (one unit system, typed polarity) | [`device`] | [`device::load_device`], [`device::parse_device`] |
//! | planar sections and 3D fins and wires: geometry and doping | [`structure`] | [`structure::along_channel`], [`structure::long_channel_column`], [`structure::cross_section`], [`structure::along_fin`] |
//! | mesh lines (far zones) | [`mesh`] | [`mesh::graded_line`], [`mesh::zoned_line`] |
//! | box-integration discretisation | [`discretize`] | [`discretize::Problem`] |
//! | Cholesky and multigrid CG, Newton, Anderson, quasi-Fermi loop, continuation, uniform-level solver | [`solve`] | [`solve::DeviceSolver`], [`solve::UniformChannel`] |
//! | V_t, SS, DIBL, the gate voltages they need, barrier, long channel, electrical channel length | [`extract`] | [`extract::ramp_figures`], [`extract::adaptive::adaptive_ramp`], [`extract::extract_long_channel`], [`extract::electrical_length::electrical_length`] |
//! | closed forms, natural length, short-channel model (pure) | [`theory`] | [`theory::lambda_report`], [`theory::TheoryInputs`] |
//! | a whole device, its reference, scans, the report type | [`evaluate`] | [`evaluate::Reference::of`], [`evaluate::evaluate`], [`evaluate::scan::scan`] |
//! | capacitances from the solve, on-current and delay estimates, pitch splits | [`evaluate::capacitance`], [`evaluate::pitch`] | [`evaluate::capacitance::device_capacitance`], [`evaluate::pitch::run_pitch`] |
//! | plans, parallel sweeps, shards, shortest compliant length | [`sweep`] | [`sweep::run_sweep`], [`sweep::shortest::per_series`] (interpolated: [`evaluate::shortest_compliant`]) |
//! | the sweep file model, HDF5 and CSV | [`io`] | [`io::hdf5::write_sweep`], [`io::hdf5::read_sweep`] |
//! | every text table | [`render`] | [`render::device::device_text`] |
//! | drawing | [`plot`] | [`plot::sweep_plots`], [`plot::device_plots`], [`plot::fin_plots`] |
//! | the built-in demo scenario (data) | [`demo`] | [`demo::plan`] |
//! | progress to a caller | [`progress`] | [`progress::Observer`] |
//!
//! Dependencies point one way: nothing numerical (structure through
//! evaluate) imports `io`, `render`, `plot` or the command line, and
//! `theory` imports no solver. The binary's command line lives in
//! `src/cli/`.
//!
//! Limitations: classical (Boltzmann) carriers, no quantum confinement, no
//! velocity saturation, constant mobility, a quasi-Fermi level uniform over
//! each cross-section. Results rank geometries before full device simulation;
//! they are not sign-off figures.

pub mod demo;
pub mod device;
pub mod discretize;
pub mod evaluate;
pub mod extract;
pub mod io;
pub mod mesh;
pub mod physics;
pub mod plot;
pub mod progress;
pub mod render;
pub mod solve;
pub mod structure;
pub mod sweep;
pub mod theory;
