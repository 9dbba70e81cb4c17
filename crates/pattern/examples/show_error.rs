//! Prints the error for each argument (a scratch tool for writing error tests).
fn main() {
    for arg in std::env::args().skip(1) {
        match pattern::Pattern::parse(&arg) {
            Ok(_) => println!("ok: {arg}"),
            Err(e) => println!("{e}\n---"),
        }
    }
}
