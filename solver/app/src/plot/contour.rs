//! Contour pictures: a field over polygons (a deformed section, or the
//! visible faces of a 3-D part seen along an axis) filled in colour bands
//! of a [`ColorMap`], with outlines (undeformed shape, rigid surfaces) and a
//! colour bar carrying the quantity and unit.
//!
//! Each polygon is cut into triangles and each triangle, over which the
//! field is linear, into the pieces between two band levels, so the bands
//! are exact and the picture stays a small vector drawing in SVG. The
//! lowest band takes the map's low end and the highest band its high end.

use plotters::coord::Shift;
use plotters::prelude::*;

use super::chart::padded;
use super::{number, Axis, ColorMap, Figure, PlotError, FONT};

/// How an outline is drawn.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum LineKind {
    /// The undeformed shape: dashed grey.
    Undeformed,
    /// An edge of the deformed shape: thin dark grey.
    Edge,
    /// A rigid surface: thick black.
    Rigid,
}

/// A polyline drawn over the contour; a non-empty `label` goes in the legend.
#[derive(Debug, Clone, PartialEq)]
pub struct Outline {
    /// Vertices in drawing coordinates.
    pub points: Vec<[f64; 2]>,
    /// What the line shows, which sets its style.
    pub kind: LineKind,
    /// Legend entry (empty: none).
    pub label: String,
}

/// A banded contour plot; see the module documentation.
#[derive(Debug, Clone, PartialEq)]
pub struct ContourPlot {
    /// The title line.
    pub title: String,
    /// Horizontal axis.
    pub x: Axis,
    /// Vertical axis.
    pub y: Axis,
    /// The plotted quantity and unit, written beside the colour bar.
    pub field: Axis,
    /// Drawing positions of the nodes.
    pub nodes: Vec<[f64; 2]>,
    /// The field at each node.
    pub values: Vec<f64>,
    /// Convex polygons as node indices, painted in order (later ones cover earlier ones).
    pub cells: Vec<Vec<usize>>,
    /// Polylines drawn over the bands (rigid surfaces, the undeformed outline).
    pub outlines: Vec<Outline>,
    /// Colour map of the bands.
    pub colors: ColorMap,
    /// Number of colour bands (default 12).
    pub bands: usize,
    /// Value range of the colour bar (default: the field's own range).
    pub range: Option<(f64, f64)>,
    /// Width and height in pixels (default 900 × 700).
    pub size: (u32, u32),
}

impl ContourPlot {
    /// A plot of `values` at `nodes` over `cells`, with default colours, bands and size.
    pub fn new(
        title: impl Into<String>,
        x: Axis,
        y: Axis,
        field: Axis,
        nodes: Vec<[f64; 2]>,
        values: Vec<f64>,
        cells: Vec<Vec<usize>>,
    ) -> Self {
        ContourPlot {
            title: title.into(),
            x,
            y,
            field,
            nodes,
            values,
            cells,
            outlines: Vec::new(),
            colors: ColorMap::default(),
            bands: 12,
            range: None,
            size: (900, 700),
        }
    }

    /// The colour bar's range: the given one, else the finite values' range.
    pub fn value_range(&self) -> (f64, f64) {
        if let Some(r) = self.range {
            return r;
        }
        let (lo, hi) =
            self.values.iter().filter(|v| v.is_finite()).fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), &v| (a.min(v), b.max(v)));
        if lo > hi {
            (0.0, 1.0)
        } else {
            (lo, hi)
        }
    }

    /// The band of `value` (0 to bands − 1) on the range `(lo, hi)`.
    fn band_of(&self, value: f64, (lo, hi): (f64, f64)) -> usize {
        if !(hi > lo) {
            return self.bands / 2;
        }
        let k = ((value - lo) / (hi - lo) * self.bands as f64).floor();
        (k.max(0.0) as usize).min(self.bands - 1)
    }

    /// Colour of band `k`: the map's ends for the first and last band.
    pub fn band_color(&self, k: usize) -> RGBColor {
        if self.bands <= 1 {
            return self.colors.at(0.5);
        }
        self.colors.at(k as f64 / (self.bands - 1) as f64)
    }

    /// Plotted ranges with equal scales on both axes for a plot area of `w` × `h` pixels.
    fn equal_ranges(&self, w: f64, h: f64) -> Result<[(f64, f64); 2], PlotError> {
        let xs = self.nodes.iter().map(|p| p[0]).chain(self.outlines.iter().flat_map(|o| o.points.iter().map(|p| p[0])));
        let ys = self.nodes.iter().map(|p| p[1]).chain(self.outlines.iter().flat_map(|o| o.points.iter().map(|p| p[1])));
        let (x, y) = (padded(xs.filter(|v| v.is_finite())), padded(ys.filter(|v| v.is_finite())));
        if !(x.1 > x.0 && y.1 > y.0) {
            return Err(PlotError::Empty(format!("contour `{}` has no finite node", self.title)));
        }
        // Widen the axis with fewer length units per pixel.
        let per_pixel = ((x.1 - x.0) / w).max((y.1 - y.0) / h);
        let widen = |(a, b): (f64, f64), pixels: f64| {
            let half = 0.5 * per_pixel * pixels;
            let mid = 0.5 * (a + b);
            (mid - half, mid + half)
        };
        Ok([widen(x, w), widen(y, h)])
    }
}

/// A polygon vertex carrying the field value.
type Vertex = (f64, f64, f64);

/// Keeps the part of `poly` where `sign * (v − level) ≥ 0` (Sutherland–Hodgman
/// against a level of the linear field).
fn clip(poly: &[Vertex], level: f64, sign: f64) -> Vec<Vertex> {
    let mut out = Vec::with_capacity(poly.len() + 2);
    for i in 0..poly.len() {
        let (p, q) = (poly[i], poly[(i + 1) % poly.len()]);
        let (dp, dq) = (sign * (p.2 - level), sign * (q.2 - level));
        if dp >= 0.0 {
            out.push(p);
        }
        if (dp >= 0.0) != (dq >= 0.0) {
            let t = dp / (dp - dq);
            out.push((p.0 + t * (q.0 - p.0), p.1 + t * (q.1 - p.1), level));
        }
    }
    out
}

const GREY: RGBColor = RGBColor(120, 120, 120);
const DARK: RGBColor = RGBColor(60, 60, 60);
/// Width of the colour bar area on the right, in pixels.
const BAR_AREA: u32 = 170;

impl Figure for ContourPlot {
    fn size(&self) -> (u32, u32) {
        self.size
    }

    fn draw<DB: DrawingBackend>(&self, root: &DrawingArea<DB, Shift>) -> Result<(), PlotError> {
        if self.values.len() != self.nodes.len() {
            return Err(PlotError::Empty(format!("contour `{}`: {} values for {} nodes", self.title, self.values.len(), self.nodes.len())));
        }
        root.fill(&WHITE)?;
        let body = root.titled(&self.title, (FONT, super::title_size(root, &self.title)))?;
        let (w, h) = body.dim_in_pixel();
        let (left, right) = body.split_horizontally(w.saturating_sub(BAR_AREA));
        let (margin, x_area, y_area) = (12u32, 50u32, 80u32);
        let plot_w = (w.saturating_sub(BAR_AREA + 2 * margin + y_area)).max(10) as f64;
        let plot_h = (h.saturating_sub(2 * margin + x_area)).max(10) as f64;
        let [(x0, x1), (y0, y1)] = self.equal_ranges(plot_w, plot_h)?;
        let mut chart = ChartBuilder::on(&left)
            .margin(margin)
            .x_label_area_size(x_area)
            .y_label_area_size(y_area)
            .build_cartesian_2d(x0..x1, y0..y1)?;
        super::draw_axes(&mut chart, &self.x, &self.y, false)?;

        let range = self.value_range();
        let levels: Vec<f64> = (0..=self.bands).map(|k| range.0 + (range.1 - range.0) * k as f64 / self.bands as f64).collect();
        for cell in &self.cells {
            let corners: Vec<Vertex> = cell.iter().map(|&n| (self.nodes[n][0], self.nodes[n][1], self.values[n])).collect();
            if corners.len() < 3 || corners.iter().any(|c| !(c.0.is_finite() && c.1.is_finite())) {
                continue;
            }
            for i in 1..corners.len() - 1 {
                let tri = [corners[0], corners[i], corners[i + 1]];
                let finite = |v: f64| if v.is_finite() { v } else { range.0 };
                let tri = tri.map(|c| (c.0, c.1, finite(c.2)));
                let first = tri.iter().map(|c| self.band_of(c.2, range)).min().unwrap_or(0);
                let last = tri.iter().map(|c| self.band_of(c.2, range)).max().unwrap_or(0);
                for k in first..=last {
                    let mut piece = tri.to_vec();
                    if k > first {
                        piece = clip(&piece, levels[k], 1.0);
                    }
                    if k < last {
                        piece = clip(&piece, levels[k + 1], -1.0);
                    }
                    if piece.len() < 3 {
                        continue;
                    }
                    let color = self.band_color(k);
                    let points: Vec<(f64, f64)> = piece.iter().map(|p| (p.0, p.1)).collect();
                    // The outline in the fill colour closes hairline seams between pieces.
                    chart.draw_series(std::iter::once(Polygon::new(points.clone(), color.filled())))?;
                    let mut closed = points;
                    closed.push(closed[0]);
                    chart.draw_series(std::iter::once(PathElement::new(closed, color.stroke_width(1))))?;
                }
            }
        }
        let mut labelled = false;
        for o in &self.outlines {
            let points: Vec<(f64, f64)> = o.points.iter().map(|p| (p[0], p[1])).filter(|p| p.0.is_finite() && p.1.is_finite()).collect();
            let style = match o.kind {
                LineKind::Undeformed => GREY.stroke_width(1),
                LineKind::Edge => DARK.stroke_width(1),
                LineKind::Rigid => BLACK.stroke_width(3),
            };
            let drawn = match o.kind {
                LineKind::Undeformed => chart.draw_series(DashedLineSeries::new(points, 5, 4, style))?,
                _ => chart.draw_series(LineSeries::new(points, style))?,
            };
            if !o.label.is_empty() {
                labelled = true;
                drawn.label(o.label.clone()).legend(move |(x, y)| PathElement::new(vec![(x, y), (x + 20, y)], style));
            }
        }
        if labelled {
            chart
                .configure_series_labels()
                .position(SeriesLabelPosition::UpperLeft)
                .background_style(WHITE.mix(0.85))
                .border_style(GREY)
                .label_font((FONT, 13))
                .draw()?;
        }
        self.draw_bar(&right, &levels)
    }
}

impl ContourPlot {
    /// The colour bar: one box per band, level values beside it, the quantity above.
    fn draw_bar<DB: DrawingBackend>(&self, area: &DrawingArea<DB, Shift>, levels: &[f64]) -> Result<(), PlotError> {
        let (_, h) = area.dim_in_pixel();
        let (top, bottom) = (60i32, h as i32 - 70);
        let (x0, x1) = (16i32, 46i32);
        let step = (bottom - top) as f64 / self.bands as f64;
        let y_of = |k: usize| bottom - (k as f64 * step).round() as i32;
        for k in 0..self.bands {
            area.draw(&Rectangle::new([(x0, y_of(k + 1)), (x1, y_of(k))], self.band_color(k).filled()))?;
        }
        area.draw(&Rectangle::new([(x0, top), (x1, bottom)], BLACK.stroke_width(1)))?;
        let label_every = self.bands.div_ceil(12).max(1);
        let text = (FONT, 13).into_font().color(&BLACK);
        for (k, v) in levels.iter().enumerate() {
            if k % label_every == 0 || k == self.bands {
                area.draw(&PathElement::new(vec![(x1, y_of(k)), (x1 + 5, y_of(k))], BLACK.stroke_width(1)))?;
                area.draw(&Text::new(number(*v), (x1 + 8, y_of(k) - 7), text.clone()))?;
            }
        }
        let title = (FONT, 14).into_font().color(&BLACK);
        // The quantity over two lines when long: name, then [unit].
        area.draw(&Text::new(self.field.quantity.clone(), (4, top - 44), title.clone()))?;
        if !self.field.unit.is_empty() {
            area.draw(&Text::new(format!("[{}]", self.field.unit), (4, top - 24), title))?;
        }
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::super::render_rgb;
    use super::*;

    /// The field v = x + y on the unit square, one quad: v runs from 0 at
    /// (0, 0) to 2 at (1, 1), so the pixels just inside those corners take
    /// the colour map's two ends, and a pixel near (1, 0) (v = 1) a middle band.
    #[test]
    fn linear_field_on_a_unit_square_puts_the_map_ends_at_the_corners() {
        let nodes = vec![[0.0, 0.0], [1.0, 0.0], [1.0, 1.0], [0.0, 1.0]];
        let values = nodes.iter().map(|p| p[0] + p[1]).collect();
        let plot = ContourPlot::new(
            "unit square",
            Axis::new("x", "L"),
            Axis::new("y", "L"),
            Axis::new("v", ""),
            nodes,
            values,
            vec![vec![0, 1, 2, 3]],
        );
        let px = render_rgb(&plot).unwrap();
        // Locate the square: the pixel box whose colour is not white, grey or black in the plot area.
        let (w, h) = plot.size;
        let at = |x: u32, y: u32| {
            let i = ((y * w + x) * 3) as usize;
            RGBColor(px[i], px[i + 1], px[i + 2])
        };
        let coloured = |c: RGBColor| plot.bands_colours().contains(&c);
        let inside: Vec<(u32, u32)> =
            (0..h).flat_map(|y| (0..w - BAR_AREA).map(move |x| (x, y))).filter(|&(x, y)| coloured(at(x, y))).collect();
        let (xmin, xmax) = (inside.iter().map(|p| p.0).min().unwrap(), inside.iter().map(|p| p.0).max().unwrap());
        let (ymin, ymax) = (inside.iter().map(|p| p.1).min().unwrap(), inside.iter().map(|p| p.1).max().unwrap());
        assert!(
            xmax - xmin > 200 && (xmax - xmin).abs_diff(ymax - ymin) <= 3,
            "square drawn with equal scales: {xmin}..{xmax} × {ymin}..{ymax}"
        );
        // Pixel rows grow downwards: (0, 0) is the lower left corner.
        assert_eq!(at(xmin + 3, ymax - 3), ColorMap::Viridis.at(0.0), "low corner");
        assert_eq!(at(xmax - 3, ymin + 3), ColorMap::Viridis.at(1.0), "high corner");
        let middle = at(xmax - 3, ymax - 3);
        assert!(middle == plot.band_color(5) || middle == plot.band_color(6), "v = 1 lies between bands 5 and 6 of 12");
    }

    impl ContourPlot {
        fn bands_colours(&self) -> Vec<RGBColor> {
            (0..self.bands).map(|k| self.band_color(k)).collect()
        }
    }

    /// Clipping a triangle at a level of its linear field keeps the part above it.
    #[test]
    fn clipping_keeps_the_side_above_the_level() {
        let tri = [(0.0, 0.0, 0.0), (1.0, 0.0, 1.0), (0.0, 1.0, 0.0)];
        let above = clip(&tri, 0.5, 1.0);
        // The corner (1, 0) and the two points where v = 0.5 (x = 0.5).
        assert_eq!(above.len(), 3);
        assert!(above.iter().all(|p| p.2 >= 0.5 && (p.0 >= 0.5 - 1e-12)));
        let below = clip(&tri, 0.5, -1.0);
        assert_eq!(below.len(), 4);
        assert!(below.iter().all(|p| p.2 <= 0.5));
    }
}
