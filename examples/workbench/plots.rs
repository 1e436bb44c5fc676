//! SVG plots (plotters' SVG backend only: no system fonts needed).

use crate::budget::Budget;
use crate::scenario::Scenario;
use crate::sim::{Bench, Unit, description, sample_nd20};
use plotters::prelude::*;
use std::path::{Path, PathBuf};

type PlotResult = Result<PathBuf, Box<dyn std::error::Error>>;
type Canvas<'a> = DrawingArea<SVGBackend<'a>, plotters::coord::Shift>;
type Drawn = Result<(), Box<dyn std::error::Error>>;

/// Draws one 900 × 480 SVG file with `draw` and returns its path.
fn svg(path: PathBuf, draw: impl FnOnce(&Canvas) -> Drawn) -> PlotResult {
    {
        let root = SVGBackend::new(path.as_path(), (900, 480)).into_drawing_area();
        root.fill(&WHITE)?;
        draw(&root)?;
        root.present()?;
    }
    Ok(path)
}

/// A chart with the workbench's margins and a caption.
fn chart<'a, 'b>(
    root: &'a Canvas<'b>,
    title: &str,
    y_area: u32,
) -> ChartBuilder<'a, 'b, SVGBackend<'b>> {
    let mut b = ChartBuilder::on(root);
    b.caption(title, ("sans-serif", 20))
        .margin(12)
        .x_label_area_size(40)
        .y_label_area_size(y_area);
    b
}

/// The workbench's own palette: darker, print-safe tones that stay apart in
/// greyscale (lightness falls from first to last), chosen for these plots.
const COLOURS: [RGBColor; 6] = [
    RGBColor(0, 104, 120),  // deep teal
    RGBColor(196, 122, 0),  // amber
    RGBColor(122, 46, 110), // plum
    RGBColor(92, 110, 30),  // olive
    RGBColor(60, 78, 160),  // slate blue
    RGBColor(168, 58, 40),  // brick
];

/// The short line of a legend entry.
fn key(x: i32, y: i32, colour: RGBColor) -> PathElement<(i32, i32)> {
    PathElement::new([(x, y), (x + 16, y)], colour)
}

fn span(xs: impl Iterator<Item = f64>) -> (f64, f64) {
    let (lo, hi) = xs.fold((f64::MAX, f64::MIN), |(a, b), x| (a.min(x), b.max(x)));
    if lo > hi {
        return (-1.0, 1.0);
    }
    let pad = ((hi - lo) * 0.08).max(1e-9);
    (lo - pad, hi + pad)
}

/// The sensor frame with the boundary the firmware found.
pub fn profile(dir: &Path, frame: &[u16], boundary_px: f64, what: &str) -> PlotResult {
    svg(dir.join("sensor_profile.svg"), |root| {
        let top = f64::from(frame.iter().copied().max().unwrap_or(1)) * 1.08;
        let mut c = chart(root, &format!("Sensor profile: {what}"), 60)
            .build_cartesian_2d(0f64..frame.len() as f64, 0f64..top)?;
        c.configure_mesh().x_desc("pixel").y_desc("counts").draw()?;
        let counts = frame
            .iter()
            .enumerate()
            .map(|(i, &v)| (i as f64, f64::from(v)));
        c.draw_series(LineSeries::new(counts, &COLOURS[0]))?
            .label("frame")
            .legend(|(x, y)| key(x, y, COLOURS[0]));
        let marker = [(boundary_px, 0.0), (boundary_px, top)];
        c.draw_series(LineSeries::new(marker, COLOURS[1].stroke_width(2)))?
            .label(format!("boundary found at {boundary_px:.2} px"))
            .legend(|(x, y)| key(x, y, COLOURS[1]));
        c.configure_series_labels()
            .border_style(BLACK)
            .background_style(WHITE)
            .draw()?;
        Ok(())
    })
}

/// Draws named curves (with their points marked when `marks`).
fn curves<X, Y>(
    c: &mut ChartContext<'_, SVGBackend<'_>, Cartesian2d<X, Y>>,
    series: &Curves,
    marks: bool,
) -> Drawn
where
    X: Ranged<ValueType = f64>,
    Y: Ranged<ValueType = f64>,
{
    for (i, (name, pts)) in series.iter().enumerate() {
        let colour = COLOURS[i % COLOURS.len()];
        c.draw_series(LineSeries::new(pts.iter().copied(), colour.stroke_width(2)))?
            .label(name.as_str())
            .legend(move |(x, y)| key(x, y, colour));
        if marks {
            c.draw_series(pts.iter().map(|&p| Circle::new(p, 3, colour.filled())))?;
        }
    }
    Ok(())
}

/// Named curves on shared axes.
type Curves = [(String, Vec<(f64, f64)>)];

fn lines_plot(path: PathBuf, title: &str, x_desc: &str, series: &Curves) -> PlotResult {
    svg(path, |root| {
        let (x0, x1) = span(series.iter().flat_map(|s| s.1.iter().map(|p| p.0)));
        let ys = series.iter().flat_map(|s| s.1.iter().map(|p| p.1));
        let (y0, y1) = span(ys.chain([0.0]));
        let mut c = chart(root, title, 70).build_cartesian_2d(x0..x1, y0..y1)?;
        c.configure_mesh()
            .x_desc(x_desc)
            .y_desc("reading error, 1e-5 nD")
            .draw()?;
        curves(&mut c, series, true)?;
        c.configure_series_labels()
            .border_style(BLACK)
            .background_style(WHITE)
            .draw()?;
        Ok(())
    })
}
/// Noiseless unit as designed: reading error against sample temperature.
pub fn error_vs_temperature(dir: &Path, sc: &Scenario) -> PlotResult {
    let d = description(
        sc,
        sc.thermistor.tolerance_c,
        sc.calibration.standard_uncertainty,
    );
    let mut bench = Bench::calibrated(sc, Unit::NOMINAL, &d)?;
    let [lo, hi] = sc.sample_model.compensation_range_c;
    let temps: Vec<f64> = (0..=12)
        .map(|i| lo + (hi - lo) * f64::from(i) / 12.0)
        .collect();
    let mut series = Vec::new();
    for (name, nd20) in sample_nd20(sc)? {
        let mut pts = Vec::new();
        for &t in &temps {
            // A point the chain refuses (outside a model's range) is left out.
            if let Ok(r) = bench.read(nd20, t) {
                pts.push((t, (r.nd20 - nd20) * 1e5));
            }
        }
        series.push((name, pts));
    }
    lines_plot(
        dir.join("error_vs_temperature.svg"),
        "Reading error against temperature (unit as designed, noiseless)",
        "sample temperature, °C",
        &series,
    )
}

/// Noiseless unit as designed: reading error against sample index.
pub fn error_vs_index(dir: &Path, sc: &Scenario) -> PlotResult {
    let d = description(
        sc,
        sc.thermistor.tolerance_c,
        sc.calibration.standard_uncertainty,
    );
    let mut bench = Bench::calibrated(sc, Unit::NOMINAL, &d)?;
    let [lo, hi] = sc.study.sweep_nd20;
    let mut series = Vec::new();
    for &t in &sc.study.temperatures_c {
        let mut pts = Vec::new();
        for i in 0..=16 {
            let n = lo + (hi - lo) * f64::from(i) / 16.0;
            if let Ok(r) = bench.read(n, t) {
                pts.push((n, (r.nd20 - n) * 1e5));
            }
        }
        series.push((format!("{t} °C"), pts));
    }
    lines_plot(
        dir.join("error_vs_index.svg"),
        "Reading error against sample index (unit as designed, noiseless)",
        "true nD at 20 °C",
        &series,
    )
}

/// Bars of the budget: each factor alone, their root sum of squares, the
/// Monte Carlo total and the firmware's own figure.
pub fn budget_bars(dir: &Path, b: &Budget) -> PlotResult {
    let mut bars: Vec<(String, f64, RGBColor)> = b
        .alone
        .iter()
        .map(|l| {
            let name = l.factor.map_or("?", |f| f.name());
            (name.to_string(), l.bound_nd * 1e5, COLOURS[0])
        })
        .collect();
    bars.push(("root sum of squares".into(), b.rss_nd() * 1e5, COLOURS[4]));
    bars.push((
        "Monte Carlo, all".into(),
        b.total.bound_nd * 1e5,
        COLOURS[1],
    ));
    bars.push((
        "firmware 1.96u".into(),
        b.total.firmware_95 * 1e5,
        COLOURS[2],
    ));
    svg(dir.join("error_budget.svg"), |root| {
        let top = bars.iter().map(|b| b.1).fold(0.0, f64::max).max(1e-6) * 1.15;
        let mut c = chart(root, "Error budget: 95 % bound of the nD20 error", 170)
            .build_cartesian_2d(0f64..top, 0f64..bars.len() as f64)?;
        let names: Vec<String> = bars.iter().map(|b| b.0.clone()).collect();
        c.configure_mesh()
            .disable_y_mesh()
            .y_labels(bars.len() * 2 + 1)
            .y_label_formatter(&|y| {
                let k = (*y - 0.5).round();
                if (y - 0.5 - k).abs() < 1e-6 && k >= 0.0 {
                    names.get(k as usize).cloned().unwrap_or_default()
                } else {
                    String::new()
                }
            })
            .x_desc("1e-5 nD")
            .draw()?;
        c.draw_series(bars.iter().enumerate().map(|(i, (_, v, colour))| {
            let y = i as f64;
            Rectangle::new([(0.0, y + 0.15), (*v, y + 0.85)], colour.filled())
        }))?;
        Ok(())
    })
}

/// The focus metric over the actuator's travel with the path one search took.
pub fn focus_curve(
    dir: &Path,
    scene: &str,
    curve: &[(i32, f64)],
    path_taken: &[(i32, u64)],
) -> PlotResult {
    svg(dir.join("focus_search.svg"), |root| {
        let x1 = curve.last().map_or(1.0, |c| f64::from(c.0));
        let pts: Vec<(f64, f64)> = path_taken
            .iter()
            .map(|&(x, y)| (f64::from(x), y as f64))
            .collect();
        let top = curve
            .iter()
            .map(|c| c.1)
            .chain(pts.iter().map(|p| p.1))
            .fold(1.0, f64::max);
        let title = format!("Focus metric and search path: {scene}");
        let mut c = chart(root, &title, 70).build_cartesian_2d(0f64..x1, 0f64..top * 1.1)?;
        c.configure_mesh()
            .x_desc("actuator code")
            .y_desc("metric, 2^-16")
            .draw()?;
        let model = curve.iter().map(|&(x, y)| (f64::from(x), y));
        c.draw_series(LineSeries::new(model, COLOURS[0].stroke_width(2)))?
            .label("metric model (noiseless)")
            .legend(|(x, y)| key(x, y, COLOURS[0]));
        c.draw_series(LineSeries::new(pts.iter().copied(), COLOURS[1]))?
            .label(format!("search, {} frames", pts.len()))
            .legend(|(x, y)| key(x, y, COLOURS[1]));
        c.draw_series(pts.iter().map(|&p| Circle::new(p, 3, COLOURS[1].filled())))?;
        c.configure_series_labels()
            .border_style(BLACK)
            .background_style(WHITE)
            .draw()?;
        Ok(())
    })
}

/// Near and far limits of sharpness against focus distance.
pub fn depth_of_field(dir: &Path, table: &[(f64, f64, Option<f64>)]) -> PlotResult {
    let far_cap = 100.0;
    let series = [
        (
            "focus distance".to_string(),
            table.iter().map(|t| (t.0, t.0)).collect::<Vec<_>>(),
        ),
        (
            "near limit".to_string(),
            table.iter().map(|t| (t.0, t.1)).collect(),
        ),
        (
            format!("far limit (infinity drawn at {far_cap} m)"),
            table
                .iter()
                .map(|t| (t.0, t.2.unwrap_or(far_cap).min(far_cap)))
                .collect(),
        ),
    ];
    svg(dir.join("depth_of_field.svg"), |root| {
        let mut c = chart(root, "Depth of field against focus distance", 70).build_cartesian_2d(
            (0.1f64..10.0).log_scale(),
            (0.05f64..far_cap * 1.2).log_scale(),
        )?;
        c.configure_mesh()
            .x_desc("focus distance, m")
            .y_desc("distance, m")
            .draw()?;
        curves(&mut c, &series, false)?;
        c.configure_series_labels()
            .border_style(BLACK)
            .background_style(WHITE)
            .draw()?;
        Ok(())
    })
}
