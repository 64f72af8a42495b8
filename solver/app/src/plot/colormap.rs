//! Perceptually uniform colour maps for contours and for telling series
//! apart: viridis (the default) and cividis (also readable with red–green
//! colour blindness). The colour data are those of the `colorous` crate
//! (viridis: van der Walt and Smith's table; cividis: Nuñez, Anderton and
//! Renslow 2018, as a fitted polynomial).

use plotters::style::RGBColor;

/// A colour map from a value in [0, 1] to a colour.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, clap::ValueEnum)]
pub enum ColorMap {
    /// Dark purple → blue → green → yellow.
    #[default]
    Viridis,
    /// Dark blue → grey → yellow.
    Cividis,
}

impl ColorMap {
    /// The colour at `t` (clamped to [0, 1]; NaN gives the low end).
    pub fn at(self, t: f64) -> RGBColor {
        let t = if t.is_nan() { 0.0 } else { t.clamp(0.0, 1.0) };
        let c = match self {
            ColorMap::Viridis => colorous::VIRIDIS,
            ColorMap::Cividis => colorous::CIVIDIS,
        }
        .eval_continuous(t);
        RGBColor(c.r, c.g, c.b)
    }

    /// The colour of `value` on the scale `low..high` (a flat scale gives the middle).
    pub fn scaled(self, value: f64, low: f64, high: f64) -> RGBColor {
        if high > low {
            self.at((value - low) / (high - low))
        } else {
            self.at(0.5)
        }
    }

    /// Colour of series `index` of `count` on a white background: spread
    /// over the map, stopping short of its palest end.
    pub fn series(self, index: usize, count: usize) -> RGBColor {
        if count <= 1 {
            return self.at(0.0);
        }
        self.at(0.85 * index as f64 / (count - 1) as f64)
    }

    /// Name as written on the command line.
    pub fn name(self) -> &'static str {
        match self {
            ColorMap::Viridis => "viridis",
            ColorMap::Cividis => "cividis",
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// End colours of the published maps: viridis #440154 → #fde725
    /// (van der Walt and Smith, matplotlib's colour map, 2015); cividis
    /// starts dark blue and ends yellow (Nuñez et al. 2018, PLoS ONE
    /// 13(7) e0199239), to within the fitted polynomial's few levels.
    #[test]
    fn ends_match_the_published_maps() {
        assert_eq!(ColorMap::Viridis.at(0.0), RGBColor(0x44, 0x01, 0x54));
        assert_eq!(ColorMap::Viridis.at(1.0), RGBColor(0xfd, 0xe7, 0x25));
        assert_eq!(ColorMap::Viridis.at(-3.0), ColorMap::Viridis.at(0.0));
        let RGBColor(r, g, b) = ColorMap::Cividis.at(0.0);
        assert!(r < 10 && g < 50 && b > 60, "cividis low end ({r}, {g}, {b})");
        let RGBColor(r, g, b) = ColorMap::Cividis.at(1.0);
        assert!(r > 240 && g > 220 && b < 80, "cividis high end ({r}, {g}, {b})");
    }

    /// Perceptual uniformity implies monotone lightness: the sum of the
    /// channels (a crude lightness) rises along both maps.
    #[test]
    fn lightness_rises_along_the_map() {
        for map in [ColorMap::Viridis, ColorMap::Cividis] {
            let light = |t: f64| {
                let RGBColor(r, g, b) = map.at(t);
                0.299 * r as f64 + 0.587 * g as f64 + 0.114 * b as f64
            };
            for i in 0..20 {
                let (a, b) = (i as f64 / 20.0, (i + 1) as f64 / 20.0);
                assert!(light(b) > light(a), "{} at {a}..{b}", map.name());
            }
        }
    }
}
