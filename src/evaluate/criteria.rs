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

/// A criterion given on the command line that is not a positive number.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[error("{option} = {value}: must be a finite number > 0 ({unit})")]
pub struct CriteriaError {
    pub option: String,
    pub value: f64,
    pub unit: String,
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
    /// The criteria in words: "DIBL <= 100 mV/V and SS <= 80 mV/dec" (or "no criteria").
    pub fn text(&self) -> String {
        let mut parts = Vec::new();
        if let Some(d) = self.dibl_max_mv_per_v {
            parts.push(format!("DIBL <= {d} mV/V"));
        }
        if let Some(s) = self.ss_max_mv_per_dec {
            parts.push(format!("SS <= {s} mV/dec"));
        }
        if let Some(r) = self.vt_rolloff_max_mv {
            parts.push(format!("|V_t roll-off| <= {r} mV"));
        }
        if parts.is_empty() {
            "no criteria".into()
        } else {
            parts.join(" and ")
        }
    }

    /// These criteria with each given value put in place of its own
    /// (command-line options over a plan's `[criteria]`); every given value
    /// must be finite and positive (the error names the option).
    pub fn overridden(
        &self,
        dibl_max_mv_per_v: Option<f64>,
        ss_max_mv_per_dec: Option<f64>,
        vt_rolloff_max_mv: Option<f64>,
    ) -> Result<Criteria, CriteriaError> {
        for (option, unit, v) in [
            ("--dibl-max", "mV/V", dibl_max_mv_per_v),
            ("--ss-max", "mV/dec", ss_max_mv_per_dec),
            ("--vt-rolloff-max", "mV", vt_rolloff_max_mv),
        ] {
            if let Some(v) = v.filter(|v| !(v.is_finite() && *v > 0.0)) {
                return Err(CriteriaError {
                    option: option.into(),
                    value: v,
                    unit: unit.into(),
                });
            }
        }
        Ok(Criteria {
            dibl_max_mv_per_v: dibl_max_mv_per_v.or(self.dibl_max_mv_per_v),
            ss_max_mv_per_dec: ss_max_mv_per_dec.or(self.ss_max_mv_per_dec),
            vt_rolloff_max_mv: vt_rolloff_max_mv.or(self.vt_rolloff_max_mv),
        })
    }

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

/// A screening criterion, by the figure it bounds.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum Criterion {
    Dibl,
    /// The larger of SS at V_DS,lin and V_DS,sat.
    Ss,
    /// |V_t roll-off|.
    VtRolloff,
}

impl Criterion {
    pub const ALL: [Criterion; 3] = [Criterion::Dibl, Criterion::Ss, Criterion::VtRolloff];

    /// The stable string stored in files and JSON: "dibl", "ss", "vt_rolloff".
    pub fn name(&self) -> &'static str {
        match self {
            Criterion::Dibl => "dibl",
            Criterion::Ss => "ss",
            Criterion::VtRolloff => "vt_rolloff",
        }
    }

    /// How a figure is interpolated in L_g between two solved lengths.
    pub fn interpolation(&self) -> &'static str {
        match self {
            Criterion::Dibl => "log-linear (ln DIBL linear in L_g)",
            Criterion::Ss => "linear in L_g",
            Criterion::VtRolloff => "log-linear (ln |roll-off| linear in L_g)",
        }
    }

    fn log_linear(&self) -> bool {
        !matches!(self, Criterion::Ss)
    }
}

impl std::fmt::Display for Criterion {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(self.name())
    }
}

impl serde::Serialize for Criterion {
    fn serialize<S: serde::Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        s.serialize_str(self.name())
    }
}

/// One solved gate length of a series, for [`shortest_compliant`].
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct LengthPoint {
    pub gate_length_nm: f64,
    pub dibl_mv_per_v: Option<f64>,
    pub ss_lin_mv_per_dec: Option<f64>,
    pub ss_sat_mv_per_dec: Option<f64>,
    pub vt_rolloff_mv: Option<f64>,
    /// False when the point's status is not "ok" (it is then skipped).
    pub ok: bool,
}

impl LengthPoint {
    /// The figure a criterion bounds (SS: the larger of lin and sat; roll-off: its magnitude).
    pub fn figure(&self, c: Criterion) -> Option<f64> {
        match c {
            Criterion::Dibl => self.dibl_mv_per_v,
            Criterion::Ss => self
                .ss_lin_mv_per_dec
                .zip(self.ss_sat_mv_per_dec)
                .map(|(a, b)| a.max(b)),
            Criterion::VtRolloff => self.vt_rolloff_mv.map(f64::abs),
        }
        .filter(|x| x.is_finite())
    }
}

/// How [`ShortestAnswer::gate_length_nm`] was obtained.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum AnswerKind {
    /// Interpolated between a failing solved length and the next longer compliant one.
    Interpolated,
    /// The shortest solved length already complies: the answer is at most this
    /// (shorter lengths were not solved).
    AtShortestSolved,
    /// A solved length complies but the next shorter one has a figure missing:
    /// the swept length, not interpolated.
    Swept,
    /// No solved length complies.
    NoneCompliant,
    /// No criteria, or no usable point.
    Unknown,
}

impl AnswerKind {
    /// The stable string: "interpolated", "at-shortest-solved", "swept", "none-compliant", "unknown".
    pub fn name(&self) -> &'static str {
        match self {
            AnswerKind::Interpolated => "interpolated",
            AnswerKind::AtShortestSolved => "at-shortest-solved",
            AnswerKind::Swept => "swept",
            AnswerKind::NoneCompliant => "none-compliant",
            AnswerKind::Unknown => "unknown",
        }
    }
}

impl serde::Serialize for AnswerKind {
    fn serialize<S: serde::Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        s.serialize_str(self.name())
    }
}

/// The shortest compliant gate length of one series (see [`shortest_compliant`]).
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct ShortestAnswer {
    /// The shortest compliant gate length, nm (None: no solved length complies).
    pub gate_length_nm: Option<f64>,
    pub kind: AnswerKind,
    /// The criterion that sets the answer (interpolated: the one crossing at
    /// the longest length; none compliant: the one most exceeded at the
    /// longest solved length; None when no criterion is reached).
    pub limiting_criterion: Option<Criterion>,
    /// The solved lengths bracketing an interpolated answer (failing, compliant), nm.
    pub bracket_nm: Option<(f64, f64)>,
    /// The shortest solved length that complies, nm.
    pub swept_shortest_nm: Option<f64>,
    /// Figures at the answer (interpolated like the criteria).
    #[serde(rename = "dibl_mV_per_V")]
    pub dibl_mv_per_v: Option<f64>,
    #[serde(rename = "ss_mV_per_dec")]
    pub ss_mv_per_dec: Option<f64>,
    #[serde(rename = "vt_rolloff_abs_mV")]
    pub vt_rolloff_abs_mv: Option<f64>,
    /// Cautions (e.g. a longer length that fails again).
    pub notes: Vec<String>,
}

/// Where figure `c` crosses `bound` between (l0, y0) and (l1, y1), by the
/// criterion's interpolation (log-linear falls back to linear when a value is
/// not positive). `t` in [0, 1] when the two values straddle the bound.
fn crossing(c: Criterion, (l0, y0): (f64, f64), (l1, y1): (f64, f64), bound: f64) -> f64 {
    let (a, b, m) = if c.log_linear() && y0 > 0.0 && y1 > 0.0 && bound > 0.0 {
        (y0.ln(), y1.ln(), bound.ln())
    } else {
        (y0, y1, bound)
    };
    let t = if b == a {
        1.0
    } else {
        ((m - a) / (b - a)).clamp(0.0, 1.0)
    };
    l0 + t * (l1 - l0)
}

/// Figure `c` at length `l` between (l0, y0) and (l1, y1), by the criterion's interpolation.
fn value_at(c: Criterion, (l0, y0): (f64, f64), (l1, y1): (f64, f64), l: f64) -> f64 {
    let t = if l1 == l0 { 0.0 } else { (l - l0) / (l1 - l0) };
    if c.log_linear() && y0 > 0.0 && y1 > 0.0 {
        (y0.ln() + t * (y1.ln() - y0.ln())).exp()
    } else {
        y0 + t * (y1 - y0)
    }
}

impl Criteria {
    /// The bound of criterion `c`, if given.
    pub fn bound(&self, c: Criterion) -> Option<f64> {
        match c {
            Criterion::Dibl => self.dibl_max_mv_per_v,
            Criterion::Ss => self.ss_max_mv_per_dec,
            Criterion::VtRolloff => self.vt_rolloff_max_mv,
        }
    }

    fn judge_point(&self, p: &LengthPoint) -> CriteriaVerdict {
        self.judge(
            p.dibl_mv_per_v,
            p.ss_lin_mv_per_dec,
            p.ss_sat_mv_per_dec,
            p.vt_rolloff_mv,
        )
    }
}

/// The shortest compliant gate length of one series of solved lengths.
///
/// The shortest solved length that meets every criterion (`L_c`) and the next
/// shorter solved length (`L_f`, which then fails) bracket the answer: for each
/// criterion that `L_f` fails, the length where its figure crosses the bound
/// is interpolated between the two (DIBL and |roll-off| log-linear, as they
/// decay about exponentially with L_g, Liu et al., IEEE TED 40(1), 86, 1993;
/// SS linearly, its excess over the long-channel value being small and slowly
/// varying), and the answer is the longest of these crossings; that criterion
/// is the limiting one. Points whose status is not ok are skipped. A longer
/// solved length that fails again is named in `notes`.
pub fn shortest_compliant(points: &[LengthPoint], criteria: &Criteria) -> ShortestAnswer {
    let mut pts: Vec<&LengthPoint> = points
        .iter()
        .filter(|p| p.ok && p.gate_length_nm.is_finite())
        .collect();
    pts.sort_by(|a, b| a.gate_length_nm.total_cmp(&b.gate_length_nm));
    let mut answer = ShortestAnswer {
        gate_length_nm: None,
        kind: AnswerKind::Unknown,
        limiting_criterion: None,
        bracket_nm: None,
        swept_shortest_nm: None,
        dibl_mv_per_v: None,
        ss_mv_per_dec: None,
        vt_rolloff_abs_mv: None,
        notes: Vec::new(),
    };
    if criteria.is_empty() || pts.is_empty() {
        return answer;
    }
    let verdicts: Vec<CriteriaVerdict> = pts.iter().map(|p| criteria.judge_point(p)).collect();
    let given: Vec<(Criterion, f64)> = Criterion::ALL
        .iter()
        .filter_map(|&c| criteria.bound(c).map(|b| (c, b)))
        .collect();
    let Some(ic) = verdicts.iter().position(|v| *v == CriteriaVerdict::Meets) else {
        // None complies: name the criterion most exceeded at the longest judged length.
        if let Some(k) = verdicts.iter().rposition(|v| *v == CriteriaVerdict::Fails) {
            answer.kind = AnswerKind::NoneCompliant;
            answer.limiting_criterion = given
                .iter()
                .filter_map(|&(c, b)| pts[k].figure(c).map(|y| (c, y / b)))
                .filter(|&(_, r)| r > 1.0)
                .max_by(|a, b| a.1.total_cmp(&b.1))
                .map(|(c, _)| c);
        }
        return answer;
    };
    let pc = pts[ic];
    answer.swept_shortest_nm = Some(pc.gate_length_nm);
    for (p, v) in pts.iter().zip(&verdicts).skip(ic + 1) {
        if *v == CriteriaVerdict::Fails {
            answer.notes.push(format!(
                "L_g = {} nm fails again although {} nm complies (not monotonic in L_g)",
                p.gate_length_nm, pc.gate_length_nm
            ));
        }
    }
    let at = |p: &LengthPoint, a: &mut ShortestAnswer, l: f64| {
        a.gate_length_nm = Some(l);
        a.dibl_mv_per_v = p.figure(Criterion::Dibl);
        a.ss_mv_per_dec = p.figure(Criterion::Ss);
        a.vt_rolloff_abs_mv = p.figure(Criterion::VtRolloff);
    };
    if ic == 0 {
        at(pc, &mut answer, pc.gate_length_nm);
        answer.kind = AnswerKind::AtShortestSolved;
        return answer;
    }
    let pf = pts[ic - 1];
    if verdicts[ic - 1] != CriteriaVerdict::Fails {
        at(pc, &mut answer, pc.gate_length_nm);
        answer.kind = AnswerKind::Swept;
        answer.notes.push(format!(
            "not interpolated: a figure is missing at the next shorter length {} nm",
            pf.gate_length_nm
        ));
        return answer;
    }
    let (lf, lc) = (pf.gate_length_nm, pc.gate_length_nm);
    for p in points
        .iter()
        .filter(|p| !p.ok && p.gate_length_nm > lf && p.gate_length_nm < lc)
    {
        answer.notes.push(format!(
            "interpolated across L_g = {} nm, whose point failed (see its status)",
            p.gate_length_nm
        ));
    }
    let mut best: Option<(Criterion, f64)> = None;
    for &(c, b) in &given {
        let (Some(yf), Some(yc)) = (pf.figure(c), pc.figure(c)) else {
            continue;
        };
        if yf > b {
            let l = crossing(c, (lf, yf), (lc, yc), b);
            if best.is_none_or(|(_, lb)| l > lb) {
                best = Some((c, l));
            }
        }
    }
    let (c, l) = best.expect("a failing point exceeds at least one bound");
    answer.kind = AnswerKind::Interpolated;
    answer.gate_length_nm = Some(l);
    answer.limiting_criterion = Some(c);
    answer.bracket_nm = Some((lf, lc));
    let fig = |c: Criterion| {
        pf.figure(c)
            .zip(pc.figure(c))
            .map(|(yf, yc)| value_at(c, (lf, yf), (lc, yc), l))
    };
    answer.dibl_mv_per_v = fig(Criterion::Dibl);
    answer.ss_mv_per_dec = fig(Criterion::Ss);
    answer.vt_rolloff_abs_mv = fig(Criterion::VtRolloff);
    answer
}

#[cfg(test)]
mod tests {
    use super::*;

    fn pt(l: f64, dibl: f64, ss: f64, roll: f64) -> LengthPoint {
        LengthPoint {
            gate_length_nm: l,
            dibl_mv_per_v: Some(dibl),
            ss_lin_mv_per_dec: Some(ss),
            ss_sat_mv_per_dec: Some(ss),
            vt_rolloff_mv: Some(roll),
            ok: true,
        }
    }

    #[test]
    fn command_line_criteria_override_and_bad_values_name_the_option() {
        let plan = Criteria {
            dibl_max_mv_per_v: Some(100.0),
            ss_max_mv_per_dec: Some(80.0),
            vt_rolloff_max_mv: None,
        };
        let c = plan.overridden(Some(90.0), None, Some(50.0)).unwrap();
        assert_eq!(c.dibl_max_mv_per_v, Some(90.0));
        assert_eq!(c.ss_max_mv_per_dec, Some(80.0));
        assert_eq!(c.vt_rolloff_max_mv, Some(50.0));
        let e = plan
            .overridden(None, Some(-3.0), None)
            .unwrap_err()
            .to_string();
        assert!(e.contains("--ss-max") && e.contains("-3"), "{e}");
        assert!(plan.overridden(None, None, Some(f64::NAN)).is_err());
    }

    #[test]
    fn log_linear_dibl_crossing_is_exact_for_an_exponential() {
        // DIBL = 400 exp(-L/10): the log-linear crossing of 100 mV/V is at
        // L = 10 ln 4 exactly (an independent closed form, no solver).
        let d = |l: f64| 400.0 * (-l / 10.0).exp();
        let pts: Vec<LengthPoint> = [5.0, 10.0, 20.0, 30.0]
            .iter()
            .map(|&l| pt(l, d(l), 70.0, -10.0))
            .collect();
        let c = Criteria {
            dibl_max_mv_per_v: Some(100.0),
            ss_max_mv_per_dec: Some(80.0),
            vt_rolloff_max_mv: None,
        };
        let a = shortest_compliant(&pts, &c);
        assert_eq!(a.kind, AnswerKind::Interpolated);
        assert_eq!(a.limiting_criterion, Some(Criterion::Dibl));
        assert_eq!(a.bracket_nm, Some((10.0, 20.0)));
        assert!((a.gate_length_nm.unwrap() - 10.0 * 4f64.ln()).abs() < 1e-9);
        assert!((a.dibl_mv_per_v.unwrap() - 100.0).abs() < 1e-9);
    }

    #[test]
    fn limiting_criterion_is_the_longest_crossing_and_edges_are_named() {
        // SS crosses 80 at L = 15 (linear from 90 at 10 to 70 at 20); DIBL crosses earlier.
        let pts = [pt(10.0, 120.0, 90.0, -5.0), pt(20.0, 60.0, 70.0, -5.0)];
        let c = Criteria {
            dibl_max_mv_per_v: Some(110.0),
            ss_max_mv_per_dec: Some(80.0),
            vt_rolloff_max_mv: None,
        };
        let a = shortest_compliant(&pts, &c);
        assert_eq!(a.limiting_criterion, Some(Criterion::Ss));
        assert!((a.gate_length_nm.unwrap() - 15.0).abs() < 1e-12);
        // Shortest solved already complies.
        let loose = Criteria {
            dibl_max_mv_per_v: Some(500.0),
            ..Criteria::default()
        };
        assert_eq!(
            shortest_compliant(&pts, &loose).kind,
            AnswerKind::AtShortestSolved
        );
        // None complies: the most exceeded criterion at the longest length.
        let tight = Criteria {
            dibl_max_mv_per_v: Some(30.0),
            ss_max_mv_per_dec: Some(69.0),
            vt_rolloff_max_mv: None,
        };
        let a = shortest_compliant(&pts, &tight);
        assert_eq!(a.kind, AnswerKind::NoneCompliant);
        assert_eq!(a.limiting_criterion, Some(Criterion::Dibl));
        assert_eq!(a.gate_length_nm, None);
        // A failed point inside the bracket is named.
        let mut with_failed = pts.to_vec();
        with_failed.push(LengthPoint {
            ok: false,
            ..pt(15.0, 1.0, 1.0, 1.0)
        });
        let a = shortest_compliant(&with_failed, &c);
        assert_eq!(a.bracket_nm, Some((10.0, 20.0)));
        assert!(a.notes[0].contains("15 nm"), "{:?}", a.notes);
        // No criteria: unknown.
        assert_eq!(
            shortest_compliant(&pts, &Criteria::default()).kind,
            AnswerKind::Unknown
        );
    }
}
