//! Plots of studies: a sweep's liquid yield against one parameter (line) or two
//! (heat map), and a comparison of flowsheets as bars.

use super::{chart, drawing, legend, write_figure, Figure};
use crate::error::Result;
use crate::study::Sweep;
use plotters::coord::Shift;
use plotters::prelude::*;
use std::path::Path;

const SIZE: (u32, u32) = (1100, 780);

/// Liquid yield over the swept parameters: a line for one, a heat map for two (the
/// first two when there are three).
pub fn sweep(study: &Sweep, path: &Path) -> Result<()> {
    write_figure(&SweepFigure { study }, SIZE, path)
}

/// As [`sweep`], drawn on a canvas (a file, or SVG text kept in memory).
pub fn sweep_on(study: &Sweep, canvas: super::Canvas) -> Result<()> {
    super::render(&SweepFigure { study }, SIZE, canvas)
}

/// The drawing of [`sweep`], on any backend.
struct SweepFigure<'a> {
    study: &'a Sweep,
}

impl Figure for SweepFigure<'_> {
    fn draw<DB: DrawingBackend>(&self, root: &DrawingArea<DB, Shift>, path: &Path) -> Result<()> {
        let SweepFigure { study } = *self;
        let v0 = &study.variables[0];
        let label = |v: &crate::study::Variable| {
            if v.unit.is_empty() {
                v.name()
            } else {
                format!("{} [{}]", v.name(), v.unit)
            }
        };
        // Feasible cases carry a yield; infeasible ones (design errors) are drawn
        // apart, and failed ones have none.
        let yields: Vec<(f64, Option<f64>)> = study
            .cases
            .iter()
            .filter(|c| c.outcome.as_ref().map_or(true, |m| m.feasible()))
            .map(|c| {
                (
                    c.coordinates[0],
                    c.outcome.as_ref().ok().map(|m| m.liquid_yield),
                )
            })
            .collect();
        let infeasible: Vec<(f64, f64)> = study
            .cases
            .iter()
            .filter_map(|c| match &c.outcome {
                Ok(m) if !m.feasible() => Some((c.coordinates[0], m.liquid_yield)),
                _ => None,
            })
            .collect();
        let y_max = yields
            .iter()
            .filter_map(|y| y.1)
            .chain(infeasible.iter().map(|p| p.1))
            .fold(0.0f64, f64::max)
            .max(1e-9)
            * 1.1;
        let (x0, x1) = (
            v0.values[0].min(*v0.values.last().unwrap_or(&0.0)),
            v0.values[0].max(*v0.values.last().unwrap_or(&1.0)),
        );
        let err = drawing(path);
        root.fill(&WHITE).map_err(&err)?;
        if study.variables.len() == 1 {
            let mut chart = chart(
                root,
                &format!("liquid yield against {}", v0.name()),
                24,
                x0..x1,
                0.0..y_max,
                path,
            )?;
            chart
                .configure_mesh()
                .x_desc(label(v0))
                .y_desc("liquid yield [-]")
                .axis_desc_style(("sans-serif", 20))
                .label_style(("sans-serif", 16))
                .y_label_formatter(&|v| format!("{v:.3}"))
                .draw()
                .map_err(&err)?;
            chart
                .draw_series(LineSeries::new(
                    yields.iter().filter_map(|(x, y)| y.map(|y| (*x, y))),
                    BLUE.stroke_width(3),
                ))
                .map_err(&err)?
                .label("feasible cases")
                .legend(|(x, y)| PathElement::new([(x, y), (x + 18, y)], BLUE.stroke_width(3)));
            chart
                .draw_series(
                    yields
                        .iter()
                        .filter(|y| y.1.is_none())
                        .map(|(x, _)| Cross::new((*x, 0.0), 6, RED.stroke_width(2))),
                )
                .map_err(&err)?
                .label("failed cases")
                .legend(|(x, y)| Cross::new((x + 9, y), 6, RED.stroke_width(2)));
            if !infeasible.is_empty() {
                let dark_red = RGBColor(120, 0, 0);
                chart
                    .draw_series(
                        infeasible
                            .iter()
                            .map(|&(x, y)| TriangleMarker::new((x, y), 7, dark_red.filled())),
                    )
                    .map_err(&err)?
                    .label("infeasible cases (design errors)")
                    .legend(move |(x, y)| TriangleMarker::new((x + 9, y), 7, dark_red.filled()));
            }
            legend(&mut chart, SeriesLabelPosition::UpperRight, path)?;
        } else {
            let v1 = &study.variables[1];
            let (a0, a1) = (
                v1.values[0].min(*v1.values.last().unwrap_or(&0.0)),
                v1.values[0].max(*v1.values.last().unwrap_or(&1.0)),
            );
            let (dx, dy) = (
                (x1 - x0) / (v0.values.len().max(2) - 1) as f64,
                (a1 - a0) / (v1.values.len().max(2) - 1) as f64,
            );
            let top = y_max / 1.1;
            // The map on the left, its colour bar on the right.
            let (map_area, bar_area) = root.split_horizontally(SIZE.0 - 150);
            let mut chart = chart(
                &map_area,
                &format!("liquid yield over {} and {}", v0.name(), v1.name()),
                22,
                (x0 - dx / 2.0)..(x1 + dx / 2.0),
                (a0 - dy / 2.0)..(a1 + dy / 2.0),
                path,
            )?;
            chart
                .configure_mesh()
                .x_desc(label(v0))
                .y_desc(label(v1))
                .axis_desc_style(("sans-serif", 20))
                .label_style(("sans-serif", 16))
                .draw()
                .map_err(&err)?;
            let cell = |x: f64, y: f64, colour: RGBColor| {
                Rectangle::new(
                    [(x - dx / 2.0, y - dy / 2.0), (x + dx / 2.0, y + dy / 2.0)],
                    colour.filled(),
                )
            };
            // Feasible cases on a perceptually uniform scale; the others on a pale
            // cell of their own with a mark, never a colour of the scale.
            let pale = RGBColor(236, 236, 236);
            chart
                .draw_series(study.cases.iter().map(|c| {
                    let (x, y) = (c.coordinates[0], c.coordinates[1]);
                    match &c.outcome {
                        Ok(m) if m.feasible() => {
                            cell(x, y, viridis(m.liquid_yield / top.max(1e-300)))
                        }
                        _ => cell(x, y, pale),
                    }
                }))
                .map_err(&err)?;
            let mark = 8;
            let infeasible_colour = RGBColor(150, 0, 0);
            chart
                .draw_series(study.cases.iter().filter_map(|c| match &c.outcome {
                    Ok(m) if !m.feasible() => Some(TriangleMarker::new(
                        (c.coordinates[0], c.coordinates[1]),
                        mark,
                        infeasible_colour.filled(),
                    )),
                    _ => None,
                }))
                .map_err(&err)?
                .label("infeasible (design errors)")
                .legend(move |(x, y)| {
                    TriangleMarker::new((x + 9, y), 7, infeasible_colour.filled())
                });
            chart
                .draw_series(study.cases.iter().filter_map(|c| match &c.outcome {
                    Err(_) => Some(Cross::new(
                        (c.coordinates[0], c.coordinates[1]),
                        mark,
                        BLACK.stroke_width(2),
                    )),
                    _ => None,
                }))
                .map_err(&err)?
                .label("failed (no solution)")
                .legend(|(x, y)| Cross::new((x + 9, y), 6, BLACK.stroke_width(2)));
            chart
                .configure_series_labels()
                .position(SeriesLabelPosition::LowerRight)
                .background_style(WHITE.mix(0.9))
                .border_style(BLACK)
                .label_font(("sans-serif", 15))
                .draw()
                .map_err(&err)?;
            // The colour bar.
            let mut bar = ChartBuilder::on(&bar_area)
                .margin_top(60)
                .margin_bottom(74)
                .margin_right(10)
                .y_label_area_size(80)
                .build_cartesian_2d(0.0..1.0, 0.0..top)
                .map_err(&err)?;
            bar.configure_mesh()
                .disable_x_mesh()
                .disable_y_mesh()
                .x_labels(0)
                .y_desc("liquid yield [-] (feasible cases)")
                .y_label_formatter(&|v| format!("{v:.3}"))
                .axis_desc_style(("sans-serif", 16))
                .label_style(("sans-serif", 14))
                .draw()
                .map_err(&err)?;
            let steps = 100;
            bar.draw_series((0..steps).map(|k| {
                let (low, high) = (k as f64 / steps as f64, (k + 1) as f64 / steps as f64);
                Rectangle::new(
                    [(0.0, low * top), (1.0, high * top)],
                    viridis((low + high) / 2.0).filled(),
                )
            }))
            .map_err(&err)?;
        }
        Ok(())
    }
}

/// The viridis colour scale (perceptually uniform; matplotlib's default map, its
/// anchor colours from memory) at a fraction 0–1, interpolated linearly between nine
/// anchors.
fn viridis(fraction: f64) -> RGBColor {
    const ANCHORS: [(u8, u8, u8); 9] = [
        (68, 1, 84),
        (72, 40, 120),
        (62, 74, 137),
        (49, 104, 142),
        (38, 130, 142),
        (31, 158, 137),
        (53, 183, 121),
        (109, 205, 89),
        (253, 231, 37),
    ];
    let f = if fraction.is_finite() {
        fraction.clamp(0.0, 1.0)
    } else {
        0.0
    };
    let position = f * (ANCHORS.len() - 1) as f64;
    let k = (position.floor() as usize).min(ANCHORS.len() - 2);
    let t = position - k as f64;
    let mix = |a: u8, b: u8| (f64::from(a) + t * (f64::from(b) - f64::from(a))).round() as u8;
    let (a, b) = (ANCHORS[k], ANCHORS[k + 1]);
    RGBColor(mix(a.0, b.0), mix(a.1, b.1), mix(a.2, b.2))
}

/// Headline figures of several flowsheets side by side: liquid yield and specific
/// energy as bars.
pub fn compare(names: &[String], yields: &[f64], energies: &[f64], path: &Path) -> Result<()> {
    compare_on(names, yields, energies, super::Canvas::File(path))
}

/// As [`compare`], drawn on a canvas (a file, or SVG text kept in memory).
pub fn compare_on(
    names: &[String],
    yields: &[f64],
    energies: &[f64],
    canvas: super::Canvas,
) -> Result<()> {
    super::render(
        &CompareFigure {
            names,
            yields,
            energies,
        },
        SIZE,
        canvas,
    )
}

/// The drawing of [`compare`], on any backend.
struct CompareFigure<'a> {
    names: &'a [String],
    yields: &'a [f64],
    energies: &'a [f64],
}

impl Figure for CompareFigure<'_> {
    fn draw<DB: DrawingBackend>(&self, root: &DrawingArea<DB, Shift>, path: &Path) -> Result<()> {
        let CompareFigure {
            names,
            yields,
            energies,
        } = *self;
        let n = names.len().max(1);
        let err = drawing(path);
        root.fill(&WHITE).map_err(&err)?;
        let (top, bottom) = root.split_vertically(SIZE.1 / 2);
        for (area, values, title, unit, colour) in [
            (&top, yields, "liquid yield", "[-]", BLUE),
            (
                &bottom,
                energies,
                "specific energy with precooling",
                "[kWh/kg]",
                RED,
            ),
        ] {
            let max = values
                .iter()
                .copied()
                .filter(|v| v.is_finite())
                .fold(0.0f64, f64::max)
                .max(1e-9)
                * 1.2;
            let mut chart = ChartBuilder::on(area)
                .caption(title, ("sans-serif", 20))
                .margin(14)
                .x_label_area_size(40)
                .y_label_area_size(70)
                .build_cartesian_2d(0.0..n as f64, 0.0..max)
                .map_err(&err)?;
            chart
                .configure_mesh()
                .disable_x_mesh()
                .x_labels(0)
                .y_desc(format!("{title} {unit}"))
                .label_style(("sans-serif", 14))
                .axis_desc_style(("sans-serif", 15))
                .draw()
                .map_err(&err)?;
            chart
                .draw_series(
                    values
                        .iter()
                        .enumerate()
                        .filter(|(_, v)| v.is_finite())
                        .map(|(i, v)| {
                            Rectangle::new(
                                [(i as f64 + 0.2, 0.0), (i as f64 + 0.8, *v)],
                                colour.mix(0.7).filled(),
                            )
                        }),
                )
                .map_err(&err)?;
            // Labels in the backend's coordinates, which `backend_coord` gives:
            // drawn on the root (the lower panel's area is offset by its top).
            for (i, name) in names.iter().enumerate() {
                let (px, py) = chart.backend_coord(&(i as f64 + 0.5, 0.0));
                let half = name.chars().count() as i32 * 4;
                root.draw(&Text::new(
                    name.clone(),
                    (px - half, py + 8),
                    ("sans-serif", 14).into_font().color(&BLACK),
                ))
                .map_err(&err)?;
                if let Some(v) = values.get(i).filter(|v| v.is_finite()) {
                    let (vx, vy) = chart.backend_coord(&(i as f64 + 0.35, *v));
                    root.draw(&Text::new(
                        format!("{v:.4}"),
                        (vx, vy - 18),
                        ("sans-serif", 14).into_font().color(&BLACK),
                    ))
                    .map_err(&err)?;
                }
            }
        }
        Ok(())
    }
}
