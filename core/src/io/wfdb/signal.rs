//! WFDB signal files: formats 16, 61, 80 and 212, read in chunks and decoded straight into the leads.
//!
//! Format notes (WFDB `signal(5)`): `16` — 16-bit little-endian two's complement; `61` — the same, big-endian;
//! `80` — 8-bit offset binary (byte − 128); `212` — pairs of 12-bit two's-complement samples in 3 bytes:
//! first = b0 | (b1 & 0x0F) << 8, second = b2 | (b1 & 0xF0) << 4, the pairing running across the interleaved
//! signals. −32768 (16, 61), −128 (80) and −2048 (212) mark an invalid sample.

use std::io::Read;
use std::path::Path;

use crate::io::ReadError;

/// Frames decoded per chunk. Even, so a 212 chunk always holds whole 3-byte pairs.
const CHUNK_FRAMES: usize = 1 << 16;

/// Bytes per frame (one sample of each of `n` interleaved signals); `None` for an unsupported format.
#[must_use]
pub fn frame_bytes(format: u32, n: usize) -> Option<f64> {
    match format {
        16 | 61 => Some(2.0 * n as f64),
        80 => Some(n as f64),
        212 => Some(1.5 * n as f64),
        _ => None,
    }
}

/// The leads of one signal file, and the 16-bit checksum of each signal's digital samples.
#[derive(Debug)]
pub struct Decoded {
    /// Converted samples, one vector per signal in file order.
    pub samples: Vec<Vec<f32>>,
    /// Sum of each signal's digital values modulo 2¹⁶ (as WFDB headers state it).
    pub checksums: Vec<i16>,
}

/// Reads `n_frames` frames of `n_sig` interleaved signals from `path` starting at byte `offset`, converting each
/// digital value `d` of signal `k` to `(d − baseline) × scale` with `(scale, baseline) = scales[k]`.
/// Memory beyond the output is one chunk of raw bytes.
///
/// # Errors
/// [`ReadError::Io`] when the file cannot be read; [`ReadError::Invalid`] when it ends before `n_frames`.
pub fn read_signals(
    path: &Path,
    format: u32,
    offset: u64,
    n_sig: usize,
    n_frames: usize,
    scales: &[(f64, f64)],
) -> Result<Decoded, ReadError> {
    use std::io::{Seek, SeekFrom};
    let fb = frame_bytes(format, n_sig)
        .ok_or_else(|| ReadError::unsupported(path, format!("signal format {format} (supported: 16, 61, 80, 212)")))?;
    let mut file = crate::io::open_file(path)?;
    file.seek(SeekFrom::Start(offset)).map_err(|e| ReadError::io(path, e))?;
    let mut out =
        Decoded { samples: (0..n_sig).map(|_| Vec::with_capacity(n_frames)).collect(), checksums: vec![0; n_sig] };
    let mut sums = vec![0u16; n_sig];
    let mut buf = Vec::new();
    let mut done = 0usize;
    while done < n_frames {
        let frames = CHUNK_FRAMES.min(n_frames - done);
        let need = (frames as f64 * fb).ceil() as usize;
        buf.clear();
        (&mut file).take(need as u64).read_to_end(&mut buf).map_err(|e| ReadError::io(path, e))?;
        // A 212 file with an odd number of samples may lack the last byte of its final pair; that half-pair is
        // never decoded into a returned sample. Anything shorter is a truncated file.
        let short = need - buf.len();
        if short > usize::from(format == 212) {
            let at = offset + (done as f64 * fb) as u64 + buf.len() as u64;
            return Err(ReadError::invalid(
                path,
                format!("byte {at}: signal file ends before sample {}", done + frames),
            ));
        }
        buf.resize(need, 0);
        decode_into(format, &buf, n_sig, frames, scales, &mut out.samples, &mut sums);
        done += frames;
    }
    out.checksums = sums.into_iter().map(|s| s as i16).collect();
    Ok(out)
}

/// Decodes `n_frames` frames from `bytes` (which start on a frame and, for 212, on a pair boundary), appending
/// to `out` and adding each digital value to `sums`.
fn decode_into(
    format: u32,
    bytes: &[u8],
    n_sig: usize,
    n_frames: usize,
    scales: &[(f64, f64)],
    out: &mut [Vec<f32>],
    sums: &mut [u16],
) {
    let total = n_sig * n_frames;
    // The signal of the next sample cycles 0, 1, …, n_sig − 1 (a counter, not a division per sample).
    let mut sig = 0usize;
    let mut push = |d: i32, invalid: bool| {
        sums[sig] = sums[sig].wrapping_add(d as u16);
        let (scale, baseline) = scales[sig];
        out[sig].push(if invalid { f32::NAN } else { ((f64::from(d) - baseline) * scale) as f32 });
        sig += 1;
        if sig == n_sig {
            sig = 0;
        }
    };
    match format {
        16 | 61 => {
            for b in bytes.chunks_exact(2).take(total) {
                let b = [b[0], b[1]];
                let v = if format == 16 { i16::from_le_bytes(b) } else { i16::from_be_bytes(b) };
                push(i32::from(v), v == i16::MIN);
            }
        }
        80 => {
            for &b in bytes.iter().take(total) {
                let v = i32::from(b) - 128;
                push(v, v == -128);
            }
        }
        212 => {
            let twelve = |raw: i32| if raw >= 2048 { raw - 4096 } else { raw };
            for (pair, b) in bytes.chunks_exact(3).enumerate() {
                let k = 2 * pair;
                if k >= total {
                    break;
                }
                let first = twelve(i32::from(b[0]) | ((i32::from(b[1]) & 0x0F) << 8));
                push(first, first == -2048);
                if k + 1 < total {
                    let second = twelve(i32::from(b[2]) | ((i32::from(b[1]) & 0xF0) << 4));
                    push(second, second == -2048);
                }
            }
        }
        _ => {}
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn decode(format: u32, bytes: &[u8], n_sig: usize, n_frames: usize) -> Vec<Vec<f32>> {
        let mut out = vec![Vec::new(); n_sig];
        let mut sums = vec![0; n_sig];
        decode_into(format, bytes, n_sig, n_frames, &vec![(1.0, 0.0); n_sig], &mut out, &mut sums);
        out
    }

    #[test]
    fn decodes_212_pairs() {
        // Source: WFDB signal(5): first = b0 | (b1 & 0x0F) << 8, second = b2 | (b1 & 0xF0) << 4.
        let d = decode(212, &[0xB1, 0xF3, 0x22], 2, 1);
        assert_eq!(d[0][0], 0x3B1 as f32);
        assert_eq!(d[1][0], (0xF22 - 4096) as f32);
        let d = decode(212, &[0x00, 0x08, 0x00], 1, 1);
        assert!(d[0][0].is_nan(), "-2048 marks an invalid sample");
        assert_eq!(d[0].len(), 1, "odd sample count: the half pair is not returned");
    }

    #[test]
    fn decodes_16_61_80() {
        // Source: WFDB signal(5) format descriptions.
        let d = decode(16, &[0x34, 0x12, 0xFF, 0xFF], 2, 1);
        assert_eq!((d[0][0], d[1][0]), (4660.0, -1.0));
        let d = decode(61, &[0x12, 0x34, 0x80, 0x00], 1, 2);
        assert_eq!(d[0][0], 4660.0);
        assert!(d[0][1].is_nan());
        let d = decode(80, &[0x80, 0x00, 0xFF], 1, 3);
        assert_eq!(d[0][0], 0.0);
        assert!(d[0][1].is_nan());
        assert_eq!(d[0][2], 127.0);
    }
}
