//! What a recording carries beside its samples: descriptive metadata and annotations, and what of them a
//! de-identified copy keeps.

/// Descriptive data about the recording and the person recorded. Any of the person's may identify a patient;
/// [`Meta::deidentified`] keeps of it only sex and age (a great age as [`OLDEST_AGE_SHOWN`]), and keeps what is
/// about the signal alone (which leads are uncalibrated).
#[derive(Debug, Clone, Default, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct Meta {
    /// Patient code or identifier as stored in the file.
    pub patient_id: Option<String>,
    /// Patient name as stored in the file.
    pub patient_name: Option<String>,
    /// Sex as stored (`F`, `M`, free text).
    pub sex: Option<String>,
    /// Birth date as stored (free text, format varies by source).
    pub birth_date: Option<String>,
    /// Age in years, if the file gives it.
    pub age_years: Option<f64>,
    /// Free-text recording description (e.g. EDF recording field, WFDB comments).
    pub recording_info: Option<String>,
    /// Equipment, if known.
    pub device: Option<String>,
    /// Leads (indices into the recording's leads) whose file gives no gain, read at a default one: their
    /// amplitudes may be far from the truth ([`super::Recording::signal_notes`] says so).
    #[serde(default)]
    pub uncalibrated_leads: Vec<usize>,
}

/// In a de-identified copy, an age at or above this is written as this age ("90 or older").
// Source: HIPAA Privacy Rule, 45 CFR 164.514(b)(2)(i)(C) (from memory): ages over 89 are aggregated into a
// single category of 90 or older.
pub const OLDEST_AGE_SHOWN: f64 = 90.0;

impl Meta {
    /// A copy with every field that may identify a person removed (id, name, birth date, free-text comments,
    /// and the equipment, which files also use for the site's name). Sex and age are kept: they decide the usual
    /// ranges and do not identify on their own, except a great age, which is written as [`OLDEST_AGE_SHOWN`].
    #[must_use]
    pub fn deidentified(&self) -> Self {
        Self {
            patient_id: None,
            patient_name: None,
            sex: self.sex.clone(),
            birth_date: None,
            age_years: self.age_years.filter(|a| a.is_finite()).map(|a| a.min(OLDEST_AGE_SHOWN)),
            recording_info: None,
            device: None,
            uncalibrated_leads: self.uncalibrated_leads.clone(),
        }
    }
}

/// An annotation carried by the recording (WFDB annotation file, EDF+ annotation list).
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct Annotation {
    /// Sample index the annotation refers to.
    pub sample: u64,
    /// WFDB mnemonic (`N`, `V`, `(`, `)`, `p`, `t`, …) or EDF+ annotation text.
    pub label: String,
    /// WFDB `num` field (0 for P, 1 for QRS, 2 for T in wave-boundary files); 0 otherwise.
    pub num: i32,
    /// WFDB `chan` field; 0 otherwise.
    pub chan: i32,
    /// WFDB `subtyp` field; 0 otherwise.
    pub subtype: i32,
    /// WFDB auxiliary text, if any.
    pub aux: Option<String>,
    /// EDF+ duration in seconds, if any.
    pub duration_s: Option<f64>,
}

/// The text a de-identified copy writes for an annotation whose own text it withholds (see
/// [`Annotation::shareable_label`]).
pub const WITHHELD_LABEL: &str = "annotation";

impl Annotation {
    /// A plain annotation with only a sample and label.
    #[must_use]
    pub fn new(sample: u64, label: impl Into<String>) -> Self {
        Self { sample, label: label.into(), num: 0, chan: 0, subtype: 0, aux: None, duration_s: None }
    }

    /// The label as a de-identified copy may carry it: a fixed code (a WFDB beat or wave mnemonic such as `N` or
    /// `V`, or a rhythm code such as `(AFIB`, see [`crate::io::wfdb_annotations::is_code`]) as it is. Anything
    /// else is text someone typed, which may hold a name, initials or a bed, however short; `None` then (written
    /// as [`WITHHELD_LABEL`]).
    #[must_use]
    pub fn shareable_label(&self) -> Option<&str> {
        crate::io::wfdb_annotations::is_code(&self.label).then_some(self.label.as_str())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn only_annotation_codes_are_shareable() {
        for code in ["N", "V", "(", ")", "p", "~", "+", "\"", "(AFIB", "(N", "(SVTA", "(VFL", "(BII"] {
            assert_eq!(Annotation::new(0, code).shareable_label(), Some(code), "{code}");
        }
        // Short free text is still free text: initials, a short name, a bed.
        let texts =
            ["Lights off", "pt J. Smith moved", "Bob", "JS", "Ann", "(SMITH", "(BED4", "(Smith)", "", "N ", "n1"];
        for text in texts {
            assert_eq!(Annotation::new(0, text).shareable_label(), None, "{text}");
        }
    }

    #[test]
    fn deidentified_meta_drops_identifiers() {
        let m = Meta {
            patient_id: Some("W3-017".into()),
            patient_name: Some("Test Person".into()),
            sex: Some("F".into()),
            birth_date: Some("01-JAN-1970".into()),
            age_years: Some(56.0),
            recording_info: Some("bed 4".into()),
            device: Some("Ward 3 cart".into()),
            uncalibrated_leads: vec![1],
        };
        let d = m.deidentified();
        assert!(d.patient_id.is_none() && d.patient_name.is_none() && d.birth_date.is_none());
        assert!(d.recording_info.is_none() && d.device.is_none());
        assert_eq!(d.sex.as_deref(), Some("F"));
        assert_eq!(d.age_years, Some(56.0));
        let old = Meta { age_years: Some(97.0), ..m }.deidentified();
        assert_eq!(old.age_years, Some(OLDEST_AGE_SHOWN));
    }
}
