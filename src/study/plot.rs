//! Charts of a sweep as SVG, drawn with the `plotters` crate: one panel per result, each
//! against the first varied input, one line per value of the second (per combination of the
//! others when there are more), axes in engineering units, a legend. Random draws, which have
//! no order, are drawn as points.

use plotters::prelude::*;

use crate::error::{Error, Result};

/// One result to draw.
#[derive(Debug, Clone)]
pub struct Panel {
    /// The result path (the panel's title).
    pub path: String,
    /// Its unit ("mol % dry", "degC", "kW").
    pub unit: String,
}

/// What a chart shows.
#[derive(Debug, Clone)]
pub struct Chart {
    /// The chart's title (the flowsheet's).
    pub title: String,
    /// The varied inputs' paths with their units, in order (the first is the x axis).
    pub inputs: Vec<(String, String)>,
    /// The results drawn, one panel each.
    pub panels: Vec<Panel>,
    /// Draw points rather than lines (random draws).
    pub points: bool,
}

/// Line colours, chosen to stay apart from each other on screen and in greyscale print (the
/// evaluation's ageing chart uses them too).
pub(crate) const COLOURS: [RGBColor; 8] = [
    RGBColor(31, 96, 160),
    RGBColor(200, 82, 0),
    RGBColor(40, 140, 70),
    RGBColor(170, 40, 60),
    RGBColor(110, 80, 160),
    RGBColor(120, 90, 40),
    RGBColor(0, 150, 160),
    RGBColor(90, 90, 90),
];

/// Pixel size of one panel.
const PANEL_WIDTH: u32 = 960;
const PANEL_HEIGHT: u32 = 420;

/// Draw the chart as SVG text. `inputs` and `results` are case-major (as a sweep keeps them).
pub fn svg(chart: &Chart, inputs: &[f64], results: &[f64]) -> Result<String> {
    let n_in = chart.inputs.len().max(1);
    let n_out = chart.panels.len();
    let cases = inputs.len() / n_in;
    if chart.panels.is_empty() || cases == 0 || results.len() != cases * n_out {
        return Err(plot_error("there is nothing to draw".into()));
    }
    // Series: one per distinct combination of the inputs after the first, in case order.
    let mut keys: Vec<Vec<f64>> = Vec::new();
    let mut series_of = Vec::with_capacity(cases);
    for c in 0..cases {
        let key = inputs[c * n_in + 1..(c + 1) * n_in].to_vec();
        let at = match keys.iter().position(|k| same(k, &key)) {
            Some(at) => at,
            None => {
                keys.push(key);
                keys.len() - 1
            }
        };
        series_of.push(at);
    }
    let mut text = String::new();
    {
        let height = PANEL_HEIGHT * n_out as u32;
        let root = SVGBackend::with_string(&mut text, (PANEL_WIDTH, height)).into_drawing_area();
        root.fill(&WHITE).map_err(draw_error)?;
        let areas = root.split_evenly((n_out, 1));
        for (p, (area, panel)) in areas.iter().zip(&chart.panels).enumerate() {
            let xs = (0..cases).map(|c| inputs[c * n_in]);
            let ys = (0..cases).map(|c| results[c * n_out + p]);
            let (x0, x1) = bounds(xs);
            let (y0, y1) = bounds(ys);
            let caption = if p == 0 {
                format!("{}: {}", chart.title, panel.path)
            } else {
                panel.path.clone()
            };
            let mut cc = ChartBuilder::on(area)
                .caption(caption, ("sans-serif", 18))
                .margin(12)
                .x_label_area_size(44)
                .y_label_area_size(80)
                .build_cartesian_2d(x0..x1, y0..y1)
                .map_err(draw_error)?;
            let (x_path, x_unit) = &chart.inputs[0];
            cc.configure_mesh()
                .x_desc(with_unit(x_path, x_unit))
                .y_desc(with_unit(&panel.path, &panel.unit))
                .label_style(("sans-serif", 14))
                .light_line_style(RGBColor(235, 235, 235))
                .draw()
                .map_err(draw_error)?;
            for (s, key) in keys.iter().enumerate() {
                let colour = COLOURS[s % COLOURS.len()];
                let mut pts: Vec<(f64, f64)> = (0..cases)
                    .filter(|c| series_of[*c] == s)
                    .map(|c| (inputs[c * n_in], results[c * n_out + p]))
                    .filter(|(x, y)| x.is_finite() && y.is_finite())
                    .collect();
                let label = series_label(&chart.inputs[1..], key);
                let drawn = if chart.points {
                    cc.draw_series(
                        pts.iter()
                            .map(|&(x, y)| Circle::new((x, y), 2, colour.mix(0.6).filled())),
                    )
                    .map_err(draw_error)?
                } else {
                    pts.sort_by(|a, b| a.0.total_cmp(&b.0));
                    cc.draw_series(LineSeries::new(pts, colour.stroke_width(2)))
                        .map_err(draw_error)?
                };
                if let Some(label) = label {
                    drawn.label(label).legend(move |(x, y)| {
                        PathElement::new(vec![(x, y), (x + 18, y)], colour.stroke_width(2))
                    });
                }
            }
            if chart.inputs.len() > 1 && !chart.points {
                cc.configure_series_labels()
                    .background_style(WHITE.mix(0.85))
                    .border_style(RGBColor(160, 160, 160))
                    .label_font(("sans-serif", 13))
                    .position(SeriesLabelPosition::UpperRight)
                    .draw()
                    .map_err(draw_error)?;
            }
        }
        root.present().map_err(draw_error)?;
    }
    Ok(text)
}

/// "path (unit)", or the path alone for a pure number.
fn with_unit(path: &str, unit: &str) -> String {
    if unit.is_empty() {
        path.to_string()
    } else {
        format!("{path} ({unit})")
    }
}

/// "units.hts.approach.shift = 10 K" for a series; none for a chart of one input.
fn series_label(inputs: &[(String, String)], key: &[f64]) -> Option<String> {
    if inputs.is_empty() {
        return None;
    }
    let parts: Vec<String> = inputs
        .iter()
        .zip(key)
        .map(|((path, unit), v)| format!("{path} = {} {unit}", short(*v)))
        .collect();
    Some(parts.join(", ").trim().to_string())
}

/// A number as a person writes it (up to 6 significant digits, no trailing zeros).
fn short(v: f64) -> String {
    let text = format!("{:.6}", v);
    let text = text.trim_end_matches('0').trim_end_matches('.');
    if text.is_empty() || text == "-" {
        "0".into()
    } else {
        text.to_string()
    }
}

/// The finite range of values, widened a little (and made non-empty).
fn bounds(values: impl Iterator<Item = f64>) -> (f64, f64) {
    let (mut lo, mut hi) = (f64::INFINITY, f64::NEG_INFINITY);
    for v in values.filter(|v| v.is_finite()) {
        lo = lo.min(v);
        hi = hi.max(v);
    }
    if !lo.is_finite() {
        return (0.0, 1.0);
    }
    let pad = if hi > lo {
        0.04 * (hi - lo)
    } else {
        0.05 * lo.abs().max(1e-9)
    };
    (lo - pad, hi + pad)
}

fn same(a: &[f64], b: &[f64]) -> bool {
    a.len() == b.len() && a.iter().zip(b).all(|(x, y)| x.to_bits() == y.to_bits())
}

/// A drawing error of the `plotters` crate as an error of `--plot`.
pub(crate) fn draw_error<E: std::fmt::Debug>(e: E) -> Error {
    plot_error(format!("{e:?}"))
}

/// An error of `--plot`.
pub(crate) fn plot_error(reason: String) -> Error {
    Error::InvalidValue {
        field: "--plot".into(),
        value: String::new(),
        reason,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_chart_has_its_lines_axes_and_legend() {
        let chart = Chart {
            title: "demo".into(),
            inputs: vec![
                ("units.reformer.outlet-temperature".into(), "degC".into()),
                ("units.hts.approach.shift".into(), "K".into()),
            ],
            panels: vec![Panel {
                path: "streams.lts-exit.dry_mol_pct.CO".into(),
                unit: "mol % dry".into(),
            }],
            points: false,
        };
        let inputs = [820.0, 0.0, 820.0, 10.0, 860.0, 0.0, 860.0, 10.0];
        let results = [0.3, 0.5, 0.35, 0.55];
        let text = svg(&chart, &inputs, &results).unwrap();
        assert!(text.starts_with("<svg"));
        assert!(text.contains("units.reformer.outlet-temperature (degC)"));
        assert!(text.contains("streams.lts-exit.dry_mol_pct.CO (mol % dry)"));
        assert!(text.contains("units.hts.approach.shift = 10 K"));
        assert!(text.contains("units.hts.approach.shift = 0 K"));
        // One line and one legend mark per series, in the first two colours.
        assert_eq!(text.matches(r##"stroke="#1F60A0""##).count(), 2);
        assert_eq!(text.matches(r##"stroke="#C85200""##).count(), 2);
        // The line of the 0 K series runs from the first case to the third (x 820 -> 860) and
        // rises left to right (0.3 -> 0.35): its SVG y falls.
        let line = text
            .split("<polyline")
            .find(|p| p.contains("#1F60A0") && p.contains("points"))
            .unwrap();
        let points: Vec<f64> = line
            .split("points=\"")
            .nth(1)
            .unwrap()
            .split('"')
            .next()
            .unwrap()
            .split([' ', ','])
            .filter(|t| !t.is_empty())
            .map(|t| t.parse().unwrap())
            .collect();
        assert!(points[0] < points[2] && points[1] > points[3], "{points:?}");
        assert!(svg(&chart, &[], &[]).is_err());
    }

    #[test]
    fn short_numbers() {
        assert_eq!(short(10.0), "10");
        assert_eq!(short(2.5), "2.5");
        assert_eq!(short(0.0), "0");
        assert_eq!(short(-1.25), "-1.25");
    }
}
