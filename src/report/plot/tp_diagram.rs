//! The temperature–pressure diagram: saturation line, inversion curve, isenthalps,
//! and the regions where throttling cools and where it warms.

use super::{axes, chart, drawing, legend, write_figure, Figure};
use crate::error::Result;
use crate::fluids::diagram::TpDiagram;
use plotters::coord::Shift;
use plotters::prelude::*;
use std::path::Path;

/// Pixel size of the diagram.
pub const SIZE: (u32, u32) = (1100, 800);

const COOL: RGBColor = RGBColor(214, 232, 250);
const WARM: RGBColor = RGBColor(252, 226, 205);
const INVERSION: RGBColor = RGBColor(176, 30, 45);
const SATURATION: RGBColor = RGBColor(20, 20, 20);
const ISENTHALP: RGBColor = RGBColor(110, 110, 110);

/// An optional valve path to draw on the diagram: inlet and outlet (T K, p Pa) and a
/// label.
#[derive(Debug, Clone)]
pub struct ValvePath {
    /// Label in the legend.
    pub label: String,
    /// (T, p) points along the isenthalp from inlet to outlet.
    pub points: Vec<(f64, f64)>,
}

/// Writes the diagram to `path` (SVG or PNG by extension).
pub fn write(diagram: &TpDiagram, valves: &[ValvePath], path: &Path) -> Result<()> {
    write_figure(&TpFigure { diagram, valves }, SIZE, path)
}

/// Draws the diagram on a canvas (a file, or SVG text kept in memory).
pub fn render_on(diagram: &TpDiagram, valves: &[ValvePath], canvas: super::Canvas) -> Result<()> {
    super::render(&TpFigure { diagram, valves }, SIZE, canvas)
}

/// The T–p diagram with its valve paths, on any backend.
struct TpFigure<'a> {
    diagram: &'a TpDiagram,
    valves: &'a [ValvePath],
}

impl Figure for TpFigure<'_> {
    fn draw<DB: DrawingBackend>(&self, root: &DrawingArea<DB, Shift>, path: &Path) -> Result<()> {
        draw(self.diagram, self.valves, root, path)
    }
}

fn draw<DB: DrawingBackend>(
    d: &TpDiagram,
    valves: &[ValvePath],
    root: &DrawingArea<DB, Shift>,
    path: &Path,
) -> Result<()> {
    let err = drawing(path);
    root.fill(&WHITE).map_err(&err)?;
    let bar = |p: f64| p / 1e5;
    let curve = &d.inversion.curve;
    let t_min = d
        .saturation
        .first()
        .map_or(0.0, |s| s.0)
        .min(curve.last().map_or(0.0, |p| p.temperature))
        * 0.9;
    let t_max = d.inversion.max_inversion_temperature * 1.12;
    let p_max = bar(d.pressure_top);
    let title = format!(
        "{}: Joule-Thomson inversion on the T–p plane ({})",
        d.fluid, d.citation
    );
    let mut chart = chart(root, &title, 26, 0.0..p_max, t_min..t_max, path)?;
    axes(
        &mut chart,
        ("pressure [bar]", 0),
        ("temperature [K]", 0),
        path,
    )?;

    // Regions: warming everywhere, cooling inside the curve and above saturation.
    chart
        .draw_series(std::iter::once(Rectangle::new(
            [(0.0, t_min), (p_max, t_max)],
            WARM.filled(),
        )))
        .map_err(&err)?
        .label("throttling warms (μJT < 0)")
        .legend(|(x, y)| Rectangle::new([(x, y - 6), (x + 18, y + 6)], WARM.filled()));
    let end_t = curve.last().map_or(t_min, |p| p.temperature);
    let mut cooling: Vec<(f64, f64)> = curve
        .iter()
        .map(|p| (bar(p.pressure), p.temperature))
        .collect();
    cooling.extend(
        d.saturation
            .iter()
            .rev()
            .filter(|(t, _)| *t <= end_t)
            .map(|(t, p)| (bar(*p), *t)),
    );
    if let Some(first) = d.saturation.first() {
        cooling.push((0.0, first.0));
    }
    chart
        .draw_series(std::iter::once(Polygon::new(cooling, COOL.filled())))
        .map_err(&err)?
        .label("throttling cools (μJT > 0)")
        .legend(|(x, y)| Rectangle::new([(x, y - 6), (x + 18, y + 6)], COOL.filled()));

    for (i, line) in d.isenthalps.iter().enumerate() {
        let series = chart
            .draw_series(LineSeries::new(
                line.points.iter().map(|(t, p)| (bar(*p), *t)),
                ISENTHALP.stroke_width(1),
            ))
            .map_err(&err)?;
        if i == 0 {
            series
                .label("isenthalps (constant h)")
                .legend(|(x, y)| PathElement::new([(x, y), (x + 18, y)], ISENTHALP));
        }
    }
    chart
        .draw_series(LineSeries::new(
            d.saturation.iter().map(|(t, p)| (bar(*p), *t)),
            SATURATION.stroke_width(3),
        ))
        .map_err(&err)?
        .label("saturation line")
        .legend(|(x, y)| PathElement::new([(x, y), (x + 18, y)], SATURATION.stroke_width(3)));
    chart
        .draw_series(LineSeries::new(
            curve.iter().map(|p| (bar(p.pressure), p.temperature)),
            INVERSION.stroke_width(3),
        ))
        .map_err(&err)?
        .label("inversion curve (μJT = 0)")
        .legend(|(x, y)| PathElement::new([(x, y), (x + 18, y)], INVERSION.stroke_width(3)));
    for valve in valves {
        let points: Vec<(f64, f64)> = valve.points.iter().map(|(t, p)| (bar(*p), *t)).collect();
        chart
            .draw_series(LineSeries::new(points.clone(), BLUE.stroke_width(3)))
            .map_err(&err)?
            .label(valve.label.clone())
            .legend(|(x, y)| PathElement::new([(x, y), (x + 18, y)], BLUE.stroke_width(3)));
        chart
            .draw_series(points.first().map(|p| Circle::new(*p, 5, BLUE.filled())))
            .map_err(&err)?;
    }
    // The two characteristic points, labelled.
    let tmax = d.inversion.max_inversion_temperature;
    let pm = bar(d.inversion.max_inversion_pressure);
    let tm = d.inversion.temperature_at_max_pressure;
    chart
        .draw_series([
            Circle::new((0.0, tmax), 6, INVERSION.filled()),
            Circle::new((pm, tm), 6, INVERSION.filled()),
        ])
        .map_err(&err)?;
    let label_style = ("sans-serif", 17).into_font().color(&BLACK);
    chart
        .draw_series([
            Text::new(
                format!("max. inversion temperature {tmax:.1} K"),
                (0.02 * p_max, tmax + 0.012 * (t_max - t_min)),
                label_style.clone(),
            ),
            Text::new(
                format!("pressure maximum {pm:.1} bar at {tm:.1} K"),
                (pm * 0.62, tm + 0.05 * (t_max - t_min)),
                label_style,
            ),
        ])
        .map_err(&err)?;
    legend(&mut chart, SeriesLabelPosition::UpperRight, path)?;
    Ok(())
}
