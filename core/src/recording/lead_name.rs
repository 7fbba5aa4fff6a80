//! Lead names: the twelve standard leads and any other label a file gives.

use std::fmt;

/// The twelve standard lead names, in the standard order.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord, serde::Serialize, serde::Deserialize)]
pub enum StandardLead {
    I,
    II,
    III,
    AVR,
    AVL,
    AVF,
    V1,
    V2,
    V3,
    V4,
    V5,
    V6,
}

impl StandardLead {
    /// All twelve in the standard order (I, II, III, aVR, aVL, aVF, V1–V6).
    pub const ALL: [StandardLead; 12] = [
        Self::I,
        Self::II,
        Self::III,
        Self::AVR,
        Self::AVL,
        Self::AVF,
        Self::V1,
        Self::V2,
        Self::V3,
        Self::V4,
        Self::V5,
        Self::V6,
    ];

    /// The conventional spelling (`aVR`, `V1`, …).
    #[must_use]
    pub fn as_str(self) -> &'static str {
        match self {
            Self::I => "I",
            Self::II => "II",
            Self::III => "III",
            Self::AVR => "aVR",
            Self::AVL => "aVL",
            Self::AVF => "aVF",
            Self::V1 => "V1",
            Self::V2 => "V2",
            Self::V3 => "V3",
            Self::V4 => "V4",
            Self::V5 => "V5",
            Self::V6 => "V6",
        }
    }

    /// Angle of a limb lead in the hexaxial frontal reference system, degrees (I 0°, II +60°, III +120°,
    /// aVR −150°, aVL −30°, aVF +90°); `None` for chest leads.
    ///
    /// Source: references.md §5 (hexaxial reference system).
    #[must_use]
    pub fn frontal_angle_deg(self) -> Option<f64> {
        match self {
            Self::I => Some(0.0),
            Self::II => Some(60.0),
            Self::III => Some(120.0),
            Self::AVR => Some(-150.0),
            Self::AVL => Some(-30.0),
            Self::AVF => Some(90.0),
            _ => None,
        }
    }

    /// Parses a lead name case-insensitively (`avr` → aVR). Accepts `lead II` / `Lead_II` prefixes too.
    #[must_use]
    pub fn parse(name: &str) -> Option<Self> {
        let t = name.trim();
        let lower = t.to_ascii_lowercase();
        let lower = lower.strip_prefix("lead").map(|s| s.trim_start_matches([' ', '_', '-'])).unwrap_or(&lower);
        Self::ALL.into_iter().find(|l| l.as_str().eq_ignore_ascii_case(lower))
    }
}

impl fmt::Display for StandardLead {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.as_str())
    }
}

/// A lead's name: one of the twelve standard leads, or any other label (e.g. `MLII`, `X`).
#[derive(Debug, Clone, PartialEq, Eq, Hash, serde::Serialize, serde::Deserialize)]
pub enum LeadName {
    /// A standard 12-lead name.
    Standard(StandardLead),
    /// Any other name, kept as written (trimmed).
    Other(String),
}

impl LeadName {
    /// Parses a name: standard names case-insensitively, anything else kept as written.
    #[must_use]
    pub fn parse(name: &str) -> Self {
        StandardLead::parse(name).map_or_else(|| Self::Other(name.trim().to_string()), Self::Standard)
    }

    /// The standard lead, if this is one.
    #[must_use]
    pub fn standard(&self) -> Option<StandardLead> {
        match self {
            Self::Standard(s) => Some(*s),
            Self::Other(_) => None,
        }
    }
}

impl fmt::Display for LeadName {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Self::Standard(s) => f.write_str(s.as_str()),
            Self::Other(o) => f.write_str(o),
        }
    }
}

impl From<StandardLead> for LeadName {
    fn from(s: StandardLead) -> Self {
        Self::Standard(s)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn lead_names_parse_case_insensitively() {
        assert_eq!(LeadName::parse("avr"), LeadName::Standard(StandardLead::AVR));
        assert_eq!(LeadName::parse("AVF"), LeadName::Standard(StandardLead::AVF));
        assert_eq!(LeadName::parse(" v5 "), LeadName::Standard(StandardLead::V5));
        assert_eq!(LeadName::parse("Lead II"), LeadName::Standard(StandardLead::II));
        assert_eq!(LeadName::parse("i"), LeadName::Standard(StandardLead::I));
        assert_eq!(LeadName::parse("MLII"), LeadName::Other("MLII".into()));
        assert_eq!(LeadName::parse("aVR").to_string(), "aVR");
    }
}
