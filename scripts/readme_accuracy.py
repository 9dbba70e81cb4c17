#!/usr/bin/env python3
"""Copy the accuracy tables of docs/accuracy.md into the README.

docs/accuracy.md is written by `cargo run --release -p pkarta-calibrate -- --write --table
docs/accuracy.md`; the README shows its first two tables (the summary and the per-class
table) between the `<!-- accuracy:start ... -->` and `<!-- accuracy:end -->` markers.
Run from the repository root after regenerating docs/accuracy.md.
"""
import re
import sys
from pathlib import Path


def tables(text):
    """The markdown tables of `text`, each as a list of lines, in order."""
    found, current = [], []
    for line in text.splitlines():
        if line.startswith("|"):
            current.append(line)
        elif current:
            found.append(current)
            current = []
    if current:
        found.append(current)
    return found


def main():
    accuracy = Path("docs/accuracy.md").read_text()
    found = tables(accuracy)
    if len(found) < 2:
        sys.exit("docs/accuracy.md: expected a summary and a per-class table")
    summary, per_class = found[0], found[1]
    block = "\n".join(
        summary
        + [
            "",
            "<details><summary>Per class (cross-validated, by the class of the site each "
            "held-out molecule was attributed to)</summary>",
            "",
        ]
        + per_class
        + ["", "</details>"]
    )
    readme = Path("README.md").read_text()
    pattern = re.compile(r"(<!-- accuracy:start[^\n]*-->\n).*?(\n<!-- accuracy:end -->)", re.S)
    if not pattern.search(readme):
        sys.exit("README.md: accuracy markers not found")
    Path("README.md").write_text(pattern.sub(lambda m: m.group(1) + block + m.group(2), readme))


if __name__ == "__main__":
    main()
