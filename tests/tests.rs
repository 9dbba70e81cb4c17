//! Integration tests of the `pkarta` program, built into one binary.
//!
//! Each module runs the built binary (`CARGO_BIN_EXE_pkarta`) as a user would, with files
//! from `tests/data/cli_*` or input written by the test.

mod util;

mod cli_curve;
mod cli_explain;
mod cli_inspect;
mod cli_io;
mod cli_predict;
