//! The catalyst ageing chart as SVG (plotters, in the colours of the sweep charts): approach
//! temperature against sample date, one series per unit and reaction, each with its linear
//! trend and the 95 % prediction band of a single sample around it.

use plotters::prelude::*;

use super::samples::date_text;
use super::{Evaluation, Trend};
use crate::error::Result;
use crate::study::plot::{draw_error, plot_error, COLOURS};

/// One series: (unit, reaction) and its (day, approach K) points.
type Series = ((String, String), Vec<(f64, f64)>);

/// Draw the chart; an error when no sample is dated.
pub fn svg(evaluation: &Evaluation) -> Result<String> {
    // Series: (unit, reaction) with its dated points.
    let mut series: Vec<Series> = Vec::new();
    for r in &evaluation.samples {
        let Some(day) = r.sample.days else { continue };
        for (reaction, a) in &r.approaches_k {
            let Some(a) = a else { continue };
            let key = (r.sample.unit.clone(), reaction.clone());
            match series.iter_mut().find(|(k, _)| *k == key) {
                Some((_, pts)) => pts.push((day, *a)),
                None => series.push((key, vec![(day, *a)])),
            }
        }
    }
    if series.is_empty() {
        return Err(plot_error(
            "no sample is dated (ISO dates in the sample column)".into(),
        ));
    }
    let band = |t: &Trend, day: f64| {
        let x = day - t.origin_days;
        (
            t.linear.at(x) - t.linear.prediction_k(x),
            t.linear.at(x) + t.linear.prediction_k(x),
        )
    };
    let (mut x0, mut x1, mut y0, mut y1) = (
        f64::INFINITY,
        f64::NEG_INFINITY,
        f64::INFINITY,
        f64::NEG_INFINITY,
    );
    for (_, pts) in &series {
        for (x, y) in pts {
            x0 = x0.min(*x);
            x1 = x1.max(*x);
            y0 = y0.min(*y);
            y1 = y1.max(*y);
        }
    }
    for t in &evaluation.trends {
        for d in [t.origin_days, t.last_days] {
            let (lo, hi) = band(t, d);
            y0 = y0.min(lo);
            y1 = y1.max(hi);
        }
    }
    let pad_x = ((x1 - x0) * 0.03).max(1.0);
    let pad_y = ((y1 - y0) * 0.05).max(0.5);
    let mut text = String::new();
    {
        let root = SVGBackend::with_string(&mut text, (960, 480)).into_drawing_area();
        root.fill(&WHITE).map_err(draw_error)?;
        let mut cc = ChartBuilder::on(&root)
            .caption(
                format!("{}: approach to equilibrium", evaluation.title),
                ("sans-serif", 18),
            )
            .margin(12)
            .x_label_area_size(44)
            .y_label_area_size(70)
            .build_cartesian_2d(x0 - pad_x..x1 + pad_x, y0 - pad_y..y1 + pad_y)
            .map_err(draw_error)?;
        cc.configure_mesh()
            .x_desc("sample date")
            .y_desc("approach temperature (K)")
            .x_label_formatter(&|d| date_text(d.floor() as i64))
            .x_labels(8)
            .label_style(("sans-serif", 14))
            .light_line_style(RGBColor(235, 235, 235))
            .draw()
            .map_err(draw_error)?;
        for (s, ((unit, reaction), pts)) in series.iter().enumerate() {
            let colour = COLOURS[s % COLOURS.len()];
            if let Some(t) = evaluation
                .trends
                .iter()
                .find(|t| &t.unit == unit && &t.reaction == reaction)
            {
                let steps = 60;
                let days: Vec<f64> = (0..=steps)
                    .map(|k| {
                        t.origin_days + (t.last_days - t.origin_days) * k as f64 / steps as f64
                    })
                    .collect();
                let mut polygon: Vec<(f64, f64)> =
                    days.iter().map(|d| (*d, band(t, *d).1)).collect();
                polygon.extend(days.iter().rev().map(|d| (*d, band(t, *d).0)));
                cc.draw_series(std::iter::once(Polygon::new(
                    polygon,
                    colour.mix(0.12).filled(),
                )))
                .map_err(draw_error)?;
                cc.draw_series(LineSeries::new(
                    days.iter().map(|d| (*d, t.linear.at(d - t.origin_days))),
                    colour.stroke_width(2),
                ))
                .map_err(draw_error)?;
            }
            cc.draw_series(
                pts.iter()
                    .map(|&(x, y)| Circle::new((x, y), 3, colour.mix(0.8).filled())),
            )
            .map_err(draw_error)?
            .label(format!("{unit}, {reaction}"))
            .legend(move |(x, y)| Circle::new((x + 9, y), 4, colour.filled()));
        }
        cc.configure_series_labels()
            .background_style(WHITE.mix(0.85))
            .border_style(RGBColor(160, 160, 160))
            .label_font(("sans-serif", 13))
            .position(SeriesLabelPosition::UpperLeft)
            .draw()
            .map_err(draw_error)?;
        root.present().map_err(draw_error)?;
    }
    Ok(text)
}
