//! Calibration (lead).
fn main() {}
