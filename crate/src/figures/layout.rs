//! The layout of a figure: text size from the figure's size (or the size an
//! export asks for), line widths, and the room the axis labels take.

use super::scale::{tick_label, AxisScale};
use super::style::Theme;
use super::{PlotRequest, MAX_FONT_PX, MIN_FONT_PX};
use plotters::prelude::*;

/// Sizes in backend pixels.
pub struct Layout {
    pub font_px: f64,
    /// Line widths scale with the text.
    pub line_scale: f64,
    pub tick_font: TextStyle<'static>,
    pub desc_font: TextStyle<'static>,
    /// Width of a thin rule (axes, grid, zero line), at least one pixel.
    pub rule: u32,
    pub size: (u32, u32),
}

impl Layout {
    pub fn new(size: (u32, u32), req: &PlotRequest, theme: &Theme) -> Layout {
        let (w, h) = size;
        let ratio = if req.pixel_ratio.is_finite() { req.pixel_ratio.clamp(0.25, 8.0) } else { 1.0 };
        let css_size = (f64::from(w) / ratio).min(f64::from(h) / ratio * 1.6);
        let css_font = req.font_px.filter(|f| f.is_finite()).map(|f| f.clamp(MIN_FONT_PX, MAX_FONT_PX));
        let font_px = css_font.unwrap_or_else(|| (css_size / 48.0).clamp(11.0, 18.0)) * ratio;
        let font = |px: f64| ("sans-serif", px).into_font().color(&theme.text);
        Layout {
            font_px,
            line_scale: font_px / 13.0,
            tick_font: font(font_px),
            desc_font: font(font_px * 1.08),
            rule: ratio.round().max(1.0) as u32,
            size,
        }
    }

    /// About how many ticks fit along the x axis.
    pub fn x_ticks(&self) -> usize {
        (f64::from(self.size.0) * 0.8 / (self.font_px * 6.5)) as usize
    }

    /// About how many ticks fit along a y axis.
    pub fn y_ticks(&self) -> usize {
        (f64::from(self.size.1) * 0.75 / (self.font_px * 3.2)) as usize
    }

    /// Room for a y axis's tick labels and its description.
    pub fn y_area<DB: DrawingBackend>(&self, area: &DrawingArea<DB, plotters::coord::Shift>, scale: &AxisScale) -> u32 {
        let widest = scale
            .ticks
            .iter()
            .map(|v| area.estimate_text_size(&tick_label(*v, scale.step), &self.tick_font).map(|(tw, _)| tw).unwrap_or(0))
            .max()
            .unwrap_or(0);
        (f64::from(widest) + self.font_px * 2.6) as u32
    }

    pub fn x_area(&self) -> u32 {
        (self.font_px * 3.3) as u32
    }

    /// Room on the right when there is no secondary axis.
    pub fn right_margin(&self) -> u32 {
        (self.font_px * 1.2) as u32
    }

    /// A length in font units, as backend pixels.
    pub fn em(&self, k: f64) -> u32 {
        (self.font_px * k) as u32
    }
}
