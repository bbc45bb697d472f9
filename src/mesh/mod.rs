//! Rectilinear tensor-product meshes with variable spacing.
//!
//! A [`Line`] is a sorted set of node coordinates (nm) built from hard points
//! (material interfaces, electrode edges, junctions: always mesh lines) and a
//! spacing rule per segment: the step grows linearly with the distance from
//! a refined end (a geometric grading), is never larger than the maximum step,
//! and every segment gets at least two cells.

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
}

/// Growth of the step per nm of distance from a refined end (dimensionless;
/// 0.25 means each cell about 25 % larger than the previous). Common practice.
pub const GROWTH: f64 = 0.25;

fn spacing(seg: &Segment, x: f64) -> f64 {
    let mut h = seg.max_step;
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
        if worst <= seg.max_step * (1.0 + 1e-9) {
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

/// [`graded_line`] with its own growth of the step per nm (before refinement).
pub fn graded_line_with_growth(
    hard_points: &[f64],
    fine: impl Fn(f64) -> Option<f64>,
    max_step: f64,
    refinement: f64,
    min_cells: usize,
    growth: f64,
) -> Line {
    let max_step = max_step / refinement;
    let mut pts: Vec<f64> = hard_points.to_vec();
    pts.sort_by(|a, b| a.partial_cmp(b).unwrap());
    pts.dedup_by(|a, b| (*a - *b).abs() < 1e-9);
    let segments: Vec<Segment> = pts
        .windows(2)
        .map(|w| {
            let end_step = |x: f64| match fine(x) {
                Some(h) => EndStep::Fine((h / refinement).min(max_step)),
                None => EndStep::Coarse,
            };
            Segment {
                start: w[0],
                end: w[1],
                start_step: end_step(w[0]),
                end_step: end_step(w[1]),
                max_step,
                growth: growth / refinement,
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
}
