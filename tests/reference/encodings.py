"""Encodings read by `tamis convert`, checked against published tables and
Python's codecs.

Sources:
- Windows-1252: the cp1252 table as shipped in Debian package `locales`
  (glibc charmap /usr/share/i18n/charmaps/CP1252.gz, "source: UNICODE 1.0",
  i.e. the Unicode Consortium's vendor mapping), with Python's `cp1252`
  codec as a second reference that must agree with it.
- The five bytes that table leaves undefined (0x81 0x8D 0x8F 0x90 0x9D):
  WHATWG Encoding Standard, index-windows-1252, maps each to the C1 control
  of the same value (from memory of the standard's index file).
- ISO-8859-1: Python's `latin-1` codec (every byte is the code point of the
  same value, ISO/IEC 8859-1 plus the C0/C1 controls of ISO 6429).
- UTF-16LE/BE: Python's `utf-16`, `utf-16-le`, `utf-16-be` codecs. A BOM
  is a signature, not content, also under an explicit label: WHATWG
  Encoding Standard, "decode" algorithm (BOM sniffing wins over the label).
- Detection rule (BOM, else UTF-8 if the whole file is valid, else
  windows-1252): the CLI contract's --encoding auto.
"""
import gzip
import os
import re
import sys
import tempfile

sys.dont_write_bytecode = True
import reflib  # noqa: E402

GLIBC_CP1252 = "/usr/share/i18n/charmaps/CP1252.gz"
# WHATWG Encoding Standard, index-windows-1252: pointers 1, 13, 15, 16, 29
# (bytes 0x81, 0x8D, 0x8F, 0x90, 0x9D) are U+0081, U+008D, U+008F, U+0090,
# U+009D (from memory).
UNDEFINED_IN_CP1252 = [0x81, 0x8D, 0x8F, 0x90, 0x9D]
ALL_BYTES_BUT_NUL = range(0x01, 0x100)  # NUL is malformed input to tamis (covered by ref.bad_input)


def load_glibc_cp1252():
    if not os.path.exists(GLIBC_CP1252):
        print("FAIL: %s is missing: install the Debian package `locales`" % GLIBC_CP1252)
        sys.exit(1)
    table = {}
    with gzip.open(GLIBC_CP1252, "rt", encoding="ascii") as handle:
        in_map = False
        for line in handle:
            if line.startswith("CHARMAP"):
                in_map = True
            elif line.startswith("END CHARMAP"):
                in_map = False
            elif in_map:
                match = re.match(r"<U([0-9A-Fa-f]{4,6})>\s+/x([0-9a-fA-F]{2})\s", line)
                if match:
                    table[int(match.group(2), 16)] = chr(int(match.group(1), 16))
    return table


def byte_table_file(byte_values):
    """One record per byte: `hex,"a<byte>b"`, the byte enclosed in letters so
    that white space and line breaks stay inside the field; quote doubled
    per RFC 4180 rule 7."""
    lines = []
    for value in byte_values:
        inner = b'""' if value == 0x22 else bytes([value])
        lines.append(b'%02X,"a' % value + inner + b'b"')
    return b"\n".join(lines) + b"\n"


class Runner:
    def __init__(self, binary, workdir):
        self.binary = binary
        self.workdir = workdir
        self.count = 0

    def convert(self, data, extra_args):
        self.count += 1
        source = os.path.join(self.workdir, "in%03d.csv" % self.count)
        target = os.path.join(self.workdir, "out%03d.csv" % self.count)
        with open(source, "wb") as handle:
            handle.write(data)
        code, _, stderr = reflib.run_tamis(self.binary, ["convert", source, "-o", target] + extra_args)
        output = None
        if os.path.exists(target):
            with open(target, "rb") as handle:
                output = handle.read()
        return code, output, stderr

    def profile(self, data, extra_args):
        self.count += 1
        source = os.path.join(self.workdir, "in%03d.csv" % self.count)
        with open(source, "wb") as handle:
            handle.write(data)
        return reflib.run_profile(self.binary, [source] + extra_args)


def check_records(tally, label, data, args, expected_text, code, output, stderr, delimiter=","):
    expected = [r for r in reflib.python_csv_records(expected_text, delimiter) if r]
    details = "args: %s\ninput: %s\nexit: %d\nstderr: %s" % (" ".join(args), reflib.show_bytes(data, 300), code,
                                                              stderr.strip()[:600])
    if not tally.check(code == 0 and output is not None, label + ": exit 0", details):
        return None
    try:
        got = reflib.parse_tamis_output(output)
    except Exception as error:  # output must be clean UTF-8 RFC 4180
        tally.check(False, label + ": output is clean UTF-8 CSV", "%s\n%s" % (error, details))
        return None
    # With --header no the output starts with the generated column_1.. row;
    # otherwise the header line is one of the records compared.
    header_no = args[args.index("--header") + 1] == "no"
    records = got[1:] if header_no else got
    if records == expected:
        tally.check(True, label + ": records equal the reference decoding")
        return records
    mismatches = [(i, e, g) for i, (e, g) in enumerate(zip(expected, records)) if e != g]
    lines = ["%d records expected, %d got" % (len(expected), len(records))]
    for i, e, g in mismatches[:12]:
        lines.append("record %d: expected %s got %s" % (i + 1, reflib.show_value(e), reflib.show_value(g)))
    if len(mismatches) > 12:
        lines.append("... %d differing records in all" % len(mismatches))
    tally.check(False, label + ": records equal the reference decoding", details + "\n" + "\n".join(lines))
    return records


def main():
    binary = reflib.require_binary(sys.argv)
    tally = reflib.Tally("ref.encodings")
    glibc = load_glibc_cp1252()

    # Both references must agree before either is used: glibc's table and
    # Python's cp1252 codec, byte for byte over every defined byte.
    for value in range(0x100):
        if value in UNDEFINED_IN_CP1252:
            if value in glibc:
                print("TEST BUG: glibc's CP1252 defines byte 0x%02X" % value)
                sys.exit(1)
            continue
        if glibc.get(value) != bytes([value]).decode("cp1252"):
            print("TEST BUG: glibc and Python disagree on cp1252 byte 0x%02X" % value)
            sys.exit(1)
    cp1252_reference = dict(glibc)
    for value in UNDEFINED_IN_CP1252:
        cp1252_reference[value] = chr(value)  # WHATWG index-windows-1252

    def cp1252_decode(data):
        return "".join(cp1252_reference[b] for b in data)

    table_file = byte_table_file(ALL_BYTES_BUT_NUL)
    with tempfile.TemporaryDirectory(prefix="tamis-encodings-") as workdir:
        runner = Runner(binary, workdir)

        # Windows-1252, explicit and auto-detected (the table file is not valid
        # UTF-8 and has no BOM, so auto must read it as windows-1252).
        for label, extra in (("windows-1252 explicit", ["--encoding", "windows-1252"]), ("windows-1252 auto-detected", [])):
            args = ["--delimiter", ",", "--header", "no"] + extra
            code, output, stderr = runner.convert(table_file, args)
            records = check_records(tally, label, table_file, args, cp1252_decode(table_file), code, output, stderr)
            if records is not None:
                by_byte = {r[0]: r[1] for r in records if len(r) == 2}
                for value in range(0x80, 0xA0):
                    expected = "a" + cp1252_reference[value] + "b"
                    # Source per byte: glibc CP1252 charmap + Python cp1252; WHATWG for the five undefined bytes.
                    tally.check(by_byte.get("%02X" % value) == expected,
                                "%s: byte 0x%02X -> U+%04X" % (label, value, ord(cp1252_reference[value])),
                                "expected %s got %s" % (reflib.show_value(expected), reflib.show_value(by_byte.get("%02X" % value))))

        # The five undefined bytes are reported: one file per byte, so each
        # warning is checked on its own (CLI contract + this brief).
        for value in UNDEFINED_IN_CP1252:
            data = b"site,note\nn1,ok\nn2,x" + bytes([value]) + b"y\n"
            args = ["--encoding", "windows-1252", "--delimiter", ",", "--header", "yes"]
            code, output, stderr = runner.convert(data, args)
            check_records(tally, "undefined byte 0x%02X" % value, data, args, cp1252_decode(data), code, output, stderr)
            mentions_byte = re.search(r"(?i)(0x%02X\b|\\x%02X|U\+00%02X\b|\b%02X\b)" % (value, value, value, value), stderr)
            tally.check("warning" in stderr.lower() and mentions_byte is not None,
                        "undefined windows-1252 byte 0x%02X: stderr has a warning naming it" % value,
                        "input: %s\nstderr: %s" % (reflib.show_bytes(data), stderr.strip()[:600]))

        # Negative control: defined bytes only (0x80, 0x9F, 0xE9) give no such warning.
        data = b"site,note\nn1,\x80 \x9f caf\xe9\n"
        args = ["--encoding", "windows-1252", "--delimiter", ",", "--header", "yes"]
        code, output, stderr = runner.convert(data, args)
        check_records(tally, "defined windows-1252 bytes only", data, args, cp1252_decode(data), code, output, stderr)
        tally.check(not re.search(r"(?i)undefined|0x(81|8D|8F|90|9D)\b", stderr),
                    "defined windows-1252 bytes only: no warning about undefined bytes",
                    "input: %s\nstderr: %s" % (reflib.show_bytes(data), stderr.strip()[:600]))

        # ISO-8859-1: every byte but NUL (Python latin-1).
        args = ["--encoding", "iso-8859-1", "--delimiter", ",", "--header", "no"]
        code, output, stderr = runner.convert(table_file, args)
        records = check_records(tally, "iso-8859-1 explicit", table_file, args, table_file.decode("latin-1"), code, output, stderr)
        if records is not None:
            by_byte = {r[0]: r[1] for r in records if len(r) == 2}
            for value in range(0x80, 0xA0):
                # Python latin-1: byte 0x80-0x9F is the C1 control U+0080-U+009F, not the windows-1252 letter.
                tally.check(by_byte.get("%02X" % value) == "a" + chr(value) + "b",
                            "iso-8859-1: byte 0x%02X -> U+%04X" % (value, value),
                            "got %s" % reflib.show_value(by_byte.get("%02X" % value)))

        # Detection: a file that is valid UTF-8 except for one byte deep inside
        # (past the first 200 KB) is not valid UTF-8 as a whole: windows-1252.
        late = b"id,name\n" + b"".join(b"%d,plain ascii row\n" % i for i in range(12000)) + b"12000,Mu\xf1oz \x93quoted\x94\n"
        args = ["--delimiter", ",", "--header", "yes"]
        code, output, stderr = runner.convert(late, args)
        check_records(tally, "non-UTF-8 byte after 200 KB, auto", late, args, cp1252_decode(late), code, output, stderr)
        cafe_1252 = "site,species\nCafé,Érable\n".encode("cp1252")
        code, output, stderr = runner.convert(cafe_1252, args)
        check_records(tally, "Latin text in windows-1252, auto", cafe_1252, args, cafe_1252.decode("cp1252"), code, output, stderr)
        # The counterpart: valid UTF-8 with non-ASCII stays UTF-8 (not read as windows-1252 mojibake).
        cafe_utf8 = "site,species\nCafé,Érable \U0001F333\n".encode("utf-8")
        code, output, stderr = runner.convert(cafe_utf8, args)
        check_records(tally, "valid UTF-8, auto", cafe_utf8, args, cafe_utf8.decode("utf-8"), code, output, stderr)
        # UTF-8 BOM with the explicit label: the BOM is a signature (WHATWG decode).
        bom_utf8 = "\ufeffsite,species\nCafé,Érable\n".encode("utf-8")
        for extra in ([], ["--encoding", "utf-8"]):
            code, output, stderr = runner.convert(bom_utf8, args + extra)
            records = check_records(tally, "UTF-8 with BOM %s" % (extra or "auto"), bom_utf8, args + extra,
                                    bom_utf8.decode("utf-8-sig"), code, output, stderr)
            if records is not None:
                header = reflib.parse_tamis_output(output)[0]
                tally.check(header == ["site", "species"], "UTF-8 with BOM %s: BOM not part of the first name" % (extra or "auto"),
                            "header: %s" % reflib.show_value(header))

        # UTF-16. Characters chosen so that their code units contain the bytes
        # of ',', '"', CR and LF (U+2C00, U+0A22, U+0D0A, U+220D): a reader that
        # splits bytes before decoding breaks on them. Plus surrogate pairs
        # (U+1F333, U+1D11E) and line breaks inside quoted fields.
        utf16_text = ('site,note,height\r\n'
                      'Ⰰ1,"ਢ say ""hi""\r\nnext line",12\r\n'
                      'ഊ,\U0001F333 oak \U0001D11E,"7,5"\r\n'
                      '∍,"a\nb",\u00e9\u0301\r\n')
        expected_records_text = utf16_text
        for codec_name, label_name in (("utf-16-le", "utf-16le"), ("utf-16-be", "utf-16be")):
            with_bom = "\ufeff".encode(codec_name) + utf16_text.encode(codec_name)
            without_bom = utf16_text.encode(codec_name)
            variants = [
                ("%s with BOM, auto" % label_name, with_bom, ["--delimiter", ","]),
                ("%s with BOM, auto delimiter too" % label_name, with_bom, []),
                ("%s with BOM, explicit" % label_name, with_bom, ["--delimiter", ",", "--encoding", label_name]),
                ("%s without BOM, explicit" % label_name, without_bom, ["--delimiter", ",", "--encoding", label_name]),
            ]
            for label, data, extra in variants:
                args = extra + ["--header", "no"]
                # Python's reference decoding: `utf-16` reads the BOM; the bare
                # codec for BOM-less input.
                reference_text = data.decode("utf-16") if data.startswith(("\ufeff".encode(codec_name))) else data.decode(codec_name)
                if reference_text != expected_records_text:
                    print("TEST BUG: Python's %s round trip differs" % codec_name)
                    sys.exit(1)
                code, output, stderr = runner.convert(data, args)
                check_records(tally, label, data, args, reference_text, code, output, stderr)

            # A large file: surrogate pairs and the tricky code units above at
            # every alignment, so they straddle any internal buffer limit.
            body = "".join('%d,"%s\r\n%s",%s\n' % (i, "\U0001F333" * (i % 7), "Ⰰਢ" * (i % 5), "ഊ∍" * (i % 3))
                               for i in range(20000))
            large = "\ufeff".encode(codec_name) + ("n,note,tail\n" + body).encode(codec_name)
            args = ["--delimiter", ",", "--header", "yes"]
            code, output, stderr = runner.convert(large, args)
            check_records(tally, "%s with BOM, %d KB" % (label_name, len(large) // 1024), large, args,
                          large.decode("utf-16"), code, output, stderr)

            # Profile names the detected encoding (CLI contract: "encoding" in profile JSON,
            # named as in --encoding).
            code, report, stderr = runner.profile("\ufeff".encode(codec_name) + utf16_text.encode(codec_name), ["--header", "yes"])
            tally.check(code == 0 and isinstance(report, dict) and report.get("encoding") == label_name,
                        "%s with BOM: profile reports encoding %s" % (label_name, label_name),
                        "exit %d\nreport: %s\nstderr: %s" % (code, reflib.show_value(report), stderr.strip()[:300]))

        for label, data, expected_name in (("windows-1252 Latin text", cafe_1252, "windows-1252"),
                                           ("valid UTF-8", cafe_utf8, "utf-8")):
            code, report, stderr = runner.profile(data, ["--header", "yes"])
            tally.check(code == 0 and isinstance(report, dict) and report.get("encoding") == expected_name,
                        "%s: profile auto-detects encoding %s" % (label, expected_name),
                        "exit %d\nreport: %s\nstderr: %s" % (code, reflib.show_value(report), stderr.strip()[:300]))

    tally.finish([
        "windows-1252 bytes 0x01-0xFF (explicit and auto) vs glibc CP1252 + Python cp1252, WHATWG for 0x81 0x8D 0x8F 0x90 0x9D;",
        "warnings for the 5 undefined bytes; iso-8859-1 bytes 0x01-0xFF vs Python latin-1;",
        "auto-detection: late non-UTF-8 byte, windows-1252 vs UTF-8 text, UTF-8 BOM;",
        "UTF-16LE/BE with and without BOM, explicit and auto, surrogate pairs, code units holding , \" CR LF bytes",
    ])


if __name__ == "__main__":
    main()
