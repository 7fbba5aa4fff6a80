//! Notes about the signal itself, said once when a recording is opened: samples missing, flat or clipped
//! leads, an amplitude no ECG has.

use std::ops::Range;

use super::lead::{CLIPPED_RUN_S, robust_span};
use super::{FLAT_UV, Lead, Recording};

/// Spans (µV) of the largest lead outside which [`Recording::amplitude_doubt`] speaks: a QRS complex spans about
/// 0.5–3 mV on most leads; a lead spanning under 20 µV or over 50 mV holds no ECG at the scale stated.
// Common practice, no source: limits set an order of magnitude beyond the usual amplitudes either way.
const ECG_SPAN_UV: Range<f64> = 20.0..50_000.0;

/// The number of samples in `runs` (sample ranges: missing runs, gaps) and the length of the longest.
fn run_totals(runs: &[Range<usize>]) -> (usize, usize) {
    (runs.iter().map(Range::len).sum(), runs.iter().map(Range::len).max().unwrap_or(0))
}

/// More notes than this on leads missing samples at times of their own become one.
const SCATTERED_NOTES: usize = 3;

/// `part` of `whole` as a percentage with one decimal, rounded down (a lead with one valid sample is not "100.0 %"
/// missing), and "under 0.1 %" for a share that would read 0.0.
fn share(part: usize, whole: usize) -> String {
    let tenths = (1000.0 * part as f64 / whole.max(1) as f64).floor() / 10.0;
    if part > 0 && tenths == 0.0 { "under 0.1 %".to_owned() } else { format!("{tenths:.1} %") }
}

/// Lead names as prose: "I, II and V1".
fn join_names(leads: &[&Lead]) -> String {
    spoken_list(leads.iter().map(|l| &l.name))
}

/// Items as said in a sentence: `I`, `I and II`, `V1, V2 and V3`.
pub(crate) fn spoken_list<T: std::fmt::Display>(items: impl IntoIterator<Item = T>) -> String {
    let names: Vec<String> = items.into_iter().map(|x| x.to_string()).collect();
    match names.split_last() {
        Some((last, rest)) if !rest.is_empty() => format!("{} and {last}", rest.join(", ")),
        _ => names.concat(),
    }
}

impl Recording {
    /// Every note about the signal itself, for exports and tables: samples missing ([`Self::invalid_sample_notes`]),
    /// flat leads ([`Self::flat_lead_notes`]), clipped leads ([`Self::clipped_lead_notes`]), a doubt about the
    /// amplitude ([`Self::amplitude_doubt`]) and leads read at an assumed gain ([`Self::uncalibrated_note`]).
    #[must_use]
    pub fn signal_notes(&self) -> Vec<String> {
        let mut notes = self.invalid_sample_notes();
        notes.extend(self.flat_lead_notes());
        notes.extend(self.clipped_lead_notes());
        notes.extend(self.amplitude_doubt());
        notes.extend(self.uncalibrated_note());
        notes
    }

    /// That leads were read at an assumed gain (the file gives none, [`super::Meta::uncalibrated_leads`]): their
    /// µV and mV values, ST levels and axes may be wrong; times are not affected.
    #[must_use]
    pub fn uncalibrated_note(&self) -> Option<String> {
        let leads: Vec<&Lead> = self.meta.uncalibrated_leads.iter().filter_map(|&i| self.leads.get(i)).collect();
        let (what, verb) = if leads.len() == 1 { ("lead", "has") } else { ("leads", "have") };
        (!leads.is_empty()).then(|| {
            format!(
                "{what} {} {verb} no gain in the file (uncalibrated): read at an assumed 200 units per mV, so \
                 amplitudes, ST levels and axes may be wrong (times are not affected)",
                join_names(&leads)
            )
        })
    }

    /// A doubt about the recording's amplitude, said once when it is opened: every lead flat, or the largest
    /// lead's span (0.5th to 99.5th percentile of its samples, so a few spikes do not count) far outside what an
    /// ECG spans. Either usually means a wrong unit or gain in the header, or a file that holds no ECG; the
    /// analysis then finds no beat or measures levels a thousand times off, so the reader is told why.
    #[must_use]
    pub fn amplitude_doubt(&self) -> Option<String> {
        let spans: Vec<f32> = self.leads.iter().filter_map(|l| robust_span(&l.samples)).collect();
        let largest = spans.iter().copied().fold(0.0f32, f32::max);
        if spans.is_empty() {
            None
        } else if largest == 0.0 {
            Some("every lead is flat: no signal to measure".to_string())
        } else if f64::from(largest) > ECG_SPAN_UV.end {
            Some(format!(
                "the largest lead spans {:.0} mV, far more than an ECG's few mV: are the units or gains in the header right?",
                largest / 1000.0
            ))
        } else if f64::from(largest) < ECG_SPAN_UV.start {
            Some(format!(
                "the largest lead spans only {largest:.1} µV, far less than an ECG's QRS: are the units or gains in the header right?"
            ))
        } else {
            None
        }
    }

    /// One note per set of leads missing the same samples, said once when the recording is opened: a lead with
    /// none valid is drawn blank and takes no part in the measurements; a lead with gaps is interpolated across
    /// them for the analysis, so its beats there are found and measured on the other leads. Where no lead was
    /// recorded ([`Recording::gaps`]: every lead alike, a one-lead recording, or different leads missing at
    /// overlapping times, which gets a note of its own), beats are not measured and no RR interval spans the gap.
    /// Either way the reader should know part of the record is not there.
    #[must_use]
    pub fn invalid_sample_notes(&self) -> Vec<String> {
        let fs = self.sample_rate.hz();
        // Leads missing exactly the same samples share one note (an unplugged recorder loses every lead at
        // once; twelve alike notes would bury the point that nothing was recorded then).
        // Compared as lists of runs, each lead's found in one pass (comparing whole masks cost up to 12 × 11 / 2
        // passes over a 24-h recording).
        let mut groups: Vec<(Vec<Range<usize>>, Vec<&Lead>)> = Vec::new();
        for lead in &self.leads {
            let runs = crate::gaps::invalid_runs(&lead.samples);
            if runs.is_empty() {
                continue;
            }
            match groups.iter_mut().find(|(r, _)| *r == runs) {
                Some((_, g)) => g.push(lead),
                None => groups.push((runs, vec![lead])),
            }
        }
        let gaps = self.gaps();
        let (min_gap, min_gap_ms) = ((crate::gaps::MIN_GAP_S * fs).ceil() as usize, crate::gaps::MIN_GAP_S * 1000.0);
        let n_leads = self.leads.len();
        // Leads missing some samples at times of their own, bridged: said in one note when there are many.
        let partial =
            |(runs, g): &&(Vec<Range<usize>>, Vec<&Lead>)| g.len() < n_leads && run_totals(runs).0 < g[0].samples.len();
        let scattered = groups.iter().filter(partial).count() > SCATTERED_NOTES;
        let mut notes: Vec<String> = groups
            .iter()
            .filter(|g| !scattered || !partial(g))
            .map(|(runs, group)| {
                let lead = group[0];
                let (invalid, longest) = run_totals(runs);
                let every = group.len() == n_leads;
                // Some of these samples fall where no lead was recorded (said in a note of its own).
                let unrecorded = runs.iter().any(|r| crate::gaps::overlaps(&gaps, r.start, r.end));
                // Who, the verb agreeing with it, and how the count applies.
                let (who, has, holds, they, each, of) = match group.len() {
                    1 => (format!("lead {}", lead.name), "has", "holds", "it is", "", "it"),
                    _ if every => ("every lead".to_owned(), "has", "holds", "they are", ", at the same times", "each"),
                    _ => (
                        format!("leads {}", join_names(group)),
                        "have",
                        "hold",
                        "they are",
                        " each, at the same times",
                        "each",
                    ),
                };
                if invalid == lead.samples.len() {
                    return format!(
                        "{who} {holds} no valid sample: {they} drawn blank and left out of the measurements"
                    );
                }
                let them = if invalid == 1 { "it" } else { "them" };
                format!(
                    "{who} {has} {invalid} missing sample{}{each} ({} of {of}; the longest run {:.3} s): {}",
                    if invalid == 1 { "" } else { "s" },
                    share(invalid, lead.samples.len()),
                    longest as f64 / fs,
                    match (every, if every { longest >= min_gap } else { unrecorded }) {
                        (true, true) => format!(
                            "nothing was recorded then, so no beat is measured within a gap of {min_gap_ms:.0} ms or \
                             more, and no RR interval spans one"
                        ),
                        (true, false) => {
                            format!("no run reaches {min_gap_ms:.0} ms, and the analysis bridges {them}")
                        }
                        (false, false) => {
                            format!("the analysis bridges {them} and measures beats there on the other leads")
                        }
                        (false, true) => {
                            format!("where another lead records, the analysis bridges {them} and measures beats on it")
                        }
                    }
                )
            })
            .collect();
        if scattered {
            // Each lead's totals from its group's runs, found once above.
            let (leads, counts): (Vec<&Lead>, Vec<(usize, usize)>) = groups
                .iter()
                .filter(partial)
                .flat_map(|(runs, g)| g.iter().map(move |&l| (l, run_totals(runs))))
                .unzip();
            let fewest = counts.iter().map(|c| c.0).min().unwrap_or(0);
            let most = counts.iter().map(|c| c.0).max().unwrap_or(0);
            let longest = counts.iter().map(|c| c.1).max().unwrap_or(0);
            let most_share = leads
                .iter()
                .zip(&counts)
                .map(|(l, c)| (c.0, l.samples.len()))
                .max_by(|a, b| (a.0 as f64 / a.1 as f64).total_cmp(&(b.0 as f64 / b.1 as f64)));
            notes.push(format!(
                "{} leads ({}) miss samples at times of their own ({} each, {}; the longest run {:.3} s): the \
                 analysis bridges them and measures beats there on the other leads",
                leads.len(),
                join_names(&leads),
                if fewest == most { fewest.to_string() } else { format!("{fewest} to {most}") },
                match most_share.map(|(k, n)| share(k, n)) {
                    Some(s) if s.starts_with("under") => format!("{s} of any lead"),
                    Some(s) => format!("at most {s} of a lead"),
                    None => String::new(),
                },
                longest as f64 / fs,
            ));
        }
        // Different leads missing at overlapping times also leave stretches with no lead at all.
        if !gaps.is_empty() && !groups.iter().any(|(_, g)| g.len() == self.leads.len()) {
            let (total, longest) = run_totals(&gaps);
            notes.push(format!(
                "no lead was recorded for {:.3} s in all (the longest stretch {:.3} s): beats there are not measured, and no RR interval spans such a stretch",
                total as f64 / fs,
                longest as f64 / fs
            ));
        }
        notes
    }

    /// One note per flat lead (see [`Lead::is_flat`]) with a valid sample, when not every lead is flat (then
    /// [`Recording::amplitude_doubt`] speaks): such a lead is left out of the axis and its ST level is absent.
    #[must_use]
    pub fn flat_lead_notes(&self) -> Vec<String> {
        let flat: Vec<bool> = self.leads.iter().map(Lead::is_flat).collect();
        if flat.iter().all(|&f| f) {
            return Vec::new();
        }
        self.leads
            .iter()
            .zip(flat)
            .filter(|(l, flat)| *flat && l.samples.iter().any(|v| v.is_finite()))
            .map(|(l, _)| {
                format!(
                    "lead {} is flat (it spans under {FLAT_UV} µV, as when its electrode is off): it is left out of the axis and has no ST level",
                    l.name
                )
            })
            .collect()
    }

    /// One note per clipped lead (see [`Lead::clipping`]): its waves are cut off at the limit, so amplitudes read
    /// from it (the axis, ST levels, voltage calipers) may be too small, and its QRS may look wider or flatter.
    #[must_use]
    pub fn clipped_lead_notes(&self) -> Vec<String> {
        let fs = self.sample_rate.hz();
        self.leads
            .iter()
            .filter_map(|l| {
                let c = l.clipping(fs)?;
                let side = |s: Option<(f32, usize)>| s.map(|(level, runs)| format!("{:+.2} mV in {runs} places", level / 1000.0));
                let sides: Vec<String> = [side(c.top), side(c.bottom)].into_iter().flatten().collect();
                Some(format!(
                    "lead {} is held at its extreme value ({}) for {:.0} ms or more each time, as a recorder at the end of its range holds it: waves there are cut off, and amplitudes, the axis and ST levels read from this lead may be wrong",
                    l.name,
                    sides.join(" and "),
                    (CLIPPED_RUN_S * 1000.0)
                ))
            })
            .collect()
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::recording::{LeadName, test_recording as rec};

    /// 10 s at 500 Hz of beats once a second: a narrow 1.5 mV R wave and a broad 0.4 mV T wave, quantised to 5 µV.
    fn beats_lead(name: &str) -> Lead {
        let samples = (0..5000)
            .map(|k| {
                let d = (k % 500) as f32 / 500.0 - 0.3;
                let v = 1500.0 * (-(d / 0.012).powi(2)).exp() + 400.0 * (-((d - 0.3) / 0.06).powi(2)).exp();
                (v / 5.0).round() * 5.0
            })
            .collect();
        Lead { name: LeadName::parse(name), samples }
    }

    #[test]
    fn clipped_leads_are_noted() {
        // Unclipped: every R peak reaches the same 1500 µV for one sample only; the broad T wave holds its peak
        // value for several samples but lies below the R peaks; the flat baseline between the beats is the lead's
        // smallest value, held most of each second, but it is where the lead usually is (its median).
        let clean = beats_lead("II");
        assert_eq!(clean.clipping(500.0), None);
        // Cut at 1 mV: ten R waves held at the limit for 10 ms or more each.
        let mut cut = beats_lead("II");
        cut.samples.iter_mut().for_each(|v| *v = v.min(1000.0));
        let c = cut.clipping(500.0).unwrap_or_else(|| panic!("not clipped"));
        assert_eq!((c.top, c.bottom), (Some((1000.0, 10)), None));
        let notes = rec(vec![cut, beats_lead("V5")]).clipped_lead_notes();
        assert_eq!(notes.len(), 1, "{notes:?}");
        assert!(notes[0].starts_with("lead II is held at its extreme value (+1.00 mV in 10 places)"), "{notes:?}");
        // Held at the limit in two places only (two beats reach it): not enough to call the lead clipped.
        let mut two = beats_lead("II");
        two.samples.iter_mut().take(1200).for_each(|v| *v = v.min(1000.0));
        assert_eq!(two.clipping(500.0), None);
        // A coarse recorder (20 µV steps) on a lead whose T wave is its largest wave: the T wave's top is held
        // for several samples in every beat, but reached one step at a time. Not clipped.
        let mut coarse = beats_lead("V3");
        coarse.samples.iter_mut().for_each(|v| *v = (*v * 0.15 / 20.0).round() * 20.0);
        for k in 0..5000 {
            let d = (k % 500) as f32 / 500.0 - 0.6;
            coarse.samples[k] += ((600.0 * (-(d / 0.06).powi(2)).exp()) / 20.0).round() * 20.0;
        }
        assert_eq!(coarse.clipping(500.0), None);
        // Calibration pulses (1 mV for 200 ms, three of them) are the lead's largest value, reached steeply, but
        // held longer than a cut-off QRS is. Not clipped.
        let mut cal = beats_lead("V1");
        cal.samples.iter_mut().for_each(|v| *v *= 0.5);
        for start in [100, 1600, 3100] {
            cal.samples[start..start + 100].fill(1000.0);
        }
        assert_eq!(cal.clipping(500.0), None);
        // A flat lead is flat, not clipped.
        assert_eq!(Lead { name: LeadName::parse("I"), samples: vec![0.0; 5000] }.clipping(500.0), None);
    }

    #[test]
    fn missing_samples_are_noted_per_lead() {
        let mut gappy = vec![1.0f32; 1000];
        gappy[100..350].fill(f32::NAN);
        gappy[900] = f32::INFINITY;
        let r = rec(vec![
            Lead { name: LeadName::parse("I"), samples: vec![f32::NAN; 1000] },
            Lead { name: LeadName::parse("II"), samples: gappy },
            Lead { name: LeadName::parse("V1"), samples: vec![2.0; 1000] },
        ]);
        let notes = r.invalid_sample_notes();
        assert_eq!(notes.len(), 2, "{notes:?}");
        assert!(notes[0].starts_with("lead I holds no valid sample"), "{}", notes[0]);
        // 251 of 1000 samples; the longest gap 250 samples at 500 Hz.
        assert!(
            notes[1].starts_with("lead II has 251 missing samples (25.1 % of it; the longest run 0.500 s)"),
            "{}",
            notes[1]
        );
        assert_eq!(run_totals(&crate::gaps::invalid_runs(&[1.0, f32::NAN, f32::NAN, 2.0, f32::NAN])), (3, 2));
        let mut one_left = vec![f32::NAN; 15_000];
        one_left[7] = 0.0;
        let r = rec(vec![Lead { name: LeadName::parse("I"), samples: one_left }]);
        let notes = r.invalid_sample_notes();
        assert!(notes[0].starts_with("lead I has 14999 missing samples (99.9 % of it"), "{}", notes[0]);
    }

    #[test]
    fn leads_missing_the_same_samples_share_a_note() {
        let gap = |from: usize, to: usize| {
            let mut x = vec![1.0f32; 1000];
            x[from..to].fill(f32::NAN);
            x
        };
        let lead = |name: &str, samples: Vec<f32>| Lead { name: LeadName::parse(name), samples };
        // Every lead loses the same 0.4 s (a recorder unplugged): one note, saying nothing was recorded then.
        let every = rec(["I", "II", "V1"].into_iter().map(|n| lead(n, gap(100, 300))).collect());
        assert_eq!(
            every.invalid_sample_notes(),
            ["every lead has 200 missing samples, at the same times (20.0 % of each; the longest run 0.400 s): \
              nothing was recorded then, so no beat is measured within a gap of 20 ms or more, and no RR interval \
              spans one"]
        );
        // Two of three alike; the third whole.
        let two = rec(vec![lead("I", gap(100, 300)), lead("II", gap(100, 300)), lead("V1", vec![0.0; 1000])]);
        let notes = two.invalid_sample_notes();
        assert_eq!(notes.len(), 1, "{notes:?}");
        assert!(notes[0].starts_with("leads I and II have 200 missing samples each, at the same times"), "{notes:?}");
        assert!(notes[0].ends_with("measures beats there on the other leads"), "{notes:?}");
        // Different stretches that overlap leave 0.1 s with no lead at all: said once more.
        let overlap = rec(vec![lead("I", gap(100, 300)), lead("II", gap(250, 400))]);
        let notes = overlap.invalid_sample_notes();
        assert_eq!(notes.len(), 3, "{notes:?}");
        assert!(
            notes[2].starts_with("no lead was recorded for 0.100 s in all (the longest stretch 0.100 s)"),
            "{notes:?}"
        );
        // All three leads lose the same 0.4 s (a recorder unplugged) and V1 another 0.1 s: no note may say the
        // beats of those 0.4 s are measured on other leads.
        let mut v1 = gap(100, 300);
        v1[600..650].fill(f32::NAN);
        let unplugged = rec(vec![lead("I", gap(100, 300)), lead("II", gap(100, 300)), lead("V1", v1)]);
        let notes = unplugged.invalid_sample_notes();
        assert_eq!(notes.len(), 3, "{notes:?}");
        assert!(
            notes[..2]
                .iter()
                .all(|n| n.ends_with("where another lead records, the analysis bridges them and measures beats on it")),
            "{notes:?}"
        );
        assert!(notes[2].starts_with("no lead was recorded for 0.400 s in all"), "{notes:?}");
        // Scattered single losses in five leads of 10 000 samples, at different times: one note for them all.
        let one_lost = |name: &str, at: usize| {
            let mut x = vec![1.0f32; 10_000];
            x[at] = f32::NAN;
            lead(name, x)
        };
        let scattered =
            rec(["I", "II", "III", "aVR", "aVL"].iter().enumerate().map(|(i, n)| one_lost(n, 100 * i)).collect());
        assert_eq!(
            scattered.invalid_sample_notes(),
            ["5 leads (I, II, III, aVR and aVL) miss samples at times of their own (1 each, under 0.1 % of any lead; \
              the longest run 0.002 s): the analysis bridges them and measures beats there on the other leads"]
        );
        // One lead, one sample: singular, and a share that does not read 0.0 %.
        let one = rec(vec![one_lost("I", 5)]);
        assert_eq!(
            one.invalid_sample_notes(),
            [
                "lead I has 1 missing sample (under 0.1 % of it; the longest run 0.002 s): no run reaches 20 ms, and the \
              analysis bridges it"
            ]
        );
    }

    #[test]
    fn amplitude_far_from_an_ecgs_is_doubted() {
        // A 1 mV square wave with a single 40 mV spike, scaled.
        let rec = |scale: f32| {
            let samples = (0..5000)
                .map(|k| {
                    scale
                        * if k == 2500 {
                            40_000.0
                        } else if (k / 250) % 2 == 0 {
                            1000.0
                        } else {
                            0.0
                        }
                })
                .collect();
            rec(vec![Lead { name: LeadName::parse("II"), samples }])
        };
        assert_eq!(rec(1.0).amplitude_doubt(), None, "one spike does not count");
        assert!(rec(1000.0).amplitude_doubt().is_some_and(|d| d.contains("1000 mV")));
        assert!(rec(0.001).amplitude_doubt().is_some_and(|d| d.contains("1.0 µV")));
        assert!(rec(0.0).amplitude_doubt().is_some_and(|d| d.contains("flat")));
    }
}
