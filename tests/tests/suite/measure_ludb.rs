//! Frontal QRS axis on LUDB records against the cardiologists' axis diagnoses.
//!
//! Source: Kalyakulina et al., LUDB: a new open-access validation tool for electrocardiogram delineation
//! algorithms, IEEE Access 2020;8:186181-90 (records, boundaries and diagnoses; ODC-By 1.0 via PhysioNet).
//! Axis categories as the diagnoses use them (tests/data/README.md, from memory): left axis deviation below 0°,
//! horizontal 0 to +30°, normal +30 to +70°, vertical +70 to +90°, right axis deviation above +90°.
//!
//! This test measures the axis on a median beat built here from the cardiologists' own beat positions and
//! global boundaries (`N.global.csv`), so it checks the axis measurement alone, apart from detection and
//! delineation.

use std::path::Path;

use isoline_core::beat::Boundaries;
use isoline_core::io;
use isoline_core::measure::{self, AxisBasis, Template};
use isoline_tests::data;

/// Axis category of an angle, as the LUDB diagnoses name them (None outside −90°…+180°).
fn category(deg: f64) -> Option<&'static str> {
    match deg {
        d if (-90.0..0.0).contains(&d) => Some("left axis deviation"),
        d if (0.0..30.0).contains(&d) => Some("horizontal"),
        d if (30.0..70.0).contains(&d) => Some("normal"),
        d if (70.0..=90.0).contains(&d) => Some("vertical"),
        d if d > 90.0 => Some("right axis deviation"),
        _ => None,
    }
}

/// One annotated beat of `N.global.csv`: R sample and global boundaries.
fn read_global(path: &Path) -> Vec<(usize, Boundaries)> {
    let text = std::fs::read_to_string(path).unwrap_or_default();
    let field = |s: Option<&str>| s.and_then(|s| s.trim().parse::<usize>().ok());
    text.lines()
        .skip(1)
        .filter_map(|line| {
            let f: Vec<&str> = line.split(',').collect();
            let r = field(f.first().copied())?;
            let b = Boundaries {
                p_on: field(f.get(2).copied()),
                p_end: field(f.get(3).copied()),
                qrs_on: field(f.get(4).copied()),
                qrs_end: field(f.get(5).copied()),
                t_end: field(f.get(6).copied()),
            };
            Some((r, b))
        })
        .collect()
}

/// Median beat of every lead over the annotated beats, with the median boundary offsets (slow, obvious code).
fn median_template(
    leads: &[Vec<f32>],
    beats: &[(usize, Boundaries)],
    pre: usize,
    post: usize,
) -> Option<(Vec<Vec<f32>>, Boundaries)> {
    let n = leads.first()?.len();
    let used: Vec<&(usize, Boundaries)> =
        beats.iter().filter(|(r, b)| *r >= pre && r + post < n && b.qrs_on.is_some() && b.qrs_end.is_some()).collect();
    if used.is_empty() {
        return None;
    }
    let med = |mut v: Vec<f64>| -> Option<f64> {
        if v.is_empty() {
            return None;
        }
        v.sort_by(f64::total_cmp);
        let m = v.len();
        Some(if m % 2 == 1 { v[m / 2] } else { (v[m / 2 - 1] + v[m / 2]) / 2.0 })
    };
    let template = leads
        .iter()
        .map(|x| {
            (0..pre + post)
                .map(|k| med(used.iter().map(|(r, _)| f64::from(x[r - pre + k])).collect()).unwrap_or(0.0) as f32)
                .collect()
        })
        .collect();
    let offset = |get: fn(&Boundaries) -> Option<usize>| {
        med(used.iter().filter_map(|(r, b)| get(b).map(|v| v as f64 - *r as f64)).collect())
            .map(|o| (o + pre as f64).round().max(0.0) as usize)
    };
    let bounds = Boundaries {
        p_on: offset(|b| b.p_on),
        p_end: offset(|b| b.p_end),
        qrs_on: offset(|b| b.qrs_on),
        qrs_end: offset(|b| b.qrs_end),
        t_end: offset(|b| b.t_end),
    };
    Some((template, bounds))
}

/// (record, diagnosed axis category) for the non-paced records with an axis diagnosis.
fn labelled_records() -> Vec<(String, String)> {
    let text = std::fs::read_to_string(data("ludb/labels.csv")).unwrap_or_default();
    text.lines()
        .skip(1)
        .filter_map(|line| {
            let f: Vec<&str> = line.rsplitn(3, ',').collect(); // paced, axis, "record,rhythm"
            let (paced, axis, head) = (f.first()?, f.get(1)?, f.get(2)?);
            let record = head.split(',').next()?;
            (paced.trim() == "no" && !axis.trim().is_empty()).then(|| (record.to_string(), axis.trim().to_string()))
        })
        .collect()
}

fn agreement(basis: AxisBasis) -> (usize, usize, Vec<String>) {
    let records = labelled_records();
    let (mut agree, mut total, mut lines) = (0, 0, Vec::new());
    for (record, want) in &records {
        let opened = io::open(&data(&format!("ludb/{record}.hea")), &io::OpenOptions::default());
        let Ok(opened) = opened else {
            lines.push(format!("{record}: unreadable"));
            total += 1;
            continue;
        };
        let rec = &opened.recording;
        let fs = rec.sample_rate;
        let beats = read_global(&data(&format!("ludb/{record}.global.csv")));
        let leads: Vec<Vec<f32>> = rec.leads.iter().map(|l| l.samples.clone()).collect();
        let pre = fs.sample_from_seconds(0.4) as usize;
        let post = fs.sample_from_seconds(0.7) as usize;
        total += 1;
        let Some((template, bounds)) = median_template(&leads, &beats, pre, post) else {
            lines.push(format!("{record}: no annotated beats"));
            continue;
        };
        let t = Template { leads: &template, sample_rate: fs, bounds };
        let axis = measure::measure_with(rec, &[], Some(&t), basis).axes.qrs_deg;
        let got = axis.and_then(category);
        let ok = got == Some(want.as_str());
        agree += usize::from(ok);
        lines.push(format!(
            "{record:>3}: {:>7} → {:<22} diagnosed {want}{}",
            axis.map_or("—".into(), |a| format!("{a:.0}°")),
            got.unwrap_or("—"),
            if ok { "" } else { "  ✗" }
        ));
    }
    (agree, total, lines)
}

#[test]
fn ludb_qrs_axis_category_from_expert_boundaries() {
    // Goal (issue 3): the QRS axis falls in the diagnosed category for ≥ 85 % of non-paced records.
    // Measured on records 1–50 (47 labelled, non-paced): net amplitude 33/47 (70 %), net area 28/47 (60 %).
    // The goal is NOT met. Several diagnoses disagree with every variant tried (net area or amplitude; I+aVF,
    // I+III or all limb leads; median beat or per-beat median), e.g. record 44 measures +65° in all of them but
    // is diagnosed left axis deviation, record 31 +37° to +45° (left axis deviation), record 35 above +100°
    // (vertical). This floor guards against regressions of the measurement itself.
    let (agree, total, lines) = agreement(AxisBasis::default());
    for l in &lines {
        println!("{l}");
    }
    let (agree_area, _, _) = agreement(AxisBasis::NetArea);
    println!("default (net amplitude): {agree}/{total}; net area: {agree_area}/{total}");
    assert!(total >= 40, "expected the 47 labelled non-paced LUDB records, found {total}");
    assert!(agree * 100 >= total * 65, "axis category agrees on {agree}/{total} records");
}

/// (record, rhythm, axis category, paced) of every LUDB record in `labels.csv`.
fn all_labels() -> Vec<(String, String, String, bool)> {
    let text = std::fs::read_to_string(data("ludb/labels.csv")).unwrap_or_default();
    text.lines()
        .skip(1)
        .filter_map(|line| {
            let f: Vec<&str> = line.rsplitn(3, ',').collect();
            let (paced, axis, head) = (f.first()?, f.get(1)?, f.get(2)?);
            let (record, rhythm) = head.split_once(',')?;
            Some((
                record.to_string(),
                rhythm.trim_matches('"').to_string(),
                axis.trim().to_string(),
                paced.trim() == "yes",
            ))
        })
        .collect()
}

#[test]
fn ludb_full_analysis_axis_and_pr() {
    // The whole pipeline (filters, detection, delineation, representative beat, measurement) on LUDB records
    // 1–50 against the cardiologists' diagnoses (Kalyakulina et al. 2020).
    let (mut axis_ok, mut axis_n, mut af_no_pr, mut af_n, mut sinus_pr, mut sinus_n) = (0, 0, 0, 0, 0, 0);
    for (record, rhythm, axis_label, paced) in all_labels() {
        let Ok(opened) = io::open(&data(&format!("ludb/{record}.hea")), &io::OpenOptions::default()) else {
            panic!("ludb/{record}.hea unreadable");
        };
        let a = isoline_core::analysis::analyze(&opened.recording, &isoline_core::filter::FilterSettings::default());
        let m = &a.measurements;
        let axis = m.axes.qrs_deg;
        let got = axis.and_then(category);
        if !paced && !axis_label.is_empty() {
            axis_n += 1;
            axis_ok += usize::from(got == Some(axis_label.as_str()));
        }
        if rhythm.contains("fibrillation") {
            af_n += 1;
            af_no_pr += usize::from(m.intervals.pr_ms.is_none());
        }
        if rhythm.starts_with("Sinus") && !paced {
            sinus_n += 1;
            sinus_pr += usize::from(m.intervals.pr_ms.is_some());
        }
        println!(
            "{record:>3}: axis {:>6} ({:<20}) diagnosed {axis_label:<20} PR {:>5}  {rhythm}{}",
            axis.map_or("—".into(), |a| format!("{a:.0}°")),
            got.unwrap_or("—"),
            m.intervals.pr_ms.map_or("—".into(), |p| format!("{p:.0}")),
            if paced { " (paced)" } else { "" }
        );
    }
    println!("axis category {axis_ok}/{axis_n}; AF without PR {af_no_pr}/{af_n}; sinus with PR {sinus_pr}/{sinus_n}");
    assert!(axis_n >= 40);
    // Floors of what the pipeline measures today (see the report); the goals are 85 % axis agreement,
    // no PR in ≥ 80 % of AF records and a PR in ≥ 95 % of sinus records.
    assert!(axis_ok * 100 >= axis_n * 60, "axis category agrees on {axis_ok}/{axis_n}");
    // Source: LUDB rhythm diagnoses (Kalyakulina et al., IEEE Access 2020): sinus records have a P wave to
    // measure; atrial fibrillation records have none. Goals from the measurement-engine issue.
    assert!(sinus_n >= 40 && sinus_pr * 100 >= sinus_n * 95, "sinus records with a PR: {sinus_pr}/{sinus_n}");
    assert!(af_n >= 1 && af_no_pr * 100 >= af_n * 50, "AF records without a PR: {af_no_pr}/{af_n}");
}
