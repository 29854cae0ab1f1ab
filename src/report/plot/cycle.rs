//! Plots of a solved cycle: the T–s diagram over each fluid's saturation dome, the
//! T–p diagram with each valve's isenthalp, each exchanger's temperature–duty curves
//! with the pinch marked, and the exergy destroyed per unit as a bar chart. Each is
//! written as SVG and PNG.

use super::tp_diagram::{self, ValvePath};
use super::{axes, chart, drawing, ensure_font, legend, render, Canvas, Figure};
use crate::equipment::{Coupling, Details, Role};
use crate::error::Result;
use crate::flowsheet::{Plant, UnitSpec};
use crate::fluids::diagram::{equilibrium_hydrogen_dome, saturation_dome, throttling_path};
use crate::solve::Solution;
use plotters::coord::Shift;
use plotters::prelude::*;
use std::path::{Path, PathBuf};

const SIZE: (u32, u32) = (1100, 780);
const HOT: RGBColor = RGBColor(190, 40, 40);
const COLD: RGBColor = RGBColor(30, 90, 190);
const DOME: RGBColor = RGBColor(20, 20, 20);
const STATE: RGBColor = RGBColor(0, 120, 90);
const EQUILIBRIUM_DOME: RGBColor = RGBColor(150, 90, 170);

/// One plot of a solved cycle: its file stem, a caption, and how to draw it.
pub struct CyclePlot<'a> {
    /// The file name without extension (`ts-hydrogen`, `exchanger-cold-hx`, …).
    pub stem: String,
    /// What it shows, in words.
    pub caption: String,
    draw: Box<dyn Fn(Canvas) -> Result<()> + 'a>,
}

impl CyclePlot<'_> {
    /// Draws the plot on `canvas`.
    pub fn render(&self, canvas: Canvas) -> Result<()> {
        (self.draw)(canvas)
    }
}

/// Every plot of the solution, in reading order: the T–s diagram and (where valves
/// pass it) the T–p diagram of each fluid, each exchanger's temperature–duty
/// curves, the exergy destroyed per unit.
pub fn cycle_plots<'a>(plant: &'a Plant, solution: &'a Solution) -> Result<Vec<CyclePlot<'a>>> {
    ensure_font()?;
    let mut plots: Vec<CyclePlot<'a>> = Vec::new();
    let mut fluids: Vec<&'static crate::fluids::Fluid> = Vec::new();
    for f in &solution.streams {
        let fluid = f.state.fluid();
        if !fluids.iter().any(|g| std::ptr::eq(*g, fluid)) {
            fluids.push(fluid);
        }
    }
    for fluid in fluids {
        plots.push(CyclePlot {
            stem: format!("ts-{}", fluid.name),
            caption: format!("T–s diagram of the {} cycle", fluid.name),
            draw: Box::new(move |canvas| {
                render(
                    &TsDiagramFigure {
                        plant,
                        solution,
                        fluid,
                    },
                    SIZE,
                    canvas,
                )
            }),
        });
        // The T–p diagram with the valves of this fluid.
        let valves: Vec<ValvePath> = plant
            .units
            .iter()
            .filter(|u| matches!(u.spec, UnitSpec::Valve(_)))
            .filter(|u| std::ptr::eq(solution.streams[u.inlets[0]].state.fluid(), fluid))
            .map(|u| {
                let inlet = &solution.streams[u.inlets[0]].state;
                let outlet = &solution.streams[u.outlets[0]].state;
                ValvePath {
                    label: format!("valve {}", u.id),
                    points: throttling_path(inlet, outlet.pressure, 40),
                }
            })
            .collect();
        if !valves.is_empty() {
            let diagram = fluid.tp_diagram(7)?;
            plots.push(CyclePlot {
                stem: format!("tp-{}", fluid.name),
                caption: format!(
                    "T–p diagram of {}: inversion curve, isenthalps and each valve's path",
                    fluid.name
                ),
                draw: Box::new(move |canvas| tp_diagram::render_on(&diagram, &valves, canvas)),
            });
        }
    }
    for (unit, result) in plant.units.iter().zip(&solution.units) {
        if let Details::Exchanger(report) = &result.performance.details {
            let id = unit.id.as_str();
            plots.push(CyclePlot {
                stem: format!("exchanger-{id}"),
                caption: if report.streams.is_empty() {
                    format!("exchanger {id}: temperatures against duty, with the pinch")
                } else {
                    format!(
                        "multistream exchanger {id}: hot and cold composite curves against duty, with the pinch"
                    )
                },
                draw: Box::new(move |canvas| {
                    render(&ExchangerCurvesFigure { id, report }, SIZE, canvas)
                }),
            });
        }
    }
    plots.push(CyclePlot {
        stem: "exergy".into(),
        caption: "exergy destroyed per unit".into(),
        draw: Box::new(move |canvas| render(&ExergyBarsFigure { solution }, SIZE, canvas)),
    });
    Ok(plots)
}

/// Writes every plot of the solution into `dir` (created if needed), as SVG and
/// PNG; returns the files written.
pub fn write_all(plant: &Plant, solution: &Solution, dir: &Path) -> Result<Vec<PathBuf>> {
    ensure_font()?;
    crate::report::output_folder(dir)?;
    let mut written = Vec::new();
    for plot in cycle_plots(plant, solution)? {
        for ext in ["svg", "png"] {
            let path = dir.join(format!("{}.{ext}", plot.stem));
            plot.render(Canvas::File(&path))?;
            written.push(path);
        }
    }
    Ok(written)
}

/// Places labels so that their boxes overlap neither each other nor the marked
/// points, and stay inside the plotting area: the four corners around the point
/// first, then farther up and down in steps of a line. A label set away from its
/// point gets a leader line.
struct LabelPlacer {
    /// Boxes taken: (x, y, width, height) in pixels.
    boxes: Vec<(i32, i32, i32, i32)>,
    /// The plotting area: (left, top, right, bottom) in pixels.
    area: (i32, i32, i32, i32),
}

impl LabelPlacer {
    const HEIGHT: i32 = 16;

    fn new(area: (i32, i32, i32, i32), points: &[(i32, i32)]) -> LabelPlacer {
        LabelPlacer {
            boxes: points
                .iter()
                .map(|&(x, y)| (x - 6, y - 6, 12, 12))
                .collect(),
            area,
        }
    }

    fn clear(&self, x: i32, y: i32, w: i32, h: i32) -> bool {
        let (left, top, right, bottom) = self.area;
        x >= left
            && x + w <= right
            && y >= top
            && y + h <= bottom
            && self
                .boxes
                .iter()
                .all(|&(bx, by, bw, bh)| x + w <= bx || bx + bw <= x || y + h <= by || by + bh <= y)
    }

    /// The top-left corner of the label for the point (px, py), and whether it
    /// needs a leader line.
    fn place(&mut self, px: i32, py: i32, text: &str) -> (i32, i32, bool) {
        let (w, h) = (text.chars().count() as i32 * 8 + 4, Self::HEIGHT);
        let mut candidates = vec![
            (px + 7, py - h - 2),
            (px + 7, py + 3),
            (px - 7 - w, py - h - 2),
            (px - 7 - w, py + 3),
        ];
        for step in 1..=12 {
            for x in [px + 7, px - 7 - w] {
                candidates.push((x, py - h - 2 - step * h));
                candidates.push((x, py + 3 + step * h));
            }
        }
        let (x, y) = candidates
            .iter()
            .copied()
            .find(|&(x, y)| self.clear(x, y, w, h))
            .unwrap_or(candidates[0]);
        self.boxes.push((x, y, w, h));
        let far = (y - py).abs() > 2 * h;
        (x, y, far)
    }
}

/// The T–s diagram of one fluid of a cycle, on any backend.
struct TsDiagramFigure<'a> {
    plant: &'a Plant,
    solution: &'a Solution,
    fluid: &'static crate::fluids::Fluid,
}

impl Figure for TsDiagramFigure<'_> {
    fn draw<DB: DrawingBackend>(&self, root: &DrawingArea<DB, Shift>, path: &Path) -> Result<()> {
        let TsDiagramFigure {
            plant,
            solution,
            fluid,
        } = *self;
        let dome = saturation_dome(fluid, 60);
        // Hydrogen that carries its para fraction: its liquid lies on the
        // equilibrium solution's dome, far from normal hydrogen's in entropy.
        let carries_para = solution
            .streams
            .iter()
            .any(|f| std::ptr::eq(f.state.fluid(), fluid) && f.state.para_fraction.is_some());
        let second_dome = if carries_para {
            equilibrium_hydrogen_dome(60)
        } else {
            Vec::new()
        };
        let states: Vec<(String, f64, f64)> = solution
            .stream_names
            .iter()
            .zip(&solution.streams)
            .filter(|(_, f)| std::ptr::eq(f.state.fluid(), fluid))
            .map(|(n, f)| (n.clone(), f.state.entropy / 1e3, f.state.temperature))
            .collect();
        // Process lines: each unit's inlet to its outlet on the same side.
        let mut segments = Vec::new();
        for unit in &plant.units {
            let pairs: Vec<(usize, usize)> = match unit.spec.coupling() {
                Coupling::Sides => unit
                    .inlets
                    .iter()
                    .copied()
                    .zip(unit.outlets.iter().copied())
                    .collect(),
                Coupling::Joined => unit
                    .inlets
                    .iter()
                    .flat_map(|&i| unit.outlets.iter().map(move |&o| (i, o)))
                    .collect(),
                Coupling::WithSource => unit
                    .inlets
                    .iter()
                    .flat_map(|&i| unit.outlets.first().map(move |&o| (i, o)))
                    .collect(),
            };
            for (i, o) in pairs {
                let (a, b) = (&solution.streams[i].state, &solution.streams[o].state);
                if std::ptr::eq(a.fluid(), fluid) && std::ptr::eq(b.fluid(), fluid) {
                    segments.push([
                        (a.entropy / 1e3, a.temperature),
                        (b.entropy / 1e3, b.temperature),
                    ]);
                }
            }
        }
        let s_all: Vec<f64> = dome
            .iter()
            .chain(&second_dome)
            .map(|p| p.0 / 1e3)
            .chain(states.iter().map(|s| s.1))
            .collect();
        let t_all: Vec<f64> = dome
            .iter()
            .map(|p| p.1)
            .chain(states.iter().map(|s| s.2))
            .collect();
        let (s_min, s_max) = (
            s_all.iter().copied().fold(f64::INFINITY, f64::min),
            s_all.iter().copied().fold(f64::NEG_INFINITY, f64::max),
        );
        let t_max = t_all.iter().copied().fold(f64::NEG_INFINITY, f64::max) * 1.08;
        let t_min = t_all.iter().copied().fold(f64::INFINITY, f64::min) * 0.9;
        let pad = 0.06 * (s_max - s_min);
        let title = format!(
            "{}: T–s diagram of the cycle ({})",
            fluid.name,
            fluid.citation()
        );
        let err = drawing(path);
        root.fill(&WHITE).map_err(&err)?;
        let mut chart = chart(
            root,
            &title,
            24,
            (s_min - pad)..(s_max + pad),
            t_min..t_max,
            path,
        )?;
        axes(
            &mut chart,
            ("specific entropy [kJ/(kg·K)]", 1),
            ("temperature [K]", 0),
            path,
        )?;
        chart
            .draw_series(LineSeries::new(
                dome.iter().map(|(s, t)| (s / 1e3, *t)),
                DOME.stroke_width(2),
            ))
            .map_err(&err)?
            .label(if carries_para {
                "saturation dome, normal hydrogen (25 % para)"
            } else {
                "saturation dome"
            })
            .legend(|(x, y)| PathElement::new([(x, y), (x + 18, y)], DOME.stroke_width(2)));
        if !second_dome.is_empty() {
            chart
                .draw_series(LineSeries::new(
                    second_dome.iter().map(|(s, t)| (s / 1e3, *t)),
                    EQUILIBRIUM_DOME.stroke_width(2),
                ))
                .map_err(&err)?
                .label("saturation dome, hydrogen in ortho–para equilibrium")
                .legend(|(x, y)| {
                    PathElement::new([(x, y), (x + 18, y)], EQUILIBRIUM_DOME.stroke_width(2))
                });
        }
        for (k, seg) in segments.iter().enumerate() {
            let series = chart
                .draw_series(LineSeries::new(seg.iter().copied(), COLD.stroke_width(2)))
                .map_err(&err)?;
            if k == 0 {
                series
                    .label("process step (unit inlet → outlet)")
                    .legend(|(x, y)| PathElement::new([(x, y), (x + 18, y)], COLD.stroke_width(2)));
            }
        }
        chart
            .draw_series(
                states
                    .iter()
                    .map(|(_, s, t)| Circle::new((*s, *t), 5, STATE.filled())),
            )
            .map_err(&err)?
            .label("stream states")
            .legend(|(x, y)| Circle::new((x + 9, y), 5, STATE.filled()));
        let points: Vec<(i32, i32)> = states
            .iter()
            .map(|(_, s, t)| chart.backend_coord(&(*s, *t)))
            .collect();
        let (x_range, y_range) = (chart.x_range(), chart.y_range());
        let (left, top) = chart.backend_coord(&(x_range.start, y_range.end));
        let (right, bottom) = chart.backend_coord(&(x_range.end, y_range.start));
        let mut placer = LabelPlacer::new((left, top, right, bottom), &points);
        for ((name, _, _), &(px, py)) in states.iter().zip(&points) {
            let (x, y, far) = placer.place(px, py, name);
            if far {
                // A leader from the point to the near end of the label.
                let width = name.chars().count() as i32 * 8;
                let end = (
                    if x > px { x } else { x + width },
                    y + LabelPlacer::HEIGHT / 2,
                );
                root.draw(&PathElement::new(
                    [(px, py), end],
                    RGBColor(120, 120, 120).stroke_width(1),
                ))
                .map_err(&err)?;
            }
            root.draw(&Text::new(
                name.clone(),
                (x, y),
                ("sans-serif", 14).into_font().color(&BLACK),
            ))
            .map_err(&err)?;
        }
        legend(&mut chart, SeriesLabelPosition::UpperLeft, path)?;
        Ok(())
    }
}

/// An exchanger's temperature–duty curves with the pinch, on any backend.
struct ExchangerCurvesFigure<'a> {
    id: &'a str,
    report: &'a crate::equipment::exchanger::ExchangerReport,
}

impl Figure for ExchangerCurvesFigure<'_> {
    fn draw<DB: DrawingBackend>(&self, root: &DrawingArea<DB, Shift>, path: &Path) -> Result<()> {
        let ExchangerCurvesFigure { id, report } = *self;
        let kw = |q: f64| q / 1e3;
        let profile = &report.profile;
        let q_max = profile.last().map_or(1.0, |p| kw(p.duty)).max(1e-9);
        let temps: Vec<f64> = profile
            .iter()
            .flat_map(|p| [p.hot_temperature, p.cold_temperature])
            .collect();
        let (t_min, t_max) = (
            temps.iter().copied().fold(f64::INFINITY, f64::min),
            temps.iter().copied().fold(f64::NEG_INFINITY, f64::max),
        );
        let span = (t_max - t_min).max(1.0);
        let pinch = profile.iter().min_by(|a, b| {
            (a.hot_temperature - a.cold_temperature)
                .total_cmp(&(b.hot_temperature - b.cold_temperature))
        });
        let conductance = if report.ua.is_finite() {
            format!("UA {:.2} kW/K", report.ua / 1e3)
        } else {
            "UA unbounded: zero pinch".to_string()
        };
        let composite = !report.streams.is_empty();
        let title = if composite {
            format!("multistream exchanger {id}: composite curves ({conductance})")
        } else {
            format!("exchanger {id}: temperature against duty ({conductance})")
        };
        let err = drawing(path);
        root.fill(&WHITE).map_err(&err)?;
        let mut chart = chart(
            root,
            &title,
            24,
            // Room on both sides, so that a pinch at either end stays clear of
            // the axis.
            (-0.03 * q_max)..(q_max * 1.03),
            (t_min - 0.05 * span)..(t_max + 0.08 * span),
            path,
        )?;
        axes(
            &mut chart,
            ("duty transferred from the warm end [kW]", 2),
            ("temperature [K]", 0),
            path,
        )?;
        chart
            .draw_series(LineSeries::new(
                profile.iter().map(|p| (kw(p.duty), p.hot_temperature)),
                HOT.stroke_width(3),
            ))
            .map_err(&err)?
            .label(if composite {
                "hot composite"
            } else {
                "hot stream"
            })
            .legend(|(x, y)| PathElement::new([(x, y), (x + 18, y)], HOT.stroke_width(3)));
        chart
            .draw_series(LineSeries::new(
                profile.iter().map(|p| (kw(p.duty), p.cold_temperature)),
                COLD.stroke_width(3),
            ))
            .map_err(&err)?
            .label(if composite {
                "cold composite"
            } else {
                "cold stream"
            })
            .legend(|(x, y)| PathElement::new([(x, y), (x + 18, y)], COLD.stroke_width(3)));
        if let Some(p) = pinch {
            let q = kw(p.duty);
            chart
                .draw_series([PathElement::new(
                    [(q, p.cold_temperature), (q, p.hot_temperature)],
                    BLACK.stroke_width(2),
                )])
                .map_err(&err)?
                .label(format!("pinch: ΔT min {:.2} K", report.min_approach))
                .legend(|(x, y)| {
                    PathElement::new([(x + 9, y - 6), (x + 9, y + 6)], BLACK.stroke_width(2))
                });
            chart
                .draw_series(
                    [p.cold_temperature, p.hot_temperature]
                        .map(|t| Circle::new((q, t), 4, BLACK.filled())),
                )
                .map_err(&err)?;
        }
        legend(&mut chart, SeriesLabelPosition::UpperRight, path)?;
        Ok(())
    }
}

/// The exergy destroyed per unit as bars, on any backend.
struct ExergyBarsFigure<'a> {
    solution: &'a Solution,
}

impl Figure for ExergyBarsFigure<'_> {
    fn draw<DB: DrawingBackend>(&self, root: &DrawingArea<DB, Shift>, path: &Path) -> Result<()> {
        let ExergyBarsFigure { solution } = *self;
        let bars: Vec<(String, f64)> = solution
            .units
            .iter()
            .filter(|u| !matches!(u.role, Role::Feed(_) | Role::Product(_)))
            .map(|u| (u.id.clone(), u.exergy_destroyed / 1e3))
            .collect();
        let top = bars.iter().map(|b| b.1).fold(0.0f64, f64::max).max(1e-9) * 1.15;
        let n = bars.len().max(1);
        let total: f64 = bars.iter().map(|b| b.1).sum();
        let title = format!("exergy destroyed per unit (total {total:.2} kW)");
        let err = drawing(path);
        root.fill(&WHITE).map_err(&err)?;
        let mut chart = ChartBuilder::on(root)
            .caption(&title, ("sans-serif", 24))
            .margin(18)
            .x_label_area_size(90)
            .y_label_area_size(72)
            .build_cartesian_2d(0.0..n as f64, 0.0..top)
            .map_err(&err)?;
        chart
            .configure_mesh()
            .disable_x_mesh()
            .x_labels(0)
            .x_desc("equipment")
            .y_desc("exergy destroyed [kW]")
            .axis_desc_style(("sans-serif", 20))
            .label_style(("sans-serif", 15))
            .y_label_formatter(&|v| format!("{v:.2}"))
            .draw()
            .map_err(&err)?;
        chart
            .draw_series(bars.iter().enumerate().map(|(i, (_, v))| {
                Rectangle::new(
                    [(i as f64 + 0.15, 0.0), (i as f64 + 0.85, v.max(0.0))],
                    HOT.mix(0.8).filled(),
                )
            }))
            .map_err(&err)?;
        let labels: Vec<_> = bars
            .iter()
            .enumerate()
            .map(|(i, (_, v))| {
                Text::new(
                    format!(
                        "{} %",
                        crate::report::table::fixed(100.0 * v / total.max(1e-300), 1)
                    ),
                    (i as f64 + 0.3, v.max(0.0) + 0.02 * top),
                    ("sans-serif", 15).into_font().color(&BLACK),
                )
            })
            .collect();
        chart.draw_series(labels).map_err(&err)?;
        // Unit names under their bars.
        for (i, (name, _)) in bars.iter().enumerate() {
            let (px, py) = chart.backend_coord(&(i as f64 + 0.5, 0.0));
            let half = name.chars().count() as i32 * 4;
            root.draw(&Text::new(
                name.clone(),
                (px - half, py + 10),
                ("sans-serif", 15).into_font().color(&BLACK),
            ))
            .map_err(&err)?;
        }
        Ok(())
    }
}
