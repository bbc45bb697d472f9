//! Figures from I_D-V_G curves (MODEL.md section 5): V_t, SS, DIBL.

use crate::solve::GateRamp;

/// Why a figure could not be extracted.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum ExtractError {
    #[error("the gate sweep does not reach the threshold current {target_a_per_um:.3e} A/um ({detail}); {suggestion}")]
    NotBracketed {
        target_a_per_um: f64,
        detail: String,
        suggestion: String,
    },
    #[error("the SS window (1e-3 to 1e-1 of the threshold current) is not inside the gate sweep ({detail}); {suggestion}")]
    WindowNotBracketed { detail: String, suggestion: String },
    #[error("only {0} bias points fall in the SS window; use a smaller bias.vgs_step_V (try half the present step)")]
    TooFewPoints(usize),
    #[error("bias point V_G = {vgs_v:.4} V at V_DS = {vds_v} V did not converge: {reason}")]
    NotConverged {
        vgs_v: f64,
        vds_v: f64,
        reason: String,
    },
}

/// A transfer curve in sweep order, from the off end toward the on end.
#[derive(Debug, Clone, PartialEq)]
pub struct Curve<'a> {
    pub vgs_v: &'a [f64],
    /// |I_D| per width, A/um.
    pub id_abs: &'a [f64],
}

/// Which end of a curve a range failure is at.
#[derive(Debug, Clone, Copy, PartialEq)]
enum End {
    Off,
    On,
}

/// What to change when the curve's range misses `goal` (A/um) at `end`:
/// the key of that end of the gate sweep and a value to try (the end moved
/// by the missing decades at the curve's own swing near that end, or
/// 100 mV/decade, plus 0.1 V, rounded outward to 0.05 V).
fn range_suggestion(c: &Curve, end: End, goal: f64) -> String {
    let (v, i) = (c.vgs_v, c.id_abs);
    let n = v.len();
    let up = n < 2 || v[n - 1] > v[0];
    let (k, k2) = match end {
        End::Off => (0, 1.min(n - 1)),
        End::On => (n - 1, n.saturating_sub(2)),
    };
    let dec = (goal.log10() - i[k].log10()).abs();
    let slope = ((i[k].log10() - i[k2].log10()) / (v[k] - v[k2])).abs();
    let swing_v = if slope.is_finite() && slope > 1.0 {
        1.0 / slope
    } else {
        0.1
    };
    let toward_on = if up { 1.0 } else { -1.0 };
    let dir = match end {
        End::Off => -toward_on,
        End::On => toward_on,
    };
    let raw = v[k] + dir * (dec * swing_v + 0.1);
    let to = if dir > 0.0 {
        (raw / 0.05).ceil() * 0.05
    } else {
        (raw / 0.05).floor() * 0.05
    };
    let key = match (end, up) {
        (End::Off, true) | (End::On, false) => "bias.vgs_start_V",
        _ => "bias.vgs_stop_V",
    };
    format!(
        "set {key} = {to:.2} (now {:.3}), or keep bias.auto_extend = true and raise bias.extend_limit_V by {:.2} V",
        v[k],
        ((to - v[k]).abs() / 0.05).ceil() * 0.05
    )
}

/// Threshold voltage where |I_D| first reaches `target` (A/um), interpolating
/// log10 |I_D| linearly between bias points. Never extrapolates.
pub fn threshold(c: &Curve, target: f64) -> Result<f64, ExtractError> {
    let (v, i) = (c.vgs_v, c.id_abs);
    if i[0] >= target {
        return Err(ExtractError::NotBracketed {
            target_a_per_um: target,
            detail: format!(
                "already {:.3e} A/um at the first gate voltage {:.3} V",
                i[0], v[0]
            ),
            suggestion: range_suggestion(c, End::Off, super::adaptive::WINDOW_LOW * target),
        });
    }
    for k in 1..v.len() {
        if i[k] >= target {
            let (l0, l1, lt) = (i[k - 1].log10(), i[k].log10(), target.log10());
            return Ok(v[k - 1] + (v[k] - v[k - 1]) * (lt - l0) / (l1 - l0));
        }
    }
    Err(ExtractError::NotBracketed {
        target_a_per_um: target,
        detail: format!(
            "only {:.3e} A/um at the last gate voltage {:.3} V",
            i[v.len() - 1],
            v[v.len() - 1]
        ),
        suggestion: range_suggestion(c, End::On, target),
    })
}

/// Subthreshold swing, mV/decade: inverse slope of a least-squares line of
/// log10 |I_D| against V_G over the points with |I_D| in [1e-3, 1e-1] x target.
pub fn swing(c: &Curve, target: f64) -> Result<f64, ExtractError> {
    let (lo, hi) = (
        super::adaptive::WINDOW_LOW * target,
        super::adaptive::WINDOW_HIGH * target,
    );
    let (v, i) = (c.vgs_v, c.id_abs);
    if i[0] > lo {
        return Err(ExtractError::WindowNotBracketed {
            detail: format!(
                "{:.3e} A/um at the first gate voltage {:.3} V is above {:.3e}",
                i[0], v[0], lo
            ),
            suggestion: range_suggestion(c, End::Off, lo),
        });
    }
    if i.iter().all(|&x| x < hi) {
        return Err(ExtractError::WindowNotBracketed {
            detail: format!("the current never reaches {hi:.3e} A/um"),
            suggestion: range_suggestion(c, End::On, hi),
        });
    }
    let pts: Vec<(f64, f64)> = v
        .iter()
        .zip(i)
        .filter(|(_, &x)| x >= lo && x <= hi)
        .map(|(&a, &b)| (a, b.log10()))
        .collect();
    if pts.len() < 3 {
        return Err(ExtractError::TooFewPoints(pts.len()));
    }
    let n = pts.len() as f64;
    let mx = pts.iter().map(|p| p.0).sum::<f64>() / n;
    let my = pts.iter().map(|p| p.1).sum::<f64>() / n;
    let sxy: f64 = pts.iter().map(|p| (p.0 - mx) * (p.1 - my)).sum();
    let sxx: f64 = pts.iter().map(|p| (p.0 - mx).powi(2)).sum();
    Ok(1000.0 / (sxy / sxx).abs())
}

/// DIBL, mV/V: (V_t,lin - V_t,sat) / (V_DS,sat - V_DS,lin).
pub fn dibl(vt_lin: f64, vt_sat: f64, vds_lin: f64, vds_sat: f64) -> f64 {
    1000.0 * (vt_lin - vt_sat) / (vds_sat - vds_lin)
}

/// Threshold voltage and SS of one gate ramp against the threshold current
/// `target` (A/um); an error names the first bias point that did not converge.
pub fn ramp_figures(ramp: &GateRamp, target: f64) -> Result<(f64, f64), ExtractError> {
    if let Some(bad) = ramp.points.iter().find(|p| p.current_a_per_um.is_none()) {
        return Err(ExtractError::NotConverged {
            vgs_v: bad.vgs_v,
            vds_v: ramp.vds_v,
            reason: bad.report.reason(),
        });
    }
    let v: Vec<f64> = ramp.points.iter().map(|p| p.vgs_v).collect();
    let i: Vec<f64> = ramp
        .points
        .iter()
        .filter_map(|p| p.current_a_per_um.map(f64::abs))
        .collect();
    let c = Curve {
        vgs_v: &v,
        id_abs: &i,
    };
    Ok((threshold(&c, target)?, swing(&c, target)?))
}

/// A gate ramp's (gate voltage, current) pairs in ascending gate voltage.
pub fn ascending(ramp: &GateRamp) -> (Vec<f64>, Vec<Option<f64>>) {
    let mut pts: Vec<(f64, Option<f64>)> = ramp
        .points
        .iter()
        .map(|p| (p.vgs_v, p.current_a_per_um))
        .collect();
    pts.sort_by(|a, b| a.0.total_cmp(&b.0));
    pts.into_iter().unzip()
}

/// Both drain sweeps on one ascending list of gate voltages (every voltage
/// solved at either drain bias): `None` where that drain bias did not solve
/// the voltage (adaptive bias points) or did not converge there.
pub fn union_curves(
    lin: &GateRamp,
    sat: &GateRamp,
) -> (Vec<f64>, Vec<Option<f64>>, Vec<Option<f64>>) {
    let mut v: Vec<f64> = lin
        .points
        .iter()
        .chain(&sat.points)
        .map(|p| p.vgs_v)
        .collect();
    v.sort_by(f64::total_cmp);
    v.dedup_by(|a, b| (*a - *b).abs() < 1e-9);
    let at = |r: &GateRamp| -> Vec<Option<f64>> {
        v.iter()
            .map(|&x| {
                r.points
                    .iter()
                    .find(|p| (p.vgs_v - x).abs() < 1e-9)
                    .and_then(|p| p.current_a_per_um)
            })
            .collect()
    };
    let (il, is) = (at(lin), at(sat));
    (v, il, is)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn threshold_and_swing_on_an_exact_exponential() {
        // I = 1e-12 * 10^((V - 0)/0.07): SS = 70 mV/dec, I = 1e-7 at V = 0.35.
        let v: Vec<f64> = (0..60).map(|k| -0.2 + 0.02 * k as f64).collect();
        let i: Vec<f64> = v.iter().map(|x| 1e-12 * 10f64.powf(x / 0.07)).collect();
        let c = Curve {
            vgs_v: &v,
            id_abs: &i,
        };
        assert!((threshold(&c, 1e-7).unwrap() - 0.35).abs() < 1e-12);
        assert!((swing(&c, 1e-7).unwrap() - 70.0).abs() < 1e-9);
        assert!(threshold(&c, 1e3).is_err());
        let c2 = Curve {
            vgs_v: &v[30..],
            id_abs: &i[30..],
        };
        assert!(matches!(
            swing(&c2, 1e-7),
            Err(ExtractError::WindowNotBracketed { .. })
        ));
    }

    #[test]
    fn dibl_sign_convention() {
        assert!((dibl(0.30, 0.25, 0.05, 0.8) - 66.666666).abs() < 1e-3);
        // p-channel: both voltages negative, DIBL positive.
        assert!((dibl(-0.30, -0.25, -0.05, -0.8) - 66.666666).abs() < 1e-3);
    }
}
