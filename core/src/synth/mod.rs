//! Demo recordings with known truth, from the dynamical ECG model of McSharry, Clifford, Tarassenko & Smith
//! (IEEE Trans Biomed Eng 2003;50:289-94).
//!
//! ```
//! use isoline_core::synth::{Scenario, generate};
//! let spec = Scenario::Normal.spec();
//! let demo = generate(&spec).unwrap();
//! assert_eq!(demo.recording.leads.len(), 12);
//! // The truth knows every beat's boundaries; intervals match what was asked for.
//! assert!((demo.truth.qt_ms.unwrap() - spec.qt_ms).abs() < 1e-6);
//! ```
//!
//! - [`model`]: the paper's ODE with events of compact support (each wave starts and ends at a definite
//!   instant), integrated with a fixed-step fourth-order Runge–Kutta scheme;
//! - [`shape`]: one beat's events, time-scaled from the paper's to the requested PR, QRS and QT, and the
//!   boundary rule that defines the truth;
//! - [`rhythm`]: the beat schedule (rate, irregularity, ectopic beats);
//! - [`leads`]: the cardiac dipole of each wave and its projection to the leads;
//! - [`noise`]: seeded baseline wander, mains hum and muscle noise;
//! - [`truth`]: the truth file; [`scenario`]: the named demos.
//!
//! Everything here is synthetic: no patient, no recording device.

use thiserror::Error;

use crate::recording::{Lead, Meta, Recording};
use crate::units::{ECG_RATES_HZ, Hertz};

pub mod leads;
pub mod model;
pub mod noise;
pub mod rhythm;
pub mod scenario;
pub mod shape;
pub mod truth;

pub use leads::LeadSet;
pub use noise::NoiseSpec;
pub use rhythm::{Ectopics, TrueKind};
pub use scenario::Scenario;
pub use truth::{TrueBeat, Truth};

/// Everything a synthetic recording is made from. Times in ms, amplitudes in µV, angles in degrees.
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct SynthSpec {
    /// Scenario name, recorded in the truth and the file's metadata.
    pub scenario: String,
    /// Length of the recording, s.
    pub seconds: f64,
    /// Sampling rate, Hz.
    pub rate_hz: f64,
    /// Which leads.
    pub leads: LeadSet,
    /// Seed of every random choice (RR variation, ectopic placement, noise).
    pub seed: u64,
    /// Mean sinus rate, bpm.
    pub heart_rate_bpm: f64,
    /// Amplitude of a slow day–night swing of the rate (period 24 h), bpm.
    pub heart_rate_swing_bpm: f64,
    /// Beat-to-beat RR variation of sinus beats (standard deviation as a share of the RR); 0 = regular.
    pub rr_variation: f64,
    /// PR interval (P onset to QRS onset), ms.
    pub pr_ms: f64,
    /// P wave duration, ms.
    pub p_ms: f64,
    /// QRS duration, ms.
    pub qrs_ms: f64,
    /// QT interval (QRS onset to T end), ms.
    pub qt_ms: f64,
    /// Frontal QRS axis, degrees.
    pub axis_deg: f64,
    /// Frontal P axis, degrees.
    pub p_axis_deg: f64,
    /// Frontal T axis, degrees.
    pub t_axis_deg: f64,
    /// Size of the R dipole (the R amplitude in a lead along the QRS axis), µV.
    pub r_amplitude_uv: f64,
    /// Ectopic beats.
    pub ectopics: Ectopics,
    /// Noise.
    pub noise: NoiseSpec,
    /// Coefficient λ of the model's pull to baseline −λ(z − z₀), 1/s (see [`model`]).
    pub pull_per_s: f64,
}

impl Default for SynthSpec {
    /// The `normal` scenario: 10 s, 500 Hz, 12 leads, seed 1.
    fn default() -> Self {
        Self {
            scenario: "normal".into(),
            seconds: 10.0,
            rate_hz: 500.0,
            leads: LeadSet::Standard12,
            seed: 1,
            heart_rate_bpm: 72.0,
            heart_rate_swing_bpm: 0.0,
            rr_variation: 0.0,
            pr_ms: 160.0,
            p_ms: 100.0,
            qrs_ms: 90.0,
            qt_ms: 380.0,
            axis_deg: 50.0,
            p_axis_deg: 50.0,
            t_axis_deg: 45.0,
            r_amplitude_uv: 1000.0,
            ectopics: Ectopics::None,
            noise: NoiseSpec::NONE,
            // 2π·0.05 Hz: the pole of the recommended 0.05 Hz low-frequency cutoff (Kligfield et al. 2007).
            pull_per_s: std::f64::consts::TAU * 0.05,
        }
    }
}

/// A parameter set that cannot make a recording.
#[derive(Debug, Clone, PartialEq, Error)]
#[non_exhaustive]
pub enum SynthError {
    /// A parameter outside its allowed range.
    #[error("{name} = {value} is out of range ({range})")]
    OutOfRange {
        /// Parameter name.
        name: &'static str,
        /// Value given.
        value: f64,
        /// Allowed range.
        range: &'static str,
    },
    /// The timing does not fit (RR too short for PR and QT, recording too short).
    #[error("{0}")]
    Timing(String),
}

fn check(name: &'static str, value: f64, lo: f64, hi: f64, range: &'static str) -> Result<(), SynthError> {
    if value.is_finite() && value >= lo && value <= hi {
        Ok(())
    } else {
        Err(SynthError::OutOfRange { name, value, range })
    }
}

impl SynthSpec {
    /// Checks every parameter's range.
    ///
    /// # Errors
    /// [`SynthError::OutOfRange`] naming the first bad parameter.
    pub fn validate(&self) -> Result<(), SynthError> {
        check("seconds", self.seconds, 1.0, 7.0 * 86_400.0, "1 s to 7 days")?;
        check("rate_hz", self.rate_hz, *ECG_RATES_HZ.start(), *ECG_RATES_HZ.end(), "100 to 20000 Hz")?;
        check("heart_rate_bpm", self.heart_rate_bpm, 20.0, 220.0, "20 to 220 bpm")?;
        check("heart_rate_swing_bpm", self.heart_rate_swing_bpm, 0.0, self.heart_rate_bpm - 20.0, "0 to rate − 20")?;
        check("rr_variation", self.rr_variation, 0.0, 0.5, "0 to 0.5")?;
        check("p_ms", self.p_ms, 40.0, 200.0, "40 to 200 ms")?;
        check("pr_ms", self.pr_ms, self.p_ms + 10.0, 600.0, "P duration + 10 ms to 600 ms")?;
        check("qrs_ms", self.qrs_ms, 40.0, 250.0, "40 to 250 ms")?;
        check("qt_ms", self.qt_ms, self.qrs_ms + 100.0, 800.0, "QRS + 100 ms to 800 ms")?;
        for (name, v) in [("axis_deg", self.axis_deg), ("p_axis_deg", self.p_axis_deg), ("t_axis_deg", self.t_axis_deg)]
        {
            check(name, v, -180.0, 360.0, "-180 to 360 degrees")?;
        }
        check("r_amplitude_uv", self.r_amplitude_uv, 1.0, 10_000.0, "1 to 10000 µV")?;
        check("pull_per_s", self.pull_per_s, 0.0, 10.0, "0 to 10 per second")?;
        if let Ectopics::Chance(p) = self.ectopics {
            check("ectopic chance", p, 0.0, 0.5, "0 to 0.5")?;
        }
        let n = &self.noise;
        check("noise.baseline_uv", n.baseline_uv, 0.0, 10_000.0, "0 to 10000 µV")?;
        check("noise.baseline_hz", n.baseline_hz, 0.01, 5.0, "0.01 to 5 Hz")?;
        check("noise.mains_uv", n.mains_uv, 0.0, 10_000.0, "0 to 10000 µV")?;
        // The hum's frequency matters only when there is hum (a clean 50 Hz recording is fine with 50 Hz mains).
        if n.mains_uv > 0.0 {
            check("noise.mains_hz", n.mains_hz, 1.0, self.rate_hz / 2.0, "1 Hz to half the sampling rate")?;
        }
        check("noise.muscle_uv", n.muscle_uv, 0.0, 10_000.0, "0 to 10000 µV")?;
        let total = self.seconds * self.rate_hz * self.leads.count() as f64;
        if total > crate::io::MAX_TOTAL_SAMPLES as f64 {
            return Err(SynthError::OutOfRange {
                name: "seconds × rate_hz × leads",
                value: total,
                range: MAX_TOTAL_TEXT,
            });
        }
        Ok(())
    }
}

/// The limit on samples in all, as shown to users (the number, not the constant's name).
const MAX_TOTAL_TEXT: &str = "at most 1500000000 samples in all";
// The text above must state `io::MAX_TOTAL_SAMPLES`.
const _: () = assert!(crate::io::MAX_TOTAL_SAMPLES == 1_500_000_000);

/// A synthetic recording and its truth.
#[derive(Debug, Clone)]
pub struct Synthetic {
    /// The recording (µV, leads in standard order).
    pub recording: Recording,
    /// What is known about it: every beat's boundaries and the mean intervals.
    pub truth: Truth,
}

/// Makes a synthetic recording.
///
/// # Errors
/// [`SynthError`] for parameters out of range or timing that does not fit.
pub fn generate(spec: &SynthSpec) -> Result<Synthetic, SynthError> {
    spec.validate()?;
    let rate = Hertz::from_hz(spec.rate_hz).map_err(|_| SynthError::OutOfRange {
        name: "rate_hz",
        value: spec.rate_hz,
        range: "above 0 Hz",
    })?;
    let plan = rhythm::plan(spec)?;
    let fs = spec.rate_hz;
    let n = (spec.seconds * fs).round() as usize;
    let projected = spec.leads.projected();
    let proj: Vec<[f64; 3]> = projected.iter().map(|&l| leads::projection(l).unwrap_or([0.0; 3])).collect();

    // Start the pull term at its steady level: minus the mean of the beat's events over one RR.
    let mut offset = [0.0; 3];
    if spec.pull_per_s > 0.0 {
        let first_r = plan.beats.first().map_or(0.0, |b| b.r_s);
        let rr = rhythm::nominal_rr_s(spec, 0.0);
        for e in plan.events.iter().filter(|e| (e.centre_s - first_r).abs() < rr) {
            let a = e.area_uv_s();
            for c in 0..3 {
                offset[c] -= a[c] / rr;
            }
        }
    }
    let mut data: Vec<Vec<f32>> = projected.iter().map(|_| Vec::with_capacity(n)).collect();
    let mut ode = model::Integrator::new(&plan.events, spec.pull_per_s, offset);
    for i in 0..n {
        if i > 0 {
            ode.advance(i as f64 / fs);
        }
        let z = ode.z();
        for (lead, p) in data.iter_mut().zip(&proj) {
            lead.push((p[0] * z[0] + p[1] * z[1] + p[2] * z[2]) as f32);
        }
    }
    for (k, lead) in data.iter_mut().enumerate() {
        noise::add(lead, fs, &spec.noise, spec.seed, k as u64);
    }

    let mut recording = Recording {
        leads: Vec::with_capacity(spec.leads.count()),
        sample_rate: rate,
        start: None,
        meta: Meta {
            recording_info: Some(format!("Isoline synthetic demo, scenario {}, seed {}", spec.scenario, spec.seed)),
            device: Some("isoline-synth".into()),
            ..Meta::default()
        },
        annotations: Vec::new(),
    };
    let mut data = projected.iter().zip(data).map(|(&name, samples)| Lead { name: name.into(), samples });
    // I and II first, then the derived limb leads (12-lead set only), then the chest leads.
    let limb = if spec.leads == LeadSet::Single { 1 } else { 2 };
    recording.leads.extend(data.by_ref().take(limb));
    if spec.leads == LeadSet::Standard12 {
        recording.derive_limb_leads();
    }
    recording.leads.extend(data);
    let names = recording.leads.iter().map(|l| l.name.to_string()).collect();
    let truth = Truth::new(spec, &plan, n, names);
    Ok(Synthetic { recording, truth })
}
