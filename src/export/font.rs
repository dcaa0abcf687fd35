//! A small stroke font of our own for legend text: capitals, digits and
//! `- _ .`, each glyph a few polylines on a 4 x 6 grid (y up). Lower-case
//! letters are drawn as capitals; other characters as a blank.

use crate::geometry::{Point, Segment};

/// Glyph strokes: polylines separated by ';', points as "x,y" on the grid.
fn glyph(c: char) -> &'static str {
    match c.to_ascii_uppercase() {
        'A' => "0,0 0,4 2,6 4,4 4,0;0,3 4,3",
        'B' => "0,0 0,6 3,6 4,5 4,4 3,3 0,3;3,3 4,2 4,1 3,0 0,0",
        'C' => "4,6 0,6 0,0 4,0",
        'D' => "0,0 0,6 2,6 4,4 4,2 2,0 0,0",
        'E' => "4,6 0,6 0,0 4,0;0,3 3,3",
        'F' => "4,6 0,6 0,0;0,3 3,3",
        'G' => "4,6 0,6 0,0 4,0 4,3 2,3",
        'H' => "0,0 0,6;4,0 4,6;0,3 4,3",
        'I' => "1,6 3,6;2,6 2,0;1,0 3,0",
        'J' => "4,6 4,0 0,0 0,2",
        'K' => "0,0 0,6;4,6 0,3 4,0",
        'L' => "0,6 0,0 4,0",
        'M' => "0,0 0,6 2,3 4,6 4,0",
        'N' => "0,0 0,6 4,0 4,6",
        'O' => "0,0 0,6 4,6 4,0 0,0",
        'P' => "0,0 0,6 4,6 4,3 0,3",
        'Q' => "0,0 0,6 4,6 4,0 0,0;2,2 4,0",
        'R' => "0,0 0,6 4,6 4,3 0,3;2,3 4,0",
        'S' => "4,6 0,6 0,3 4,3 4,0 0,0",
        'T' => "0,6 4,6;2,6 2,0",
        'U' => "0,6 0,0 4,0 4,6",
        'V' => "0,6 2,0 4,6",
        'W' => "0,6 1,0 2,3 3,0 4,6",
        'X' => "0,0 4,6;0,6 4,0",
        'Y' => "0,6 2,3 4,6;2,3 2,0",
        'Z' => "0,6 4,6 0,0 4,0",
        '0' => "0,0 0,6 4,6 4,0 0,0;0,0 4,6",
        '1' => "1,5 2,6 2,0;1,0 3,0",
        '2' => "0,6 4,6 4,3 0,3 0,0 4,0",
        '3' => "0,6 4,6 4,0 0,0;1,3 4,3",
        '4' => "0,6 0,3 4,3;4,6 4,0",
        '5' => "4,6 0,6 0,3 4,3 4,0 0,0",
        '6' => "4,6 0,6 0,0 4,0 4,3 0,3",
        '7' => "0,6 4,6 1,0",
        '8' => "0,0 0,6 4,6 4,0 0,0;0,3 4,3",
        '9' => "0,0 4,0 4,6 0,6 0,3 4,3",
        '-' => "1,3 3,3",
        '_' => "0,0 4,0",
        '.' => "2,0 2,1",
        _ => "",
    }
}

/// Strokes of `text` with capital height `height` mm, centred on `centre`.
pub fn text_strokes(text: &str, centre: Point, height: f64) -> Vec<Segment> {
    let unit = height / 6.0;
    let advance = 6.0 * unit;
    let n = text.chars().count() as f64;
    let x0 = centre.x - (n * advance - 2.0 * unit) / 2.0;
    let y0 = centre.y - height / 2.0;
    let mut out = Vec::new();
    for (i, c) in text.chars().enumerate() {
        let ox = x0 + i as f64 * advance;
        for stroke in glyph(c).split(';').filter(|s| !s.is_empty()) {
            let pts: Vec<Point> = stroke
                .split(' ')
                .filter_map(|p| {
                    let (x, y) = p.split_once(',')?;
                    Some(Point::new(
                        ox + x.parse::<f64>().ok()? * unit,
                        y0 + y.parse::<f64>().ok()? * unit,
                    ))
                })
                .collect();
            out.extend(pts.windows(2).map(|w| Segment::line(w[0], w[1])));
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn every_glyph_parses_and_stays_in_its_cell() {
        let text = "ABCDEFGHIJKLMNOPQRSTUVWXYZ0123456789-_.";
        let s = text_strokes(text, Point::ORIGIN, 6.0);
        assert!(s.len() > text.len());
        for seg in &s {
            for p in [seg.start(), seg.end()] {
                assert!(p.y >= -3.0 - 1e-9 && p.y <= 3.0 + 1e-9);
            }
        }
    }
}
