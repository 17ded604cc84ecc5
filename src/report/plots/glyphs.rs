//! Glyph metrics of the embedded font and where to draw each glyph by them.
//!
//! plotters 0.3.7 lays text out with the font's advances but draws each glyph's bitmap at the
//! pen position without its left side bearing, so letters with a large bearing crowd their left
//! neighbour ("harm onic"). For bitmaps the chart therefore draws text one character at a time,
//! each at the offset [`FontMetrics::placements`] gives; all text is measured with these metrics,
//! so SVG and PNG share one layout.
//!
//! The metrics come from ab_glyph, the font reader plotters draws with: glyph ids, advances and
//! the pixel bounds of each glyph's outline. Sizes follow ab_glyph's convention, which plotters
//! uses: a text size of `s` px makes ascender − descender equal to `s` px. Kerning is not
//! applied (text is drawn glyph by glyph).

use std::sync::OnceLock;

use ab_glyph::{Font, FontRef, Point, ScaleFont};

use super::FONT_TTF;

/// The embedded font as ab_glyph reads it, for horizontal layout.
#[derive(Debug, Clone)]
pub(crate) struct FontMetrics {
    font: FontRef<'static>,
    /// Ascender − descender in font units (ab_glyph's "height").
    height_units: f64,
}

impl FontMetrics {
    /// The embedded font's metrics, read once; `None` if ab_glyph cannot read the font.
    pub(crate) fn embedded() -> Option<&'static FontMetrics> {
        static METRICS: OnceLock<Option<FontMetrics>> = OnceLock::new();
        METRICS
            .get_or_init(|| {
                let font = FontRef::try_from_slice(FONT_TTF).ok()?;
                let height_units = f64::from(font.height_unscaled());
                (height_units > 0.0).then_some(FontMetrics { font, height_units })
            })
            .as_ref()
    }

    /// Pixels per font unit at text size `size` (ab_glyph convention).
    fn scale(&self, size: f64) -> f64 {
        size / self.height_units
    }

    /// Pen position (px from the start) of each character of `text` at `size`, and the total
    /// advance, px.
    fn pens(&self, text: &str, size: f64) -> (Vec<(char, f64)>, f64) {
        let s = self.scale(size);
        let mut pen = 0.0;
        let mut glyphs = Vec::with_capacity(text.len());
        for c in text.chars() {
            glyphs.push((c, pen));
            pen += f64::from(self.font.h_advance_unscaled(self.font.glyph_id(c))) * s;
        }
        (glyphs, pen)
    }

    /// Left column of the bitmap ab_glyph rasterises for `c` placed at the origin at `size`,
    /// px (the outline's left edge, floored); 0 for a glyph without an outline.
    fn bitmap_left(&self, c: char, size: f64) -> i32 {
        let scale_factor = self.font.as_scaled(size as f32).scale_factor();
        self.font.outline(self.font.glyph_id(c)).map_or(0, |o| {
            o.px_bounds(scale_factor, Point::default()).min.x as i32
        })
    }

    /// Total advance of `text` at `size`, px.
    pub(crate) fn advance(&self, text: &str, size: f64) -> f64 {
        self.pens(text, size).1
    }

    /// Width (total advance, rounded up) and height (plotters' line box, size / 1.24) of `text`
    /// at `size`, px.
    pub(crate) fn text_box(&self, text: &str, size: f64) -> (u32, u32) {
        (self.advance(text, size).ceil() as u32, line_height(size))
    }

    /// Where to draw each visible character of `text` at `size` so that its bitmap (as
    /// plotters rasterises a lone character, left column at the pen) lands where its side
    /// bearing puts it: (character, horizontal offset in whole px from the text start).
    /// `shift` is added to every pen position before rounding (anchoring).
    pub(crate) fn placements(&self, text: &str, size: f64, shift: f64) -> Vec<(char, i32)> {
        self.pens(text, size)
            .0
            .into_iter()
            .filter(|(c, _)| !c.is_whitespace())
            .map(|(c, pen)| (c, (shift + pen).round() as i32 + self.bitmap_left(c, size)))
            .collect()
    }
}

/// plotters' ab_glyph line box height for text of `size`, px.
pub(crate) fn line_height(size: f64) -> u32 {
    (size / 1.24) as u32
}

#[cfg(test)]
mod tests {
    use super::*;
    use plotters::style::{FontDesc, FontFamily, FontStyle};

    /// DejaVu Sans (the shipped file) read with fontTools 4.68.0 (an independent reader):
    /// hhea ascender 1901, descender −483 (fsSelection bit 7 clear, so hhea is used), i.e. a
    /// height of 2384 units; per character the hmtx advance and the glyf xMin, units.
    const HEIGHT_UNITS: f64 = 2384.0;
    const GLYPHS: [(char, f64, i32); 10] = [
        ('0', 1303.0, 135),
        ('A', 1401.0, 16),
        ('V', 1401.0, 16),
        ('j', 569.0, -37),
        ('W', 2025.0, 68),
        ('f', 721.0, 47),
        ('.', 651.0, 219),
        ('(', 799.0, 176),
        ('µ', 1303.0, 174),
        ('°', 1024.0, 195),
    ];

    /// At a text size equal to the font height one pixel is one font unit, so pen positions
    /// are the running sums of the fontTools advances and each bitmap's left column is the
    /// glyph's xMin (exact; tolerance 1e-9 px on the pens).
    #[test]
    fn metrics_match_an_independent_reader_of_the_font() {
        let m = FontMetrics::embedded().expect("embedded font reads");
        assert_eq!(m.height_units, HEIGHT_UNITS);
        let text: String = GLYPHS.iter().map(|g| g.0).collect();
        let (pens, total) = m.pens(&text, HEIGHT_UNITS);
        let mut expected_pen = 0.0;
        for ((c, pen), &(gc, advance, x_min)) in pens.iter().zip(GLYPHS.iter()) {
            assert_eq!(*c, gc);
            assert!((pen - expected_pen).abs() < 1e-9, "{c:?}: pen {pen}");
            assert_eq!(m.bitmap_left(*c, HEIGHT_UNITS), x_min, "{c:?}");
            expected_pen += advance;
        }
        assert!((total - expected_pen).abs() < 1e-9, "total {total}");
        // Placements add the left column to the rounded pen, and leave out white space.
        let placed = m.placements("A j", HEIGHT_UNITS, 0.5);
        assert_eq!(placed, vec![('A', 1 + 16), ('j', 1401 + 651 + 1 - 37)]);
    }

    /// plotters' own layout of the registered font: for text without kerning pairs its advance
    /// sum, truncated to whole pixels, must equal ours within 1 px, and the line box height
    /// exactly.
    #[test]
    fn advances_agree_with_plotters_layout() {
        super::super::ensure_font().expect("font registers");
        let m = FontMetrics::embedded().expect("embedded font reads");
        for size in [12.0, 15.0, 21.0, 40.0] {
            for text in ["0123456789", "speed (m/s)", "magnet section", "1.5e6 N"] {
                let theirs = FontDesc::new(
                    FontFamily::Name(super::super::FAMILY),
                    size,
                    FontStyle::Normal,
                )
                .box_size(text)
                .expect("measures");
                let ours = m.text_box(text, size);
                assert!(
                    (i64::from(ours.0) - i64::from(theirs.0)).abs() <= 1,
                    "{text:?} at {size}: ours {ours:?}, plotters {theirs:?}"
                );
                assert_eq!(ours.1, theirs.1);
            }
        }
    }
}
