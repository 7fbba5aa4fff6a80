use isoline_core::{filter, io, delineate::Signals};
fn main() {
    let a: Vec<String> = std::env::args().collect();
    let o = io::open(std::path::Path::new(&a[1]), &Default::default()).unwrap();
    let f = filter::apply(&o.recording, &Default::default());
    let fs = f.recording.sample_rate.hz();
    let from: usize = a[2].parse().unwrap();
    let to: usize = a[3].parse().unwrap();
    let leads: Vec<&[f32]> = f.recording.leads.iter().map(|l| l.samples.as_slice()).collect();
    let sig = Signals::new(&leads, fs);
    let step: usize = a.get(4).map_or(2, |s| s.parse().unwrap());
    for k in (from..to).step_by(step) {
        let mut line = format!("{k:7} env{:6.0} ", sig.env[k]);
        for l in 0..sig.slow.len() {
            let v = sig.slow[l][k];
            let col = ((v / 25.0).round() as i32 + 30).clamp(0, 60) as usize;
            let mut s = vec![b' '; 61]; s[30] = b'|'; s[col] = b'*';
            line += &format!("{:6.0} {} ", v, String::from_utf8(s).unwrap());
        }
        println!("{line}");
    }
}
