//! T waves taller than the QRS (as with a high potassium, or in a lead where the QRS is small) must not be counted
//! as beats, while a premature beat that comes as early as a T wave must. The detector's T-wave test (Pan &
//! Tompkins' 360 ms) also judges a peak soon after a beat by its curvature against the recent beats' QRS
//! (`isoline_core::detect`); before, by the height of its integrated energy alone: the normal demo with its T waves
//! made five times taller gave 24 beats for 12 (heart rate 144 bpm).
//!
//! Demo recordings from the dynamical model (McSharry, Clifford, Tarassenko & Smith, IEEE Trans Biomed Eng
//! 2003;50:289-94, as implemented by `isoline_core::synth`); the beats are the generator's. The taller T waves are
//! smooth bumps (Gaussian) added at each lead's own T peak.

use isoline_core::analysis::analyze;
use isoline_core::filter::FilterSettings;
use isoline_core::recording::Recording;
use isoline_core::synth::{self, Ectopics, LeadSet, Scenario, SynthSpec, TrueBeat};

/// Beats of the generator missed and beats found beyond them (a found beat matches a true one within 150 ms,
/// ANSI/AAMI EC57 practice).
fn missed_and_extra(recording: &Recording, truth: &[TrueBeat], fs: f64) -> (usize, usize) {
    let rs: Vec<usize> = truth.iter().map(|b| b.to_beat().r).collect();
    missed_and_extra_at(recording, &rs, fs)
}

/// [`missed_and_extra`] against beats at samples `rs`.
fn missed_and_extra_at(recording: &Recording, rs: &[usize], fs: f64) -> (usize, usize) {
    let a = analyze(recording, &FilterSettings::default());
    let window = (0.150 * fs) as usize;
    let missed = rs.iter().filter(|&&r| !a.beats.iter().any(|b| b.r.abs_diff(r) <= window)).count();
    let extra = a.beats.iter().filter(|b| !rs.iter().any(|&r| b.r.abs_diff(r) <= window)).count();
    (missed, extra)
}

/// Makes every T wave of `recording` `gain` times its height: in each lead, a Gaussian of width `sigma_s` and
/// (gain − 1) times the T wave's height there is added at the T peak (the largest departure from the level at QRS
/// onset between 50 ms after the J point and the T end).
fn taller_t_waves(recording: &mut Recording, truth: &[TrueBeat], gain: f64, sigma_s: f64, fs: f64) {
    let sigma = sigma_s * fs;
    let reach = (4.0 * sigma) as usize;
    for lead in &mut recording.leads {
        let x = lead.samples.clone();
        for b in truth {
            let (Some(on), Some(j), Some(end)) = (b.qrs_on, b.qrs_end, b.t_end) else { continue };
            let level = x[on];
            let from = j + (0.050 * fs) as usize;
            let Some(peak) =
                (from..end.min(x.len())).max_by(|&p, &q| (x[p] - level).abs().total_cmp(&(x[q] - level).abs()))
            else {
                continue;
            };
            let height = f64::from(x[peak] - level) * (gain - 1.0);
            for k in peak.saturating_sub(reach)..(peak + reach).min(x.len()) {
                let u = (k as f64 - peak as f64) / sigma;
                lead.samples[k] += (height * (-0.5 * u * u).exp()) as f32;
            }
        }
    }
}

#[test]
fn tall_t_waves_are_not_taken_for_beats() {
    // Measured before the curvature test: 24 beats for 12 at 5 times (35 ms); the other cases here were already
    // right. Not met (not tested): 8 times (35 ms), where the T wave's energy hides the QRS from the feature's
    // peak picking and every beat is placed on its T wave (so before too); 8 times (50 ms) now gives 12 beats
    // and one extra on the T wave the recording ends in (24 before); 5 times with the noisy scenario's noise
    // (muscle noise 25 µV, mains 40 µV, wander 150 µV), where the noise's own curvature hides the T wave's
    // roundness: 12 extra beats at 35 ms on either lead set, 3 at 50 ms on twelve leads.
    // Also as the QT Database records them (two leads at 250 Hz), and with that noise at 3 times, which the
    // curvature test must not turn into extra beats (it only ever takes a peak away).
    let mut wrong = Vec::new();
    let noise = Scenario::Noisy.spec().noise;
    for spec in [
        Scenario::Normal.spec(),
        SynthSpec { rate_hz: 250.0, leads: LeadSet::Pair, ..Scenario::Normal.spec() },
        SynthSpec { noise, ..Scenario::Normal.spec() },
        SynthSpec { noise, rate_hz: 250.0, leads: LeadSet::Pair, ..Scenario::Normal.spec() },
    ] {
        let with = if spec.noise.is_none() { "" } else { " with noise" };
        let setup = format!("{} leads at {} Hz{with}", spec.leads.count(), spec.rate_hz);
        let gains: &[f64] = if spec.noise.is_none() { &[3.0, 5.0] } else { &[3.0] };
        for &gain in gains {
            for sigma_s in [0.035, 0.050] {
                let mut s = synth::generate(&spec).unwrap_or_else(|e| panic!("{e}"));
                taller_t_waves(&mut s.recording, &s.truth.beats, gain, sigma_s, spec.rate_hz);
                let (missed, extra) = missed_and_extra(&s.recording, &s.truth.beats, spec.rate_hz);
                let case = format!("{setup}, T wave x{gain} ({:.0} ms)", sigma_s * 1e3);
                println!("{case}: {missed} missed, {extra} extra");
                if (missed, extra) != (0, 0) {
                    wrong.push(format!("{case}: {missed} missed, {extra} extra"));
                }
            }
        }
    }
    assert!(wrong.is_empty(), "{wrong:#?}");
}

#[test]
fn premature_beats_as_early_as_a_t_wave_are_kept() {
    // Every third beat a premature wide beat (QRS 150 ms) at 0.65 of the sinus RR: at 150 and 170 bpm it comes
    // 260 and 230 ms after the beat before it, within the T-wave test's 360 ms, and far less rounded than a T wave.
    // Not met (not tested): on two leads at 250 Hz (as the QT Database records), at 150 bpm every premature beat
    // has under half the sinus QRS's integrated energy (0.45) and is taken for a T wave (taking such a peak back
    // when a pause follows it was tried: it counted electrode pops and noise bursts before pauses, and the T waves
    // of premature beats, as beats); at 170 bpm on two leads every premature beat is missed, and on twelve leads at
    // 250 Hz the sinus beat before it: the two QRS merge into one hump of the feature.
    for (rate_hz, leads, bpm, pr_ms, qt_ms) in [
        (500.0, LeadSet::Standard12, 150.0, 100.0, 250.0),
        (500.0, LeadSet::Standard12, 170.0, 90.0, 220.0),
        (250.0, LeadSet::Standard12, 150.0, 100.0, 250.0),
    ] {
        let spec = SynthSpec {
            heart_rate_bpm: bpm,
            pr_ms,
            p_ms: 60.0,
            qt_ms,
            seconds: 30.0,
            rate_hz,
            leads,
            ectopics: Ectopics::Every(3),
            ..Scenario::Ectopics.spec()
        };
        let case = format!("{} leads at {rate_hz} Hz, {bpm} bpm", leads.count());
        let s = synth::generate(&spec).unwrap_or_else(|e| panic!("{case}: {e}"));
        let (missed, extra) = missed_and_extra(&s.recording, &s.truth.beats, spec.rate_hz);
        println!("{case}, {} premature beats: {missed} missed, {extra} extra", s.truth.ectopic_beats);
        assert!(s.truth.ectopic_beats >= 10, "{case}: {} premature beats", s.truth.ectopic_beats);
        assert_eq!((missed, extra), (0, 0), "{case}");
    }
}

/// Median beat of each lead of `recording` over the annotated beats of `symbol` (`sample,symbol` rows of `beats`),
/// from `pre` samples before the annotation to `post` after, levelled to its ends and tapered to zero over 60 ms at
/// either end (so beats can be laid down anywhere without a step).
fn median_template(recording: &Recording, beats: &str, symbol: &str, pre: usize, post: usize) -> Vec<Vec<f32>> {
    let n = recording.len();
    let at: Vec<usize> = beats
        .lines()
        .skip(1)
        .filter_map(|l| l.split_once(',').filter(|(_, s)| s.trim() == symbol).and_then(|(s, _)| s.trim().parse().ok()))
        .filter(|&s: &usize| s > pre && s + post < n)
        .collect();
    let taper = (0.060 * recording.sample_rate.hz()) as usize;
    recording
        .leads
        .iter()
        .map(|lead| {
            let mut m: Vec<f32> = (0..pre + post)
                .map(|k| {
                    let mut v: Vec<f32> = at.iter().map(|&s| lead.samples[s - pre + k]).collect();
                    let mid = v.len() / 2;
                    *v.select_nth_unstable_by(mid, f32::total_cmp).1
                })
                .collect();
            let level = 0.5 * (m[0] + m[m.len() - 1]);
            let len = m.len();
            for (k, v) in m.iter_mut().enumerate() {
                let edge = k.min(len - 1 - k);
                let w = if edge < taper {
                    0.5 - 0.5 * (std::f32::consts::PI * edge as f32 / taper as f32).cos()
                } else {
                    1.0
                };
                *v = (*v - level) * w;
            }
            m
        })
        .collect()
}

#[test]
fn real_premature_beats_soon_after_a_beat_are_kept() -> Result<(), String> {
    // Real beats, recombined: the median sinus (N) and premature ventricular (V) beats of two QT Database records
    // (PhysioNet QT Database, Laguna et al., Computers in Cardiology 1997; sel14046 and sel803, annotations of the
    // record), laid down at 75 bpm with a premature beat 240–320 ms after every third sinus beat and a 1.1 s pause
    // after it (60 s, 250 Hz), on both leads and on the first alone. Before the peak picking looked at peaks
    // with a larger one 100–200 ms away, on sel14046's first lead alone the sinus beat before each premature beat
    // 240 and 280 ms after it was hidden by the larger premature beat (40 beats missed; now 1, where the sinus
    // beat's energy falls under half the running QRS level after the premature beats, see `detect::peaks`).
    let fs = 250.0;
    let (pre, post) = ((0.3 * fs) as usize, (0.5 * fs) as usize);
    let mut wrong = Vec::new();
    for record in ["sel14046", "sel803"] {
        let opened = isoline_core::io::open(
            &isoline_tests::data(&format!("qtdb/{record}.hea")),
            &isoline_core::io::OpenOptions::default(),
        )
        .map_err(|e| e.to_string())?;
        let filtered = isoline_core::filter::apply(&opened.recording, &FilterSettings::default()).recording;
        let beats = std::fs::read_to_string(isoline_tests::data(&format!("qtdb/{record}.beats.csv")))
            .map_err(|e| e.to_string())?;
        let sinus = median_template(&filtered, &beats, "N", pre, post);
        let premature = median_template(&filtered, &beats, "V", pre, post);
        for coupling_s in [0.24, 0.28, 0.32] {
            let n = (60.0 * fs) as usize;
            let mut leads = vec![vec![0.0f32; n]; sinus.len()];
            let mut truth = Vec::new();
            let (mut t, mut i) = (0.6, 0);
            while t < 59.0 {
                for (at, templates) in
                    [(t, &sinus), (t + coupling_s, &premature)].into_iter().take(1 + usize::from(i % 3 == 2))
                {
                    let s = (at * fs) as usize;
                    truth.push(s);
                    for (lead, m) in leads.iter_mut().zip(templates.iter()) {
                        for (k, v) in m.iter().enumerate() {
                            lead[s - pre + k] += v;
                        }
                    }
                }
                t += if i % 3 == 2 { coupling_s + 1.1 } else { 0.8 };
                i += 1;
            }
            for n_leads in [sinus.len(), 1] {
                let mut recording = filtered.clone();
                recording.leads.truncate(n_leads);
                for (lead, x) in recording.leads.iter_mut().zip(&leads) {
                    lead.samples.clone_from(x);
                }
                let (missed, extra) = missed_and_extra_at(&recording, &truth, fs);
                let case = format!("{record}, {n_leads} lead(s), premature beat {coupling_s} s after");
                println!("{case}: {} beats, {missed} missed, {extra} extra", truth.len());
                if missed > 1 || extra > 0 {
                    wrong.push(format!("{case}: {missed} missed, {extra} extra"));
                }
            }
        }
    }
    assert!(wrong.is_empty(), "{wrong:#?}");
    Ok(())
}
