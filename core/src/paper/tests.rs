use crate::recording::{LeadName, Recording, StandardLead};

use super::*;
use crate::recording::{Lead, Meta};
use crate::units::Hertz;

fn twelve_lead() -> Recording {
    Recording {
        leads: StandardLead::ALL.iter().map(|&l| Lead { name: l.into(), samples: vec![0.0; 5000] }).collect(),
        sample_rate: Hertz::from_hz(500.0).unwrap_or_else(|_| unreachable!()),
        start: None,
        meta: Meta::default(),
        annotations: vec![],
    }
}

#[test]
fn grid_squares_at_standard_speed_and_gain() {
    // Source: Kligfield et al. 2007 (references.md §1): at 25 mm/s 5 mm = 200 ms, 1 mm = 40 ms;
    // at 10 mm/mV 1 mm = 0.1 mV.
    let p = Paper::STANDARD;
    assert!((p.seconds_from_mm(MAJOR_MM) - 0.200).abs() < 1e-12);
    assert!((p.seconds_from_mm(MINOR_MM) - 0.040).abs() < 1e-12);
    assert!((p.uv_from_mm(MINOR_MM) - 100.0).abs() < 1e-9);
    assert!((p.mm_from_seconds(1.0) - 25.0).abs() < 1e-12);
    let fast = Paper { speed_mm_per_s: 50.0, ..p };
    assert!((fast.seconds_from_mm(1.0) - 0.020).abs() < 1e-12);
}

#[test]
fn dpi_conversion() {
    // Source: 1 inch = 25.4 mm exactly (1959 agreement; references.md §1).
    assert!((px_per_mm(300.0) * MAJOR_MM - 59.055).abs() < 1e-3);
    assert!((px_per_mm(25.4) - 1.0).abs() < 1e-12);
}

#[test]
fn layouts_parse_and_print() -> Result<(), PaperError> {
    for s in ["3x4+1", "6x2", "12x1", "strip:II", "3x4+1:V1"] {
        assert_eq!(s.parse::<Layout>()?.to_string(), s);
    }
    assert_eq!("strip:avr".parse::<Layout>()?, Layout::Strip(LeadName::Standard(StandardLead::AVR)));
    assert!("4x3".parse::<Layout>().is_err());
    assert!("strip:".parse::<Layout>().is_err());
    Ok(())
}

#[test]
fn three_by_four_page() {
    let rec = twelve_lead();
    let page = PageSpec::default().page(&rec);
    assert_eq!(page.rows.len(), 4);
    let labels: Vec<_> = page.rows[0].cells.iter().map(|c| c.label.clone()).collect();
    assert_eq!(labels, ["I", "aVR", "V1", "V4"]);
    assert!((page.rows[0].cells[1].t0_s - 2.5).abs() < 1e-12);
    assert_eq!(page.rows[3].cells.len(), 1);
    assert_eq!(page.rows[3].cells[0].label, "II");
    assert!((page.rows[3].cells[0].width_mm - 250.0).abs() < 1e-9);
}

#[test]
fn missing_rhythm_lead_falls_back_to_first_lead_in_file_order() {
    // A two-lead Holter-style record (MLII, V5): page order puts V5 first, file order MLII.
    let rec = Recording {
        leads: ["MLII", "V5"].iter().map(|n| Lead { name: LeadName::parse(n), samples: vec![0.0; 5000] }).collect(),
        ..twelve_lead()
    };
    assert_eq!(ordered_leads(&rec, LeadOrder::default())[0].1, "V5");
    let page = PageSpec::default().page(&rec);
    let rhythm = &page.rows.last().map(|r| r.cells.clone()).unwrap_or_default();
    assert_eq!(rhythm.len(), 1);
    assert_eq!((rhythm[0].lead, rhythm[0].label.as_str()), (0, "MLII"));
    let strip = PageSpec { layout: Layout::Strip(StandardLead::II.into()), ..PageSpec::default() }.page(&rec);
    assert_eq!(strip.rows.len(), 1);
    assert_eq!((strip.rows[0].cells[0].lead, strip.rows[0].cells[0].label.as_str()), (0, "MLII"));
}

#[test]
fn few_leads_fill_whole_columns() {
    let mut rec = twelve_lead();
    rec.leads.truncate(3); // I, II, III
    let page = PageSpec::default().page(&rec);
    assert_eq!(page.rows.len(), 4);
    for row in &page.rows {
        assert_eq!(row.cells.len(), 1);
        assert!((row.cells[0].width_mm - 250.0).abs() < 1e-9);
        assert!((row.cells[0].t1_s - 10.0).abs() < 1e-12);
    }
    let five = {
        let mut r = twelve_lead();
        r.leads.truncate(5);
        r
    };
    let page = PageSpec::default().page(&five);
    assert_eq!(page.rows[0].cells.len(), 2);
    assert!((page.rows[0].cells[1].t0_s - 5.0).abs() < 1e-12);
}

#[test]
fn cabrera_inverts_avr() {
    let rec = twelve_lead();
    let spec = PageSpec { order: LeadOrder::Cabrera, layout: Layout::SixByTwo, ..PageSpec::default() };
    let page = spec.page(&rec);
    let first_col: Vec<_> = page.rows.iter().map(|r| r.cells[0].label.clone()).collect();
    // Source: the Cabrera sequence orders the limb leads by frontal angle, aVL −30°, I 0°, −aVR +30°,
    // II +60°, aVF +90°, III +120° (hexaxial angles in references.md §5). From memory: the sequence itself.
    assert_eq!(first_col, ["aVL", "I", "\u{2212}aVR", "II", "aVF", "III"]);
    assert!(page.rows[2].cells[0].inverted);
    let row = &page.rows[2];
    assert!((row.y_from_uv(&page.paper, 1000.0, true) - (row.baseline_mm + 10.0)).abs() < 1e-9);
}

#[test]
fn calibration_pulse_is_one_millivolt_tall() {
    let rec = twelve_lead();
    let page = PageSpec::default().page(&rec);
    let pts = page.rows[0].calibration_pulse(&page.paper);
    // Source: Kligfield et al. 2007: 1 mV calibration = 10 mm at 10 mm/mV, 200 ms wide (5 mm at 25 mm/s).
    assert!(((pts[0].1 - pts[2].1) - 10.0).abs() < 1e-9);
    assert!(((pts[3].0 - pts[2].0) - 5.0).abs() < 1e-9);
}

#[test]
fn cell_time_mapping_round_trips() {
    let rec = twelve_lead();
    let page = PageSpec { start_s: 3.0, ..PageSpec::default() }.page(&rec);
    let cell = &page.rows[3].cells[0];
    let x = cell.x_from_time(&page.paper, 4.2);
    assert!((cell.time_from_x(&page.paper, x) - 4.2).abs() < 1e-12);
    assert!((x - cell.x_mm - 30.0).abs() < 1e-9);
}

#[test]
fn a_cell_without_valid_samples_says_so() {
    // 3x4+1 over 10 s: lead I (first cell of the first row) spans 0–2.5 s.
    let mut rec = twelve_lead();
    rec.leads[0].samples[..1000].fill(f32::NAN);
    let page = PageSpec {
        layout: Layout::default(),
        order: LeadOrder::Standard,
        paper: Paper::STANDARD,
        start_s: 0.0,
        seconds: 10.0,
    }
    .page(&rec);
    let cell = &page.rows[0].cells[0];
    assert_eq!(cell.label, "I");
    // Half the window missing: the trace shows the rest.
    assert_eq!(cell.label_over(&rec.leads[0].samples, 0, 500.0), "I");
    rec.leads[0].samples[..1300].fill(f32::NAN);
    assert_eq!(cell.label_over(&rec.leads[0].samples, 0, 500.0), format!("I {NO_SIGNAL}"));
    // Held from sample 2000 on (a span of a long recording): the window's samples before it are not held, and
    // the held ones are valid.
    assert_eq!(cell.label_over(&rec.leads[0].samples[2000..], 2000, 500.0), "I");
    // A window wholly past the end of what is held keeps the plain label.
    assert_eq!(cell.label_over(&[], 0, 500.0), "I");
}

#[test]
fn a_strip_of_the_seconds_that_fit_a_width_is_that_wide_at_every_speed() {
    // The calibration space grows at 50 and 100 mm/s (the 200 ms pulse is 10 and 20 mm wide): the seconds that
    // fit must leave room for it, or the end of the window lies past the edge of the view.
    let rec = twelve_lead();
    for speed in SPEEDS_MM_PER_S {
        let paper = Paper { speed_mm_per_s: speed, ..Paper::STANDARD };
        let seconds = seconds_fitting(&paper, 300.0);
        let spec = PageSpec { layout: Layout::Strip(StandardLead::II.into()), paper, seconds, ..PageSpec::default() };
        let page = spec.page(&rec);
        assert!((page.width_mm - 300.0).abs() < 1e-9, "{speed} mm/s: {seconds} s on a page {} mm wide", page.width_mm);
    }
}

#[test]
fn column_ticks_stand_between_columns_only() {
    let rec = twelve_lead();
    for speed in SPEEDS_MM_PER_S {
        let paper = Paper { speed_mm_per_s: speed, ..Paper::STANDARD };
        let page = PageSpec { paper, ..PageSpec::default() }.page(&rec);
        let ticks: Vec<Vec<f64>> = page.rows.iter().map(|r| r.column_ticks().map(|t| t.0).collect()).collect();
        // Three ticks in each 4-column row, none in the rhythm strip, none at a row's start.
        assert_eq!(ticks.iter().map(Vec::len).collect::<Vec<_>>(), [3, 3, 3, 0], "{speed} mm/s");
        for (row, xs) in page.rows.iter().zip(&ticks) {
            assert_eq!(xs, &row.cells[1..].iter().map(|c| c.x_mm).collect::<Vec<_>>());
        }
    }
}
