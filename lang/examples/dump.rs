fn main() {
    let path = std::env::args().nth(1).expect("file");
    let src = std::fs::read_to_string(&path).unwrap();
    let c = kelp_lang::check(&src);
    print!("{}", kelp_lang::render::render(&path, &src, &c.diagnostics, false));
    println!("order: {:?}", c.order);
    for s in &c.symbols {
        println!("{} {:?} {:?}", s.name, s.def, s.kind);
    }
    println!("----\n{}", kelp_lang::fmt::format(&src));
}
