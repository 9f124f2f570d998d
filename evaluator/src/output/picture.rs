//! Heatmaps of u over x (across) and y (up) at one time: axes with ticks, labels, a title
//! naming the KP form, and a colour bar, in the perceptually uniform viridis map (the
//! `colorous` crate's table). SVG is written as text; PNG is rasterised here with a small
//! built-in 5 x 7 bitmap font, so no font files are needed.

use super::grid::Grid;

const W: usize = 680;
const H: usize = 520;
const PLOT: (usize, usize, usize, usize) = (80, 50, 460, 420); // left, top, width, height
const BAR: (usize, usize) = (570, 20); // left, width

fn colour(v: f64) -> [u8; 3] {
    let c = colorous::VIRIDIS.eval_continuous(v.clamp(0.0, 1.0));
    [c.r, c.g, c.b]
}

fn label(v: f64) -> String {
    if v == 0.0 {
        "0".into()
    } else if v.abs() >= 1e4 || v.abs() < 1e-3 {
        format!("{v:.2e}")
    } else {
        let s = format!("{v:.3}");
        s.trim_end_matches('0').trim_end_matches('.').to_string()
    }
}

/// Real part of u at time index `it`, its range, and the title.
struct Frame<'a> {
    g: &'a Grid,
    it: usize,
    lo: f64,
    hi: f64,
    title: String,
}

fn frame<'a>(g: &'a Grid, it: usize, what: &str) -> Frame<'a> {
    let vals: Vec<f64> = (0..g.y.len())
        .flat_map(|iy| (0..g.x.len()).map(move |ix| (iy, ix)))
        .map(|(iy, ix)| g.at(it, iy, ix).re)
        .collect();
    let lo = vals.iter().copied().fold(f64::INFINITY, f64::min);
    let hi = vals.iter().copied().fold(f64::NEG_INFINITY, f64::max);
    let (lo, hi) = if hi > lo { (lo, hi) } else { (lo - 0.5, hi + 0.5) };
    let n = g.names();
    let part = if g.complex() { format!("Re {}", n.value) } else { n.value.to_string() };
    Frame { g, it, lo, hi, title: format!("{part} of {what}, t = {}{}", label(g.t[it]), n.t_unit) }
}

fn ticks(a: f64, b: f64) -> Vec<f64> {
    (0..5).map(|k| a + (b - a) * k as f64 / 4.0).collect()
}

pub fn svg(g: &Grid, it: usize, what: &str) -> Vec<u8> {
    let f = frame(g, it, what);
    let (l, t, w, h) = PLOT;
    let (nx, ny) = (g.x.len(), g.y.len());
    let mut s = format!(
        "<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"{W}\" height=\"{H}\" font-family=\"sans-serif\" font-size=\"12\">\n\
         <rect width=\"{W}\" height=\"{H}\" fill=\"white\"/>\n\
         <text x=\"{l}\" y=\"22\" font-size=\"14\">{}</text>\n\
         <text x=\"{l}\" y=\"38\" font-size=\"10\">KP form {}</text>\n",
        f.title,
        crate::waves::KP_FORM
    );
    if g.physical {
        s.push_str(&format!(
            "<text x=\"8\" y=\"{}\" font-size=\"9\">Model only: {}.</text>\n",
            H - 6,
            crate::waves::water::CAUTION
        ));
    }
    // The cells as one embedded nx x ny PNG (rows top = largest y), drawn without smoothing:
    // a rect per cell made 3 MB files for a 200 x 200 grid.
    let mut cells = vec![0u8; 3 * nx * ny];
    for iy in 0..ny {
        for ix in 0..nx {
            let v = (f.g.at(f.it, iy, ix).re - f.lo) / (f.hi - f.lo);
            let i = 3 * ((ny - 1 - iy) * nx + ix);
            cells[i..i + 3].copy_from_slice(&colour(v));
        }
    }
    let mut raw = vec![];
    {
        let mut enc = png::Encoder::new(&mut raw, nx as u32, ny as u32);
        enc.set_color(png::ColorType::Rgb);
        enc.set_depth(png::BitDepth::Eight);
        if let Ok(mut wr) = enc.write_header() {
            let _ = wr.write_image_data(&cells);
        }
    }
    use base64::Engine;
    s.push_str(&format!(
        "<image x=\"{l}\" y=\"{t}\" width=\"{w}\" height=\"{h}\" preserveAspectRatio=\"none\" style=\"image-rendering:pixelated\" href=\"data:image/png;base64,{}\"/>\n",
        base64::engine::general_purpose::STANDARD.encode(&raw)
    ));
    s.push_str(&format!("<rect x=\"{l}\" y=\"{t}\" width=\"{w}\" height=\"{h}\" fill=\"none\" stroke=\"black\"/>\n"));
    let (x0, x1) = (g.x[0], g.x[nx - 1]);
    let (y0, y1) = (g.y[0], g.y[ny - 1]);
    for (k, v) in ticks(x0, x1).iter().enumerate() {
        let px = l as f64 + w as f64 * k as f64 / 4.0;
        s.push_str(&format!(
            "<line x1=\"{px}\" y1=\"{}\" x2=\"{px}\" y2=\"{}\" stroke=\"black\"/><text x=\"{px}\" y=\"{}\" text-anchor=\"middle\">{}</text>\n",
            t + h,
            t + h + 5,
            t + h + 18,
            label(*v)
        ));
    }
    for (k, v) in ticks(y0, y1).iter().enumerate() {
        let py = (t + h) as f64 - h as f64 * k as f64 / 4.0;
        s.push_str(&format!(
            "<line x1=\"{}\" y1=\"{py}\" x2=\"{l}\" y2=\"{py}\" stroke=\"black\"/><text x=\"{}\" y=\"{}\" text-anchor=\"end\">{}</text>\n",
            l - 5,
            l - 8,
            py + 4.0,
            label(*v)
        ));
    }
    let n = g.names();
    s.push_str(&format!("<text x=\"{}\" y=\"{}\" text-anchor=\"middle\">{}</text>\n", l + w / 2, t + h + 36, n.x));
    s.push_str(&format!("<text x=\"{}\" y=\"{}\" text-anchor=\"middle\">{}</text>\n", l - 50, t + h / 2, n.y));
    // Colour bar.
    let (bl, bw) = BAR;
    s.push_str("<defs><linearGradient id=\"bar\" x1=\"0\" y1=\"1\" x2=\"0\" y2=\"0\">");
    for k in 0..=16 {
        let [r, gg, b] = colour(k as f64 / 16.0);
        s.push_str(&format!("<stop offset=\"{:.4}\" stop-color=\"#{r:02x}{gg:02x}{b:02x}\"/>", k as f64 / 16.0));
    }
    s.push_str("</linearGradient></defs>\n");
    s.push_str(&format!("<rect x=\"{bl}\" y=\"{t}\" width=\"{bw}\" height=\"{h}\" fill=\"url(#bar)\"/>\n"));
    s.push_str(&format!("<rect x=\"{bl}\" y=\"{t}\" width=\"{bw}\" height=\"{h}\" fill=\"none\" stroke=\"black\"/>\n"));
    for (k, v) in ticks(f.lo, f.hi).iter().enumerate() {
        let py = (t + h) as f64 - h as f64 * k as f64 / 4.0;
        s.push_str(&format!("<text x=\"{}\" y=\"{}\">{}</text>\n", bl + bw + 5, py + 4.0, label(*v)));
    }
    s.push_str("</svg>\n");
    s.into_bytes()
}

/// 5 x 7 glyphs, one row per entry, bit 4 the leftmost pixel.
fn glyph(c: char) -> [u8; 7] {
    match c {
        '0' => [14, 17, 19, 21, 25, 17, 14],
        '1' => [4, 12, 4, 4, 4, 4, 14],
        '2' => [14, 17, 1, 2, 4, 8, 31],
        '3' => [31, 2, 4, 2, 1, 17, 14],
        '4' => [2, 6, 10, 18, 31, 2, 2],
        '5' => [31, 16, 30, 1, 1, 17, 14],
        '6' => [6, 8, 16, 30, 17, 17, 14],
        '7' => [31, 1, 2, 4, 8, 8, 8],
        '8' => [14, 17, 17, 14, 17, 17, 14],
        '9' => [14, 17, 17, 15, 1, 2, 12],
        '.' => [0, 0, 0, 0, 0, 12, 12],
        '-' => [0, 0, 0, 31, 0, 0, 0],
        '+' => [0, 4, 4, 31, 4, 4, 0],
        '=' => [0, 0, 31, 0, 31, 0, 0],
        ',' => [0, 0, 0, 0, 12, 4, 8],
        'e' => [0, 0, 14, 17, 31, 16, 14],
        'x' => [0, 0, 17, 10, 4, 10, 17],
        'y' => [0, 0, 17, 17, 15, 1, 14],
        't' => [8, 8, 28, 8, 8, 9, 6],
        'u' => [0, 0, 17, 17, 17, 19, 13],
        'R' => [30, 17, 17, 30, 20, 18, 17],
        'a' => [0, 0, 14, 1, 15, 17, 15],
        'm' => [0, 0, 26, 21, 21, 17, 17],
        's' => [0, 0, 15, 16, 14, 1, 30],
        '(' => [2, 4, 8, 8, 8, 4, 2],
        ')' => [8, 4, 2, 2, 2, 4, 8],
        _ => [0; 7],
    }
}

struct Canvas {
    px: Vec<u8>,
}

impl Canvas {
    fn set(&mut self, x: usize, y: usize, c: [u8; 3]) {
        if x < W && y < H {
            let i = 3 * (y * W + x);
            self.px[i..i + 3].copy_from_slice(&c);
        }
    }
    fn rect(&mut self, x: usize, y: usize, w: usize, h: usize, c: [u8; 3]) {
        for yy in y..y + h {
            for xx in x..x + w {
                self.set(xx, yy, c);
            }
        }
    }
    fn frame(&mut self, x: usize, y: usize, w: usize, h: usize) {
        self.rect(x, y, w, 1, [0; 3]);
        self.rect(x, y + h, w + 1, 1, [0; 3]);
        self.rect(x, y, 1, h, [0; 3]);
        self.rect(x + w, y, 1, h, [0; 3]);
    }
    /// Text at scale 2 (10 x 14 pixels per glyph); `anchor_right` ends it at x.
    fn text(&mut self, x: usize, y: usize, s: &str, anchor_right: bool) {
        let width = s.chars().count() * 12;
        let x0 = if anchor_right { x.saturating_sub(width) } else { x };
        for (k, c) in s.chars().enumerate() {
            for (row, bits) in glyph(c).iter().enumerate() {
                for col in 0..5 {
                    if bits & (16 >> col) != 0 {
                        self.rect(x0 + k * 12 + 2 * col, y + 2 * row, 2, 2, [0; 3]);
                    }
                }
            }
        }
    }
}

pub fn png(g: &Grid, it: usize, what: &str) -> Result<Vec<u8>, String> {
    let f = frame(g, it, what);
    encode(1, 0, |_| draw(&f))
}

/// Frames one animation may hold (each is drawn, encoded and dropped in turn).
pub const MAX_FRAMES: usize = 1000;

/// All times of the grid as one animated PNG (APNG), `delay_ms` per frame, looping, on one
/// colour scale for all frames (so colours mean the same value throughout).
pub fn apng(g: &Grid, what: &str, delay_ms: u16) -> Result<Vec<u8>, String> {
    let (mut lo, mut hi) = (f64::INFINITY, f64::NEG_INFINITY);
    let frames: Vec<Frame> = (0..g.t.len()).map(|it| frame(g, it, what)).collect();
    for f in &frames {
        lo = lo.min(f.lo);
        hi = hi.max(f.hi);
    }
    if frames.len() > MAX_FRAMES {
        return Err(format!("{} frames; an animation holds at most {MAX_FRAMES}", frames.len()));
    }
    let n = frames.len();
    let mut frames = frames.into_iter();
    encode(n, delay_ms, |_| draw(&Frame { lo, hi, ..frames.next().expect("one frame per time") }))
}

fn encode(n: usize, delay_ms: u16, mut canvas: impl FnMut(usize) -> Canvas) -> Result<Vec<u8>, String> {
    let mut out = vec![];
    {
        let mut enc = png::Encoder::new(&mut out, W as u32, H as u32);
        enc.set_color(png::ColorType::Rgb);
        enc.set_depth(png::BitDepth::Eight);
        if n > 1 {
            enc.set_animated(n as u32, 0).map_err(|e| e.to_string())?;
            enc.set_frame_delay(delay_ms, 1000).map_err(|e| e.to_string())?;
        }
        let mut wr = enc.write_header().map_err(|e| e.to_string())?;
        for k in 0..n {
            wr.write_image_data(&canvas(k).px).map_err(|e| e.to_string())?;
        }
        wr.finish().map_err(|e| e.to_string())?;
    }
    Ok(out)
}

fn draw(f: &Frame) -> Canvas {
    let (g, it) = (f.g, f.it);
    let _ = &f.title; // the PNG font has digits and a few letters; the title goes in SVG
    let (l, t, w, h) = PLOT;
    let (nx, ny) = (g.x.len(), g.y.len());
    let mut c = Canvas { px: vec![255; 3 * W * H] };
    for py in 0..h {
        let iy = ((h - 1 - py) * ny) / h;
        for px in 0..w {
            let ix = (px * nx) / w;
            let v = (g.at(it, iy, ix).re - f.lo) / (f.hi - f.lo);
            c.set(l + px, t + py, colour(v));
        }
    }
    c.frame(l, t, w, h);
    let (x0, x1) = (g.x[0], g.x[nx - 1]);
    let (y0, y1) = (g.y[0], g.y[ny - 1]);
    for (k, v) in ticks(x0, x1).iter().enumerate() {
        let px = l + w * k / 4;
        c.rect(px, t + h, 1, 6, [0; 3]);
        let s = label(*v);
        c.text(px.saturating_sub(s.len() * 6), t + h + 10, &s, false);
    }
    for (k, v) in ticks(y0, y1).iter().enumerate() {
        let py = t + h - h * k / 4;
        c.rect(l - 6, py, 6, 1, [0; 3]);
        c.text(l - 10, py.saturating_sub(7), &label(*v), true);
    }
    let n = g.names();
    c.text(l + w / 2, t + h + 32, n.x, false);
    // Above the tick labels (which take the left margin).
    c.text(4, t.saturating_sub(20), n.y, false);
    let value = if g.complex() { format!("Re {}", n.value) } else { n.value.to_string() };
    let title = format!("{value}  t={}{}", label(g.t[it]), n.t_unit);
    c.text(l, 14, &title, false);
    let (bl, bw) = BAR;
    for k in 0..h {
        let v = 1.0 - k as f64 / (h - 1) as f64;
        c.rect(bl, t + k, bw, 1, colour(v));
    }
    c.frame(bl, t, bw, h);
    for (k, v) in ticks(f.lo, f.hi).iter().enumerate() {
        let py = t + h - h * k / 4;
        c.text(bl + bw + 6, py.saturating_sub(7), &label(*v), false);
    }
    c
}
