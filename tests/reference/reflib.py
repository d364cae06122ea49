"""Shared plumbing for the reference tests: run the tamis CLI, read CSV the
way Python's csv module does, and tally checks.

Every script imports this after setting sys.dont_write_bytecode, so no
__pycache__ lands in the source tree.
"""
import csv
import io
import json
import os
import subprocess
import sys

# Python's csv module refuses fields over 128 KiB by default; the tests
# read 1 MiB fields on purpose.
csv.field_size_limit(1 << 30)

# A hang guard, not a timing assertion: no single tamis run in these tests
# should come anywhere near it.
RUN_TIMEOUT_SECONDS = 120


def run_tamis(binary, args, stdin_bytes=None):
    """Runs tamis with args; returns (exit code, stdout bytes, stderr text)."""
    completed = subprocess.run(
        [binary] + list(args),
        input=stdin_bytes if stdin_bytes is not None else b"",
        stdout=subprocess.PIPE,
        stderr=subprocess.PIPE,
        timeout=RUN_TIMEOUT_SECONDS,
    )
    return completed.returncode, completed.stdout, completed.stderr.decode("utf-8", "replace")


def run_profile(binary, args):
    """Runs `tamis profile ... --json`; returns (exit code, parsed report or None, stderr)."""
    code, stdout, stderr = run_tamis(binary, ["profile"] + list(args) + ["--json"])
    try:
        report = json.loads(stdout.decode("utf-8"))
    except ValueError:
        report = None
        stderr += "\n(stdout is not one JSON object: %s)" % show_bytes(stdout, 300)
    return code, report, stderr


def python_csv_records(text, delimiter=",", strict=False):
    """All records Python's csv module reads from text (a str), [] for blank lines kept."""
    reader = csv.reader(io.StringIO(text, newline=""), delimiter=delimiter, strict=strict)
    return [row for row in reader]


def python_csv_records_with_lines(text, delimiter=","):
    """(record, first physical line) pairs; blank lines ([] records) are dropped.

    csv.reader.line_num counts the source lines consumed so far, so a record
    starts on the line after the previous record (or blank line) ended.
    """
    reader = csv.reader(io.StringIO(text, newline=""), delimiter=delimiter)
    result = []
    previous_end = 0
    for row in reader:
        if row:
            result.append((row, previous_end + 1))
        previous_end = reader.line_num
    return result


def parse_tamis_output(data, delimiter=","):
    """Records of a tamis output file: it must be strict UTF-8 and strict RFC 4180."""
    text = data.decode("utf-8")
    return python_csv_records(text, delimiter, strict=True)


def serialize_minimal(records, delimiter=",", line_ending="\n"):
    """The CLI contract's writer: quote a field only if it holds the delimiter,
    a double quote, CR or LF (RFC 4180 §2 rules 6 and 7); a record that is
    one empty field is written as ""."""
    lines = []
    for record in records:
        if record == [""]:
            lines.append('""')
            continue
        fields = []
        for field in record:
            if any(ch in field for ch in (delimiter, '"', "\r", "\n")):
                fields.append('"' + field.replace('"', '""') + '"')
            else:
                fields.append(field)
        lines.append(delimiter.join(fields))
    return "".join(line + line_ending for line in lines)


def show_bytes(data, limit=600):
    text = repr(bytes(data))
    return text if len(text) <= limit else text[:limit] + "...(%d bytes in all)" % len(data)


def show_value(value, limit=600):
    text = repr(value)
    return text if len(text) <= limit else text[:limit] + "..."


class Tally:
    """Counts checks; prints each failure with details and a closing summary."""

    def __init__(self, name, max_details=25):
        self.name = name
        self.passed = 0
        self.failed = 0
        self.max_details = max_details
        self.failure_labels = []

    def check(self, condition, label, details=""):
        if condition:
            self.passed += 1
            return True
        self.failed += 1
        self.failure_labels.append(label)
        if self.failed <= self.max_details:
            print("FAIL %s" % label)
            if details:
                for line in details.rstrip("\n").split("\n"):
                    print("     " + line)
        elif self.failed == self.max_details + 1:
            print("(further failure details suppressed; only labels are counted)")
        return False

    def finish(self, summary_lines):
        print("---- %s ----" % self.name)
        for line in summary_lines:
            print(line)
        print("%d passed, %d failed" % (self.passed, self.failed))
        sys.exit(1 if self.failed else 0)


def require_binary(argv):
    if len(argv) < 2:
        print("usage: %s TAMIS_BINARY [args...]" % os.path.basename(argv[0]))
        sys.exit(2)
    binary = argv[1]
    if not (os.path.isfile(binary) and os.access(binary, os.X_OK)):
        print("FAIL: tamis binary not found or not executable: %s" % binary)
        sys.exit(1)
    return binary
