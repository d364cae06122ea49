"""RFC 4180 section 2, rules 1-7: the RFC's own examples through `tamis convert`.

Source: RFC 4180, "Common Format and MIME Type for Comma-Separated Values
(CSV) Files", section 2. The rule text quoted beside each case is from
memory (no Debian package ships the RFC text); the example bytes are the
RFC's, with its "CRLF" marks written as \\r\\n. The expected records are what
the rule says; Python's csv module is checked to agree as a second opinion.
"""
import os
import sys
import tempfile

sys.dont_write_bytecode = True
import reflib  # noqa: E402

RFC_CASES = [
    {
        "rule": 1,
        # RFC 4180 §2 rule 1: "Each record is located on a separate line,
        # delimited by a line break (CRLF)."
        "input": b"aaa,bbb,ccc\r\nzzz,yyy,xxx\r\n",
        "records": [["aaa", "bbb", "ccc"], ["zzz", "yyy", "xxx"]],
    },
    {
        "rule": 2,
        # RFC 4180 §2 rule 2: "The last record in the file may or may not
        # have an ending line break."
        "input": b"aaa,bbb,ccc\r\nzzz,yyy,xxx",
        "records": [["aaa", "bbb", "ccc"], ["zzz", "yyy", "xxx"]],
    },
    {
        "rule": 4,
        # RFC 4180 §2 rule 4: "Within the header and each record, there may be
        # one or more fields, separated by commas. [...] The last field in the
        # record must not be followed by a comma."
        "input": b"aaa,bbb,ccc",
        "records": [["aaa", "bbb", "ccc"]],
    },
    {
        "rule": 4,
        # RFC 4180 §2 rule 4: "Spaces are considered part of a field and should
        # not be ignored." (the RFC gives no example for this sentence; this
        # input applies it to the rule-4 example)
        "input": b" aaa , bbb,ccc \r\n",
        "records": [[" aaa ", " bbb", "ccc "]],
    },
    {
        "rule": 5,
        # RFC 4180 §2 rule 5: "Each field may or may not be enclosed in double
        # quotes [...]. If fields are not enclosed with double quotes, then
        # double quotes may not appear inside the fields."
        "input": b'"aaa","bbb","ccc"\r\nzzz,yyy,xxx',
        "records": [["aaa", "bbb", "ccc"], ["zzz", "yyy", "xxx"]],
    },
    {
        "rule": 6,
        # RFC 4180 §2 rule 6: "Fields containing line breaks (CRLF), double
        # quotes, and commas should be enclosed in double-quotes."
        "input": b'"aaa","b\r\nbb","ccc"\r\nzzz,yyy,xxx',
        "records": [["aaa", "b\r\nbb", "ccc"], ["zzz", "yyy", "xxx"]],
    },
    {
        "rule": 6,
        # RFC 4180 §2 rule 6, the commas and double quotes named in its text
        # (its example only shows a line break).
        "input": b'"a,a","b""b",",""\r\n"\r\nz,y,x\r\n',
        "records": [["a,a", 'b"b', ',"\r\n'], ["z", "y", "x"]],
    },
    {
        "rule": 7,
        # RFC 4180 §2 rule 7: "If double-quotes are used to enclose fields,
        # then a double-quote appearing inside a field must be escaped by
        # preceding it with another double quote."
        "input": b'"aaa","b""bb","ccc"',
        "records": [["aaa", 'b"bb', "ccc"]],
    },
]

# RFC 4180 §2 rule 3: "There maybe an optional header line appearing as the
# first line of the file with the same format as normal record lines. This
# header will contain names corresponding to the fields in the file [...]
# (the presence or absence of the header line should be indicated via the
# optional "header" parameter of this MIME type)."
RULE3_EXAMPLE = b"field_name,field_name,field_name\r\naaa,bbb,ccc\r\nzzz,yyy,xxx\r\n"
RULE3_DISTINCT_NAMES = b"site,species,height_m\r\naaa,bbb,ccc\r\nzzz,yyy,xxx\r\n"


def convert(binary, workdir, tag, data, extra_args):
    source = os.path.join(workdir, tag + ".csv")
    target = os.path.join(workdir, tag + ".out.csv")
    with open(source, "wb") as handle:
        handle.write(data)
    if os.path.exists(target):
        os.remove(target)
    code, _, stderr = reflib.run_tamis(binary, ["convert", source, "-o", target] + extra_args)
    output = b""
    if os.path.exists(target):
        with open(target, "rb") as handle:
            output = handle.read()
    return source, code, output, stderr


def main():
    binary = reflib.require_binary(sys.argv)
    tally = reflib.Tally("ref.rfc4180_examples")
    with tempfile.TemporaryDirectory(prefix="tamis-rfc4180-") as workdir:
        for index, case in enumerate(RFC_CASES):
            expected = case["records"]
            # Second opinion: Python's csv module reads the RFC example the same way.
            python_records = [r for r in reflib.python_csv_records(case["input"].decode("utf-8")) if r]
            tally.check(python_records == expected, "rule %d example %d: Python csv agrees with the RFC" % (case["rule"], index),
                        "python: %s" % reflib.show_value(python_records))
            columns = len(expected[0])
            generated_header = ["column_%d" % (i + 1) for i in range(columns)]
            for mode, delimiter_args in (("explicit-comma", ["--delimiter", ","]), ("auto-delimiter", [])):
                label = "rule %d example %d (%s, --header no)" % (case["rule"], index, mode)
                _, code, output, stderr = convert(binary, workdir, "case%d-%s" % (index, mode), case["input"],
                                                  delimiter_args + ["--header", "no"])
                details = "input: %s\nexpected records: %s\nexit: %d\noutput: %s\nstderr: %s" % (
                    reflib.show_bytes(case["input"]), reflib.show_value(expected), code,
                    reflib.show_bytes(output), stderr.strip())
                if not tally.check(code == 0, label + ": exit 0", details):
                    continue
                try:
                    records = reflib.parse_tamis_output(output)
                except Exception as error:  # any decode or csv error means the output is not clean RFC 4180 UTF-8
                    tally.check(False, label + ": output parses as strict RFC 4180 UTF-8", "%s\n%s" % (error, details))
                    continue
                # CLI contract: with --header no the output gets a header row column_1..column_N.
                tally.check(records[:1] == [generated_header], label + ": generated header row", details)
                tally.check(records[1:] == expected, label + ": records as the RFC rule states", details)
                # CLI contract + RFC 4180 rules 6/7: minimal quoting, LF line endings.
                tally.check(output == reflib.serialize_minimal([generated_header] + expected).encode("utf-8"),
                            label + ": output bytes use minimal quoting and LF",
                            details + "\nexpected output: %s" % reflib.show_bytes(
                                reflib.serialize_minimal([generated_header] + expected).encode("utf-8")))

        # RFC 4180 rule 1 with the first record read as a header: CRLF output
        # must reproduce the RFC's example byte for byte (records "delimited by
        # a line break (CRLF)").
        _, code, output, stderr = convert(binary, workdir, "rule1-crlf", RFC_CASES[0]["input"],
                                          ["--delimiter", ",", "--header", "yes", "--line-ending", "crlf"])
        tally.check(code == 0 and output == RFC_CASES[0]["input"],
                    "rule 1 example with --header yes --line-ending crlf is reproduced byte for byte",
                    "exit %d\nexpected: %s\ngot: %s\nstderr: %s" % (code, reflib.show_bytes(RFC_CASES[0]["input"]),
                                                                   reflib.show_bytes(output), stderr.strip()))

        # Rule 3: the header line is optional and its presence is stated from outside
        # (the MIME "header" parameter); --header yes/no is that statement.
        for tag, data in (("rule3-example", RULE3_EXAMPLE), ("rule3-distinct", RULE3_DISTINCT_NAMES)):
            header_as_read = data.split(b"\r\n")[0].decode("utf-8").split(",")
            data_records = [["aaa", "bbb", "ccc"], ["zzz", "yyy", "xxx"]]
            source, code, output, stderr = convert(binary, workdir, tag + "-yes", data,
                                                   ["--delimiter", ",", "--header", "yes"])
            details = "input: %s\nexit: %d\noutput: %s\nstderr: %s" % (
                reflib.show_bytes(data), code, reflib.show_bytes(output), stderr.strip())
            if tally.check(code == 0, "%s --header yes: exit 0" % tag, details):
                records = reflib.parse_tamis_output(output)
                header = records[0] if records else []
                tally.check(records[1:] == data_records, "%s --header yes: the header line is not a record" % tag, details)
                tally.check(len(header) == 3, "%s --header yes: header row has the 3 names" % tag, details)
                if len(set(header_as_read)) == len(header_as_read):
                    # CLI contract: "column names as read".
                    tally.check(header == header_as_read, "%s --header yes: names as read" % tag, details)
                else:
                    # CLI contract: "column names as read, de-duplicated" — the RFC
                    # example repeats field_name three times; the first keeps its name.
                    tally.check(len(set(header)) == 3 and header[:1] == ["field_name"],
                                "%s --header yes: repeated names de-duplicated, first kept as read" % tag, details)
            source, code, output, stderr = convert(binary, workdir, tag + "-no", data,
                                                   ["--delimiter", ",", "--header", "no"])
            details = "input: %s\nexit: %d\noutput: %s\nstderr: %s" % (
                reflib.show_bytes(data), code, reflib.show_bytes(output), stderr.strip())
            if tally.check(code == 0, "%s --header no: exit 0" % tag, details):
                records = reflib.parse_tamis_output(output)
                tally.check(records == [["column_1", "column_2", "column_3"], header_as_read] + data_records,
                            "%s --header no: the header line is an ordinary record" % tag, details)
            # The profile states the same reading: header flag and data-row count.
            for header_flag, expected_header, expected_rows in (("yes", True, 2), ("no", False, 3)):
                code, report, stderr = reflib.run_profile(binary, [source, "--delimiter", ",", "--header", header_flag])
                details = "exit %d\nreport: %s\nstderr: %s" % (code, reflib.show_value(report), stderr.strip())
                if tally.check(code == 0 and isinstance(report, dict), "%s profile --header %s: exit 0 with JSON" % (tag, header_flag), details):
                    tally.check(report.get("header") is expected_header and report.get("rows") == expected_rows,
                                "%s profile --header %s: header=%s rows=%d" % (tag, header_flag, expected_header, expected_rows),
                                details)

    tally.finish(["checked RFC 4180 §2 rules 1-7 examples: records, generated header, minimal-quoting output,",
                  "CRLF round trip of rule 1, rule 3 header yes/no in convert and profile"])


if __name__ == "__main__":
    main()
