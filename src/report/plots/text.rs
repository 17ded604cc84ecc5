//! Text in charts: the embedded font registered with plotters, measuring and shortening text by
//! the font's metrics, and drawing it (glyph by glyph in bitmaps, see `glyphs`).

use std::sync::OnceLock;

use plotters::coord::Shift;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};
use plotters::style::{register_font, FontDesc, FontFamily, FontStyle, FontTransform};

use super::glyphs::{line_height, FontMetrics};
use super::{draw_error, PlotError, FAMILY, FONT_TTF};

/// Registers the embedded font once per process.
pub(super) fn ensure_font() -> Result<(), PlotError> {
    static REGISTERED: OnceLock<bool> = OnceLock::new();
    let ok = *REGISTERED.get_or_init(|| register_font(FAMILY, FontStyle::Normal, FONT_TTF).is_ok());
    if ok {
        Ok(())
    } else {
        Err(PlotError::Font)
    }
}

fn font(size: f64) -> FontDesc<'static> {
    FontDesc::new(FontFamily::Name(FAMILY), size, FontStyle::Normal)
}

/// The embedded font's metrics.
fn metrics() -> Result<&'static FontMetrics, PlotError> {
    FontMetrics::embedded().ok_or(PlotError::Font)
}

/// Width and height of `text` at `size`, px, from the embedded font's metrics.
pub(super) fn text_size(text: &str, size: f64) -> Result<(u32, u32), PlotError> {
    Ok(metrics()?.text_box(text, size))
}

/// `text` shortened with an ellipsis so that it is at most `max_w` px wide.
pub(super) fn fit_text(text: &str, size: f64, max_w: u32) -> Result<String, PlotError> {
    if text_size(text, size)?.0 <= max_w {
        return Ok(text.to_string());
    }
    let chars: Vec<char> = text.chars().collect();
    // Binary search on the number of characters kept.
    let (mut lo, mut hi) = (0usize, chars.len());
    while lo < hi {
        let mid = (lo + hi).div_ceil(2);
        let candidate: String = chars[..mid].iter().collect::<String>() + "…";
        if text_size(&candidate, size)?.0 <= max_w {
            lo = mid;
        } else {
            hi = mid - 1;
        }
    }
    Ok(chars[..lo].iter().collect::<String>() + "…")
}

/// Draws `text` on `root` with its anchor point at `pos` (root pixels). For bitmaps
/// (`per_glyph`) the text is drawn one character at a time at the offsets the font metrics
/// give, which places glyphs correctly (see the `glyphs` module); for SVG it stays one `<text>`
/// element.
#[allow(clippy::too_many_arguments)]
pub(super) fn put_text<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    per_glyph: bool,
    text: &str,
    pos: (i32, i32),
    size: f64,
    color: RGBColor,
    anchor: (HPos, VPos),
    rotate: bool,
) -> Result<(), PlotError> {
    if text.is_empty() {
        return Ok(());
    }
    let transform = || {
        if rotate {
            FontTransform::Rotate270
        } else {
            FontTransform::None
        }
    };
    let style = font(size).transform(transform()).color(&color);
    if per_glyph {
        let m = metrics()?;
        let width = m.advance(text, size);
        let dx = match anchor.0 {
            HPos::Left => 0.0,
            HPos::Right => -width,
            HPos::Center => -width / 2.0,
        };
        let height = line_height(size) as i32;
        let dy = match anchor.1 {
            VPos::Top => 0,
            VPos::Center => -height / 2,
            VPos::Bottom => -height,
        };
        let placed = m.placements(text, size, dx);
        let style = style.pos(Pos::new(HPos::Left, VPos::Top));
        let trans = transform();
        let mut buf = [0u8; 4];
        for (c, offset) in placed {
            let (tx, ty) = trans.transform(offset, dy);
            root.draw_text(c.encode_utf8(&mut buf), &style, (pos.0 + tx, pos.1 + ty))
                .map_err(draw_error)?;
        }
        Ok(())
    } else {
        root.draw_text(text, &style.pos(Pos::new(anchor.0, anchor.1)), pos)
            .map_err(draw_error)
    }
}
