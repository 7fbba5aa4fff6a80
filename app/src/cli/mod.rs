//! Headless subcommands, one file each. Every `run` returns the process exit code, or an error that `main`
//! reports once on stderr with exit code 2.

pub mod agreement;
pub mod beats;
pub mod convert;
pub mod info;
pub mod measure;
pub mod render;
pub mod review;
pub mod synth;

/// Writes `text` to standard output. A reader that stops early (`| head`) is not an error; any other failure
/// (a full disk, a closed descriptor) is reported, never a panic as `print!` gives.
pub fn to_stdout(text: &str) -> anyhow::Result<()> {
    use anyhow::Context as _;
    use std::io::Write as _;
    let mut out = std::io::stdout().lock();
    match out.write_all(text.as_bytes()).and_then(|()| out.flush()) {
        Err(e) if e.kind() == std::io::ErrorKind::BrokenPipe => Ok(()),
        r => r.context("writing to standard output"),
    }
}

/// True when `a` and `b` name the same file: resolved through their links where they exist, else by their folder
/// resolved and their name (neither need exist yet).
pub fn same_file(a: &std::path::Path, b: &std::path::Path) -> bool {
    let resolved = |p: &std::path::Path| {
        p.canonicalize().ok().or_else(|| {
            let folder = isoline_core::io::atomic::folder(p).canonicalize().ok()?;
            Some(folder.join(p.file_name()?))
        })
    };
    a == b || resolved(a).is_some_and(|x| Some(x) == resolved(b))
}

/// Refuses an output path that is one of the files a recording was read from (its header, signal file or
/// annotations): writing there would destroy the recording.
pub fn refuse_to_overwrite(out: &std::path::Path, inputs: &[std::path::PathBuf]) -> anyhow::Result<()> {
    if inputs.iter().any(|f| same_file(out, f)) {
        anyhow::bail!("{}: the output would overwrite the input recording", out.display());
    }
    Ok(())
}

/// Refuses a recording read from `path` that holds no sample (an EDF header declaring no data records, say): it
/// has nothing to detect, measure or draw.
pub fn refuse_empty(recording: &isoline_core::Recording, path: &std::path::Path) -> anyhow::Result<()> {
    if recording.leads.is_empty() || recording.is_empty() {
        anyhow::bail!("{}: the recording has no samples", path.display());
    }
    Ok(())
}

/// Runs `work` (an analysis of `recording`, told of each window done) with a progress bar on stderr for a long
/// recording's windows (see [`isoline_core::analysis::LONG_RECORDING_S`]): long work shows progress. No bar when
/// not `shown`, for a recording analysed whole, or (indicatif) when stderr is not a terminal. The bar counts one
/// up per window told, not to the count told: windows finishing on several cores tell theirs out of order.
pub fn with_window_bar<T>(
    recording: &isoline_core::Recording,
    shown: bool,
    work: impl FnOnce(isoline_core::analysis::OnWindow<'_>) -> T,
) -> T {
    let bar = if shown && recording.duration_s() > isoline_core::analysis::LONG_RECORDING_S {
        let bar = indicatif::ProgressBar::new(0);
        let minutes = isoline_core::analysis::WINDOW_S / 60.0;
        let template = format!("{{bar:30}} {{pos}}/{{len}} windows of {minutes:.0} min analysed, {{elapsed}}");
        if let Ok(style) = indicatif::ProgressStyle::with_template(&template) {
            bar.set_style(style);
        }
        bar
    } else {
        indicatif::ProgressBar::hidden()
    };
    let out = work(&|_, all| {
        bar.set_length(all as u64);
        bar.inc(1);
    });
    bar.finish_and_clear();
    out
}
