//! Plots as SVG or PNG, chosen by the file's extension. Text is drawn with the
//! DejaVu Sans font bundled in the binary, so PNG files carry legible text on a
//! machine with no fonts installed.

pub mod cycle;
pub mod study;
pub mod tp_diagram;

use crate::error::{Error, Result};
use std::path::Path;
use std::sync::OnceLock;

/// The font bundled for plot text (DejaVu Sans; licence beside it in
/// src/report/fonts/).
static FONT: &[u8] = include_bytes!("../fonts/DejaVuSans.ttf");

/// Registers the bundled font under the family name plots use.
pub fn ensure_font() -> Result<()> {
    static DONE: OnceLock<bool> = OnceLock::new();
    let ok = *DONE.get_or_init(|| {
        plotters::style::register_font("sans-serif", plotters::style::FontStyle::Normal, FONT)
            .is_ok()
    });
    if ok {
        Ok(())
    } else {
        Err(Error::Input(
            "the bundled plot font could not be loaded".into(),
        ))
    }
}

/// The image formats plots are written in.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Format {
    /// Scalable vector graphics.
    Svg,
    /// Portable network graphics.
    Png,
}

/// The format implied by a file name, or an error naming the allowed extensions.
pub fn format_of(path: &Path) -> Result<Format> {
    match path
        .extension()
        .and_then(|e| e.to_str())
        .map(str::to_ascii_lowercase)
        .as_deref()
    {
        Some("svg") => Ok(Format::Svg),
        Some("png") => Ok(Format::Png),
        _ => Err(Error::Input(format!(
            "{}: a plot file must end in .svg or .png",
            path.display()
        ))),
    }
}

/// A plot that draws itself on any plotters backend, so that one drawing serves
/// both SVG and PNG.
pub(crate) trait Figure {
    /// Draws on `root`; `path` names the file in errors.
    fn draw<DB: plotters::prelude::DrawingBackend>(
        &self,
        root: &plotters::prelude::DrawingArea<DB, plotters::coord::Shift>,
        path: &Path,
    ) -> Result<()>;
}

/// Where a figure is drawn: a file (SVG or PNG by its extension), or SVG text
/// kept in memory (for a page that carries its plots inline).
pub enum Canvas<'a> {
    /// A file.
    File(&'a Path),
    /// SVG text appended to the string.
    Svg(&'a mut String),
}

/// Draws `figure` at `size` pixels on `canvas`.
pub(crate) fn render(figure: &impl Figure, size: (u32, u32), canvas: Canvas) -> Result<()> {
    use plotters::prelude::{IntoDrawingArea, SVGBackend};
    match canvas {
        Canvas::File(path) => write_figure(figure, size, path),
        Canvas::Svg(text) => {
            ensure_font()?;
            let name = Path::new("(inline plot)");
            let mut drawn = String::new();
            {
                let root = SVGBackend::with_string(&mut drawn, size).into_drawing_area();
                figure.draw(&root, name)?;
                root.present().map_err(drawing(name))?;
            }
            text.push_str(&drawn);
            Ok(())
        }
    }
}

/// Writes `figure` at `size` pixels to `path`, as SVG or PNG by the extension.
pub(crate) fn write_figure(figure: &impl Figure, size: (u32, u32), path: &Path) -> Result<()> {
    use plotters::prelude::{IntoDrawingArea, SVGBackend};
    ensure_font()?;
    match format_of(path)? {
        Format::Svg => {
            let root = SVGBackend::new(path, size).into_drawing_area();
            figure.draw(&root, path)?;
            root.present().map_err(drawing(path))
        }
        Format::Png => {
            // Drawn as SVG, then rasterised with anti-aliasing by resvg, so that
            // both formats show the same picture.
            let mut svg = String::new();
            render(figure, size, Canvas::Svg(&mut svg))?;
            let png = rasterise(&svg, path)?;
            std::fs::write(path, png).map_err(|e| Error::file("write", path, e.to_string()))
        }
    }
}

/// SVG text as PNG bytes, anti-aliased, its text in the bundled font.
fn rasterise(svg: &str, path: &Path) -> Result<Vec<u8>> {
    use resvg::{tiny_skia, usvg};
    static FONTS: OnceLock<std::sync::Arc<usvg::fontdb::Database>> = OnceLock::new();
    let fonts = FONTS.get_or_init(|| {
        let mut database = usvg::fontdb::Database::new();
        database.load_font_data(FONT.to_vec());
        database.set_sans_serif_family("DejaVu Sans");
        std::sync::Arc::new(database)
    });
    let options = usvg::Options {
        fontdb: fonts.clone(),
        font_family: "DejaVu Sans".into(),
        ..usvg::Options::default()
    };
    let failed = |what: String| Error::file("write", path, what);
    let tree = usvg::Tree::from_str(svg, &options)
        .map_err(|e| failed(format!("the plot's SVG could not be read back: {e}")))?;
    let size = tree.size().to_int_size();
    let mut pixmap = tiny_skia::Pixmap::new(size.width(), size.height())
        .ok_or_else(|| failed("no room for the image".into()))?;
    pixmap.fill(tiny_skia::Color::WHITE);
    resvg::render(&tree, tiny_skia::Transform::default(), &mut pixmap.as_mut());
    pixmap
        .encode_png()
        .map_err(|e| failed(format!("PNG encoding failed: {e}")))
}

/// The system's reason inside a drawing error's debug text (plotters wraps an
/// `Os { code, kind, message: "…" }`): its message, or the text as it is.
fn plain_reason(debug: &str) -> String {
    match debug.split_once("message: \"") {
        Some((_, rest)) => rest.split('"').next().unwrap_or(rest).to_string(),
        None => debug.to_string(),
    }
}

/// Turns a drawing error into ours.
pub(crate) fn drawing<E: std::fmt::Debug>(path: &Path) -> impl Fn(E) -> Error + '_ {
    move |e| Error::file("write", path, plain_reason(&format!("{e:?}")))
}

/// The chart type every plot here uses: f64 against f64.
pub(crate) type Chart<'a, DB> = plotters::chart::ChartContext<
    'a,
    DB,
    plotters::coord::cartesian::Cartesian2d<
        plotters::coord::types::RangedCoordf64,
        plotters::coord::types::RangedCoordf64,
    >,
>;

/// A chart with a caption (`size` points) and the usual margins and label areas over
/// the x and y ranges.
pub(crate) fn chart<'a, DB: plotters::prelude::DrawingBackend>(
    area: &'a plotters::prelude::DrawingArea<DB, plotters::coord::Shift>,
    title: &str,
    size: u32,
    x: std::ops::Range<f64>,
    y: std::ops::Range<f64>,
    path: &Path,
) -> Result<Chart<'a, DB>> {
    plotters::prelude::ChartBuilder::on(area)
        .caption(title, ("sans-serif", size))
        .margin(18)
        .x_label_area_size(56)
        .y_label_area_size(76)
        .build_cartesian_2d(x, y)
        .map_err(drawing(path))
}

/// Draws the grid and the two axes with their descriptions, the tick labels with
/// the given decimals, and light grey minor lines: the look every line plot shares.
pub(crate) fn axes<'a, DB: plotters::prelude::DrawingBackend + 'a>(
    chart: &mut Chart<'a, DB>,
    (x_description, x_decimals): (&str, usize),
    (y_description, y_decimals): (&str, usize),
    path: &Path,
) -> Result<()> {
    use plotters::prelude::*;
    chart
        .configure_mesh()
        .x_desc(x_description)
        .y_desc(y_description)
        .axis_desc_style(("sans-serif", 20))
        .label_style(("sans-serif", 16))
        .x_label_formatter(&|v| format!("{v:.x_decimals$}"))
        .y_label_formatter(&|v| format!("{v:.y_decimals$}"))
        .light_line_style(RGBColor(235, 235, 235))
        .draw()
        .map_err(drawing(path))
}

/// The series legend in a white box at `position`.
pub(crate) fn legend<'a, DB: plotters::prelude::DrawingBackend + 'a>(
    chart: &mut Chart<'a, DB>,
    position: plotters::prelude::SeriesLabelPosition,
    path: &Path,
) -> Result<()> {
    use plotters::prelude::*;
    chart
        .configure_series_labels()
        .position(position)
        .label_font(("sans-serif", 16))
        .background_style(WHITE.mix(0.9))
        .border_style(BLACK)
        .draw()
        .map_err(drawing(path))
}
