//! Glyph metrics of the embedded font and a backend wrapper that places glyphs by them.
//!
//! plotters 0.3.7 lays text out with the font's advances but draws each glyph's bitmap at the
//! pen position without its left side bearing, so letters with a large bearing crowd their left
//! neighbour ("harm onic"). For bitmaps the chart therefore draws text one character at a time,
//! each at the offset [`FontMetrics::placements`] gives; all text is measured with these metrics,
//! so SVG and PNG share one layout.
//!
//! The metrics are read from the font's `cmap` (formats 4 and 12), `head`, `hhea`, `OS/2`,
//! `hmtx`, `loca` and `glyf` tables as laid out in the OpenType specification (Microsoft,
//! version 1.9, 2022). Sizes follow ab_glyph's convention, which plotters uses: a text size of
//! `s` px makes ascender − descender equal to `s` px.

use std::sync::OnceLock;

use super::FONT_TTF;

/// Read-only view of the font tables needed for horizontal layout.
#[derive(Debug, Clone)]
pub(crate) struct FontMetrics {
    data: &'static [u8],
    /// Ascender − descender in font units (ab_glyph's "height").
    height_units: f64,
    num_h_metrics: u16,
    num_glyphs: u16,
    hmtx: usize,
    loca: usize,
    glyf: usize,
    long_loca: bool,
    cmap: Cmap,
}

#[derive(Debug, Clone, Copy)]
enum Cmap {
    Format4(usize),
    Format12(usize),
}

fn u16_at(d: &[u8], off: usize) -> Option<u16> {
    let b = d.get(off..off.checked_add(2)?)?;
    Some(u16::from_be_bytes([b[0], b[1]]))
}

fn i16_at(d: &[u8], off: usize) -> Option<i16> {
    u16_at(d, off).map(|v| v as i16)
}

fn u32_at(d: &[u8], off: usize) -> Option<u32> {
    let b = d.get(off..off.checked_add(4)?)?;
    Some(u32::from_be_bytes([b[0], b[1], b[2], b[3]]))
}

impl FontMetrics {
    /// The embedded font's metrics, parsed once; `None` if the font is not a usable TrueType.
    pub(crate) fn embedded() -> Option<&'static FontMetrics> {
        static METRICS: OnceLock<Option<FontMetrics>> = OnceLock::new();
        METRICS
            .get_or_init(|| FontMetrics::parse(FONT_TTF))
            .as_ref()
    }

    fn parse(data: &'static [u8]) -> Option<FontMetrics> {
        let num_tables = u16_at(data, 4)?;
        let table = |tag: &[u8; 4]| -> Option<usize> {
            (0..usize::from(num_tables)).find_map(|i| {
                let rec = 12 + 16 * i;
                if data.get(rec..rec + 4)? == tag {
                    Some(u32_at(data, rec + 8)? as usize)
                } else {
                    None
                }
            })
        };
        let head = table(b"head")?;
        let hhea = table(b"hhea")?;
        let maxp = table(b"maxp")?;
        let hmtx = table(b"hmtx")?;
        let loca = table(b"loca")?;
        let glyf = table(b"glyf")?;
        let cmap_table = table(b"cmap")?;

        // Ascender/descender as ttf-parser (ab_glyph's parser) picks them: OS/2 typographic
        // values when fsSelection bit 7 (USE_TYPO_METRICS) is set, else hhea.
        let mut ascender = i16_at(data, hhea + 4)?;
        let mut descender = i16_at(data, hhea + 6)?;
        if let Some(os2) = table(b"OS/2") {
            let fs_selection = u16_at(data, os2 + 62)?;
            if fs_selection & (1 << 7) != 0 {
                ascender = i16_at(data, os2 + 68)?;
                descender = i16_at(data, os2 + 70)?;
            }
        }
        let height_units = f64::from(ascender) - f64::from(descender);
        if height_units <= 0.0 {
            return None;
        }

        // Prefer a full-Unicode format 12 subtable, else a BMP format 4 one.
        let n = u16_at(data, cmap_table + 2)?;
        let mut f4 = None;
        let mut f12 = None;
        for i in 0..usize::from(n) {
            let rec = cmap_table + 4 + 8 * i;
            let platform = u16_at(data, rec)?;
            let encoding = u16_at(data, rec + 2)?;
            let sub = cmap_table + u32_at(data, rec + 4)? as usize;
            let unicode = platform == 0 || (platform == 3 && (encoding == 1 || encoding == 10));
            if !unicode {
                continue;
            }
            match u16_at(data, sub)? {
                4 => f4 = f4.or(Some(sub)),
                12 => f12 = f12.or(Some(sub)),
                _ => {}
            }
        }
        let cmap = match (f12, f4) {
            (Some(s), _) => Cmap::Format12(s),
            (None, Some(s)) => Cmap::Format4(s),
            (None, None) => return None,
        };
        Some(FontMetrics {
            data,
            height_units,
            num_h_metrics: u16_at(data, hhea + 34)?,
            num_glyphs: u16_at(data, maxp + 4)?,
            hmtx,
            loca,
            glyf,
            long_loca: i16_at(data, head + 50)? != 0,
            cmap,
        })
    }

    /// Glyph index of `c` (0, the missing glyph, if the font lacks it).
    pub(crate) fn glyph_id(&self, c: char) -> u16 {
        let code = u32::from(c);
        let found = match self.cmap {
            Cmap::Format12(sub) => self.lookup12(sub, code),
            Cmap::Format4(sub) => u16::try_from(code)
                .ok()
                .and_then(|code| self.lookup4(sub, code)),
        };
        found.filter(|&g| g < self.num_glyphs).unwrap_or(0)
    }

    fn lookup4(&self, sub: usize, code: u16) -> Option<u16> {
        let d = self.data;
        let seg_x2 = usize::from(u16_at(d, sub + 6)?);
        let ends = sub + 14;
        let starts = ends + seg_x2 + 2;
        let deltas = starts + seg_x2;
        let ranges = deltas + seg_x2;
        for i in (0..seg_x2).step_by(2) {
            let end = u16_at(d, ends + i)?;
            if code > end {
                continue;
            }
            let start = u16_at(d, starts + i)?;
            if code < start {
                return None;
            }
            let delta = u16_at(d, deltas + i)?;
            let range = usize::from(u16_at(d, ranges + i)?);
            if range == 0 {
                return Some(code.wrapping_add(delta));
            }
            let at = ranges + i + range + 2 * usize::from(code - start);
            let g = u16_at(d, at)?;
            return if g == 0 {
                None
            } else {
                Some(g.wrapping_add(delta))
            };
        }
        None
    }

    fn lookup12(&self, sub: usize, code: u32) -> Option<u16> {
        let d = self.data;
        let groups = u32_at(d, sub + 12)? as usize;
        for i in 0..groups {
            let g = sub + 16 + 12 * i;
            let (start, end, first) = (u32_at(d, g)?, u32_at(d, g + 4)?, u32_at(d, g + 8)?);
            if (start..=end).contains(&code) {
                return u16::try_from(first + (code - start)).ok();
            }
        }
        None
    }

    /// Advance width of glyph `g`, font units.
    fn advance_units(&self, g: u16) -> f64 {
        let last = self.num_h_metrics.saturating_sub(1);
        let idx = usize::from(g.min(last));
        f64::from(u16_at(self.data, self.hmtx + 4 * idx).unwrap_or(0))
    }

    /// Left edge (xMin) of glyph `g`'s outline, font units; 0 for an empty glyph.
    fn x_min_units(&self, g: u16) -> f64 {
        let g = usize::from(g);
        let (start, end) = if self.long_loca {
            (
                u32_at(self.data, self.loca + 4 * g),
                u32_at(self.data, self.loca + 4 * g + 4),
            )
        } else {
            (
                u16_at(self.data, self.loca + 2 * g).map(|v| 2 * u32::from(v)),
                u16_at(self.data, self.loca + 2 * g + 2).map(|v| 2 * u32::from(v)),
            )
        };
        match (start, end) {
            (Some(s), Some(e)) if e > s => {
                f64::from(i16_at(self.data, self.glyf + s as usize + 2).unwrap_or(0))
            }
            _ => 0.0,
        }
    }

    /// Pixels per font unit at text size `size` (ab_glyph convention).
    fn scale(&self, size: f64) -> f64 {
        size / self.height_units
    }

    /// Pen positions (px from the start) and bitmap left offsets (px from the pen) of each
    /// character of `text` at `size`, and the total advance, px.
    fn layout(&self, text: &str, size: f64) -> (Vec<(char, f64, i32)>, f64) {
        let s = self.scale(size);
        let mut pen = 0.0;
        let mut glyphs = Vec::with_capacity(text.len());
        for c in text.chars() {
            let g = self.glyph_id(c);
            // ab_glyph rasterises a glyph placed at the origin into a bitmap whose left column
            // is floor(xMin · scale).
            let left = (self.x_min_units(g) * s).floor() as i32;
            glyphs.push((c, pen, left));
            pen += self.advance_units(g) * s;
        }
        (glyphs, pen)
    }

    /// Total advance of `text` at `size`, px.
    pub(crate) fn advance(&self, text: &str, size: f64) -> f64 {
        self.layout(text, size).1
    }

    /// Width (total advance, rounded up) and height (plotters' line box, size / 1.24) of `text`
    /// at `size`, px.
    pub(crate) fn text_box(&self, text: &str, size: f64) -> (u32, u32) {
        let (_, width) = self.layout(text, size);
        (width.ceil() as u32, line_height(size))
    }
}

/// plotters' ab_glyph line box height for text of `size`, px.
pub(crate) fn line_height(size: f64) -> u32 {
    (size / 1.24) as u32
}

impl FontMetrics {
    /// Where to draw each visible character of `text` at `size` so that its bitmap (as
    /// plotters rasterises a lone character, left column at the pen) lands where its side
    /// bearing puts it: (character, horizontal offset in whole px from the text start), and the
    /// total advance, px. `shift` is added to every pen position before rounding (anchoring).
    pub(crate) fn placements(&self, text: &str, size: f64, shift: f64) -> (Vec<(char, i32)>, f64) {
        let (glyphs, width) = self.layout(text, size);
        let placed = glyphs
            .into_iter()
            .filter(|(c, _, _)| !c.is_whitespace())
            .map(|(c, pen, left)| (c, (shift + pen).round() as i32 + left))
            .collect();
        (placed, width)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use plotters::style::{FontDesc, FontFamily, FontStyle};

    /// ab_glyph (through plotters) is an independent reader of the same font: for text without
    /// kerning pairs its advance sum, truncated to whole pixels, must equal ours within 1 px.
    #[test]
    fn advances_agree_with_ab_glyph() {
        super::super::ensure_font().expect("font registers");
        let m = FontMetrics::embedded().expect("embedded font parses");
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
                    "{text:?} at {size}: ours {ours:?}, ab_glyph {theirs:?}"
                );
                assert_eq!(ours.1, theirs.1);
            }
        }
    }

    /// DejaVu Sans maps ASCII to distinct glyphs; a character outside the font maps to 0.
    #[test]
    fn cmap_finds_ascii_and_misses_unknown() {
        let m = FontMetrics::embedded().expect("embedded font parses");
        let ids: Vec<u16> = "Aa0 .".chars().map(|c| m.glyph_id(c)).collect();
        assert!(ids.iter().all(|&g| g != 0), "{ids:?}");
        let mut sorted = ids.clone();
        sorted.sort_unstable();
        sorted.dedup();
        assert_eq!(sorted.len(), ids.len());
        assert_eq!(m.glyph_id('\u{10FFFD}'), 0);
    }
}
