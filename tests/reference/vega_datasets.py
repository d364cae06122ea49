"""Real open datasets: every .csv and .tsv file shipped in the npm package
vega-datasets, through `tamis convert` and `tamis profile`.

Sources:
- The files themselves (npm package vega-datasets, version pinned in
  tests/package-lock.json) and their dialect as declared in the package's
  datapackage.json (Frictionless Data Package; a resource without a
  "dialect" uses the Frictionless CSV Dialect defaults: delimiter ",",
  header true).
- Python's csv module reading each file with that delimiter (design §9).

A file that is not valid RFC 4180 (records of different lengths) is not
skipped: the CLI contract's behaviour for it is asserted instead (strict
convert exits 3 naming the line; profile reports rejected rows) and the
file is listed in the output.
"""
import glob
import json
import os
import sys
import tempfile

sys.dont_write_bytecode = True
import reflib  # noqa: E402

DELIMITER_ARGUMENT = {",": ",", "\t": "tab", ";": ";", "|": "|"}


def load_dialects(package_dir):
    """path -> (delimiter, header) from datapackage.json."""
    with open(os.path.join(package_dir, "datapackage.json"), encoding="utf-8") as handle:
        manifest = json.load(handle)
    dialects = {}
    for resource in manifest.get("resources", []):
        path = resource.get("path", "")
        if not path.endswith((".csv", ".tsv")):
            continue
        dialect = resource.get("dialect", {})
        dialect = dialect.get("csv", dialect)  # the package nests it under "csv"
        delimiter = dialect.get("delimiter", "\t" if path.endswith(".tsv") else ",")
        dialects[path] = (delimiter, dialect.get("header", True))
    return dialects


def main():
    binary = reflib.require_binary(sys.argv)
    if len(sys.argv) < 3:
        print("usage: vega_datasets.py TAMIS_BINARY PATH_TO_node_modules/vega-datasets")
        sys.exit(2)
    package_dir = sys.argv[2]
    if not os.path.isfile(os.path.join(package_dir, "datapackage.json")):
        print("FAIL: the npm package vega-datasets is not installed at %s.\n"
              "Run the project setup first: ./dev.sh install (it runs npm ci in tests/, see tests/package.json)." % package_dir)
        sys.exit(1)
    tally = reflib.Tally("ref.vega_datasets")
    dialects = load_dialects(package_dir)
    data_files = sorted(glob.glob(os.path.join(package_dir, "data", "**", "*.csv"), recursive=True)
                        + glob.glob(os.path.join(package_dir, "data", "**", "*.tsv"), recursive=True))
    tally.check(len(data_files) > 0, "the package ships .csv/.tsv files", package_dir)
    summary = []
    not_rfc4180 = []
    with tempfile.TemporaryDirectory(prefix="tamis-vega-") as workdir:
        for path in data_files:
            relative = os.path.relpath(path, os.path.join(package_dir, "data"))
            declared = dialects.get(relative)
            if declared is None:
                # A file the manifest does not describe: its extension states the delimiter.
                declared = ("\t" if path.endswith(".tsv") else ",", True)
            delimiter, has_header = declared
            with open(path, "rb") as handle:
                raw = handle.read()
            text = raw.decode("utf-8-sig")
            with_lines = reflib.python_csv_records_with_lines(text, delimiter)
            python_records = [r for r, _ in with_lines]
            width = len(python_records[0]) if python_records else 0
            ragged = [(line, record) for record, line in with_lines if len(record) != width]
            header_args = ["--header", "yes" if has_header else "no"]
            read_args = ["--delimiter", DELIMITER_ARGUMENT[delimiter]] + header_args
            target = os.path.join(workdir, "out.csv")
            if os.path.exists(target):
                os.remove(target)
            code, _, stderr = reflib.run_tamis(binary, ["convert", path, "-o", target] + read_args)
            output = open(target, "rb").read() if os.path.exists(target) else b""
            details = "file: %s\nargs: %s\nexit: %d\nstderr: %s" % (relative, " ".join(read_args), code, stderr.strip()[:600])
            data_rows = len(python_records) - (1 if has_header else 0)

            if ragged:
                first_line = ragged[0][0]
                not_rfc4180.append("%s: %d records with a field count other than %d, first on line %d"
                                   % (relative, len(ragged), width, first_line))
                # CLI contract: strict by default, a ragged row stops the run with exit 3 naming the line.
                tally.check(code == 3 and (":%d:" % first_line) in stderr,
                            "%s (not RFC 4180): strict convert exits 3 naming line %d" % (relative, first_line), details)
                code, report, stderr = reflib.run_profile(binary, [path] + read_args)
                tally.check(isinstance(report, dict) and report.get("rejected") == len(ragged),
                            "%s (not RFC 4180): profile reports %d rejected rows" % (relative, len(ragged)),
                            "exit %d\nreport: %s\nstderr: %s" % (code, reflib.show_value(report), stderr.strip()[:300]))
                continue

            if tally.check(code == 0, "%s: convert exits 0" % relative, details):
                try:
                    got = reflib.parse_tamis_output(output)
                except Exception as error:  # output must be clean UTF-8 RFC 4180
                    got = None
                    tally.check(False, "%s: output is clean UTF-8 CSV" % relative, "%s\n%s" % (error, details))
                if got is not None:
                    expected = python_records if has_header else [["column_%d" % (i + 1) for i in range(width)]] + python_records
                    first_difference = next((i for i in range(min(len(got), len(expected))) if got[i] != expected[i]), None)
                    tally.check(got == expected, "%s: records equal Python csv" % relative,
                                details + "\n%d records expected, %d got; first difference at record %s: expected %s got %s" % (
                                    len(expected), len(got), first_difference,
                                    reflib.show_value(expected[first_difference]) if first_difference is not None else "-",
                                    reflib.show_value(got[first_difference]) if first_difference is not None else "-"))

            code, report, stderr = reflib.run_profile(binary, [path] + read_args)
            details = "file: %s\nexit: %d\nreport: %s\nstderr: %s" % (
                relative, code, reflib.show_value(report, 300), stderr.strip()[:300])
            if tally.check(code == 0 and isinstance(report, dict), "%s: profile exits 0 with one JSON object" % relative, details):
                tally.check(report.get("rows") == data_rows,
                            "%s: profile rows = Python records - header = %d" % (relative, data_rows),
                            details + "\nprofile rows: %s" % report.get("rows"))
                tally.check(report.get("rejected") == 0, "%s: profile rejects nothing" % relative, details)
                names = [c.get("name") for c in report.get("columns", [])]
                tally.check(names == (python_records[0] if has_header else ["column_%d" % (i + 1) for i in range(width)]),
                            "%s: profile columns are the header names" % relative, details + "\nnames: %s" % names)

            # Auto-detection on the same file must find the dialect the
            # package declares (the content is unambiguous: a single
            # candidate delimiter, a text header over typed columns).
            code, report, stderr = reflib.run_profile(binary, [path])
            accepted_names = [delimiter] + (["tab"] if delimiter == "\t" else [])
            tally.check(isinstance(report, dict) and report.get("delimiter") in accepted_names
                        and report.get("header") is has_header and report.get("rows") == data_rows,
                        "%s: auto-detected delimiter %r, header %s, %d rows" % (relative, delimiter, has_header, data_rows),
                        "exit %d\ngot delimiter %r header %r rows %r\nstderr: %s" % (
                            code, report.get("delimiter") if isinstance(report, dict) else None,
                            report.get("header") if isinstance(report, dict) else None,
                            report.get("rows") if isinstance(report, dict) else None, stderr.strip()[:300]))
            summary.append("  %-40s %7d rows x %2d columns, delimiter %r" % (relative, data_rows, width, delimiter))

    summary.insert(0, "vega-datasets files checked (records vs Python csv, profile rows, auto-detected dialect):")
    summary.append("files that are not valid RFC 4180: " + ("none" if not not_rfc4180 else ""))
    summary.extend("  " + line for line in not_rfc4180)
    tally.finish(summary)


if __name__ == "__main__":
    main()
