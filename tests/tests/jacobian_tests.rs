//! `even_thetas` and `hyperelliptic` against outside references: even theta constants of
//! block-diagonal matrices against products of Jacobi's theta constants (mpmath, fixture
//! `tests/fixtures/even_theta_refs.json`), and the hyperelliptic test against the classical
//! count of vanishing even theta constants (Mumford, *Tata Lectures on Theta II*, ch. IIIa)
//! on curves whose nature is known: y^2 = f(x) is hyperelliptic; a smooth plane quartic is
//! not (its canonical map is the plane embedding; Hartshorne, *Algebraic Geometry*, IV.5,
//! from memory).

mod fixture;

use kelp_evaluator::Value;
use kelp_lang::Code;

#[test]
fn even_theta_constants_of_block_diagonal_matrices() {
    let refs: serde_json::Value =
        serde_json::from_str(include_str!("../fixtures/even_theta_refs.json")).expect("fixture parses");
    for case in refs["cases"].as_array().unwrap() {
        let taus: Vec<&str> = case["taus"].as_array().unwrap().iter().map(|t| t.as_str().unwrap()).collect();
        let g = taus.len();
        let rows: Vec<String> = (0..g)
            .map(|i| format!("[{}]", (0..g).map(|j| if i == j { taus[i] } else { "0" }).collect::<Vec<_>>().join(", ")))
            .collect();
        let src = format!("let T = [{}]\nlet th = even_thetas(T)\n", rows.join(", "));
        let e = fixture::eval(&src);
        let v = e.values.iter().find(|v| v.name == "th").unwrap_or_else(|| panic!("{src}: {:?}", e.diagnostics));
        let Value::Vector(xs) = &v.value.value else { panic!("{}", v.value.value) };
        let want = case["values"].as_array().unwrap();
        assert_eq!(xs.len(), want.len(), "{src}");
        for (x, w) in xs.iter().zip(want) {
            let w = fixture::cx(w);
            let miss = (x.to_complex() - w).norm();
            // The reference is rounded to double: half an ulp of its modulus on top.
            assert!(
                miss <= v.value.error_bound + w.norm() * f64::EPSILON,
                "{src}: {x} vs {w} ({miss:e} > {:e})",
                v.value.error_bound
            );
        }
    }
}

fn verdict(src: &str) -> Result<bool, String> {
    let e = fixture::eval(src);
    let x = &e.expectations[0];
    match x.passed {
        Some(true) => Ok(true),
        Some(false) => Ok(false),
        None => {
            let d = e.diagnostics.iter().find(|d| d.code == Code::ClaimUndecided);
            Err(d.map(|d| d.message.clone()).unwrap_or_else(|| x.detail.clone()))
        }
    }
}

#[test]
fn plane_quartics_are_proved_not_hyperelliptic() {
    // Smooth plane quartics: all 36 even theta constants nonzero (N(3) = 1 would vanish).
    for c in ["x^4 + y^4 - 1", "x^3*y + y^3 + x", "x^4 + y^4 + x*y - 2"] {
        let src = format!("curve Q: {c}\nexpect hyperelliptic(tau(Q))\n");
        assert_eq!(verdict(&src), Ok(false), "{c}");
    }
}

#[test]
fn hyperelliptic_matrices_are_never_wrongly_refused() {
    // Genus 3 hyperelliptic: exactly one constant is within its bound of zero; never "false".
    for c in ["y^2 = x^7 - x + 1", "y^2 = x*(x^2 - 1)*(x^2 - 4)*(x^2 - 9)*(x - 5)", "y^2 = x^8 + 3*x - 1"] {
        let src = format!("curve H: {c}\nexpect hyperelliptic(tau(H))\n");
        match verdict(&src) {
            Err(m) => assert!(m.starts_with("1 of 36") && m.contains("consistent"), "{c}: {m}"),
            other => panic!("{c}: {other:?}"),
        }
    }
    // Genus 2 (every smooth genus-2 curve is hyperelliptic) and genus 1: true.
    for c in ["y^2 = x^5 - x + 1", "y^2 = x*(x - 1)*(x - 2)*(x - 3)*(x - 4)*(x - 7)"] {
        assert_eq!(verdict(&format!("curve H: {c}\nexpect hyperelliptic(tau(H))\n")), Ok(true), "{c}");
    }
    assert_eq!(verdict("expect hyperelliptic([[0.3 + 1.2i]])\n"), Ok(true));
    // A product of elliptic curves has one vanishing even constant: not decided, not true.
    assert!(verdict("expect hyperelliptic([[1i, 0], [0, 1.5i]])\n").is_err());
}
