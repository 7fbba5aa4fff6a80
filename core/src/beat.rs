//! Beats and their wave boundaries: the vocabulary shared by detection, delineation, measurement, reviews,
//! rendering and the GUI.

use std::fmt;

/// How a beat was typed.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, serde::Serialize, serde::Deserialize)]
pub enum BeatKind {
    /// Matches the dominant (most common) beat morphology and timing; used for the representative beat.
    Dominant,
    /// Any other beat (premature, different shape, noisy).
    Other,
}

impl BeatKind {
    /// `dominant` or `other`, as the command line prints it.
    #[must_use]
    pub fn as_str(self) -> &'static str {
        match self {
            Self::Dominant => "dominant",
            Self::Other => "other",
        }
    }
}

/// A kind of boundary mark placed on a beat.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord, serde::Serialize, serde::Deserialize)]
pub enum MarkKind {
    /// P wave onset.
    POnset,
    /// P wave end.
    PEnd,
    /// QRS onset.
    QrsOnset,
    /// J point (QRS end).
    JPoint,
    /// T wave end.
    TEnd,
    /// R peak (the beat's fiducial point).
    RPeak,
}

impl MarkKind {
    /// The five boundaries, in time order.
    pub const BOUNDARIES: [MarkKind; 5] = [Self::POnset, Self::PEnd, Self::QrsOnset, Self::JPoint, Self::TEnd];

    /// Label shown to readers.
    #[must_use]
    pub fn label(self) -> &'static str {
        match self {
            Self::POnset => "P onset",
            Self::PEnd => "P end",
            Self::QrsOnset => "QRS onset",
            Self::JPoint => "J point",
            Self::TEnd => "T end",
            Self::RPeak => "R peak",
        }
    }

    /// Short label printed next to a mark on the Sheet, the PNG and in the Beat lens.
    #[must_use]
    pub fn short_label(self) -> &'static str {
        match self {
            Self::POnset => "Pon",
            Self::PEnd => "Pend",
            Self::QrsOnset => "QRSon",
            Self::JPoint => "J",
            Self::TEnd => "Tend",
            Self::RPeak => "R",
        }
    }
}

impl fmt::Display for MarkKind {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.label())
    }
}

/// Wave boundaries of one beat, as sample indices on the recording's sample axis (or, for a representative
/// beat, on that beat's own axis). `None` where the boundary could not be found: never a guess.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq, serde::Serialize, serde::Deserialize)]
pub struct Boundaries {
    /// P wave onset.
    pub p_on: Option<usize>,
    /// P wave end.
    pub p_end: Option<usize>,
    /// QRS onset.
    pub qrs_on: Option<usize>,
    /// J point (QRS end).
    pub qrs_end: Option<usize>,
    /// T wave end.
    pub t_end: Option<usize>,
}

impl Boundaries {
    /// The boundary of a given kind (`RPeak` is not a boundary and gives `None`).
    #[must_use]
    pub fn get(&self, kind: MarkKind) -> Option<usize> {
        match kind {
            MarkKind::POnset => self.p_on,
            MarkKind::PEnd => self.p_end,
            MarkKind::QrsOnset => self.qrs_on,
            MarkKind::JPoint => self.qrs_end,
            MarkKind::TEnd => self.t_end,
            MarkKind::RPeak => None,
        }
    }

    /// Sets the boundary of a given kind (`RPeak` is ignored).
    pub fn set(&mut self, kind: MarkKind, value: Option<usize>) {
        match kind {
            MarkKind::POnset => self.p_on = value,
            MarkKind::PEnd => self.p_end = value,
            MarkKind::QrsOnset => self.qrs_on = value,
            MarkKind::JPoint => self.qrs_end = value,
            MarkKind::TEnd => self.t_end = value,
            MarkKind::RPeak => {}
        }
    }
}

/// One detected beat.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct Beat {
    /// Sample index of the R peak (the beat's fiducial point).
    pub r: usize,
    /// Dominant or other.
    pub kind: BeatKind,
    /// Wave boundaries found for this beat.
    pub bounds: Boundaries,
}

impl Beat {
    /// A beat at `r` with no boundaries yet.
    #[must_use]
    pub fn at(r: usize, kind: BeatKind) -> Self {
        Self { r, kind, bounds: Boundaries::default() }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn boundaries_get_set_round_trip() {
        let mut b = Boundaries::default();
        for (i, k) in MarkKind::BOUNDARIES.into_iter().enumerate() {
            b.set(k, Some(i * 10));
        }
        for (i, k) in MarkKind::BOUNDARIES.into_iter().enumerate() {
            assert_eq!(b.get(k), Some(i * 10));
        }
        assert_eq!(b.get(MarkKind::RPeak), None);
    }
}
