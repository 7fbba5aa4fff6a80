//! Units used across Isoline, with their conventions.
//!
//! Samples are stored as `f32` microvolts (µV). Times are seconds (`f64`) or sample indices (`usize`, 0-based,
//! counted from the first sample of the recording). Paper distances are millimetres (`f64`).

use thiserror::Error;

/// A unit value that failed validation when it was built.
#[derive(Debug, Clone, PartialEq, Error)]
#[non_exhaustive]
pub enum UnitError {
    /// A sampling rate that is not a finite positive number.
    #[error("sampling rate must be a finite number above 0 Hz, got {0}")]
    SampleRate(f64),
    /// A sampling rate outside the range an ECG is read and analysed at ([`ECG_RATES_HZ`]).
    #[error("sampling rate {} Hz is outside the {min} to {max} Hz an ECG is read at", readable(*.0), min = ECG_RATES_HZ.start(), max = ECG_RATES_HZ.end())]
    EcgRate(f64),
}

/// `hz` as written in an error: plain where it has a few digits, else in scientific notation (1e300, not
/// three hundred digits).
fn readable(hz: f64) -> String {
    if (0.01..1e6).contains(&hz.abs()) { format!("{}", (hz * 1000.0).round() / 1000.0) } else { format!("{hz:.3e}") }
}

/// Sampling rates Isoline reads recordings at and analyses, Hz. Below 100 Hz a QRS complex spans a few samples
/// and R peaks, beat shapes and RR intervals jitter by a sample (on a steady demo recording at 50 or 64 Hz the
/// beats were typed other or the RR scattered 20 ms); above 20 kHz the analysis windows and filters would be sized for no ECG recorder in use (and a wrong
/// header field, such as a record duration in the wrong unit, gives rates of 10⁹ Hz or 1 Hz). The demo generator
/// uses the same range.
// Common practice, no source: diagnostic ECG recorders sample at 250–1000 Hz (up to a few kHz for pacing
// detection), ambulatory ones at 125–250 Hz, older databases at 100–128 Hz.
pub const ECG_RATES_HZ: std::ops::RangeInclusive<f64> = 100.0..=20_000.0;

/// A sampling rate in hertz: finite and strictly positive.
#[derive(Debug, Clone, Copy, PartialEq, PartialOrd, serde::Serialize, serde::Deserialize)]
#[serde(try_from = "f64", into = "f64")]
pub struct Hertz(f64);

impl Hertz {
    /// Builds a rate.
    ///
    /// # Errors
    /// [`UnitError::SampleRate`] for zero, negative, NaN or infinite values.
    pub fn from_hz(hz: f64) -> Result<Self, UnitError> {
        if hz.is_finite() && hz > 0.0 { Ok(Self(hz)) } else { Err(UnitError::SampleRate(hz)) }
    }

    /// Builds the sampling rate of a recording to be read and analysed: within [`ECG_RATES_HZ`].
    ///
    /// # Errors
    /// [`UnitError::SampleRate`] for zero, negative, NaN or infinite values; [`UnitError::EcgRate`] for a rate
    /// outside [`ECG_RATES_HZ`].
    pub fn for_ecg(hz: f64) -> Result<Self, UnitError> {
        let rate = Self::from_hz(hz)?;
        // A rate computed as samples per record ÷ record duration (EDF) lands a rounding step off a whole
        // number (7 / 0.07 s = 99.99999999999999 Hz): the ends of the range allow for that.
        let (lo, hi) = (ECG_RATES_HZ.start() * (1.0 - 1e-9), ECG_RATES_HZ.end() * (1.0 + 1e-9));
        if (lo..=hi).contains(&hz) { Ok(rate) } else { Err(UnitError::EcgRate(hz)) }
    }

    /// The rate in hertz.
    #[must_use]
    pub fn hz(self) -> f64 {
        self.0
    }

    /// Seconds between two samples.
    #[must_use]
    pub fn period_s(self) -> f64 {
        1.0 / self.0
    }

    /// Time in seconds of sample `index` (sample 0 is at t = 0).
    #[must_use]
    pub fn seconds_from_sample(self, index: f64) -> f64 {
        index / self.0
    }

    /// Sample position (fractional) of time `seconds`.
    #[must_use]
    pub fn sample_from_seconds(self, seconds: f64) -> f64 {
        seconds * self.0
    }

    /// Milliseconds spanned by `samples` sample intervals.
    #[must_use]
    pub fn ms_from_samples(self, samples: f64) -> f64 {
        samples * 1000.0 / self.0
    }
}

impl TryFrom<f64> for Hertz {
    type Error = UnitError;
    fn try_from(hz: f64) -> Result<Self, Self::Error> {
        Self::from_hz(hz)
    }
}

impl From<Hertz> for f64 {
    fn from(h: Hertz) -> f64 {
        h.0
    }
}

/// Microvolts per millivolt.
pub const UV_PER_MV: f64 = 1000.0;

/// Heart rate in beats per minute from an RR interval in milliseconds (60000 / RR).
///
/// Returns `None` for a non-positive or non-finite interval.
#[must_use]
pub fn bpm_from_rr_ms(rr_ms: f64) -> Option<f64> {
    (rr_ms.is_finite() && rr_ms > 0.0).then(|| 60_000.0 / rr_ms)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn rate_rejects_nonsense() {
        assert!(Hertz::from_hz(0.0).is_err());
        assert!(Hertz::from_hz(-250.0).is_err());
        assert!(Hertz::from_hz(f64::NAN).is_err());
        assert!(Hertz::from_hz(f64::INFINITY).is_err());
        assert_eq!(Hertz::from_hz(500.0).map(Hertz::hz), Ok(500.0));
    }

    #[test]
    fn ecg_rate_is_within_the_recorders_range() {
        assert_eq!(Hertz::for_ecg(100.0).map(Hertz::hz), Ok(100.0));
        assert_eq!(Hertz::for_ecg(64.0), Err(UnitError::EcgRate(64.0)));
        // An EDF rate of 7 samples per 0.07 s is 100 Hz up to rounding.
        assert!(Hertz::for_ecg(7.0 / 0.07).is_ok() && 7.0 / 0.07 < 100.0);
        assert_eq!(Hertz::for_ecg(20_000.0).map(Hertz::hz), Ok(20_000.0));
        assert_eq!(Hertz::for_ecg(0.5), Err(UnitError::EcgRate(0.5)));
        assert_eq!(
            UnitError::EcgRate(0.5).to_string(),
            "sampling rate 0.5 Hz is outside the 100 to 20000 Hz an ECG is read at"
        );
        assert_eq!(Hertz::for_ecg(1e12), Err(UnitError::EcgRate(1e12)));
        assert_eq!(Hertz::for_ecg(f64::NAN).map_err(|e| matches!(e, UnitError::SampleRate(_))), Err(true));
        assert_eq!(
            UnitError::EcgRate(1e12).to_string(),
            "sampling rate 1.000e12 Hz is outside the 100 to 20000 Hz an ECG is read at"
        );
    }

    #[test]
    fn sample_time_conversions() -> Result<(), UnitError> {
        let fs = Hertz::from_hz(250.0)?;
        assert_eq!(fs.seconds_from_sample(500.0), 2.0);
        assert_eq!(fs.sample_from_seconds(1.5), 375.0);
        assert_eq!(fs.ms_from_samples(1.0), 4.0);
        Ok(())
    }

    #[test]
    fn bpm_rule() {
        // Source: references.md §10 (Kligfield 2007 grid; HR = 60 / RR in seconds).
        assert_eq!(bpm_from_rr_ms(800.0), Some(75.0));
        assert_eq!(bpm_from_rr_ms(1000.0), Some(60.0));
        assert_eq!(bpm_from_rr_ms(0.0), None);
    }
}
