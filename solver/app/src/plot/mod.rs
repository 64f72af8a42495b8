//! Pictures without a GUI: line charts and contour plots drawn with
//! plotters into PNG or SVG files, shared by `olli plot`, `olli run --plots`,
//! `olli material` and `olli fit`.
//!
//! The API in two lines: build a [`LineChart`] (title, [`Axis`] with quantity
//! and unit, named [`Series`], [`Mark`]s for events such as stage ends) or a
//! [`ContourPlot`] (a field over polygons, banded, with a colour bar), then [`write`] it to a file as [`Format::Png`] or
//! [`Format::Svg`]; [`ColorMap`] gives viridis (default) or cividis.
//!
//! Text is drawn with a font shipped in the repository (DejaVu Sans, under
//! `solver/app/assets/`), registered once before any drawing, so pictures
//! render the same on a machine with no system fonts.

pub mod chart;
pub mod colormap;
pub mod contour;

use std::path::{Path, PathBuf};
use std::sync::Once;

use plotters::coord::types::RangedCoordf64;
use plotters::coord::Shift;
use plotters::prelude::*;

pub use chart::{Axis, Corner, LineChart, Mark, Series, SeriesStyle};
pub use colormap::ColorMap;
pub use contour::{ContourPlot, LineKind, Outline};

/// Font family every picture uses; registered by [`register_font`].
pub const FONT: &str = "sans-serif";

/// DejaVu Sans (Bitstream Vera licence, see `assets/DejaVuSans.LICENSE`).
static FONT_BYTES: &[u8] = include_bytes!("../../assets/DejaVuSans.ttf");

/// Something wrong while drawing or writing a picture.
#[derive(Debug, thiserror::Error)]
pub enum PlotError {
    /// The drawing library failed (a coordinate range it cannot handle, a glyph).
    #[error("cannot draw the picture: {0}")]
    Draw(String),
    /// The picture could not be encoded as PNG.
    #[error("cannot encode the picture as PNG: {0}")]
    Encode(String),
    /// The file could not be written.
    #[error("{path}: cannot write the picture: {source}")]
    Write {
        /// The picture file.
        path: PathBuf,
        /// What the operating system reported.
        source: std::io::Error,
    },
    /// There is nothing to draw (no finite point, no element).
    #[error("nothing to plot: {0}")]
    Empty(String),
}

impl<E: std::error::Error + Send + Sync> From<DrawingAreaErrorKind<E>> for PlotError {
    fn from(e: DrawingAreaErrorKind<E>) -> Self {
        PlotError::Draw(e.to_string())
    }
}

/// File format of a picture.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, clap::ValueEnum)]
pub enum Format {
    /// Raster image, 8-bit RGB.
    #[default]
    Png,
    /// Vector image; text stays text.
    Svg,
}

impl Format {
    /// File extension without the dot.
    pub fn extension(self) -> &'static str {
        match self {
            Format::Png => "png",
            Format::Svg => "svg",
        }
    }

    /// `stem.png` or `stem.svg`.
    pub fn file_name(self, stem: &str) -> String {
        format!("{stem}.{}", self.extension())
    }
}

/// A picture that can be drawn on any plotters backend.
pub trait Figure {
    /// Width and height in pixels.
    fn size(&self) -> (u32, u32);
    /// Draws the whole picture on `root` (which has [`Figure::size`]).
    fn draw<DB: DrawingBackend>(&self, root: &DrawingArea<DB, Shift>) -> Result<(), PlotError>;
}

/// Registers the shipped font under [`FONT`]; cheap after the first call.
pub fn register_font() {
    static ONCE: Once = Once::new();
    ONCE.call_once(|| {
        // The font is compiled in and known to parse; a failure here is a broken build.
        if plotters::style::register_font(FONT, FontStyle::Normal, FONT_BYTES).is_err() {
            panic!("the shipped DejaVu Sans font does not parse");
        }
    });
}

/// Renders `figure` to 8-bit RGB pixels, row by row (3 bytes a pixel).
pub fn render_rgb(figure: &impl Figure) -> Result<Vec<u8>, PlotError> {
    register_font();
    let (w, h) = figure.size();
    let mut pixels = vec![255u8; (w * h * 3) as usize];
    {
        let root = BitMapBackend::with_buffer(&mut pixels, (w, h)).into_drawing_area();
        figure.draw(&root)?;
        root.present()?;
    }
    Ok(pixels)
}

/// Renders `figure` as SVG text.
pub fn render_svg(figure: &impl Figure) -> Result<String, PlotError> {
    register_font();
    let mut text = String::new();
    {
        let root = SVGBackend::with_string(&mut text, figure.size()).into_drawing_area();
        figure.draw(&root)?;
        root.present()?;
    }
    Ok(text)
}

/// PNG file bytes of `pixels` (RGB, `size` = width, height).
pub fn encode_png(pixels: &[u8], size: (u32, u32)) -> Result<Vec<u8>, PlotError> {
    let mut bytes = Vec::new();
    let mut encoder = png::Encoder::new(&mut bytes, size.0, size.1);
    encoder.set_color(png::ColorType::Rgb);
    encoder.set_depth(png::BitDepth::Eight);
    let encode = |e: png::EncodingError| PlotError::Encode(e.to_string());
    let mut writer = encoder.write_header().map_err(encode)?;
    writer.write_image_data(pixels).map_err(encode)?;
    writer.finish().map_err(encode)?;
    Ok(bytes)
}

/// Draws `figure` into the file `path` in `format`, atomically (a reader
/// never sees half a picture).
pub fn write(figure: &impl Figure, path: &Path, format: Format) -> Result<(), PlotError> {
    let bytes = match format {
        Format::Png => encode_png(&render_rgb(figure)?, figure.size())?,
        Format::Svg => render_svg(figure)?.into_bytes(),
    };
    crate::output::write_atomic(path, &bytes).map_err(|source| PlotError::Write { path: path.to_path_buf(), source })
}

/// The largest title font size (20 down to 11 pixels) at which `text` fits
/// across `root`; long titles shrink rather than run off the picture.
pub(crate) fn title_size<DB: DrawingBackend>(root: &DrawingArea<DB, Shift>, text: &str) -> u32 {
    let room = root.dim_in_pixel().0.saturating_sub(24);
    (11..=20)
        .rev()
        .find(|&size| root.estimate_text_size(text, &TextStyle::from((FONT, size).into_font())).is_ok_and(|(w, _)| w <= room))
        .unwrap_or(11)
}

/// A chart on two linear f64 axes.
pub(crate) type Chart2d<'a, DB> = ChartContext<'a, DB, Cartesian2d<RangedCoordf64, RangedCoordf64>>;

/// Draws the axes of `chart` with their labels and tick numbers, and a light grid when `grid`.
pub(crate) fn draw_axes<DB: DrawingBackend>(chart: &mut Chart2d<'_, DB>, x: &Axis, y: &Axis, grid: bool) -> Result<(), PlotError> {
    // A tick at a rounding error from zero (−1.1e-16) reads as 0.
    let (xr, yr) = (chart.x_range(), chart.y_range());
    let (x_span, y_span) = ((xr.end - xr.start).abs(), (yr.end - yr.start).abs());
    let tick = |v: f64, span: f64| number(if v.abs() <= 1e-9 * span { 0.0 } else { v });
    let x_tick = |v: &f64| tick(*v, x_span);
    let y_tick = |v: &f64| tick(*v, y_span);
    let mut mesh = chart.configure_mesh();
    mesh.x_desc(x.label())
        .y_desc(y.label())
        .label_style((FONT, 14))
        .axis_desc_style((FONT, 16))
        .x_label_formatter(&x_tick)
        .y_label_formatter(&y_tick)
        .light_line_style(RGBColor(238, 238, 238))
        .bold_line_style(RGBColor(210, 210, 210));
    if !grid {
        mesh.disable_mesh();
    }
    mesh.draw()?;
    Ok(())
}

/// A number for an axis tick or a label: four significant digits, no
/// trailing zeros, exponent form for very large or small magnitudes.
pub fn number(v: f64) -> String {
    if v == 0.0 || !v.is_finite() {
        return if v.is_finite() { "0".into() } else { format!("{v}") };
    }
    let magnitude = v.abs().log10().floor() as i32;
    if !(-3..5).contains(&magnitude) {
        let text = format!("{v:.3e}");
        // 1.500e4 → 1.5e4
        return match text.split_once('e') {
            Some((m, e)) if m.contains('.') => format!("{}e{e}", m.trim_end_matches('0').trim_end_matches('.')),
            _ => text,
        };
    }
    let decimals = (3 - magnitude).max(0) as usize;
    let text = format!("{v:.decimals$}");
    if text.contains('.') {
        text.trim_end_matches('0').trim_end_matches('.').to_string()
    } else {
        text
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn numbers_keep_four_significant_digits() {
        assert_eq!(number(0.0), "0");
        assert_eq!(number(1.0), "1");
        assert_eq!(number(0.30000000000000004), "0.3");
        assert_eq!(number(-12.34567), "-12.35");
        assert_eq!(number(2500.0), "2500");
        assert_eq!(number(15000.0), "15000");
        assert_eq!(number(150000.0), "1.5e5");
        assert_eq!(number(0.000125), "1.25e-4");
    }

    #[test]
    fn png_bytes_carry_the_size() {
        let bytes = encode_png(&[0u8; 4 * 3 * 3], (4, 3)).unwrap();
        let decoder = png::Decoder::new(std::io::Cursor::new(bytes));
        let reader = decoder.read_info().unwrap();
        assert_eq!((reader.info().width, reader.info().height), (4, 3));
    }
}
