//! The baseline left after the high-pass, estimated by a cubic spline through each beat's PR level and taken off
//! before beats are stacked into the representative beat.
//!
//! Source: Meyer & Keiser, Comput Biomed Res 1977;10:459-70 (cubic-spline baseline estimation with one knot per
//! beat in the PR segment). The 0.5 Hz zero-phase high-pass (references.md §2 caps it at 0.67 Hz) leaves most of
//! a wander at 0.5–1 Hz (fast breathing, movement); each beat then sits on a slope of its own, and the median of
//! beats on different slopes has no flat baseline to end its T wave on (demo normal with 1 mV of wander at
//! 0.5 Hz: QT 714 ms on the representative beat for 382, while the single beats read 376).

use std::borrow::Cow;

use crate::beat::{Beat, BeatKind};
use crate::recording::Recording;

/// The PR level of a beat is read over this span before its QRS onset, s (start, end).
// Common practice, no source: the PR segment's last tens of ms before the QRS are its flattest part (the P wave
// has ended, the QRS not begun); the knot is the median over the span.
const KNOT_SPAN_S: (f64, f64) = (0.030, 0.010);

/// Fewest valid samples in a knot's span for the knot to count.
const MIN_KNOT_SAMPLES: usize = 3;

/// A recording as levelled for the representative beat ([`levelled`]).
pub struct Levelled<'a> {
    /// The recording with its levelled leads; borrowed when no lead is levelled.
    pub recording: Cow<'a, Recording>,
    /// How far the baseline still moves from one dominant beat to the next on it: per lead the median change of
    /// the PR level between consecutive beats, µV, and of those the median over the leads. `None` with fewer than
    /// two knots on every lead.
    pub step_uv: Option<f64>,
}

/// `recording` with each lead less its baseline: a natural cubic spline through the lead's PR level of every
/// dominant beat of `beats` (every beat when none is dominant) that has a QRS onset (the median over
/// [`KNOT_SPAN_S`] before it), held at the end knots' levels before the first and after the last. A premature
/// beat's "PR level" lies on the T wave before it (bigeminy coupled at 400 ms with 0.5 mV of wander: ST levels
/// ±40 µV off where its beats were knots). A lead with no knot is kept unchanged; with one knot it is
/// shifted by that knot's level; with two, less the straight line through them. Invalid samples stay invalid.
/// A lead is levelled only where that makes its beats more alike (see [`spread`]): wander faster than half the
/// heart rate passes between the knots unseen, and a spline through them then adds a wave of its own.
#[must_use]
pub fn levelled<'a>(recording: &'a Recording, beats: &[Beat]) -> Levelled<'a> {
    let fs = recording.sample_rate.hz();
    let (from, to) = ((KNOT_SPAN_S.0 * fs).round() as usize, ((KNOT_SPAN_S.1 * fs).round() as usize).max(1));
    // The beats the choice is made on: the dominant ones (all when none is) whose span fits the recording.
    let (sb, sa) = ((SPREAD_SPAN_S.0 * fs).round() as usize, (SPREAD_SPAN_S.1 * fs).round() as usize);
    let any_dominant = beats.iter().any(|b| b.kind == BeatKind::Dominant);
    let spans: Vec<std::ops::Range<usize>> = beats
        .iter()
        .filter(|b| !any_dominant || b.kind == BeatKind::Dominant)
        .filter(|b| b.r >= sb && b.r + sa <= recording.len())
        .map(|b| b.r - sb..b.r + sa)
        .collect();
    let mut changed: Vec<(usize, Vec<f32>)> = Vec::new();
    let mut steps: Vec<f64> = Vec::new();
    for (i, lead) in recording.leads.iter().enumerate() {
        let x = &lead.samples;
        let at_x = knots(x, beats, any_dominant, (from, to));
        let y = Spline::natural(&at_x)
            .map(|spline| x.iter().enumerate().map(|(k, &v)| v - spline.at(k as f64) as f32).collect::<Vec<f32>>())
            .filter(|y| spread(y, &spans) < spread(x, &spans));
        // The step is read where the median is taken: on the levelled lead where it was levelled.
        let at = match &y {
            Some(y) => knots(y, beats, any_dominant, (from, to)),
            None => at_x,
        };
        let lead_steps: Vec<f64> = at.windows(2).map(|w| (w[1].1 - w[0].1).abs()).collect();
        steps.extend(crate::measure::stats::median(&lead_steps));
        changed.extend(y.map(|y| (i, y)));
    }
    let recording = if changed.is_empty() {
        Cow::Borrowed(recording)
    } else {
        let mut out = recording.clone();
        for (i, y) in changed {
            out.leads[i].samples = y;
        }
        Cow::Owned(out)
    };
    Levelled { recording, step_uv: crate::measure::stats::median(&steps) }
}

/// The PR level of lead `x` (median over `from`..`to` samples before QRS onset, [`KNOT_SPAN_S`]) at each beat of
/// `beats` that has a QRS onset, dominant ones only when `any_dominant`: (position, level) in time order.
fn knots(x: &[f32], beats: &[Beat], any_dominant: bool, (from, to): (usize, usize)) -> Vec<(f64, f64)> {
    beats
        .iter()
        .filter(|b| !any_dominant || b.kind == BeatKind::Dominant)
        .filter_map(|b| b.bounds.qrs_on)
        .filter(|&q| q >= from && q <= x.len())
        .filter_map(|q| {
            let mut span: Vec<f32> = x[q - from..q + 1 - to].iter().copied().filter(|v| v.is_finite()).collect();
            if span.len() < MIN_KNOT_SAMPLES {
                return None;
            }
            let mid = span.len() / 2;
            let level = *span.select_nth_unstable_by(mid, f32::total_cmp).1;
            Some(((q - (from + to) / 2) as f64, f64::from(level)))
        })
        .collect()
}

/// Span around each R peak over which beats are compared when choosing whether to level a lead, s (before,
/// after): PR segment, QRS and the T wave of a usual QT.
const SPREAD_SPAN_S: (f64, f64) = (0.20, 0.45);

/// How much the beats at `spans` (sample ranges of equal length) differ from their mean beat: the sum of squared
/// departures over the samples valid in every beat.
fn spread(x: &[f32], spans: &[std::ops::Range<usize>]) -> f64 {
    let Some(len) = spans.first().map(|s| s.len()) else { return 0.0 };
    let n = spans.len() as f64;
    (0..len)
        .map(|k| {
            let (mut s, mut ss) = (0.0f64, 0.0f64);
            for span in spans {
                let v = f64::from(x[span.start + k]);
                s += v;
                ss += v * v;
            }
            if (ss - s * s / n).is_finite() { ss - s * s / n } else { 0.0 }
        })
        .sum()
}

/// A natural cubic spline through knots at increasing positions (second derivative 0 at both ends), constant
/// beyond them.
struct Spline {
    /// Knot positions and values.
    x: Vec<f64>,
    y: Vec<f64>,
    /// Second derivative at each knot.
    m: Vec<f64>,
}

impl Spline {
    /// The spline through `knots` (position, value), positions strictly increasing; knots not after the one before
    /// are skipped. `None` without a knot.
    fn natural(knots: &[(f64, f64)]) -> Option<Self> {
        let mut x: Vec<f64> = Vec::with_capacity(knots.len());
        let mut y = Vec::with_capacity(knots.len());
        for &(p, v) in knots {
            if x.last().is_none_or(|&l| p > l) {
                x.push(p);
                y.push(v);
            }
        }
        let n = x.len();
        if n == 0 {
            return None;
        }
        // Tridiagonal system for the inner second derivatives (Thomas algorithm); the end ones are 0.
        let mut m = vec![0.0; n];
        if n > 2 {
            let h: Vec<f64> = x.windows(2).map(|w| w[1] - w[0]).collect();
            let (mut diag, mut rhs) = (vec![0.0; n], vec![0.0; n]);
            for i in 1..n - 1 {
                diag[i] = 2.0 * (h[i - 1] + h[i]);
                rhs[i] = 6.0 * ((y[i + 1] - y[i]) / h[i] - (y[i] - y[i - 1]) / h[i - 1]);
            }
            for i in 2..n - 1 {
                let w = h[i - 1] / diag[i - 1];
                diag[i] -= w * h[i - 1];
                rhs[i] -= w * rhs[i - 1];
            }
            for i in (1..n - 1).rev() {
                m[i] = (rhs[i] - h[i] * m[i + 1]) / diag[i];
            }
        }
        Some(Self { x, y, m })
    }

    /// The spline's value at position `t`.
    fn at(&self, t: f64) -> f64 {
        let (x, y, m) = (&self.x, &self.y, &self.m);
        let n = x.len();
        if t <= x[0] || n == 1 {
            return y[0];
        }
        if t >= x[n - 1] {
            return y[n - 1];
        }
        let i = x.partition_point(|&p| p <= t) - 1;
        let h = x[i + 1] - x[i];
        let (a, b) = ((x[i + 1] - t) / h, (t - x[i]) / h);
        a * y[i] + b * y[i + 1] + ((a * a * a - a) * m[i] + (b * b * b - b) * m[i + 1]) * h * h / 6.0
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::beat::BeatKind;
    use crate::recording::{Lead, LeadName, Meta};
    use crate::units::Hertz;
    use std::f64::consts::PI;

    const FS: f64 = 500.0;

    /// One lead at 500 Hz: a beat every 800 ms (R at 0.3 s + 0.8 s·i; QRS 0.05 s either side, a 0.3 mV T wave
    /// peaking 0.3 s after R) plus `wander(t)`, with each beat's QRS onset known.
    fn beats_on(wander: impl Fn(f64) -> f64) -> (Recording, Vec<Beat>, Vec<f32>) {
        let n = (10.0 * FS) as usize;
        let rs: Vec<usize> = (0..12).map(|i| ((0.3 + 0.8 * i as f64) * FS) as usize).collect();
        let clean: Vec<f32> = (0..n)
            .map(|k| {
                let t = k as f64 / FS;
                rs.iter()
                    .map(|&r| {
                        let d = t - r as f64 / FS;
                        1000.0 * (-(d / 0.012).powi(2)).exp() + 300.0 * (-((d - 0.3) / 0.05).powi(2)).exp()
                    })
                    .sum::<f64>() as f32
            })
            .collect();
        let samples = clean.iter().enumerate().map(|(k, &v)| v + wander(k as f64 / FS) as f32).collect();
        let recording = Recording {
            leads: vec![Lead { name: LeadName::parse("II"), samples }],
            sample_rate: Hertz::from_hz(FS).unwrap_or_else(|_| unreachable!()),
            start: None,
            meta: Meta::default(),
            annotations: Vec::new(),
        };
        let beats = rs
            .iter()
            .map(|&r| {
                let mut b = Beat::at(r, BeatKind::Dominant);
                b.bounds.qrs_on = Some(r - 25);
                b
            })
            .collect();
        (recording, beats, clean)
    }

    #[test]
    fn slow_wander_is_taken_off_and_a_flat_baseline_left_alone() {
        // 1 mV at 0.25 Hz (breathing): levelled, the lead is within 40 µV of the clean one between the second knot
        // and the last but one, and within 100 µV from the first to the last, where the natural spline's ends
        // bend less than the wave (the clean lead's own PR level is 0).
        let (rec, beats, clean) = beats_on(|t| 1000.0 * (2.0 * PI * 0.25 * t + 0.4).sin());
        let Cow::Owned(out) = levelled(&rec, &beats).recording else { panic!("not levelled") };
        let worst =
            |r: std::ops::Range<usize>| r.map(|k| (out.leads[0].samples[k] - clean[k]).abs()).fold(0.0, f32::max);
        let (inner, whole) = (worst(515..4115), worst(115..4515));
        assert!(inner < 40.0 && whole < 100.0, "worst {inner} µV inside, {whole} µV from end knot to end knot");
        // Without wander there is nothing to take off: the beats are as alike either way, and the lead is kept.
        let (rec, beats, _) = beats_on(|_| 0.0);
        assert!(matches!(levelled(&rec, &beats).recording, Cow::Borrowed(_)));
        // Wander faster than half the heart rate (0.9 Hz at 75 bpm) passes between the knots: a spline through
        // them would add a slower wave of its own, which makes the beats less alike, so the lead is kept.
        let (rec, beats, _) = beats_on(|t| 500.0 * (2.0 * PI * 0.9 * t).sin());
        assert!(matches!(levelled(&rec, &beats).recording, Cow::Borrowed(_)));
    }

    #[test]
    fn spline_passes_through_its_knots_and_is_exact_on_lines() {
        let knots = [(0.0, 1.0), (10.0, 3.0), (25.0, -2.0), (40.0, 0.5)];
        let s = Spline::natural(&knots).unwrap_or_else(|| panic!("no spline"));
        for &(x, y) in &knots {
            assert!((s.at(x) - y).abs() < 1e-9, "at {x}: {} for {y}", s.at(x));
        }
        // A straight line is its own natural spline.
        let line: Vec<(f64, f64)> = [0.0, 7.0, 20.0, 31.0].iter().map(|&x| (x, 2.0 - 0.5 * x)).collect();
        let s = Spline::natural(&line).unwrap_or_else(|| panic!("no spline"));
        for t in [3.0, 12.5, 25.0, 30.0] {
            assert!((s.at(t) - (2.0 - 0.5 * t)).abs() < 1e-9);
        }
        // Held flat beyond the end knots; one knot is a constant.
        assert_eq!(s.at(-5.0), 2.0);
        assert_eq!(Spline::natural(&[(4.0, 7.0)]).unwrap_or_else(|| panic!("no spline")).at(100.0), 7.0);
        assert!(Spline::natural(&[]).is_none());
    }

    #[test]
    fn spline_follows_a_slow_sine_between_knots() {
        // Knots every 0.8 s (75 bpm) on a 0.3 Hz wander of 1000 µV: between them the spline stays within 5 % of
        // the amplitude. Source of the error bound's order: the cubic spline's interpolation error falls as h⁴
        // (de Boor, A Practical Guide to Splines, 1978; from memory).
        let f = |t: f64| 1000.0 * (2.0 * std::f64::consts::PI * 0.3 * t).sin();
        let knots: Vec<(f64, f64)> = (0..13).map(|i| i as f64 * 0.8).map(|t| (t, f(t))).collect();
        let s = Spline::natural(&knots).unwrap_or_else(|| panic!("no spline"));
        let worst = (80..880).map(|k| k as f64 / 100.0).map(|t| (s.at(t) - f(t)).abs()).fold(0.0, f64::max);
        assert!(worst < 50.0, "worst {worst} µV");
    }
}
