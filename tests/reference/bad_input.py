"""Malformed input, table-driven: exit codes, the line (or byte offset) named
in the message, and what lenient mode keeps.

Sources:
- RFC 4180 §2 rule 4 ("Each line should contain the same number of fields
  throughout the file") and rules 6-7 (a quoted field ends with a closing
  double quote): what makes these files malformed. Rule text from memory.
- The CLI contract for the exit codes (2 usage, 3 malformed input, 4 I/O),
  the message forms `FILE:LINE:COLUMN: error: ...` (LINE = physical line
  where the record starts, COLUMN in characters) and `FILE: error: ... at
  byte offset N (line L)`, lenient mode and the rejects file.
- Python's UnicodeDecodeError.start for where an invalid UTF-8 sequence
  begins (a 0-based byte offset, as Python's codecs count).
"""
import os
import random
import re
import sys
import tempfile

sys.dont_write_bytecode = True
import reflib  # noqa: E402


def line_pattern(line):
    # CLI contract: FILE:LINE:COLUMN: error: ... — the line is the substance
    # checked here; the column only where the place is a single character.
    return r":%d:(\d+:)? error" % line


def line_column_pattern(line, column):
    return r":%d:%d: error" % (line, column)


def utf8_error_offset(data):
    try:
        data.decode("utf-8")
    except UnicodeDecodeError as error:
        return error.start
    raise AssertionError("test bug: input is valid UTF-8")


def line_of_offset(data, offset):
    # Physical lines end at LF, CRLF or a lone CR (as Python's csv module counts them).
    return len(re.findall(rb"\r\n|\r|\n", data[:offset])) + 1


# Strict convert of malformed files: exit 3 and the message names the line.
STRICT_CASES = [
    {
        "name": "too many fields",
        # RFC 4180 rule 4: the same number of fields on every line.
        "input": b"site,species,height\nA1,oak,12\nA2,elm,7,extra\nA3,ash,9\n",
        "pattern": line_pattern(3),
    },
    {
        "name": "too few fields",
        "input": b"site,species,height\nA1,oak,12\nA2,elm,7\nA3,ash\nA4,yew,3\n",
        "pattern": line_pattern(4),
    },
    {
        "name": "too few fields after a multi-line quoted field",
        # The ragged record starts on physical line 5: the record before it spans lines 3-4.
        "input": b'site,note,height\r\nA1,ok,12\r\nA2,"two\r\nlines",7\r\nA3,short\r\n',
        "pattern": line_pattern(5),
    },
    {
        "name": "too many fields with lone CR line ends",
        "input": b"site,species\rA1,oak\rA2,elm,extra\r",
        "pattern": line_pattern(3),
    },
    {
        "name": "unterminated quote",
        # RFC 4180 rules 6-7: a field that opens with a double quote must close with one.
        # The quote opens on line 2, column 4.
        "input": b'site,note\nA1,"never closed\nA2,fine\nA3,fine\n',
        "pattern": line_column_pattern(2, 4),
    },
    {
        "name": "unterminated quote after non-ASCII text",
        # Column in characters: 'é' is one character (two bytes), the quote is character 3 of line 4.
        "input": "site,note\nA1,ok\nA2,ok\né,\"never closed\nA4,x\n".encode("utf-8"),
        "pattern": line_column_pattern(4, 3),
    },
    {
        "name": "NUL byte",
        "input": b"site,species\nA1,oak\nA2,e\x00lm\nA3,ash\n",
        "pattern": line_pattern(3),
    },
    {
        "name": "NUL byte inside a quoted field on a later line",
        "input": b'site,note\nA1,"first\nsecond \x00"\nA2,ok\n',
        # The record starts on line 2 (the contract's LINE) and the byte sits on
        # line 3; the contract does not say which a NUL message names, so either is the place.
        "pattern": r":(2|3):(\d+:)? error",
    },
]

INVALID_UTF8_CASES = [
    ("lone windows-1252 byte", b"site,species\nA1,oak\nA2,caf\xe9\nA3,ash\n"),
    ("stray continuation byte", b"site,species\nA1,\x80oak\n"),
    ("overlong encoding of '/'", b"site,species\nA1,oak\nA2,\xc0\xafx\n"),
    ("UTF-16 surrogate encoded in UTF-8", b"site,species\nA1,\xed\xa0\x80\n"),
    ("truncated sequence at end of file", b"site,species\nA1,oak\nA2,\xe2\x82"),
    ("invalid byte after a CRLF multi-line quoted field", b'site,note\r\nA1,"x\r\ny"\r\nA2,\xff\r\n'),
]


class Runner:
    def __init__(self, binary, workdir):
        self.binary = binary
        self.workdir = workdir
        self.count = 0

    def write(self, data):
        self.count += 1
        path = os.path.join(self.workdir, "case%02d.csv" % self.count)
        with open(path, "wb") as handle:
            handle.write(data)
        return path

    def convert(self, data, extra_args):
        source = self.write(data)
        target = source[:-4] + ".out.csv"
        code, _, stderr = reflib.run_tamis(self.binary, ["convert", source, "-o", target] + extra_args)
        output = open(target, "rb").read() if os.path.exists(target) else None
        return source, code, output, stderr


def describe(data, args, code, stderr, output=None):
    text = "input: %s\nargs: %s\nexit: %d\nstderr: %s" % (reflib.show_bytes(data, 300), " ".join(args), code, stderr.strip()[:600])
    if output is not None:
        text += "\noutput: %s" % reflib.show_bytes(output, 300)
    return text


def read_rejects(path):
    if not os.path.exists(path):
        return None
    records = reflib.parse_tamis_output(open(path, "rb").read())
    # CLI contract: rejects file columns line,reason,record; a header row naming them is allowed.
    if records[:1] == [["line", "reason", "record"]]:
        records = records[1:]
    return records


def main():
    binary = reflib.require_binary(sys.argv)
    tally = reflib.Tally("ref.bad_input")
    with tempfile.TemporaryDirectory(prefix="tamis-bad-input-") as workdir:
        runner = Runner(binary, workdir)

        for case in STRICT_CASES:
            args = ["--delimiter", ",", "--header", "yes"]
            _, code, output, stderr = runner.convert(case["input"], args)
            details = describe(case["input"], args, code, stderr)
            tally.check(code == 3, "%s: strict convert exits 3" % case["name"], details)
            tally.check(re.search(case["pattern"], stderr) is not None,
                        "%s: stderr names the place (%s)" % (case["name"], case["pattern"]), details)

        # Lenient convert: ragged rows go to the rejects file with their source
        # line and a reason; every good row is written; rows read = written + rejected.
        good = [["A%d" % i, "oak", str(i)] for i in range(1, 41)]
        rng = random.Random(7)
        lines = ["site,species,height"]
        expected_rejects = []
        for row in good:
            lines.append(",".join(row))
            if rng.random() < 0.25:
                bad = ",".join(row[:2]) if rng.random() < 0.5 else ",".join(row + ["extra"])
                lines.append(bad)
                expected_rejects.append((len(lines), bad))  # 1-based physical line of the bad record
        data = ("\n".join(lines) + "\n").encode("utf-8")
        for front in ("convert", "profile"):
            if front == "convert":
                rejects_path = os.path.join(workdir, "rejects.csv")
                args = ["--delimiter", ",", "--header", "yes", "--lenient", "--rejects", rejects_path]
                _, code, output, stderr = runner.convert(data, args)
                details = describe(data, args, code, stderr, output)
                if not tally.check(code == 0 and output is not None, "lenient convert: exits 0", details):
                    continue
                written = reflib.parse_tamis_output(output)
                tally.check(written == [["site", "species", "height"]] + good,
                            "lenient convert: all %d good rows written in order" % len(good), details)
                rejects = read_rejects(rejects_path)
                details += "\nrejects file: %s" % reflib.show_value(rejects)
                tally.check(rejects is not None and len(rejects) == len(expected_rejects),
                            "lenient convert: %d rows in the rejects file" % len(expected_rejects), details)
                for (line, bad), reject in zip(expected_rejects, rejects or []):
                    tally.check(len(reject) == 3 and reject[0] == str(line) and reject[1].strip() != "" and reject[2] == bad,
                                "lenient convert: reject from line %d has line, reason and the record %r" % (line, bad),
                                "got %s" % reflib.show_value(reject))
                tally.check(len(written) - 1 + len(rejects or []) == len(lines) - 1,
                            "lenient convert: rows read (%d) = written + rejected" % (len(lines) - 1), details)
            else:
                # Profile is lenient by default (CLI contract) and counts the rows it set aside.
                source = runner.write(data)
                code, report, stderr = reflib.run_profile(binary, [source, "--delimiter", ",", "--header", "yes"])
                tally.check(code == 0 and isinstance(report, dict) and report.get("rejected") == len(expected_rejects),
                            "profile: rejected = %d" % len(expected_rejects),
                            "exit %d\nreport: %s\nstderr: %s" % (code, reflib.show_value(report, 500), stderr.strip()[:300]))
                code, report, stderr = reflib.run_profile(binary, [source, "--delimiter", ",", "--header", "yes", "--strict"])
                tally.check(code == 3 and re.search(line_pattern(expected_rejects[0][0]), stderr) is not None,
                            "profile --strict: exits 3 naming line %d" % expected_rejects[0][0],
                            "exit %d\nstderr: %s" % (code, stderr.strip()[:300]))

        # Invalid UTF-8 under --encoding utf-8: exit 3, byte offset and line named.
        for name, data in INVALID_UTF8_CASES:
            offset = utf8_error_offset(data)  # Python's UnicodeDecodeError.start
            line = line_of_offset(data, offset)
            args = ["--encoding", "utf-8", "--delimiter", ",", "--header", "yes"]
            _, code, _, stderr = runner.convert(data, args)
            details = describe(data, args, code, stderr)
            tally.check(code == 3, "invalid UTF-8 (%s): exit 3" % name, details)
            tally.check(re.search(r"byte offset %d\b" % offset, stderr) is not None,
                        "invalid UTF-8 (%s): stderr names byte offset %d" % (name, offset), details)
            # The line in either of the contract's forms: "(line L)" or FILE:L:C.
            tally.check(("(line %d)" % line) in stderr or re.search(line_pattern(line), stderr) is not None,
                        "invalid UTF-8 (%s): stderr names line %d" % (name, line), details)

        # Empty file: a clear message and exit 3 (CLI contract: 3 = input malformed).
        _, code, _, stderr = runner.convert(b"", ["--header", "yes"])
        tally.check(code == 3 and "empty" in stderr.lower(), "empty file: exit 3, message says the file is empty",
                    describe(b"", ["--header", "yes"], code, stderr))

        # Header only: zero rows, exit 0, header written (CLI contract: header row written when
        # the input has one; RFC 4180 rule 3 makes the header an ordinary first line).
        for data in (b"site,species,height\n", b"site,species,height"):
            args = ["--delimiter", ",", "--header", "yes"]
            source, code, output, stderr = runner.convert(data, args)
            tally.check(code == 0 and output == b"site,species,height\n",
                        "header only %r: exit 0, header written, no rows" % data, describe(data, args, code, stderr, output))
            code, report, stderr = reflib.run_profile(binary, [source] + args)
            tally.check(code == 0 and isinstance(report, dict) and report.get("rows") == 0,
                        "header only %r: profile rows 0" % data, "exit %d\nreport: %s" % (code, reflib.show_value(report)))

        # A 1 MiB field, with quotes, commas and line breaks inside, read and written back intact
        # (RFC 4180 §2 sets no field length limit; Python's csv module is the reader of the output).
        rng = random.Random(1048576)
        alphabet = 'abcdefghij ,"\n\r\t0123456789éß中\U0001F333'
        big = "".join(rng.choice(alphabet) for _ in range(1 << 20))
        data = ('site,note,height\nA1,"' + big.replace('"', '""') + '",12\nA2,small,3\n').encode("utf-8")
        args = ["--delimiter", ",", "--header", "yes"]
        _, code, output, stderr = runner.convert(data, args)
        intact = False
        if code == 0 and output is not None:
            records = reflib.parse_tamis_output(output)
            intact = records == [["site", "note", "height"], ["A1", big, "12"], ["A2", "small", "3"]]
        tally.check(intact, "1 MiB quoted field (%d bytes of UTF-8) read and written back intact" % len(big.encode("utf-8")),
                    "exit %d\nstderr: %s\noutput size %s" % (code, stderr.strip()[:300], len(output) if output else None))

        # Missing input file: I/O error, exit 4, the path named (CLI contract: 4 = I/O error).
        missing = os.path.join(workdir, "no_such_file.csv")
        code, _, stderr = reflib.run_tamis(binary, ["convert", missing, "-o", os.path.join(workdir, "x.csv")])
        tally.check(code == 4 and "no_such_file.csv" in stderr, "missing input file: exit 4 naming it",
                    "exit %d\nstderr: %s" % (code, stderr.strip()[:300]))
        code, _, stderr = reflib.run_tamis(binary, ["profile", missing, "--json"])
        tally.check(code == 4 and "no_such_file.csv" in stderr, "profile of a missing file: exit 4 naming it",
                    "exit %d\nstderr: %s" % (code, stderr.strip()[:300]))

        # Usage errors: exit 2 (CLI contract; -1 is no count of lines, xyz no single delimiter).
        source = runner.write(b"site,species\nA1,oak\n")
        target = os.path.join(workdir, "usage.out.csv")
        for args in (["convert", source, "-o", target, "--no-such-option"],
                     ["convert", source, "-o", target, "--delimiter", "xyz"],
                     ["convert", source, "-o", target, "--encoding", "no-such-encoding"],
                     ["convert", source, "-o", target, "--header", "maybe"],
                     ["convert", source, "-o", target, "--skip-rows", "-1"],
                     ["profile", source, "--json", "--no-such-option"],
                     ["no-such-command", source]):
            code, _, stderr = reflib.run_tamis(binary, args)
            shown = " ".join("IN" if a == source else "OUT" if a == target else a for a in args)
            tally.check(code == 2 and stderr.strip() != "", "usage error `tamis %s`: exit 2 with a message" % shown,
                        "exit %d\nstderr: %s" % (code, stderr.strip()[:300]))

    tally.finish([
        "strict convert: ragged rows (too many/too few, after multi-line fields, lone CR), unterminated quotes, NUL -> exit 3 + line",
        "lenient convert: rejects file lines/reasons/records, good rows kept, rows read = written + rejected; profile rejected/--strict",
        "invalid UTF-8 (6 kinds) -> exit 3 + byte offset + line; empty -> 3; header only -> 0 rows; 1 MiB field intact;",
        "missing file -> 4; bad options/values/command -> 2",
    ])


if __name__ == "__main__":
    main()
