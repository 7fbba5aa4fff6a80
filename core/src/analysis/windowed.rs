//! Beats and their boundaries for a long recording, window by window, so the memory needed stays near the
//! recording's own size: the whole-record pipeline holds the filtered copy and the delineator's low-passed
//! copies of every lead at once (≈ 4–5 × the samples; over 1 GB for 24 h of 3 leads at 250 Hz). The windows are
//! analysed on every core at once, one window per core at a time, and joined in time order.
//!
//! Each window is filtered, detected and delineated with a margin on both sides, so the filters have settled
//! and the detector's thresholds have adapted before the window's own part begins, and the last beats of the
//! part have their T waves. A beat belongs to the window its R peak falls in. At a seam a beat is kept only when
//! it comes at least the detector's refractory period after the last beat kept, so a beat both windows see
//! counts once, and one the earlier window missed just before the seam is still found.
//!
//! The whole analysis ([`analyze_in_windows`]) keeps no filtered copy of the recording: it builds the
//! representative beat from up to [`delineate::STACK_BEATS`] dominant beats taken evenly from every window
//! ([`delineate::BeatStack`]), with the P model of the window whose beats matched their P wave best, and any
//! span of the filtered signal is filtered again when needed ([`Analysis::filtered_span`]).

use super::{Analysis, AppliedFilters, MARGIN_S, template_of};
use crate::beat::{Beat, Boundaries};
use crate::delineate::{self, BeatStack, PModel};
use crate::detect;
use crate::filter::{self, FilterSettings};
use crate::measure;
use crate::recording::{Lead, Meta, Recording};

/// Recordings longer than this (s) are analysed window by window (see [`beats_in_windows`]).
// Common practice, no source: an hour is far longer than any resting ECG and shorter than any Holter recording.
pub const LONG_RECORDING_S: f64 = 3600.0;
/// Window length for long recordings, s.
// Common practice, no source: five minutes hold hundreds of beats for the detector's and delineator's
// per-record statistics while a window's working copies stay a few MB.
pub const WINDOW_S: f64 = 300.0;
/// How far before its window's own part a beat the previous window missed may lie to be taken from the margin, s.
const SEAM_S: f64 = 1.0;
/// Two beats closer than this are one beat seen by two windows, s (the detector's refractory period).
const REFRACTORY_S: f64 = 0.200;

/// What one pass over the windows gives.
struct Pass {
    beats: Vec<Beat>,
    description: String,
    /// The settings every window was filtered with (the notch decided once).
    settings: FilterSettings,
    /// Dominant beats gathered for the representative beat, when asked for.
    stack: Option<BeatStack>,
    /// The P model of the window whose beats matched it best.
    p_model: Option<PModel>,
}

/// Told `(windows done, windows in all)` each time one of a long recording's windows is analysed, from whichever
/// thread analysed it (for a progress display; long work shows progress).
pub type OnWindow<'a> = &'a (dyn Fn(usize, usize) + Sync);

/// Detected and delineated beats of `recording` in windows of `window_s` seconds, with the filters' description.
/// Beat indices are samples of the whole recording, as from the whole-record pipeline.
#[must_use]
pub fn beats_in_windows(recording: &Recording, settings: &FilterSettings, window_s: f64) -> (Vec<Beat>, String) {
    beats_in_windows_reporting(recording, settings, window_s, &|_, _| {})
}

/// [`beats_in_windows`], telling `on_window` as each window is done.
#[must_use]
pub fn beats_in_windows_reporting(
    recording: &Recording,
    settings: &FilterSettings,
    window_s: f64,
    on_window: OnWindow<'_>,
) -> (Vec<Beat>, String) {
    let pass = windows(recording, settings, window_s, false, on_window);
    (pass.beats, pass.description)
}

/// The whole pipeline of [`super::analyze`] window by window (windows of `window_s` seconds): the same
/// [`Analysis`] but for its filtered copy, which it does not hold ([`Analysis::filtered`] is `None`), with the
/// working memory of one window per core beside the recording.
#[must_use]
pub fn analyze_in_windows(recording: &Recording, settings: &FilterSettings, window_s: f64) -> Analysis {
    analyze_in_windows_reporting(recording, settings, window_s, &|_, _| {})
}

/// [`analyze_in_windows`], telling `on_window` as each window is done.
#[must_use]
pub fn analyze_in_windows_reporting(
    recording: &Recording,
    settings: &FilterSettings,
    window_s: f64,
    on_window: OnWindow<'_>,
) -> Analysis {
    let pass = windows(recording, settings, window_s, true, on_window);
    let beats = pass.beats;
    let representative = pass.stack.and_then(|s| s.representative(&beats, pass.p_model.as_ref()));
    let measurements = measure::measure(recording, &beats, representative.as_ref().map(template_of).as_ref());
    Analysis {
        filters: AppliedFilters { settings: pass.settings, description: pass.description },
        filtered: None,
        beats,
        representative,
        measurements,
    }
}

/// What one window gives: its own samples `own` (of the whole recording), its filters' description, its beats
/// (samples of the window with its margins, which start at `a`), its P model, and the beats it keeps for the
/// representative beat.
struct WindowResult {
    own: std::ops::Range<usize>,
    a: usize,
    description: String,
    found: Vec<Beat>,
    model: Option<PModel>,
    kept: Option<BeatStack>,
}

/// Filters, detects and delineates `recording` window by window; gathers beats for the representative beat
/// when `stack`. The windows are analysed on every core at once (each with its own working memory, so a core's
/// worth of windows at a time) and their results joined in time order, so the result does not depend on the
/// number of cores. `on_window` is told as each window is done.
fn windows(
    recording: &Recording,
    settings: &FilterSettings,
    window_s: f64,
    stack: bool,
    on_window: OnWindow<'_>,
) -> Pass {
    use rayon::prelude::*;
    let fs = recording.sample_rate.hz();
    let n = recording.len();
    let settings = settings.with_mains_decided(recording);
    let window = ((window_s.max(1.0) * fs) as usize).max(1);
    let (margin, seam, refractory) =
        ((MARGIN_S * fs) as usize, (SEAM_S * fs) as usize, ((REFRACTORY_S * fs) as usize).max(1));
    let empty_stack = stack.then(|| BeatStack::new(recording.sample_rate, n.div_ceil(window)));
    let starts: Vec<usize> = (0..n).step_by(window).collect();
    let done = std::sync::atomic::AtomicUsize::new(0);
    let results: Vec<WindowResult> = starts
        .par_iter()
        .map(|&start| {
            let end = (start + window).min(n);
            let a = start.saturating_sub(margin);
            let part_filtered = filter::apply(&part(recording, a, (end + margin).min(n)), &settings);
            let rec = part_filtered.recording;
            let mut found = detect::detect_beats(&rec);
            let model = delineate::delineate_beats(&rec, &mut found);
            let kept = empty_stack.clone().map(|mut s| {
                s.gather(&rec, &found, start - a..end - a);
                s
            });
            on_window(done.fetch_add(1, std::sync::atomic::Ordering::Relaxed) + 1, starts.len());
            WindowResult { own: start..end, a, description: part_filtered.description, found, model, kept }
        })
        .collect();
    let mut stack = empty_stack;
    let mut beats: Vec<Beat> = Vec::new();
    let mut p_model: Option<PModel> = None;
    let mut description = None;
    for w in results {
        description = Some(w.description);
        if let Some(m) = w.model.filter(|m| p_model.as_ref().is_none_or(|best| m.consistency > best.consistency)) {
            p_model = Some(m);
        }
        if let (Some(s), Some(kept)) = (stack.as_mut(), w.kept) {
            s.append(kept);
        }
        for b in w.found {
            let r = b.r + w.a;
            let after_last = beats.last().is_none_or(|l| r >= l.r + refractory);
            if r + seam >= w.own.start && r < w.own.end && after_last {
                beats.push(shifted(&b, w.a));
            }
        }
    }
    let description = description.unwrap_or_else(|| filter::apply(&part(recording, 0, 0), &settings).description);
    Pass { beats, description, settings, stack, p_model }
}

/// Samples `a..b` of every lead, as a recording of its own (no metadata or annotations).
pub(super) fn part(recording: &Recording, a: usize, b: usize) -> Recording {
    Recording {
        leads: recording
            .leads
            .iter()
            .map(|l| Lead { name: l.name.clone(), samples: l.samples[a.min(b)..b].to_vec() })
            .collect(),
        sample_rate: recording.sample_rate,
        start: None,
        meta: Meta::default(),
        annotations: Vec::new(),
    }
}

/// `beat` of a part starting at sample `a`, in samples of the whole recording.
fn shifted(beat: &Beat, a: usize) -> Beat {
    let s = |v: Option<usize>| v.map(|x| x + a);
    let b = &beat.bounds;
    Beat {
        r: beat.r + a,
        kind: beat.kind,
        bounds: Boundaries {
            p_on: s(b.p_on),
            p_end: s(b.p_end),
            qrs_on: s(b.qrs_on),
            qrs_end: s(b.qrs_end),
            t_end: s(b.t_end),
        },
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::recording::LeadName;
    use crate::units::Hertz;
    use proptest::prelude::*;

    #[test]
    fn windows_analysed_on_several_cores_give_what_one_core_gives() {
        // A 60-s demo in 10-s windows: the windows run in parallel and are joined in time order, so beats,
        // boundaries, the representative beat and every measurement are the same as on one thread.
        let spec = crate::synth::SynthSpec { seconds: 60.0, ..crate::synth::Scenario::Ectopics.spec() };
        let demo = crate::synth::generate(&spec).unwrap_or_else(|e| panic!("{e}"));
        let run = |threads: usize| {
            let pool = rayon::ThreadPoolBuilder::new().num_threads(threads).build().unwrap_or_else(|e| panic!("{e}"));
            pool.install(|| analyze_in_windows(&demo.recording, &FilterSettings::default(), 10.0))
        };
        let (one, two) = (run(1), run(2));
        assert!(one.beats.len() > 60, "{} beats", one.beats.len());
        assert_eq!(one.beats, two.beats);
        assert_eq!(one.representative, two.representative);
        assert_eq!(one.measurements, two.measurements);
    }

    proptest! {
        #![proptest_config(ProptestConfig::with_cases(16))]
        /// Any samples (NaN included), lengths and window lengths: no panic, beats in order and at least the
        /// refractory period apart, every boundary inside the recording.
        #[test]
        fn windows_never_panic_and_never_count_a_beat_twice(
            len in 0usize..6000,
            window_s in prop_oneof![Just(1.0f64), Just(3.0), Just(7.5), Just(f64::NAN)],
            seed in proptest::collection::vec(prop_oneof![8 => -2000.0f32..2000.0, 1 => Just(f32::NAN)], 53),
        ) {
            let fs = 250.0;
            let samples: Vec<f32> = (0..len)
                .map(|k| {
                    let beat = if k % 200 < 6 { 1500.0 } else { 0.0 };
                    beat + seed[k % seed.len()] * 0.05
                })
                .collect();
            let recording = Recording {
                leads: vec![
                    Lead { name: LeadName::parse("II"), samples: samples.clone() },
                    Lead { name: LeadName::parse("V5"), samples: samples.iter().map(|v| -v).collect() },
                ],
                sample_rate: Hertz::from_hz(fs).unwrap_or_else(|_| unreachable!()),
                start: None,
                meta: Meta::default(),
                annotations: Vec::new(),
            };
            let (beats, description) = beats_in_windows(&recording, &FilterSettings::default(), window_s);
            prop_assert!(description.contains("Hz"));
            prop_assert!(beats.windows(2).all(|w| w[1].r >= w[0].r + (REFRACTORY_S * fs) as usize));
            for b in &beats {
                let bounds = [b.bounds.p_on, b.bounds.p_end, b.bounds.qrs_on, b.bounds.qrs_end, b.bounds.t_end];
                prop_assert!(b.r < len && bounds.iter().flatten().all(|&x| x < len));
            }
            let a = analyze_in_windows(&recording, &FilterSettings::default(), window_s);
            prop_assert_eq!(a.beats.len(), beats.len());
            prop_assert!(a.filtered.is_none());
            // Any span of the filtered signal, filtered on its own, has the samples asked for.
            let (from, to) = (len / 3, len / 3 + len / 2 + 1);
            let span = a.filtered_span(&recording, from, to);
            prop_assert_eq!(span.first, from.min(len));
            prop_assert!(span.recording.leads.iter().all(|l| l.samples.len() == to.min(len) - from.min(len)));
        }
    }

    #[test]
    fn each_window_is_told_once_as_it_is_done() {
        // A 60-s demo in 10-s windows: six windows, each told once with the count done so far and the six in all,
        // and the beats as without anyone told.
        let spec = crate::synth::SynthSpec { seconds: 60.0, ..crate::synth::Scenario::Normal.spec() };
        let rec = crate::synth::generate(&spec).unwrap_or_else(|e| panic!("{e}")).recording;
        let told = std::sync::Mutex::new(Vec::new());
        let record =
            |done: usize, all: usize| told.lock().unwrap_or_else(std::sync::PoisonError::into_inner).push((done, all));
        let (beats, _) = beats_in_windows_reporting(&rec, &FilterSettings::default(), 10.0, &record);
        let mut told = told.into_inner().unwrap_or_else(std::sync::PoisonError::into_inner);
        told.sort_unstable();
        assert_eq!(told, (1..=6).map(|k| (k, 6)).collect::<Vec<_>>());
        assert_eq!(beats, beats_in_windows(&rec, &FilterSettings::default(), 10.0).0);
    }
}
