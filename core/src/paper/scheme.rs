//! Paper colour schemes and their palettes.

use std::str::FromStr;

use super::PaperError;

/// RGBA colour, 8 bits per channel.
pub type Rgba = [u8; 4];

/// A paper colour scheme.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq, serde::Serialize, serde::Deserialize)]
pub enum Scheme {
    /// Classic red grid on cream.
    #[default]
    Rose,
    /// Dark paper, soft grey grid, light traces.
    Graphite,
    /// Black and grey on white, for printing.
    Mono,
}

/// Colours of one scheme.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Palette {
    /// Paper background.
    pub background: Rgba,
    /// 1 mm lines.
    pub minor: Rgba,
    /// 5 mm lines.
    pub major: Rgba,
    /// ECG traces and calibration pulses.
    pub trace: Rgba,
    /// Labels and text.
    pub text: Rgba,
    /// Calipers and their readouts.
    pub caliper: Rgba,
    /// Boundary marks.
    pub mark: Rgba,
}

impl Scheme {
    /// All schemes.
    pub const ALL: [Scheme; 3] = [Self::Rose, Self::Graphite, Self::Mono];

    /// The scheme's colours.
    #[must_use]
    pub fn palette(self) -> Palette {
        match self {
            Self::Rose => Palette {
                background: [255, 250, 242, 255],
                minor: [244, 196, 196, 255],
                major: [222, 120, 120, 255],
                trace: [20, 22, 30, 255],
                text: [60, 30, 30, 255],
                caliper: [20, 90, 200, 255],
                mark: [0, 130, 90, 255],
            },
            Self::Graphite => Palette {
                background: [28, 30, 34, 255],
                minor: [48, 52, 58, 255],
                major: [78, 84, 94, 255],
                trace: [230, 236, 242, 255],
                text: [200, 206, 214, 255],
                caliper: [255, 190, 70, 255],
                mark: [90, 220, 160, 255],
            },
            Self::Mono => Palette {
                background: [255, 255, 255, 255],
                minor: [222, 222, 222, 255],
                major: [160, 160, 160, 255],
                trace: [0, 0, 0, 255],
                text: [0, 0, 0, 255],
                caliper: [60, 60, 60, 255],
                mark: [90, 90, 90, 255],
            },
        }
    }

    /// `rose`, `graphite` or `mono`.
    #[must_use]
    pub fn as_str(self) -> &'static str {
        match self {
            Self::Rose => "rose",
            Self::Graphite => "graphite",
            Self::Mono => "mono",
        }
    }
}

impl FromStr for Scheme {
    type Err = PaperError;
    fn from_str(s: &str) -> Result<Self, Self::Err> {
        Self::ALL
            .into_iter()
            .find(|x| x.as_str().eq_ignore_ascii_case(s.trim()))
            .ok_or_else(|| PaperError::Scheme(s.to_string()))
    }
}
