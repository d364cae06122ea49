#!/usr/bin/python3
"""Benchmark of `tamis sql` (issue 5): the demo recipe on a 1,000,000-row
demo-shaped file, as `tamis run` and as the script exported for each engine,
with loading and cleaning timed apart. Not a test (CTest never runs it): it
prints a table of figures and checks that each engine's cleaned table has
the row count of `tamis run`.

The file comes from the demo generator (assets/demo/generate.py --rows N),
cached under TAMIS_BENCH_CACHE like the other benchmarks, because the demo
recipe reads the tree survey's columns (the shared bench file of
/work/shared/bench has other columns). Engines: SQLite (the sqlite3 shell,
Debian sqlite3), PostgreSQL 15 and MariaDB (Debian postgresql,
mariadb-server; started here on Unix sockets through the classes of
tests/reference/sql_export.py), DuckDB (npm @duckdb/node-api from
tests/reference/package-lock.json). A dialect that refuses a step is timed on
the steps before it, and the table says so.

Usage: sql_bench.py [TAMIS_BINARY]   (default build/native/cli/tamis)
Environment: TAMIS_BENCH_CACHE, TAMIS_BENCH_ROWS (default 1000000).
"""
import hashlib
import json
import os
import re
import shutil
import sqlite3
import subprocess
import sys
import tempfile
import time

HERE = os.path.dirname(os.path.abspath(__file__))
ROOT = os.path.dirname(os.path.dirname(HERE))
sys.path.insert(0, os.path.join(ROOT, 'tests', 'reference'))
TAMIS = sys.argv[1] if len(sys.argv) > 1 else os.path.join(ROOT, 'build', 'native', 'cli', 'tamis')
sys.argv[1:] = [TAMIS]  # sql_export reads the binary from argv[1]
import sql_export  # noqa: E402  (the server classes and the DuckDB runner)

ROWS = int(os.environ.get('TAMIS_BENCH_ROWS', '1000000'))
CACHE = os.environ.get('TAMIS_BENCH_CACHE', os.path.join(os.environ.get('XDG_CACHE_HOME', os.path.expanduser('~/.cache')),
                                                         'tamis-bench'))
RECIPE = os.path.join(ROOT, 'assets', 'demo', 'tree_survey.recipe.json')
REFUSAL = re.compile(r'step (\d+): error: \((\w+)\) cannot be exported')
STAGING = '-- Staging copy of the raw table.'


def demo_file():
    generator = os.path.join(ROOT, 'assets', 'demo', 'generate.py')
    with open(generator, 'rb') as f:
        digest = hashlib.sha256(f.read()).hexdigest()[:12]
    folder = os.path.join(CACHE, 'tree_survey_%d_%s' % (ROWS, digest))
    path = os.path.join(folder, 'tree_survey.csv')
    if not os.path.exists(path):
        print('generating %d demo rows into %s' % (ROWS, folder), file=sys.stderr)
        os.makedirs(folder, exist_ok=True)
        subprocess.run(['/usr/bin/python3', generator, '--rows', str(ROWS), '--out-dir', folder], check=True)
    return path


def export(work, recipe, dialect, csv_path):
    """The script for the dialect, cut before the first step it refuses:
    (load part, cleaning part, note)."""
    path = os.path.join(work, 'recipe.json')
    note = 'all %d steps' % len(recipe['steps'])
    while True:
        with open(path, 'w', encoding='utf-8') as f:
            json.dump(recipe, f, ensure_ascii=False)
        command = [TAMIS, 'sql', path, '--dialect', dialect, '--load-script', csv_path, '--allow-approximate']
        p = subprocess.run(command, capture_output=True, text=True)
        m = REFUSAL.search(p.stderr)
        if p.returncode == 2 and m:
            k = int(m.group(1))
            recipe = dict(recipe, steps=recipe['steps'][:k - 1])
            note = 'steps 1-%d only: step %d (%s) is refused' % (k - 1, k, m.group(2))
            continue
        if p.returncode != 0:
            raise SystemExit('tamis sql --dialect %s: %s' % (dialect, p.stderr))
        if ' WARNING: approximate' in p.stdout:
            note += ', approximate steps included'
        # The settings before the load statements (MySQL's SET NAMES and
        # sql_mode) go with both parts, which may run on separate connections.
        settings, rest = p.stdout.split('-- Load ', 1)
        load, clean = rest.split(STAGING, 1)
        return settings + '-- Load ' + load, settings + STAGING + clean, note


def timed(action):
    start = time.monotonic()
    result = action()
    return time.monotonic() - start, result


def main():
    csv_path = demo_file()
    work = tempfile.mkdtemp(prefix='tamis-sql-bench-')
    os.chmod(work, 0o755)
    local_csv = os.path.join(work, 'tree_survey.csv')
    shutil.copy(csv_path, local_csv)
    os.chmod(local_csv, 0o644)  # the PostgreSQL server reads it as user postgres
    with open(RECIPE, encoding='utf-8') as f:
        recipe = json.load(f)
    results = []
    out = os.path.join(work, 'out.csv')
    seconds, p = timed(lambda: subprocess.run([TAMIS, 'run', RECIPE, local_csv, '-o', out], capture_output=True, text=True))
    if p.returncode != 0:
        raise SystemExit('tamis run: ' + p.stderr)
    with open(out, 'rb') as f:
        tamis_rows = sum(1 for _ in sql_export.csv.reader(line.decode() for line in f)) - 1
    results.append(('tamis run', None, seconds, tamis_rows, 'all %d steps (reads, cleans and writes the file)' % len(recipe['steps'])))

    servers = {}
    try:
        for dialect in ['sqlite', 'duckdb', 'postgres', 'mysql']:
            load, clean, note = export(work, recipe, dialect, local_csv)
            count = 'SELECT COUNT(*) FROM tamis_clean'
            if dialect == 'sqlite':
                db = os.path.join(work, 'bench.sqlite')
                load_s, _ = timed(lambda: subprocess.run(['sqlite3', '-bail', db], input=load, text=True, check=True))
                clean_s, _ = timed(lambda: subprocess.run(['sqlite3', '-bail', db], input=clean, text=True, check=True))
                con = sqlite3.connect(db)
                rows = con.execute(count).fetchone()[0]
                con.close()
            elif dialect == 'duckdb':
                runner = [{'statements': sql_export.statements_of(load), 'query': 'SELECT 1'},
                          {'statements': sql_export.statements_of(load) + sql_export.statements_of(clean),
                           'query': 'SELECT CAST(COUNT(*) AS VARCHAR) FROM tamis_clean'}]
                load_s, _ = timed(lambda: sql_export.duckdb_batch(runner[:1]))
                both_s, got = timed(lambda: sql_export.duckdb_batch(runner[1:]))
                clean_s = both_s - load_s  # each case has a fresh database: the second loads again
                rows = int(got[0][0][0]) if isinstance(got[0], list) else got[0]
            else:
                if dialect not in servers:
                    servers[dialect] = (sql_export.Postgres if dialect == 'postgres' else sql_export.MariaDB)(work)
                server = servers[dialect]
                load_s, got = timed(lambda: server.run_loading(load, 'SELECT 1'))
                if isinstance(got, str):
                    raise SystemExit('%s load: %s' % (dialect, got))
                clean_s, got = timed(lambda: server.run_loading(clean, count))
                rows = got if isinstance(got, str) else got[0][0]
            results.append((dialect, load_s, clean_s, rows, note))
            print('%s: load %.1f s, cleaning %.1f s, %s rows (%s)' % (dialect, load_s, clean_s, rows, note), flush=True)
    finally:
        for server in servers.values():
            server.stop()
        shutil.rmtree(work, ignore_errors=True)

    print('\n%d rows, demo recipe (%s)\n' % (ROWS, RECIPE))
    print('| engine | load (s) | cleaning (s) | rows out | what ran |')
    print('|---|---|---|---|---|')
    for engine, load_s, clean_s, rows, note in results:
        print('| %s | %s | %.1f | %s | %s |' % (engine, '-' if load_s is None else '%.1f' % load_s, clean_s, rows, note))
    for engine, _, _, rows, note in results[1:]:
        if note.startswith('all') and str(rows) != str(tamis_rows):
            print('MISMATCH: %s gave %s rows, tamis run %d' % (engine, rows, tamis_rows))


if __name__ == '__main__':
    main()
