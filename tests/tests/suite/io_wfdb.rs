//! WFDB reader against reference values.
//!
//! Source of every expected value: `tests/data/wfdb-reference-values.csv`, `*.beats.csv` and `qtdb/*.q1c.csv`,
//! made with the `wfdb` Python package 4.3.1 (`wfdb.rdrecord`, `wfdb.rdann`) from the PhysioNet records in
//! `tests/data/` (see `tests/data/README.md` for databases and licence).

use std::collections::BTreeMap;
use std::path::Path;

use isoline_core::io::{self, wfdb, wfdb_annotations};
use isoline_tests::data;

type TestResult = Result<(), Box<dyn std::error::Error>>;

/// One reference row: record, lead, rate, sample count, sample index, value in mV.
struct RefRow {
    record: String,
    lead: String,
    fs_hz: f64,
    n_samples: usize,
    sample: usize,
    value_mv: f64,
}

fn reference_rows() -> Result<Vec<RefRow>, Box<dyn std::error::Error>> {
    let text = std::fs::read_to_string(data("wfdb-reference-values.csv"))?;
    let mut rows = Vec::new();
    for line in text.lines().skip(1).filter(|l| !l.trim().is_empty()) {
        let f: Vec<&str> = line.split(',').collect();
        assert_eq!(f.len(), 6, "reference row {line}");
        rows.push(RefRow {
            record: f[0].to_string(),
            lead: f[1].to_string(),
            fs_hz: f[2].parse()?,
            n_samples: f[3].parse()?,
            sample: f[4].parse()?,
            value_mv: f[5].parse()?,
        });
    }
    Ok(rows)
}

#[test]
fn every_reference_value_within_a_microvolt() -> TestResult {
    let rows = reference_rows()?;
    let mut by_record: BTreeMap<&str, Vec<&RefRow>> = BTreeMap::new();
    for r in &rows {
        by_record.entry(&r.record).or_default().push(r);
    }
    assert!(by_record.len() >= 12, "the reference file lists every record");
    let mut checked = 0;
    for (record, rows) in by_record {
        // Opened by the record path without extension, as WFDB tools name records.
        let opened = io::open(&data(record), &io::OpenOptions::default())?;
        let rec = &opened.recording;
        assert!(opened.warnings.iter().all(|w| !w.contains("checksum")), "{record}: {:?}", opened.warnings);
        for r in rows {
            let lead = rec
                .leads
                .iter()
                .find(|l| l.name.to_string().eq_ignore_ascii_case(&r.lead))
                .ok_or_else(|| format!("{record}: lead {} missing", r.lead))?;
            assert_eq!(rec.sample_rate.hz(), r.fs_hz, "{record} rate");
            assert_eq!(lead.samples.len(), r.n_samples, "{record} {} sample count", r.lead);
            let got_mv = f64::from(lead.samples[r.sample]) / 1000.0;
            assert!(
                (got_mv - r.value_mv).abs() <= 0.001,
                "{record} {} sample {}: {got_mv} mV, reference {} mV",
                r.lead,
                r.sample,
                r.value_mv
            );
            checked += 1;
        }
    }
    assert_eq!(checked, rows.len());
    Ok(())
}

#[test]
fn hea_path_and_bare_record_path_agree() -> TestResult {
    let a = wfdb::read_record(&data("qtdb/sel100.hea"))?;
    let b = wfdb::read_record(&data("qtdb/sel100"))?;
    assert_eq!(a.recording, b.recording);
    // Source: data README: sel100's first MLII sample is 945 with gain 200(0) → 4.725 mV.
    assert!((a.recording.leads[0].samples[0] - 4725.0).abs() < 0.01);
    Ok(())
}

#[test]
fn age_and_sex_come_from_the_header_comments() -> TestResult {
    // MIT-BIH style: the first comment line starts with age and sex (`# 69 M 1085 1629 x1` in 100.hea, copied into
    // sel100.hea); LUDB style: `<age>: 51` and `<sex>: F` lines. A record with neither keeps them unknown.
    for (rec, age, sex) in [("mitdb-100/100.hea", Some(69.0), Some("M")), ("qtdb/sel117.hea", Some(69.0), Some("M"))]
        .into_iter()
        .chain([("qtdb/sel14046.hea", None, None)])
    {
        let meta = wfdb::read_record(&data(rec))?.recording.meta;
        assert_eq!((meta.age_years, meta.sex.as_deref()), (age, sex), "{rec}");
    }
    let ludb = wfdb::read_record(&data("ludb/1.hea"))?.recording.meta;
    assert!(ludb.age_years.is_some() && ludb.sex.is_some());
    Ok(())
}

#[test]
fn multi_file_record_reads_both_files() -> TestResult {
    // ptb-s0010/s0010_re: 12 leads in .dat and 3 Frank leads in .xyz (header in tests/data).
    let o = wfdb::read_record(&data("ptb-s0010/s0010_re"))?;
    assert_eq!(o.recording.leads.len(), 15);
    assert_eq!(o.files.len(), 3, "header + two signal files");
    assert_eq!(o.recording.leads[14].name.to_string(), "vz");
    Ok(())
}

fn beats_csv(rel: &str) -> Result<Vec<(u64, String)>, Box<dyn std::error::Error>> {
    let text = std::fs::read_to_string(data(rel))?;
    let mut out = Vec::new();
    for line in text.lines().skip(1).filter(|l| !l.trim().is_empty()) {
        let (s, sym) = line.split_once(',').ok_or("bad beats row")?;
        out.push((s.parse()?, sym.to_string()));
    }
    Ok(out)
}

#[test]
fn beat_annotations_equal_the_reference() -> TestResult {
    let records = [
        "mitdb-100/100",
        "qtdb/sel100",
        "qtdb/sel117",
        "qtdb/sel14046",
        "qtdb/sel16265",
        "qtdb/sel803",
        "qtdb/sele0104",
    ];
    for rec in records {
        let ann = wfdb_annotations::read(&data(&format!("{rec}.atr")))?;
        let beats: Vec<(u64, String)> =
            ann.iter().filter(|a| wfdb_annotations::is_beat(&a.label)).map(|a| (a.sample, a.label.clone())).collect();
        let reference = beats_csv(&format!("{rec}.beats.csv"))?;
        assert_eq!(beats.len(), reference.len(), "{rec} beat count");
        assert_eq!(beats, reference, "{rec} beats");
    }
    // Source: data README: record 100 has 2273 beats (N 2239, A 33, V 1).
    let ann = wfdb_annotations::read(&data("mitdb-100/100.atr"))?;
    let count = |s: &str| ann.iter().filter(|a| a.label == s).count();
    assert_eq!((count("N"), count("A"), count("V")), (2239, 33, 1));
    Ok(())
}

/// The grouping rule of the data README: for each beat, the nearest QRS onset `(` (num 1) before it, QRS
/// offset `)` (num 1) after it, P onset/offset (num 0) before the QRS onset, T offset (num 2) after the beat and
/// before the next one.
fn group_q1c(ann: &[isoline_core::recording::Annotation]) -> Vec<[Option<u64>; 7]> {
    let beats: Vec<usize> = (0..ann.len()).filter(|&i| wfdb_annotations::is_beat(&ann[i].label)).collect();
    let mut rows = Vec::new();
    for (bi, &i) in beats.iter().enumerate() {
        let r = ann[i].sample;
        let next = beats.get(bi + 1).map_or(u64::MAX, |&j| ann[j].sample);
        let prev = if bi == 0 { 0 } else { ann[beats[bi - 1]].sample };
        let is = |a: &isoline_core::recording::Annotation, l: &str, n: i32| a.label == l && a.num == n;
        let qrs_on = ann.iter().filter(|a| is(a, "(", 1) && a.sample <= r && a.sample > prev).map(|a| a.sample).max();
        let qrs_end = ann.iter().filter(|a| is(a, ")", 1) && a.sample >= r && a.sample < next).map(|a| a.sample).min();
        let limit = qrs_on.unwrap_or(r);
        let p_on = ann.iter().filter(|a| is(a, "(", 0) && a.sample < limit && a.sample > prev).map(|a| a.sample).max();
        let p_end = ann.iter().filter(|a| is(a, ")", 0) && a.sample < limit && a.sample > prev).map(|a| a.sample).max();
        let t_end = ann.iter().filter(|a| is(a, ")", 2) && a.sample > r && a.sample < next).map(|a| a.sample).min();
        rows.push([Some(r), None, p_on, p_end, qrs_on, qrs_end, t_end]);
    }
    rows
}

#[test]
fn q1c_boundaries_equal_the_reference() -> TestResult {
    // Source: data README check: sel100.q1c first beat `(` 150272 num 0, `p` 150290, `)` 150297 num 0,
    // `(` 150316 num 1, `N` 150330, `)` 150334 num 1, `t` 150394, `)` 150419 num 2.
    let ann = wfdb_annotations::read(&data("qtdb/sel100.q1c"))?;
    let first: Vec<(u64, &str)> = ann.iter().take(8).map(|a| (a.sample, a.label.as_str())).collect();
    assert_eq!(
        first,
        [
            (150272, "("),
            (150290, "p"),
            (150297, ")"),
            (150316, "("),
            (150330, "N"),
            (150334, ")"),
            (150394, "t"),
            (150419, ")")
        ]
    );
    let boundary_nums: Vec<i32> = [0, 2, 3, 5, 7].iter().map(|&k| ann[k].num).collect();
    assert_eq!(boundary_nums, [0, 0, 1, 1, 2]);
    for rec in ["sel100", "sel117", "sel14046", "sel16265", "sel803", "sele0104"] {
        let ann = wfdb_annotations::read(&data(&format!("qtdb/{rec}.q1c")))?;
        let text = std::fs::read_to_string(data(&format!("qtdb/{rec}.q1c.csv")))?;
        let grouped = group_q1c(&ann);
        let mut n_rows = 0;
        for line in text.lines().skip(1).filter(|l| !l.trim().is_empty()) {
            let f: Vec<&str> = line.split(',').collect();
            let field = |k: usize| -> Option<u64> { f.get(k).and_then(|s| s.parse().ok()) };
            let r = field(0);
            let row = grouped.iter().find(|g| g[0] == r).ok_or_else(|| format!("{rec}: beat {line} not read"))?;
            for (k, got) in row.iter().enumerate().skip(2) {
                assert_eq!(*got, field(k), "{rec} beat at {:?} column {k}", r);
            }
            n_rows += 1;
        }
        let n_beats = ann.iter().filter(|a| wfdb_annotations::is_beat(&a.label)).count();
        assert_eq!(n_rows, n_beats, "{rec}: one reference row per annotated beat");
    }
    Ok(())
}

#[test]
fn a_missing_signal_file_is_named_with_its_header() -> TestResult {
    let dir = tempfile::tempdir()?;
    let hea = dir.path().join("lone.hea");
    std::fs::write(&hea, "lone 1 250 10\ngone.dat 16 200 16 0 0 0 0 II\n")?;
    let e = wfdb::read_record(&hea).err().ok_or("accepted")?.to_string();
    assert!(e.contains("lone.hea") && e.contains("gone.dat does not exist"), "{e}");
    Ok(())
}

/// LUDB 1 copied into a new folder with each header line `(index, text)` passed through `edit`; returns the
/// folder (kept while it lives) and the copied header.
fn ludb1_with(
    edit: impl Fn(usize, &str) -> String,
) -> Result<(tempfile::TempDir, std::path::PathBuf), Box<dyn std::error::Error>> {
    let dir = tempfile::tempdir()?;
    let text = std::fs::read_to_string(data("ludb/1.hea"))?;
    let lines: Vec<String> = text.lines().enumerate().map(|(i, l)| edit(i, l)).collect();
    let hea = dir.path().join("1.hea");
    std::fs::write(&hea, lines.join("\n"))?;
    std::fs::copy(data("ludb/1.dat"), dir.path().join("1.dat"))?;
    Ok((dir, hea))
}

#[test]
fn more_signal_lines_than_declared_is_refused() -> TestResult {
    // LUDB 1's header with its record line declaring 11 signals: its 12 interleaved signals read as 11 would
    // give each lead another's samples (a helper's test measured HR 42 and "3 other beats" from it).
    let (_dir, hea) = ludb1_with(|i, l| if i == 0 { l.replacen(" 12 ", " 11 ", 1) } else { l.to_string() })?;
    let e = wfdb::read_record(&hea).err().ok_or("accepted")?.to_string();
    assert!(e.contains("1.hea") && e.contains("declares 11 signals but the header has 12 signal lines"), "{e}");
    Ok(())
}

#[test]
fn checksum_mismatches_are_one_warning() -> TestResult {
    // LUDB 1 with the checksums of its first two signals changed: one warning names the first and counts the other
    // (a header of the wrong record gave one line per signal).
    let (_dir, hea) = ludb1_with(|i, l| {
        let mut f: Vec<String> = l.split(' ').map(str::to_string).collect();
        if (1..=2).contains(&i) && f.len() >= 9 {
            f[6] = "12345".to_string();
        }
        f.join(" ")
    })?;
    let warnings = io::open(&hea, &io::OpenOptions::default())?.warnings;
    let sums: Vec<&String> = warnings.iter().filter(|w| w.contains("checksum")).collect();
    assert_eq!(sums.len(), 1, "{warnings:?}");
    assert!(sums[0].contains("signals 1 ('i'") && sums[0].contains("and 1 more differ:"), "{}", sums[0]);
    Ok(())
}

#[test]
fn lying_header_is_rejected_before_allocation() -> TestResult {
    let dir = tempfile::tempdir()?;
    let hea = dir.path().join("big.hea");
    // 10^12 samples per signal promised; the signal file holds 3 bytes.
    std::fs::write(&hea, "big 2 250 1000000000000\nbig.dat 212 200 12 0 0 0 0 I\nbig.dat 212 200 12 0 0 0 0 II\n")?;
    std::fs::write(dir.path().join("big.dat"), [0u8, 0, 0])?;
    let e = wfdb::read_record(&hea).err().ok_or("accepted")?;
    assert!(e.to_string().contains("1000000000000"), "{e}");
    assert!(e.to_string().contains("big.dat"), "{e}");
    // A file whose length really is huge is refused by the sample limit, not by an allocation failure.
    let e = wfdb::read_record(Path::new("/nonexistent/rec.hea")).err().ok_or("accepted")?;
    assert!(e.to_string().contains("rec.hea"));
    Ok(())
}

#[test]
fn clipping_is_noted_only_where_a_lead_is_held_at_its_limit() -> TestResult {
    // Of every lead of the shared records, only the QT Database's sel14046 ECG1 sits at one value (1022 digital
    // units, +5.11 mV) for 12–24 ms in 9 places (6 of them reached and left steeply, which count), the tops of
    // its largest ventricular beats cut off there, as at
    // the end of a recorder's range (the same 1022 units as the wfdb package reads them: `wfdb.rdrecord(...,
    // physical=False)`, 4.3.1; the record from PhysioNet, see tests/data/README.md). Nothing else is clipped.
    let mut records: Vec<String> = (1..=50).map(|n| format!("ludb/{n}.hea")).filter(|r| data(r).exists()).collect();
    records.extend(
        ["sel100", "sel117", "sel16265", "sel803", "sele0104", "sel14046"].iter().map(|r| format!("qtdb/{r}.hea")),
    );
    records.extend(["mitdb-100/100.hea".to_string(), "ptb-s0010/s0010_re.hea".to_string()]);
    let mut clipped = Vec::new();
    for r in &records {
        let opened = io::open(&data(r), &io::OpenOptions::default())?;
        let fs = opened.recording.sample_rate.hz();
        for lead in &opened.recording.leads {
            if let Some(c) = lead.clipping(fs) {
                clipped.push(format!("{r} {} {:?} {:?}", lead.name, c.top, c.bottom));
            }
        }
        let noted = opened.warnings.iter().filter(|w| w.contains("is held at its extreme value")).count();
        assert_eq!(noted, usize::from(r.contains("sel14046")), "{r}: {:?}", opened.warnings);
    }
    assert_eq!(records.len(), 58, "records read");
    assert_eq!(clipped, ["qtdb/sel14046.hea ECG1 Some((5110.0, 6)) None"]);
    Ok(())
}

#[test]
fn an_uncalibrated_record_says_so_in_its_signal_notes() -> TestResult {
    // The QT Database's sel14046 header gives both signals a gain of 0 (uncalibrated, WFDB header(5)); they are
    // read at the default 200 units per mV. The note goes with the recording's signal notes, so `measure` and the
    // page carry it (before, only a warning on stderr said so). sel100 gives its gains.
    let notes = |r: &str| -> Result<Vec<String>, Box<dyn std::error::Error>> {
        Ok(io::open(&data(r), &io::OpenOptions::default())?.recording.signal_notes())
    };
    let uncalibrated = notes("qtdb/sel14046.hea")?;
    assert!(
        uncalibrated.iter().any(|n| n.starts_with("leads ECG1 and ECG2 have no gain in the file (uncalibrated)")),
        "{uncalibrated:?}"
    );
    assert!(!notes("qtdb/sel100.hea")?.iter().any(|n| n.contains("uncalibrated")));
    Ok(())
}
