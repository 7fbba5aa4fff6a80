//! The Tape: the whole recording as a min/max envelope with the heart-rate trend below it. A click or drag moves
//! the Sheet there; the Sheet's window is outlined. Drawing cost follows the Tape's width in pixels: the stored
//! envelope (at most 4096 buckets) is merged down to one bucket per pixel column.

use egui_plot::{FilledArea, GridInput, GridMark, Line, Plot, PlotPoints, Points, Polygon};
use isoline_core::timescale::clock;

use super::command::Command;
use super::state::Loaded;
use isoline_core::render::TapeEnvelope;

/// Width kept for the y-axis labels of both Tape plots, points, so their time axes line up (room for a
/// three-digit rate and the axis name).
const AXIS_WIDTH: f32 = 52.0;

/// Draws the Tape; returns a command to move the Sheet when clicked or dragged.
///
/// `geometry` receives the Tape's screen mapping: `(y, x at time 0, x at the end of the recording)`.
pub fn tape_ui(
    ui: &mut egui::Ui,
    loaded: &Loaded,
    start_s: f64,
    window_s: f64,
    geometry: &mut Option<(f32, f32, f32)>,
) -> Vec<Command> {
    let mut out = Vec::new();
    let duration = loaded.recording.duration_s();
    let lead_name = loaded.recording.leads.get(loaded.tape.lead).map(|l| l.name.to_string()).unwrap_or_default();
    let columns = (ui.available_width() * ui.ctx().pixels_per_point()).max(16.0) as usize;
    let (xs, mut lo, mut hi) = merged_columns(&loaded.tape, columns);
    let (y_lo, y_hi) = lo.iter().chain(&hi).fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), &v| (a.min(v), b.max(v)));
    let (y_lo, y_hi) = if y_lo < y_hi { (y_lo, y_hi) } else { (-1.0, 1.0) };
    thicken(&mut lo, &mut hi, MIN_BAND * (y_hi - y_lo));
    let window = move |y0: f64, y1: f64| {
        Polygon::new(
            "Sheet window",
            PlotPoints::new(vec![[start_s, y0], [start_s + window_s, y0], [start_s + window_s, y1], [start_s, y1]]),
        )
        .fill_color(egui::Color32::from_rgba_unmultiplied(40, 110, 220, 40))
        .stroke(egui::Stroke::new(1.5, egui::Color32::from_rgb(40, 110, 220)))
    };
    ui.label(format!("Tape: {lead_name}, whole recording ({})", clock(duration)));
    let fill = ui.visuals().text_color().gamma_multiply(0.6);
    let env = Plot::new("tape_envelope")
        .height(70.0)
        .allow_drag(false)
        .allow_zoom(false)
        .allow_scroll(false)
        .allow_boxed_zoom(false)
        .allow_double_click_reset(false)
        .show_y(false)
        .y_axis_label("mV")
        .y_axis_min_width(AXIS_WIDTH)
        .x_axis_formatter(|m, _| clock(m.value))
        .x_grid_spacer(clock_marks)
        .default_x_bounds(0.0, x_end(duration))
        .show(ui, |p| {
            // One band per run of columns holding samples: where nothing was recorded the Tape stays blank.
            for run in recorded_runs(&lo) {
                let (x, l, h) = (&xs[run.clone()], &lo[run.clone()], &hi[run]);
                p.add(FilledArea::new(lead_name.as_str(), x, l, h).fill_color(fill));
                // A line through the columns' middles keeps a thin flat stretch joined where the fill fades out.
                let mid: Vec<[f64; 2]> =
                    x.iter().zip(l.iter().zip(h)).map(|(&x, (&l, &h))| [x, 0.5 * (l + h)]).collect();
                p.add(Line::new(lead_name.as_str(), PlotPoints::new(mid)).color(fill).width(1.0));
            }
            p.add(window(y_lo, y_hi));
        });
    *geometry = Some((
        env.response.rect.center().y,
        env.transform.position_from_point_x(0.0),
        env.transform.position_from_point_x(duration),
    ));
    out.extend(jump(&env.response, &env.transform, window_s, duration));
    let trend = &loaded.trend;
    if trend.is_empty() {
        ui.weak("Heart-rate trend: appears when beats are found (analysis may still be running).");
    } else {
        let (r_lo, r_hi) =
            trend.iter().flatten().fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), p| (a.min(p[1]), b.max(p[1])));
        let marks = rate_marks(r_lo, r_hi);
        let (r_lo, r_hi) = ((r_lo - RATE_MARGIN_BPM).max(0.0), r_hi + RATE_MARGIN_BPM);
        let hr = Plot::new("tape_rate")
            .height(60.0)
            .allow_drag(false)
            .allow_zoom(false)
            .allow_scroll(false)
            .allow_boxed_zoom(false)
            .allow_double_click_reset(false)
            .y_axis_label("bpm")
            .y_axis_min_width(AXIS_WIDTH)
            .y_axis_formatter(|m, _| format!("{:.0}", m.value))
            .y_grid_spacer(move |_| marks.iter().map(|&(value, step_size)| GridMark { value, step_size }).collect())
            .x_axis_formatter(|m, _| clock(m.value))
            .x_grid_spacer(clock_marks)
            .default_x_bounds(0.0, x_end(duration))
            .include_y(r_lo)
            .include_y(r_hi)
            .show(ui, |p| {
                // Each beat's dot where the beats lie a few columns apart or more, and a run of one (which has no
                // line) always.
                let sparse = trend.iter().map(Vec::len).sum::<usize>() * 4 <= columns;
                for pts in trend_lines(trend, columns) {
                    if sparse || pts.len() == 1 {
                        p.add(Points::new("heart rate", PlotPoints::new(pts.clone())).radius(2.0).color(RATE));
                    }
                    p.add(Line::new("heart rate", PlotPoints::new(pts)).color(RATE));
                }
                p.add(window(r_lo, r_hi));
            });
        out.extend(jump(&hr.response, &hr.transform, window_s, duration));
    }
    out
}

fn jump(
    response: &egui::Response,
    transform: &egui_plot::PlotTransform,
    window_s: f64,
    duration: f64,
) -> Option<Command> {
    if !(response.clicked() || response.dragged()) {
        return None;
    }
    let p = response.interact_pointer_pos()?;
    let t = transform.value_from_position(p).x;
    Some(Command::SetStart((t - window_s / 2.0).clamp(0.0, (duration - window_s).max(0.0))))
}

/// The runs of consecutive columns whose minimum `lo` is a number (columns with no valid sample are NaN).
fn recorded_runs(lo: &[f64]) -> Vec<std::ops::Range<usize>> {
    isoline_core::gaps::runs_where(lo.len(), |i| lo[i].is_finite())
}

/// Merges envelope buckets down to at most `columns`, returning bucket centre times (s) and min/max in mV (NaN for
/// a column without a valid sample).
#[must_use]
pub fn merged_columns(env: &TapeEnvelope, columns: usize) -> (Vec<f64>, Vec<f64>, Vec<f64>) {
    let n = env.min.len();
    let per = n.div_ceil(columns.max(1)).max(1);
    let mut xs = Vec::with_capacity(n / per + 1);
    let mut lo = Vec::with_capacity(n / per + 1);
    let mut hi = Vec::with_capacity(n / per + 1);
    for (k, (a, b)) in env.min.chunks(per).zip(env.max.chunks(per)).enumerate() {
        xs.push((k * per) as f64 * env.bucket_s + a.len() as f64 * env.bucket_s / 2.0);
        // f32::min and max pass over NaN; a column of empty buckets stays infinite and becomes NaN.
        let (l, h) =
            (a.iter().copied().fold(f32::INFINITY, f32::min), b.iter().copied().fold(f32::NEG_INFINITY, f32::max));
        let (l, h) = if l <= h { (f64::from(l) / 1000.0, f64::from(h) / 1000.0) } else { (f64::NAN, f64::NAN) };
        lo.push(l);
        hi.push(h);
    }
    (xs, lo, hi)
}

/// Least height of a column of the envelope, as a fraction of the plotted range (about 1 point on the 70-point
/// plot): where the lead is flat within a column its minimum equals its maximum, and a fill of no height left the
/// baseline between beats as scattered dots.
const MIN_BAND: f64 = 0.015;

/// Widens each column `lo[i]..hi[i]` about its middle to at least `least`.
fn thicken(lo: &mut [f64], hi: &mut [f64], least: f64) {
    for (l, h) in lo.iter_mut().zip(hi.iter_mut()) {
        let pad = ((least - (*h - *l)) / 2.0).max(0.0);
        *l -= pad;
        *h += pad;
    }
}

/// Room above the fastest and below the slowest rate on the trend, bpm.
const RATE_MARGIN_BPM: f64 = 10.0;

/// The rate trend's labelled marks, (bpm, step size): the slowest and fastest rate (rounded) where they stand
/// far enough apart on the short plot for both labels to show, else one mark between them. The default marks
/// fall on multiples of 10 or 50 bpm, which on a plot a few dozen points high are too close to be labelled or
/// miss the trend's range, so the axis showed no number at all. The step size tells the plot how far apart the
/// labels stand (it hides labels closer than about 20 points).
fn rate_marks(slowest: f64, fastest: f64) -> Vec<(f64, f64)> {
    let (lo, hi) = (slowest.round(), fastest.round());
    let span = hi - lo;
    // Both labels show when they are at least about 60 % of the plotted range apart (the range adds the margins).
    if span >= 0.6 * (span + 2.0 * RATE_MARGIN_BPM) {
        vec![(lo, span), (hi, span)]
    } else {
        // One label: its step size is the whole plotted range, so it always shows.
        vec![(((lo + hi) / 2.0).round(), span + 2.0 * RATE_MARGIN_BPM)]
    }
}

/// Colour of the heart-rate trend.
const RATE: egui::Color32 = egui::Color32::from_rgb(200, 60, 60);

/// The lines the trend is drawn as, at most about `2 × columns` points and one more per run: one line per run of
/// dominant beats, so no line bridges a premature beat; where the runs outnumber the columns (a long recording,
/// where a break would not show) one line through all of them.
fn trend_lines(runs: &[Vec<[f64; 2]>], columns: usize) -> Vec<Vec<[f64; 2]>> {
    if runs.len() > columns {
        let all: Vec<[f64; 2]> = runs.iter().flatten().copied().collect();
        return vec![thin(&all, columns)];
    }
    let total: usize = runs.iter().map(Vec::len).sum();
    runs.iter().map(|run| thin(run, (columns * run.len()).div_ceil(total.max(1)))).collect()
}

/// Keeps at most about `2 × columns` points of a trend (every k-th point).
fn thin(points: &[[f64; 2]], columns: usize) -> Vec<[f64; 2]> {
    let step = points.len().div_ceil(2 * columns.max(1)).max(1);
    points.iter().step_by(step).copied().collect()
}

/// Right end of the Tape's time axis, s: the recording's end and a little room, so the label of a mark at the
/// very end is not cut off.
fn x_end(duration: f64) -> f64 {
    duration.max(1.0) * 1.03
}

/// Time-axis grid on clock steps (hours, minutes, seconds) instead of decimal fractions of the duration.
fn clock_marks(input: GridInput) -> Vec<GridMark> {
    let (from, to) = input.bounds;
    isoline_core::timescale::clock_grid(from, to, input.base_step_size)
        .into_iter()
        .map(|(value, step_size)| GridMark { value, step_size })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn rate_marks_label_the_trend_range() {
        // A steady rate: one label between slowest and fastest.
        assert_eq!(rate_marks(78.4, 86.2), vec![(82.0, 28.0)]);
        // A wide swing: slowest and fastest both labelled.
        assert_eq!(rate_marks(55.0, 120.0), vec![(55.0, 65.0), (120.0, 65.0)]);
        // One beat-to-beat rate only.
        assert_eq!(rate_marks(60.0, 60.0), vec![(60.0, 20.0)]);
    }

    #[test]
    fn flat_columns_are_thickened_to_show() {
        let (mut lo, mut hi) = (vec![0.0, -1.0, 0.5], vec![0.0, 1.0, 0.52]);
        thicken(&mut lo, &mut hi, 0.1);
        assert_eq!((lo[0], hi[0]), (-0.05, 0.05));
        assert_eq!((lo[1], hi[1]), (-1.0, 1.0));
        assert!((hi[2] - lo[2] - 0.1).abs() < 1e-12 && (lo[2] + hi[2] - 1.02).abs() < 1e-12);
    }

    #[test]
    fn merged_columns_keep_extremes() {
        let env = TapeEnvelope {
            lead: 0,
            bucket_s: 1.0,
            min: vec![0.0, -500.0, 10.0, 20.0],
            max: vec![100.0, 50.0, 2000.0, 30.0],
        };
        let (xs, lo, hi) = merged_columns(&env, 2);
        assert_eq!(xs, vec![1.0, 3.0]);
        assert_eq!(lo, vec![-0.5, 0.01]);
        assert_eq!(hi, vec![0.1, 2.0]);
        // Buckets with nothing recorded: a column of them is NaN, and the Tape draws the runs either side.
        let nan = f32::NAN;
        let env =
            TapeEnvelope { lead: 0, bucket_s: 1.0, min: vec![0.0, nan, nan, 20.0], max: vec![100.0, nan, nan, 30.0] };
        let (_, lo, _) = merged_columns(&env, 4);
        assert!(lo[1].is_nan() && lo[2].is_nan());
        assert_eq!(recorded_runs(&lo), vec![0..1, 3..4]);
    }
}
