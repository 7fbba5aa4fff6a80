//! Measurements of a recording: RR and heart rate, P duration, PR, QRS, QT, five QTc formulas, frontal axes of
//! P, QRS and T, ST levels per lead, SDNN and RMSSD, rhythm regularity, and range notes with their sources.
//!
//! A value that cannot be measured is `None`, never a guess. Intervals, axes and ST come from the
//! representative beat ([`Template`]); the medians of the per-beat intervals are kept as a cross-check and
//! stand in only when there is no representative beat at all.
//!
//! ```
//! use isoline_core::measure::qtc::qtc;
//! // Source: Bazett, Heart 1920;7:353-70 — QT 400 ms at RR 800 ms gives 447.2 ms.
//! assert!((qtc(400.0, 800.0).bazett - 447.21).abs() < 0.01);
//! ```

pub mod axis;
pub mod einthoven;
pub mod hrv;
pub mod intervals;
pub mod level;
pub mod qtc;
pub mod ranges;
pub mod st;
pub mod stats;
mod values;

pub use axis::{Axes, AxisBasis};
pub use hrv::{Rhythm, RrStats};
pub use intervals::{Intervals, intervals, median_intervals};
pub use qtc::{Qtc, qtc_checked};
pub use ranges::{RangeNote, Sex};
pub use st::StLevel;
pub use values::{KEYS, MeasuredValue, implausible, plausible_range};

use crate::beat::{Beat, BeatKind, Boundaries};
use crate::recording::{LeadName, Recording, StandardLead};
use crate::units::Hertz;

/// A representative beat as measurement sees it: one sample vector per lead, **in the order of the
/// recording's leads**, on the beat's own sample axis, with its global boundaries on that axis.
#[derive(Debug, Clone, Copy)]
pub struct Template<'a> {
    /// Samples per lead, µV.
    pub leads: &'a [Vec<f32>],
    /// Sampling rate of the template.
    pub sample_rate: Hertz,
    /// Global boundaries on the template's axis.
    pub bounds: Boundaries,
    /// How far the baseline moved from one of its beats to the next, µV (see
    /// `delineate::RepresentativeBeat::baseline_step_uv`); `None` when not known.
    pub baseline_step_uv: Option<f64>,
}

/// Where [`Measurements::intervals`] came from.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq, serde::Serialize, serde::Deserialize)]
pub enum IntervalSource {
    /// The representative beat's boundaries.
    Representative,
    /// Medians of the dominant beats' own intervals (no representative beat was available).
    BeatMedians,
    /// Nothing to measure.
    #[default]
    None,
}

/// Everything measured on one recording.
#[derive(Debug, Clone, Default, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct Measurements {
    /// Number of beats.
    pub beats: usize,
    /// Number of dominant beats.
    pub dominant_beats: usize,
    /// RR statistics: mean NN, heart rate, SDNN, RMSSD, regularity.
    pub rr: RrStats,
    /// P duration, PR, QRS, QT in ms.
    pub intervals: Intervals,
    /// Where `intervals` came from.
    pub intervals_source: IntervalSource,
    /// Medians of the per-beat intervals over dominant beats (cross-check).
    pub beat_medians: Intervals,
    /// QTc from `intervals.qt_ms` and the mean NN interval.
    pub qtc: Option<Qtc>,
    /// Frontal axes.
    pub axes: Axes,
    /// ST levels per lead, in the recording's lead order (empty without a representative beat).
    pub st: Vec<StLevel>,
    /// Sex used for the usual ranges.
    pub sex: Sex,
    /// When the limb leads broke Einthoven's law (inconsistent lead gains in the file) and the axes were
    /// computed after rescaling them ([`einthoven`]): the relative residual before rescaling, %.
    #[serde(default)]
    pub limb_gain_mismatch_pct: Option<f64>,
    /// Leads that hold a signal but not in the representative beat: missing samples in too many of the beats it
    /// is made of (see `delineate::median`). Its boundaries, hence PR, QRS and QT, axes and ST, come from the
    /// other leads. Empty without a representative beat.
    #[serde(default)]
    pub leads_left_out: Vec<LeadName>,
    /// Seconds with no beat from the last beat to the end of the recording, when at least
    /// [`ranges::PAUSE_MS`] and longer than 1.5 times the longest RR (asystole after the last beat); the same
    /// before the first beat. A stretch reaching into a gap of the recording (no signal) is no such finding.
    #[serde(default)]
    pub beatless_edges_s: [Option<f64>; 2],
    /// How far the baseline moved from one dominant beat's PR segment to the next in the beats of the
    /// representative beat, µV (median; see [`ranges::unsteady_baseline`]); `None` without one.
    #[serde(default)]
    pub baseline_step_uv: Option<f64>,
    /// The recording's sampling rate, Hz (for the note on coarse sampling, [`ranges::coarse_sampling`]).
    #[serde(default)]
    pub sample_rate_hz: Option<f64>,
}

/// Measures a recording from its beats (with boundaries) and, when available, its representative beat.
///
/// `recording` gives the lead names (matched by position to `template.leads`), the sampling rate of `beats`
/// and the sex for the usual ranges. Axes use the default [`AxisBasis`] (net amplitude).
#[must_use]
pub fn measure(recording: &Recording, beats: &[Beat], template: Option<&Template<'_>>) -> Measurements {
    measure_with(recording, beats, template, AxisBasis::default())
}

/// [`measure`] with a chosen axis basis.
#[must_use]
pub fn measure_with(
    recording: &Recording,
    beats: &[Beat],
    template: Option<&Template<'_>>,
    basis: AxisBasis,
) -> Measurements {
    let fs = recording.sample_rate;
    let gaps = recording.gaps();
    let rr = hrv::rr_stats(beats, fs, &gaps);
    let beatless_edges_s = beatless_edges(beats, recording.len(), fs, &gaps, rr.rhythm.longest_rr_ms);
    let beat_medians = median_intervals(beats, fs);
    let (intervals, intervals_source) = match template {
        Some(t) => (intervals(&t.bounds, t.sample_rate), IntervalSource::Representative),
        None if beat_medians != Intervals::default() => (beat_medians, IntervalSource::BeatMedians),
        None => (Intervals::default(), IntervalSource::None),
    };
    let (axes, st, limb_gain_mismatch_pct, leads_left_out) = match template {
        Some(t) => {
            // A flat lead (an electrode off) shows no wave: it would pull the axis towards the leads it lies at
            // right angles to, and read an ST level of 0.
            let leads: Vec<(&LeadName, &Vec<f32>, bool)> =
                recording.leads.iter().zip(t.leads).map(|(l, x)| (&l.name, x, l.is_flat())).collect();
            let limb: Vec<(StandardLead, &[f32])> = leads
                .iter()
                .filter(|(_, _, flat)| !flat)
                .filter_map(|(n, x, _)| n.standard().map(|s| (s, x.as_slice())))
                .collect();
            let st = leads
                .iter()
                .map(|&(n, x, flat)| {
                    if flat {
                        st::StLevel { lead: n.clone(), j_uv: None, j60_uv: None }
                    } else {
                        st::st_level(n.clone(), x, &t.bounds, t.sample_rate)
                    }
                })
                .collect();
            let mismatch = axis::qrs_limb_gains(&limb, &t.bounds, t.sample_rate)
                .filter(einthoven::LimbGains::applies)
                .map(|g| 100.0 * g.residual_before);
            // A lead with a signal whose median beat is missing was left out of the representative beat.
            let left_out = leads
                .iter()
                .filter(|(_, x, flat)| !flat && x.iter().any(|v| !v.is_finite()))
                .map(|(n, _, _)| (*n).clone())
                .collect();
            (axis::axes(&limb, &t.bounds, t.sample_rate, basis), st, mismatch, left_out)
        }
        None => (Axes::default(), Vec::new(), None, Vec::new()),
    };
    Measurements {
        beats: beats.len(),
        dominant_beats: beats.iter().filter(|b| b.kind == BeatKind::Dominant).count(),
        qtc: qtc_checked(intervals.qt_ms, rr.rr_ms),
        rr,
        intervals,
        intervals_source,
        beat_medians,
        axes,
        st,
        sex: ranges::Sex::parse(recording.meta.sex.as_deref()),
        limb_gain_mismatch_pct,
        leads_left_out,
        beatless_edges_s,
        baseline_step_uv: template.and_then(|t| t.baseline_step_uv),
        sample_rate_hz: Some(fs.hz()),
    }
}

/// Seconds with no beat before the first beat and after the last of a recording of `n` samples (see
/// [`Measurements::beatless_edges_s`]); `longest_rr_ms` is the longest RR between beats.
fn beatless_edges(
    beats: &[Beat],
    n: usize,
    fs: crate::units::Hertz,
    gaps: &[std::ops::Range<usize>],
    longest_rr_ms: Option<f64>,
) -> [Option<f64>; 2] {
    let (Some(first), Some(last)) = (beats.first(), beats.last()) else {
        return [None, None];
    };
    let limit_s = (ranges::PAUSE_MS / 1000.0).max(1.5 * longest_rr_ms.unwrap_or(0.0) / 1000.0);
    let edge = |a: usize, b: usize| {
        let s = (b.saturating_sub(a)) as f64 / fs.hz();
        (s >= limit_s && !crate::gaps::overlaps(gaps, a, b)).then_some(s)
    };
    [edge(0, first.r), edge(last.r, n)]
}

impl Measurements {
    /// The ST level at J + 60 ms of a lead, µV.
    #[must_use]
    pub fn st_j60(&self, lead: &crate::recording::LeadName) -> Option<f64> {
        self.st.iter().find(|s| &s.lead == lead).and_then(|s| s.j60_uv)
    }

    /// The note that the interval `key` (`pr_ms`, `qrs_ms` or `qt_ms`) of the representative beat disagrees with
    /// the median of the dominant beats' own ([`ranges::beats_disagree`]); `None` where they agree, or where the
    /// intervals are not the representative beat's.
    #[must_use]
    pub fn beats_disagree(&self, key: &str) -> Option<RangeNote> {
        let (i, b) = (&self.intervals, &self.beat_medians);
        let (label, a, b) = match key {
            "pr_ms" => ("PR", i.pr_ms, b.pr_ms),
            "qrs_ms" => ("QRS", i.qrs_ms, b.qrs_ms),
            "qt_ms" => ("QT", i.qt_ms, b.qt_ms),
            _ => return None,
        };
        let (a, b) = a.zip(b).filter(|_| self.intervals_source == IntervalSource::Representative)?;
        ranges::beats_disagree(key, label, a, b)
    }

    /// The note that leads were left out of the representative beat ([`ranges::leads_left_out`]), if any were.
    #[must_use]
    pub fn leads_left_out_note(&self) -> Option<RangeNote> {
        let a = &self.axes;
        ranges::leads_left_out(&self.leads_left_out, a.p_deg.is_some() || a.qrs_deg.is_some() || a.t_deg.is_some())
    }

    /// The pause note ([`ranges::pause`]) and the notes of a stretch with no beat before the first beat or after
    /// the last ([`ranges::no_beat_at_edge`]), in that order.
    #[must_use]
    pub fn pause_notes(&self) -> Vec<RangeNote> {
        let [before, after] = self.beatless_edges_s;
        let edges = [(before, false), (after, true)]
            .into_iter()
            .filter_map(|(s, end)| s.and_then(|s| ranges::no_beat_at_edge(s, end)));
        self.rr.rhythm.longest_rr_ms.and_then(ranges::pause).into_iter().chain(edges).collect()
    }

    /// The note that the baseline moves too much from beat to beat for the representative beat
    /// ([`ranges::unsteady_baseline`]), if it does.
    #[must_use]
    pub fn unsteady_baseline_note(&self) -> Option<RangeNote> {
        self.baseline_step_uv.and_then(ranges::unsteady_baseline)
    }

    /// The note that the recording is sampled too coarsely for fine wave boundaries ([`ranges::coarse_sampling`]),
    /// when it has beats to measure and is.
    #[must_use]
    pub fn coarse_sampling_note(&self) -> Option<RangeNote> {
        self.sample_rate_hz.filter(|_| self.beats > 0).and_then(ranges::coarse_sampling)
    }

    /// Every note, in the order of [`Measurements::values`]; then the limb-lead gain note when the axes were
    /// computed after rescaling ([`ranges::limb_gain_mismatch`]) and the QRS axis row carries a range note of
    /// its own; then the pause note ([`ranges::pause`]); then that no representative beat was made
    /// ([`ranges::no_representative_beat`]); then the note that leads were left out of the representative beat
    /// ([`ranges::leads_left_out`], on no value's row); then the unsteady-baseline note and the coarse-sampling note
    /// ([`ranges::coarse_sampling`], when there are beats); then the note that a PR or QRS of the representative beat
    /// disagrees with the single beats ([`ranges::beats_disagree`]) where that row carries a range note of its own.
    #[must_use]
    pub fn notes(&self) -> Vec<RangeNote> {
        let mut notes: Vec<RangeNote> = self.values().into_iter().filter_map(|v| v.note).collect();
        if self.beats == 0 && self.rr.rr_ms.is_none() {
            notes.extend(ranges::no_beats());
        } else if self.beats >= 2 && self.rr.rr_ms.is_none() && self.rr.rhythm.other_beats > 0 {
            notes.extend(ranges::no_nn_intervals());
        }
        if let Some(gain) = self.limb_gain_mismatch_pct.and_then(ranges::limb_gain_mismatch)
            && !notes.contains(&gain)
        {
            notes.push(gain);
        }
        notes.extend(self.pause_notes());
        if self.intervals_source == IntervalSource::BeatMedians {
            notes.extend(ranges::no_representative_beat());
        }
        notes.extend(self.leads_left_out_note());
        notes.extend(self.unsteady_baseline_note());
        notes.extend(self.coarse_sampling_note());
        // An interval with a range note of its own still gets the note that the single beats disagree.
        for n in ["pr_ms", "qrs_ms", "qt_ms"].into_iter().filter_map(|key| self.beats_disagree(key)) {
            if !notes.contains(&n) {
                notes.push(n);
            }
        }
        notes
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::recording::{Lead, LeadName, Meta};
    use proptest::prelude::*;

    fn any_bound() -> impl Strategy<Value = Option<usize>> {
        prop_oneof![Just(None), (0usize..400).prop_map(Some), Just(Some(usize::MAX))]
    }

    proptest! {
        /// Any boundaries, any lengths, NaN samples: measurement never panics, and what it reports is finite.
        #[test]
        fn never_panics(
            b in (any_bound(), any_bound(), any_bound(), any_bound(), any_bound()),
            len in 0usize..300,
            nan_at in 0usize..300,
            rs in proptest::collection::vec(0usize..5000, 0..20),
        ) {
            let bounds = Boundaries { p_on: b.0, p_end: b.1, qrs_on: b.2, qrs_end: b.3, t_end: b.4 };
            // All six limb leads, so the Einthoven gain fit runs too (on values that break the law).
            let names = ["I", "II", "III", "aVR", "aVL", "aVF", "V2", "X"];
            let leads: Vec<Vec<f32>> = names.iter().enumerate()
                .map(|(i, _)| (0..len).map(|k| if k == nan_at { f32::NAN } else { ((k * (i + 1)) % 17) as f32 }).collect())
                .collect();
            let rec = Recording {
                leads: names.iter().zip(&leads).map(|(n, s)| Lead { name: LeadName::parse(n), samples: s.clone() }).collect(),
                sample_rate: Hertz::from_hz(250.0).unwrap_or_else(|_| unreachable!()),
                start: None,
                meta: Meta::default(),
                annotations: Vec::new(),
            };
            let mut sorted = rs.clone();
            sorted.sort_unstable();
            let beats: Vec<Beat> = sorted.iter().enumerate()
                .map(|(i, &r)| Beat { r, kind: if i % 3 == 0 { BeatKind::Other } else { BeatKind::Dominant }, bounds })
                .collect();
            let t = Template { leads: &leads, sample_rate: rec.sample_rate, bounds, baseline_step_uv: None };
            let m = measure(&rec, &beats, Some(&t));
            for v in m.values() {
                prop_assert!(v.value.is_none_or(f64::is_finite), "{} = {:?}", v.key, v.value);
            }
            let i = intervals(&bounds, rec.sample_rate);
            for x in [i.p_duration_ms, i.pr_ms, i.qrs_ms, i.qt_ms].into_iter().flatten() {
                prop_assert!(x > 0.0);
            }
        }
    }

    #[test]
    fn no_beat_is_said_once_and_only_then() -> Result<(), crate::units::UnitError> {
        let rec = Recording {
            leads: vec![Lead { name: LeadName::parse("II"), samples: vec![0.0; 5000] }],
            sample_rate: crate::units::Hertz::from_hz(500.0)?,
            start: None,
            meta: Meta::default(),
            annotations: Vec::new(),
        };
        let none = measure(&rec, &[], None).notes();
        assert_eq!(none.iter().filter(|n| n.source == ranges::SOURCE_NO_BEATS).count(), 1, "{none:?}");
        let beats: Vec<Beat> =
            [500, 1000, 1500].map(|r| Beat { r, kind: BeatKind::Dominant, bounds: Boundaries::default() }).to_vec();
        assert!(measure(&rec, &beats, None).notes().iter().all(|n| n.source != ranges::SOURCE_NO_BEATS));
        // Bigeminy: beats, but no two dominant ones in a row, so no heart rate; the note says why, and only it
        // (the short and long RR intervals alternating are not called irregular as between dominant beats).
        let kinds = [BeatKind::Dominant, BeatKind::Other];
        let bigeminy: Vec<Beat> = (0..9)
            .map(|k| Beat { r: 300 + 500 * k - 100 * (k % 2), kind: kinds[k % 2], bounds: Boundaries::default() })
            .collect();
        let m = measure(&rec, &bigeminy, None);
        assert_eq!(m.rr.heart_rate_bpm, None);
        assert_eq!(m.notes(), ranges::no_nn_intervals().into_iter().collect::<Vec<_>>());
        // Two beats with their boundaries and no representative beat (a 2-s strip): QRS from the single beats,
        // and a note that the axes and ST are absent for want of a representative beat.
        let beat = |r: usize| Beat {
            r,
            kind: BeatKind::Dominant,
            bounds: Boundaries {
                qrs_on: Some(r - 20),
                qrs_end: Some(r + 25),
                t_end: Some(r + 190),
                ..Boundaries::default()
            },
        };
        let two = [beat(500), beat(900)];
        let m = measure(&rec, &two, None);
        assert_eq!(m.intervals_source, IntervalSource::BeatMedians);
        // After them the 10-s recording has no beat for 8.2 s (asystole): said; a beat every 0.8 s to the end is
        // no such finding.
        assert_eq!(m.beatless_edges_s, [None, Some(8.2)]);
        assert!(m.notes().iter().any(|n| n.text.starts_with("No beat for 8.2 s after the last beat")));
        let steady: Vec<Beat> = (0..12).map(|i| beat(300 + 400 * i)).collect();
        assert_eq!(measure(&rec, &steady, None).beatless_edges_s, [None, None]);
        assert!(m.notes().iter().any(|n| n.key == ranges::KEY_REPRESENTATIVE && n.text.contains("No representative")));
        Ok(())
    }
}
