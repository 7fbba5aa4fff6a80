//! The representative beat: the sample-by-sample median of the dominant beats aligned on their R peaks, per
//! lead, delineated with the same method as single beats (its P wave only when the record's P is consistent).

use super::{PModel, Signals, baseline, beat_t_waves, delineate_with, median_rr, qrs, twave};
use crate::beat::{Beat, BeatKind, Boundaries};
use crate::detect::{ALIGN_S, WIN_S, correlation, matching_shift, push_levelled, smooth_half};
use crate::recording::Recording;
use crate::units::Hertz;

/// Span of the representative beat before and after R, s.
const BEFORE_S: f64 = 0.45;
const AFTER_S: f64 = 0.70;

/// The median beat of each lead, µV, with its global boundaries on its own sample axis.
#[derive(Debug, Clone, PartialEq)]
pub struct RepresentativeBeat {
    /// One median beat per lead of the recording (same order), µV.
    pub leads: Vec<Vec<f32>>,
    /// Sampling rate of the beat.
    pub sample_rate: Hertz,
    /// Index of the R peak in each lead's samples.
    pub r_index: usize,
    /// Global boundaries, indices into `leads[_]`.
    pub bounds: Boundaries,
    /// Number of beats in the median.
    pub n_beats: usize,
    /// How far the baseline moved from one of its beats to the next, µV: the median change of the PR level between
    /// consecutive dominant beats, on the leads as levelled for the median (`baseline::Levelled::step_uv`; for a
    /// long recording the median over its windows). `None` when not known.
    pub baseline_step_uv: Option<f64>,
}

/// Builds and delineates the representative beat from the dominant beats (all beats when none is dominant), each
/// lead first levelled by a spline through the beats' PR levels where that makes the beats more alike
/// (`baseline::levelled`). `recording` should be baseline-corrected (high-passed). `None` with fewer than 3
/// usable beats. Delineates the whole
/// recording again to get its P model; when the beats were just delineated, pass that model to
/// [`representative_beat_with`] instead.
#[must_use]
pub fn representative_beat(recording: &Recording, beats: &[Beat]) -> Option<RepresentativeBeat> {
    // The record's P model comes from delineating the beats themselves.
    let views: Vec<&[f32]> = recording.leads.iter().map(|l| l.samples.as_slice()).collect();
    let full = Signals::new(&views, recording.sample_rate.hz());
    let mut scratch = beats.to_vec();
    let p_model = delineate_with(&full, &mut scratch);
    drop(full);
    representative_beat_with(recording, &scratch, p_model.as_ref())
}

/// [`representative_beat`] with the record's P model already known (the value [`super::delineate_beats`]
/// returned for these beats; `None` = the record has no consistent P wave). The beats' QRS onsets place the
/// levelling's knots; beats not delineated are not levelled.
#[must_use]
pub fn representative_beat_with(
    recording: &Recording,
    beats: &[Beat],
    p_model: Option<&PModel>,
) -> Option<RepresentativeBeat> {
    let levelled = baseline::levelled(recording, beats);
    let rep = representative_of_levelled(&levelled.recording, beats, p_model)?;
    Some(RepresentativeBeat { baseline_step_uv: levelled.step_uv, ..rep })
}

/// [`representative_beat_with`] on a recording already levelled ([`baseline::levelled`]).
fn representative_of_levelled(
    recording: &Recording,
    beats: &[Beat],
    p_model: Option<&PModel>,
) -> Option<RepresentativeBeat> {
    let fs = recording.sample_rate.hz();
    let n = recording.len();
    let rs: Vec<usize> = beats.iter().map(|b| b.r).collect();
    let rr = median_rr(&rs)?;
    let (before, after) = span(fs, rr);
    let reach = align_reach(fs);
    // Each beat whose span fits the recording, with the room it has to be moved by on either side. A beat at an
    // edge with no room joins as placed, even if it would match better moved: one beat among the rest bends the
    // median little. (Long recordings gather their beats with the full room, `BeatStack::gather`.)
    let gaps = recording.gaps();
    let chosen: Vec<(usize, Room)> = median_beats(beats, rr)
        .map(|b| b.r)
        .filter(|&r| r >= before && r + after <= n)
        .map(|r| (r, (reach.min(r - before), reach.min(n - r - after))))
        .filter(|&(r, (left, right))| has_signal(&gaps, r - before - left..r + after + right))
        .collect();
    if chosen.len() < MIN_BEATS {
        return None;
    }
    // Sample `k` (from R − before − reach) of beat `b` in `lead`; read only within the beat's room.
    let value = |lead: usize, b: usize, k: usize| recording.leads[lead].samples[chosen[b].0 + k - before - reach];
    let room = |b: usize| chosen[b].1;
    let leads = aligned_median(recording.leads.len(), (before, after), reach, chosen.len(), fs, room, value);
    // The T wave is sought before the next beat: the one that follows the beats chosen, which in bigeminy is the
    // premature beat at the short RR, not the record's median RR (demo bigeminy 30 s: QT 654 ms for 380, the
    // T end found on the premature QRS).
    let next = chosen.iter().filter_map(|&(r, _)| rr_to_next(&rs, r));
    Some(delineated(leads, recording.sample_rate, before, t_search_rr(next.collect(), rr), p_model, chosen.len()))
}

/// Samples from R peak `r` to the next of the R peaks `rs` (sorted); `None` after the last.
fn rr_to_next(rs: &[usize], r: usize) -> Option<usize> {
    rs.get(rs.partition_point(|&x| x <= r)).map(|&next| next - r)
}

/// The RR the representative beat's T wave is sought within: the median of `next` (each chosen beat's RR to the
/// beat after it), at most the record's median RR `rr`; `rr` when no chosen beat has a next one.
fn t_search_rr(next: Vec<usize>, rr: usize) -> usize {
    super::median_samples(next).unwrap_or(rr).min(rr)
}

/// Fewest beats a representative beat is made of, and fewest valid values a sample of it is the median of.
const MIN_BEATS: usize = 3;

/// True when `span` holds none of the recording's `gaps` (stretches of [`crate::gaps::MIN_GAP_S`] or more with no
/// valid lead, [`Recording::gaps`]): a beat with a signal to join the median. A lead missing over part of it (a
/// lead absent from the file, a lost sample) leaves those samples out of that lead's median only
/// ([`median_leads`]). (Asking for one lead valid throughout, as before, a recorder losing one sample of every
/// lead each half second gave no representative beat, hence no axis and no ST level.)
fn has_signal(gaps: &[std::ops::Range<usize>], span: std::ops::Range<usize>) -> bool {
    !crate::gaps::overlaps(gaps, span.start, span.end)
}

/// Samples before and after R in the representative beat of a record with median RR `rr` (samples).
fn span(fs: f64, rr: usize) -> (usize, usize) {
    (((BEFORE_S * fs) as usize).min(rr * 6 / 10), ((AFTER_S * fs) as usize).min(rr))
}

/// How far a beat may be moved earlier and later ([`aligned_median`]), samples: the alignment's reach, less
/// where the recording ends first.
type Room = (usize, usize);

/// How far a beat may be moved to line its QRS up with the others' ([`aligned_median`]), samples.
fn align_reach(fs: f64) -> usize {
    (ALIGN_S * fs).round() as usize
}

/// Per lead, the median of `count` beats, each lined up with the others first. A beat whose QRS window (as in
/// beat typing) matches the median of the beats as detected stays where it is; one that does not is moved to
/// the shift within ± `reach` samples (within `room(b)`, where the recording ends sooner) where it matches
/// best, when it matches there: beat typing calls a beat dominant whose R peak sat on its S wave rather than its
/// R wave (see `detect::typing::ALIGN_S`), and left where it was it would pull the median towards its own shape
/// wherever the beats differ. `value(lead, b, k)` is sample `k` of beat `b` counted from R − `before` − `reach`,
/// read only within the beat's room; the result has R at sample `before` and `before + after` samples.
// Measured (reported QRS against the experts, ms): QT Database +4.3 ± 10.0 as placed, +5.0 ± 9.4 lined up;
// LUDB −18.2 ± 13.6 / −18.3 ± 13.5.
fn aligned_median(
    n_leads: usize,
    (before, after): (usize, usize),
    reach: usize,
    count: usize,
    fs: f64,
    room: impl Fn(usize) -> Room,
    value: impl Fn(usize, usize, usize) -> f32,
) -> Vec<Vec<f32>> {
    let len = before + after;
    let template = median_leads(n_leads, len, count, |lead, k, b| value(lead, b, reach + k));
    let (wa, wb) = (((WIN_S.0 * fs) as usize).min(before), ((WIN_S.1 * fs) as usize).min(after.saturating_sub(1)));
    let window = before - wa..=before + wb;
    let half = smooth_half(fs);
    // The QRS window of each of `leads`, levelled and joined as beat typing compares them.
    let joined = |leads: &[usize], sample: &dyn Fn(usize, usize) -> f32| -> Vec<f32> {
        let mut out = Vec::with_capacity(leads.len() * (wa + wb + 1));
        for &lead in leads {
            let w: Vec<f32> = window.clone().map(|k| sample(lead, k)).collect();
            push_levelled(&mut out, &w, half);
        }
        out
    };
    // Leads whose median is valid over the window; each beat is compared on those it is valid on at every shift.
    let live: Vec<usize> = (0..n_leads).filter(|&l| window.clone().all(|k| template[l][k].is_finite())).collect();
    let shifts: Vec<usize> = (0..count)
        .map(|b| {
            // Offset `reach` is the beat as placed.
            let (left, right) = room(b);
            let reads = reach - left + before - wa..=reach + right + before + wb;
            let leads: Vec<usize> =
                live.iter().copied().filter(|&l| reads.clone().all(|k| value(l, b, k).is_finite())).collect();
            let t = joined(&leads, &|lead, k| template[lead][k]);
            let corr = |d: isize| {
                let s = reach.checked_add_signed(d).filter(|s| (reach - left..=reach + right).contains(s))?;
                Some(correlation(&joined(&leads, &|lead, k| value(lead, b, s + k)), &t))
            };
            matching_shift(reach, corr).map_or(reach, |d| reach.saturating_add_signed(d))
        })
        .collect();
    median_leads(n_leads, len, count, |lead, k, b| value(lead, b, shifts[b] + k))
}

/// A beat whose next beat is of another kind and comes before this fraction of the median RR is followed by a
/// premature beat, which lies in its span: its T wave, or what follows it, is not its own.
// Common practice, no source: QT is measured on beats not followed by an ectopic beat. (Measured: a 60-s
// trigeminy, every third beat premature at 500 ms, read QT 654 ms for 382, the median of the dominant beats
// switching between the T wave and the premature QRS where half of them held it.)
const FOLLOWED_EARLY: f64 = 0.9;

/// The beats the median is taken over: the dominant ones, or all when none is dominant; of those, the beats a
/// premature beat of another kind follows ([`FOLLOWED_EARLY`]) are left out while at least half of them and
/// [`MIN_BEATS`] remain.
/// `rr` is the beats' median RR, samples.
fn median_beats(beats: &[Beat], rr: usize) -> impl Iterator<Item = &Beat> {
    let any_dominant = beats.iter().any(|b| b.kind == BeatKind::Dominant);
    let pool: Vec<(usize, &Beat)> =
        beats.iter().enumerate().filter(|(_, b)| !any_dominant || b.kind == BeatKind::Dominant).collect();
    let rr = rr as f64;
    let followed_early = |i: usize| {
        beats.get(i + 1).is_some_and(|next| {
            next.kind != BeatKind::Dominant && ((next.r.saturating_sub(beats[i].r)) as f64) < FOLLOWED_EARLY * rr
        })
    };
    let kept: Vec<&Beat> = pool.iter().filter(|(i, _)| !followed_early(*i)).map(|(_, b)| *b).collect();
    let chosen = if kept.len() >= MIN_BEATS && kept.len() * 2 >= pool.len() {
        kept
    } else {
        pool.into_iter().map(|(_, b)| b).collect()
    };
    chosen.into_iter()
}

/// Per lead, the sample-by-sample median over `count` beats of `len` samples, `value(lead, k, beat)` giving
/// sample `k` of a beat; invalid samples (NaN) are left out, and a sample with fewer than [`MIN_BEATS`] valid
/// values is NaN.
fn median_leads(n_leads: usize, len: usize, count: usize, value: impl Fn(usize, usize, usize) -> f32) -> Vec<Vec<f32>> {
    let mut col = Vec::with_capacity(count);
    (0..n_leads)
        .map(|lead| {
            (0..len)
                .map(|k| {
                    col.clear();
                    col.extend((0..count).map(|b| value(lead, k, b)).filter(|v| v.is_finite()));
                    if col.len() < MIN_BEATS {
                        return f32::NAN;
                    }
                    let mid = col.len() / 2;
                    *col.select_nth_unstable_by(mid, f32::total_cmp).1
                })
                .collect()
        })
        .collect()
}

/// The median beat `leads` (R at sample `before`) delineated as one beat of a record with median RR `rr`. A lead
/// whose median is missing anywhere in the span (fewer than [`MIN_BEATS`] beats had it there) is left out whole:
/// its waves would otherwise be delineated and measured on the part of them that is left, and its filtered signal
/// near the missing part is not its own. (LUDB 24 with its limb leads off from 2.5 to 7.5 s kept them only before
/// R in the QRS: QRS axis 41° for 27°, QRS 192 ms for 180. Keeping such a lead where it is whole, with each
/// boundary search and net value skipping it where it is not, read PR 154 ms for 132 there.)
fn delineated(
    mut leads: Vec<Vec<f32>>,
    sample_rate: Hertz,
    before: usize,
    rr: usize,
    p_model: Option<&PModel>,
    n_beats: usize,
) -> RepresentativeBeat {
    for lead in &mut leads {
        bridge_short_holes(lead, sample_rate.hz());
    }
    for lead in leads.iter_mut().filter(|l| l.iter().any(|v| !v.is_finite())) {
        lead.fill(f32::NAN);
    }
    let len = leads.first().map_or(0, Vec::len);
    let refs: Vec<&[f32]> = leads.iter().map(Vec::as_slice).collect();
    let sig = Signals::new(&refs, sample_rate.hz());
    let (on, end) = qrs::qrs_bounds(&sig, before, 0, len);
    // As for the record's beats: no T end where the next P wave may start when theirs were so held back.
    let held_back = p_model.is_some_and(|m| m.t_held_back);
    let t_end = beat_t_waves(&sig, before, on, end, (rr, len), held_back).and_then(|t| twave::global_end(&sig, &t));
    let (p_on, p_end) = match (p_model, on) {
        (Some(m), Some(q)) => m.for_beat(&sig, q, 0).map_or((None, None), |(a, b)| (Some(a), Some(b))),
        _ => (None, None),
    };
    drop(sig);
    RepresentativeBeat {
        leads,
        sample_rate,
        r_index: before,
        bounds: Boundaries { p_on, p_end, qrs_on: on, qrs_end: end, t_end },
        n_beats,
        baseline_step_uv: None,
    }
}

/// Bridges each hole in a median `lead` (sampled at `fs` Hz) shorter than [`crate::gaps::ABSENT_RUN_S`] as the
/// detector and the boundary finders bridge such runs in the leads themselves ([`crate::filter::bridged`]: a
/// straight line, or the one neighbour's value at an end). A recorder losing a few samples of a lead in step with
/// the rhythm leaves the same few samples missing in too many beats, and the lead was left out of the
/// representative beat whole for them (LUDB 1 with lead II missing 8 ms at the same place in every beat; a
/// helper's LUDB 1 with each lead missing 10–15 ms every 150–300 ms left lead II's median missing 4 samples in
/// every 82). A hole on the R peak or the J point so bridged bends the axis or the ST level a little.
fn bridge_short_holes(lead: &mut [f32], fs: f64) {
    let (n, min_run) = (lead.len(), crate::gaps::absent_run_len(fs));
    let runs = crate::gaps::invalid_runs(lead);
    // A lead with no valid sample has nothing to bridge from.
    for run in runs.into_iter().filter(|r| r.len() < min_run && r.len() < n) {
        for k in run.clone() {
            let v = crate::filter::bridged(lead, &run, k) as f32;
            lead[k] = v;
        }
    }
}

/// How many beats a [`BeatStack`] keeps, about (each window gives an equal share, rounded up): the median of
/// this many beats spread over the recording is as steady as that of all of them, and their samples stay a few
/// MB.
// Common practice, no source: the median's noise falls as 1/√n; beyond a few hundred beats it is far below
// the quantisation step of the recording.
pub const STACK_BEATS: usize = 1000;

/// Beats gathered window by window for the representative beat of a long recording (see
/// `analysis::analyze_in_windows`), whose filtered copy is never held whole: about [`STACK_BEATS`] of the beats
/// the median is taken over, spread evenly over the windows, each kept over the longest span a representative
/// beat can have.
#[derive(Debug, Clone)]
pub struct BeatStack {
    sample_rate: Hertz,
    /// Samples kept before and after each R peak: the longest span a representative beat can have and the
    /// reach of the alignment on either side.
    before: usize,
    after: usize,
    /// Beats the stack takes from each window.
    quota: usize,
    /// Per kept beat, per lead: samples R − `before` .. R + `after`.
    beats: Vec<Vec<Vec<f32>>>,
    /// Per kept beat, samples from its R peak to the next beat's (when the window holds one): the T wave is
    /// sought before the beat that follows the kept ones, as in [`representative_beat_with`].
    next_rr: Vec<usize>,
    /// Per window gathered, how far its baseline moved from beat to beat ([`baseline::Levelled::step_uv`]), µV.
    baseline_steps: Vec<f64>,
}

impl BeatStack {
    /// An empty stack for a recording at `sample_rate` analysed in `windows` windows.
    #[must_use]
    pub fn new(sample_rate: Hertz, windows: usize) -> Self {
        let fs = sample_rate.hz();
        Self {
            sample_rate,
            before: (BEFORE_S * fs) as usize + align_reach(fs),
            after: (AFTER_S * fs) as usize + align_reach(fs),
            quota: STACK_BEATS.div_ceil(windows.max(1)),
            beats: Vec::new(),
            next_rr: Vec::new(),
            baseline_steps: Vec::new(),
        }
    }

    /// Keeps up to the stack's quota of `beats` (found in `part`, a window with its margins), evenly spaced
    /// among those the median is taken over whose R peak lies in `own` (the window's own samples of `part`) and
    /// whose span lies in `part` and holds no gap (see `has_signal`), from `part` levelled as
    /// [`representative_beat_with`] levels a recording.
    pub fn gather(&mut self, part: &Recording, beats: &[Beat], own: std::ops::Range<usize>) {
        let levelled = baseline::levelled(part, beats);
        self.baseline_steps.extend(levelled.step_uv);
        let part = levelled.recording.as_ref();
        let n = part.len();
        let (before, after) = (self.before, self.after);
        let gaps = part.gaps();
        let rs: Vec<usize> = beats.iter().map(|b| b.r).collect();
        let usable: Vec<usize> = median_beats(beats, median_rr(&rs).unwrap_or(0))
            .map(|b| b.r)
            .filter(|r| own.contains(r) && *r >= before && r + after < n)
            .filter(|&r| has_signal(&gaps, r - before..r + after))
            .collect();
        let take = usable.len().min(self.quota);
        for i in 0..take {
            let r = usable[i * usable.len() / take];
            self.beats.push(part.leads.iter().map(|l| l.samples[r - before..r + after].to_vec()).collect());
            self.next_rr.extend(rr_to_next(&rs, r));
        }
    }

    /// Adds the beats `other` kept (a stack made with the same [`BeatStack::new`] arguments, for a later window)
    /// after this one's, as if they had been gathered here.
    pub fn append(&mut self, mut other: BeatStack) {
        self.beats.append(&mut other.beats);
        self.next_rr.append(&mut other.next_rr);
        self.baseline_steps.append(&mut other.baseline_steps);
    }

    /// Number of beats kept.
    #[must_use]
    pub fn len(&self) -> usize {
        self.beats.len()
    }

    /// True when no beat was kept.
    #[must_use]
    pub fn is_empty(&self) -> bool {
        self.beats.is_empty()
    }

    /// The representative beat of the kept beats, for a recording whose beats (all of them, in time order) are
    /// `beats` and whose P model is `p_model`, as [`representative_beat_with`] gives it. `None` with fewer than
    /// 3 beats kept.
    #[must_use]
    pub fn representative(&self, beats: &[Beat], p_model: Option<&PModel>) -> Option<RepresentativeBeat> {
        let rs: Vec<usize> = beats.iter().map(|b| b.r).collect();
        let rr = median_rr(&rs)?;
        if self.beats.len() < MIN_BEATS {
            return None;
        }
        // The kept spans are the longest; the record's RR may shorten them.
        let fs = self.sample_rate.hz();
        let (before, after) = span(fs, rr);
        let reach = align_reach(fs);
        let skip = self.before - before - reach;
        let value = |lead: usize, b: usize, k: usize| self.beats[b][lead][skip + k];
        let room = |_| (reach, reach);
        let leads = aligned_median(self.beats[0].len(), (before, after), reach, self.beats.len(), fs, room, value);
        let rr_next = t_search_rr(self.next_rr.clone(), rr);
        let rep = delineated(leads, self.sample_rate, before, rr_next, p_model, self.beats.len());
        Some(RepresentativeBeat { baseline_step_uv: crate::measure::stats::median(&self.baseline_steps), ..rep })
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn beats_whose_r_peak_sat_on_the_s_wave_are_lined_up_before_the_median() {
        // 250 Hz, one lead: R (+900 µV) and S (−850 µV) 32 ms apart, with ±10 µV of noise. Of nine beats, five
        // have their R peak on the R wave and four on the S wave (8 samples late). The median of the beats as
        // placed leans towards the four at every sample; lined up, all nine count.
        let fs = 250.0;
        let (before, after, reach) = (50, 75, align_reach(fs));
        let wave = |k: f32| -> f32 {
            [(0.0, 900.0f32), (8.0, -850.0)].iter().map(|&(at, amp)| amp * (-((k - at) / 3.0).powi(2)).exp()).sum()
        };
        let noise = |b: usize, k: usize| ((b * 7919 + k * 104_729) % 21) as f32 - 10.0;
        let placed = [0usize, 8, 0, 8, 0, 8, 0, 8, 0];
        // Sample k (from R − before − reach) of beat b, whose R peak was placed `placed[b]` samples after its R.
        let value = |_: usize, b: usize, k: usize| {
            wave(k as f32 - (before + reach + placed[b]) as f32) + noise(b, k + placed[b])
        };
        let lined_up = aligned_median(1, (before, after), reach, placed.len(), fs, |_| (reach, reach), value);
        let as_placed = median_leads(1, before + after, placed.len(), |_, k, b| value(0, b, reach + k));
        let worst = |m: &[f32]| {
            m.iter().enumerate().map(|(k, &v)| (v - wave(k as f32 - before as f32)).abs()).fold(0.0f32, f32::max)
        };
        let (a, b) = (worst(&lined_up[0]), worst(&as_placed[0]));
        assert!(a < 8.0 && b > 2.0 * a, "worst error lined up {a} µV, as placed {b} µV");
        // A beat at the recording's edge has no room to be moved: it is never read outside its own span, and it
        // still counts where it is.
        let edge = |_: usize, b: usize, k: usize| {
            assert!(b != 1 || (reach..reach + before + after).contains(&k), "beat 1 read at {k}");
            value(0, b, k)
        };
        let room = |b: usize| if b == 1 { (0, 0) } else { (reach, reach) };
        let with_edge = aligned_median(1, (before, after), reach, placed.len(), fs, room, edge);
        assert!(worst(&with_edge[0]) < 2.0 * a.max(4.0), "worst error with the edge beat {}", worst(&with_edge[0]));
    }

    #[test]
    fn repeated_r_peaks_give_no_representative_beat_rather_than_a_panic() {
        // Beats at the same R peak three times over (a caller's duplicates): the median RR is zero, and a
        // representative beat of no span indexed past its empty template (found by a review).
        let leads = vec![crate::recording::Lead {
            name: crate::recording::LeadName::parse("II"),
            samples: (0..3000).map(|k| ((k % 500) as f32 * 0.1).sin() * 100.0).collect(),
        }];
        let rec = crate::recording::test_recording(leads);
        let beats: Vec<Beat> =
            [1000, 1000, 1000, 2000, 2000, 2000].iter().map(|&r| Beat::at(r, BeatKind::Dominant)).collect();
        assert!(representative_beat_with(&rec, &beats, None).is_none());
        assert_eq!(median_rr(&[1000, 1000, 1000, 2000, 2000, 2000]), None);
        assert_eq!(median_rr(&[1000, 1400, 1800]), Some(400));
    }

    #[test]
    fn short_holes_in_a_median_are_bridged_and_long_ones_kept() {
        // 500 Hz: runs of 4 samples (8 ms) are bridged on the straight line between their neighbours, or held at
        // the one neighbour's value at an end; a run of 5 (10 ms, `gaps::ABSENT_RUN_S`) stays missing.
        let nan = f32::NAN;
        let mut lead = vec![0.0, 10.0, nan, nan, nan, nan, 60.0, 70.0, nan, nan, nan, nan, nan, 0.0, 1.0, nan];
        bridge_short_holes(&mut lead, 500.0);
        assert_eq!(&lead[..8], &[0.0, 10.0, 20.0, 30.0, 40.0, 50.0, 60.0, 70.0]);
        assert!(lead[8..13].iter().all(|v| v.is_nan()), "{lead:?}");
        assert_eq!(&lead[13..], &[0.0, 1.0, 1.0]);
        let mut none = vec![nan; 3];
        bridge_short_holes(&mut none, 500.0);
        assert!(none.iter().all(|v| v.is_nan()));
    }
}
