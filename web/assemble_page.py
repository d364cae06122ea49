#!/usr/bin/env python3
"""Writes the one-file page: shell.html with the Emscripten loader inlined and
the WebAssembly module embedded as base64 (decoded by the page itself).

Usage: assemble_page.py SHELL.html MODULE.js MODULE.wasm OUT.html
"""
import base64
import os
import sys


def main():
    shell_path, script_path, wasm_path, out_path = sys.argv[1:]
    with open(shell_path, encoding="utf-8") as f:
        shell = f.read()
    with open(script_path, encoding="utf-8") as f:
        script = f.read()
    with open(wasm_path, "rb") as f:
        module = base64.b64encode(f.read()).decode("ascii")
    # An inline script ends at the first "</script"; the loader must not hold one.
    if "</script" in script.lower():
        sys.exit(f"{script_path} contains '</script', which would end the inline script early")
    for marker in ("@TAMIS_MODULE_BASE64@", "@TAMIS_MODULE_SCRIPT@"):
        if shell.count(marker) != 1:
            sys.exit(f"{shell_path} must hold {marker} exactly once")
    page = shell.replace("@TAMIS_MODULE_BASE64@", module).replace("@TAMIS_MODULE_SCRIPT@", script)
    with open(out_path + ".tmp", "w", encoding="utf-8") as f:
        f.write(page)
    os.replace(out_path + ".tmp", out_path)


if __name__ == "__main__":
    main()
