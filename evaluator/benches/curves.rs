//! Exact curve algebra: singular points and genus of a dense degree-8 curve with 3-digit
//! coefficients, and of x^12 + y^12 + z^12 under a rational change of coordinates (both
//! invented test curves). The reference measured in the same run is one sub-resultant of
//! two dense degree-8 integer polynomials: read the figures as "costs N resultants".
//! Run: `cargo bench -p kelp-evaluator --bench curves`.

use kelp_evaluator::algebra::curve::analyse;
use kelp_evaluator::algebra::zpoly;
use kelp_lang::poly::Poly;
use num_bigint::BigInt;
use num_rational::BigRational;

fn main() {
    divan::main();
}

fn curve(src: &str) -> (Poly, bool) {
    let checked = kelp_lang::check(&format!("curve c: {src}\n"));
    let e = checked.curves.values().next().expect("the benchmark curve parses");
    (e.poly.clone(), e.projective)
}

const DEGREE8: &str = "123*x^8 - 45*x^5*y^3 + 678*y^8 - 91*x^4*y^2 + 17*x*y^6 - 250*x^3 + 311*y^5 \
                       - 77*x^2*y + 401*x - 19*y + 5 + 219*x^7*y - 604*x^2*y^6 + 88*x^6 - 512*y^7";

/// x^12 + y^12 + z^12 at (x + 2y - 3z/7, y - z + x/3, z + x - 4y).
fn fermat12() -> Poly {
    let q = |n: i64, d: i64| BigRational::new(BigInt::from(n), BigInt::from(d));
    let (x, y, z) = (Poly::var(0), Poly::var(1), Poly::var(2));
    let l1 = x.add(&y.scale(&q(2, 1))).add(&z.scale(&q(-3, 7)));
    let l2 = y.sub(&z).add(&x.scale(&q(1, 3)));
    let l3 = z.add(&x).add(&y.scale(&q(-4, 1)));
    l1.pow(12).add(&l2.pow(12)).add(&l3.pow(12))
}

#[divan::bench]
fn reference_one_resultant_degree_8() -> BigInt {
    let a: Vec<BigInt> = [123, -45, 678, -91, 17, -250, 311, -77, 401].iter().map(|&v| BigInt::from(v)).collect();
    let b: Vec<BigInt> = [-19, 5, 219, -604, 88, -512, 37, 902, -33].iter().map(|&v| BigInt::from(v)).collect();
    zpoly::resultant(divan::black_box(&a), divan::black_box(&b))
}

#[divan::bench]
fn genus_of_a_dense_degree_8_curve(b: divan::Bencher) {
    let (p, proj) = curve(DEGREE8);
    b.bench(|| analyse(divan::black_box(&p), proj).genus());
}

#[divan::bench]
fn genus_of_a_transformed_fermat_12(b: divan::Bencher) {
    let p = fermat12();
    b.bench(|| analyse(divan::black_box(&p), true).genus());
}
