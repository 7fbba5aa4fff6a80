//! A Rust port of the project's scorer (`score.py`, used to check held-back records): beat matching within
//! 150 ms, sensitivity and positive predictivity, and boundary errors per annotated beat.
//!
//! Source: ANSI/AAMI EC57 practice — a detected beat matches a reference beat within 150 ms; Se = TP/(TP+FN),
//! +P = TP/(TP+FP); detections are only counted inside the reference span (± the window).

use std::path::Path;

use isoline_core::Beat;
use isoline_core::recording::Annotation;

/// Match window, seconds. Source: ANSI/AAMI EC57 practice (150 ms).
pub const MATCH_S: f64 = 0.150;

/// Pairs `(reference index, detected index)`: each reference beat takes the nearest unused detection among
/// the four around it, within `window` samples (the same greedy rule as `score.py`). `detected` is sorted.
#[must_use]
pub fn match_beats(reference: &[f64], detected: &[f64], window: f64) -> Vec<(usize, usize)> {
    let mut used = vec![false; detected.len()];
    let mut pairs = Vec::new();
    for (i, &r) in reference.iter().enumerate() {
        let j = detected.partition_point(|&d| d < r) as isize;
        let mut best: Option<usize> = None;
        for k in [j - 2, j - 1, j, j + 1] {
            if k < 0 || k as usize >= detected.len() {
                continue;
            }
            let k = k as usize;
            if !used[k]
                && (detected[k] - r).abs() <= window
                && best.is_none_or(|b| (detected[k] - r).abs() < (detected[b] - r).abs())
            {
                best = Some(k);
            }
        }
        if let Some(b) = best {
            used[b] = true;
            pairs.push((i, b));
        }
    }
    pairs
}

/// Detection counts.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq)]
pub struct Detection {
    /// True positives.
    pub tp: usize,
    /// Missed reference beats.
    pub fn_: usize,
    /// Extra detections.
    pub fp: usize,
}

impl Detection {
    /// Sensitivity, %.
    #[must_use]
    pub fn se(&self) -> f64 {
        100.0 * self.tp as f64 / (self.tp + self.fn_).max(1) as f64
    }
    /// Positive predictivity, %.
    #[must_use]
    pub fn ppv(&self) -> f64 {
        100.0 * self.tp as f64 / (self.tp + self.fp).max(1) as f64
    }
    /// Adds another record's counts.
    pub fn add(&mut self, o: Detection) {
        self.tp += o.tp;
        self.fn_ += o.fn_;
        self.fp += o.fp;
    }
}

/// Scores detected R peaks against reference beats (sample indices), counting only detections within the
/// reference span ± the window, as `score.py` does.
#[must_use]
pub fn score_detection(reference: &[f64], detected: &[f64], fs: f64) -> Detection {
    let win = MATCH_S * fs;
    let (Some(&first), Some(&last)) = (reference.first(), reference.last()) else {
        return Detection { tp: 0, fn_: 0, fp: detected.len() };
    };
    let inside: Vec<f64> = detected.iter().copied().filter(|&d| d >= first - win && d <= last + win).collect();
    let tp = match_beats(reference, &inside, win).len();
    Detection { tp, fn_: reference.len() - tp, fp: inside.len() - tp }
}

/// The boundaries scored (P end is not scored, as in `score.py`).
pub const KEYS: [&str; 4] = ["p_on", "qrs_on", "qrs_end", "t_end"];

/// One annotated (or detected) beat: R sample and boundaries in samples.
#[derive(Debug, Clone, Copy, Default, PartialEq)]
pub struct BeatMarks {
    /// R peak (or beat annotation) sample.
    pub r: f64,
    /// P onset, QRS onset, QRS end (J point), T end — in the order of [`KEYS`].
    pub marks: [Option<f64>; 4],
}

impl From<&Beat> for BeatMarks {
    fn from(b: &Beat) -> Self {
        let f = |v: Option<usize>| v.map(|x| x as f64);
        Self { r: b.r as f64, marks: [f(b.bounds.p_on), f(b.bounds.qrs_on), f(b.bounds.qrs_end), f(b.bounds.t_end)] }
    }
}

/// Boundary errors (detected − reference, ms) per key, and how many reference beats annotated each key.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct BoundaryErrors {
    /// Errors in ms, per key of [`KEYS`].
    pub errors: [Vec<f64>; 4],
    /// Reference marks of each key on matched beats.
    pub wanted: [usize; 4],
}

impl BoundaryErrors {
    /// Adds another record's errors.
    pub fn add(&mut self, o: &BoundaryErrors) {
        for k in 0..4 {
            self.errors[k].extend_from_slice(&o.errors[k]);
            self.wanted[k] += o.wanted[k];
        }
    }
    /// Mean and sample standard deviation of key `k`, ms (`None` with fewer than 2 errors).
    #[must_use]
    pub fn mean_sd(&self, k: usize) -> Option<(f64, f64)> {
        mean_sd(&self.errors[k])
    }
    /// Fraction (0–1) of reference marks of key `k` that got a detected mark.
    #[must_use]
    pub fn found(&self, k: usize) -> f64 {
        self.errors[k].len() as f64 / self.wanted[k].max(1) as f64
    }
    /// One line per key: `p_on n 178 of 181 mean -5.4 sd 15.1`.
    #[must_use]
    pub fn summary(&self) -> String {
        (0..4)
            .map(|k| {
                let (m, s) = self.mean_sd(k).unwrap_or((f64::NAN, f64::NAN));
                format!("{} n {} of {} mean {m:+.1} sd {s:.1}", KEYS[k], self.errors[k].len(), self.wanted[k])
            })
            .collect::<Vec<_>>()
            .join("; ")
    }
}

/// Median (the mean of the two middle values for an even count); `None` when empty.
#[must_use]
pub fn median(mut v: Vec<f64>) -> Option<f64> {
    if v.is_empty() {
        return None;
    }
    v.sort_by(f64::total_cmp);
    let m = v.len();
    Some(if m % 2 == 1 { v[m / 2] } else { (v[m / 2 - 1] + v[m / 2]) / 2.0 })
}

/// Mean and sample standard deviation.
#[must_use]
pub fn mean_sd(v: &[f64]) -> Option<(f64, f64)> {
    if v.len() < 2 {
        return None;
    }
    let n = v.len() as f64;
    let m = v.iter().sum::<f64>() / n;
    let var = v.iter().map(|x| (x - m) * (x - m)).sum::<f64>() / (n - 1.0);
    Some((m, var.sqrt()))
}

/// Boundary errors of `detected` against `reference` (beats matched by R within 150 ms), in ms.
#[must_use]
pub fn score_boundaries(reference: &[BeatMarks], detected: &[BeatMarks], fs: f64) -> BoundaryErrors {
    let mut det: Vec<&BeatMarks> = detected.iter().collect();
    det.sort_by(|a, b| a.r.total_cmp(&b.r));
    let rs: Vec<f64> = reference.iter().map(|b| b.r).collect();
    let ds: Vec<f64> = det.iter().map(|b| b.r).collect();
    let mut out = BoundaryErrors::default();
    for (i, j) in match_beats(&rs, &ds, MATCH_S * fs) {
        for k in 0..4 {
            if let Some(rv) = reference[i].marks[k] {
                out.wanted[k] += 1;
                if let Some(dv) = det[j].marks[k] {
                    out.errors[k].push((dv - rv) * 1000.0 / fs);
                }
            }
        }
    }
    out
}

/// Reads `sample,…` beat references (`*.beats.csv`) or `r_sample,symbol,p_on,p_end,qrs_on,qrs_end,t_end`
/// boundary references (`*.q1c.csv`, `ludb/N.global.csv`).
///
/// # Errors
/// A message naming the file when it cannot be read or a number cannot be parsed.
pub fn read_reference_csv(path: &Path) -> Result<Vec<BeatMarks>, String> {
    let text = std::fs::read_to_string(path).map_err(|e| format!("{}: {e}", path.display()))?;
    let mut lines = text.lines();
    let header: Vec<&str> = lines.next().unwrap_or_default().split(',').map(str::trim).collect();
    let col = |name: &str| header.iter().position(|h| *h == name);
    let r_col =
        col("r_sample").or_else(|| col("sample")).ok_or_else(|| format!("{}: no sample column", path.display()))?;
    let key_cols: Vec<Option<usize>> = KEYS.iter().map(|k| col(k)).collect();
    let mut out = Vec::new();
    for (ln, line) in lines.enumerate() {
        if line.trim().is_empty() {
            continue;
        }
        let f: Vec<&str> = line.split(',').map(str::trim).collect();
        let num = |c: Option<usize>| -> Result<Option<f64>, String> {
            match c.and_then(|c| f.get(c)).copied() {
                None | Some("") => Ok(None),
                Some(s) => s.parse::<f64>().map(Some).map_err(|e| format!("{} line {}: {e}", path.display(), ln + 2)),
            }
        };
        let r = num(Some(r_col))?.ok_or_else(|| format!("{} line {}: empty sample", path.display(), ln + 2))?;
        let mut marks = [None; 4];
        for (m, c) in marks.iter_mut().zip(&key_cols) {
            *m = num(*c)?;
        }
        out.push(BeatMarks { r, marks });
    }
    Ok(out)
}

/// Groups WFDB wave-boundary annotations (`.q2c`, `.pu`: `(` onsets and `)` ends with `num` 0 = P, 1 = QRS,
/// 2 = T) into beats, with the rule of the shared data README: for each beat label, the nearest QRS onset
/// before it and QRS end after it, the P onset before the QRS onset, the T end after the beat and before the
/// next beat (the first after the beat's T peak). Done per channel; onsets take the earliest channel and ends the latest.
#[must_use]
pub fn group_wave_annotations(anns: &[Annotation], fs: f64) -> Vec<BeatMarks> {
    let is_beat = |a: &Annotation| isoline_core::io::wfdb_annotations::is_beat(&a.label);
    let mut beats: Vec<f64> = anns.iter().filter(|a| is_beat(a)).map(|a| a.sample as f64).collect();
    beats.sort_by(f64::total_cmp);
    beats.dedup_by(|a, b| (*a - *b).abs() < 0.040 * fs);
    let channels: Vec<i32> = {
        let mut c: Vec<i32> = anns.iter().map(|a| a.chan).collect();
        c.sort_unstable();
        c.dedup();
        c
    };
    let find = |chan: i32, label: &str, num: i32, lo: f64, hi: f64, last: bool| -> Option<f64> {
        let it = anns.iter().filter(|a| a.chan == chan && a.label == label && a.num == num).map(|a| a.sample as f64);
        let inside = it.filter(|&s| s >= lo && s <= hi);
        if last {
            inside.fold(None, |m, s| Some(m.map_or(s, |m: f64| m.max(s))))
        } else {
            inside.fold(None, |m, s| Some(m.map_or(s, |m: f64| m.min(s))))
        }
    };
    let mut out = Vec::new();
    for (i, &r) in beats.iter().enumerate() {
        let prev = if i > 0 { beats[i - 1] } else { r - fs };
        let next = beats.get(i + 1).copied().unwrap_or(r + 2.0 * fs);
        let mut marks = [None::<f64>; 4];
        for &c in &channels {
            let q_on = find(c, "(", 1, r - 0.150 * fs, r, true);
            let q_end = find(c, ")", 1, r, r + 0.150 * fs, false);
            let p_on = q_on.and_then(|q| find(c, "(", 0, prev.max(q - 0.400 * fs), q, true));
            // T end: the first T offset after this beat's T peak (`t`), so U waves are not taken for T.
            let t_peak = anns
                .iter()
                .filter(|a| a.chan == c && a.label == "t" && (a.sample as f64) > r && (a.sample as f64) < next)
                .map(|a| a.sample as f64)
                .next();
            let t_end = t_peak.and_then(|t| find(c, ")", 2, t, next, false));
            let both = [(0, p_on, true), (1, q_on, true), (2, q_end, false), (3, t_end, false)];
            for (k, v, earliest) in both {
                if let Some(v) = v {
                    marks[k] = Some(marks[k].map_or(v, |m| if earliest { m.min(v) } else { m.max(v) }));
                }
            }
        }
        out.push(BeatMarks { r, marks });
    }
    out
}

/// The pipeline of `isoline beats`: open, default filters (baseline removal, automatic notch), detect,
/// delineate. Returns the filtered recording and the beats.
///
/// # Errors
/// The reader's message.
pub fn beats_of(path: &Path) -> Result<(isoline_core::Recording, Vec<Beat>), String> {
    let opened = isoline_core::io::open(path, &isoline_core::io::OpenOptions::default()).map_err(|e| e.to_string())?;
    Ok(beats_of_recording(&opened.recording))
}

/// [`beats_of`] on a recording already in memory (for one changed on the way, e.g. with noise added).
#[must_use]
pub fn beats_of_recording(recording: &isoline_core::Recording) -> (isoline_core::Recording, Vec<Beat>) {
    use isoline_core::{delineate, detect, filter};
    let filtered = filter::apply(recording, &filter::FilterSettings::default());
    let mut beats = detect::detect_beats(&filtered.recording);
    delineate::delineate_beats(&filtered.recording, &mut beats);
    (filtered.recording, beats)
}

/// Detection on every record of [`crate::BEAT_RECORDS`] and boundaries against cardiologist 1 on those with a
/// `.q1c.csv`, each recording first changed by `change`: given the stored recording and its reference beats (R
/// samples), it returns the recording to analyse and the factor from stored to changed sample indices (2 at twice
/// the rate), by which the references are scaled. Prints one line per record and a pooled line, headed `tag`.
///
/// # Errors
/// A record or reference that cannot be read.
pub fn score_changed_records(
    tag: &str,
    change: impl Fn(&isoline_core::Recording, &[f64]) -> (isoline_core::Recording, f64),
) -> Result<(Detection, BoundaryErrors), String> {
    let (mut detection, mut bounds) = (Detection::default(), BoundaryErrors::default());
    for (header, beats_csv) in crate::BEAT_RECORDS {
        let opened = isoline_core::io::open(&crate::data(header), &isoline_core::io::OpenOptions::default())
            .map_err(|e| e.to_string())?;
        let stored_refs: Vec<f64> = read_reference_csv(&crate::data(beats_csv))?.iter().map(|b| b.r).collect();
        let (recording, factor) = change(&opened.recording, &stored_refs);
        let fs = recording.sample_rate.hz();
        let refs: Vec<f64> = stored_refs.iter().map(|r| r * factor).collect();
        let (_, beats) = beats_of_recording(&recording);
        let d = score_detection(&refs, &beats.iter().map(|b| b.r as f64).collect::<Vec<_>>(), fs);
        let rec = header.trim_end_matches(".hea");
        let mut line = format!("{tag} {rec}: Se {:.2} % +P {:.2} %", d.se(), d.ppv());
        detection.add(d);
        let q1c = crate::data(&format!("{rec}.q1c.csv"));
        if q1c.exists() {
            let reference: Vec<BeatMarks> = read_reference_csv(&q1c)?
                .into_iter()
                .map(|b| BeatMarks { r: b.r * factor, marks: b.marks.map(|m| m.map(|v| v * factor)) })
                .collect();
            let marks: Vec<BeatMarks> = beats.iter().map(BeatMarks::from).collect();
            let e = score_boundaries(&reference, &marks, fs);
            for (k, key) in KEYS.iter().enumerate() {
                if let Some((m, s)) = e.mean_sd(k) {
                    line.push_str(&format!("  {key} {m:+.1}±{s:.1}"));
                }
            }
            bounds.add(&e);
        }
        println!("{line}");
    }
    println!(
        "{tag} pooled: Se {:.3} % +P {:.3} %; boundaries vs cardiologist 1: {}",
        detection.se(),
        detection.ppv(),
        bounds.summary()
    );
    Ok((detection, bounds))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn matching_follows_the_python_scorer() {
        // Reference 100, 300, 500; detections 110 (match), 290 (match), 700 (extra), window 40.
        let pairs = match_beats(&[100.0, 300.0, 500.0], &[110.0, 290.0, 700.0], 40.0);
        assert_eq!(pairs, vec![(0, 0), (1, 1)]);
        let d = score_detection(&[100.0, 300.0, 500.0], &[10.0, 110.0, 290.0, 520.0, 900.0], 250.0);
        // The span is 100 − 37.5 … 500 + 37.5: 10 and 900 lie outside and are not counted.
        assert_eq!(d, Detection { tp: 3, fn_: 0, fp: 0 });
    }

    #[test]
    fn boundary_errors_in_ms() {
        let r = [BeatMarks { r: 100.0, marks: [Some(50.0), Some(90.0), None, Some(200.0)] }];
        let d = [BeatMarks { r: 102.0, marks: [Some(52.0), None, Some(110.0), Some(190.0)] }];
        let e = score_boundaries(&r, &d, 250.0);
        assert_eq!(e.wanted, [1, 1, 0, 1]);
        assert_eq!(e.errors[0], vec![8.0]);
        assert!(e.errors[1].is_empty());
        assert_eq!(e.errors[3], vec![-40.0]);
    }
}
