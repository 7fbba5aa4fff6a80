//! Exports are de-identified unless the user asks otherwise (`Meta::deidentified`), and every page carries the
//! caution. Also the renderer's guards against unusable requests.

use crate::render_common::{Res, render_png};
use isoline_core::paper::{Layout, PageSpec, Paper};
use isoline_core::recording::{Lead, Meta, Recording, StandardLead};
use isoline_core::render::{RenderError, RenderInput, header_lines, render_page};
use isoline_core::units::Hertz;

/// A made-up demo patient (invented for this test; no real person).
fn demo_recording() -> Res<Recording> {
    let fs = 500.0;
    let samples: Vec<f32> =
        (0..5000).map(|i| (800.0 * (i as f64 / fs * 2.0 * std::f64::consts::PI).sin()) as f32).collect();
    Ok(Recording {
        leads: vec![Lead { name: StandardLead::II.into(), samples }],
        sample_rate: Hertz::from_hz(fs)?,
        start: Some(time::macros::datetime!(2024-05-17 08:42:10)),
        meta: Meta {
            patient_id: Some("WARD7-0042".into()),
            patient_name: Some("Quill Marrowby".into()),
            sex: Some("F".into()),
            birth_date: Some("1950-03-04".into()),
            age_years: Some(74.0),
            recording_info: Some("Bed 3, Ward 7 (demo)".into()),
            device: None,
            uncalibrated_leads: Vec::new(),
        },
        annotations: vec![],
    })
}

fn spec() -> PageSpec {
    PageSpec { layout: Layout::Strip(StandardLead::II.into()), ..PageSpec::default() }
}

#[test]
fn patient_fields_only_when_identify() -> Res {
    let rec = demo_recording()?;
    let hidden = header_lines(&RenderInput::new(&rec, spec(), 150.0)).join("\n");
    for secret in ["Quill", "Marrowby", "WARD7-0042", "1950-03-04", "Bed 3", "2024-05-17"] {
        assert!(!hidden.contains(secret), "de-identified header shows {secret:?}:\n{hidden}");
    }
    // Sex and age stay: they decide usual ranges and do not identify on their own (Meta::deidentified).
    assert!(hidden.contains("Sex: F") && hidden.contains("Age: 74"), "{hidden}");
    let shown = header_lines(&RenderInput { identify: true, ..RenderInput::new(&rec, spec(), 150.0) }).join("\n");
    for secret in ["Quill Marrowby", "WARD7-0042", "1950-03-04", "2024-05-17 08:42:10"] {
        assert!(shown.contains(secret), "identified header lacks {secret:?}:\n{shown}");
    }
    // The drawn header differs accordingly (the name is text only present when identify is set).
    let (_, a) = render_png(&RenderInput::new(&rec, spec(), 150.0))?;
    let (_, b) = render_png(&RenderInput { identify: true, ..RenderInput::new(&rec, spec(), 150.0) })?;
    assert_eq!((a.width, a.height), (b.width, b.height));
    assert_ne!(a.rgb, b.rgb);
    Ok(())
}

#[test]
fn caution_is_drawn_on_every_page() -> Res {
    // The footer band below the traces holds dark text; compare with a page whose footer is cut off.
    let rec = demo_recording()?;
    let input = RenderInput::new(&rec, spec(), 150.0);
    let (_, img) = render_png(&input)?;
    let page = input.spec.page(&rec);
    let grid_bottom = page.rows.last().map_or(0.0, |r| r.top_mm + r.height_mm) * 150.0 / 25.4;
    let bg = {
        let p = isoline_core::paper::Scheme::Rose.palette().background;
        [p[0], p[1], p[2]]
    };
    let ink_rows =
        ((grid_bottom.ceil() as usize + 2)..img.height).filter(|&y| (0..img.width).any(|x| img.px(x, y) != bg)).count();
    // 8 pt bold text has capitals about 2 mm (12 px at 150 dpi) tall.
    assert!(ink_rows >= 10, "footer has {ink_rows} rows with ink");
    Ok(())
}

#[test]
fn absurd_requests_are_refused() -> Res {
    let rec = demo_recording()?;
    assert!(matches!(render_page(&RenderInput::new(&rec, spec(), 1201.0)), Err(RenderError::Dpi(_))));
    assert!(matches!(render_page(&RenderInput::new(&rec, spec(), 0.0)), Err(RenderError::Dpi(_))));
    assert!(matches!(render_page(&RenderInput::new(&rec, spec(), f64::NAN)), Err(RenderError::Dpi(_))));
    // A day of paper at 1200 dpi: 2.16 km wide.
    let long = PageSpec { seconds: 86_400.0, ..spec() };
    assert!(matches!(render_page(&RenderInput::new(&rec, long, 1200.0)), Err(RenderError::TooLarge { .. })));
    let bad = PageSpec { seconds: -1.0, ..spec() };
    assert!(matches!(render_page(&RenderInput::new(&rec, bad, 100.0)), Err(RenderError::Spec(_))));
    // Paper too short for the lead labels of a row of cells (before, they were drawn over each other): a 12-lead
    // 3x4 page of 10 s at 0.5 mm/s, and of 0.2 s at 25 mm/s. At 5 mm/s (12.5 mm a cell) it is drawn, and a strip
    // (one cell a row, no neighbour's label) at any speed.
    let leads = StandardLead::ALL.iter().map(|&l| Lead { name: l.into(), samples: rec.leads[0].samples.clone() });
    let twelve = Recording { leads: leads.collect(), ..rec.clone() };
    for (seconds, speed) in [(10.0, 0.5), (0.2, 25.0)] {
        let paper = Paper { speed_mm_per_s: speed, ..spec().paper };
        let short = PageSpec { seconds, paper, layout: Layout::default(), ..spec() };
        let got = render_page(&RenderInput::new(&twelve, short, 100.0));
        assert!(matches!(&got, Err(RenderError::Spec(m)) if m.contains("label")), "{seconds} s at {speed}: {got:?}");
        let strip = PageSpec { seconds, paper, ..spec() };
        assert!(render_page(&RenderInput::new(&twelve, strip, 100.0)).is_ok(), "strip, {seconds} s at {speed}");
    }
    let slow = PageSpec { paper: Paper { speed_mm_per_s: 5.0, ..spec().paper }, layout: Layout::default(), ..spec() };
    assert!(render_page(&RenderInput::new(&twelve, slow, 100.0)).is_ok());
    let empty = Recording { leads: vec![], ..rec.clone() };
    assert!(matches!(render_page(&RenderInput::new(&empty, spec(), 100.0)), Err(RenderError::NoLeads)));
    Ok(())
}

#[test]
fn nan_gap_is_left_blank() -> Res {
    // A 1-s run of missing samples in a strip: no trace ink in that stretch of the row.
    let mut rec = demo_recording()?;
    for v in &mut rec.leads[0].samples[2000..2500] {
        *v = f32::NAN;
    }
    let dpi = 150.0;
    let input = RenderInput::new(&rec, spec(), dpi);
    let (_, img) = render_png(&input)?;
    let page = input.spec.page(&rec);
    let (row, cell) = (&page.rows[0], &page.rows[0].cells[0]);
    let px = |mm: f64| (mm * dpi / 25.4).round() as usize;
    let dark = |p: [u8; 3]| p.iter().all(|&v| v < 110);
    let ink_in = |t0: f64, t1: f64| {
        (px(cell.x_from_time(&page.paper, t0))..px(cell.x_from_time(&page.paper, t1)))
            .filter(|&x| (px(row.top_mm)..px(row.top_mm + row.height_mm)).any(|y| dark(img.px(x, y))))
            .count()
    };
    // Samples 2000..2500 at 500 Hz = 4.0..5.0 s; keep 0.05 s clear of the ends for the stroke's round caps.
    assert_eq!(ink_in(4.05, 4.95), 0);
    assert!(ink_in(2.0, 3.0) > 0);
    Ok(())
}

#[test]
fn the_page_title_names_the_file_only_when_identify() {
    // File names often carry the patient's name: a de-identified page is titled by the signal hash's first 8
    // digits, which match the recording's review file.
    let sha = "3fa2c1d9".to_string() + &"0".repeat(56);
    let title =
        |identify| isoline_core::render::page_title("Smith_John_2026.edf", identify, || Ok::<_, ()>(sha.clone()));
    assert_eq!(title(false), Ok("Recording 3fa2c1d9".to_string()));
    assert_eq!(title(true), Ok("Smith_John_2026.edf".to_string()));
}
