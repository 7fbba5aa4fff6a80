//! CSV recordings: a header row of lead names, an optional `time_s` column, values in mV.
//!
//! Reading: lines starting with `#` and blank lines before the header are skipped; lead names are matched to the
//! standard names case-insensitively (`avr` → aVR); the rate comes from an evenly spaced `time_s` column or is
//! given (evenly spaced within the rounding of the times as written: 3 decimals at 360 Hz step 0.003 and 0.002 s).
//! An empty cell, `NaN` or `NA` is an invalid sample. Columns named as another signal a monitor exports (`PLETH`,
//! `RESP`, `ABP`…) are left out with a warning. Writing: `time_s` (6 decimals), then one column per lead
//! in mV with 4 decimals (0.1 µV), an empty cell for an invalid sample.

use std::io::{BufRead, Write};
use std::path::Path;

use super::{Format, MAX_TOTAL_SAMPLES, Opened, ReadError, write_atomic};
use crate::recording::{Lead, LeadName, Meta, Recording};
use crate::units::Hertz;

/// Longest line accepted, bytes.
const MAX_LINE: usize = 1 << 20;

fn cells(line: &str) -> impl Iterator<Item = &str> {
    line.split(',').map(|c| c.trim().trim_matches('"').trim())
}

/// Parses one value cell; `Ok(None)` for an invalid sample (empty, `NaN`, or `NA` as R and spreadsheets write a
/// missing value). A number beyond what a sample holds in µV (±3.4e35 mV, `1e308`) is an error, not a sample
/// silently lost; the error says what is wrong with the cell.
fn value(cell: &str) -> Result<Option<f64>, &'static str> {
    if cell.is_empty() || cell.eq_ignore_ascii_case("nan") || cell.eq_ignore_ascii_case("na") {
        return Ok(None);
    }
    match cell.parse::<f64>() {
        Ok(v) if ((v * 1000.0) as f32).is_finite() => Ok(Some(v)),
        Ok(v) if v.is_finite() => Err("is too large for a sample"),
        _ => Err("is not a number"),
    }
}

/// A value beyond this (µV, either sign) is no ECG sample: recorders' inputs stop at a few hundred mV of
/// electrode offset.
// Common practice, no source: ECG front ends tolerate about ±300 mV of DC offset; 1 V is well past any of them.
const ABSURD_UV: f32 = 1.0e6;

/// A lead's [`ABSURD_UV`] values are read as missing samples when there is at most one in this many of its
/// samples (or just one): a stray cell, a typing slip. More are left as they are, and the recording's amplitude
/// note questions its units.
const ABSURD_SHARE: usize = 1000;
/// At most this many [`ABSURD_UV`] values per lead are read as missing samples.
const ABSURD_KEPT: usize = 64;

/// Reads a CSV recording. Without a `time_s` column, `rate_hz` must be given; with both, they must agree.
///
/// # Errors
/// [`ReadError`] naming the line and column at fault.
pub fn read(path: &Path, rate_hz: Option<f64>) -> Result<Opened, ReadError> {
    let file = crate::io::open_file(path)?;
    let len = file.metadata().map(|m| m.len()).ok();
    read_inner(path, std::io::BufReader::with_capacity(1 << 20, file), rate_hz, len)
}

/// Reads a CSV recording from any reader; `path` names it in messages.
///
/// # Errors
/// As [`read`].
pub fn read_from(path: &Path, input: impl BufRead, rate_hz: Option<f64>) -> Result<Opened, ReadError> {
    read_inner(path, input, rate_hz, None)
}

/// Reads CSV; `size_hint` (bytes of input) lets the leads be allocated once, from the first row's length.
fn read_inner(
    path: &Path,
    mut input: impl BufRead,
    rate_hz: Option<f64>,
    size_hint: Option<u64>,
) -> Result<Opened, ReadError> {
    let err = |line: usize, what: String| ReadError::invalid(path, format!("line {line}: {what}"));
    let uneven = |line: usize, step: f64, first: f64| {
        err(
            line,
            format!(
                "time_s: step {step:.6} s differs from the first step {first:.6} s (the samples must be evenly \
                 spaced; for times too coarsely rounded to show it, leave out the time_s column and give the rate)"
            ),
        )
    };
    let mut raw = Vec::new();
    let mut line_no = 0usize;
    // Reads the next line into `raw`; false at the end of the input.
    let mut next_line = |raw: &mut Vec<u8>, line_no: &mut usize| -> Result<bool, ReadError> {
        raw.clear();
        let n = std::io::Read::take(&mut input, MAX_LINE as u64 + 1)
            .read_until(b'\n', raw)
            .map_err(|e| ReadError::io(path, e))?;
        *line_no += 1;
        if raw.len() > MAX_LINE {
            return Err(err(*line_no, format!("line longer than {MAX_LINE} bytes")));
        }
        while raw.last().is_some_and(|b| *b == b'\n' || *b == b'\r') {
            raw.pop();
        }
        Ok(n > 0)
    };
    let header = loop {
        if !next_line(&mut raw, &mut line_no)? {
            return Err(ReadError::invalid(path, "no header row of lead names"));
        }
        let text = std::str::from_utf8(&raw).map_err(|_| err(line_no, "not UTF-8 text".into()))?;
        // Spreadsheet programs often start UTF-8 files with a byte-order mark.
        let text = text.strip_prefix('\u{feff}').unwrap_or(text);
        if !text.trim().is_empty() && !text.trim_start().starts_with('#') {
            break text.to_string();
        }
    };
    let header_line = line_no;
    let names: Vec<String> = cells(&header).map(str::to_string).collect();
    // Spreadsheets set to a decimal comma write semicolons (or tabs) between the columns, and commas inside the
    // numbers; no lead name holds either.
    if let Some(sep) =
        [(';', "semicolons"), ('\t', "tabs")].iter().find(|(c, _)| names.iter().any(|n| n.contains(*c))).map(|s| s.1)
    {
        return Err(err(
            header_line,
            format!(
                "the columns are separated by {sep}; Isoline reads comma-separated values with '.' as the decimal point"
            ),
        ));
    }
    let mut time_col = None;
    let mut lead_names: Vec<(usize, LeadName)> = Vec::new();
    for (c, name) in names.iter().enumerate() {
        if name.is_empty() {
            return Err(err(header_line, format!("column {}: empty column name", c + 1)));
        }
        if name.eq_ignore_ascii_case("time_s") {
            if time_col.replace(c).is_some() {
                return Err(err(header_line, format!("column {}: a second time_s column", c + 1)));
            }
            continue;
        }
        let lead = LeadName::parse(name);
        if lead_names.iter().any(|(_, l)| *l == lead) {
            return Err(err(header_line, format!("column {}: lead {lead} appears twice", c + 1)));
        }
        lead_names.push((c, lead));
    }
    if lead_names.is_empty() {
        return Err(err(header_line, "no lead columns in the header row".into()));
    }
    // A monitor's export may hold other signals beside the ECG (a pulse wave, respiration, pressures): columns
    // named as one are left out, and said so (a PLETH column measured as a lead gave QT 706 ms). Any other name
    // is a lead: Frank leads (vx, vy, vz), MCL1, CM5 or a device's channel numbers.
    let mut warnings = Vec::new();
    lead_names.retain(|(c, _)| {
        let other = is_other_signal(&names[*c]);
        if other {
            warnings.push(format!(
                "{}: column {} ('{}') skipped: not an ECG lead",
                path.display(),
                c + 1,
                crate::io::printable(&names[*c])
            ));
        }
        !other
    });
    if lead_names.is_empty() {
        return Err(err(header_line, "no ECG lead columns in the header row".into()));
    }
    let mut samples: Vec<Vec<f32>> = vec![Vec::new(); lead_names.len()];
    // Per lead: how many values lie beyond ABSURD_UV, and where the first ABSURD_KEPT of them are (sample, line).
    let mut absurd: Vec<(usize, Vec<(usize, usize)>)> = vec![(0, Vec::new()); lead_names.len()];
    let (mut t_first, mut t_prev, mut dt0) = (None::<f64>, 0.0f64, None::<f64>);
    // The rounding of the time stamps, s: 10^−(the most decimals written so far; a writer that drops trailing
    // zeros writes 0.5 for 0.500). A device writing 3 decimals at 360 Hz writes steps of 0.003 and 0.002 s for
    // 2.78 ms. Until a time with decimals comes, 6 decimals, as Isoline writes.
    let mut decimals: Option<usize> = None;
    // The shortest and longest steps with their lines, for the check at the end.
    let (mut shortest, mut longest) = ((f64::INFINITY, 0usize), (0.0f64, 0usize));
    let mut rows = 0usize;
    while next_line(&mut raw, &mut line_no)? {
        let text = std::str::from_utf8(&raw).map_err(|_| err(line_no, "not UTF-8 text".into()))?;
        if text.trim().is_empty() {
            continue;
        }
        if rows == 0
            && let Some(hint) = size_hint
        {
            // Rows of one file have about the same length; 25 % spare. Untouched spare costs no memory, and
            // the final shrink returns it.
            let est = (hint / (raw.len() as u64 + 1)).saturating_mul(5) / 4 + 16;
            let est = est.min(MAX_TOTAL_SAMPLES / lead_names.len() as u64) as usize;
            samples.iter_mut().for_each(|s| s.reserve_exact(est));
        }
        let row: Vec<&str> = cells(text).collect();
        if row.len() != names.len() {
            return Err(err(line_no, format!("{} columns, the header row has {}", row.len(), names.len())));
        }
        if (rows as u64 + 1) * lead_names.len() as u64 > MAX_TOTAL_SAMPLES {
            return Err(err(line_no, format!("more than {MAX_TOTAL_SAMPLES} samples")));
        }
        let bad = |c: usize, why: &str| {
            err(
                line_no,
                format!(
                    "column {} ('{}'): '{}' {why}",
                    c + 1,
                    crate::io::printable(&names[c]),
                    crate::io::printable(row[c])
                ),
            )
        };
        if let Some(tc) = time_col {
            let t = value(row[tc]).map_err(|why| bad(tc, why))?.ok_or_else(|| bad(tc, "is not a number"))?;
            decimals = decimals.max(decimals_written(row[tc]));
            let t_unit = 10f64.powi(-(decimals.unwrap_or(6).min(12) as i32));
            match (t_first, dt0) {
                (None, _) => t_first = Some(t),
                (Some(_), None) => {
                    if t <= t_prev {
                        return Err(err(line_no, format!("column {} (time_s): {t} does not increase", tc + 1)));
                    }
                    dt0 = Some(t - t_prev);
                }
                (Some(_), Some(dt)) => {
                    // Tolerance: 1 % of the step plus the rounding of the times: a step between rounded times is
                    // the true step rounded down or up to a whole unit of the last decimal written, so two steps
                    // differ by at most one unit (see the check after the last row for steps that are whole).
                    if t <= t_prev || ((t - t_prev) - dt).abs() > 0.01 * dt + t_unit + 1e-9 {
                        return Err(uneven(line_no, t - t_prev, dt));
                    }
                }
            }
            if t_first.is_some() && dt0.is_some() {
                let step = t - t_prev;
                if step < shortest.0 {
                    shortest = (step, line_no);
                }
                if step > longest.0 {
                    longest = (step, line_no);
                }
            }
            t_prev = t;
        }
        for (k, &(c, _)) in lead_names.iter().enumerate() {
            let v = value(row[c]).map_err(|why| bad(c, why))?.map_or(f32::NAN, |mv| (mv * 1000.0) as f32);
            if v.abs() > ABSURD_UV {
                absurd[k].0 += 1;
                if absurd[k].1.len() < ABSURD_KEPT {
                    absurd[k].1.push((samples[k].len(), line_no));
                }
            }
            samples[k].push(v);
        }
        rows += 1;
    }
    if rows == 0 {
        return Err(err(line_no, "no data rows".into()));
    }
    // Where the true step is a whole number of units of the times as written (2 ms written to the ms), every step
    // is that step: one twice as long is a missing row, which the one-unit tolerance above lets through at 1000 Hz.
    // The true step is known from the first and last times to a unit over the number of steps; 20 rows at least.
    if let (Some(t0), Some(dt)) = (t_first, dt0)
        && rows >= 20
    {
        let unit = 10f64.powi(-(decimals.unwrap_or(6).min(12) as i32));
        let true_step = (t_prev - t0) / (rows - 1) as f64;
        let units = true_step / unit;
        let whole = (units - units.round()).abs() <= 0.05_f64.max(2.0 / (rows - 1) as f64);
        if whole && longest.0 - shortest.0 > 0.01 * true_step + 1e-9 {
            let (step, line) = if longest.0 - true_step > true_step - shortest.0 { longest } else { shortest };
            return Err(uneven(line, step, dt));
        }
    }
    let from_time = match (t_first, rows) {
        (Some(t0), n) if n >= 2 => {
            let fs = (n - 1) as f64 / (t_prev - t0);
            Some(if (fs - fs.round()).abs() < 1e-3 * fs { fs.round() } else { fs })
        }
        _ => None,
    };
    let fs = match (rate_hz, from_time) {
        (Some(given), Some(t)) if (given - t).abs() > 1e-3 * given => {
            return Err(ReadError::invalid(path, format!("time_s gives {t} Hz but the rate given is {given} Hz")));
        }
        (Some(given), _) => given,
        (None, Some(t)) => t,
        (None, None) => {
            return Err(ReadError::invalid(
                path,
                "no time_s column with two or more rows: give the sampling rate (--rate)",
            ));
        }
    };
    let source = if rate_hz.is_some() { "--rate" } else { "time_s column" };
    let sample_rate = Hertz::for_ecg(fs).map_err(|e| ReadError::invalid(path, format!("{source}: {e}")))?;
    for s in &mut samples {
        s.shrink_to_fit();
    }
    // A stray absurd value (a slip of units or a typing error in one cell) would otherwise ruin the lead's filters
    // and every measurement with no word said; many of them are a unit problem the amplitude note names.
    for ((k, (count, found)), (_, name)) in absurd.iter().enumerate().zip(&lead_names) {
        let Some(&(_, first_line)) = found.first() else { continue };
        if *count > found.len() || *count > (rows / ABSURD_SHARE).max(1) {
            continue;
        }
        for &(i, _) in found {
            samples[k][i] = f32::NAN;
        }
        warnings.push(format!(
            "{}: lead {}: {} beyond ±1 V (first on line {first_line}) read as missing: no ECG reaches it",
            path.display(),
            crate::io::printable(&name.to_string()),
            if found.len() == 1 { "1 value".to_string() } else { format!("{} values", found.len()) }
        ));
    }
    let leads = lead_names.into_iter().zip(samples).map(|((_, name), samples)| Lead { name, samples }).collect();
    let recording = Recording { leads, sample_rate, start: None, meta: Meta::default(), annotations: Vec::new() };
    Ok(Opened { recording, format: Format::Csv, files: vec![path.to_path_buf()], warnings })
}

/// Signals a patient monitor exports beside the ECG, by their column name (compared case-insensitively, a number
/// may follow: `ART1`): pulse oximetry, respiration, pressures, temperature, CO2, and the heart-rate trend.
// Common practice, no source: the names monitors and PhysioNet's multi-signal databases use for them.
const OTHER_SIGNALS: [&str; 15] =
    ["PLETH", "PPG", "SPO2", "RESP", "ABP", "ART", "CVP", "PAP", "ICP", "NIBP", "TEMP", "CO2", "ETCO2", "PULSE", "HR"];

/// True when a column name names a signal other than an ECG lead ([`OTHER_SIGNALS`]).
fn is_other_signal(name: &str) -> bool {
    let word: String = name.trim().to_ascii_uppercase().chars().take_while(char::is_ascii_alphanumeric).collect();
    OTHER_SIGNALS.iter().any(|o| word.strip_prefix(o).is_some_and(|rest| rest.bytes().all(|b| b.is_ascii_digit())))
}

/// Digits written after the decimal point of a number; `None` without a decimal point (`0`) and in exponent
/// notation (`1.5e-3`, whose rounding the digits do not tell).
fn decimals_written(cell: &str) -> Option<usize> {
    if cell.contains(['e', 'E']) {
        return None;
    }
    cell.split_once('.').map(|(_, f)| f.bytes().take_while(u8::is_ascii_digit).count())
}

/// Appends `scaled / 10^decimals` in fixed point (`-0.0500` for −500 with 4 decimals).
fn push_fixed(out: &mut Vec<u8>, scaled: i64, decimals: u32) {
    let unit = 10u64.pow(decimals);
    let mag = scaled.unsigned_abs();
    if scaled < 0 {
        out.push(b'-');
    }
    let (int, frac) = (mag / unit, mag % unit);
    out.extend(int.to_string().as_bytes());
    out.push(b'.');
    let frac = frac.to_string();
    out.extend(std::iter::repeat_n(b'0', decimals as usize - frac.len()));
    out.extend(frac.as_bytes());
}

/// Writes `rec` as CSV: `time_s` (6 decimals), then one column per lead in mV with 4 decimals.
///
/// # Errors
/// Any error of `out`.
pub fn write_to(out: &mut impl Write, rec: &Recording) -> std::io::Result<()> {
    let names: Vec<String> =
        rec.leads.iter().map(|l| l.name.to_string().replace([',', '"', '\n', '\r'], " ")).collect();
    writeln!(out, "time_s,{}", names.join(","))?;
    let fs = rec.sample_rate.hz();
    let mut row = Vec::with_capacity(16 * (rec.leads.len() + 1));
    for k in 0..rec.len() {
        row.clear();
        // Time in µs, value in 0.1 µV = 10⁻⁴ mV: integers, printed in fixed point.
        push_fixed(&mut row, (k as f64 * 1.0e6 / fs).round() as i64, 6);
        for l in &rec.leads {
            row.push(b',');
            if let Some(v) = l.samples.get(k).filter(|v| v.is_finite()) {
                push_fixed(&mut row, (f64::from(*v) * 10.0).round() as i64, 4);
            }
        }
        row.push(b'\n');
        out.write_all(&row)?;
    }
    Ok(())
}

/// Writes `rec` as CSV to `path`, atomically (temporary file in the same folder, then rename).
///
/// # Errors
/// [`ReadError::Io`] naming `path`.
pub fn write(path: &Path, rec: &Recording) -> Result<(), ReadError> {
    write_atomic(path, |w| write_to(w, rec))
}

#[cfg(test)]
mod tests {
    use super::*;

    fn parse(text: &str, rate: Option<f64>) -> Result<Opened, ReadError> {
        read_from(Path::new("t.csv"), text.as_bytes(), rate)
    }

    #[test]
    fn reads_time_and_names() -> Result<(), ReadError> {
        let o =
            parse("# made by hand\ntime_s,avr,Lead II,MLII\n0.000,0.5,-1,\n0.004,0.25,1.5,2\n0.008,0,0,NaN\n", None)?;
        let r = &o.recording;
        assert_eq!(r.sample_rate.hz(), 250.0);
        assert_eq!(r.leads[0].name.to_string(), "aVR");
        assert_eq!(r.leads[1].name.to_string(), "II");
        assert_eq!(r.leads[2].name.to_string(), "MLII");
        assert_eq!(r.leads[1].samples, vec![-1000.0, 1500.0, 0.0]);
        assert!(r.leads[2].samples[0].is_nan() && r.leads[2].samples[2].is_nan());
        Ok(())
    }

    #[test]
    fn a_stray_value_beyond_a_volt_is_a_missing_sample_and_said_so() -> Result<(), ReadError> {
        // 2000 rows of a 1 mV sine in I and II; one cell of II (line 502) holds 1e6 mV (a helper's test: QT 500 →
        // 674 ms and no word said). It is read as missing, with a warning naming the lead and the line.
        let row = |k: usize, ii: &str| format!("{:.3},{ii}\n", (k as f64 * 0.05).sin());
        let mut text = String::from("I,II\n");
        for k in 0..2000 {
            let ii = if k == 500 { "1e6".to_string() } else { format!("{:.3}", (k as f64 * 0.05).cos()) };
            text.push_str(&row(k, &ii));
        }
        let o = parse(&text, Some(500.0))?;
        assert!(o.recording.leads[1].samples[500].is_nan());
        assert_eq!(o.recording.leads[1].samples.iter().filter(|v| v.is_nan()).count(), 1);
        assert!(
            o.warnings.len() == 1 && o.warnings[0].contains("lead II") && o.warnings[0].contains("line 502"),
            "{:?}",
            o.warnings
        );
        // Every value a thousand times too large (µV written as mV) is a unit problem: left as it is.
        let scaled: String = text
            .replace("1e6", "1")
            .lines()
            .enumerate()
            .map(|(i, l)| {
                if i == 0 {
                    format!("{l}\n")
                } else {
                    l.split(',')
                        .map(|v| format!("{}", v.parse::<f64>().unwrap_or(0.0) * 2e6))
                        .collect::<Vec<_>>()
                        .join(",")
                        + "\n"
                }
            })
            .collect();
        let o = parse(&scaled, Some(500.0))?;
        assert!(
            o.recording.leads[0].samples.iter().all(|v| v.is_finite()) && o.warnings.is_empty(),
            "{:?}",
            o.warnings
        );
        Ok(())
    }

    #[test]
    fn errors_name_line_and_column() {
        assert!(parse("\u{feff}time_s,I\n0,1\n0.004,2\n", None).is_ok(), "byte-order mark skipped");
        let e = parse("time_s,I\n0,1\n0.004,x\n", None).err().map(|e| e.to_string()).unwrap_or_default();
        assert!(e.contains("line 3") && e.contains("column 2"), "{e}");
        // Steps of 4 then 8 ms, written to the ms: more than the rounding of the times can make (2 ms at most).
        let e = parse("time_s,I\n0,1\n0.004,1\n0.012,1\n", None).err().map(|e| e.to_string()).unwrap_or_default();
        assert!(e.contains("line 4") && e.contains("time_s"), "{e}");
        // Written to the µs, 4 then 6 ms is uneven too.
        assert!(parse("time_s,I\n0,1\n0.004000,1\n0.010000,1\n", None).is_err());
        let e = parse("I,II\n1,2\n", None).err().map(|e| e.to_string()).unwrap_or_default();
        assert!(e.contains("--rate"), "{e}");
        assert!(parse("I,II\n1,2\n", Some(500.0)).is_ok());
        assert!(parse("time_s,I\n0,1\n0.004,1\n", Some(500.0)).is_err(), "rates disagree");
        assert!(parse("I,i\n1,2\n", Some(500.0)).is_err(), "duplicate lead");
        assert!(parse("I,II\n1,2,3\n", Some(500.0)).is_err());
        // NA is a missing sample; 1e308 mV and inf are no samples at all.
        let o = parse("I,II\nNA,2\nna,3\n", Some(500.0)).map_err(|e| e.to_string());
        assert!(o.is_ok_and(|o| o.recording.leads[0].samples.iter().all(|v| v.is_nan())));
        for (bad, why) in [("1e308", "too large"), ("inf", "not a number"), ("-1e40", "too large")] {
            let e = parse(&format!("I,II\n{bad},2\n"), Some(500.0)).err().map(|e| e.to_string()).unwrap_or_default();
            assert!(e.contains("line 2") && e.contains(bad) && e.contains(why), "{bad}: {e}");
        }
        // A spreadsheet's decimal-comma export: the separator is named, not "'0;0,5' is not a number".
        let cases = [
            ("time_s;I;II\n0;0,5;1\n", "semicolons"),
            ("time_s\tI\n0\t1\n", "tabs"),
            // No header row at all: its first line of numbers has commas as decimal points.
            ("0;0,5;1\n0,002;0,6;1\n", "semicolons"),
        ];
        for (text, sep) in cases {
            let e = parse(text, None).err().map(|e| e.to_string()).unwrap_or_default();
            assert!(e.contains("line 1") && e.contains(sep) && e.contains("comma-separated"), "{e}");
        }
    }

    #[test]
    fn other_signals_beside_named_leads_are_left_out_and_said() -> Result<(), ReadError> {
        let o = parse("time_s,II,PLETH,V5,Resp\n0,1,50,2,7\n0.004,1,51,2,7\n", None)?;
        let names: Vec<String> = o.recording.leads.iter().map(|l| l.name.to_string()).collect();
        assert_eq!(names, ["II", "V5"]);
        assert_eq!(o.warnings.len(), 2);
        assert!(o.warnings[0].contains("column 3 ('PLETH') skipped"), "{:?}", o.warnings);
        // Any other name is a lead: channels numbered by a device, Frank leads, MCL1, even ARTIFACT (not ART1).
        let o = parse("time_s,ch1,vx,vz,MCL1,ARTIFACT\n0,1,2,3,4,5\n0.004,1,2,3,4,5\n", None)?;
        assert_eq!((o.recording.leads.len(), o.warnings.len()), (5, 0), "{:?}", o.warnings);
        assert!(parse("time_s,ABP,HR\n0,1,2\n0.004,1,2\n", None).is_err(), "no lead at all");
        assert!(is_other_signal("ART1") && is_other_signal(" SpO2") && is_other_signal("Resp (Ohm)"));
        assert!(!is_other_signal("ARTIFACT") && !is_other_signal("V1") && !is_other_signal("aVR"));
        Ok(())
    }

    #[test]
    fn time_stamps_rounded_by_the_device_are_read() -> Result<(), ReadError> {
        // 360 Hz written with 3 and 4 decimals (steps 0.003/0.002 s for 2.78 ms), 128 Hz with 3 decimals: the
        // rate comes from the first and last time.
        for (fs, decimals) in [(360.0, 3), (360.0, 4), (128.0, 3)] {
            let mut text = String::from("time_s,II\n");
            for k in 0..720 {
                text.push_str(&format!("{:.*},{}\n", decimals, f64::from(k) / fs, k % 7));
            }
            let o = parse(&text, None)?;
            assert_eq!(o.recording.sample_rate.hz(), fs, "{decimals} decimals");
            assert_eq!(o.recording.len(), 720);
        }
        // A row missing from such a file is still found: at 360 Hz a double step (5.6 ms) is beyond rounding; at 500
        // and 1000 Hz written to the ms, where every step is whole, a step of two is one too many.
        for fs in [360.0, 500.0, 1000.0] {
            let mut text = String::from("time_s,II\n");
            for k in (0..100).filter(|&k| k != 50) {
                text.push_str(&format!("{:.3},1\n", f64::from(k) / fs));
            }
            let e = parse(&text, None).err().map(|e| e.to_string()).unwrap_or_default();
            assert!(e.contains("line 52") && e.contains("evenly spaced"), "{fs} Hz: {e}");
        }
        assert_eq!(decimals_written("0.002"), Some(3));
        assert_eq!((decimals_written("0"), decimals_written("1.5e-3")), (None, None));
        Ok(())
    }

    #[test]
    fn fixed_point_matches_format() {
        for (v, d) in [(0i64, 4u32), (-500, 4), (12_345_678, 4), (-1, 6), (999_999, 6), (1_000_000, 6)] {
            let mut out = Vec::new();
            push_fixed(&mut out, v, d);
            let expected = format!("{:.*}", d as usize, v as f64 / 10f64.powi(d as i32));
            let expected = if expected.starts_with("-0") && v == 0 { expected[1..].to_string() } else { expected };
            assert_eq!(String::from_utf8_lossy(&out), expected);
        }
    }

    #[test]
    fn round_trip_to_a_tenth_of_a_microvolt() -> Result<(), Box<dyn std::error::Error>> {
        let o = parse("time_s,I,V1\n0,0.12346,-3.2\n0.002,1.00004,\n0.004,-0.5,7\n", None)?;
        let mut out = Vec::new();
        write_to(&mut out, &o.recording)?;
        let text = String::from_utf8(out)?;
        assert!(text.starts_with("time_s,I,V1\n0.000000,0.1235,-3.2000\n0.002000,1.0000,\n"), "{text}");
        let back = parse(&text, None)?;
        assert_eq!(back.recording.sample_rate.hz(), 500.0);
        for (a, b) in o.recording.leads[0].samples.iter().zip(&back.recording.leads[0].samples) {
            assert!((a - b).abs() <= 0.05 + 1e-3, "{a} {b}");
        }
        Ok(())
    }
}
