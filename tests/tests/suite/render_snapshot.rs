//! Snapshot tests: whole pages compared with golden PNGs in `tests/snapshots/`, allowing a small per-pixel
//! tolerance (anti-aliasing may differ slightly between builds). After an intended change, regenerate with
//! `ISOLINE_BLESS=1 cargo test -p isoline-tests --release -- render_snapshot` and look at the new files.

use std::path::PathBuf;

use crate::render_common::{Res, decode, ptb, render_png};
use isoline_core::MarkKind;
use isoline_core::caliper::{Caliper, CaliperKind};
use isoline_core::paper::{Layout, LeadOrder, PageSpec, Paper, Scheme};
use isoline_core::recording::StandardLead;
use isoline_core::render::{LedgerLine, RenderInput};

/// A channel may differ by this much before a pixel counts as changed.
const CHANNEL_TOLERANCE: u8 = 24;
/// Share of pixels allowed to change.
const CHANGED_SHARE: f64 = 0.002;

fn snapshot(name: &str, input: &RenderInput) -> Res {
    let (_, img) = render_png(input)?;
    let path = PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("snapshots").join(name);
    if std::env::var_os("ISOLINE_BLESS").is_some() {
        // Golden files are stored with stronger compression than exports use; the pixels are the same.
        let mut out = Vec::new();
        let mut enc = png::Encoder::new(&mut out, img.width as u32, img.height as u32);
        enc.set_color(png::ColorType::Rgb);
        enc.set_compression(png::Compression::High);
        let mut w = enc.write_header()?;
        w.write_image_data(&img.rgb)?;
        w.finish()?;
        std::fs::write(&path, &out)?;
        return Ok(());
    }
    let golden =
        decode(&std::fs::read(&path).map_err(|e| format!("{}: {e} (bless with ISOLINE_BLESS=1)", path.display()))?)?;
    assert_eq!((img.width, img.height), (golden.width, golden.height), "{name}: size changed");
    let changed = img
        .rgb
        .chunks(3)
        .zip(golden.rgb.chunks(3))
        .filter(|(a, b)| a.iter().zip(b.iter()).any(|(x, y)| x.abs_diff(*y) > CHANNEL_TOLERANCE))
        .count();
    let share = changed as f64 / (img.width * img.height) as f64;
    assert!(share <= CHANGED_SHARE, "{name}: {changed} pixels ({:.3} %) differ from the golden page", share * 100.0);
    Ok(())
}

#[test]
fn twelve_lead_page_rose() -> Res {
    let rec = ptb()?;
    let input = RenderInput { title: "s0010_re.hea".into(), ..RenderInput::new(&rec, PageSpec::default(), 100.0) };
    snapshot("ptb-s0010-3x4+1-rose.png", &input)
}

#[test]
fn annotated_page_graphite_cabrera() -> Res {
    let rec = ptb()?;
    let spec = PageSpec { layout: Layout::SixByTwo, order: LeadOrder::Cabrera, ..PageSpec::default() };
    let time = |id, t1_s, t2_s, march| Caliper {
        id,
        kind: CaliperKind::Time { t1_s, t2_s },
        lead: None,
        locked: false,
        march,
    };
    let calipers = vec![
        time(1, 0.62, 1.56, true),
        Caliper {
            id: 2,
            kind: CaliperKind::Voltage { t_s: 6.3, uv1: 0.0, uv2: 1200.0 },
            lead: Some("V2".into()),
            locked: false,
            march: false,
        },
        Caliper { id: 3, kind: CaliperKind::Plumb { t_s: 3.1 }, lead: None, locked: false, march: false },
    ];
    let marks = vec![
        (MarkKind::POnset, 5.93),
        (MarkKind::PEnd, 6.03),
        (MarkKind::QrsOnset, 6.08),
        (MarkKind::JPoint, 6.19),
        (MarkKind::TEnd, 6.46),
    ];
    let line = |label: &str, auto: Option<&str>, reviewed: Option<&str>, unit: &str| LedgerLine {
        label: label.into(),
        auto: auto.map(str::to_string),
        reviewed: reviewed.map(str::to_string),
        unit: unit.into(),
    };
    let ledger = vec![
        line("Heart rate", Some("64"), None, "bpm"),
        line("PR", Some("152"), Some("160"), "ms"),
        line("QRS", Some("104"), None, "ms"),
        line("QT", Some("398"), Some("404"), "ms"),
        line("QTc Bazett", Some("411"), Some("417"), "ms"),
        line("QRS axis", None, None, "\u{b0}"),
    ];
    let input = RenderInput {
        scheme: Scheme::Graphite,
        title: "s0010_re.hea".into(),
        header: vec![("Reader".into(), "T. Example (demo)".into()), ("Stage".into(), "draft".into())],
        filter_text: Some("demo filter text: 0.5\u{2013}40 Hz".into()),
        calipers,
        marks,
        ledger,
        ..RenderInput::new(&rec, spec, 100.0)
    };
    snapshot("ptb-s0010-6x2-cabrera-graphite-annotated.png", &input)
}

#[test]
fn fast_strip_mono() -> Res {
    let rec = ptb()?;
    let spec = PageSpec {
        layout: Layout::Strip(StandardLead::V5.into()),
        paper: Paper { speed_mm_per_s: 50.0, gain_mm_per_mv: 20.0 },
        start_s: 2.0,
        seconds: 4.0,
        ..PageSpec::default()
    };
    let input =
        RenderInput { scheme: Scheme::Mono, title: "s0010_re.hea".into(), ..RenderInput::new(&rec, spec, 100.0) };
    snapshot("ptb-s0010-strip-v5-50mm-mono.png", &input)
}
