//! Rectilinear tensor-product meshes with variable spacing.
//!
//! A [`Line`] is a sorted set of node coordinates (nm) built from hard points
//! (material interfaces, electrode edges, junctions: always mesh lines) and a
//! spacing rule per segment: the step grows linearly with the distance from
//! a refined end (a geometric grading), is never larger than the maximum step,
//! and every segment gets at least two cells.
//!
//! [`zoned_line`] adds far zones: outside the "core" intervals (where the
//! physics happens) the cap itself grows with the distance from the nearest
//! core, cell to cell by a ratio, up to a far cap.

/// Spacing request at one end of a segment.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum EndStep {
    /// Refine: the first cell is about this size (nm).
    Fine(f64),
    /// Nothing happens here: the maximum step applies.
    Coarse,
}

/// One segment between two hard points of a line.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Segment {
    pub start: f64,
    pub end: f64,
    pub start_step: EndStep,
    pub end_step: EndStep,
    /// Largest allowed cell, nm.
    pub max_step: f64,
    /// Growth of the step per nm of distance from a refined end.
    pub growth: f64,
    /// Outside every core: the cap grows away from the cores (None: inside a core).
    pub far: Option<FarCap>,
}

/// The cap of a segment outside every core interval: `max_step + slope * d`
/// at distance `d` from the nearest core, never above `far_step`.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct FarCap {
    /// End of the nearest core at or before the segment start (None: no core there).
    pub core_left: Option<f64>,
    /// Start of the nearest core at or after the segment end.
    pub core_right: Option<f64>,
    /// Growth of the cap per nm of distance (the cell-to-cell ratio minus 1).
    pub slope: f64,
    /// Largest cell far from every core, nm.
    pub far_step: f64,
}

impl Segment {
    /// The largest cell this segment may hold anywhere, nm.
    fn largest_step(&self) -> f64 {
        self.far
            .map_or(self.max_step, |f| f.far_step.max(self.max_step))
    }
}

/// Growth of the step per nm of distance from a refined end (dimensionless;
/// 0.25 means each cell about 25 % larger than the previous). Common practice.
pub const GROWTH: f64 = 0.25;

/// Width kept at the maximum step beyond the silicon channel and body, every
/// silicon/dielectric interface and every junction before far zones begin, nm
/// (a few Debye lengths at source/drain doping; common practice).
pub const CORE_MARGIN_NM: f64 = 3.0;

fn spacing(seg: &Segment, x: f64) -> f64 {
    let mut h = seg.max_step;
    if let Some(f) = seg.far {
        let d = f
            .core_left
            .map_or(f64::INFINITY, |a| x - a)
            .min(f.core_right.map_or(f64::INFINITY, |b| b - x))
            .max(0.0);
        h = f.far_step.min(seg.max_step + f.slope * d).max(seg.max_step);
    }
    if let EndStep::Fine(h0) = seg.start_step {
        h = h.min(h0 + seg.growth * (x - seg.start));
    }
    if let EndStep::Fine(h1) = seg.end_step {
        h = h.min(h1 + seg.growth * (seg.end - x));
    }
    h
}

/// Node coordinates of one segment, both ends included.
pub fn segment_nodes(seg: &Segment, min_cells: usize) -> Vec<f64> {
    let len = seg.end - seg.start;
    debug_assert!(len > 0.0);
    // Cumulative integral of dx/h(x) on a fine sampling (trapezoid).
    let samples = 2000usize;
    let dx = len / samples as f64;
    let mut phi = Vec::with_capacity(samples + 1);
    phi.push(0.0);
    let mut acc = 0.0;
    for k in 0..samples {
        let a = seg.start + k as f64 * dx;
        let b = a + dx;
        acc += 0.5 * dx * (1.0 / spacing(seg, a) + 1.0 / spacing(seg, b));
        phi.push(acc);
    }
    let mut n = (acc.ceil() as usize).max(min_cells).max(1);
    loop {
        let mut nodes = Vec::with_capacity(n + 1);
        nodes.push(seg.start);
        let mut k = 0usize;
        for c in 1..n {
            let target = acc * c as f64 / n as f64;
            while k < samples && phi[k + 1] < target {
                k += 1;
            }
            let t = (target - phi[k]) / (phi[k + 1] - phi[k]).max(f64::MIN_POSITIVE);
            nodes.push(seg.start + (k as f64 + t.clamp(0.0, 1.0)) * dx);
        }
        nodes.push(seg.end);
        let worst = nodes.windows(2).map(|w| w[1] - w[0]).fold(0.0, f64::max);
        if worst <= seg.largest_step() * (1.0 + 1e-9) {
            return nodes;
        }
        n += 1;
    }
}

/// A sorted line of mesh coordinates, nm.
#[derive(Debug, Clone, PartialEq)]
pub struct Line {
    pub nodes: Vec<f64>,
}

impl Line {
    /// Joins segments (each `end` must equal the next `start`).
    pub fn from_segments(segments: &[Segment], min_cells: usize) -> Line {
        let mut nodes: Vec<f64> = Vec::new();
        for seg in segments {
            let s = segment_nodes(seg, min_cells);
            if nodes.is_empty() {
                nodes.extend_from_slice(&s);
            } else {
                nodes.extend_from_slice(&s[1..]);
            }
        }
        Line { nodes }
    }

    /// Uniform line with `cells` cells over [a, b].
    pub fn uniform(a: f64, b: f64, cells: usize) -> Line {
        Line {
            nodes: (0..=cells)
                .map(|i| a + (b - a) * i as f64 / cells as f64)
                .collect(),
        }
    }

    pub fn len(&self) -> usize {
        self.nodes.len()
    }

    pub fn is_empty(&self) -> bool {
        self.nodes.is_empty()
    }

    /// Cell widths, nm.
    pub fn steps(&self) -> Vec<f64> {
        self.nodes.windows(2).map(|w| w[1] - w[0]).collect()
    }

    /// Index of the node at `x` (within 1e-9 nm), if any.
    pub fn index_of(&self, x: f64) -> Option<usize> {
        self.nodes.iter().position(|&v| (v - x).abs() < 1e-9)
    }
}

/// Builds a line through sorted, distinct hard points, refining toward the
/// points that `fine(x)` gives a step for. `refinement` divides every step
/// (the refined steps, the growth and the maximum): 2 gives a mesh twice as fine.
pub fn graded_line(
    hard_points: &[f64],
    fine: impl Fn(f64) -> Option<f64>,
    max_step: f64,
    refinement: f64,
    min_cells: usize,
) -> Line {
    graded_line_with_growth(hard_points, fine, max_step, refinement, min_cells, GROWTH)
}

/// [`graded_line`] with its own growth of the step per nm away from a
/// refined end (before refinement; [`GROWTH`] by default).
pub fn graded_line_with_growth(
    hard_points: &[f64],
    fine: impl Fn(f64) -> Option<f64>,
    max_step: f64,
    refinement: f64,
    min_cells: usize,
    grading: f64,
) -> Line {
    // One core over the whole line: the maximum step holds everywhere.
    let lo = hard_points.iter().copied().fold(f64::INFINITY, f64::min);
    let hi = hard_points
        .iter()
        .copied()
        .fold(f64::NEG_INFINITY, f64::max);
    let rule = FarRule {
        max_step_nm: max_step,
        far_step_nm: max_step,
        growth: 1.0,
    };
    zoned_line_graded(
        hard_points,
        fine,
        &[(lo, hi)],
        rule,
        refinement,
        min_cells,
        grading,
    )
}

/// Far-zone rule of a [`zoned_line`]: the maximum step applies inside the
/// cores; outside, the cap grows cell to cell by `growth` up to `far_step_nm`.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct FarRule {
    /// Cap inside the cores, nm (`mesh.max_step_nm`).
    pub max_step_nm: f64,
    /// Cap far from every core, nm (`mesh.max_far_step_nm`).
    pub far_step_nm: f64,
    /// Cell-to-cell ratio outside the cores (`mesh.growth`, above 1).
    pub growth: f64,
}

/// [`graded_line`] with far zones: `cores` are the intervals where the
/// maximum step holds (their ends become mesh lines); elsewhere the cap grows
/// with the distance from the nearest core as [`FarRule`] says. `refinement`
/// divides every step and the growth rate, as in [`graded_line`].
pub fn zoned_line(
    hard_points: &[f64],
    fine: impl Fn(f64) -> Option<f64>,
    cores: &[(f64, f64)],
    rule: FarRule,
    refinement: f64,
    min_cells: usize,
) -> Line {
    zoned_line_graded(
        hard_points,
        fine,
        cores,
        rule,
        refinement,
        min_cells,
        GROWTH,
    )
}

/// [`zoned_line`] with its own growth of the step away from a refined end.
fn zoned_line_graded(
    hard_points: &[f64],
    fine: impl Fn(f64) -> Option<f64>,
    cores: &[(f64, f64)],
    rule: FarRule,
    refinement: f64,
    min_cells: usize,
    grading: f64,
) -> Line {
    let max_step = rule.max_step_nm / refinement;
    let far_step = (rule.far_step_nm / refinement).max(max_step);
    let slope = (rule.growth - 1.0).max(0.0) / refinement;
    let mut pts: Vec<f64> = hard_points.to_vec();
    pts.sort_by(|a, b| a.total_cmp(b));
    let (lo, hi) = (pts[0], pts[pts.len() - 1]);
    let cores: Vec<(f64, f64)> = cores
        .iter()
        .map(|&(a, b)| (a.max(lo), b.min(hi)))
        .filter(|(a, b)| b > a)
        .collect();
    for &(a, b) in &cores {
        pts.push(a);
        pts.push(b);
    }
    pts.sort_by(|a, b| a.total_cmp(b));
    pts.dedup_by(|a, b| (*a - *b).abs() < 1e-9);
    let end_step = |x: f64| match fine(x) {
        Some(h) => EndStep::Fine((h / refinement).min(max_step)),
        None => EndStep::Coarse,
    };
    let segments: Vec<Segment> = pts
        .windows(2)
        .map(|w| {
            let mid = 0.5 * (w[0] + w[1]);
            let inside = cores.iter().any(|&(a, b)| mid > a && mid < b);
            let far = (!inside).then(|| FarCap {
                core_left: cores
                    .iter()
                    .filter(|c| c.1 <= w[0] + 1e-9)
                    .map(|c| c.1)
                    .reduce(f64::max),
                core_right: cores
                    .iter()
                    .filter(|c| c.0 >= w[1] - 1e-9)
                    .map(|c| c.0)
                    .reduce(f64::min),
                slope,
                far_step,
            });
            Segment {
                start: w[0],
                end: w[1],
                start_step: end_step(w[0]),
                end_step: end_step(w[1]),
                max_step,
                growth: grading / refinement,
                far,
            }
        })
        .collect();
    Line::from_segments(&segments, min_cells)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn segment_respects_max_step_min_cells_and_refinement() {
        let seg = Segment {
            start: 0.0,
            end: 10.0,
            start_step: EndStep::Fine(0.1),
            end_step: EndStep::Coarse,
            max_step: 0.5,
            growth: GROWTH,
            far: None,
        };
        let n = segment_nodes(&seg, 2);
        assert_eq!(n[0], 0.0);
        assert_eq!(*n.last().unwrap(), 10.0);
        let steps: Vec<f64> = n.windows(2).map(|w| w[1] - w[0]).collect();
        assert!(steps.iter().all(|&h| h > 0.0 && h <= 0.5 + 1e-12));
        assert!(steps[0] < 0.15, "first step {}", steps[0]);
        // Smooth grading: neighbouring cells differ by less than 40 %.
        for w in steps.windows(2) {
            assert!(w[1] / w[0] < 1.4 && w[0] / w[1] < 1.4, "{w:?}");
        }
        let tiny = Segment {
            start: 0.0,
            end: 0.3,
            start_step: EndStep::Coarse,
            end_step: EndStep::Coarse,
            max_step: 0.5,
            growth: GROWTH,
            far: None,
        };
        assert_eq!(segment_nodes(&tiny, 2).len(), 3);
    }

    #[test]
    fn graded_line_keeps_hard_points() {
        let line = graded_line(
            &[0.0, 2.0, 5.5, 9.0],
            |x| (x == 2.0).then_some(0.1),
            0.5,
            1.0,
            2,
        );
        let fine = graded_line(
            &[0.0, 2.0, 5.5, 9.0],
            |x| (x == 2.0).then_some(0.1),
            0.5,
            2.0,
            2,
        );
        assert!(
            fine.len() >= 2 * line.len() - 3,
            "{} vs {}",
            fine.len(),
            line.len()
        );
        for p in [0.0, 2.0, 5.5, 9.0] {
            assert!(line.index_of(p).is_some(), "{p} missing");
        }
        assert!(line.steps().iter().all(|&h| h <= 0.5 + 1e-12));
    }

    #[test]
    fn zoned_line_keeps_the_cap_in_cores_and_grows_outside() {
        let rule = FarRule {
            max_step_nm: 0.5,
            far_step_nm: 4.0,
            growth: 1.3,
        };
        // A 60 nm line with one core [20, 30] and a refined point at 25.
        let line = zoned_line(
            &[0.0, 25.0, 60.0],
            |x| (x == 25.0).then_some(0.1),
            &[(20.0, 30.0)],
            rule,
            1.0,
            2,
        );
        for p in [0.0, 20.0, 25.0, 30.0, 60.0] {
            assert!(line.index_of(p).is_some(), "{p} missing");
        }
        let steps = line.steps();
        let mids: Vec<f64> = line.nodes.windows(2).map(|w| 0.5 * (w[0] + w[1])).collect();
        for (h, m) in steps.iter().zip(&mids) {
            if *m > 20.0 && *m < 30.0 {
                assert!(*h <= 0.5 + 1e-9, "core cell {h} at {m}");
            }
            assert!(*h <= 4.0 + 1e-9, "far cell {h} at {m}");
        }
        // Far cells reach the far cap and grow at most by about the ratio.
        assert!(steps.iter().any(|&h| h > 3.0), "{steps:?}");
        for w in steps.windows(2) {
            assert!(w[1] / w[0] < 1.45 && w[0] / w[1] < 1.45, "{w:?}");
        }
        // Far fewer nodes than the uniform cap would need (60 / 0.5 = 120 cells).
        assert!(line.len() < 70, "{} nodes", line.len());
        // Refinement 2 halves the steps: about twice the nodes.
        let fine = zoned_line(
            &[0.0, 25.0, 60.0],
            |x| (x == 25.0).then_some(0.1),
            &[(20.0, 30.0)],
            rule,
            2.0,
            2,
        );
        assert!(
            fine.len() as f64 > 1.8 * line.len() as f64,
            "{} vs {}",
            fine.len(),
            line.len()
        );
        // Growth 1 keeps the maximum step everywhere, as graded_line does.
        let flat = zoned_line(
            &[0.0, 25.0, 60.0],
            |x| (x == 25.0).then_some(0.1),
            &[(20.0, 30.0)],
            FarRule {
                growth: 1.0,
                ..rule
            },
            1.0,
            2,
        );
        assert!(flat.steps().iter().all(|&h| h <= 0.5 + 1e-9));
    }
}
