#!/usr/bin/python3
"""Engine parity: the same recipes over the same file must give the same
bytes, whichever build of the engine runs them.

  parity_check.py wasm NATIVE_DRIVER WASM_DRIVER_JS NODE WORK_DIR
      The WebAssembly driver (under node) against the native one: output
      CSV, rejects file and JSON run report, or the error of a run that
      stops, compared byte for byte. The native driver is the reference; if
      it is missing the check fails (dev.sh builds it before the wasm suite).
  parity_check.py cli TAMIS NATIVE_DRIVER WORK_DIR
      The native driver against `tamis run` (threaded, the program users
      run): the driver replays recipes as the command does, so what the
      wasm check compares is what `tamis run` writes.

Recipes: the demo recipe (assets/demo/tree_survey.recipe.json) and 100
generated ones (parity_recipes.py, fixed seed), all over the demo file.
Every registered step must appear in a recipe that ran to the end, and every
expression function and operator in some recipe.
"""
import json
import os
import re
import subprocess
import sys
import time

HERE = os.path.dirname(os.path.abspath(__file__))
ROOT = os.path.dirname(os.path.dirname(HERE))
sys.path.insert(0, HERE)
import parity_recipes  # noqa: E402

DEMO_CSV = os.path.join(ROOT, 'assets', 'demo', 'tree_survey.csv')
DEMO_RECIPE = os.path.join(ROOT, 'assets', 'demo', 'tree_survey.recipe.json')
GENERATED = 100
SUFFIXES = ('.csv', '.rejects.csv', '.report.json', '.error')
failures = []


def fail(message):
    failures.append(message)
    print('FAIL: ' + message)


def recipes(work):
    paths = [('demo', DEMO_RECIPE)]
    for path in parity_recipes.write_recipes(os.path.join(work, 'recipes'), GENERATED):
        paths.append((os.path.basename(path).replace('.recipe.json', ''), path))
    return paths


def run_driver(command, cases, out_dir):
    """Runs one driver process over every case; returns the seconds taken."""
    os.makedirs(out_dir, exist_ok=True)
    for name in os.listdir(out_dir):
        os.remove(os.path.join(out_dir, name))
    jobs = out_dir + '.jobs'
    with open(jobs, 'w', encoding='utf-8') as f:
        for name, recipe in cases:
            f.write('%s\t%s\t%s\n' % (recipe, DEMO_CSV, os.path.join(out_dir, name)))
    started = time.monotonic()
    done = subprocess.run(command + [jobs], capture_output=True, text=True)
    if done.returncode != 0:
        fail('%s exited %d: %s' % (' '.join(command), done.returncode, done.stderr.strip()[-2000:]))
    return time.monotonic() - started


def outputs(out_dir, name):
    found = {}
    for suffix in SUFFIXES:
        path = os.path.join(out_dir, name + suffix)
        if os.path.exists(path):
            with open(path, 'rb') as f:
                found[suffix] = f.read()
    return found


def first_difference(a, b):
    at = next((i for i, (x, y) in enumerate(zip(a, b)) if x != y), min(len(a), len(b)))
    return 'first difference at byte %d: %r vs %r' % (at, a[max(0, at - 40):at + 40], b[max(0, at - 40):at + 40])


def check_coverage(cases, results, ops):
    """Steps that ran to the end, and expression words used."""
    ran, text = set(), ''
    for name, recipe in cases:
        with open(recipe, encoding='utf-8') as f:
            steps = json.load(f)['steps']
        text += ' '.join(s.get('where', '') + ' ' + s.get('expr', '') for s in steps) + ' '
        if '.csv' in results[name]:
            ran.update(s['op'] for s in steps)
    missing = [op for op in ops if op not in ran]
    if missing:
        fail('steps never run to the end by any recipe: ' + ', '.join(missing))
    unused = [w for w in parity_recipes.EXPRESSION_WORDS
              if not (re.search(r'\b%s\b' % w, text) if w[0].isalpha() else w in text)]
    if unused:
        fail('expression words no recipe uses: ' + ', '.join(unused))
    print('steps covered: %d of %d registered ops; expression words used: %d of %d' %
          (len(ops) - len(missing), len(ops), len(parity_recipes.EXPRESSION_WORDS) - len(unused),
           len(parity_recipes.EXPRESSION_WORDS)))


def registered_ops(command):
    done = subprocess.run(command + ['--ops'], capture_output=True, text=True)
    ops = done.stdout.split()
    if done.returncode != 0 or not ops:
        fail('%s --ops gave no step list: %s' % (' '.join(command), done.stderr.strip()))
    return ops


def check_wasm(native, wasm_js, node, work):
    if not (os.path.isfile(native) and os.access(native, os.X_OK)):
        fail('the native driver %s is missing: build the native tree first (./dev.sh test runs the native suite '
             'before the wasm one) and configure the wasm build with -DTAMIS_NATIVE_BUILD=<native build dir>' % native)
        return
    cases = recipes(work)
    ops = registered_ops([native])
    if registered_ops([node, wasm_js]) != ops:
        fail('the two builds register different steps')
    native_seconds = run_driver([native], cases, os.path.join(work, 'native'))
    wasm_seconds = run_driver([node, wasm_js], cases, os.path.join(work, 'wasm'))
    compared, stopped, results = 0, 0, {}
    for name, _ in cases:
        expected = outputs(os.path.join(work, 'native'), name)
        got = outputs(os.path.join(work, 'wasm'), name)
        results[name] = expected
        if sorted(expected) != sorted(got):
            fail('%s: native wrote %s, wasm wrote %s' % (name, sorted(expected), sorted(got)))
            continue
        for suffix, data in expected.items():
            compared += len(data)
            if got[suffix] != data:
                fail('%s%s differs: %s' % (name, suffix, first_difference(data, got[suffix])))
        stopped += '.error' in expected
    check_results(cases, results, ops)
    print('%d recipes (the demo and %d generated): %d ran to the end, %d stopped with the same error in both builds' %
          (len(cases), GENERATED, len(cases) - stopped, stopped))
    print('bytes compared: %d' % compared)
    print('time (informative): native %.1f s, wasm under node %.1f s' % (native_seconds, wasm_seconds))


def check_results(cases, results, ops):
    """The demo runs to the end, no generated recipe is invalid (exit 2)."""
    if '.csv' not in results.get('demo', {}):
        fail('the demo recipe did not run to the end: %r' % results.get('demo', {}).get('.error'))
    for name, found in results.items():
        if found.get('.error', b'').startswith(b'exit 2\n'):
            fail('%s is not a valid recipe: %s' % (name, found['.error'].decode('utf-8', 'replace').strip()))
    check_coverage(cases, results, ops)


def check_cli(tamis, driver, work):
    cases = recipes(work)
    run_driver([driver], cases, os.path.join(work, 'driver'))
    cli_dir = os.path.join(work, 'cli')
    os.makedirs(cli_dir, exist_ok=True)
    compared, results = 0, {}
    for name, recipe in cases:
        mine = outputs(os.path.join(work, 'driver'), name)
        results[name] = mine
        base = os.path.join(cli_dir, name)
        for suffix in SUFFIXES:
            if os.path.exists(base + suffix):
                os.remove(base + suffix)
        done = subprocess.run([tamis, 'run', recipe, DEMO_CSV, '-o', base + '.csv', '--rejects', base + '.rejects.csv',
                               '--report', base + '.report.json'], capture_output=True, text=True)
        if done.returncode != 0:
            if not mine.get('.error', b'').startswith(b'exit %d\n' % done.returncode):
                fail('%s: tamis run exited %d (%s), the driver wrote %s' %
                     (name, done.returncode, done.stderr.strip(), sorted(mine)))
            continue
        theirs = outputs(cli_dir, name)
        for suffix in ('.csv', '.rejects.csv'):
            if theirs.get(suffix) != mine.get(suffix):
                fail('%s%s: the driver and tamis run differ' % (name, suffix))
            compared += len(theirs.get(suffix, b''))
        # The report names the output file, which differs; everything else must agree.
        reports = [json.loads(found.get('.report.json', b'{}')) for found in (theirs, mine)]
        for report in reports:
            report.get('output', {}).pop('file', None)
        if reports[0] != reports[1]:
            fail('%s.report.json: the driver and tamis run differ' % name)
    check_results(cases, results, registered_ops([driver]))
    print('%d recipes; bytes compared with tamis run: %d' % (len(cases), compared))


def main():
    mode, args = sys.argv[1], sys.argv[2:]
    if mode == 'wasm':
        check_wasm(*args)
    elif mode == 'cli':
        check_cli(*args)
    else:
        sys.exit(__doc__)
    if failures:
        print('%d failures' % len(failures))
        sys.exit(1)
    print('ok')


if __name__ == '__main__':
    main()
