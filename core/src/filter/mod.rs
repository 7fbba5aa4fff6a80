//! Filters for display and analysis: zero-phase baseline-wander removal, mains notch (50/60 Hz, found from the
//! spectrum when asked), optional low-pass. Filters write to a copy; the raw recording never changes.
//!
//! Source: references.md §2 — low-frequency cutoff up to 0.67 Hz is allowed with zero-phase (linear-phase)
//! digital filters (Kligfield et al., Circulation 2007;115:1306-24).

mod iir;
mod mains;

pub use iir::{Biquad, BiquadState, bridged, fill_invalid, filtfilt};
pub use mains::detect_mains;

use crate::recording::{Lead, Recording};

/// Mains notch choice.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq, serde::Serialize, serde::Deserialize)]
pub enum Mains {
    /// Notch at 50 or 60 Hz when the spectrum shows a mains line; no notch otherwise.
    #[default]
    Auto,
    /// No notch.
    Off,
    /// Notch at 50 Hz.
    Hz50,
    /// Notch at 60 Hz.
    Hz60,
}

/// Filter settings. The default is 0.5 Hz zero-phase baseline removal, automatic mains notch, no low-pass.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct FilterSettings {
    /// High-pass (baseline wander) cutoff in Hz; `None` = off. Values above 0.67 Hz are lowered to 0.67 Hz.
    pub baseline_hz: Option<f64>,
    /// Mains notch.
    pub mains: Mains,
    /// Low-pass cutoff in Hz (40, 100 or 150 are usual); `None` = off (or at/above Nyquist).
    pub lowpass_hz: Option<f64>,
}

impl Default for FilterSettings {
    fn default() -> Self {
        Self { baseline_hz: Some(DEFAULT_BASELINE_HZ), mains: Mains::Auto, lowpass_hz: None }
    }
}

/// Default baseline cutoff, Hz (forward-backward second-order Butterworth: −6 dB at this frequency).
pub const DEFAULT_BASELINE_HZ: f64 = 0.5;
/// Highest baseline cutoff allowed for zero-phase filters. Source: references.md §2 (Kligfield 2007).
pub const MAX_BASELINE_HZ: f64 = 0.67;
/// Notch quality factor (bandwidth = centre / Q, ≈ 1.7 Hz at 50 Hz).
// Common practice, no source.
const NOTCH_Q: f64 = 30.0;

/// A filtered copy of a recording and what was done to it.
#[derive(Debug, Clone, PartialEq)]
pub struct Filtered {
    /// The filtered recording (same leads, rate, metadata; invalid samples stay NaN).
    pub recording: Recording,
    /// The filter set as text, e.g. `0.5–150 Hz, 50 Hz notch`.
    pub description: String,
    /// The notch frequency applied, if any.
    pub mains_hz: Option<f64>,
}

impl FilterSettings {
    /// These settings with an automatic notch decided once from the spectrum of `recording` (50 Hz, 60 Hz or
    /// off), so every part of a long recording filtered separately gets the same notch.
    #[must_use]
    pub fn with_mains_decided(self, recording: &Recording) -> Self {
        if self.mains != Mains::Auto {
            return self;
        }
        let mains = match detected_mains(recording) {
            Some(f) if f < 55.0 => Mains::Hz50,
            Some(_) => Mains::Hz60,
            None => Mains::Off,
        };
        Self { mains, ..self }
    }
}

/// The mains frequency the spectrum of `recording` shows, if any (see [`detect_mains`]).
fn detected_mains(recording: &Recording) -> Option<f64> {
    let leads: Vec<&[f32]> = recording.leads.iter().map(|l| l.samples.as_slice()).collect();
    detect_mains(&leads, recording.sample_rate.hz())
}

/// Filters a copy of `recording`. Invalid (NaN) samples are interpolated for filtering and stay NaN in the
/// output; the input is never changed.
#[must_use]
pub fn apply(recording: &Recording, settings: &FilterSettings) -> Filtered {
    let fs = recording.sample_rate.hz();
    let nyquist = fs / 2.0;
    let baseline = settings.baseline_hz.filter(|&f| f.is_finite() && f > 0.0).map(|f| f.min(MAX_BASELINE_HZ));
    let mains_hz = match settings.mains {
        Mains::Off => None,
        Mains::Hz50 => Some(50.0),
        Mains::Hz60 => Some(60.0),
        Mains::Auto => detected_mains(recording),
    }
    .filter(|&f| f < nyquist * 0.95);
    let lowpass = settings.lowpass_hz.filter(|&f| f.is_finite() && f > 0.0 && f < nyquist * 0.95);

    let mut sections = Vec::new();
    if let Some(f) = baseline {
        sections.push(Biquad::highpass(f, fs));
    }
    if let Some(f) = mains_hz {
        sections.push(Biquad::notch(f, NOTCH_Q, fs));
    }
    if let Some(f) = lowpass {
        sections.push(Biquad::lowpass(f, fs));
    }
    // Pad long enough for the slowest section to settle (≈ 2 periods of the baseline cutoff).
    let pad = baseline.map_or((fs * 0.5) as usize, |f| (2.0 * fs / f) as usize);
    // One lead at a time, so a long recording never holds more than one lead's f64 working copy.
    let leads = recording
        .leads
        .iter()
        .map(|lead| {
            let y = filtfilt(&sections, &fill_invalid(&lead.samples), pad);
            let samples = lead.samples.iter().zip(y).map(|(&s, v)| if s.is_finite() { v as f32 } else { s }).collect();
            Lead { name: lead.name.clone(), samples }
        })
        .collect();
    let out = Recording {
        leads,
        sample_rate: recording.sample_rate,
        start: recording.start,
        meta: recording.meta.clone(),
        annotations: recording.annotations.clone(),
    };
    Filtered { recording: out, description: describe(baseline, mains_hz, lowpass, nyquist), mains_hz }
}

/// Text for a filter set: pass band, then the notch (`0.5–150 Hz, 50 Hz notch`).
fn describe(baseline: Option<f64>, mains: Option<f64>, lowpass: Option<f64>, nyquist: f64) -> String {
    let num = |f: f64| {
        if (f - f.round()).abs() < 1e-9 {
            format!("{}", f.round() as i64)
        } else {
            format!("{f:.2}").trim_end_matches('0').to_string()
        }
    };
    let lo = baseline.map_or_else(|| "0".to_string(), num);
    let hi = num(lowpass.unwrap_or(nyquist));
    let mut s = format!("{lo}–{hi} Hz");
    if let Some(m) = mains {
        s.push_str(&format!(", {} Hz notch", num(m)));
    }
    s
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::recording::{Lead, LeadName, Meta};
    use crate::units::Hertz;

    fn rec(samples: Vec<f32>, fs: f64) -> Recording {
        Recording {
            leads: vec![Lead { name: LeadName::parse("II"), samples }],
            sample_rate: Hertz::from_hz(fs).unwrap_or_else(|_| unreachable!()),
            start: None,
            meta: Meta::default(),
            annotations: Vec::new(),
        }
    }

    #[test]
    fn removes_wander_and_hum_and_describes_itself() {
        let fs = 500.0;
        let n = 20_000;
        let samples: Vec<f32> = (0..n)
            .map(|k| {
                let t = k as f64 / fs;
                let wander = 800.0 * (2.0 * std::f64::consts::PI * 0.15 * t).sin();
                let hum = 100.0 * (2.0 * std::f64::consts::PI * 50.0 * t).sin();
                let beat = 1000.0 * (-(((t % 1.0) - 0.5) / 0.015).powi(2)).exp();
                (wander + hum + beat) as f32
            })
            .collect();
        let raw = rec(samples.clone(), fs);
        let f = apply(&raw, &FilterSettings { lowpass_hz: Some(150.0), ..FilterSettings::default() });
        assert_eq!(raw.leads[0].samples, samples, "raw recording unchanged");
        assert_eq!(f.mains_hz, Some(50.0));
        assert_eq!(f.description, "0.5–150 Hz, 50 Hz notch");
        // Between beats (t = 0.9 s of each second) the output sits near zero: no wander, no hum.
        let y = &f.recording.leads[0].samples;
        for sec in 2..38 {
            let k = sec * 500 + 450;
            assert!(y[k].abs() < 40.0, "sample {k}: {}", y[k]);
        }
    }

    #[test]
    fn nan_samples_do_not_poison_the_lead() {
        let fs = 250.0;
        let mut s: Vec<f32> = (0..5000).map(|k| (k as f32 * 0.05).sin() * 500.0).collect();
        s[1000..1010].fill(f32::NAN);
        let f = apply(&rec(s, fs), &FilterSettings::default());
        let y = &f.recording.leads[0].samples;
        assert!(y[1000..1010].iter().all(|v| v.is_nan()));
        assert_eq!(y.iter().filter(|v| v.is_nan()).count(), 10);
        assert_eq!(f.description, "0.5–125 Hz");
    }
}
