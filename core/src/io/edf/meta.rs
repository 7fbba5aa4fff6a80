//! Patient and recording fields and the start date/time of an EDF header.
//!
//! EDF+ (Kemp & Olivan 2003 §2.1.3): patient = `code sex birthdate name …`, recording = `Startdate dd-MMM-yyyy
//! admincode technician equipment …`; subfields separated by spaces, spaces inside a subfield written `_`,
//! `X` for unknown. Start date `dd.mm.yy` with years 85–99 meaning 1985–1999 and 00–84 meaning 2000–2084.

use crate::recording::Meta;

const MONTHS: [&str; 12] = ["JAN", "FEB", "MAR", "APR", "MAY", "JUN", "JUL", "AUG", "SEP", "OCT", "NOV", "DEC"];

fn subfield(s: Option<&str>) -> Option<String> {
    s.filter(|v| *v != "X" && !v.is_empty()).map(|v| v.replace('_', " "))
}

/// True when a plain EDF patient field is written the EDF+ way, as many writers do, Isoline among them (a
/// recording without annotations is written as plain EDF): at least four subfields, the sex `M`, `F` or `X`
/// and the birth date `dd-MMM-yyyy` or `X`. Free text such as "John F Smith 1950" is not taken for it.
fn plus_style_patient(patient: &str) -> bool {
    let p: Vec<&str> = patient.split_whitespace().collect();
    let date = |d: &str| {
        let f: Vec<&str> = d.split('-').collect();
        d == "X"
            || (f.len() == 3
                && f[0].len() == 2
                && MONTHS.contains(&f[1].to_ascii_uppercase().as_str())
                && f[2].len() == 4
                && [f[0], f[2]].iter().all(|n| n.bytes().all(|b| b.is_ascii_digit())))
    };
    p.len() >= 4 && matches!(p[1], "M" | "F" | "X") && date(p[2])
}

/// Fills `Meta` from the patient and recording fields. `plus` = the file is EDF+ (structured subfields); a plain
/// EDF file whose patient field is written the EDF+ way is read the same way.
#[must_use]
pub fn parse_meta(patient: &str, recording: &str, plus: bool) -> Meta {
    let mut meta = Meta::default();
    let recording_info = (!recording.is_empty()).then(|| recording.to_string());
    if plus || plus_style_patient(patient) {
        let p: Vec<&str> = patient.split_whitespace().collect();
        meta.patient_id = subfield(p.first().copied());
        meta.sex = subfield(p.get(1).copied());
        meta.birth_date = subfield(p.get(2).copied());
        meta.patient_name = subfield(p.get(3).copied());
        let r: Vec<&str> = recording.split_whitespace().collect();
        if r.first() == Some(&"Startdate") {
            meta.device = subfield(r.get(4).copied());
        }
    } else if !patient.is_empty() {
        meta.patient_id = Some(patient.to_string());
    }
    meta.recording_info = recording_info;
    meta
}

/// The full start date from an EDF+ recording field (`Startdate 02-MAR-2002 …`), if given.
fn startdate_subfield(recording: &str) -> Option<time::Date> {
    let mut r = recording.split_whitespace();
    if r.next()? != "Startdate" {
        return None;
    }
    let d = r.next()?;
    let mut p = d.split('-');
    let day: u8 = p.next()?.parse().ok()?;
    let mon = p.next()?.to_ascii_uppercase();
    let year: i32 = p.next()?.parse().ok()?;
    let month = MONTHS.iter().position(|m| *m == mon)?;
    let month = time::Month::try_from(u8::try_from(month + 1).ok()?).ok()?;
    time::Date::from_calendar_date(year, month, day).ok()
}

/// Start of the recording from the header's date and time fields (and the EDF+ `Startdate` subfield, which
/// carries the full year). `None` when the fields do not parse, or when the recording field says the date is
/// unknown (`Startdate X`: the header's date fields then hold a placeholder, 01.01.85).
#[must_use]
pub fn parse_start(start_date: &str, start_time: &str, recording: &str) -> Option<time::PrimitiveDateTime> {
    if recording.split_whitespace().take(2).eq(["Startdate", "X"]) {
        return None;
    }
    let nums = |s: &str| -> Option<[u8; 3]> {
        let v: Vec<u8> = s.split(['.', ':']).map(|x| x.trim().parse().ok()).collect::<Option<_>>()?;
        <[u8; 3]>::try_from(v).ok()
    };
    let [h, mi, s] = nums(start_time)?;
    let time = time::Time::from_hms(h, mi, s).ok()?;
    let date = match startdate_subfield(recording) {
        Some(d) => d,
        None => {
            let [d, mo, y] = nums(start_date)?;
            let year = if y >= 85 { 1900 + i32::from(y) } else { 2000 + i32::from(y) };
            time::Date::from_calendar_date(year, time::Month::try_from(mo).ok()?, d).ok()?
        }
    };
    Some(time::PrimitiveDateTime::new(date, time))
}

fn sub(v: Option<&str>) -> String {
    match v.map(str::trim).filter(|s| !s.is_empty()) {
        Some(s) => s.replace(' ', "_").chars().map(|c| if c.is_ascii_graphic() { c } else { '_' }).collect(),
        None => "X".into(),
    }
}

/// The EDF+ patient field for `meta` (`X` for what is unknown).
#[must_use]
pub fn patient_field(meta: &Meta) -> String {
    let sex = match meta.sex.as_deref().map(str::to_ascii_uppercase).as_deref() {
        Some("F" | "FEMALE") => "F",
        Some("M" | "MALE") => "M",
        _ => "X",
    };
    format!(
        "{} {sex} {} {}",
        sub(meta.patient_id.as_deref()),
        sub(meta.birth_date.as_deref()),
        sub(meta.patient_name.as_deref())
    )
}

/// The EDF+ recording field: start date (or `X`), admin code and technician unknown, equipment.
#[must_use]
pub fn recording_field(start: Option<time::PrimitiveDateTime>, meta: &Meta) -> String {
    let date = start.map_or_else(
        || "X".to_string(),
        |s| format!("{:02}-{}-{:04}", s.day(), MONTHS[usize::from(u8::from(s.month())) - 1], s.year()),
    );
    format!("Startdate {date} X X {}", sub(meta.device.as_deref()))
}

/// Header start date `dd.mm.yy` and time `hh.mm.ss`; `01.01.85 00.00.00` when unknown (Kemp & Olivan 2003
/// give 01.01.85 as the date to write when it is unknown or withheld).
#[must_use]
pub fn start_fields(start: Option<time::PrimitiveDateTime>) -> (String, String) {
    match start {
        Some(s) => (
            format!("{:02}.{:02}.{:02}", s.day(), u8::from(s.month()), s.year().rem_euclid(100)),
            format!("{:02}.{:02}.{:02}", s.hour(), s.minute(), s.second()),
        ),
        None => ("01.01.85".into(), "00.00.00".into()),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn parses_edf_plus_subfields() {
        // From memory: the example fields of Kemp & Olivan 2003 §2.1.3.
        let m = parse_meta(
            "MCH-0234567 F 02-MAY-1951 Haagse_Harry",
            "Startdate 02-MAR-2002 PSG-1234/2002 NN Telemetry03",
            true,
        );
        assert_eq!(m.patient_id.as_deref(), Some("MCH-0234567"));
        assert_eq!(m.sex.as_deref(), Some("F"));
        assert_eq!(m.birth_date.as_deref(), Some("02-MAY-1951"));
        assert_eq!(m.patient_name.as_deref(), Some("Haagse Harry"));
        assert_eq!(m.device.as_deref(), Some("Telemetry03"));
        let s = parse_start("02.03.02", "14.05.09", "Startdate 02-MAR-2002 X X X");
        assert_eq!(s.map(|s| (s.year(), s.hour())), Some((2002, 14)));
        // Two-digit years: 85–99 → 19xx, 00–84 → 20xx (Kemp & Olivan 2003 §2.1.3.2, from memory).
        assert_eq!(parse_start("01.01.99", "00.00.00", "").map(|s| s.year()), Some(1999));
        assert_eq!(parse_start("01.01.84", "00.00.00", "").map(|s| s.year()), Some(2084));
        assert_eq!(parse_start("31.02.99", "00.00.00", ""), None);
        // An unknown start date: the header's 01.01.85 is a placeholder, not a date.
        assert_eq!(parse_start("01.01.85", "00.00.00", "Startdate X X X X"), None);
    }

    #[test]
    fn a_plain_edf_patient_field_written_the_edf_plus_way_is_read_that_way() {
        // A converted recording without annotations is plain EDF, its patient field "X F X X": the sex read back
        // (the QTc limits depend on it), not the whole field taken as a patient code.
        let m = parse_meta("X F X X", "Startdate X X X X", false);
        assert_eq!((m.sex.as_deref(), m.patient_id), (Some("F"), None));
        // A free-text patient field of a plain EDF file stays the patient code, also where a word is M or F.
        for text in ["Ward 3 bed 9", "John F Smith 1950", "Ana F 1990 de la Cruz"] {
            let m = parse_meta(text, "", false);
            assert_eq!((m.sex, m.patient_id.as_deref()), (None, Some(text)));
        }
        let m = parse_meta("W7-0042 M 01-JAN-1960 Made_Up_Person", "", false);
        assert_eq!((m.sex.as_deref(), m.birth_date.as_deref()), (Some("M"), Some("01-JAN-1960")));
    }

    #[test]
    fn writes_unknowns_as_x() {
        let m = Meta { sex: Some("female".into()), patient_name: Some("Test Person".into()), ..Meta::default() };
        assert_eq!(patient_field(&m), "X F X Test_Person");
        assert_eq!(patient_field(&m.deidentified()), "X F X X");
        assert_eq!(recording_field(None, &m), "Startdate X X X X");
    }
}
