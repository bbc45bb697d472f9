//! What does not depend on the gate length, computed once per distinct
//! cross-section by the caller and passed down to every gate length: the
//! long-channel reference (Pao-Sah V_t,long and SS_long on the planar column
//! or the fin cross-section), the numeric natural length, the barrier the
//! short-channel model needs, and, for fins, the cross-section figures
//! (corner inversion, width).
//!
//! Entry points: [`Reference::of`] (everything), [`natural_length`] (the
//! natural length alone, for `gatehold lambda`). Use
//! [`Scenario::same_cross_section`] to tell whether one reference serves
//! another scenario.

use serde::Serialize;

use crate::device::{Architecture, Scenario};
use crate::extract::long_channel::depletion_depth_nm;
use crate::extract::{extract_long_channel, LongChannel, LongChannelError};
use crate::progress::{Observer, SolveKind};
use crate::solve::{SolveError, UniformChannel};
use crate::structure::{cross_section, CrossSection, WIDTH_DEFINITION};
use crate::theory::closed_form::max_depletion_width_nm;
use crate::theory::lambda::{eigen_section, section_natural_lengths, section_report};
use crate::theory::short_channel::source_drain_potential_v;
use crate::theory::{lambda_report, DepthSource, LambdaReport, TheoryError, TheoryInputs};

/// Figures of a fin or wire cross-section at its long-channel threshold.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct FinSection {
    /// Device width W per fin, nm, and how it is defined.
    pub width_nm: f64,
    pub width_definition: String,
    /// Channel-carrier density at the top corner (x = W/2, y = 0) over that at
    /// the centre of the top silicon face, at V_t,long and V = 0.
    pub corner_to_top_centre_ratio: f64,
    /// ... and over that at the middle of the side face (x = W/2, y = H/2).
    pub corner_to_side_centre_ratio: f64,
    /// phi_s: potential of the leakiest silicon node at V_t,long, V.
    pub channel_potential_at_threshold_v: f64,
    /// V_bi: source/drain potential at neutrality, V.
    pub source_drain_potential_v: f64,
    pub cross_section_nodes: usize,
}

/// The length-independent results of one cross-section.
#[derive(Debug, Clone)]
pub struct Reference {
    /// V_t,long and SS_long (Pao-Sah) and the Newton steps they took.
    pub long_channel: Result<(LongChannel, usize), LongChannelError>,
    /// The numeric natural length with the closed forms.
    pub lambda: Result<LambdaReport, TheoryError>,
    /// Inputs of the short-channel model (needs both of the above).
    pub theory: Result<TheoryInputs, String>,
    /// Fins and wires only.
    pub fin: Option<FinSection>,
}

/// Why a reference could not be built at all (a failed solve inside it is
/// recorded in its fields instead).
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum ReferenceError {
    #[error(transparent)]
    Solve(#[from] SolveError),
    #[error(transparent)]
    Theory(#[from] TheoryError),
}

impl Reference {
    /// Solves the long-channel reference and the natural length of `s`'s cross-section.
    pub fn of(s: &Scenario, observer: &dyn Observer) -> Result<Reference, ReferenceError> {
        if s.architecture.is_planar() {
            Ok(planar(s, observer)?)
        } else {
            fin(s, observer)
        }
    }

    /// V_t,long, V, when the long-channel reference converged.
    pub fn vt_long_v(&self) -> Option<f64> {
        self.long_channel.as_ref().ok().map(|(l, _)| l.vt_v)
    }
}

fn theory_inputs(
    s: &Scenario,
    lc: &Result<(LongChannel, usize), LongChannelError>,
    lambda: &Result<LambdaReport, TheoryError>,
    phi_s: Option<f64>,
) -> Result<TheoryInputs, String> {
    let (lc, _) = lc
        .as_ref()
        .map_err(|e| format!("long-channel reference: {e}"))?;
    let lambda = lambda
        .as_ref()
        .map_err(|e| format!("numeric natural length: {e}"))?;
    let phi_s = phi_s.ok_or("the long-channel solve at V_t,long did not converge")?;
    Ok(TheoryInputs {
        lambda_nm: lambda.lambda_numeric_nm,
        barrier_v: s.polarity.sign() * (source_drain_potential_v(s) - phi_s),
        vt_long_v: lc.vt_v,
        ss_long_mv_per_dec: lc.ss_mv_per_dec,
        vds_lin_v: s.bias.vds_lin_v,
        vds_sat_v: s.bias.vds_sat_v,
        polarity: s.polarity,
    })
}

/// The planar column, solved once: V_t,long, then the column at V_t,long
/// for the surface potential phi_s and (bulk) the depletion depth.
fn planar(s: &Scenario, observer: &dyn Observer) -> Result<Reference, SolveError> {
    let mut col = UniformChannel::column(s)?;
    let lc = extract_long_channel(&mut col, s);
    observer.solved(SolveKind::LongChannel);
    let at_threshold = match &lc {
        Ok((l, _)) => col.sheet_density(l.vt_v, 0.0).is_ok(),
        Err(_) => false,
    };
    let phi_s = at_threshold.then(|| {
        let p = &col.problem;
        let j0 =
            p.y.index_of(0.0)
                .expect("the silicon surface is a mesh line");
        col.potential()[j0 * p.nx]
    });
    let depletion = bulk_depletion(s, at_threshold.then_some(&col));
    let lambda = lambda_report(s, depletion);
    observer.solved(SolveKind::NaturalLength);
    let theory = theory_inputs(s, &lc, &lambda, phi_s);
    Ok(Reference {
        long_channel: lc,
        lambda,
        theory,
        fin: None,
    })
}

/// Depletion depth of a bulk device at threshold (None for other
/// architectures): from the column solved at V_t,long when there is one, else
/// the maximum depletion width formula; an undoped body uses the substrate depth.
fn bulk_depletion(s: &Scenario, col: Option<&UniformChannel>) -> Option<(f64, DepthSource)> {
    if s.architecture != Architecture::Bulk {
        return None;
    }
    let si = crate::physics::Silicon::at(s.temperature_k);
    let sub = s.geometry.substrate_depth_nm;
    let na = s.doping.channel_per_nm3;
    if na <= si.ni {
        return Some((sub, DepthSource::SubstrateDepth));
    }
    if let Some(d) = col.and_then(|c| depletion_depth_nm(c, na)) {
        return Some((d.min(sub), DepthSource::LongChannelSolve));
    }
    Some(match max_depletion_width_nm(&si, na) {
        Some(w) => (w.min(sub), DepthSource::MaxDepletionWidth),
        None => (sub, DepthSource::SubstrateDepth),
    })
}

/// The natural length alone (`gatehold lambda`): a planar stack needs the
/// long-channel column only for a bulk device's depletion depth.
pub fn natural_length(
    s: &Scenario,
    observer: &dyn Observer,
) -> Result<LambdaReport, ReferenceError> {
    let depletion = if s.architecture == Architecture::Bulk {
        let mut col = UniformChannel::column(s)?;
        let lc = extract_long_channel(&mut col, s);
        observer.solved(SolveKind::LongChannel);
        let solved = match lc {
            Ok((l, _)) => col.sheet_density(l.vt_v, 0.0).is_ok(),
            Err(_) => false,
        };
        bulk_depletion(s, solved.then_some(&col))
    } else {
        None
    };
    let r = lambda_report(s, depletion);
    observer.solved(SolveKind::NaturalLength);
    Ok(r?)
}

/// A fin or wire: the cross-section's modes and its long-channel solve.
fn fin(s: &Scenario, observer: &dyn Observer) -> Result<Reference, ReferenceError> {
    let cs = cross_section(s).map_err(TheoryError::from)?;
    // A bulk fin's modes come from its section grounded at the sub-fin's depletion depth.
    let eigen = match s.architecture {
        Architecture::BulkFin => Some(eigen_section(s)?),
        _ => None,
    };
    let section = section_natural_lengths(eigen.as_ref().unwrap_or(&cs));
    let lambda = section.map(|sl| section_report(s, &cs, &sl));
    observer.solved(SolveKind::NaturalLength);
    let mut ch = UniformChannel::fin(s, &cs)?;
    let lc = extract_long_channel(&mut ch, s);
    observer.solved(SolveKind::LongChannel);
    let at_threshold = match &lc {
        Ok((l, _)) => ch.sheet_density(l.vt_v, 0.0).is_ok(),
        Err(_) => false,
    };
    let (fin, phi_s) = if at_threshold {
        let f = fin_section(s, &cs, &ch);
        let phi = f.channel_potential_at_threshold_v;
        (Some(f), Some(phi))
    } else {
        (None, None)
    };
    let theory = theory_inputs(s, &lc, &lambda, phi_s);
    Ok(Reference {
        long_channel: lc,
        lambda,
        theory,
        fin,
    })
}

fn fin_section(s: &Scenario, cs: &CrossSection, ch: &UniformChannel) -> FinSection {
    let sign = s.polarity.sign();
    let n_corner = ch.carrier_density(cs.corner_node, 0.0);
    let n_top = ch.carrier_density(cs.top_centre_node, 0.0);
    let n_side = ch.carrier_density(cs.side_centre_node, 0.0);
    let p = &cs.problem;
    let psi = ch.potential();
    // The gated fin's silicon (0 <= y <= H): a bulk fin's sub-fin and
    // substrate below it are the punch-through stopper, not the channel.
    let h = cs.fin_height_nm + 1e-9;
    let phi_s = p
        .semi_area
        .iter()
        .enumerate()
        .filter(|(k, a)| **a > 0.0 && p.y.nodes[k / p.nx] <= h)
        .map(|(k, _)| psi[k])
        .min_by(|a, b| (sign * a).total_cmp(&(sign * b)))
        .expect("a fin cross-section has silicon nodes");
    FinSection {
        width_nm: cs.width_nm,
        width_definition: WIDTH_DEFINITION.into(),
        corner_to_top_centre_ratio: n_corner / n_top,
        corner_to_side_centre_ratio: n_corner / n_side,
        channel_potential_at_threshold_v: phi_s,
        source_drain_potential_v: source_drain_potential_v(s),
        cross_section_nodes: p.node_count(),
    }
}
