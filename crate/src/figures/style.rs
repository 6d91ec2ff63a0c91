//! Colours: the band palette and the light and dark themes.

use plotters::style::RGBColor;

/// Okabe-Ito colours (Wong, Nature Methods 8, 441 (2011)) without black,
/// which is kept for the sum: orange, sky blue, bluish green, yellow, blue,
/// vermillion, reddish purple. Band i gets entry i mod 7.
pub const BAND_PALETTE: [(u8, u8, u8); 7] = [
    (0xE6, 0x9F, 0x00),
    (0x56, 0xB4, 0xE9),
    (0x00, 0x9E, 0x73),
    (0xF0, 0xE4, 0x42),
    (0x00, 0x72, 0xB2),
    (0xD5, 0x5E, 0x00),
    (0xCC, 0x79, 0xA7),
];

/// The colour of the band at position `index` in the band list.
pub fn band_colour(index: usize) -> RGBColor {
    let (r, g, b) = BAND_PALETTE[index % BAND_PALETTE.len()];
    RGBColor(r, g, b)
}

/// The same colour as `#rrggbb`, for the page's band table.
pub fn band_colour_hex(index: usize) -> String {
    hex(band_colour(index))
}

/// `#rrggbb`.
pub fn hex(c: RGBColor) -> String {
    format!("#{:02x}{:02x}{:02x}", c.0, c.1, c.2)
}

/// Figure colours for a light or dark page.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Theme {
    pub background: RGBColor,
    /// Text, axes, frame and the sum.
    pub text: RGBColor,
    /// Zero line and secondary traces.
    pub muted: RGBColor,
    pub grid: RGBColor,
}

impl Theme {
    /// `[background, text, muted, grid]` as `#rrggbb`, for the page's CSS.
    pub fn hex(&self) -> [String; 4] {
        [hex(self.background), hex(self.text), hex(self.muted), hex(self.grid)]
    }
}

pub fn theme(dark: bool) -> Theme {
    if dark {
        Theme {
            background: RGBColor(0x16, 0x18, 0x1b),
            text: RGBColor(0xe8, 0xe8, 0xe6),
            muted: RGBColor(0x9a, 0x9c, 0xa0),
            grid: RGBColor(0x30, 0x33, 0x38),
        }
    } else {
        Theme {
            background: RGBColor(0xff, 0xff, 0xff),
            text: RGBColor(0x1a, 0x1a, 0x1a),
            muted: RGBColor(0x70, 0x70, 0x70),
            grid: RGBColor(0xe6, 0xe6, 0xe6),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn palette_is_okabe_ito_without_black() {
        // Hex values as published in Wong, Nature Methods 8, 441 (2011).
        let hexes: Vec<String> = (0..7).map(band_colour_hex).collect();
        assert_eq!(hexes, ["#e69f00", "#56b4e9", "#009e73", "#f0e442", "#0072b2", "#d55e00", "#cc79a7"]);
        assert_eq!(band_colour_hex(7), "#e69f00");
    }
}
