//! Integration tests of the `pkarta` program, built into one binary.
