//! The generated experiment file of the live-editing test and the server benchmark: an
//! invented survey of values, small matrices, claims, cubic curves and genus-1 theta values.
#![allow(dead_code)]

/// The i-th statement of the survey's repeating pattern.
fn statement(i: usize) -> String {
    match i % 6 {
        0 => format!("let depth{i} = {}/7 + 0.25*{}", i % 13 + 1, i % 5),
        1 => format!("let m{i} = [[1.1i, 0.{}], [0.{}, 0.9i + 0.2]]", i % 9, i % 9),
        2 => format!("expect is_riemann(m{})", i - 1),
        3 => format!("curve c{i}: y^2 = x^3 - {}*x + 1", i % 7 + 2),
        4 => format!("expect degree(c{}) == 3", i - 1),
        _ => format!("let th{i} = theta([[{}i]], [0.{}])", i % 3 + 1, i % 10),
    }
}

/// `lines` lines; with `false_every`, every such line from the 50th on is a false claim
/// (`depthN > 100`, while every depth is below 3), whose line numbers are returned.
pub fn survey(lines: usize, false_every: Option<usize>) -> (String, Vec<usize>) {
    let mut s = String::from("# generated input (invented survey)\nset tolerance = 1e-10\n");
    let (mut false_lines, mut i, mut depth, mut n) = (Vec::new(), 0, None, 2);
    while n < lines {
        match (false_every, depth) {
            (Some(k), Some(d)) if n % k == 50 % k => {
                false_lines.push(n);
                s.push_str(&format!("expect depth{d} > 100\n"));
            }
            _ => {
                if i % 6 == 0 {
                    depth = Some(i);
                }
                s.push_str(&statement(i));
                s.push('\n');
                i += 1;
            }
        }
        n += 1;
    }
    (s, false_lines)
}
