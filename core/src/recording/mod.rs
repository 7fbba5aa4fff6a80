//! The recording model: leads of samples in microvolts at one sampling rate, with start time and metadata.

mod lead;
mod lead_name;
mod meta;
mod signal_notes;

pub use lead::{Clipping, FLAT_UV, Lead};
pub use lead_name::{LeadName, StandardLead};
pub use meta::{Annotation, Meta, OLDEST_AGE_SHOWN, WITHHELD_LABEL};
pub(crate) use signal_notes::spoken_list;

use crate::units::Hertz;

/// A whole recording: every lead sampled at one rate.
#[derive(Debug, Clone, PartialEq)]
pub struct Recording {
    /// The leads, in file order. All have the same length.
    pub leads: Vec<Lead>,
    /// Sampling rate shared by every lead.
    pub sample_rate: Hertz,
    /// Start of the recording (local clock time as stored by the source), if known.
    pub start: Option<time::PrimitiveDateTime>,
    /// Descriptive metadata.
    pub meta: Meta,
    /// Annotations stored with the recording.
    pub annotations: Vec<Annotation>,
}

impl Recording {
    /// Gives every lead a name of its own, so a lead name finds one lead: an unlabelled lead becomes `lead N`
    /// (its position), and a lead labelled like an earlier one becomes `NAME (2)`, `NAME (3)`…, an other lead
    /// (not the standard lead of that name, which stays the first). Returns one line per renamed lead. CSV
    /// files refuse such headers; EDF and WFDB headers allow them, and without this a second `I` silently
    /// replaced the first in the axis, and a converted file could not be read back.
    pub fn name_leads_uniquely(&mut self) -> Vec<String> {
        let mut notes = Vec::new();
        let mut seen: Vec<LeadName> = Vec::with_capacity(self.leads.len());
        for (i, lead) in self.leads.iter_mut().enumerate() {
            let written = lead.name.to_string();
            let blank = written.trim().is_empty();
            if blank || seen.contains(&lead.name) {
                // An unlabelled lead tries `lead N` first; then, as for a repeated label, `BASE (2)`, `BASE (3)`….
                let base = if blank { format!("lead {}", i + 1) } else { written.clone() };
                let mut candidates = blank
                    .then(|| base.clone())
                    .into_iter()
                    .chain((2..).map(|k| format!("{base} ({k})")))
                    .map(LeadName::Other);
                let name = candidates.find(|n| !seen.contains(n)).unwrap_or_else(|| LeadName::Other(base.clone()));
                notes.push(if blank {
                    format!("a lead without a label (the {} read) is read as \"{name}\"", ordinal(i + 1))
                } else {
                    format!("another lead labelled {written} is read as \"{name}\"")
                });
                lead.name = name;
            }
            seen.push(lead.name.clone());
        }
        notes
    }

    /// Stretches (sorted sample ranges) of at least [`crate::gaps::MIN_GAP_S`] where no lead has a valid sample:
    /// nothing was recorded there, so beats on either side are not neighbours (see [`crate::measure::hrv`]).
    #[must_use]
    pub fn gaps(&self) -> Vec<std::ops::Range<usize>> {
        let leads: Vec<&[f32]> = self.leads.iter().map(|l| l.samples.as_slice()).collect();
        crate::gaps::find(&leads, self.sample_rate.hz())
    }

    /// Number of samples per lead (0 for a recording without leads).
    #[must_use]
    pub fn len(&self) -> usize {
        self.leads.first().map_or(0, |l| l.samples.len())
    }

    /// True when there are no samples.
    #[must_use]
    pub fn is_empty(&self) -> bool {
        self.len() == 0
    }

    /// Duration in seconds (samples / rate).
    #[must_use]
    pub fn duration_s(&self) -> f64 {
        self.len() as f64 / self.sample_rate.hz()
    }

    /// Index of the lead with this name, if present.
    #[must_use]
    pub fn lead_index(&self, name: &LeadName) -> Option<usize> {
        self.leads.iter().position(|l| &l.name == name)
    }

    /// The lead with this standard name, if present.
    #[must_use]
    pub fn standard_lead(&self, lead: StandardLead) -> Option<&Lead> {
        self.leads.iter().find(|l| l.name == LeadName::Standard(lead))
    }

    /// Adds the limb leads III, aVR, aVL and aVF that are missing, computed from I and II.
    /// Returns the leads that were added (none when I or II is absent).
    ///
    /// III = II − I (Einthoven); aVR = −(I + II)/2, aVL = I − II/2, aVF = II − I/2 (Goldberger).
    /// Source: references.md §5 (Goldberger, Am Heart J 1942;23:483).
    pub fn derive_limb_leads(&mut self) -> Vec<StandardLead> {
        let (Some(i), Some(ii)) = (self.standard_lead(StandardLead::I), self.standard_lead(StandardLead::II)) else {
            return Vec::new();
        };
        let (i, ii) = (i.samples.clone(), ii.samples.clone());
        type Rule = fn(f32, f32) -> f32;
        let rules: [(StandardLead, Rule); 4] = [
            (StandardLead::III, |i, ii| ii - i),
            (StandardLead::AVR, |i, ii| -(i + ii) / 2.0),
            (StandardLead::AVL, |i, ii| i - ii / 2.0),
            (StandardLead::AVF, |i, ii| ii - i / 2.0),
        ];
        let mut added = Vec::new();
        for (lead, rule) in rules {
            if self.standard_lead(lead).is_none() {
                let samples = i.iter().zip(&ii).map(|(&a, &b)| rule(a, b)).collect();
                self.leads.push(Lead { name: lead.into(), samples });
                added.push(lead);
            }
        }
        added
    }
}

/// `n` as an English ordinal: 1st, 2nd, 3rd, 4th, 11th, 21st…
fn ordinal(n: usize) -> String {
    let suffix = match (n % 10, n % 100) {
        (_, 11..=13) => "th",
        (1, _) => "st",
        (2, _) => "nd",
        (3, _) => "rd",
        _ => "th",
    };
    format!("{n}{suffix}")
}

/// A recording of `leads` at 500 Hz with no start time, metadata or annotations.
#[cfg(test)]
pub(crate) fn test_recording(leads: Vec<Lead>) -> Recording {
    Recording {
        leads,
        sample_rate: Hertz::from_hz(500.0).unwrap_or_else(|_| unreachable!()),
        start: None,
        meta: Meta::default(),
        annotations: Vec::new(),
    }
}

#[cfg(test)]
mod tests {
    use super::test_recording as rec;
    use super::*;

    #[test]
    fn derived_limb_leads_obey_einthoven_and_goldberger() {
        let i: Vec<f32> = (0..100).map(|k| (k as f32 * 0.1).sin() * 800.0).collect();
        let ii: Vec<f32> = (0..100).map(|k| (k as f32 * 0.07).cos() * 1200.0).collect();
        let mut r = rec(vec![
            Lead { name: StandardLead::I.into(), samples: i.clone() },
            Lead { name: StandardLead::II.into(), samples: ii.clone() },
        ]);
        let added = r.derive_limb_leads();
        assert_eq!(added.len(), 4);
        let get = |l| r.standard_lead(l).map(|x| x.samples.clone()).unwrap_or_default();
        let (iii, avr, avl, avf) =
            (get(StandardLead::III), get(StandardLead::AVR), get(StandardLead::AVL), get(StandardLead::AVF));
        for k in 0..100 {
            // Source: Einthoven's law II = I + III; Goldberger 1942: aVR + aVL + aVF = 0 (references.md §5).
            assert!((ii[k] - (i[k] + iii[k])).abs() < 1e-3);
            assert!((avr[k] + avl[k] + avf[k]).abs() < 1e-3);
            assert!((avr[k] + (i[k] + ii[k]) / 2.0).abs() < 1e-3);
        }
    }

    #[test]
    fn every_lead_gets_a_name_of_its_own() -> Result<(), crate::units::UnitError> {
        let lead = |name: &str| Lead { name: LeadName::parse(name), samples: vec![0.0; 4] };
        let mut rec = Recording {
            leads: vec![lead("I"), lead("ii"), lead(" "), lead("I"), lead("I")],
            sample_rate: Hertz::from_hz(500.0)?,
            start: None,
            meta: Meta::default(),
            annotations: Vec::new(),
        };
        let notes = rec.name_leads_uniquely();
        let names: Vec<String> = rec.leads.iter().map(|l| l.name.to_string()).collect();
        assert_eq!(names, ["I", "II", "lead 3", "I (2)", "I (3)"]);
        assert_eq!(rec.leads[0].name, LeadName::Standard(StandardLead::I));
        assert_eq!(rec.leads[3].name, LeadName::Other("I (2)".into()));
        assert_eq!(notes.len(), 3);
        assert_eq!(notes[0], "a lead without a label (the 3rd read) is read as \"lead 3\"");
        assert_eq!(notes[1], "another lead labelled I is read as \"I (2)\"");
        // Nothing to change: no note.
        assert!(rec.name_leads_uniquely().is_empty());
        // An unlabelled lead's name is not one a labelled lead already has.
        rec.leads = vec![lead("lead 2"), lead("")];
        rec.name_leads_uniquely();
        let names: Vec<String> = rec.leads.iter().map(|l| l.name.to_string()).collect();
        assert_eq!(names, ["lead 2", "lead 2 (2)"]);
        Ok(())
    }
}
