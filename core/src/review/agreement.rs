//! Agreement between readers: for each measurement key, every reader's value on every recording, the
//! differences between each pair of readers, and over several recordings the Bland–Altman bias and 95 %
//! limits of agreement.
//!
//! Source: Bland JM, Altman DG. Statistical methods for assessing agreement between two methods of clinical
//! measurement. Lancet 1986;1(8476):307-10 — bias = mean of the differences, limits = bias ± 1.96·SD of the
//! differences (SD with n − 1). From memory (references.md §11).

use serde::Serialize;

use super::model::Review;

/// Bland–Altman summary of paired differences.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct BlandAltman {
    /// Number of pairs.
    pub n: usize,
    /// Mean difference (A − B), in the measurement's unit.
    pub bias: f64,
    /// Sample standard deviation of the differences (n − 1 in the denominator).
    pub sd: f64,
    /// Lower 95 % limit of agreement: bias − 1.96·SD.
    pub lower: f64,
    /// Upper 95 % limit of agreement: bias + 1.96·SD.
    pub upper: f64,
}

/// Bias and 95 % limits of agreement of differences; `None` for fewer than two (no SD).
///
/// Source: Bland & Altman, Lancet 1986;1(8476):307-10. From memory.
#[must_use]
pub fn bland_altman(differences: &[f64]) -> Option<BlandAltman> {
    let n = differences.len();
    if n < 2 {
        return None;
    }
    let bias = differences.iter().sum::<f64>() / n as f64;
    let ss: f64 = differences.iter().map(|d| (d - bias).powi(2)).sum();
    let sd = (ss / (n - 1) as f64).sqrt();
    Some(BlandAltman { n, bias, sd, lower: bias - 1.96 * sd, upper: bias + 1.96 * sd })
}

/// One recording the reviews cover.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct RecordingRef {
    /// SHA-256 of its signal content: the grouping key.
    pub sha256: String,
    /// File name as stored in the first review of it.
    pub file_name: String,
}

/// Each reader's value of one measurement on one recording.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct RecordingValues {
    /// Index into [`Agreement::recordings`].
    pub recording: usize,
    /// One entry per reader of [`Agreement::readers`], in that order: the value in force (reviewed, else
    /// automatic), `None` when that reader has no review of the recording or no value.
    pub values: Vec<Option<f64>>,
}

/// One pair's difference on one recording.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct PairDifference {
    /// Index into [`Agreement::recordings`].
    pub recording: usize,
    /// Reader A's value.
    pub a: f64,
    /// Reader B's value.
    pub b: f64,
    /// A − B.
    pub difference: f64,
}

/// Two readers compared on one measurement.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct PairAgreement {
    /// Reader A (first in name order).
    pub reader_a: String,
    /// Reader B.
    pub reader_b: String,
    /// Differences on every recording where both gave a value.
    pub differences: Vec<PairDifference>,
    /// Bland–Altman over those recordings (needs two or more).
    pub bland_altman: Option<BlandAltman>,
}

/// Agreement on one measurement key.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct KeyAgreement {
    /// Measurement key.
    pub key: String,
    /// Label (from the first review that has one).
    pub label: String,
    /// Unit.
    pub unit: String,
    /// Values per recording.
    pub recordings: Vec<RecordingValues>,
    /// Every pair of readers.
    pub pairs: Vec<PairAgreement>,
}

/// The whole comparison.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Agreement {
    /// Readers, in name order.
    pub readers: Vec<String>,
    /// Recordings, in order of first appearance.
    pub recordings: Vec<RecordingRef>,
    /// Measurement keys, in order of first appearance.
    pub keys: Vec<KeyAgreement>,
}

impl Agreement {
    /// How many recordings two readers both gave a value on, for any measurement: none when the reviews are of
    /// different recordings (reviews are matched by the recording's signal hash, not its file name).
    #[must_use]
    pub fn compared_recordings(&self) -> usize {
        let mut seen: Vec<usize> =
            self.keys.iter().flat_map(|k| &k.pairs).flat_map(|p| &p.differences).map(|d| d.recording).collect();
        seen.sort_unstable();
        seen.dedup();
        seen.len()
    }
}

/// Two reviews by the same reader of the same recording: the comparison would be ambiguous.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
#[error("reviews {first} and {second} are both by reader {reader:?} of the same recording")]
pub struct DuplicateReview {
    /// Index of the first review in the input.
    pub first: usize,
    /// Index of the second.
    pub second: usize,
    /// The reader.
    pub reader: String,
}

/// Compares reviews, grouped by recording SHA-256 and reader.
///
/// # Errors
/// [`DuplicateReview`] when a reader has two reviews of one recording.
pub fn agreement(reviews: &[Review]) -> Result<Agreement, DuplicateReview> {
    let mut readers: Vec<String> = reviews.iter().map(|r| r.reader.clone()).collect();
    readers.sort();
    readers.dedup();
    let mut recordings: Vec<RecordingRef> = Vec::new();
    // cell[recording][reader] = index of the review
    let mut cell: Vec<Vec<Option<usize>>> = Vec::new();
    for (i, r) in reviews.iter().enumerate() {
        let rec = match recordings.iter().position(|x| r.recording.is_signal(&x.sha256)) {
            Some(k) => k,
            None => {
                recordings.push(RecordingRef {
                    sha256: r.recording.sha256.to_ascii_lowercase(),
                    file_name: r.recording.file_name.clone(),
                });
                cell.push(vec![None; readers.len()]);
                recordings.len() - 1
            }
        };
        let who = readers.iter().position(|x| *x == r.reader).unwrap_or(0);
        if let Some(first) = cell[rec][who] {
            return Err(DuplicateReview { first, second: i, reader: r.reader.clone() });
        }
        cell[rec][who] = Some(i);
    }

    let mut keys: Vec<KeyAgreement> = Vec::new();
    for r in reviews {
        for m in &r.measurements {
            match keys.iter_mut().find(|k| k.key == m.key) {
                Some(k) => {
                    if k.label.is_empty() {
                        k.label.clone_from(&m.label);
                    }
                    if k.unit.is_empty() {
                        k.unit.clone_from(&m.unit);
                    }
                }
                None => keys.push(KeyAgreement {
                    key: m.key.clone(),
                    label: m.label.clone(),
                    unit: m.unit.clone(),
                    recordings: Vec::new(),
                    pairs: Vec::new(),
                }),
            }
        }
    }

    for k in &mut keys {
        let value = |review: Option<usize>| -> Option<f64> {
            review.and_then(|i| reviews[i].measurement(&k.key)).and_then(|m| m.value())
        };
        k.recordings = cell
            .iter()
            .enumerate()
            .map(|(rec, row)| RecordingValues { recording: rec, values: row.iter().map(|&c| value(c)).collect() })
            .collect();
        for a in 0..readers.len() {
            for b in a + 1..readers.len() {
                let differences: Vec<PairDifference> = k
                    .recordings
                    .iter()
                    .filter_map(|rv| match (rv.values[a], rv.values[b]) {
                        (Some(va), Some(vb)) => {
                            Some(PairDifference { recording: rv.recording, a: va, b: vb, difference: va - vb })
                        }
                        _ => None,
                    })
                    .collect();
                if differences.is_empty() {
                    continue;
                }
                let diffs: Vec<f64> = differences.iter().map(|d| d.difference).collect();
                k.pairs.push(PairAgreement {
                    reader_a: readers[a].clone(),
                    reader_b: readers[b].clone(),
                    bland_altman: bland_altman(&diffs),
                    differences,
                });
            }
        }
    }
    Ok(Agreement { readers, recordings, keys })
}
