//! Benchmark: a 12-lead `3x4+1` page at 300 dpi (target ≤ 300 ms, design.md), drawn and PNG-encoded.
//! Run: `cargo bench -p isoline-core --bench render`. Uses the PTB record s0010_re (12 + 3 leads, 1000 Hz).

use std::path::PathBuf;
use std::time::Instant;

use isoline_core::io;
use isoline_core::paper::PageSpec;
use isoline_core::render::{RenderInput, encode_png, render_page};

fn median_ms(mut v: Vec<f64>) -> f64 {
    v.sort_by(f64::total_cmp);
    v[v.len() / 2]
}

fn main() -> Result<(), Box<dyn std::error::Error>> {
    let path = PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("../tests/data/ptb-s0010/s0010_re.hea");
    let rec = io::open(&path, &io::OpenOptions::default())?.recording;
    let input = RenderInput { title: "s0010_re.hea".into(), ..RenderInput::new(&rec, PageSpec::default(), 300.0) };
    let (mut draw, mut encode, mut total) = (Vec::new(), Vec::new(), Vec::new());
    for _ in 0..15 {
        let t0 = Instant::now();
        let pixmap = render_page(&input)?;
        let t1 = Instant::now();
        let bytes = encode_png(&pixmap, input.dpi)?;
        let t2 = Instant::now();
        std::hint::black_box(bytes);
        draw.push((t1 - t0).as_secs_f64() * 1e3);
        encode.push((t2 - t1).as_secs_f64() * 1e3);
        total.push((t2 - t0).as_secs_f64() * 1e3);
    }
    let pixmap = render_page(&input)?;
    println!("3x4+1 page at 300 dpi: {} x {} px", pixmap.width(), pixmap.height());
    println!("draw    median {:7.1} ms", median_ms(draw));
    println!("encode  median {:7.1} ms", median_ms(encode));
    println!("total   median {:7.1} ms (target <= 300 ms)", median_ms(total));
    Ok(())
}
