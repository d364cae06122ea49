#!/usr/bin/python3
"""The HTML reports in a real browser (issue 4): `tamis profile --html` and
`tamis run --report-html` on the demo, opened from file:// in Debian's
headless Chromium by html_in_chromium.js (npm puppeteer-core, tests/reference
package.json). The browser is the outside reference for "self-contained": it
records every request the page makes, and any request beyond the page
itself, any Content-Security-Policy violation or console error, or an
unrendered chart fails the test. Full-page screenshots are kept as test
artifacts in ARTIFACT_DIR.

Usage: html_chromium.py TAMIS ARTIFACT_DIR
"""
import os
import subprocess
import sys
import tempfile

HERE = os.path.dirname(os.path.abspath(__file__))
DEMO = os.path.normpath(os.path.join(HERE, "..", "..", "assets", "demo"))


def main():
    tamis, artifacts = sys.argv[1], sys.argv[2]
    if not os.path.exists("/usr/bin/chromium"):
        print("FAIL: /usr/bin/chromium is missing (Debian package chromium; ./dev.sh install)")
        return 1
    with tempfile.TemporaryDirectory() as work:
        profile_page = os.path.join(work, "demo_profile.html")
        run_page = os.path.join(work, "demo_run_report.html")
        data = os.path.join(DEMO, "tree_survey.csv")
        subprocess.run([tamis, "profile", data, "--html", profile_page], check=True, stdout=subprocess.DEVNULL)
        subprocess.run([tamis, "run", os.path.join(DEMO, "tree_survey.recipe.json"), data,
                        "-o", os.path.join(work, "clean.csv"), "--report-html", run_page],
                       check=True, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL)
        checker = ["node", os.path.join(HERE, "html_in_chromium.js")]
        done = subprocess.run(checker + [artifacts, profile_page, run_page])
        # Negative control: a page that fetches an image must fail the same check.
        control = os.path.join(work, "control_fetches.html")
        with open(control, "w", encoding="utf-8") as f:
            f.write('<!DOCTYPE html><title>control</title><svg width="10" height="10"></svg>'
                    '<img src="file:///nonexistent/tamis-control.png">')
        caught = subprocess.run(checker + [work, control], stdout=subprocess.PIPE, text=True)
        if caught.returncode == 0 or "requests beyond the page itself" not in caught.stdout:
            print("FAIL: the negative control (a page that loads an image) was not caught:\n" + caught.stdout)
            return 1
        print("negative control caught: a page that loads an image fails the check")
        return done.returncode


if __name__ == "__main__":
    raise SystemExit(main())
