//! Every field of a review survives save → load (property test over random reviews).

#![allow(clippy::unwrap_used)] // a test fails by panicking

use isoline_core::MarkKind;
use isoline_core::caliper::{Caliper, CaliperKind};
use isoline_core::review::{
    Change, FORMAT_VERSION, Mark, MarkOn, Measurement, Origin, RecordingIdentity, Review, Stage, Timestamp, load,
};
use proptest::prelude::*;

fn text() -> impl Strategy<Value = String> {
    prop_oneof!["[ -~]{0,16}", "\\PC{0,12}", Just("line one\nline \"two\"\t\\ end".to_owned())]
}

/// A reader's name: any printable text that is not blank (a name holds no control character and something to
/// read; saving and loading refuse others).
fn name() -> impl Strategy<Value = String> {
    prop_oneof!["[ -~]{0,15}[!-~]", "\\PC{0,11}[A-Za-zÀ-ÿ]"]
}

fn number() -> impl Strategy<Value = f64> {
    prop_oneof![-1.0e4..1.0e4f64, prop::num::f64::NORMAL, Just(0.0)]
}

fn stamp() -> impl Strategy<Value = Timestamp> {
    (0i64..4_102_444_800, 0u32..1_000_000_000).prop_map(|(s, n)| Timestamp::from_unix(s, n).unwrap())
}

fn origin() -> impl Strategy<Value = Origin> {
    prop_oneof![Just(Origin::Auto), Just(Origin::Moved), Just(Origin::Placed)]
}

fn identity() -> impl Strategy<Value = RecordingIdentity> {
    (text(), text(), "[0-9a-f]{64}", prop::collection::vec(text(), 0..13), 1.0..10_000.0f64).prop_map(
        |(file_name, relative_path, sha256, leads, sample_rate_hz)| RecordingIdentity {
            file_name,
            relative_path,
            sha256,
            leads,
            sample_rate_hz,
        },
    )
}

fn caliper() -> impl Strategy<Value = Caliper> {
    let kind = prop_oneof![
        (number(), number()).prop_map(|(t1_s, t2_s)| CaliperKind::Time { t1_s, t2_s }),
        (number(), number(), number()).prop_map(|(t_s, uv1, uv2)| CaliperKind::Voltage { t_s, uv1, uv2 }),
        number().prop_map(|t_s| CaliperKind::Plumb { t_s }),
    ];
    (any::<u32>(), kind, prop::option::of(text()), any::<bool>(), any::<bool>())
        .prop_map(|(id, kind, lead, locked, march)| Caliper { id, kind, lead, locked, march })
}

fn mark() -> impl Strategy<Value = Mark> {
    let kind = prop::sample::select(vec![
        MarkKind::POnset,
        MarkKind::PEnd,
        MarkKind::QrsOnset,
        MarkKind::JPoint,
        MarkKind::TEnd,
        MarkKind::RPeak,
    ]);
    let on = prop_oneof![any::<usize>().prop_map(MarkOn::Beat), Just(MarkOn::Representative)];
    (kind, on, any::<usize>(), number(), origin(), prop::option::of(any::<usize>())).prop_map(
        |(kind, on, sample, time_s, origin, auto_sample)| Mark { kind, on, sample, time_s, origin, auto_sample },
    )
}

fn measurement() -> impl Strategy<Value = Measurement> {
    (text(), text(), prop::option::of(number()), prop::option::of(number()), origin(), text()).prop_map(
        |(key, label, auto_value, reviewed_value, origin, unit)| Measurement {
            key,
            label,
            auto_value,
            reviewed_value,
            origin,
            unit,
        },
    )
}

fn change() -> impl Strategy<Value = Change> {
    (stamp(), name(), text(), prop::option::of(text()), prop::option::of(text()), prop::option::of(text()))
        .prop_map(|(at, by, what, old, new, why)| Change { at, by, what, old, new, why })
}

prop_compose! {
    fn review()(
        recording in identity(),
        reader in name(),
        stage in prop_oneof![Just(Stage::Draft), Just(Stage::Checked), Just(Stage::Final)],
        created in stamp(),
        modified in stamp(),
        calipers in prop::collection::vec(caliper(), 0..4),
        marks in prop::collection::vec(mark(), 0..6),
        measurements in prop::collection::vec(measurement(), 0..6),
        summary in text(),
        history in prop::collection::vec(change(), 0..5),
    ) -> Review {
        // One entry per measurement key, mark kind and beat, and caliper id, as a review holds them (the loader
        // refuses a second).
        let (mut calipers, mut marks, mut measurements) = (calipers, marks, measurements);
        let mut seen = std::collections::HashSet::new();
        measurements.retain(|m: &Measurement| seen.insert(format!("m {}", m.key)));
        marks.retain(|m: &Mark| seen.insert(format!("k {:?} {:?}", m.kind, m.on)));
        calipers.retain(|c: &Caliper| seen.insert(format!("c {}", c.id)));
        Review {
            format_version: FORMAT_VERSION, recording, reader, stage, created, modified,
            calipers, marks, measurements, summary, history,
        }
    }
}

proptest! {
    #![proptest_config(ProptestConfig { failure_persistence: None, ..ProptestConfig::with_cases(200) })]

    #[test]
    fn every_field_survives_save_and_load(r in review()) {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("ward7-bed2.review.ron");
        r.save(&path).unwrap();
        let back = load(&path).unwrap();
        prop_assert_eq!(&back, &r);
        // Saving what was loaded writes the same text again.
        prop_assert_eq!(back.to_ron().unwrap(), std::fs::read_to_string(&path).unwrap());
    }
}

#[test]
fn file_uses_the_vocabulary() {
    let text = crate::review_support::sample_review("AB").to_ron().unwrap();
    for needle in [
        "format_version: 2",
        "reader: \"AB\"",
        "stage: draft",
        "origin: moved",
        "origin: placed",
        "on: representative",
        "summary: ",
        "history: [",
    ] {
        assert!(text.contains(needle), "missing {needle:?} in\n{text}");
    }
    println!("{text}");
}

#[test]
fn a_readers_reason_is_kept_with_the_change_it_explains() {
    // Who changed which value and why: the reason goes with the measurement's own history entry (not with the
    // QTc entries the new QT recomputes after it), is saved and read back, and shows in the history's text.
    let mut r = crate::review_support::sample_review("AB");
    let before = r.history.len();
    r.set_measurement_why("qt_ms", 412.0, "CD", Some(" T wave end hidden by\nthe next P wave ")).unwrap();
    let entry = &r.history[before];
    assert!(entry.what.starts_with("measurement qt_ms"), "{entry:?}");
    assert_eq!(entry.why.as_deref(), Some("T wave end hidden by the next P wave"));
    assert!(r.history[before + 1..].iter().all(|c| c.why.is_none()), "{:?}", &r.history[before..]);
    assert!(entry.to_string().ends_with("(why: T wave end hidden by the next P wave)"), "{entry}");
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("ward7-bed2.review.ron");
    r.save(&path).unwrap();
    assert_eq!(load(&path).unwrap().history[before].why, entry.why);
    // No reason given (or a blank one): none written, and files without the field read as before.
    r.set_measurement_why("qrs_ms", 96.0, "CD", Some("   ")).unwrap();
    assert!(r.history.last().is_some_and(|c| c.why.is_none()));
    assert!(!crate::review_support::sample_review("AB").to_ron().unwrap().contains("why:"));
}
