//! Input and output machinery: files, stdin, exit status, bad lines, closed pipes.
//! These use `inspect` (read and perceive only) where the point is the I/O, not the
//! chemistry.

use std::io::{BufRead, BufReader, Write};
use std::process::Stdio;

use crate::util::{assert_no_panic, binary, data, error_message, pkarta};

#[test]
fn missing_file_is_exit_2_with_one_message() {
    let run = pkarta(&["predict", "no/such/file.smi"], b"");
    assert_eq!(run.status, Some(2));
    assert!(run.stdout.is_empty());
    assert_eq!(run.stderr.lines().count(), 1, "stderr: {}", run.stderr);
    assert!(
        run.stderr
            .starts_with("pkarta: cannot open no/such/file.smi"),
        "stderr: {}",
        run.stderr
    );
}

#[test]
fn directory_as_input_is_exit_2() {
    let run = pkarta(&["inspect", env!("CARGO_MANIFEST_DIR")], b"");
    assert_eq!(run.status, Some(2));
    assert!(
        run.stderr.contains("is a directory"),
        "stderr: {}",
        run.stderr
    );
}

#[test]
fn usage_errors_are_exit_2() {
    for args in [
        &["predict", "--ph", "seventeen"][..],
        &["predict", "--ph", "17"],
        &["predict", "--format", "xml"],
        &["predict", "--threads", "0"],
        &["frobnicate"],
        &["curve", "CC(=O)O", "--step", "0"],
        &["curve", "CC(=O)O", "--from", "9", "--to", "3"],
    ] {
        let run = pkarta(args, b"");
        assert_eq!(run.status, Some(2), "{args:?}: {}", run.stderr);
        assert!(run.stdout.is_empty(), "{args:?}");
    }
}

#[test]
fn help_documents_formats_and_exit_status() {
    let run = pkarta(&["predict", "--help"], b"");
    assert_eq!(run.status, Some(0));
    let text = run.text();
    for flag in [
        "--format",
        "--ph",
        "--threads",
        "--quiet",
        "--smiles-column",
        "--input-format",
    ] {
        assert!(text.contains(flag), "{flag} missing from help");
    }
    let run = pkarta(&["--help"], b"");
    assert!(run.text().contains("Exit status"));
}

#[test]
fn blank_garbage_and_non_utf8_lines_each_get_an_error_record() {
    let input = b"CCO ethanol\n\n   \n%%%garbage\nC\xff\xfeC broken-bytes\n# a comment, not a record\nN ammonia\n";
    let run = pkarta(&["inspect", "--format", "jsonl", "-"], input);
    assert_eq!(run.status, Some(1), "stderr: {}", run.stderr);
    let records = run.jsonl();
    let summary: Vec<(Option<&str>, Option<&str>)> = records
        .iter()
        .map(|r| (r["id"].as_str(), error_message(r)))
        .collect();
    assert_eq!(summary.len(), 6, "{summary:?}");
    assert_eq!(summary[0], (Some("ethanol"), None));
    assert_eq!(summary[1], (None, Some("empty input")));
    assert_eq!(summary[2], (None, Some("empty input")));
    let garbage = summary[3].1.expect("garbage fails");
    // The message points into the input: it repeats the input and puts a caret under it.
    assert!(
        garbage.contains("%%%garbage") && garbage.contains('^'),
        "{garbage}"
    );
    assert_eq!(
        summary[4],
        (
            Some("broken-bytes"),
            Some("input is not valid UTF-8 at byte 1")
        )
    );
    assert_eq!(records[4]["input"], "C\u{fffd}\u{fffd}C");
    assert_eq!(summary[5], (Some("ammonia"), None));
}

#[test]
fn predict_reports_blank_and_non_utf8_lines_as_error_records() {
    let run = pkarta(&["predict", "--format", "jsonl"], b"\nC\x80\n");
    assert_eq!(run.status, Some(1));
    let records = run.jsonl();
    assert_eq!(records.len(), 2);
    assert_eq!(error_message(&records[0]), Some("empty input"));
    assert_eq!(
        error_message(&records[1]),
        Some("input is not valid UTF-8 at byte 1")
    );
    assert_eq!(records[1]["ph"], 7.4);
    assert!(records[1]["sites"].as_array().expect("sites").is_empty());
}

#[test]
fn stdin_by_dash_and_by_pipe_give_the_same_output() {
    let input = b"CC(=O)O acetic\nc1ccncc1 pyridine\n";
    let dash = pkarta(&["inspect", "--format", "jsonl", "-"], input);
    let piped = pkarta(&["inspect", "--format", "jsonl"], input);
    assert_eq!(dash.status, Some(0), "stderr: {}", dash.stderr);
    assert_eq!(dash.stdout, piped.stdout);
    assert_eq!(dash.jsonl().len(), 2);
}

#[test]
fn file_and_stdin_give_the_same_output() {
    let path = data("cli_small.smi");
    let from_file = pkarta(
        &["inspect", "--format", "jsonl", path.to_str().expect("path")],
        b"",
    );
    let from_stdin = pkarta(
        &["inspect", "--format", "jsonl"],
        &std::fs::read(&path).expect("data file"),
    );
    assert_eq!(from_file.stdout, from_stdin.stdout);
    assert_eq!(from_file.status, from_stdin.status);
}

#[test]
fn order_is_kept_with_two_threads_across_chunks() {
    // 2,500 records span three chunks of the pipeline; a few fail, at known places.
    let mut input = String::new();
    let shapes = ["CCO", "c1ccccc1O", "CC(=O)O", "C1CC", "NCCN", "c1ccncc1"];
    for i in 0..2500 {
        input.push_str(&format!("{} rec-{i}\n", shapes[i % shapes.len()]));
    }
    let run = pkarta(
        &["inspect", "--threads", "2", "--format", "jsonl"],
        input.as_bytes(),
    );
    assert_eq!(run.status, Some(1), "the C1CC records fail");
    let records = run.jsonl();
    assert_eq!(records.len(), 2500);
    for (i, r) in records.iter().enumerate() {
        assert_eq!(r["id"], format!("rec-{i}"));
        assert_eq!(r["input"], shapes[i % shapes.len()]);
        assert_eq!(
            error_message(r).is_some(),
            i % shapes.len() == 3,
            "record {i}"
        );
    }
    let one_thread = pkarta(
        &["inspect", "--threads", "1", "--format", "jsonl"],
        input.as_bytes(),
    );
    assert_eq!(one_thread.stdout, run.stdout);
}

fn first_line_then_close(args: &[&str], lines: usize) -> (Option<i32>, String, String) {
    let mut child = binary()
        .args(args)
        .stdin(Stdio::piped())
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .expect("the binary runs");
    let mut stdin = child.stdin.take().expect("stdin");
    let writer = std::thread::spawn(move || {
        for i in 0..lines {
            if writeln!(stdin, "c1ccccc1C(=O)O acid-{i}").is_err() {
                break;
            }
        }
    });
    let mut stdout = BufReader::new(child.stdout.take().expect("stdout"));
    let mut first = String::new();
    stdout.read_line(&mut first).expect("one line");
    drop(stdout);
    let out = child.wait_with_output().expect("finishes");
    writer.join().expect("writer");
    (
        out.status.code(),
        first,
        String::from_utf8_lossy(&out.stderr).into_owned(),
    )
}

#[test]
fn closed_pipe_ends_the_run_quietly() {
    let (status, first, stderr) = first_line_then_close(&["inspect", "--format", "jsonl"], 50_000);
    assert!(first.contains("acid-0"), "{first}");
    assert_eq!(status, Some(0), "stderr: {stderr}");
    assert!(stderr.is_empty(), "stderr: {stderr}");
}

#[test]
fn closed_pipe_ends_predict_quietly() {
    let (status, first, stderr) = first_line_then_close(&["predict", "--format", "jsonl"], 50_000);
    assert!(first.contains("acid-0"), "{first}");
    assert!(
        status == Some(0) || status == Some(1),
        "status {status:?}, stderr: {stderr}"
    );
    assert!(
        !stderr.contains("panicked") && !stderr.contains("Broken pipe"),
        "stderr: {stderr}"
    );
}

#[test]
fn nothing_on_stderr_when_not_a_terminal() {
    let run = pkarta(&["inspect", "--format", "jsonl"], b"CCO\n");
    assert_no_panic(&run);
    assert!(run.stderr.is_empty(), "stderr: {}", run.stderr);
}

#[test]
fn csv_without_a_smiles_column_is_exit_2_naming_the_columns() {
    let run = pkarta(&["predict", "--input-format", "csv"], b"name,mass\nx,1\n");
    assert_eq!(run.status, Some(2));
    assert!(
        run.stderr
            .contains("no SMILES column (columns: name, mass)"),
        "{}",
        run.stderr
    );
    let run = pkarta(
        &[
            "predict",
            "--input-format",
            "csv",
            "--smiles-column",
            "structure_text",
        ],
        b"name,mass\n",
    );
    assert_eq!(run.status, Some(2));
    assert!(
        run.stderr.contains("no column \"structure_text\""),
        "{}",
        run.stderr
    );
}

#[test]
fn byte_order_mark_before_a_csv_header_is_ignored() {
    let run = pkarta(
        &["inspect", "--format", "jsonl", "--input-format", "csv"],
        b"\xEF\xBB\xBFsmiles,name\nO,water\n",
    );
    assert_eq!(run.status, Some(0), "{}", run.stderr);
    assert_eq!(run.jsonl()[0]["id"], "water");
}
