"""`tamis run --metadata`: the W3C CSV on the Web (CSVW) metadata written for
an output, checked against the CSVW vocabulary and against the output file
itself.

Sources (W3C Recommendations of 17 December 2015; section numbers and lists
from memory):
- "Metadata Vocabulary for Tabular Data" (tabular-metadata):
  §5.1 top-level properties: @context must be "http://www.w3.org/ns/csvw";
  §5.4 table description properties (url required);
  §5.5 schema description (columns);
  §5.6 column description properties (name: no leading "_", URI Template
       variable-name characters of RFC 6570 §2.3; titles);
  §5.7 inherited properties (datatype, null, required, ...);
  §5.9 dialect description properties and their types;
  §5.11.1 built-in datatypes; §5.11.2 derived datatypes (base, format);
  §6.4.4 date formats (yyyy-MM-dd, dd.MM.yyyy, MM/dd/yyyy, ...).
- "Model for Tabular Data and Metadata on the Web" (tabular-data-model)
  §6.4 parsing cells: a cell whose string value equals the null value is
  null; a required column must not have null cells.
- XML Schema 1.1 Part 2 lexical spaces: integer (§3.4.13), decimal
  (§3.3.3), boolean (§3.3.2 "true", "false", "1", "0"), date (§3.3.9).
- Python's csv module reads the output; datetime.strptime checks dates.
"""
import datetime
import json
import shutil
import os
import re
import sys
import tempfile

sys.dont_write_bytecode = True
import reflib  # noqa: E402

tally = reflib.Tally("run_csvw")
binary = reflib.require_binary(sys.argv)
repo = os.path.dirname(os.path.dirname(os.path.dirname(os.path.abspath(__file__))))
work = tempfile.mkdtemp(prefix="tamis-csvw-")

# tabular-metadata §5.11.1
BUILT_IN = {"anyAtomicType", "anyURI", "base64Binary", "boolean", "date", "dateTime", "dateTimeStamp", "decimal",
            "integer", "long", "int", "short", "byte", "nonNegativeInteger", "positiveInteger", "unsignedLong",
            "unsignedInt", "unsignedShort", "unsignedByte", "nonPositiveInteger", "negativeInteger", "double",
            "number", "duration", "dayTimeDuration", "yearMonthDuration", "float", "gDay", "gMonth", "gMonthDay",
            "gYear", "gYearMonth", "hexBinary", "QName", "string", "normalizedString", "token", "language", "Name",
            "NMTOKEN", "xml", "html", "json", "time"}
# tabular-metadata §5.9, with the JSON type of each value.
DIALECT = {"commentPrefix": str, "delimiter": str, "doubleQuote": bool, "encoding": str, "header": bool,
           "headerRowCount": int, "lineTerminators": (str, list), "quoteChar": str, "skipBlankRows": bool,
           "skipColumns": int, "skipInitialSpace": bool, "skipRows": int, "trim": (bool, str)}
# tabular-metadata §5.6 and §5.7 (column and inherited properties).
COLUMN_KEYS = {"name", "suppressOutput", "titles", "virtual", "aboutUrl", "datatype", "default", "lang", "null",
               "ordered", "propertyUrl", "required", "separator", "textDirection", "valueUrl", "@id", "@type"}
TABLE_KEYS = {"@context", "url", "dialect", "notes", "suppressOutput", "tableDirection", "tableSchema",
              "transformations", "@id", "@type", "aboutUrl", "datatype", "default", "lang", "null", "ordered",
              "propertyUrl", "required", "separator", "textDirection", "valueUrl"}
# tabular-metadata §6.4.4 date patterns, with the strptime form Python checks them with.
DATE_PATTERNS = {"yyyy-MM-dd": "%Y-%m-%d", "yyyyMMdd": "%Y%m%d", "dd-MM-yyyy": "%d-%m-%Y", "d-M-yyyy": "%d-%m-%Y",
                 "MM-dd-yyyy": "%m-%d-%Y", "M-d-yyyy": "%m-%d-%Y", "dd/MM/yyyy": "%d/%m/%Y", "d/M/yyyy": "%d/%m/%Y",
                 "MM/dd/yyyy": "%m/%d/%Y", "M/d/yyyy": "%m/%d/%Y", "dd.MM.yyyy": "%d.%m.%Y", "d.M.yyyy": "%d.%m.%Y",
                 "MM.dd.yyyy": "%m.%d.%Y", "M.d.yyyy": "%m.%d.%Y"}
VARNAME = re.compile(r"^(?:[A-Za-z0-9_]|%[0-9A-Fa-f]{2})+(?:\.(?:[A-Za-z0-9_]|%[0-9A-Fa-f]{2})+)*$")  # RFC 6570 §2.3
LEXICAL = {"integer": re.compile(r"^[+-]?[0-9]+$"),
           "decimal": re.compile(r"^[+-]?([0-9]+(\.[0-9]*)?|\.[0-9]+)$"),
           "boolean": re.compile(r"^(true|false|1|0)$")}


def fits(datatype, value):
    base = datatype if isinstance(datatype, str) else datatype.get("base", "string")
    if base == "string":
        return True
    if base == "date":
        pattern = DATE_PATTERNS["yyyy-MM-dd"] if isinstance(datatype, str) else DATE_PATTERNS[datatype["format"]]
        try:
            datetime.datetime.strptime(value, pattern)
            return True
        except ValueError:
            return False
    return bool(LEXICAL[base].match(value))


def check_metadata(label, metadata_path, output_path, expect_types):
    doc = json.load(open(metadata_path, encoding="utf-8"))
    tally.check(doc.get("@context") == "http://www.w3.org/ns/csvw", "%s: @context (§5.1)" % label)
    unknown = [k for k in doc if k not in TABLE_KEYS and not re.match(r"^[a-z]+:", k)]
    tally.check(not unknown, "%s: only table description properties or prefixed common properties (§5.4, §5.8)" % label,
                reflib.show_value(unknown))
    url = doc.get("url")
    tally.check(isinstance(url, str) and os.path.samefile(os.path.join(os.path.dirname(metadata_path), url), output_path),
                "%s: url resolves, relative to the metadata file, to the output (§5.4)" % label, reflib.show_value(url))
    dialect = doc.get("dialect", {})
    bad = [k for k, v in dialect.items() if k not in DIALECT or not isinstance(v, DIALECT[k])]
    tally.check(not bad, "%s: dialect keys and value types are CSVW's (§5.9)" % label, reflib.show_value(dialect))
    tally.check(dialect.get("encoding") == "utf-8" and dialect.get("header") is True and dialect.get("doubleQuote") is True
                and dialect.get("quoteChar") == '"', "%s: dialect encoding, header, quoting" % label)
    data = open(output_path, "rb").read()
    terminators = dialect.get("lineTerminators", [])
    tally.check(terminators == ["\n"] and b"\r" not in data.replace(b'"\r', b""),
                "%s: lineTerminators matches the bytes" % label, reflib.show_value(terminators))
    records = reflib.parse_tamis_output(data, dialect.get("delimiter", ","))
    columns = doc.get("tableSchema", {}).get("columns", [])
    tally.check([c.get("titles") for c in columns] == records[0], "%s: titles are the header row (§5.6)" % label,
                reflib.show_value([c.get("titles") for c in columns]))
    for c in columns:
        name = c.get("name", "")
        tally.check(set(c) <= COLUMN_KEYS, "%s: %s: column properties (§5.6, §5.7)" % (label, name), reflib.show_value(c))
        tally.check(VARNAME.match(name) is not None and not name.startswith("_"),
                    "%s: column name %r is a URI Template varname not starting with _ (§5.6)" % (label, name))
        dt = c.get("datatype", "string")
        base = dt if isinstance(dt, str) else dt.get("base")
        tally.check(base in BUILT_IN, "%s: %s: datatype %r is a built-in datatype (§5.11.1)" % (label, name, dt))
        if isinstance(dt, dict):
            tally.check(set(dt) <= {"base", "format"} and (base != "date" or dt.get("format") in DATE_PATTERNS),
                        "%s: %s: derived datatype with a CSVW date pattern (§5.11.2, §6.4.4)" % (label, name),
                        reflib.show_value(dt))
    tally.check(len(set(c.get("name") for c in columns)) == len(columns), "%s: column names are unique (§5.6)" % label)
    tally.check({c["titles"]: (c["datatype"] if isinstance(c["datatype"], str) else c["datatype"]["base"])
                 for c in columns} == expect_types, "%s: datatypes are the output's types" % label,
                reflib.show_value([c.get("datatype") for c in columns]))
    # tabular-data-model §6.4: a cell equal to the null value is null; the
    # other cells must be in the datatype's lexical space; required means no nulls.
    for i, c in enumerate(columns):
        cells = [r[i] for r in records[1:]]
        nulls = sum(1 for v in cells if v == c.get("null", ""))
        misfits = [v for v in cells if v != c.get("null", "") and not fits(c["datatype"], v)]
        tally.check(not misfits, "%s: every non-null %s cell fits %r" % (label, c["titles"], c["datatype"]),
                    reflib.show_value(misfits[:5]))
        tally.check(c.get("required") is (nulls == 0),
                    "%s: %s required=%r, %d null cells in the output" % (label, c["titles"], c.get("required"), nulls))
    return doc


def run(args):
    return reflib.run_tamis(binary, args)


# A recipe that makes every type tamis writes, with a non-ISO date format.
source = os.path.join(work, "visits.csv")
with open(source, "w", encoding="utf-8", newline="") as f:
    f.write("_id,site name,planted_on,count,share,flag\n")
    f.write("1,Mill Lane,2023-03-01,12,4.5,yes\n2, Kiln St ,,7,,no\n3,Ropewalk,2024-02-29,,0.25,\n")
recipe = os.path.join(work, "visits.recipe.json")
with open(recipe, "w", encoding="utf-8") as f:
    json.dump({"tamis_recipe": 1, "title": "CSVW check", "steps": [
        {"op": "trim", "columns": "*"},
        {"op": "to_null", "columns": "*", "blank": True},
        {"op": "parse_date", "column": "planted_on", "formats": ["%Y-%m-%d"]},
        {"op": "parse_number", "column": "count", "scale": 0},
        {"op": "parse_number", "column": "share", "scale": 2},
        {"op": "cast", "column": "flag", "to": "boolean"}],
        "output": {"format": "tsv", "null": "NA", "date_format": "%d.%m.%Y"}}, f)
out = os.path.join(work, "out", "visits.tsv")
os.mkdir(os.path.dirname(out))
meta = os.path.join(work, "visits.csv-metadata.json")
code, _, stderr = run(["run", recipe, source, "-o", out, "--metadata", meta])
tally.check(code == 0, "typed run with --metadata exits 0", stderr)
if code == 0:
    doc = check_metadata("typed", meta, out, {"_id": "string", "site name": "string", "planted_on": "date",
                                              "count": "integer", "share": "decimal", "flag": "boolean"})
    columns = doc["tableSchema"]["columns"]
    tally.check(columns[2]["datatype"] == {"base": "date", "format": "dd.MM.yyyy"},
                "output.date_format %d.%m.%Y is described as the CSVW pattern dd.MM.yyyy (§6.4.4)")
    tally.check(all(c["null"] == "NA" for c in columns), "null is the recipe's output.null marker")
    tally.check(doc["dialect"]["delimiter"] == "\t", "TSV output: delimiter is a tab")
    tally.check(columns[0]["name"] == "%5Fid" and columns[1]["name"] == "site%20name",
                "names are percent-encoded where RFC 6570 varname characters do not suffice")
    tally.check([c["required"] for c in columns] == [True, True, False, False, False, False],
                "required: true exactly for the columns without NULLs")
    tally.check(doc["dialect"].get("trim") is False, "trim is false: white space in cells is data (§5.9 default true)")

# The demo: the issue's own check.
demo_out = os.path.join(work, "tree_survey.clean.csv")
demo_meta = os.path.join(work, "tree_survey.clean.csv-metadata.json")
code, _, stderr = run(["run", os.path.join(repo, "assets/demo/tree_survey.recipe.json"),
                       os.path.join(repo, "assets/demo/tree_survey.csv"), "-o", demo_out, "--metadata", demo_meta])
tally.check(code == 0, "demo recipe run with --metadata exits 0", stderr)
if code == 0:
    check_metadata("demo", demo_meta, demo_out,
                   {"site": "string", "district": "string", "species": "string", "planted_on": "date",
                    "planted_count": "integer", "survival_pct": "decimal", "crew": "string", "contractor": "string",
                    "funding_k": "decimal", "status": "string"})

if not tally.failed:
    shutil.rmtree(work)
tally.finish(["work folder: %s" % work])
