//! WFDB annotation files (`.atr`, `.q1c`, `.pu`, …) in the MIT format.
//!
//! 16-bit little-endian words; top 6 bits = code A, low 10 bits = I. A in 1..=49: an annotation of that type,
//! time advancing by I samples. A = 59 (SKIP): the next two words are a 32-bit time increment, high word first.
//! A = 60 (NUM), 61 (SUB), 62 (CHN): set that field of the annotation just read. A = 63 (AUX): I bytes of text
//! follow, padded to even. A word of 0 ends the file. An annotation without NUM or CHN keeps the previous ones.

use std::path::Path;

use super::{ReadError, file_len, read_bytes};
use crate::beat::{Beat, BeatKind};
use crate::recording::Annotation;

/// Largest annotation file read (64 MiB; a 24-h Holter annotation file is a few MB).
const MAX_BYTES: u64 = 64 << 20;

/// WFDB mnemonics by annotation code; "" for unassigned codes.
const MNEMONICS: [&str; 50] = [
    "", "N", "L", "R", "a", "V", "F", "J", "A", "S", "E", "j", "/", "Q", "~", "", "|", "", "s", "T", "*", "D", "\"",
    "=", "p", "B", "^", "t", "+", "u", "?", "!", "[", "]", "e", "n", "@", "x", "f", "(", ")", "r", "", "", "", "", "",
    "", "", "",
];

/// Rhythm codes written in the auxiliary text of WFDB rhythm annotations (`+`).
// Source: PhysioNet, MIT-BIH Arrhythmia Database directory, rhythm annotations (from memory).
const RHYTHM_CODES: [&str; 15] =
    ["(AB", "(AFIB", "(AFL", "(B", "(BII", "(IVR", "(N", "(NOD", "(P", "(PREX", "(SBR", "(SVTA", "(T", "(VFL", "(VT"];

/// The WFDB mnemonic for an annotation code (`N`, `V`, `(`, …), `None` for unassigned codes.
#[must_use]
pub fn mnemonic(code: u16) -> Option<&'static str> {
    MNEMONICS.get(usize::from(code)).copied().filter(|s| !s.is_empty())
}

/// Whether `label` is one of the fixed codes annotation files use: a WFDB mnemonic or rhythm code. Such a label
/// can travel in a de-identified copy; any other text was typed by someone and may name a person.
#[must_use]
pub fn is_code(label: &str) -> bool {
    !label.is_empty() && (MNEMONICS.contains(&label) || RHYTHM_CODES.contains(&label))
}

/// Whether a mnemonic labels a beat (the beat labels of the MIT-BIH convention).
#[must_use]
pub fn is_beat(label: &str) -> bool {
    matches!(
        label,
        "N" | "L" | "R" | "B" | "A" | "a" | "J" | "S" | "V" | "r" | "F" | "e" | "j" | "n" | "E" | "/" | "f" | "Q" | "?"
    )
}

/// Whether a WFDB annotation label marks a beat, and of which kind. Normal and bundle-branch beats count as
/// dominant; premature, escape, fusion, paced and unclassifiable beats as other; rhythm and signal notes are
/// not beats.
///
/// Source: PhysioNet WFDB annotation codes (ecgcodes.h), MIT-BIH Arrhythmia Database directory of records.
#[must_use]
pub fn beat_kind_from_label(label: &str) -> Option<BeatKind> {
    if !is_beat(label) {
        return None;
    }
    Some(if matches!(label, "N" | "L" | "R" | "B") { BeatKind::Dominant } else { BeatKind::Other })
}

/// Beats from the recording's beat annotations, in time order.
#[must_use]
pub fn beats_from_annotations(annotations: &[Annotation], len: usize) -> Vec<Beat> {
    let mut beats: Vec<Beat> = annotations
        .iter()
        .filter_map(|a| {
            let kind = beat_kind_from_label(&a.label)?;
            let r = usize::try_from(a.sample).ok().filter(|&r| r < len)?;
            Some(Beat::at(r, kind))
        })
        .collect();
    beats.sort_by_key(|b| b.r);
    beats
}

/// Reads an annotation file.
///
/// # Errors
/// [`ReadError::Invalid`] naming the byte offset of a truncated or malformed word.
pub fn read(path: &Path) -> Result<Vec<Annotation>, ReadError> {
    let len = file_len(path)?;
    if len > MAX_BYTES {
        return Err(ReadError::invalid(path, format!("annotation file is {len} bytes, more than 64 MiB")));
    }
    parse(path, &read_bytes(path)?)
}

/// Parses annotation bytes; `path` is only used in messages.
///
/// # Errors
/// [`ReadError::Invalid`] naming the byte offset at fault.
pub fn parse(path: &Path, bytes: &[u8]) -> Result<Vec<Annotation>, ReadError> {
    let word = |at: usize| -> Result<u16, ReadError> {
        bytes
            .get(at..at + 2)
            .map(|b| u16::from_le_bytes([b[0], b[1]]))
            .ok_or_else(|| ReadError::invalid(path, format!("byte {at}: annotation word cut short")))
    };
    let mut out: Vec<Annotation> = Vec::new();
    let mut t: u64 = 0;
    let (mut num, mut chan) = (0i32, 0i32);
    let mut at = 0usize;
    let mut ended = false;
    while at + 1 < bytes.len() {
        let w = word(at)?;
        let (a, i) = (w >> 10, w & 0x3FF);
        let here = at;
        at += 2;
        match a {
            0 if i == 0 => {
                ended = true;
                break;
            }
            0 => {
                // A zero code with an interval: a time advance without an annotation (NOTQRS-free skip).
                t += u64::from(i);
            }
            1..=49 => {
                t += u64::from(i);
                let label = mnemonic(a).map_or_else(|| format!("#{a}"), str::to_string);
                let mut ann = Annotation::new(t, label);
                ann.num = num;
                ann.chan = chan;
                out.push(ann);
            }
            59 => {
                let hi = word(at)?;
                let lo = word(at + 2)?;
                at += 4;
                let inc = i32::from_ne_bytes(((u32::from(hi) << 16) | u32::from(lo)).to_ne_bytes());
                t = t.checked_add_signed(i64::from(inc)).ok_or_else(|| {
                    ReadError::invalid(path, format!("byte {here}: skip moves time before the start of the record"))
                })?;
            }
            60 => {
                num = i32::from(i);
                if let Some(last) = out.last_mut() {
                    last.num = num;
                }
            }
            61 => {
                if let Some(last) = out.last_mut() {
                    last.subtype = i32::from(i);
                }
            }
            62 => {
                chan = i32::from(i);
                if let Some(last) = out.last_mut() {
                    last.chan = chan;
                }
            }
            63 => {
                let n = usize::from(i);
                let text = bytes.get(at..at + n).ok_or_else(|| {
                    ReadError::invalid(path, format!("byte {here}: auxiliary text of {n} bytes cut short"))
                })?;
                let text = String::from_utf8_lossy(text).trim_end_matches('\0').to_string();
                if let Some(last) = out.last_mut() {
                    last.aux = Some(text);
                }
                at += n + (n & 1);
            }
            _ => {
                return Err(ReadError::invalid(path, format!("byte {here}: unknown annotation code {a}")));
            }
        }
    }
    // Every annotation file ends with a zero word; without it the file was cut short, and the annotations read
    // so far are not all there are.
    if !ended {
        return Err(ReadError::invalid(
            path,
            format!("ends at byte {} without the end-of-annotations word: the file is cut short", bytes.len()),
        ));
    }
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn w(a: u16, i: u16) -> [u8; 2] {
        ((a << 10) | i).to_le_bytes()
    }

    #[test]
    fn parses_codes_num_skip_and_aux() -> Result<(), ReadError> {
        let mut b = Vec::new();
        b.extend(w(39, 100)); // ( at 100
        b.extend(w(60, 1)); // num 1
        b.extend(w(1, 14)); // N at 114, keeps num 1
        b.extend(w(59, 0));
        b.extend(1u16.to_le_bytes()); // high word
        b.extend(4464u16.to_le_bytes()); // low word: 65536 + 4464 = 70000
        b.extend(w(5, 6)); // V at 114 + 70000 + 6
        b.extend(w(63, 3));
        b.extend(b"abc\0");
        b.extend([0, 0]);
        let a = parse(Path::new("t.atr"), &b)?;
        assert_eq!(a.len(), 3);
        assert_eq!((a[0].sample, a[0].label.as_str(), a[0].num), (100, "(", 1));
        assert_eq!((a[1].sample, a[1].label.as_str(), a[1].num), (114, "N", 1));
        assert_eq!((a[2].sample, a[2].label.as_str()), (70120, "V"));
        assert_eq!(a[2].aux.as_deref(), Some("abc"));
        Ok(())
    }

    #[test]
    fn truncated_skip_is_an_error() {
        let mut b = Vec::new();
        b.extend(w(59, 0));
        b.extend([1]);
        assert!(parse(Path::new("t.atr"), &b).is_err());
    }

    #[test]
    fn a_file_cut_between_annotations_is_an_error_not_a_shorter_list() {
        // Whole annotations but no end-of-annotations word (a copy cut short): not read as if complete.
        let mut b = Vec::new();
        b.extend(w(1, 100));
        b.extend(w(1, 200));
        let e = parse(Path::new("t.atr"), &b).err().map(|e| e.to_string()).unwrap_or_default();
        assert!(e.contains("cut short"), "{e}");
        assert!(parse(Path::new("t.atr"), &[]).is_err(), "an empty file holds no end word either");
        b.extend([0, 0]);
        assert_eq!(parse(Path::new("t.atr"), &b).map(|a| a.len()).ok(), Some(2));
    }

    #[test]
    fn beats_come_from_beat_labels_only_in_time_order() {
        // Source: PhysioNet WFDB annotation codes: N, L, R, B normal or bundle-branch beats; V premature
        // ventricular, / paced; + a rhythm change and ( a wave onset, not beats.
        let at = Annotation::new;
        let notes = [at(900, "N"), at(100, "L"), at(500, "V"), at(300, "+"), at(700, "("), at(800, "/"), at(5000, "N")];
        let beats = beats_from_annotations(&notes, 1000);
        let got: Vec<(usize, BeatKind)> = beats.iter().map(|b| (b.r, b.kind)).collect();
        assert_eq!(
            got,
            [(100, BeatKind::Dominant), (500, BeatKind::Other), (800, BeatKind::Other), (900, BeatKind::Dominant)],
            "the beat past the recording's end is left out"
        );
    }
}
