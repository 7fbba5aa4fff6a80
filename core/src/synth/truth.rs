//! The known truth of a synthetic recording: every beat's boundaries and the mean intervals.

use super::SynthSpec;
use super::model::{CUT_SIGMAS, cut_level};
use super::rhythm::{Plan, TrueKind};
use crate::beat::{Beat, BeatKind, Boundaries};

/// One beat's true R peak and boundaries, as sample indices (rounded to the nearest sample); `None` where the
/// wave is absent (no P on ectopic beats).
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize, serde::Deserialize)]
pub struct TrueBeat {
    /// R peak.
    pub r_sample: usize,
    /// Sinus or ectopic.
    pub kind: TrueKind,
    /// P onset.
    pub p_on: Option<usize>,
    /// P end.
    pub p_end: Option<usize>,
    /// QRS onset.
    pub qrs_on: Option<usize>,
    /// J point.
    pub qrs_end: Option<usize>,
    /// T end.
    pub t_end: Option<usize>,
}

impl TrueBeat {
    /// As a [`Beat`]: sinus beats are dominant, ectopic beats other.
    #[must_use]
    pub fn to_beat(&self) -> Beat {
        Beat {
            r: self.r_sample,
            kind: match self.kind {
                TrueKind::Sinus => BeatKind::Dominant,
                TrueKind::Ectopic => BeatKind::Other,
            },
            bounds: Boundaries {
                p_on: self.p_on,
                p_end: self.p_end,
                qrs_on: self.qrs_on,
                qrs_end: self.qrs_end,
                t_end: self.t_end,
            },
        }
    }
}

/// The truth file's content (`isoline synth --truth`).
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct Truth {
    /// Where the recording came from.
    pub generator: String,
    /// How boundaries are defined.
    pub boundary_rule: String,
    /// Scenario name.
    pub scenario: String,
    /// Sampling rate, Hz.
    pub sample_rate_hz: f64,
    /// Samples per lead.
    pub samples: usize,
    /// Lead names in file order.
    pub leads: Vec<String>,
    /// Mean RR between consecutive sinus beats, ms (exact times, not rounded to samples).
    pub rr_ms: Option<f64>,
    /// Heart rate from `rr_ms`, bpm.
    pub heart_rate_bpm: Option<f64>,
    /// Mean PR over sinus beats, ms.
    pub pr_ms: Option<f64>,
    /// Mean P duration over sinus beats, ms.
    pub p_duration_ms: Option<f64>,
    /// Mean QRS duration over sinus beats, ms.
    pub qrs_ms: Option<f64>,
    /// Mean QT over sinus beats, ms.
    pub qt_ms: Option<f64>,
    /// Frontal QRS axis of sinus beats, degrees (exact by construction).
    pub qrs_axis_deg: f64,
    /// Number of sinus and ectopic beats.
    pub sinus_beats: usize,
    /// Number of ectopic beats.
    pub ectopic_beats: usize,
    /// Everything the recording was made from.
    pub parameters: SynthSpec,
    /// Every beat.
    pub beats: Vec<TrueBeat>,
}

fn mean(v: impl Iterator<Item = f64>) -> Option<f64> {
    let (s, n) = v.fold((0.0, 0usize), |(s, n), x| (s + x, n + 1));
    (n > 0).then(|| s / n as f64)
}

impl Truth {
    /// Builds the truth of a plan made from `spec`.
    #[must_use]
    pub fn new(spec: &SynthSpec, plan: &Plan, samples: usize, leads: Vec<String>) -> Self {
        let fs = spec.rate_hz;
        let idx = |t: f64| Some((t * fs).round().max(0.0) as usize);
        let beats = plan
            .beats
            .iter()
            .map(|b| TrueBeat {
                r_sample: (b.r_s * fs).round().max(0.0) as usize,
                kind: b.kind,
                p_on: b.bounds.p_on.and_then(idx),
                p_end: b.bounds.p_end.and_then(idx),
                qrs_on: idx(b.bounds.qrs_on),
                qrs_end: idx(b.bounds.qrs_end),
                t_end: idx(b.bounds.t_end),
            })
            .collect();
        let sinus = || plan.beats.iter().filter(|b| b.kind == TrueKind::Sinus);
        let rr_ms = mean(
            plan.beats
                .windows(2)
                .filter(|w| w[0].kind == TrueKind::Sinus && w[1].kind == TrueKind::Sinus)
                .map(|w| (w[1].r_s - w[0].r_s) * 1e3),
        );
        let ms =
            |f: fn(&super::shape::BoundsS) -> Option<f64>| mean(sinus().filter_map(|b| f(&b.bounds)).map(|s| s * 1e3));
        Self {
            generator: "Isoline synth: dynamical ECG model of McSharry, Clifford, Tarassenko & Smith, \
                        IEEE Trans Biomed Eng 2003;50:289-94; synthetic data, no patient"
                .into(),
            boundary_rule: format!(
                "every event is the model's Gaussian lowered by its value at {CUT_SIGMAS} sigma from the centre \
                 ({:.1} % of its peak), clipped to zero beyond and rescaled to its peak, so each wave has a \
                 definite start and end; a boundary is the instant the wave leaves the baseline (start of its first \
                 event) or returns to it (end of its last event), independent of any delineation method; sample \
                 indices rounded to the nearest sample",
                100.0 * cut_level()
            ),
            scenario: spec.scenario.clone(),
            sample_rate_hz: fs,
            samples,
            leads,
            rr_ms,
            heart_rate_bpm: rr_ms.map(|rr| 60_000.0 / rr),
            pr_ms: ms(|b| Some(b.qrs_on - b.p_on?)),
            p_duration_ms: ms(|b| Some(b.p_end? - b.p_on?)),
            qrs_ms: ms(|b| Some(b.qrs_end - b.qrs_on)),
            qt_ms: ms(|b| Some(b.t_end - b.qrs_on)),
            qrs_axis_deg: spec.axis_deg,
            sinus_beats: sinus().count(),
            ectopic_beats: plan.beats.iter().filter(|b| b.kind == TrueKind::Ectopic).count(),
            parameters: spec.clone(),
            beats,
        }
    }

    /// Every beat as a [`Beat`] (sinus → dominant, ectopic → other), for comparing with detection.
    #[must_use]
    pub fn to_beats(&self) -> Vec<Beat> {
        self.beats.iter().map(TrueBeat::to_beat).collect()
    }

    /// The truth as pretty JSON.
    ///
    /// # Errors
    /// Only if serialisation fails (it does not for this type).
    pub fn to_json(&self) -> Result<String, serde_json::Error> {
        serde_json::to_string_pretty(self)
    }
}
