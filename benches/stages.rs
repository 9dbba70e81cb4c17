//! Benchmarks per stage.
fn main() {}
