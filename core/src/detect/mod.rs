//! Beat detection: a multi-lead QRS detector in the family of Pan & Tompkins (IEEE Trans Biomed Eng
//! 1985;32:230-6), R peaks placed on the signal, beats typed dominant or other, and the RR series.

mod feature;
mod peaks;
mod typing;

pub use typing::correlation;

use crate::beat::{Beat, BeatKind};
use crate::recording::Recording;
use crate::units::Hertz;

/// Half-width of the R peak search around the QRS middle found by the feature, s.
const R_SEARCH_S: f64 = 0.100;

/// Detects beats on every lead together. Returns R peaks in time order with their kind; boundaries are
/// empty (see [`crate::delineate::delineate_beats`]). Works on raw or filtered recordings (it band-passes
/// internally); a flat or noise-only lead gets no weight.
#[must_use]
pub fn detect_beats(recording: &Recording) -> Vec<Beat> {
    let fs = recording.sample_rate.hz();
    if recording.len() < (fs * 0.5) as usize {
        return Vec::new();
    }
    let leads: Vec<&[f32]> = recording.leads.iter().map(|l| l.samples.as_slice()).collect();
    let f = feature::features(&leads, fs);
    if f.weights.iter().all(|&w| w == 0.0) {
        return Vec::new();
    }
    let peaks = peaks::pick(&f.combined, fs);
    let r = place_r(&leads, &f.weights, &peaks, fs);
    let dominant = typing::dominant(&leads, &f.weights, &r, fs);
    r.iter()
        .zip(dominant)
        .map(|(&p, d)| Beat::at(p, if d { BeatKind::Dominant } else { BeatKind::Other }))
        .collect()
}

/// Places each R peak on the lead with the clearest QRS: the sample of largest absolute deflection from the
/// local mean within ± [`R_SEARCH_S`] of the QRS middle (the feature peak moved back by its lag). Keeps peaks
/// strictly increasing.
fn place_r(leads: &[&[f32]], weights: &[f64], peaks: &[usize], fs: f64) -> Vec<usize> {
    let best = weights
        .iter()
        .enumerate()
        .max_by(|a, b| a.1.total_cmp(b.1).then_with(|| b.0.cmp(&a.0)))
        .map_or(0, |(i, _)| i);
    let lead = leads[best];
    let n = lead.len();
    let h = (R_SEARCH_S * fs) as usize;
    let lag = (feature::lag_s() * fs).round() as usize;
    let mut out: Vec<usize> = Vec::with_capacity(peaks.len());
    for &p in peaks {
        let c = p.saturating_sub(lag);
        let (a, b) = (c.saturating_sub(h), (c + h + 1).min(n));
        if a >= b {
            continue;
        }
        let valid = lead[a..b].iter().filter(|v| v.is_finite());
        let count = valid.clone().count();
        let mean = if count > 0 { valid.sum::<f32>() / count as f32 } else { 0.0 };
        let dev = |i: usize| if lead[i].is_finite() { (lead[i] - mean).abs() } else { -1.0 };
        let r = (a..b).max_by(|&i, &j| dev(i).total_cmp(&dev(j))).unwrap_or(c);
        if out.last().is_none_or(|&l| r > l) {
            out.push(r);
        }
    }
    out
}

/// RR interval to the previous beat, ms (`None` for the first beat).
#[must_use]
pub fn rr_ms(beats: &[Beat], fs: Hertz) -> Vec<Option<f64>> {
    let mut out = Vec::with_capacity(beats.len());
    for (i, b) in beats.iter().enumerate() {
        out.push(
            (i > 0 && b.r > beats[i - 1].r).then(|| fs.ms_from_samples((b.r - beats[i - 1].r) as f64)),
        );
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::recording::{Lead, LeadName, Meta};

    fn rec(leads: Vec<Vec<f32>>, fs: f64) -> Recording {
        Recording {
            leads: leads.into_iter().map(|s| Lead { name: LeadName::parse("X"), samples: s }).collect(),
            sample_rate: Hertz::from_hz(fs).unwrap_or_else(|_| unreachable!()),
            start: None,
            meta: Meta::default(),
            annotations: Vec::new(),
        }
    }

    /// A train of narrow QRS-like pulses plus T waves every 0.8 s, with a little deterministic noise.
    fn synthetic(fs: f64, seconds: f64) -> (Vec<f32>, Vec<usize>) {
        let n = (fs * seconds) as usize;
        let mut x = vec![0.0f32; n];
        let mut r = Vec::new();
        let mut t = 0.5;
        while t < seconds - 0.5 {
            r.push((t * fs) as usize);
            t += 0.8;
        }
        for (k, v) in x.iter_mut().enumerate() {
            let s = k as f64 / fs;
            let mut y = 20.0 * (s * 37.0).sin() * (s * 3.1).cos();
            for &p in &r {
                let d = s - p as f64 / fs;
                y += 1200.0 * (-(d / 0.012).powi(2)).exp() + 300.0 * (-((d - 0.3) / 0.05).powi(2)).exp();
            }
            *v = y as f32;
        }
        (x, r)
    }

    #[test]
    fn finds_every_beat_even_with_a_flat_lead() {
        let fs = 250.0;
        let (x, truth) = synthetic(fs, 30.0);
        let beats = detect_beats(&rec(vec![x, vec![0.0; 7500]], fs));
        assert_eq!(beats.len(), truth.len());
        for (b, t) in beats.iter().zip(&truth) {
            assert!(b.r.abs_diff(*t) <= 2, "{} vs {}", b.r, t);
            assert_eq!(b.kind, BeatKind::Dominant);
        }
        let rr = rr_ms(&beats, Hertz::from_hz(fs).unwrap_or_else(|_| unreachable!()));
        assert_eq!(rr[0], None);
        assert!(rr[1..].iter().all(|v| v.is_some_and(|ms| (ms - 800.0).abs() <= 8.0)));
    }

    #[test]
    fn a_noise_lead_does_not_flood_beats() {
        let fs = 250.0;
        let (x, truth) = synthetic(fs, 30.0);
        let mut state = 7u64;
        let noise: Vec<f32> = (0..x.len())
            .map(|_| {
                state = state.wrapping_mul(6364136223846793005).wrapping_add(1442695040888963407);
                ((state >> 33) as f32 / (1u64 << 31) as f32 - 0.5) * 400.0
            })
            .collect();
        let beats = detect_beats(&rec(vec![noise, x], fs));
        assert_eq!(beats.len(), truth.len());
    }

    #[test]
    fn flat_recording_has_no_beats() {
        assert!(detect_beats(&rec(vec![vec![0.0; 5000]], 250.0)).is_empty());
    }
}
