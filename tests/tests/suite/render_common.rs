//! Shared helpers of the render tests: open test recordings, render to PNG bytes and read the PNG back.

#![allow(dead_code)]

use isoline_core::io;
use isoline_core::recording::Recording;
use isoline_core::render::{RenderInput, encode_png, render_page};

pub type Res<T = ()> = Result<T, Box<dyn std::error::Error>>;

/// An RGB image read back from PNG bytes.
pub struct Image {
    pub width: usize,
    pub height: usize,
    pub rgb: Vec<u8>,
    /// pHYs pixels per metre, if present.
    pub ppm: Option<u32>,
}

impl Image {
    pub fn px(&self, x: usize, y: usize) -> [u8; 3] {
        let i = (y * self.width + x) * 3;
        [self.rgb[i], self.rgb[i + 1], self.rgb[i + 2]]
    }
}

/// The PTB Diagnostic ECG Database record s0010_re (12 standard leads + Frank leads, 1000 Hz), from tests/data.
pub fn ptb() -> Res<Recording> {
    let path = isoline_tests::data("ptb-s0010/s0010_re.hea");
    Ok(io::open(&path, &io::OpenOptions::default())?.recording)
}

/// Renders and encodes, then decodes the PNG with the png crate: the tests look only at what a reader of the
/// file would see.
pub fn render_png(input: &RenderInput) -> Res<(Vec<u8>, Image)> {
    let pixmap = render_page(input)?;
    let bytes = encode_png(&pixmap, input.dpi)?;
    let img = decode(&bytes)?;
    Ok((bytes, img))
}

pub fn decode(bytes: &[u8]) -> Res<Image> {
    let dec = png::Decoder::new(std::io::Cursor::new(bytes.to_vec()));
    let mut reader = dec.read_info()?;
    let ppm = reader.info().pixel_dims.map(|d| d.xppu);
    let mut buf = vec![0; reader.output_buffer_size().ok_or("png size")?];
    let info = reader.next_frame(&mut buf)?;
    let (w, h) = (info.width as usize, info.height as usize);
    let rgb = match info.color_type {
        png::ColorType::Rgb => buf[..w * h * 3].to_vec(),
        png::ColorType::Rgba => buf[..w * h * 4].chunks(4).flat_map(|p| [p[0], p[1], p[2]]).collect(),
        other => return Err(format!("unexpected colour type {other:?}").into()),
    };
    Ok(Image { width: w, height: h, rgb, ppm })
}

/// Groups sorted indices into runs (neighbours at most `gap` apart) and returns (first, last) of each run.
pub fn runs(idx: &[usize], gap: usize) -> Vec<(usize, usize)> {
    let mut out: Vec<(usize, usize)> = Vec::new();
    for &i in idx {
        match out.last_mut() {
            Some((_, last)) if i <= *last + gap => *last = i,
            _ => out.push((i, i)),
        }
    }
    out
}

/// Centre of a run.
pub fn centre((a, b): (usize, usize)) -> f64 {
    (a + b) as f64 / 2.0
}
