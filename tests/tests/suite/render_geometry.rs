//! True-scale geometry of exported pages, checked by reading the PNG back and finding the drawn lines, not by
//! trusting the renderer's own constants.
//!
//! Sources: Kligfield et al., Recommendations for the Standardization and Interpretation of the ECG, Part I,
//! Circulation 2007;115:1306-24 (25 mm/s, 10 mm/mV, 1 mV calibration pulse, 1 mm and 5 mm squares);
//! 1 inch = 25.4 mm exactly (international yard and pound agreement, 1959), so 1 mm = dpi / 25.4 px.

use crate::render_common::{Image, Res, centre, ptb, render_png, runs};
use isoline_core::analysis::Span;
use isoline_core::caliper::{Caliper, CaliperKind};
use isoline_core::paper::{Layout, PageSpec, Paper, Scheme};
use isoline_core::recording::StandardLead;
use isoline_core::render::{RenderInput, render_page};

const DPI: f64 = 300.0;
/// Pixels per mm at 300 dpi. Source: 1 inch = 25.4 mm exactly.
const PX_MM: f64 = DPI / 25.4;

fn strip(paper: Paper, seconds: f64) -> PageSpec {
    PageSpec { layout: Layout::Strip(StandardLead::II.into()), paper, seconds, ..PageSpec::default() }
}

/// Rows of the image that hold any pixel of the given exact colour (the grid band for the heavy-line colour).
fn rows_with(img: &Image, c: [u8; 3]) -> (usize, usize) {
    let ys: Vec<usize> = (0..img.height).filter(|&y| (0..img.width).any(|x| img.px(x, y) == c)).collect();
    (ys[0], ys[ys.len() - 1])
}

/// Centres of vertical lines of exact colour `c` covering at least 60 % of rows y0..=y1.
fn vertical_lines(img: &Image, c: [u8; 3], (y0, y1): (usize, usize)) -> Vec<f64> {
    let need = (y1 - y0 + 1) * 6 / 10;
    let xs: Vec<usize> = (0..img.width).filter(|&x| (y0..=y1).filter(|&y| img.px(x, y) == c).count() >= need).collect();
    runs(&xs, 1).into_iter().map(centre).collect()
}

/// Centres of horizontal lines of colour `c` covering at least 60 % of columns x0..=x1.
fn horizontal_lines(img: &Image, c: [u8; 3], (x0, x1): (usize, usize)) -> Vec<f64> {
    let need = (x1 - x0 + 1) * 6 / 10;
    let ys: Vec<usize> =
        (0..img.height).filter(|&y| (x0..=x1).filter(|&x| img.px(x, y) == c).count() >= need).collect();
    runs(&ys, 1).into_iter().map(centre).collect()
}

fn dark(p: [u8; 3]) -> bool {
    p.iter().all(|&v| v < 110)
}

fn check_period(lines: &[f64], period: f64, what: &str) {
    assert!(lines.len() >= 3, "{what}: found {} lines", lines.len());
    for w in lines.windows(2) {
        let gap = w[1] - w[0];
        assert!((gap - period).abs() <= 1.0, "{what}: gap {gap} px, expected {period:.3} ± 1");
    }
    // Each centre is snapped to the pixel grid (error at most 0.5 px), so the mean over n - 1 gaps is within
    // 1 / (n - 1) px of the true period: 0.02 px for the 51 heavy lines of a 10-s strip.
    let n = (lines.len() - 1) as f64;
    let mean = (lines[lines.len() - 1] - lines[0]) / n;
    assert!((mean - period).abs() <= 1.0 / n + 1e-6, "{what}: mean period {mean:.4} px, expected {period:.4}");
}

#[test]
fn strip_at_300_dpi_is_true_scale() -> Res {
    let rec = ptb()?;
    let input = RenderInput { scheme: Scheme::Rose, ..RenderInput::new(&rec, strip(Paper::STANDARD, 10.0), DPI) };
    let (_, img) = render_png(&input)?;
    // pHYs says 300 dpi: 300 / 0.0254 m = 11811 px/m.
    assert_eq!(img.ppm, Some(11811));
    // 10 s at 25 mm/s = 250 mm = 2952.76 px (Kligfield 2007; 25.4 mm per inch).
    assert!(img.width as f64 >= 250.0 * PX_MM, "page {} px wide", img.width);

    let pal = Scheme::Rose.palette();
    let major = [pal.major[0], pal.major[1], pal.major[2]];
    let band = rows_with(&img, major);
    let v = vertical_lines(&img, major, band);
    // Heavy lines every 5 mm = 59.055 px; a 10-s strip spans at least 50 of them.
    check_period(&v, 5.0 * PX_MM, "5 mm vertical lines");
    assert!(v.len() >= 51, "{} heavy vertical lines", v.len());
    let h = horizontal_lines(&img, major, (v[0] as usize, v[v.len() - 1] as usize));
    check_period(&h, 5.0 * PX_MM, "5 mm horizontal lines");
    let minor = [pal.minor[0], pal.minor[1], pal.minor[2]];
    let m = vertical_lines(&img, minor, band);
    // Light lines every 1 mm, except where a heavy line takes the place (4 of every 5).
    assert!(m.len() >= 4 * 50, "{} light vertical lines", m.len());
    for w in m.windows(2) {
        let gap = w[1] - w[0];
        let mm = (gap / PX_MM).round();
        assert!((mm == 1.0 || mm == 2.0) && (gap - mm * PX_MM).abs() <= 1.0, "light line gap {gap} px");
    }

    // Dark pixels in the grid band: the calibration pulse, then the trace.
    let cols: Vec<usize> = (0..img.width).filter(|&x| (band.0..=band.1).any(|y| dark(img.px(x, y)))).collect();
    let ink = runs(&cols, 3);
    assert!(ink.len() >= 2, "ink runs {ink:?}");
    let trace = *ink.iter().max_by_key(|(a, b)| b - a).ok_or("no trace")?;
    let trace_w = (trace.1 - trace.0 + 1) as f64;
    // The trace covers 250 mm, plus at most its stroke width (0.25 mm = 3 px) of round caps.
    assert!((250.0 * PX_MM - 1.0..=250.0 * PX_MM + 6.0).contains(&trace_w), "trace {trace_w} px wide");

    // Calibration pulse: the first ink run. Its plateau and its baseline are horizontal runs; their centres are
    // 1 mV x 10 mm/mV = 10 mm = 118.11 px apart (Kligfield 2007). Its two vertical edges are 200 ms x 25 mm/s =
    // 5 mm = 59.06 px apart.
    let pulse = ink[0];
    assert!(pulse.1 < trace.0, "pulse {pulse:?} before trace {trace:?}");
    let rows: Vec<usize> =
        (band.0..=band.1).filter(|&y| (pulse.0..=pulse.1).filter(|&x| dark(img.px(x, y))).count() >= 15).collect();
    let flats = runs(&rows, 1);
    assert_eq!(flats.len(), 2, "pulse horizontal runs {flats:?}");
    let height = centre(flats[1]) - centre(flats[0]);
    assert!((height - 10.0 * PX_MM).abs() <= 1.5, "pulse {height} px tall, expected {:.2}", 10.0 * PX_MM);
    let edge_cols: Vec<usize> = (pulse.0..=pulse.1)
        .filter(|&x| (band.0..=band.1).filter(|&y| dark(img.px(x, y))).count() as f64 >= 8.0 * PX_MM)
        .collect();
    let edges = runs(&edge_cols, 1);
    assert_eq!(edges.len(), 2, "pulse vertical edges {edges:?}");
    let width = centre(edges[1]) - centre(edges[0]);
    assert!((width - 5.0 * PX_MM).abs() <= 1.5, "pulse {width} px wide, expected {:.2}", 5.0 * PX_MM);
    Ok(())
}

#[test]
fn fast_paper_widens_pulse_and_keeps_grid() -> Res {
    // At 50 mm/s the 200 ms pulse is 10 mm wide; the grid stays 1 mm / 5 mm (it is paper, not time).
    let rec = ptb()?;
    let paper = Paper { speed_mm_per_s: 50.0, gain_mm_per_mv: 10.0 };
    let input = RenderInput::new(&rec, strip(paper, 4.0), DPI);
    let (_, img) = render_png(&input)?;
    let pal = Scheme::Rose.palette();
    let major = [pal.major[0], pal.major[1], pal.major[2]];
    let band = rows_with(&img, major);
    check_period(&vertical_lines(&img, major, band), 5.0 * PX_MM, "5 mm lines at 50 mm/s");
    let cols: Vec<usize> = (0..img.width).filter(|&x| (band.0..=band.1).any(|y| dark(img.px(x, y)))).collect();
    let ink = runs(&cols, 3);
    let pulse = ink[0];
    let edge_cols: Vec<usize> = (pulse.0..=pulse.1)
        .filter(|&x| (band.0..=band.1).filter(|&y| dark(img.px(x, y))).count() as f64 >= 8.0 * PX_MM)
        .collect();
    let edges = runs(&edge_cols, 1);
    assert_eq!(edges.len(), 2, "pulse edges {edges:?} (pulse must not run into the trace)");
    let width = centre(edges[1]) - centre(edges[0]);
    assert!((width - 10.0 * PX_MM).abs() <= 1.5, "pulse {width} px wide at 50 mm/s");
    // 4 s at 50 mm/s = 200 mm of trace.
    let trace = *ink.iter().max_by_key(|(a, b)| b - a).ok_or("no trace")?;
    assert!(((trace.1 - trace.0 + 1) as f64 - 200.0 * PX_MM).abs() <= 6.0);
    Ok(())
}

#[test]
fn time_caliper_legs_fall_on_expected_columns() -> Res {
    let rec = ptb()?;
    let spec = strip(Paper::STANDARD, 10.0);
    let (t1, t2) = (2.0, 2.8);
    let cal =
        Caliper { id: 1, kind: CaliperKind::Time { t1_s: t1, t2_s: t2 }, lead: None, locked: false, march: false };
    let input = RenderInput { calipers: vec![cal], ..RenderInput::new(&rec, spec.clone(), DPI) };
    let (_, img) = render_png(&input)?;
    // Caliper ink is the Rose scheme's blue; legs run through the row band (over 20 mm tall).
    let blue = |p: [u8; 3]| p[2] > 150 && p[0] < 110;
    let xs: Vec<usize> = (0..img.width)
        .filter(|&x| (0..img.height).filter(|&y| blue(img.px(x, y))).count() as f64 >= 20.0 * PX_MM)
        .collect();
    let legs: Vec<f64> = runs(&xs, 1).into_iter().map(centre).collect();
    assert_eq!(legs.len(), 2, "legs {legs:?}");
    // 0.8 s at 25 mm/s = 20 mm = 236.22 px between the legs.
    assert!(((legs[1] - legs[0]) - 20.0 * PX_MM).abs() <= 1.5, "legs {legs:?}");
    // Absolute columns: the strip's left edge on paper plus t x 25 mm/s.
    let cell = &spec.page(&rec).rows[0].cells[0];
    for (leg, t) in legs.iter().zip([t1, t2]) {
        let expect = (cell.x_mm + 25.0 * (t - cell.t0_s)) * PX_MM;
        assert!((leg - expect).abs() <= 1.5, "leg at {leg} px, expected {expect:.2}");
    }
    Ok(())
}

#[test]
fn mark_is_drawn_on_every_row_showing_its_time() -> Res {
    // On a 3x4+1 page the time 3.0 s lies in the second column of the three lead rows and in the rhythm row,
    // 3.0 s x 25 mm/s = 75 mm right of where the traces start.
    let rec = ptb()?;
    let spec = PageSpec::default();
    let input =
        RenderInput { marks: vec![(isoline_core::MarkKind::JPoint, 3.0)], ..RenderInput::new(&rec, spec.clone(), DPI) };
    let (_, img) = render_png(&input)?;
    let page = spec.page(&rec);
    let green = |p: [u8; 3]| p[1] > 100 && p[0] < 90 && p[2] < 140;
    let trace_x = page.rows[0].cells[0].x_mm;
    let expect = (trace_x + 75.0) * PX_MM;
    for row in &page.rows {
        let (y0, y1) = ((row.top_mm * PX_MM) as usize, ((row.top_mm + row.height_mm) * PX_MM) as usize);
        let xs: Vec<usize> =
            (0..img.width).filter(|&x| (y0..y1).filter(|&y| green(img.px(x, y))).count() > 60).collect();
        let lines: Vec<f64> = runs(&xs, 1).into_iter().map(centre).collect();
        assert_eq!(lines.len(), 1, "row at {} mm: mark lines {lines:?}", row.top_mm);
        assert!((lines[0] - expect).abs() <= 1.5, "mark at {} px, expected {expect:.2}", lines[0]);
    }
    Ok(())
}

#[test]
fn a_span_of_the_recording_draws_the_page_the_whole_recording_does() -> Res {
    // A long recording's page is drawn from the samples around its window only (its filtered signal is never
    // held whole): the same window from a span and from the whole recording gives the same pixels, with the
    // window's times those of the whole recording.
    let rec = ptb()?;
    let spec = PageSpec { start_s: 12.0, seconds: 10.0, ..PageSpec::default() };
    let (a, b) = spec.sample_range(rec.sample_rate.hz());
    let span = Span::cut(&rec, a, b);
    assert!(span.first == 11_999 && span.recording.len() == 10_003, "{} + {}", span.first, span.recording.len());
    let whole = render_page(&RenderInput::new(&rec, spec.clone(), 100.0))?;
    let part = render_page(&RenderInput::of_span(&span, rec.duration_s(), spec.clone(), 100.0))?;
    assert!(whole.data() == part.data(), "the span's page differs from the whole recording's");
    // A span that misses the window's end leaves that part of the page blank, not shifted.
    let short = Span::cut(&rec, a, a + 5_000);
    let cut = render_page(&RenderInput::of_span(&short, rec.duration_s(), spec, 100.0))?;
    assert!(cut.data() != whole.data());
    Ok(())
}
