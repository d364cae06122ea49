#!/usr/bin/python3
"""End-to-end test of tamis-desk under Xvfb with Mesa's software OpenGL.

Replays a script of UI actions (tamis-desk --script) that drops the demo
file (trying a wrong delimiter on the open screen first), adds the fixes of
three findings, merges one group of similar values with one member unticked,
and exports the recipe and the cleaned CSV. Then checks:
  * the exported CSV equals, byte for byte, what `tamis run` writes for the
    exported recipe on the same file (the workbench and the batch runner are
    one engine);
  * the exported CSV is well-formed RFC 4180: Python's csv module (the
    reference reader named in design section 9) reads every record with as
    many fields as the header;
  * the recipe has the four steps, in order, with a map_values step last;
  * the screenshot is a 1280x800 PNG that is not blank (decoded with zlib).
The screenshot is kept in build/artifacts/ for people to look at.

usage: desk_end_to_end.py TAMIS_DESK TAMIS SOURCE_DIR ARTIFACTS_DIR
"""
import csv
import json
import os
import shutil
import struct
import subprocess
import sys
import tempfile
import zlib


def fail(message):
    print("FAIL: " + message)
    sys.exit(1)


def png_pixels(path):
    """Width, height and the decoded rows of an 8-bit RGB or RGBA PNG (PNG spec, ISO/IEC 15948)."""
    with open(path, "rb") as f:
        data = f.read()
    if data[:8] != b"\x89PNG\r\n\x1a\n":
        fail(path + " is not a PNG")
    pos, idat, width, height, channels = 8, b"", 0, 0, 0
    while pos < len(data):
        length, kind = struct.unpack(">I4s", data[pos:pos + 8])
        body = data[pos + 8:pos + 8 + length]
        if kind == b"IHDR":
            width, height, depth, colour = struct.unpack(">IIBB", body[:10])
            if depth != 8 or colour not in (2, 6):
                fail("unexpected PNG format: depth %d colour type %d" % (depth, colour))
            channels = 3 if colour == 2 else 4
        elif kind == b"IDAT":
            idat += body
        pos += 12 + length
    raw = zlib.decompress(idat)
    stride = width * channels
    rows, previous = [], bytearray(stride)
    for y in range(height):
        start = y * (stride + 1)
        kind, line = raw[start], bytearray(raw[start + 1:start + 1 + stride])
        for x in range(stride):
            left = line[x - channels] if x >= channels else 0
            up = previous[x]
            up_left = previous[x - channels] if x >= channels else 0
            if kind == 1:
                line[x] = (line[x] + left) & 0xFF
            elif kind == 2:
                line[x] = (line[x] + up) & 0xFF
            elif kind == 3:
                line[x] = (line[x] + (left + up) // 2) & 0xFF
            elif kind == 4:
                p = left + up - up_left
                pa, pb, pc = abs(p - left), abs(p - up), abs(p - up_left)
                predictor = left if pa <= pb and pa <= pc else (up if pb <= pc else up_left)
                line[x] = (line[x] + predictor) & 0xFF
        rows.append(bytes(line))
        previous = line
    return width, height, channels, rows


def main():
    desk, tamis, source_dir, artifacts = sys.argv[1:5]
    xvfb_run = shutil.which("xvfb-run")
    if not xvfb_run:
        fail("xvfb-run is missing: install xvfb and xauth (./dev.sh install)")
    demo = os.path.join(source_dir, "assets", "demo", "tree_survey.csv")
    os.makedirs(artifacts, exist_ok=True)
    screenshot = os.path.join(artifacts, "desk_end_to_end.png")
    if os.path.exists(screenshot):
        os.remove(screenshot)
    with tempfile.TemporaryDirectory() as work:
        recipe = os.path.join(work, "recipe.json")
        cleaned = os.path.join(work, "cleaned.csv")
        actions = os.path.join(work, "actions.txt")
        with open(actions, "w", encoding="utf-8") as f:
            f.write("\n".join([
                "# the demo, three findings' fixes, one similar-values group",
                # Dropped on the window, as from a file manager.
                "drop " + demo,
                # The open screen's delimiter control: a wrong choice shows one column.
                "read-option delimiter ;",
                "expect-columns 1",
                "read-option delimiter ,",
                "expect-columns 10",
                "load",
                "apply-finding 1",
                "apply-finding 1",
                "apply-finding 1",
                "similar species token_key",
                "untick 1 2",
                "merge-group 1",
                "expect-steps 4",
                # Undo and redo through the keyboard shortcuts' path.
                "key ctrl+z",
                "expect-steps 3",
                "key ctrl+shift+z",
                "expect-steps 4",
                "export-recipe " + recipe,
                "export-csv " + cleaned,
                # The screenshot: the table after step 3, its changed cells highlighted.
                "select-step 3",
                "panel Findings",
            ]) + "\n")
        env = dict(os.environ, LIBGL_ALWAYS_SOFTWARE="1")
        run = subprocess.run([xvfb_run, "-a", "-s", "-screen 0 1280x800x24", desk, "--scale", "1",
                              "--script", actions, "--screenshot", screenshot],
                             env=env, capture_output=True, text=True, timeout=600)
        if run.returncode != 0:
            fail("tamis-desk exited with %d: %s %s" % (run.returncode, run.stdout, run.stderr))

        with open(recipe, encoding="utf-8") as f:
            steps = json.load(f)["steps"]
        ops = [step["op"] for step in steps]
        if len(ops) != 4 or ops[3] != "map_values":
            fail("expected three fixes and a map_values step, found %s" % ops)
        species_maps = [s for s in steps if s["op"] == "map_values" and s.get("column") == "species"]
        if not species_maps:
            fail("the merged group is not a map_values step on species: %s" % steps)

        replayed = os.path.join(work, "replayed.csv")
        batch = subprocess.run([tamis, "run", recipe, demo, "-o", replayed], capture_output=True, text=True)
        if batch.returncode != 0:
            fail("tamis run failed: " + batch.stderr)
        with open(cleaned, "rb") as f:
            desk_bytes = f.read()
        with open(replayed, "rb") as f:
            run_bytes = f.read()
        if desk_bytes != run_bytes:
            fail("the workbench's CSV (%d bytes) differs from tamis run's (%d bytes)" % (len(desk_bytes), len(run_bytes)))

        # Python's csv module as the RFC 4180 reference reader.
        with open(cleaned, newline="", encoding="utf-8") as f:
            records = list(csv.reader(f))
        header = records[0]
        if any(len(record) != len(header) for record in records[1:]):
            fail("a record of the exported CSV does not have %d fields" % len(header))
        # The demo has 1,200 data rows (assets/demo/generate.py, DEFAULT_ROWS); none of
        # these fixes removes rows.
        if len(records) - 1 != 1200:
            fail("expected 1200 rows, found %d" % (len(records) - 1))

    width, height, channels, rows = png_pixels(screenshot)
    if (width, height) != (1280, 800):
        fail("screenshot is %dx%d, expected 1280x800" % (width, height))
    colours = set()
    for row in rows[::8]:
        for x in range(0, width * channels, channels * 8):
            colours.add(row[x:x + 3])
    # A drawn workbench has text, panels and highlights: many colours. A
    # blank or single-colour frame means nothing was rendered.
    if len(colours) < 20:
        fail("the screenshot looks blank (%d colours)" % len(colours))
    print("ok: %d steps, %d bytes identical to tamis run, screenshot %s (%d colours sampled)"
          % (len(ops), len(desk_bytes), screenshot, len(colours)))


if __name__ == "__main__":
    main()
