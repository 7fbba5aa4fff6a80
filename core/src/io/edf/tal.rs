//! EDF+ time-stamped annotation lists (TALs), Kemp & Olivan 2003 §2.2.
//!
//! A TAL is `+onset[\x15duration]\x14text\x14text\x14…\x00`: onset in seconds from the file's start (sign
//! required), optional duration, then annotations each closed by `\x14`, the TAL closed by `\x00`. Unused bytes
//! of the annotation signal are `\x00`. The first TAL of every data record is the record's time-keeping TAL: its
//! onset is the record's start time and its first annotation is empty.

/// One annotation read from a TAL.
#[derive(Debug, Clone, PartialEq)]
pub struct TalAnnotation {
    /// Onset in seconds from the start of the file.
    pub onset_s: f64,
    /// Duration in seconds, if given.
    pub duration_s: Option<f64>,
    /// Annotation text (UTF-8).
    pub text: String,
}

/// The TALs of one data record.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct RecordTals {
    /// Start time of the record from its time-keeping TAL, seconds.
    pub record_start_s: Option<f64>,
    /// The annotations (not the time-keeping entry).
    pub annotations: Vec<TalAnnotation>,
}

/// Parses a signed decimal number as TALs write it (`+12.5`, `-0.25`).
fn parse_time(s: &[u8], signed: bool) -> Option<f64> {
    let text = std::str::from_utf8(s).ok()?;
    let body = if signed { text.strip_prefix(['+', '-'])? } else { text };
    if body.is_empty() || !body.bytes().all(|b| b.is_ascii_digit() || b == b'.') || body.matches('.').count() > 1 {
        return None;
    }
    let v: f64 = body.parse().ok()?;
    Some(if text.starts_with('-') { -v } else { v })
}

/// Parses the bytes of the annotation signal in one data record. `base` is the file byte offset of `bytes`,
/// used in messages.
///
/// # Errors
/// A message naming the byte offset of a malformed TAL.
pub fn parse_record(bytes: &[u8], base: u64) -> Result<RecordTals, String> {
    let mut out = RecordTals::default();
    let mut at = 0usize;
    while at < bytes.len() {
        if bytes[at] == 0 {
            at += 1;
            continue;
        }
        let end = bytes[at..].iter().position(|&b| b == 0).map_or(bytes.len(), |p| at + p);
        let tal = &bytes[at..end];
        let here = base + at as u64;
        if end == bytes.len() {
            return Err(format!("byte {here}: TAL not closed by a 0 byte"));
        }
        let Some(first_sep) = tal.iter().position(|&b| b == 0x14) else {
            return Err(format!("byte {here}: TAL without a 0x14 after its onset"));
        };
        let (time, rest) = (&tal[..first_sep], &tal[first_sep + 1..]);
        let (onset_raw, dur_raw) = match time.iter().position(|&b| b == 0x15) {
            Some(p) => (&time[..p], Some(&time[p + 1..])),
            None => (time, None),
        };
        let onset_s = parse_time(onset_raw, true)
            .ok_or_else(|| format!("byte {here}: TAL onset '{}' is not +seconds", onset_raw.escape_ascii()))?;
        let duration_s = match dur_raw {
            Some(d) => Some(
                parse_time(d, false)
                    .ok_or_else(|| format!("byte {here}: TAL duration '{}' is not seconds", d.escape_ascii()))?,
            ),
            None => None,
        };
        if !rest.is_empty() && rest.last() != Some(&0x14) {
            return Err(format!("byte {here}: TAL annotation not closed by 0x14"));
        }
        let texts: Vec<&[u8]> =
            if rest.is_empty() { Vec::new() } else { rest[..rest.len() - 1].split(|&b| b == 0x14).collect() };
        let timekeeping = out.record_start_s.is_none();
        for (k, t) in texts.iter().enumerate() {
            if timekeeping && k == 0 && t.is_empty() {
                out.record_start_s = Some(onset_s);
                continue;
            }
            if t.is_empty() {
                continue;
            }
            out.annotations.push(TalAnnotation { onset_s, duration_s, text: String::from_utf8_lossy(t).into_owned() });
        }
        if timekeeping && out.record_start_s.is_none() {
            return Err(format!(
                "byte {here}: the record's first TAL is not a time-keeping TAL (empty first annotation)"
            ));
        }
        at = end + 1;
    }
    Ok(out)
}

/// Formats seconds as a TAL time: sign for onsets, at most 6 decimals, no trailing zeros.
#[must_use]
pub fn format_time(s: f64, signed: bool) -> String {
    let mut t = format!("{:.6}", s.abs());
    if t.contains('.') {
        t = t.trim_end_matches('0').trim_end_matches('.').to_string();
    }
    match (signed, s < 0.0 && t != "0") {
        (true, true) => format!("-{t}"),
        (true, false) => format!("+{t}"),
        (false, _) => t,
    }
}

/// The time-keeping TAL of a record starting at `start_s`.
#[must_use]
pub fn timekeeping(start_s: f64) -> Vec<u8> {
    let mut v = format_time(start_s, true).into_bytes();
    v.extend([0x14, 0x14, 0]);
    v
}

/// One annotation as a TAL. Control bytes 0x00, 0x14 and 0x15 in the text become spaces.
#[must_use]
pub fn annotation(onset_s: f64, duration_s: Option<f64>, text: &str) -> Vec<u8> {
    let mut v = format_time(onset_s, true).into_bytes();
    if let Some(d) = duration_s.filter(|d| d.is_finite() && *d >= 0.0) {
        v.push(0x15);
        v.extend(format_time(d, false).bytes());
    }
    v.push(0x14);
    v.extend(text.bytes().map(|b| if matches!(b, 0 | 0x14 | 0x15) { b' ' } else { b }));
    v.extend([0x14, 0]);
    v
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn parses_the_specification_example() -> Result<(), String> {
        // From memory: the TAL examples of Kemp & Olivan 2003 §2.2: `+180\x14Lights off\x14Close door\x14\x00` and
        // `+1800.2\x1525.5\x14Apnea\x14\x00`, after a record's time-keeping TAL.
        let mut b = b"+0\x14\x14\x00".to_vec();
        b.extend(b"+180\x14Lights off\x14Close door\x14\x00");
        b.extend(b"+1800.2\x1525.5\x14Apnea\x14\x00");
        b.extend([0, 0, 0]);
        let r = parse_record(&b, 0)?;
        assert_eq!(r.record_start_s, Some(0.0));
        assert_eq!(r.annotations.len(), 3);
        assert_eq!(r.annotations[1].text, "Close door");
        assert_eq!(r.annotations[1].onset_s, 180.0);
        assert_eq!((r.annotations[2].onset_s, r.annotations[2].duration_s), (1800.2, Some(25.5)));
        Ok(())
    }

    #[test]
    fn rejects_malformed_tals() {
        assert!(parse_record(b"0\x14\x14\x00", 0).is_err(), "onset needs a sign");
        assert!(parse_record(b"+0\x14\x14", 0).is_err(), "unclosed");
        assert!(parse_record(b"+1x\x14\x14\x00", 0).is_err());
        assert!(parse_record(b"+1\x14text\x00", 0).is_err(), "text not closed by 0x14");
        assert!(parse_record(b"+1\x14Apnea\x14\x00", 0).is_err(), "first TAL must keep time");
    }

    #[test]
    fn writes_what_it_reads() -> Result<(), String> {
        let mut b = timekeeping(12.5);
        b.extend(annotation(12.75, Some(0.5), "N"));
        b.extend(annotation(13.004, None, "bad\x14text"));
        let r = parse_record(&b, 0)?;
        assert_eq!(r.record_start_s, Some(12.5));
        assert_eq!(r.annotations[0], TalAnnotation { onset_s: 12.75, duration_s: Some(0.5), text: "N".into() });
        assert_eq!(r.annotations[1].text, "bad text");
        assert_eq!(format_time(-0.25, true), "-0.25");
        Ok(())
    }
}
