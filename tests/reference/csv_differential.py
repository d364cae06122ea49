"""Differential test: generated valid RFC 4180 files, `tamis convert` versus
Python's csv module.

Source: Python's csv module as the differential reference (design §9), on
input that follows RFC 4180 §2 (rules 5-7: a field holding the delimiter, a
double quote, CR or LF is enclosed in double quotes, inner quotes doubled).
Beyond the RFC's comma and CRLF, the files use the dialect variations the
CLI contract accepts: ; tab | delimiters, LF or lone CR record terminators,
UTF-8 with or without BOM.

Each file is converted by its own tamis process (--header no, so the first
record is compared too); the CLI contract says the output records equal
Python's csv records, ignoring Python's [] for blank lines.
"""
import concurrent.futures
import os
import random
import sys
import tempfile

sys.dont_write_bytecode = True
import reflib  # noqa: E402

FILE_COUNT = 1200
# The last files are large (thousands of records, up to a few MB) so record
# boundaries, quoted line breaks, CRLF pairs and multi-byte characters fall
# across whatever buffer or batch limits a streaming reader has (common
# practice for testing streaming parsers).
LARGE_FILE_COUNT = 12
SEED = 4180
CANDIDATE_DELIMITERS = [",", ";", "\t", "|"]
DELIMITER_ARGUMENT = {",": ",", ";": ";", "\t": "tab", "|": "|"}
TERMINATORS = ["\r\n", "\n", "\r"]

# Pieces that fields are built from. The tricky ones: every candidate
# delimiter, quotes, each kind of line break, non-BMP characters (U+1F600,
# U+1D518), a combining sequence, NBSP, U+2028 (a line separator to Unicode,
# plain text to CSV), zero-width space, spaces.
PLAIN_PIECES = ["a", "B", "zz", "0", "42", "-7.5", " ", "  ", "x y", "é", "ß", "中文", "\U0001F600", "\U0001D518",
                "e\u0301", "\u00a0", "\u2028", "\u200b", "'", "#", "=", "\\", "Ωμ", "ﬁ"]
DELIMITER_PIECES = [",", ";", "\t", "|"]
QUOTE_PIECES = ['"', '""', 'say "hi"']
BREAK_PIECES = ["\r", "\n", "\r\n", "\n\n"]
# Whole values that look typed: a reader that infers types must still give
# back the text as written (leading zeros, signs, trailing zeros, exponents,
# digits beyond 64 bits, date and boolean spellings, padded numbers).
TYPED_LOOKING_VALUES = ["007", "1.50", "-0", "+5", "1e3", "12345678901234567890", "0.1", "3.14159265358979323846",
                        " 42", "42 ", "2024-01-05", "5/1/2024", "TRUE", "no", "NaN", "NULL", "-", ".5", "1,5", ""]


def random_field(rng, allow_delimiters):
    if rng.random() < 0.15:
        return ""
    pieces = []
    for _ in range(rng.randint(1, 5)):
        roll = rng.random()
        if roll < 0.55:
            pieces.append(rng.choice(PLAIN_PIECES))
        elif roll < 0.70:
            pieces.append(rng.choice(QUOTE_PIECES))
        elif roll < 0.85:
            pieces.append(rng.choice(BREAK_PIECES))
        elif allow_delimiters:
            pieces.append(rng.choice(DELIMITER_PIECES))
        else:
            pieces.append(rng.choice(PLAIN_PIECES))
    field = "".join(pieces)
    if rng.random() < 0.1:
        field = " " + field
    if rng.random() < 0.1:
        field = field + " "
    return field


def encode_field(rng, field, delimiter, alone_in_record):
    # RFC 4180 rule 6: these fields must be enclosed in double quotes.
    must_quote = any(ch in field for ch in (delimiter, '"', "\r", "\n"))
    # A record that is one empty unquoted field is a blank line; quote it so it is a record.
    if alone_in_record and field == "":
        must_quote = True
    # RFC 4180 rule 5: any other field may or may not be quoted.
    if must_quote or rng.random() < 0.2:
        return '"' + field.replace('"', '""') + '"'
    return field


def generate_file(rng, index):
    auto_delimiter = index % 4 == 3
    large = index >= FILE_COUNT - LARGE_FILE_COUNT
    delimiter = rng.choice(CANDIDATE_DELIMITERS)
    if auto_delimiter:
        # Unambiguous for detection: at least two columns and rows, and no other
        # candidate delimiter character anywhere in the file (not even quoted).
        columns = rng.randint(2, 6)
        rows = rng.randint(2, 25)
    else:
        columns = rng.choice([1, 1, 2, 3, 3, 4, 5, 6])
        rows = rng.randint(1, 25)
    if large:
        rows = rng.randint(3000, 15000)
    terminator = rng.choice(TERMINATORS)
    typed_looking_columns = {c for c in range(columns) if rng.random() < 0.2}
    records = []
    for _ in range(rows):
        record = []
        for column in range(columns):
            if column in typed_looking_columns:
                field = rng.choice(TYPED_LOOKING_VALUES)
            else:
                field = random_field(rng, allow_delimiters=not auto_delimiter)
            if auto_delimiter:
                for other in CANDIDATE_DELIMITERS:
                    if other != delimiter:
                        field = field.replace(other, "")
            record.append(field)
        records.append(record)
    lines = [delimiter.join(encode_field(rng, f, delimiter, columns == 1) for f in record) for record in records]
    text_parts = []
    if rng.random() < 0.05:
        text_parts.append(terminator)  # a blank line before the first record
    for position, line in enumerate(lines):
        text_parts.append(line)
        last = position == len(lines) - 1
        # RFC 4180 rule 2: the last record may or may not end with a line break.
        if not last or rng.random() < 0.5:
            text_parts.append(terminator)
            if rng.random() < 0.05:
                text_parts.append(terminator)  # a blank line (tamis skips it, Python yields [])
    text = "".join(text_parts)
    with_bom = rng.random() < 0.2
    data = ("\ufeff" if with_bom else "").encode("utf-8") + text.encode("utf-8")
    return {
        "index": index,
        "data": data,
        "delimiter": delimiter,
        "auto_delimiter": auto_delimiter,
        "columns": columns,
        "records": records,
        "terminator": terminator,
        "bom": with_bom,
        "via_stdin": rng.random() < 0.1,
        "to_stdout": rng.random() < 0.1,
    }


def python_reference(case):
    # utf-8-sig: Python's codec for UTF-8 that drops a leading BOM.
    text = case["data"].decode("utf-8-sig")
    records = reflib.python_csv_records(text, case["delimiter"], strict=True)
    return [r for r in records if r != []]


def run_case(binary, workdir, case):
    source = os.path.join(workdir, "in%04d.csv" % case["index"])
    target = os.path.join(workdir, "out%04d.csv" % case["index"])
    with open(source, "wb") as handle:
        handle.write(case["data"])
    args = ["convert", "-" if case["via_stdin"] else source, "-o", "-" if case["to_stdout"] else target,
            "--header", "no"]
    if not case["auto_delimiter"]:
        args += ["--delimiter", DELIMITER_ARGUMENT[case["delimiter"]]]
    code, stdout, stderr = reflib.run_tamis(binary, args, case["data"] if case["via_stdin"] else None)
    output = stdout
    if not case["to_stdout"]:
        output = b""
        if os.path.exists(target):
            with open(target, "rb") as handle:
                output = handle.read()
            os.remove(target)
    os.remove(source)
    return args, code, output, stderr


def main():
    binary = reflib.require_binary(sys.argv)
    tally = reflib.Tally("ref.csv_differential")
    rng = random.Random(SEED)
    cases = [generate_file(rng, i) for i in range(FILE_COUNT)]

    # The generator must itself produce valid input that Python reads as the
    # records it meant; otherwise the comparison below would prove nothing.
    for case in cases:
        if python_reference(case) != case["records"]:
            print("TEST BUG: generator and Python csv disagree on file %d: %s" % (case["index"], reflib.show_bytes(case["data"])))
            sys.exit(1)

    with tempfile.TemporaryDirectory(prefix="tamis-differential-") as workdir:
        with concurrent.futures.ThreadPoolExecutor(max_workers=2) as pool:
            results = list(pool.map(lambda c: run_case(binary, workdir, c), cases))

    for case, (args, code, output, stderr) in zip(cases, results):
        label = "file %04d (delimiter %r%s, terminator %r%s, %d columns)" % (
            case["index"], case["delimiter"], " auto-detected" if case["auto_delimiter"] else "",
            case["terminator"], ", BOM" if case["bom"] else "", case["columns"])
        expected = python_reference(case)
        details = "args: %s\ninput: %s\nexpected (Python csv): %s\nexit: %d\nstderr: %s" % (
            " ".join(args[0:1] + ["IN"] + args[2:]), reflib.show_bytes(case["data"]), reflib.show_value(expected),
            code, stderr.strip()[:400])
        if not tally.check(code == 0, label + ": exit 0", details):
            continue
        try:
            got = reflib.parse_tamis_output(output)
        except Exception as error:  # the output must be strict UTF-8 RFC 4180
            tally.check(False, label + ": output parses as strict RFC 4180 UTF-8",
                        "%s\n%s\noutput: %s" % (error, details, reflib.show_bytes(output)))
            continue
        generated_header = ["column_%d" % (i + 1) for i in range(case["columns"])]
        # CLI contract: --header no names the columns column_1..column_N in a header row.
        tally.check(got[:1] == [generated_header], label + ": header row column_1..column_N",
                    details + "\ngot first row: %s" % reflib.show_value(got[:1]))
        records = got[1:]
        if records != expected:
            first_difference = next((i for i in range(min(len(records), len(expected))) if records[i] != expected[i]),
                                    min(len(records), len(expected)))
            tally.check(False, label + ": records equal Python csv",
                        details + "\ngot %d records, expected %d; first difference at record %d\n"
                        "expected: %s\ngot:      %s" % (
                            len(records), len(expected), first_difference,
                            reflib.show_value(expected[first_difference] if first_difference < len(expected) else None),
                            reflib.show_value(records[first_difference] if first_difference < len(records) else None)))
            continue
        tally.check(True, label + ": records equal Python csv")
        # CLI contract (minimal quoting, LF) and RFC 4180 rules 6-7 for the writer.
        expected_bytes = reflib.serialize_minimal([generated_header] + expected).encode("utf-8")
        tally.check(output == expected_bytes, label + ": output bytes use minimal quoting and LF",
                    details + "\nexpected output: %s\ngot output:      %s" % (
                        reflib.show_bytes(expected_bytes), reflib.show_bytes(output)))

    auto_count = sum(1 for c in cases if c["auto_delimiter"])
    summary = [
        "compared %d generated RFC 4180 files (seed %d) with Python's csv module:" % (len(cases), SEED),
        "  %d with --delimiter, %d auto-detected; %d with BOM; %d via stdin, %d to stdout" % (
            len(cases) - auto_count, auto_count, sum(1 for c in cases if c["bom"]),
            sum(1 for c in cases if c["via_stdin"]), sum(1 for c in cases if c["to_stdout"])),
        "  terminators: " + ", ".join("%r x%d" % (t, sum(1 for c in cases if c["terminator"] == t)) for t in TERMINATORS),
        "  %d records in all; the %d largest files %d-%d KB" % (
            sum(len(c["records"]) for c in cases), LARGE_FILE_COUNT,
            min(len(c["data"]) for c in cases[-LARGE_FILE_COUNT:]) // 1024,
            max(len(c["data"]) for c in cases[-LARGE_FILE_COUNT:]) // 1024),
    ]
    tally.finish(summary)


if __name__ == "__main__":
    main()
