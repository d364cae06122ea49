"""The HTML reports (`tamis profile --html`, `tamis run --report-html`)
checked by outside parsers, and their numbers against the JSON reports.

Sources:
- Debian python3-html5lib, an implementation of the WHATWG HTML parsing
  algorithm (HTML Living Standard §13.2): every parse error it reports is a
  failure, and the checks walk the tree it builds.
- Python's xml.etree.ElementTree (an XML 1.0 parser): every inline <svg>
  fragment must be well-formed XML on its own.
- The JSON reports (`profile --json`, `run --report`) are the reference for
  the numbers; rows, NULLs, blanks and distinct values of two demo columns
  are also computed independently with Python's csv module (RFC 4180).
- Self-contained means: no <script>, no event-handler attribute (on*), no
  external URL (every href/src is a fragment or a data: URI), no http(s)
  text anywhere in the page, no url()/@import in the style sheet except data:.
"""
import csv
import io
import json
import os
import re
import sys
import tempfile
import xml.etree.ElementTree as ET

sys.dont_write_bytecode = True
import reflib  # noqa: E402

import html5lib  # Debian python3-html5lib  # noqa: E402

tally = reflib.Tally("html_reports")
binary = reflib.require_binary(sys.argv)
work = tempfile.mkdtemp(prefix="tamis-html-")
source_dir = os.path.dirname(os.path.dirname(os.path.dirname(os.path.abspath(__file__))))
demo_csv = os.path.join(source_dir, "assets", "demo", "tree_survey.csv")
demo_recipe = os.path.join(source_dir, "assets", "demo", "tree_survey.recipe.json")

HOSTILE = "</style><script>alert(1)</script>"
QUOTED = "\" onmouseover=\"alert(2)"
EVENT_ATTRIBUTE = re.compile(r"^on", re.IGNORECASE)
page_sizes = []


def path(name):
    return os.path.join(work, name)


def read_text(p):
    with open(p, "rb") as f:
        data = f.read()
    page_sizes.append((os.path.basename(p), len(data)))
    return data.decode("utf-8")


def text_of(element):
    return "".join(element.itertext())


def number_in(text):
    """The first whole number in a cell ("1 204 (3.0%)" -> 1204); U+202F groups digits."""
    m = re.search(r"\d[\d\u202f]*", text)
    return int(m.group(0).replace("\u202f", "")) if m else None


def visible(value):
    """A value as the pages draw it: C0 controls and DEL as Unicode Control Pictures (U+2400 block),
    the empty text named."""
    if value == "":
        return "(empty text)"
    return "".join(chr(0x2400 + ord(c)) if ord(c) < 0x20 else "\u2421" if c == "\x7f" else c for c in value)


def parse_page(label, text):
    """html5lib's tree of the page (html namespace dropped), or None; parse errors fail."""
    parser = html5lib.HTMLParser(tree=html5lib.getTreeBuilder("etree"), namespaceHTMLElements=False)
    try:
        doc = parser.parse(text)
    except Exception as e:  # html5lib raises on nothing by default; a crash is a failure too
        tally.check(False, label + ": html5lib parses the page", repr(e))
        return None
    errors = ["%s at %s" % (e[1], e[0]) for e in parser.errors]
    tally.check(not errors, label + ": no HTML parse errors (WHATWG algorithm, html5lib)", "\n".join(errors[:20]))
    return doc


def local(tag):
    return tag.rsplit("}", 1)[-1] if isinstance(tag, str) else ""


def check_self_contained(label, text, doc):
    scripts, handlers, urls = [], [], []
    for element in doc.iter():
        name = local(element.tag)
        if name in ("script", "iframe", "frame", "object", "embed", "applet", "link", "base", "audio", "video",
                    "source", "foreignObject"):
            scripts.append(name)
        for key, value in element.attrib.items():
            if EVENT_ATTRIBUTE.match(local(key)):
                handlers.append("%s %s=%r" % (name, key, value))
            if local(key) in ("href", "src", "action", "formaction", "srcset", "poster", "data"):
                if not value.startswith(("#", "data:")):
                    urls.append("%s %s=%r" % (name, key, value))
    tally.check(not scripts, label + ": no <script> or embedding element", ", ".join(scripts))
    tally.check(not handlers, label + ": no on* event-handler attribute", "\n".join(handlers[:10]))
    tally.check(not urls, label + ": every href/src is a fragment or a data: URI", "\n".join(urls[:10]))
    tally.check(re.search(r"https?:", text, re.IGNORECASE) is None, label + ": no http(s) URL anywhere in the page")
    styles = [text_of(e) for e in doc.iter() if local(e.tag) == "style"]
    tally.check(len(styles) == 1, label + ": one inline style sheet", "found %d" % len(styles))
    for css in styles:
        bad = [u for u in re.findall(r"url\(\s*['\"]?([^)'\"]*)", css) if not u.startswith("data:")]
        tally.check(not bad and "@import" not in css, label + ": the style sheet loads nothing", ", ".join(bad))
    tally.check(any(local(e.tag) == "style" and "@media print" in text_of(e) for e in doc.iter()),
                label + ": a print style sheet")
    fragment_ids = {e.get("id") for e in doc.iter() if e.get("id")}
    dangling = [e.get("href") for e in doc.iter() if local(e.tag) == "a" and e.get("href", "").startswith("#")
                and e.get("href")[1:] not in fragment_ids]
    tally.check(not dangling, label + ": every in-page link has its target", ", ".join(dangling[:10]))


def check_svg(label, text):
    """Each inline <svg> is well-formed XML with a <title> and an aria-label (role img)."""
    fragments = re.findall(r"<svg\b.*?</svg>", text, re.DOTALL)
    tally.check(fragments, label + ": the page has SVG charts")
    parsed = []
    for i, fragment in enumerate(fragments):
        try:
            svg = ET.fromstring(fragment)
        except ET.ParseError as e:
            tally.check(False, "%s: SVG %d is well-formed XML" % (label, i), "%s\n%s" % (e, fragment[:400]))
            continue
        title = svg.find("title")
        ok = (svg.get("role") == "img" and svg.get("aria-label") and title is not None and
              (title.text or "").strip() == svg.get("aria-label").strip())
        tally.check(ok, "%s: SVG %d has role=img, an aria-label and the same <title>" % (label, i), fragment[:300])
        parsed.append(svg)
    return parsed


def check_bars_proportional(label, svg):
    """Bar widths are proportional to the counts they carry in their <title>."""
    pairs = []
    for rect in svg.iter("rect"):
        if "bar" not in rect.get("class", "").split():
            continue
        count = number_in(rect.find("title").text.rsplit(":", 1)[-1])
        pairs.append((count, float(rect.get("width"))))
    if not pairs:
        return pairs
    largest = max(c for c, _ in pairs)
    longest = max(w for _, w in pairs)
    for count, width in pairs:
        expected = 0 if count == 0 else max(1.0, longest * count / largest)
        tally.check(abs(width - expected) <= 0.01, "%s: bar for %d is %.2f long, expected %.2f" % (label, count, width, expected))
    return pairs


def tables_by_header(doc, first_header):
    """Rows of every table whose first header cell is first_header: [{header: cell text}]."""
    out = []
    for table in doc.iter("table"):
        head = [text_of(th).strip() for th in table.iter("th") if th in list(table.iter("tr"))[0]]
        if not head or head[0] != first_header:
            continue
        for tr in table.find("tbody").iter("tr"):
            cells = [text_of(c).strip() for c in tr if local(c.tag) in ("td", "th")]
            out.append((tr, dict(zip(head, cells))))
    return out


# ---- the profile page of the demo file ------------------------------------
profile_html = path("profile.html")
code, _, err = reflib.run_tamis(binary, ["profile", demo_csv, "--html", profile_html])
tally.check(code == 0, "profile --html exits 0", err)
code, profile, err = reflib.run_profile(binary, [demo_csv])
tally.check(code == 0 and profile is not None, "profile --json exits 0", err)

page = read_text(profile_html)
doc = parse_page("profile page", page)
if doc is not None and profile is not None:
    check_self_contained("profile page", page, doc)
    svgs = check_svg("profile page", page)
    sections = {e.get("id"): e for e in doc.iter("section") if e.get("id")}
    for i, column in enumerate(profile["columns"]):
        section = sections.get("column-%d" % (i + 1))
        if not tally.check(section is not None, "profile page: a section for column %r" % column["name"]):
            continue
        name = next((text_of(s) for s in section.iter("span") if s.get("class") == "name"), None)
        tally.check(name == column["name"], "profile page: column %d is named %r" % (i + 1, column["name"]), repr(name))
        facts = {}
        for div in section.iter("div"):
            dt, dd = div.find("dt"), div.find("dd")
            if dt is not None and dd is not None:
                facts[text_of(dt).strip()] = text_of(dd)
        for fact, key in (("Rows", "rows"), ("NULLs", "nulls"), ("Blanks", "blanks"), ("Distinct", "distinct")):
            tally.check(number_in(facts.get(fact, "")) == column[key],
                        "profile page: %s of %r is %s as in the JSON" % (fact, column["name"], column[key]),
                        "page says %r" % facts.get(fact))
        tally.check(facts.get("Type", "").strip() == column["type"], "profile page: type of %r" % column["name"], repr(facts.get("Type")))
        for fact, key in (("Min", "min"), ("Max", "max")):
            shown = facts.get(fact)
            expected = visible(column[key]) if column[key] is not None else "none"
            tally.check(shown == expected, "profile page: %s of %r" % (fact, column["name"]), "%r vs %r" % (shown, expected))
        # The top-values chart: one bar per top value, with its count.
        chart = next((s for s in svgs if s.get("id") == "column-%d-top" % (i + 1)), None)
        if tally.check(chart is not None, "profile page: a top-values chart for %r" % column["name"]):
            bars = check_bars_proportional("top values of %r" % column["name"], chart)
            tally.check([c for c, _ in bars] == [v["count"] for v in column["top_values"]],
                        "profile page: top-value counts of %r equal the JSON" % column["name"],
                        "%r vs %r" % ([c for c, _ in bars], [v["count"] for v in column["top_values"]]))
        # The distribution: bins of a text column count every non-NULL value.
        dist = next((s for s in svgs if s.get("id") == "column-%d-distribution" % (i + 1)), None)
        if column["type"] != "boolean":
            if tally.check(dist is not None, "profile page: a distribution chart for %r" % column["name"]):
                total = sum(number_in(r.find("title").text.rsplit(":", 1)[-1]) for r in dist.iter("rect"))
                if column["type"] == "text":
                    tally.check(total == column["rows"] - column["nulls"],
                                "profile page: length bins of %r add up to the non-NULL values" % column["name"],
                                "%d vs %d" % (total, column["rows"] - column["nulls"]))
                else:
                    tally.check(0 < total <= column["rows"] - column["nulls"] - column["blanks"],
                                "profile page: value bins of %r count only values of the type" % column["name"])
    overview = tables_by_header(doc, "#")
    by_name = {cells.get("Column"): cells for _, cells in overview}
    for column in profile["columns"]:
        cells = by_name.get(column["name"], {})
        tally.check(all(number_in(cells.get(h, "")) == column[k] for h, k in
                        (("Rows", "rows"), ("NULLs", "nulls"), ("Blanks", "blanks"), ("Distinct", "distinct"))),
                    "profile page: overview row of %r equals the JSON" % column["name"], repr(cells))

    # Independent counts with Python's csv module (RFC 4180): the reader
    # turns no field into NULL (NULL comes from steps such as to_null), a
    # blank is empty or only white space (str.isspace agrees with Unicode
    # White_Space on the characters of this file; from memory), distinct is
    # SQL COUNT(DISTINCT) over the non-NULL values.
    with open(demo_csv, encoding="utf-8", newline="") as f:
        records = [r for r in csv.reader(f) if r]
    header, data = records[0], records[1:]
    for name in ("district", "planted_count", "species"):
        values = [r[header.index(name)] for r in data if len(r) == len(header)]
        expected = {"Rows": len(values), "NULLs": 0, "Blanks": sum(1 for v in values if v == "" or v.isspace()),
                    "Distinct": len(set(values))}
        section = sections.get("column-%d" % (header.index(name) + 1))
        facts = {text_of(div.find("dt")).strip(): text_of(div.find("dd")).strip()
                 for div in section.iter("div") if div.find("dt") is not None}
        for fact, value in expected.items():
            tally.check(number_in(facts.get(fact, "")) == value,
                        "profile page: %s of %r is %d by Python's csv module" % (fact, name, value),
                        "page says %r" % facts.get(fact))

    # The findings: the same list, in the same order, as `profile --findings --json`.
    code, with_findings, err = reflib.run_profile(binary, [demo_csv, "--findings"])
    expected = (with_findings or {}).get("findings", [])
    tally.check(code == 0 and expected, "profile --findings --json lists findings for the demo", err)
    cards = [e for e in sections["findings"].iter("section") if e.get("id", "").startswith("finding-")]
    tally.check(len(cards) == len(expected), "profile page: one card per finding",
                "%d cards, %d findings" % (len(cards), len(expected)))
    for card, finding in zip(cards, expected):
        heading = text_of(card.find("h3"))
        tally.check(finding["title"] in heading and finding["kind"] in heading,
                    "profile page: finding %r titled as in the JSON" % finding["title"], heading)
        m = re.search(r"rows affected: ([\d\u202f]+)", text_of(card))
        tally.check(m is not None and number_in(m.group(1)) == finding["rows_affected"],
                    "profile page: finding %r affects %d rows" % (finding["title"], finding["rows_affected"]))
        steps = [json.loads(text_of(pre)) for pre in card.iter("pre") if pre.get("class") == "step"]
        tally.check(steps == [fix["step"] for fix in finding["fixes"]],
                    "profile page: finding %r shows its fix steps as recipe JSON" % finding["title"])

# ---- the run page of the demo recipe --------------------------------------
run_html, run_json, out_csv = path("run.html"), path("run.json"), path("out.csv")
code, _, err = reflib.run_tamis(binary, ["run", demo_recipe, demo_csv, "-o", out_csv, "--report", run_json,
                                         "--report-html", run_html, "--rejects", path("rejects.csv"),
                                         "--max-rejects", "100%"])
tally.check(code == 0, "run --report-html exits 0", err)
with open(run_json, encoding="utf-8") as f:
    report = json.load(f)
page = read_text(run_html)
doc = parse_page("run page", page)
if doc is not None:
    check_self_contained("run page", page, doc)
    svgs = check_svg("run page", page)
    rows = {tr.get("id"): cells for tr, cells in tables_by_header(doc, "#")}
    for step in report["steps"]:
        cells = rows.get("step-row-%d" % step["number"])
        if not tally.check(cells is not None, "run page: a row for step %d" % step["number"]):
            continue
        if not step["enabled"]:
            tally.check("skipped" in cells.get("Step", ""), "run page: step %d shown as skipped" % step["number"])
            continue
        for header_text, key in (("Rows in", "rows_in"), ("Rows out", "rows_out"), ("Removed", "rows_removed"),
                                 ("Rejected", "rows_rejected"), ("Cells changed", "cells_changed_total")):
            tally.check(number_in(cells.get(header_text, "")) == step[key],
                        "run page: step %d %s = %d as in the JSON" % (step["number"], header_text, step[key]),
                        "page says %r" % cells.get(header_text))
        tally.check(number_in(cells.get("Conflicts", "")) == len(step["conflicts"]) and
                    number_in(cells.get("Warnings", "")) == len(step["warnings"]),
                    "run page: step %d conflicts and warnings counted" % step["number"])
        card = next((e for e in doc.iter("section") if e.get("id") == "step-%d" % step["number"]), None)
        if tally.check(card is not None, "run page: a section for step %d" % step["number"]):
            listed = [(number_in(c.get("Source line", "")), c.get("Reason"))
                      for _, c in tables_by_header(card, "Source line")]
            tally.check(listed == [(r["line"], r["reason"]) for r in step["listed_rows"]],
                        "run page: step %d lists the JSON's removed rows with lines and reasons" % step["number"],
                        "%r\nvs %r" % (listed[:5], step["listed_rows"][:5]))
            per_column = {c.get("Column"): number_in(c.get("Cells", "")) for _, c in tables_by_header(card, "Column")
                          if "Before" not in c}
            tally.check(per_column == step["cells_changed"],
                        "run page: step %d cells changed per column equal the JSON" % step["number"],
                        "%r vs %r" % (per_column, step["cells_changed"]))
    totals = {tr.get("id"): number_in(c.get("Count", "")) for tr, c in tables_by_header(doc, "Rows")}
    t = report["totals"]
    for key in ("rows_read", "rows_written", "rows_removed", "rows_rejected"):
        tally.check(totals.get("total-" + key) == t[key], "run page: total %s = %d as in the JSON" % (key, t[key]),
                    repr(totals))
    tally.check(totals.get("total-rows_read") == totals.get("total-rows_written", 0) + totals.get("total-rows_removed", 0)
                + totals.get("total-rows_rejected", 0), "run page: rows read = written + removed + rejected")
    tally.check(sum(s.get("rows_removed", 0) for s in report["steps"]) > 0,
                "the demo run removes rows, so the removed-rows tables are exercised")
    chart = next((s for s in svgs if s.get("id") == "chart-cells"), None)
    if tally.check(chart is not None, "run page: a chart of cells changed by step"):
        bars = check_bars_proportional("cells changed by step", chart)
        tally.check([c for c, _ in bars] == [s["cells_changed_total"] for s in report["steps"] if s["enabled"]],
                    "run page: one bar per enabled step with its cells changed")

# ---- untrusted text: markup and quotes in names and values ---------------
hostile_csv = path("hostile.csv")
with open(hostile_csv, "w", encoding="utf-8", newline="") as f:
    w = csv.writer(f, lineterminator="\n")
    w.writerow(["name " + QUOTED, "<b>v</b>"])
    w.writerow([HOSTILE, "1"])
    w.writerow([" " + HOSTILE + " ", "2"])
    w.writerow([QUOTED, "3"])
    w.writerow(["Rivi\u00e8re \U0001F333", "4"])
hostile_html = path("hostile.html")
code, _, err = reflib.run_tamis(binary, ["profile", hostile_csv, "--html", hostile_html])
tally.check(code == 0, "profile --html of markup-laden data exits 0", err)
recipe = path("hostile.recipe.json")
with open(recipe, "w", encoding="utf-8") as f:
    json.dump({"tamis_recipe": 1, "title": HOSTILE, "steps": [
        {"op": "trim", "columns": "*", "note": QUOTED},
        {"op": "drop_rows", "where": "\"<b>v</b>\" = '3'", "note": HOSTILE}]}, f)
hostile_run = path("hostile-run.html")
code, _, err = reflib.run_tamis(binary, ["run", recipe, hostile_csv, "-o", path("hostile-out.csv"),
                                         "--report-html", hostile_run])
tally.check(code == 0, "run --report-html of markup-laden data exits 0", err)
for label, p in (("markup profile page", hostile_html), ("markup run page", hostile_run)):
    if not os.path.exists(p):
        tally.check(False, label + " was written")
        continue
    text = read_text(p)
    d = parse_page(label, text)
    if d is None:
        continue
    check_self_contained(label, text, d)
    check_svg(label, text)
    tally.check(not any(local(e.tag) == "b" for e in d.iter()), label + ": <b> from the data stays text")
    all_text = text_of(d.find("body"))
    tally.check(HOSTILE in all_text or "alert(1)" in all_text, label + ": the markup is shown as text")
    quoted_in_text = QUOTED.replace("\n", "") in all_text
    tally.check(quoted_in_text, label + ": the quoted value is shown as text")
    tally.check("Rivi\u00e8re \U0001F333" in all_text or label.endswith("run page"),
                label + ": Unicode text survives")

# A failed require writes no HTML report (documented in `tamis run --help`).
failing = path("failing.recipe.json")
with open(failing, "w", encoding="utf-8") as f:
    json.dump({"tamis_recipe": 1, "title": "must fail",
               "steps": [{"op": "require", "rule": "row_count", "min": 1000000}]}, f)
failed_html = path("failed.html")
code, _, err = reflib.run_tamis(binary, ["run", failing, demo_csv, "-o", path("failed.csv"),
                                         "--report-html", failed_html])
tally.check(code == 1, "a failing require exits 1", "exit %d: %s" % (code, err))
tally.check(not os.path.exists(failed_html), "a failing require writes no HTML report")
code, out, err = reflib.run_tamis(binary, ["run", "--help"])
tally.check(b"--report-html" in out and b"failed require" in out, "run --help documents --report-html and failure")

tally.finish(["page sizes: " + ", ".join("%s %d bytes" % s for s in page_sizes), "work dir: " + work])
