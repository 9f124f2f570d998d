//! Sampled grids: `.csv` (header x,y,t,u; a u_im column when u is complex; for a water wave
//! x_m,y_m,t_s,eta_m), `.json` (axes, u (or eta) as [t][y][x], the wave and the KP form) and `.npy` (NumPy format 1.0: little-endian
//! float64, or complex128 when u is complex, shape (nt, ny, nx); the format is NumPy's
//! documented NEP 1).

use super::grid::Grid;
use serde_json::json;

pub fn csv(g: &Grid) -> Vec<u8> {
    let complex = g.complex();
    let h = g.names().csv;
    let mut s = if complex { h.join(",") } else { h[..4].join(",") };
    s.push('\n');
    for (it, t) in g.t.iter().enumerate() {
        for (iy, y) in g.y.iter().enumerate() {
            for (ix, x) in g.x.iter().enumerate() {
                let u = g.at(it, iy, ix);
                if complex {
                    s.push_str(&format!("{x:?},{y:?},{t:?},{:?},{:?}\n", u.re, u.im));
                } else {
                    s.push_str(&format!("{x:?},{y:?},{t:?},{:?}\n", u.re));
                }
            }
        }
    }
    s.into_bytes()
}

pub fn json(g: &Grid, wave: serde_json::Value) -> Vec<u8> {
    let complex = g.complex();
    let part = |f: fn(num_complex::Complex64) -> f64| -> serde_json::Value {
        json!((0..g.t.len())
            .map(|it| (0..g.y.len())
                .map(|iy| (0..g.x.len()).map(|ix| f(g.at(it, iy, ix))).collect::<Vec<_>>())
                .collect::<Vec<_>>())
            .collect::<Vec<_>>())
    };
    let key = if g.physical { "eta" } else { "u" };
    let mut o = json!({
        "kp_form": crate::waves::KP_FORM,
        "wave": wave,
        "x": g.x, "y": g.y, "t": g.t,
        "layout": format!("{key}[t][y][x]"),
    });
    if g.physical {
        o["units"] = json!({"x": "m", "y": "m", "t": "s", "eta": "m"});
        o["caution"] = json!(crate::waves::water::CAUTION);
    }
    o[key] = part(|c| c.re);
    if complex {
        o[format!("{key}_im")] = part(|c| c.im);
    }
    serde_json::to_vec_pretty(&o).expect("serialisable")
}

pub fn npy(g: &Grid) -> Vec<u8> {
    let complex = g.complex();
    let descr = if complex { "<c16" } else { "<f8" };
    let mut header = format!(
        "{{'descr': '{descr}', 'fortran_order': False, 'shape': ({}, {}, {}), }}",
        g.t.len(),
        g.y.len(),
        g.x.len()
    );
    // Magic (6) + version (2) + length (2) + header, padded with spaces and ending in a
    // newline, to a multiple of 64 bytes.
    let total = 10 + header.len() + 1;
    header.push_str(&" ".repeat((64 - total % 64) % 64));
    header.push('\n');
    let mut out = b"\x93NUMPY\x01\x00".to_vec();
    out.extend_from_slice(&(header.len() as u16).to_le_bytes());
    out.extend_from_slice(header.as_bytes());
    for u in &g.u {
        out.extend_from_slice(&u.re.to_le_bytes());
        if complex {
            out.extend_from_slice(&u.im.to_le_bytes());
        }
    }
    out
}
