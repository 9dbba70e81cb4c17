//! The `pkarta` command-line tool (CLI helper).
fn main() {
    println!("pkarta: under construction");
}
