//! Shared helpers: run the binary, parse its output.

use std::io::Write;
use std::path::PathBuf;
use std::process::{Command, Stdio};

/// What one run of the program gave.
pub struct Run {
    /// Exit status (None if killed by a signal).
    pub status: Option<i32>,
    /// Standard output.
    pub stdout: Vec<u8>,
    /// Standard error.
    pub stderr: String,
}

impl Run {
    /// Standard output as text.
    pub fn text(&self) -> String {
        String::from_utf8(self.stdout.clone()).expect("output is UTF-8")
    }

    /// Standard output as JSON Lines.
    pub fn jsonl(&self) -> Vec<serde_json::Value> {
        self.text()
            .lines()
            .map(|l| serde_json::from_str(l).unwrap_or_else(|e| panic!("not JSON: {e}: {l}")))
            .collect()
    }
}

/// The binary under test.
pub fn binary() -> Command {
    Command::new(env!("CARGO_BIN_EXE_pkarta"))
}

/// Runs `pkarta ARGS` with `stdin` piped in.
pub fn pkarta(args: &[&str], stdin: &[u8]) -> Run {
    let mut child = binary()
        .args(args)
        .stdin(Stdio::piped())
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .expect("the binary runs");
    let mut input = child.stdin.take().expect("stdin is piped");
    let bytes = stdin.to_vec();
    // Written from a thread so a large input cannot deadlock against a full stdout pipe.
    let writer = std::thread::spawn(move || {
        let _ = input.write_all(&bytes);
    });
    let out = child.wait_with_output().expect("the binary finishes");
    writer.join().expect("stdin writer");
    Run {
        status: out.status.code(),
        stdout: out.stdout,
        stderr: String::from_utf8_lossy(&out.stderr).into_owned(),
    }
}

/// A test data file.
pub fn data(name: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("../../tests/data")
        .join(name)
}

/// A file of the demo data.
pub fn demo(name: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("../../demo")
        .join(name)
}

/// The message of a record's error, if it has one.
pub fn error_message(record: &serde_json::Value) -> Option<&str> {
    record["error"]
        .as_object()
        .map(|e| e["message"].as_str().expect("error has a message"))
}

/// Asserts the program said nothing about a panic or a broken pipe.
pub fn assert_no_panic(run: &Run) {
    assert!(!run.stderr.contains("panicked"), "stderr: {}", run.stderr);
    assert!(
        !run.stderr.contains("Broken pipe"),
        "stderr: {}",
        run.stderr
    );
}
