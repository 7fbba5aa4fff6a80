//! Traces: one lead over one cell's time window, drawn anti-aliased. When a cell has more samples than pixel
//! columns, each column is reduced to its first, lowest, highest and last sample (min/max decimation), so the
//! cost follows pixels, not samples, and no peak is lost. Missing samples (NaN) leave the paper blank.

use tiny_skia::PathBuilder;

use super::canvas::Canvas;
use crate::paper::{Cell, Paper, Rgba, Row};
use crate::recording::Recording;

/// Stroke width of traces and calibration pulses, mm. // Common practice, no source.
pub(super) const TRACE_MM: f64 = 0.25;

/// One pixel column of a decimated trace: every finite sample whose x falls in `[x, x + 1)`.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Column {
    /// Column index in image pixels.
    pub x: i64,
    /// First finite sample in the column.
    pub first: f32,
    /// Lowest finite sample.
    pub min: f32,
    /// Highest finite sample.
    pub max: f32,
    /// Last finite sample.
    pub last: f32,
}

/// Reduces `samples` to pixel columns. Sample `i` lies at image x `x0_px + i · px_per_sample`; its column is
/// that x rounded down. Columns without a finite sample are left out (a gap).
#[must_use]
pub fn decimate_min_max(samples: &[f32], x0_px: f64, px_per_sample: f64) -> Vec<Column> {
    let mut out: Vec<Column> = Vec::new();
    for (i, &v) in samples.iter().enumerate() {
        if !v.is_finite() {
            continue;
        }
        let x = (x0_px + i as f64 * px_per_sample).floor() as i64;
        match out.last_mut() {
            Some(c) if c.x == x => {
                c.min = c.min.min(v);
                c.max = c.max.max(v);
                c.last = v;
            }
            _ => out.push(Column { x, first: v, min: v, max: v, last: v }),
        }
    }
    out
}

/// Draws the part of `cell`'s lead inside its window, clamped vertically to `[y_min_mm, y_max_mm]`. `held` is
/// the recording drawn and the sample of the whole recording (the one the cell's times refer to) where it starts.
pub(super) fn draw_cell(
    canvas: &mut Canvas,
    held: (&Recording, usize),
    paper: &Paper,
    row: &Row,
    cell: &Cell,
    (y_min_mm, y_max_mm): (f64, f64),
    color: Rgba,
) {
    let (recording, first) = held;
    let Some(lead) = recording.leads.get(cell.lead) else { return };
    let fs = recording.sample_rate.hz();
    // Samples i0..=i1 of the whole recording, held from `first` on.
    let end = first + lead.samples.len();
    let i0 = ((cell.t0_s * fs).ceil().max(0.0) as usize).max(first);
    let i1 = ((cell.t1_s * fs).floor() as usize).min(end.saturating_sub(1));
    if end == first || i0 > i1 || i0 >= end {
        return;
    }
    let samples = &lead.samples[i0 - first..=i1 - first];
    let ppm = canvas.ppm;
    let y_px = |uv: f32| -> f32 {
        let mm = row.y_from_uv(paper, f64::from(uv), cell.inverted).clamp(y_min_mm, y_max_mm);
        (mm * ppm) as f32
    };
    let x0_px = cell.x_from_time(paper, i0 as f64 / fs) * ppm;
    let px_per_sample = paper.mm_from_seconds(1.0 / fs) * ppm;
    let width_px = cell.width_mm * ppm;
    let mut pb = PathBuilder::new();
    if samples.len() as f64 > width_px {
        let mut prev: Option<(i64, f32)> = None;
        for c in decimate_min_max(samples, x0_px, px_per_sample) {
            let x = c.x as f32 + 0.5;
            match prev {
                Some((px, last)) if px + 1 == c.x => {
                    // Visit the nearer extreme first so the path zig-zags without doubling back.
                    let (a, b) =
                        if (last - c.min).abs() < (last - c.max).abs() { (c.min, c.max) } else { (c.max, c.min) };
                    pb.line_to(x, y_px(a));
                    pb.line_to(x, y_px(b));
                }
                _ => {
                    pb.move_to(x, y_px(c.first));
                    pb.line_to(x, y_px(c.min));
                    pb.line_to(x, y_px(c.max));
                }
            }
            pb.line_to(x, y_px(c.last));
            prev = Some((c.x, c.last));
        }
    } else {
        let mut pen_down = false;
        for (i, &v) in samples.iter().enumerate() {
            if !v.is_finite() {
                pen_down = false;
                continue;
            }
            let x = (x0_px + i as f64 * px_per_sample) as f32;
            if pen_down {
                pb.line_to(x, y_px(v));
            } else {
                pb.move_to(x, y_px(v));
                pen_down = true;
            }
        }
    }
    if let Some(path) = pb.finish() {
        canvas.stroke_polyline(&path, color, TRACE_MM);
    }
}

/// Draws the 1 mV calibration pulse at the start of a row.
pub(super) fn draw_calibration(canvas: &mut Canvas, paper: &Paper, row: &Row, color: Rgba) {
    let pts = row.calibration_pulse(paper);
    let mut pb = PathBuilder::new();
    pb.move_to(canvas.px(pts[0].0), canvas.px(pts[0].1));
    for p in &pts[1..] {
        pb.line_to(canvas.px(p.0), canvas.px(p.1));
    }
    if let Some(path) = pb.finish() {
        canvas.stroke(&path, color, TRACE_MM, None);
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Slow, obvious version: for every column, scan all samples.
    fn naive(samples: &[f32], x0: f64, pps: f64) -> Vec<Column> {
        let col = |i: usize| (x0 + i as f64 * pps).floor() as i64;
        let Some(lo) = (0..samples.len()).map(col).min() else { return vec![] };
        let hi = (0..samples.len()).map(col).max().unwrap_or(lo);
        (lo..=hi)
            .filter_map(|x| {
                let v: Vec<f32> =
                    (0..samples.len()).filter(|&i| col(i) == x && samples[i].is_finite()).map(|i| samples[i]).collect();
                let first = *v.first()?;
                Some(Column {
                    x,
                    first,
                    min: v.iter().copied().fold(f32::INFINITY, f32::min),
                    max: v.iter().copied().fold(f32::NEG_INFINITY, f32::max),
                    last: *v.last()?,
                })
            })
            .collect()
    }

    #[test]
    fn decimation_matches_naive_scan() {
        // Fixed pseudo-random samples (LCG, seed 7) with NaN runs.
        let mut s = 7u64;
        let samples: Vec<f32> = (0..3000)
            .map(|i| {
                s = s.wrapping_mul(6364136223846793005).wrapping_add(1442695040888963407);
                if (1200..1290).contains(&i) { f32::NAN } else { ((s >> 33) as f32 / 2.0e9) * 1000.0 - 500.0 }
            })
            .collect();
        for (x0, pps) in [(10.3, 0.2953), (0.0, 1.0), (5.5, 0.07), (3.0, 2.5)] {
            assert_eq!(decimate_min_max(&samples, x0, pps), naive(&samples, x0, pps), "x0 {x0} pps {pps}");
        }
    }

    #[test]
    fn nan_run_leaves_columns_out() {
        let mut samples = vec![1.0f32; 100];
        for v in &mut samples[40..60] {
            *v = f32::NAN;
        }
        let cols = decimate_min_max(&samples, 0.0, 0.1);
        // Samples 40..60 cover x 4.0..6.0: columns 4 and 5 are blank.
        let xs: Vec<i64> = cols.iter().map(|c| c.x).collect();
        assert_eq!(xs, vec![0, 1, 2, 3, 6, 7, 8, 9]);
    }
}
