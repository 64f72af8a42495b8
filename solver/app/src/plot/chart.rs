//! Line charts: named series of (x, y) points against labelled axes, with
//! vertical and horizontal marks for events and levels (stage ends, a fluid
//! pressure, a limit).
//!
//! ```no_run
//! use olli_app::plot::{self, Axis, Format, LineChart, Series};
//! let chart = LineChart::new("bush: radial load", Axis::new("travel", "mm"), Axis::new("force", "N"))
//!     .with_series(Series::line("reaction inner y", vec![(0.0, 0.0), (1.0, 120.0), (2.0, 260.0)]))
//!     .with_vertical(1.0, "end of preload");
//! plot::write(&chart, std::path::Path::new("force.png"), Format::Png)?;
//! # Ok::<(), plot::PlotError>(())
//! ```

use plotters::coord::Shift;
use plotters::prelude::*;

use super::{ColorMap, Figure, PlotError, FONT};

/// An axis: the quantity and its unit, written `quantity [unit]`.
#[derive(Debug, Clone, PartialEq)]
pub struct Axis {
    /// The quantity's name, e.g. `displacement`.
    pub quantity: String,
    /// Empty for a dimensionless quantity (then no brackets are written).
    pub unit: String,
}

impl Axis {
    /// An axis of `quantity` in `unit` (empty for none).
    pub fn new(quantity: impl Into<String>, unit: impl Into<String>) -> Self {
        Axis { quantity: quantity.into(), unit: unit.into() }
    }

    /// The axis label.
    pub fn label(&self) -> String {
        if self.unit.is_empty() {
            self.quantity.clone()
        } else {
            format!("{} [{}]", self.quantity, self.unit)
        }
    }
}

/// How a series is drawn.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum SeriesStyle {
    /// A line through the points in order.
    Line,
    /// A dot at each point (measured data, single highlighted values).
    Points,
    /// Both.
    LineAndPoints,
}

/// A named series; points with a non-finite coordinate are left out.
#[derive(Debug, Clone, PartialEq)]
pub struct Series {
    /// The legend entry (an empty name gives none).
    pub name: String,
    /// The (x, y) points, in drawing order.
    pub points: Vec<(f64, f64)>,
    /// Line, points or both.
    pub style: SeriesStyle,
    /// Series with the same group share one colour (measured points and the
    /// fitted curve of one test); `None`: a colour of its own.
    pub group: Option<usize>,
}

impl Series {
    /// A line series.
    pub fn line(name: impl Into<String>, points: Vec<(f64, f64)>) -> Self {
        Series { name: name.into(), points, style: SeriesStyle::Line, group: None }
    }

    /// A series of dots.
    pub fn points(name: impl Into<String>, points: Vec<(f64, f64)>) -> Self {
        Series { name: name.into(), points, style: SeriesStyle::Points, group: None }
    }

    /// The same series in colour group `group` (see [`Series::group`]).
    pub fn in_group(mut self, group: usize) -> Self {
        self.group = Some(group);
        self
    }

    fn finite(&self) -> impl Iterator<Item = (f64, f64)> + Clone + '_ {
        self.points.iter().copied().filter(|(x, y)| x.is_finite() && y.is_finite())
    }
}

/// A labelled dashed line across the chart at one coordinate.
#[derive(Debug, Clone, PartialEq)]
pub struct Mark {
    /// The coordinate of the line, in the axis units.
    pub at: f64,
    /// Text written beside the line.
    pub label: String,
}

/// Where the legend goes.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum Corner {
    /// Top left (default).
    #[default]
    UpperLeft,
    /// Top right.
    UpperRight,
    /// Bottom left.
    LowerLeft,
    /// Bottom right.
    LowerRight,
}

/// A line chart; build it with [`LineChart::new`] and the `with_*` methods,
/// draw it with [`super::write`].
#[derive(Debug, Clone, PartialEq)]
pub struct LineChart {
    /// The title line above the chart.
    pub title: String,
    /// Horizontal axis.
    pub x: Axis,
    /// Vertical axis.
    pub y: Axis,
    /// The curves, drawn in order.
    pub series: Vec<Series>,
    /// Vertical marks at x values (events: stage ends, a chosen increment).
    pub vertical: Vec<Mark>,
    /// Horizontal marks at y values (levels: a fluid pressure, a limit).
    pub horizontal: Vec<Mark>,
    /// Colours of the series, spread over this map (default viridis).
    pub colors: ColorMap,
    /// Corner of the legend box.
    pub legend: Corner,
    /// Width and height in pixels (default 900 × 600).
    pub size: (u32, u32),
}

impl LineChart {
    /// An empty chart with a title and its axes.
    pub fn new(title: impl Into<String>, x: Axis, y: Axis) -> Self {
        LineChart {
            title: title.into(),
            x,
            y,
            series: Vec::new(),
            vertical: Vec::new(),
            horizontal: Vec::new(),
            colors: ColorMap::default(),
            legend: Corner::default(),
            size: (900, 600),
        }
    }

    /// Adds a series.
    pub fn with_series(mut self, series: Series) -> Self {
        self.series.push(series);
        self
    }

    /// Adds a vertical mark at `x`.
    pub fn with_vertical(mut self, x: f64, label: impl Into<String>) -> Self {
        self.vertical.push(Mark { at: x, label: label.into() });
        self
    }

    /// Adds a horizontal mark at `y`.
    pub fn with_horizontal(mut self, y: f64, label: impl Into<String>) -> Self {
        self.horizontal.push(Mark { at: y, label: label.into() });
        self
    }

    /// Puts the legend in `corner`.
    pub fn with_legend(mut self, corner: Corner) -> Self {
        self.legend = corner;
        self
    }

    /// The plotted ranges: every finite point and mark, padded by 5 %.
    fn ranges(&self) -> Result<[Range; 2], PlotError> {
        let points: Vec<(f64, f64)> = self.series.iter().flat_map(|s| s.finite()).collect();
        if points.is_empty() {
            return Err(PlotError::Empty(format!("chart `{}` has no finite point", self.title)));
        }
        let marks = |m: &[Mark]| m.iter().map(|m| m.at).filter(|v| v.is_finite()).collect::<Vec<_>>();
        let x = padded(points.iter().map(|p| p.0).chain(marks(&self.vertical)));
        let y = padded(points.iter().map(|p| p.1).chain(marks(&self.horizontal)));
        Ok([x, y])
    }
}

/// Low and high end of an axis.
pub(crate) type Range = (f64, f64);

/// Range of `values` padded by 5 % each side; a single value gets a unit-ish span.
pub(crate) fn padded(values: impl Iterator<Item = f64>) -> Range {
    let (lo, hi) = values.fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), v| (a.min(v), b.max(v)));
    let span = hi - lo;
    if span > 1e-12 * hi.abs().max(lo.abs()) {
        (lo - 0.05 * span, hi + 0.05 * span)
    } else {
        let half = if lo == 0.0 { 1.0 } else { 0.1 * lo.abs() };
        (lo - half, hi + half)
    }
}

const GREY: RGBColor = RGBColor(110, 110, 110);

impl Figure for LineChart {
    fn size(&self) -> (u32, u32) {
        self.size
    }

    fn draw<DB: DrawingBackend>(&self, root: &DrawingArea<DB, Shift>) -> Result<(), PlotError> {
        let [(x0, x1), (y0, y1)] = self.ranges()?;
        root.fill(&WHITE)?;
        let mut chart = ChartBuilder::on(root)
            .caption(&self.title, (FONT, super::title_size(root, &self.title)))
            .margin(14)
            .x_label_area_size(50)
            .y_label_area_size(80)
            .build_cartesian_2d(x0..x1, y0..y1)?;
        super::draw_axes(&mut chart, &self.x, &self.y, true)?;
        let dashed = GREY.stroke_width(1);
        let small = (FONT, 13).into_font().color(&GREY);
        for m in self.vertical.iter().filter(|m| m.at.is_finite()) {
            chart.draw_series(DashedLineSeries::new([(m.at, y0), (m.at, y1)], 6, 4, dashed))?;
            let at = chart.backend_coord(&(m.at, y1));
            root.draw(&Text::new(m.label.clone(), (at.0 + 4, at.1 + 4), small.clone()))?;
        }
        for m in self.horizontal.iter().filter(|m| m.at.is_finite()) {
            chart.draw_series(DashedLineSeries::new([(x0, m.at), (x1, m.at)], 6, 4, dashed))?;
            let at = chart.backend_coord(&(x0, m.at));
            root.draw(&Text::new(m.label.clone(), (at.0 + 6, at.1 - 16), small.clone()))?;
        }
        // One colour slot per group (in order of first appearance) and per ungrouped series.
        let mut slots: Vec<Option<usize>> = Vec::new();
        let slot_of: Vec<usize> = self
            .series
            .iter()
            .map(|s| match s.group.and_then(|g| slots.iter().position(|&k| k == Some(g))) {
                Some(k) => k,
                None => {
                    slots.push(s.group);
                    slots.len() - 1
                }
            })
            .collect();
        let count = slots.len();
        for (s, &slot) in self.series.iter().zip(&slot_of) {
            let color = self.colors.series(slot, count);
            let line = color.stroke_width(2);
            let dot = color.filled();
            let drawn = match s.style {
                SeriesStyle::Line => chart.draw_series(LineSeries::new(s.finite(), line))?,
                SeriesStyle::Points => chart.draw_series(s.finite().map(|p| Circle::new(p, 4, dot)))?,
                SeriesStyle::LineAndPoints => chart.draw_series(LineSeries::new(s.finite(), line).point_size(3))?,
            };
            if !s.name.is_empty() {
                let style = s.style;
                drawn.label(s.name.clone()).legend(move |(x, y)| -> DynElement<'static, DB, (i32, i32)> {
                    match style {
                        SeriesStyle::Points => Circle::new((x + 10, y), 4, dot).into_dyn(),
                        _ => PathElement::new(vec![(x, y), (x + 20, y)], line).into_dyn(),
                    }
                });
            }
        }
        if self.series.iter().any(|s| !s.name.is_empty()) {
            let position = match self.legend {
                Corner::UpperLeft => SeriesLabelPosition::UpperLeft,
                Corner::UpperRight => SeriesLabelPosition::UpperRight,
                Corner::LowerLeft => SeriesLabelPosition::LowerLeft,
                Corner::LowerRight => SeriesLabelPosition::LowerRight,
            };
            chart
                .configure_series_labels()
                .position(position)
                .background_style(WHITE.mix(0.85))
                .border_style(GREY)
                .label_font((FONT, 14))
                .draw()?;
        }
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::super::{render_rgb, render_svg};
    use super::*;

    fn chart() -> LineChart {
        LineChart::new("test chart", Axis::new("travel", "mm"), Axis::new("force", "N"))
            .with_series(Series::line("rising", vec![(0.0, 0.0), (1.0, 2.0), (2.0, 5.0)]))
            .with_series(Series::points("measured", vec![(0.5, 1.0), (1.5, f64::NAN), (1.5, 3.0)]))
            .with_vertical(1.0, "end of stage `press`")
            .with_horizontal(4.0, "limit")
    }

    #[test]
    fn svg_holds_the_title_labels_legend_and_marks() {
        let svg = render_svg(&chart()).unwrap();
        for text in ["test chart", "travel [mm]", "force [N]", "rising", "measured", "end of stage `press`", "limit"] {
            assert!(svg.contains(&xml_escaped(text)), "missing `{text}`");
        }
        // The rising line is one polyline through its three points.
        assert!(svg.matches("<polyline").count() >= 1);
        assert_eq!(svg.matches("<circle").count(), 2 + 1, "two measured dots and their legend dot");
    }

    fn xml_escaped(s: &str) -> String {
        s.replace('&', "&amp;").replace('<', "&lt;").replace('>', "&gt;")
    }

    #[test]
    fn bitmap_is_not_blank_and_has_the_chart_size() {
        let c = chart();
        let px = render_rgb(&c).unwrap();
        assert_eq!(px.len(), (c.size.0 * c.size.1 * 3) as usize);
        let non_white = px.chunks(3).filter(|p| p != &[255, 255, 255]).count();
        // Axes, text and lines cover a few per cent of the picture.
        assert!(non_white > 2000, "{non_white} non-white pixels");
        // The first series is drawn in viridis' low-end colour.
        let RGBColor(r, g, b) = ColorMap::Viridis.series(0, 2);
        assert!(px.chunks(3).any(|p| p == [r, g, b]));
    }

    #[test]
    fn a_chart_without_finite_points_is_an_error() {
        let c = LineChart::new("empty", Axis::new("x", ""), Axis::new("y", "")).with_series(Series::line("nan", vec![(f64::NAN, 1.0)]));
        assert!(matches!(render_rgb(&c), Err(PlotError::Empty(_))));
    }

    #[test]
    fn ranges_pad_and_survive_a_flat_series() {
        assert_eq!(padded([0.0, 10.0].into_iter()), (-0.5, 10.5));
        assert_eq!(padded([0.0, 0.0].into_iter()), (-1.0, 1.0));
        let (lo, hi) = padded([5.0].into_iter());
        assert!(lo < 5.0 && hi > 5.0);
    }
}
