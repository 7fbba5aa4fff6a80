//! Order of the leads and the shape of a page, with their text forms.

use std::fmt;
use std::str::FromStr;

use thiserror::Error;

use crate::recording::{LeadName, StandardLead};

/// Order of the limb leads on a page.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq, serde::Serialize, serde::Deserialize)]
pub enum LeadOrder {
    /// I, II, III, aVR, aVL, aVF, V1–V6.
    #[default]
    Standard,
    /// The Cabrera sequence: aVL, I, −aVR, II, aVF, III, V1–V6.
    Cabrera,
}

impl LeadOrder {
    /// The twelve leads in this order, with `true` where the lead is shown inverted (−aVR).
    #[must_use]
    pub fn sequence(self) -> [(StandardLead, bool); 12] {
        use StandardLead::*;
        match self {
            Self::Standard => StandardLead::ALL.map(|l| (l, false)),
            Self::Cabrera => [
                (AVL, false),
                (I, false),
                (AVR, true),
                (II, false),
                (AVF, false),
                (III, false),
                (V1, false),
                (V2, false),
                (V3, false),
                (V4, false),
                (V5, false),
                (V6, false),
            ],
        }
    }

    /// `standard` or `cabrera`.
    #[must_use]
    pub fn as_str(self) -> &'static str {
        match self {
            Self::Standard => "standard",
            Self::Cabrera => "cabrera",
        }
    }
}

impl FromStr for LeadOrder {
    type Err = PaperError;
    fn from_str(s: &str) -> Result<Self, Self::Err> {
        match s.trim().to_ascii_lowercase().as_str() {
            "standard" => Ok(Self::Standard),
            "cabrera" => Ok(Self::Cabrera),
            _ => Err(PaperError::LeadOrder(s.to_string())),
        }
    }
}

/// A page layout, described by its shape.
#[derive(Debug, Clone, PartialEq, Eq, serde::Serialize, serde::Deserialize)]
pub enum Layout {
    /// Three rows of four columns (2.5 s each at 10 s) plus one full-width rhythm row of the given lead.
    ThreeByFourPlusOne {
        /// Lead of the rhythm strip.
        rhythm: LeadName,
    },
    /// Six rows of two columns.
    SixByTwo,
    /// Twelve rows (every lead), each the whole window.
    TwelveByOne,
    /// One lead over the whole window.
    Strip(LeadName),
}

impl Default for Layout {
    fn default() -> Self {
        Self::ThreeByFourPlusOne { rhythm: LeadName::Standard(StandardLead::II) }
    }
}

/// Errors parsing paper settings.
#[derive(Debug, Clone, PartialEq, Error)]
#[non_exhaustive]
pub enum PaperError {
    /// Unknown layout text.
    #[error("unknown layout '{0}' (expected 3x4+1, 3x4+1:LEAD, 6x2, 12x1 or strip:LEAD)")]
    Layout(String),
    /// Unknown lead order.
    #[error("unknown lead order '{0}' (expected standard or cabrera)")]
    LeadOrder(String),
    /// Unknown paper scheme.
    #[error("unknown paper scheme '{0}' (expected rose, graphite or mono)")]
    Scheme(String),
}

impl FromStr for Layout {
    type Err = PaperError;
    fn from_str(s: &str) -> Result<Self, Self::Err> {
        let t = s.trim();
        let lower = t.to_ascii_lowercase();
        if lower == "3x4+1" {
            return Ok(Self::default());
        }
        if let Some(lead) = lower.strip_prefix("3x4+1:").map(|_| &t[6..]) {
            return Ok(Self::ThreeByFourPlusOne { rhythm: LeadName::parse(lead) });
        }
        match lower.as_str() {
            "6x2" => return Ok(Self::SixByTwo),
            "12x1" => return Ok(Self::TwelveByOne),
            _ => {}
        }
        if lower.starts_with("strip:") && t.len() > 6 {
            return Ok(Self::Strip(LeadName::parse(&t[6..])));
        }
        Err(PaperError::Layout(s.to_string()))
    }
}

impl fmt::Display for Layout {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Self::ThreeByFourPlusOne { rhythm } if *rhythm == LeadName::Standard(StandardLead::II) => {
                f.write_str("3x4+1")
            }
            Self::ThreeByFourPlusOne { rhythm } => write!(f, "3x4+1:{rhythm}"),
            Self::SixByTwo => f.write_str("6x2"),
            Self::TwelveByOne => f.write_str("12x1"),
            Self::Strip(lead) => write!(f, "strip:{lead}"),
        }
    }
}
