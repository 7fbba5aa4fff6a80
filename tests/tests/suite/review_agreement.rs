//! Agreement between readers: differences and Bland–Altman bias and 95 % limits on a small worked example
//! computed by hand.
//!
//! Source: Bland JM, Altman DG. Lancet 1986;1(8476):307-10 — bias = mean difference, 95 % limits of agreement
//! = bias ± 1.96·SD of the differences. From memory (references.md §11).

#![allow(clippy::unwrap_used)] // a test fails by panicking

use crate::review_support::identity;
use isoline_core::review::agreement::{agreement, bland_altman};
use isoline_core::review::{Measurement, Review};

fn review(reader: &str, sha_digit: char, qt_auto: f64, qt_reviewed: Option<f64>, qrs: Option<f64>) -> Review {
    let mut r = Review::new(identity(&sha_digit.to_string().repeat(64)), reader);
    r.put_automatic(Measurement::automatic("qt_ms", "QT", Some(qt_auto), "ms")).unwrap();
    r.put_automatic(Measurement::automatic("qrs_ms", "QRS duration", qrs, "ms")).unwrap();
    if let Some(v) = qt_reviewed {
        r.set_measurement("qt_ms", v, reader).unwrap();
    }
    r
}

#[test]
fn bland_altman_by_hand() {
    // Differences 10, −5, 10, 10 ms.
    // bias = 25 / 4 = 6.25; deviations 3.75, −11.25, 3.75, 3.75; squares sum to 168.75;
    // SD = √(168.75 / 3) = √56.25 = 7.5; limits 6.25 ± 1.96 × 7.5 = 6.25 ± 14.7 → −8.45 and 20.95.
    let ba = bland_altman(&[10.0, -5.0, 10.0, 10.0]).unwrap();
    assert_eq!(ba.n, 4);
    assert!((ba.bias - 6.25).abs() < 1e-12);
    assert!((ba.sd - 7.5).abs() < 1e-12);
    assert!((ba.lower - -8.45).abs() < 1e-12);
    assert!((ba.upper - 20.95).abs() < 1e-12);
    assert!(bland_altman(&[3.0]).is_none(), "one pair has no SD");
    assert!(bland_altman(&[]).is_none());
}

#[test]
fn two_readers_over_four_recordings() {
    // Reader AB's QT on recordings 1–4: 400, 380, 420, 410 ms (all automatic values left standing).
    // Reader CD's: 390, 385, 410, 400 ms, where 385 is CD's reviewed value over an automatic 380.
    // AB − CD = 10, −5, 10, 10 → the worked example above.
    let reviews = vec![
        review("AB", '1', 400.0, None, Some(90.0)),
        review("AB", '2', 380.0, None, Some(100.0)),
        review("AB", '3', 420.0, None, None),
        review("AB", '4', 410.0, None, Some(96.0)),
        review("CD", '1', 390.0, None, Some(94.0)),
        review("CD", '2', 380.0, Some(385.0), Some(100.0)),
        review("CD", '3', 410.0, None, Some(88.0)),
        review("CD", '4', 400.0, None, None),
    ];
    let a = agreement(&reviews).unwrap();
    assert_eq!(a.readers, ["AB", "CD"]);
    assert_eq!(a.recordings.len(), 4);
    let qt = a.keys.iter().find(|k| k.key == "qt_ms").unwrap();
    assert_eq!(qt.unit, "ms");
    assert_eq!(qt.recordings[1].values, [Some(380.0), Some(385.0)]);
    assert_eq!(qt.pairs.len(), 1);
    let pair = &qt.pairs[0];
    assert_eq!((pair.reader_a.as_str(), pair.reader_b.as_str()), ("AB", "CD"));
    let diffs: Vec<f64> = pair.differences.iter().map(|d| d.difference).collect();
    assert_eq!(diffs, [10.0, -5.0, 10.0, 10.0]);
    let ba = pair.bland_altman.unwrap();
    assert!((ba.bias - 6.25).abs() < 1e-12 && (ba.lower - -8.45).abs() < 1e-12 && (ba.upper - 20.95).abs() < 1e-12);

    // QRS: only recordings 1 and 2 have both values: differences −4 and 0.
    // bias −2; SD = √((4 + 4) / 1) = 2√2 ≈ 2.828; limits −2 ± 5.544.
    let qrs = a.keys.iter().find(|k| k.key == "qrs_ms").unwrap();
    let ba = qrs.pairs[0].bland_altman.unwrap();
    assert_eq!(ba.n, 2);
    assert!((ba.bias - -2.0).abs() < 1e-12);
    assert!((ba.sd - 8f64.sqrt()).abs() < 1e-12);
    assert!((ba.upper - (-2.0 + 1.96 * 8f64.sqrt())).abs() < 1e-12);
}

#[test]
fn same_reader_twice_on_one_recording_is_refused() {
    let reviews = vec![review("AB", '1', 400.0, None, None), review("AB", '1', 401.0, None, None)];
    let e = agreement(&reviews).unwrap_err();
    assert_eq!((e.first, e.second, e.reader.as_str()), (0, 1, "AB"));
}

#[test]
fn three_readers_give_three_pairs() {
    let reviews = vec![
        review("C", '1', 400.0, None, None),
        review("A", '1', 410.0, None, None),
        review("B", '1', 405.0, None, None),
    ];
    let a = agreement(&reviews).unwrap();
    let qt = &a.keys[0];
    let pairs: Vec<(String, String, f64)> =
        qt.pairs.iter().map(|p| (p.reader_a.clone(), p.reader_b.clone(), p.differences[0].difference)).collect();
    assert_eq!(pairs, [("A".into(), "B".into(), 5.0), ("A".into(), "C".into(), 10.0), ("B".into(), "C".into(), 5.0)]);
    assert!(qt.pairs.iter().all(|p| p.bland_altman.is_none()), "one recording: no limits");
}

#[test]
fn the_recordings_compared_are_those_two_readers_both_gave_a_value_on() {
    // Two readers, four recordings; they share recordings 2 and 3 only.
    let reviews = [
        review("AB", '1', 400.0, None, None),
        review("AB", '2', 380.0, None, None),
        review("CD", '2', 390.0, None, None),
    ];
    let mut more = reviews.to_vec();
    more.extend([
        review("AB", '3', 410.0, None, None),
        review("CD", '3', 400.0, None, None),
        review("CD", '4', 420.0, None, None),
    ]);
    assert_eq!(agreement(&more).unwrap().compared_recordings(), 2);
    // No recording in common: none compared.
    let apart = [review("AB", '1', 400.0, None, None), review("CD", '4', 420.0, None, None)];
    assert_eq!(agreement(&apart).unwrap().compared_recordings(), 0);
}
