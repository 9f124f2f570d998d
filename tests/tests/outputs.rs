//! `kelp run` writes samples and pictures: the files are read back (CSV, JSON, the NumPy
//! format parsed here byte by byte, and by numpy itself when python3 has it), compared with
//! the wave's own values; paths cannot leave the experiment's folder, also not through a
//! symbolic link.

use kelp_tests::kelp;
use std::path::{Path, PathBuf};

fn dir(name: &str) -> PathBuf {
    let d = std::env::temp_dir().join(format!("kelp-out-{}-{name}", std::process::id()));
    let _ = std::fs::remove_dir_all(&d);
    std::fs::create_dir_all(&d).unwrap();
    d
}

/// One-soliton u = ((k1 - k2)^2 / 2) sech^2((theta_1 - theta_2) / 2) for kappa = (-1, 1),
/// a = 1: u = 2 sech^2(x + t) (conventions file; Kodama 2017, ch. 1).
fn one_soliton(x: f64, t: f64) -> f64 {
    2.0 / (x + t).cosh().powi(2)
}

/// Parses a NumPy format 1.0 file of little-endian float64: (shape, data).
fn read_npy(p: &Path) -> (Vec<usize>, Vec<f64>) {
    let b = std::fs::read(p).unwrap();
    assert_eq!(&b[..8], b"\x93NUMPY\x01\x00");
    let hl = u16::from_le_bytes([b[8], b[9]]) as usize;
    assert_eq!((10 + hl) % 64, 0, "header padded to 64 bytes");
    let header = std::str::from_utf8(&b[10..10 + hl]).unwrap();
    assert!(header.contains("'descr': '<f8'") && header.contains("'fortran_order': False"), "{header}");
    let shape_txt = header.split("'shape': (").nth(1).unwrap().split(')').next().unwrap();
    let shape: Vec<usize> =
        shape_txt.split(',').filter(|s| !s.trim().is_empty()).map(|s| s.trim().parse().unwrap()).collect();
    let data: Vec<f64> = b[10 + hl..].chunks(8).map(|c| f64::from_le_bytes(c.try_into().unwrap())).collect();
    assert_eq!(data.len(), shape.iter().product::<usize>());
    (shape, data)
}

#[test]
fn samples_and_pictures_are_written_and_read_back() {
    let d = dir("samples");
    let file = d.join("inlet.kelp");
    std::fs::write(
        &file,
        "# invented inlet\nwave front = soliton(kappa = [-1, 1], a = [[1, 1]])\n\
         sample front over x in -2..2 step 1, y in 0..1 step 1, t in 0..0.5 step 0.5 to \"out/front.npy\"\n\
         sample front over x in -2..2 step 1, t = 0.5 to \"out/front.csv\"\n\
         sample front over x in -1..1 step 1, t = 0 to \"out/front.json\"\n\
         plot front over x in -5..5, y in -5..5, t = 0 to \"out/front.png\"\n\
         plot front over x in -5..5, y in -5..5, t = 0 to \"out/front.svg\"\n",
    )
    .unwrap();
    let (code, out, err) = kelp(&["run", file.to_str().unwrap()]);
    assert_eq!(code, 0, "{out}{err}");
    assert!(out.contains("wrote out/front.npy"), "{out}");
    // NumPy: shape (t, y, x) = (2, 2, 5).
    let (shape, data) = read_npy(&d.join("out/front.npy"));
    assert_eq!(shape, vec![2, 2, 5]);
    for (k, v) in data.iter().enumerate() {
        let (it, ix) = (k / 10, k % 5);
        let want = one_soliton(-2.0 + ix as f64, 0.5 * it as f64);
        assert!((v - want).abs() < 1e-13, "entry {k}: {v} vs {want}");
    }
    let csv = std::fs::read_to_string(d.join("out/front.csv")).unwrap();
    let mut lines = csv.lines();
    assert_eq!(lines.next(), Some("x,y,t,u"));
    for line in lines {
        let f: Vec<f64> = line.split(',').map(|s| s.parse().unwrap()).collect();
        assert!((f[3] - one_soliton(f[0], f[2])).abs() < 1e-13, "{line}");
    }
    let json: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(d.join("out/front.json")).unwrap()).unwrap();
    assert_eq!(json["kp_form"], "3 u_yy + (u_xxx + 6 u u_x - 4 u_t)_x = 0");
    assert!((json["u"][0][0][1].as_f64().unwrap() - 2.0).abs() < 1e-14);
    let png = std::fs::read(d.join("out/front.png")).unwrap();
    assert_eq!(&png[..8], b"\x89PNG\r\n\x1a\n");
    let svg = std::fs::read_to_string(d.join("out/front.svg")).unwrap();
    assert!(svg.starts_with("<svg") && svg.contains("KP form") && svg.contains("linearGradient"));
    // numpy itself, when this machine's python has it.
    let probe = std::process::Command::new("python3").args(["-c", "import numpy"]).output();
    if probe.is_ok_and(|o| o.status.success()) {
        let o = std::process::Command::new("python3")
            .args([
                "-c",
                &format!(
                    "import numpy; a = numpy.load({:?}); print(a.shape, repr(float(a[1, 0, 2])))",
                    d.join("out/front.npy")
                ),
            ])
            .output()
            .unwrap();
        let s = String::from_utf8_lossy(&o.stdout);
        assert!(s.contains("(2, 2, 5)"), "{s}");
    }
    let _ = std::fs::remove_dir_all(&d);
}

#[cfg(unix)]
#[test]
fn outputs_cannot_escape_through_a_link() {
    let d = dir("escape");
    let outside = dir("escape-target");
    std::os::unix::fs::symlink(&outside, d.join("away")).unwrap();
    let file = d.join("harbour.kelp");
    std::fs::write(
        &file,
        "wave w = soliton(kappa = [-1, 1], a = [[1, 1]])\nsample w over x in 0..1, t = 0 to \"away/w.csv\"\n",
    )
    .unwrap();
    let (code, out, err) = kelp(&["run", file.to_str().unwrap()]);
    assert_eq!(code, 1, "{out}{err}");
    assert!(err.contains("symbolic link"), "{err}");
    assert!(!outside.join("w.csv").exists());
    let _ = std::fs::remove_dir_all(&d);
    let _ = std::fs::remove_dir_all(&outside);
}

/// A water wave's outputs say what they hold: units in the CSV header and the JSON, the
/// model's caution in the JSON, the SVG and the terminal. Values: the KdV solitary wave
/// eta = a sech^2(sqrt(3a / 4h^3) x) at t = 0 (Korteweg & de Vries 1895; Whitham 1974,
/// ch. 13, from memory) with a = 2 eps h for kappa = (-1, 1).
#[test]
fn water_outputs_carry_units_and_the_caution() {
    let d = dir("water");
    let file = d.join("flume.kelp");
    std::fs::write(
        &file,
        "# invented flume\nwave crest = soliton(kappa = [-1, 1], a = [[1, 1]])\n\
         wave flume = shallow_water(crest, depth = 0.5, epsilon = 0.05)\n\
         sample flume over x in -2..2 step 1, t = 0 to \"out/flume.csv\"\n\
         sample flume over x in -1..1 step 1, t = 0 to \"out/flume.json\"\n\
         plot flume over x in -5..5, y in -1..1, t = 0 to \"out/flume.svg\"\n",
    )
    .unwrap();
    let (code, stdout, stderr) = kelp(&["run", file.to_str().unwrap()]);
    let text = stdout + &stderr;
    assert_eq!(code, 0, "{text}");
    assert!(text.contains("K606") && text.contains("not for coastal engineering or safety decisions"), "{text}");
    let csv = std::fs::read_to_string(d.join("out/flume.csv")).unwrap();
    let mut lines = csv.lines();
    assert_eq!(lines.next(), Some("x_m,y_m,t_s,eta_m"));
    let (h, a) = (0.5f64, 2.0 * 0.05 * 0.5);
    for line in lines {
        let v: Vec<f64> = line.split(',').map(|s| s.parse().unwrap()).collect();
        let want = a / ((3.0 * a / (4.0 * h * h * h)).sqrt() * v[0]).cosh().powi(2);
        assert!((v[3] - want).abs() < 1e-13, "{line}: {want}");
    }
    let j: serde_json::Value = serde_json::from_slice(&std::fs::read(d.join("out/flume.json")).unwrap()).unwrap();
    assert_eq!(j["units"]["eta"], "m");
    assert_eq!(j["layout"], "eta[t][y][x]");
    assert!(j["caution"].as_str().unwrap().contains("licensed practice"));
    assert_eq!(j["wave"]["wave"]["kind"], "soliton");
    let svg = std::fs::read_to_string(d.join("out/flume.svg")).unwrap();
    assert!(svg.contains("eta (m)") && svg.contains("x (m)") && svg.contains("not for coastal engineering"));
}

/// A time range plotted to `.apng` is one looping animated PNG with a frame per time, on
/// one colour scale (decoded here with the `png` crate's reader).
#[test]
fn a_time_range_becomes_an_animation() {
    let d = dir("apng");
    let file = d.join("drift.kelp");
    std::fs::write(
        &file,
        "# invented drift\nwave front = soliton(kappa = [-1, 1], a = [[1, 1]])\n\
         plot front over x in -6..6 step 0.1, y in -2..2 step 0.5, t in 0..2 step 0.5 to \"out/drift.apng\"\n",
    )
    .unwrap();
    let (code, out, err) = kelp(&["run", file.to_str().unwrap()]);
    assert_eq!(code, 0, "{out}{err}");
    let bytes = std::fs::read(d.join("out/drift.apng")).unwrap();
    let mut reader = png::Decoder::new(std::io::Cursor::new(bytes)).read_info().unwrap();
    let actl = reader.info().animation_control.expect("an animation control chunk");
    assert_eq!((actl.num_frames, actl.num_plays), (5, 0));
    // The crest (u = 2 sech^2(x + t), moving left) passes x = 0 at t = 0: the pixel row
    // through the middle of the plot is brightest at its centre then, and left of it later.
    let mut brightest = vec![];
    let mut buf = vec![0; reader.output_buffer_size().unwrap()];
    for _ in 0..5 {
        let info = reader.next_frame(&mut buf).unwrap();
        let row = 50 + 210; // plot top + half its height
        let lum = |x: usize| {
            let i = (row * info.width as usize + x) * 3;
            buf[i] as u32 + buf[i + 1] as u32 + buf[i + 2] as u32
        };
        brightest.push((80..540).max_by_key(|&x| lum(x)).unwrap());
    }
    assert!((brightest[0] as i64 - 310).abs() <= 3, "{brightest:?}");
    assert!(brightest.windows(2).all(|w| w[1] < w[0]), "the crest moves toward -x: {brightest:?}");
}

/// Every axis fixed: one sample at (0.35, 0, 3), the value there and not at 0.
#[test]
fn a_sample_at_one_fixed_point() {
    let d = dir("fixed");
    let file = d.join("point.kelp");
    std::fs::write(
        &file,
        "wave front = soliton(kappa = [-1, 1], a = [[1, 1]])\nsample front over x = 0.35, t = 3 to \"p.csv\"\n",
    )
    .unwrap();
    let (code, out, err) = kelp(&["run", file.to_str().unwrap()]);
    assert_eq!(code, 0, "{out}{err}");
    let csv = std::fs::read_to_string(d.join("p.csv")).unwrap();
    let rows: Vec<Vec<f64>> = csv.lines().skip(1).map(|l| l.split(',').map(|s| s.parse().unwrap()).collect()).collect();
    assert_eq!(rows.len(), 1, "{csv}");
    assert_eq!(&rows[0][..3], &[0.35, 0.0, 3.0]);
    assert!((rows[0][3] - one_soliton(0.35, 3.0)).abs() < 1e-13, "{csv}");
}
