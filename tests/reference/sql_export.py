#!/usr/bin/python3
"""`tamis sql` differential: the exported script, run on real engines, must
give the table `tamis run` gives, cell for cell, NULLs included.

Engines (outside references): SQLite (Python's sqlite3), DuckDB (npm
@duckdb/node-api, tests/reference/package-lock.json), PostgreSQL 15 (Debian
postgresql) and MariaDB 10.11 (Debian mariadb-server), both servers started
here on a Unix socket in a temporary directory and stopped afterwards, even on
failure. Recipes: one or more per step, the demo recipe, and 200 generated
random recipes over generated messy tables. A recipe a dialect cannot express
exactly must be refused with the documented message (exit 2, "step N: (op)
cannot be exported to D" or "can be exported to D only approximately");
anything exported must match. A recipe whose require step fails in
`tamis run` (exit 1), or that stops it with rejected rows beyond
input.max_rejects or an expression error (exit 3), must make the script fail
on the engine too.

The demo recipe runs on the demo file, loaded by each dialect's own load
statements (--load-script). An exact dialect must match cell for cell; where
a step is only approximate (normalize_unicode on MariaDB and SQLite: no
normalization in SQL) it is exported with --allow-approximate, and only the
columns of the steps under a WARNING comment may differ: the differing cells
are counted and printed, and any other difference, row count included, fails
the test; a dialect that refuses a step of the demo fails it too.

Usage: sql_export.py TAMIS_BINARY [--random N]   (N generated recipes, default 200;
fewer only while developing: the test registered in CTest uses the default)
"""
import csv
import datetime
import decimal
import io
import json
import os
import random
import re
import shutil
import subprocess
import sys
import tempfile
import time

import sqlite3

from random_steps import COLUMN_STEPS, NUMBER_FORMS, step_cases

TAMIS = sys.argv[1]
RANDOM_RECIPES = int(sys.argv[sys.argv.index('--random') + 1]) if '--random' in sys.argv else 200
HERE = os.path.dirname(os.path.abspath(__file__))
ROOT = os.path.dirname(os.path.dirname(HERE))
NULL = '\u2400'  # SYMBOL FOR NULL: the output null marker; generated data never holds it
DIALECTS = ['sqlite', 'duckdb', 'postgres', 'mysql']
REFUSAL = re.compile(r'step (\d+): error: \((\w+)\) (cannot be exported to (\w+): |can be exported to (\w+) only approximately)')
failures = []


def fail(message):
    failures.append(message)
    print('FAIL: ' + message)


# ---------------------------------------------------------------- data
COLUMNS = ['site', 'district', 'code', 'note']
# Numbers for parse_number and cast: signs, group and decimal marks,
# percentages, the 64-bit limits (-2^63 and 2^63 - 1), more digits than fit,
# halves to round away from zero, group marks in and out of place, halves at
# the 64-bit limits after rounding.
NUMBER_PIECES = [
    '12.5%', '%7', '1%%', '-0.04', '+.5', '5.', '.', '1 234,5', "1'234.56", '1,2345', '12,345,678.9', ',123',
    '99999999999999999999', '9223372036854775807', '-9223372036854775808', '922337203685477580.75',
    '0.05', '-0.05', '2.5', '-2.5', ' 42 ', '\u00a042', '1e3', '-1.5E-1', '007', '0.000000000000000000001',
    '1,234,567', '1.234,56', '1,23', '1,234,', '0,000,001', '+-5', '$1,234.50', '50%', '1 000 000',
    '9223372036854775807.5', '-9223372036854775807.5', '-9223372036854775808.5', '-0.005', '999999999999999999.995']
PIECES = ['Oak', 'oak', 'OAK', ' Oak', 'Oak ', '\u00a0Oak', 'Oak\t', 'Ash  Row', 'Ash \u2003\u2003Row', 'Ash Row',
          'N/A', '-', '', ' ', '\u3000', '\t \n', 'Rivière', 'Rivie\u0300re', 'STRASSE', 'straße', "it's",
          'back\\slash', 'x;y', 'say "hi"', 'Ümlaut', 'élan', 'Élan', 'Σίσυφος', 'a.', 'a..', '.a.', 'Fen\u2028moor',
          '1,240', '30,0', 'Z', 'a', 'A',
          # dates for parse_date: leap days, impossible dates, two-digit years,
          # widths the scanner refuses, a trailing line break
          '2021-12-06', '2024-02-29', '2023-02-29', '2/29/2024', '12/31/99', '1/5/68', '1/5/2023', '2023-13-01',
          '2021-1-5', '02021-01-05', '2021-12-06\n', '31.12.2020', '7.4.1999', '0999-01-02', '13/01/2024',
          # compatibility characters for NFKC: a ligature, a circled digit, a full-width sign, Hangul jamo
          '\ufb01ne \u2460', '\uff04 5', '\u1100\u1161\u11a8'] + NUMBER_PIECES + [
          # booleans and ISO dates for cast
          'TRUE', ' false ', 'Unknown', 'tRuE', 'yes', '2024-3-9', ' 2024-03-09 ', '2024-02-30',
          # case folding: sharp s, the Kelvin sign, a long s, a dotted capital I, final sigma
          'OAK', 'STRAẞE', 'strasse', '\u212aale', 'Kale', '\u017fite', 'S\u0130TE', 'ΣΊΣΥΦΟΣ']


def messy_table(rng, rows):
    table = []
    for _ in range(rows):
        if table and rng.random() < 0.2:
            table.append(list(rng.choice(table)))  # an exact duplicate
            continue
        table.append([rng.choice(PIECES) for _ in COLUMNS])
    return table


def write_csv(path, header, rows):
    with open(path, 'w', newline='', encoding='utf-8') as f:
        w = csv.writer(f, lineterminator='\n')
        w.writerow(header)
        w.writerows(rows)


# ---------------------------------------------------------------- steps
# Steps whose export each dialect must accept (exact in every dialect
# listed): the test fails if one of them is refused.
MUST_EXPORT = {
    'trim both': DIALECTS, 'trim leading': DIALECTS, 'trim trailing chars': DIALECTS,
    'normalize_unicode NFC': ['duckdb', 'postgres'],
    'normalize_unicode NFKC': ['postgres'],
    'replace_text literal': DIALECTS, 'replace_text entire': DIALECTS, 'map_values': DIALECTS, 'to_null': DIALECTS,
    'deduplicate exact': DIALECTS, 'deduplicate trimmed': DIALECTS, 'fill_from_group': DIALECTS,
    'carry_forward': DIALECTS, 'require not_null': DIALECTS, 'require unique': DIALECTS, 'require in_set': DIALECTS,
    'require row_count': DIALECTS, 'drop_columns': DIALECTS, 'rename_columns': DIALECTS, 'reorder_columns': DIALECTS,
    'keep_rows': DIALECTS, 'drop_rows': DIALECTS, 'derive_column': DIALECTS, 'cast text': DIALECTS,
    'derive_column integer': ['duckdb', 'postgres', 'mysql'], 'parse_date': DIALECTS,
    'map_values ignore_case': DIALECTS, 'parse_number': DIALECTS,
    'parse_number reject': DIALECTS, 'split_column': DIALECTS,
    'collapse_spaces': DIALECTS, 'cast date': DIALECTS,
    'trailing characters before a final line break': DIALECTS,
    'decimals grouped': DIALECTS, 'integers grouped': DIALECTS, 'decimals compared': ['duckdb', 'postgres', 'mysql'],
}
# Steps each dialect listed must refuse without --allow-approximate: SQLite
# holds a decimal as its text and compares it as REAL.
MUST_REFUSE = {'decimals compared': ['sqlite']}


# Besides the catalogue's number forms: a strip list with more characters
# than SQLite nests REPLACE calls in one expression (the export spreads them
# over stages), and currency signs with group marks.
MORE_NUMBER_FORMS = [{'strip': '$', 'group_mark': ','},
                     {'strip': '$€£¥\u00a0 abcdefghijklmnopqrstuvwxyz', 'decimal_mark': ','}]


def number_forms(rng, cols):
    """(name, steps, rows): parse_number in every number form, each form at
    two of the scale and on_error pairs below in turn, over a table whose
    code column holds every number piece."""
    code = cols[2]
    pairs = [(0, 'null'), (0, 'keep'), (1, 'keep'), (2, 'null'), (18, 'keep'), (18, 'null'), (2, 'keep'), (1, 'null')]
    cases = []
    for k, form in enumerate(NUMBER_FORMS + MORE_NUMBER_FORMS):
        for scale, on_error in (pairs[2 * k % len(pairs)], pairs[(2 * k + 1) % len(pairs)]):
            step = dict({'op': 'parse_number', 'column': code, 'scale': scale, 'on_error': on_error}, **form)
            rows = [[rng.choice(PIECES) if c != code else piece for c in cols] for piece in NUMBER_PIECES]
            cases.append(('parse_number', [step], rows))
    return cases


def number_readers(cols):
    """(name, steps): steps that read the numbers parse_number made, by
    equality (grouping, deduplication, filling) and by comparison."""
    site, district, code, note = cols
    decimals = {'op': 'parse_number', 'column': code, 'group_mark': ',', 'scale': 1}
    return [
        ('decimals grouped', [decimals, {'op': 'deduplicate', 'columns': [code, site]},
                              {'op': 'fill_from_group', 'column': note, 'keys': [code]},
                              {'op': 'drop_rows', 'where': f'{code} IS NULL AND {site} IS NULL'}]),
        ('integers grouped', [dict(decimals, scale=0, on_error='null'),
                              {'op': 'carry_forward', 'column': note, 'group_by': [code]},
                              {'op': 'fill_from_group', 'column': code, 'keys': [site]}]),
        ('decimals compared', [decimals, {'op': 'keep_rows', 'where': f'{code} > 3 OR {code} IS NULL'}]),
    ]


def line_break_ends(rng, cols):
    """(name, steps, rows): trailing characters trimmed from values that end
    in a line break, which they must keep (PCRE's $ also matches before a
    final line break)."""
    site, district = cols[:2]
    steps = [{'op': 'trim', 'columns': [site], 'side': 'trailing', 'chars': '.'},
             {'op': 'derive_column', 'name': 'trimmed', 'expr': f'TRIM({district})'}]
    ends = ['a.\n', 'a..\n', 'a.\n.', '.\n', 'b \n', ' \n', '\t \n', 'b \n ', 'c\r\n', 'c.\r\n']
    return [('trailing characters before a final line break', steps,
             [[end, other] + [rng.choice(PIECES) for _ in cols[2:]] for end in ends for other in ends[::-1]])]


def recipe_of(steps):
    return {'tamis_recipe': 1, 'title': 'sql export differential',
            'input': {'format': 'csv', 'delimiter': ',', 'header': True, 'encoding': 'utf-8',
                      'columns': [{'name': c, 'type': 'text'} for c in COLUMNS]},
            'steps': steps, 'output': {'format': 'csv', 'null': NULL, 'date_format': '%Y-%m-%d'}}


# ---------------------------------------------------------------- tamis
def tamis_run(work, recipe_path, csv_path):
    out = os.path.join(work, 'out.csv')
    p = subprocess.run([TAMIS, 'run', recipe_path, csv_path, '-o', out], capture_output=True, text=True)
    if p.returncode == 1:
        return 'require failed', None
    if p.returncode == 3 and ('rows rejected' in p.stderr or 'row rejected' in p.stderr or 'in the row from line' in p.stderr):
        return 'stopped', p.stderr  # rejected rows beyond input.max_rejects, or an expression error on a value
    if p.returncode == 2:
        return 'invalid', p.stderr  # a generated recipe can be invalid (e.g. cast of a date to integer)
    if p.returncode != 0:
        return 'error', p.stderr
    with open(out, newline='', encoding='utf-8') as f:
        rows = list(csv.reader(f))
    return rows[0], [[None if v == NULL else v for v in r] for r in rows[1:]]


def tamis_sql(recipe_path, dialect):
    p = subprocess.run([TAMIS, 'sql', recipe_path, '--dialect', dialect], capture_output=True, text=True)
    return p.returncode, p.stdout, p.stderr


# ---------------------------------------------------------------- engines
def statements_of(script):
    body = '\n'.join(l for l in script.split('\n') if not l.startswith('--'))
    return [s.strip() for s in body.split(';\n') if s.strip()]


def sql_text(value):
    return "'" + value.replace("'", "''") + "'"


def raw_table_sql(dialect, rows):
    q = (lambda n: '`' + n + '`') if dialect == 'mysql' else (lambda n: '"' + n + '"')
    text = 'LONGTEXT' if dialect == 'mysql' else 'TEXT'
    create = ('CREATE TABLE tamis_raw (' + ', '.join(q(c) + ' ' + text for c in COLUMNS) + ', tamis_line BIGINT)' +
              (' CHARACTER SET utf8mb4 COLLATE utf8mb4_bin' if dialect == 'mysql' else ''))
    return create, q


def decode(v):
    if isinstance(v, (bytes, bytearray)):
        return bytes(v).decode('utf-8')
    return v


def run_sqlite(rows, script, query):
    con = sqlite3.connect(':memory:')
    try:
        create, _ = raw_table_sql('sqlite', rows)
        con.execute(create)
        con.executemany('INSERT INTO tamis_raw VALUES (?, ?, ?, ?, ?)', [r + [i + 2] for i, r in enumerate(rows)])
        con.executescript(script)
        return [list(r) for r in con.execute(query)]
    except sqlite3.Error as e:
        return 'error: ' + str(e)
    finally:
        con.close()


class Postgres:
    def __init__(self, base):
        import psycopg2
        self.psycopg2 = psycopg2
        self.data = os.path.join(base, 'pgdata')
        self.socket = os.path.join(base, 'pgsock')
        for d in (self.data, self.socket):
            os.makedirs(d)
            shutil.chown(d, 'postgres', 'postgres')
        bin_dir = '/usr/lib/postgresql/15/bin/'
        self.pg_ctl = bin_dir + 'pg_ctl'
        subprocess.run(['runuser', '-u', 'postgres', '--', bin_dir + 'initdb', '-D', self.data, '-E', 'UTF8',
                        '--locale=C.UTF-8', '-A', 'trust'], check=True, capture_output=True)
        subprocess.run(['runuser', '-u', 'postgres', '--', self.pg_ctl, '-D', self.data, '-w', '-l',
                        os.path.join(self.socket, 'server.log'), '-o',
                        "-k " + self.socket + " -c listen_addresses=''", 'start'], check=True, capture_output=True)
        self.started = True
        self.con = psycopg2.connect(host=self.socket, user='postgres', dbname='postgres')
        self.con.autocommit = True

    def run(self, rows, script, query):
        cur = self.con.cursor()
        try:
            cur.execute('DROP TABLE IF EXISTS tamis_raw')
            create, _ = raw_table_sql('postgres', rows)
            cur.execute(create)
            cur.executemany('INSERT INTO tamis_raw VALUES (%s, %s, %s, %s, %s)', [r + [i + 2] for i, r in enumerate(rows)])
            cur.execute(script)
            cur.execute(query)
            return [list(r) for r in cur.fetchall()]
        except self.psycopg2.Error as e:
            return 'error: ' + str(e).strip()
        finally:
            cur.close()

    def run_loading(self, script, query):
        """Runs a script that loads its own raw table (COPY, read by the server)."""
        cur = self.con.cursor()
        try:
            cur.execute(script)
            cur.execute(query)
            return [list(r) for r in cur.fetchall()]
        except self.psycopg2.Error as e:
            return 'error: ' + str(e).strip()
        finally:
            cur.close()

    def stop(self):
        try:
            self.con.close()
        except Exception:
            pass
        subprocess.run(['runuser', '-u', 'postgres', '--', self.pg_ctl, '-D', self.data, '-m', 'fast', '-w', 'stop'],
                       capture_output=True)


class MariaDB:
    def __init__(self, base):
        import pymysql
        self.pymysql = pymysql
        self.data = os.path.join(base, 'mariadata')
        self.socket = os.path.join(base, 'mariasock', 'mysqld.sock')
        os.makedirs(self.data)
        os.makedirs(os.path.dirname(self.socket))
        for d in (self.data, os.path.dirname(self.socket)):
            shutil.chown(d, 'mysql', 'mysql')
        subprocess.run(['mariadb-install-db', '--no-defaults', '--user=mysql', '--datadir=' + self.data,
                        '--auth-root-authentication-method=normal', '--skip-test-db'], check=True, capture_output=True)
        self.process = subprocess.Popen(['mariadbd', '--no-defaults', '--user=mysql', '--datadir=' + self.data,
                                         '--socket=' + self.socket, '--skip-networking',
                                         '--pid-file=' + os.path.join(os.path.dirname(self.socket), 'mariadb.pid'),
                                         '--log-error=' + os.path.join(os.path.dirname(self.socket), 'mariadb.err')],
                                        stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL)
        deadline = time.monotonic() + 120  # a wait for the server, not a timing assertion
        while True:
            try:
                self.con = pymysql.connect(unix_socket=self.socket, user='root', password='', charset='utf8mb4',
                                           autocommit=True)
                break
            except pymysql.err.OperationalError:
                if time.monotonic() > deadline or self.process.poll() is not None:
                    raise
                time.sleep(0.3)
        cur = self.con.cursor()
        cur.execute('CREATE DATABASE tamis_test CHARACTER SET utf8mb4 COLLATE utf8mb4_bin')
        cur.execute('USE tamis_test')

    def run(self, rows, script, query):
        cur = self.con.cursor()
        try:
            cur.execute('DROP TABLE IF EXISTS tamis_raw')
            create, _ = raw_table_sql('mysql', rows)
            cur.execute(create)
            cur.executemany('INSERT INTO tamis_raw VALUES (%s, %s, %s, %s, %s)', [r + [i + 2] for i, r in enumerate(rows)])
            for statement in statements_of(script):
                cur.execute(statement)
            cur.execute(query)
            return [[decode(v) for v in r] for r in cur.fetchall()]
        except self.pymysql.Error as e:
            return 'error: ' + str(e)
        finally:
            cur.close()

    def run_loading(self, script, query):
        """Runs a script that loads its own raw table (LOAD DATA LOCAL INFILE)."""
        con = self.pymysql.connect(unix_socket=self.socket, user='root', password='', charset='utf8mb4',
                                   autocommit=True, local_infile=True, database='tamis_test')
        cur = con.cursor()
        try:
            for statement in statements_of(script):
                cur.execute(statement)
            cur.execute(query)
            return [[decode(v) for v in r] for r in cur.fetchall()]
        except self.pymysql.Error as e:
            return 'error: ' + str(e)
        finally:
            con.close()

    def stop(self):
        try:
            self.con.close()
        except Exception:
            pass
        self.process.terminate()
        try:
            self.process.wait(120)
        except subprocess.TimeoutExpired:
            self.process.kill()


def run_sqlite_shell(work, script, query):
    """Runs a script with the sqlite3 shell (its .import loads the raw table)."""
    db = os.path.join(work, 'load.sqlite')
    if os.path.exists(db):
        os.remove(db)
    p = subprocess.run(['sqlite3', '-bail', db], input=script, capture_output=True, text=True)
    if p.returncode != 0 or p.stderr.strip():
        return 'error: ' + p.stderr
    con = sqlite3.connect(db)
    try:
        return [list(r) for r in con.execute(query)]
    finally:
        con.close()


def compare_loaded(work, servers, cases, counts):
    """Each case (label, recipe, header, rows) as a CSV file loaded by each
    dialect's own load statements; every result must equal `tamis run`."""
    duck_cases, duck_labels = [], []
    for n, (label, recipe, header, rows) in enumerate(cases):
        recipe_path = os.path.join(work, 'load_recipe.json')
        csv_path = os.path.join(work, 'load_%d.csv' % n)
        with open(recipe_path, 'w', encoding='utf-8') as f:
            json.dump(recipe, f, ensure_ascii=False)
        write_csv(csv_path, header, rows)
        os.chmod(csv_path, 0o644)  # the PostgreSQL server reads it as user postgres
        expected = tamis_run(work, recipe_path, csv_path)
        query = 'SELECT ' + ', '.join('"%s"' % c for c in header) + ' FROM tamis_clean ORDER BY tamis_line'
        for dialect in DIALECTS:
            p = subprocess.run([TAMIS, 'sql', recipe_path, '--dialect', dialect, '--load-script', csv_path],
                               capture_output=True, text=True)
            where = '%s on %s' % (label, dialect)
            if p.returncode != 0:
                fail(where + ': tamis sql exit %d: %s' % (p.returncode, p.stderr.strip()))
                continue
            counts[dialect]['loaded'] += 1
            if dialect == 'sqlite':
                compare(where, expected, run_sqlite_shell(work, p.stdout, query))
            elif dialect == 'duckdb':
                duck_cases.append({'statements': statements_of(p.stdout), 'query': query})
                duck_labels.append((where, expected))
            elif dialect == 'postgres' and 'postgres' in servers:
                compare(where, expected, servers['postgres'].run_loading(p.stdout, query))
            elif dialect == 'mysql' and 'mysql' in servers:
                compare(where, expected, servers['mysql'].run_loading(p.stdout, query.replace('"', '`')))
    for (where, expected), got in zip(duck_labels, duckdb_batch(duck_cases)):
        if got is not None:
            compare(where, expected, got)


def check_load_scripts(work, servers, rng, counts):
    """--load-script: each dialect's own statements load the CSV file (quoted
    fields with commas, quotes and line breaks, empty fields) into the raw
    table, and the script's result equals `tamis run` on that file."""
    steps = [{'op': 'trim', 'columns': '*'}, {'op': 'to_null', 'columns': ['note'], 'values': ['N/A'], 'blank': True},
             {'op': 'deduplicate', 'columns': ['site'], 'keep': 'last'}]
    compare_loaded(work, servers, [('load script %d' % n, recipe_of(steps[:n % 3 + 1]), COLUMNS, messy_table(rng, 50))
                                   for n in range(6)], counts)
    p = subprocess.run([TAMIS, 'sql', os.path.join(work, 'load_recipe.json'), '--dialect', 'spark', '--load-script',
                        'x.csv'], capture_output=True, text=True)
    if p.returncode != 2 or 'Spark SQL has no statement' not in p.stderr:
        fail('--load-script for spark: expected the documented refusal, got exit %d: %s' % (p.returncode, p.stderr))


# Input columns named like the helper columns steps add beside them (in any
# ASCII case, as SQLite and MySQL compare names): the helpers must take other
# names, and every result must still equal `tamis run`.
HELPER_COLUMNS = ['tamis_folded_1_0', 'TAMIS_INNER_0', 'tamis_copy', 'tamis_run']


def check_helper_names(work, servers, rng, counts):
    a, b, c, d = HELPER_COLUMNS
    steps = [{'op': 'collapse_spaces', 'columns': [a, b]},
             {'op': 'map_values', 'column': a, 'ignore_case': True, 'map': {'straße': 'Street', 'oak': 'Oak'}},
             {'op': 'deduplicate', 'columns': [a, c], 'keep': 'last'},
             {'op': 'carry_forward', 'column': d, 'group_by': [c]},
             {'op': 'fill_from_group', 'column': b, 'keys': [a]}]
    cases = []
    for n, step in enumerate(steps):
        recipe = recipe_of([step])
        recipe['input']['columns'] = [{'name': name, 'type': 'text'} for name in HELPER_COLUMNS]
        cases.append(('helper names %d (%s)' % (n, step['op']), recipe, HELPER_COLUMNS, messy_table(rng, 50)))
    compare_loaded(work, servers, cases, counts)


WARNING = re.compile(r'^-- Step (\d+) \((\w+)\):.*\n(?:-- Note:.*\n)?-- WARNING: approximate', re.M)


def step_columns(step, all_columns):
    """The columns a step writes, as the recipe names them."""
    if 'columns' in step:
        return list(all_columns) if step['columns'] == '*' else list(step['columns'])
    return [step['column']]


def compare_approximate(label, expected, got, loose_columns):
    """Cells of the columns of approximate steps may differ (they are counted
    and reported); anything else must match, row count included."""
    header, want = expected
    if isinstance(got, str):
        fail(label + ': the script failed: ' + got[:400])
        return
    got = [canonical(r) for r in got]
    if len(got) != len(want):
        fail('%s: %d rows, tamis run gave %d' % (label, len(got), len(want)))
        return
    loose = [i for i, name in enumerate(header) if name in loose_columns]
    differing = 0
    for n, (g, w) in enumerate(zip(got, want)):
        for i, (gv, wv) in enumerate(zip(g, w)):
            if gv == wv:
                continue
            if i not in loose:
                fail('%s: row %d, column %s differs outside the approximate steps: engine %r, tamis run %r' %
                     (label, n + 1, header[i], gv, wv))
                return
            differing += 1
    print('%s: %d rows equal tamis run; %d cells differ, all in the columns of approximate steps (%s)' %
          (label, len(want), differing, ', '.join(sorted(loose_columns)) or 'none'))


def check_demo(work, servers):
    """The demo recipe on the demo file, loaded by each dialect's own load
    statements: exact dialects must give `tamis run` cell for cell; a dialect
    that can only approximate a step is exported with --allow-approximate and
    may differ only in the columns of those steps."""
    demo = os.path.join(ROOT, 'assets', 'demo', 'tree_survey.recipe.json')
    csv_path = os.path.join(work, 'tree_survey.csv')
    shutil.copy(os.path.join(ROOT, 'assets', 'demo', 'tree_survey.csv'), csv_path)
    os.chmod(csv_path, 0o644)  # the PostgreSQL server reads it as user postgres
    with open(demo, encoding='utf-8') as f:
        recipe = json.load(f)
    # The same recipe writing NULL as a marker the data never holds, so NULL and '' stay apart.
    recipe['output']['null'] = NULL
    demo = os.path.join(work, 'tree_survey.recipe.json')
    with open(demo, 'w', encoding='utf-8') as f:
        json.dump(recipe, f, ensure_ascii=False)
    expected = tamis_run(work, demo, csv_path)
    if expected[1] is None or isinstance(expected[1], str):
        fail('demo recipe: tamis run failed: %r' % (expected,))
        return
    header = expected[0]
    input_columns = [c['name'] for c in recipe['input']['columns']]
    for dialect in DIALECTS + ['spark']:
        command = [TAMIS, 'sql', demo, '--dialect', dialect]
        if dialect != 'spark':
            command += ['--load-script', csv_path]
        p = subprocess.run(command, capture_output=True, text=True)
        approximate = p.returncode == 2 and 'only approximately' in p.stderr
        if approximate:
            p = subprocess.run(command + ['--allow-approximate'], capture_output=True, text=True)
        where = 'demo recipe on %s' % dialect
        if p.returncode != 0:
            fail(where + ': tamis sql exit %d: %s' % (p.returncode, p.stderr.strip()))
            continue
        loose = set()
        for m in WARNING.finditer(p.stdout):
            step = recipe['steps'][int(m.group(1)) - 1]
            loose.update(step_columns(step, input_columns))
        if approximate and not loose:
            fail(where + ': refused as approximate, but no step carries the WARNING comment')
        if dialect == 'spark':
            print(where + ': exported%s (no Spark engine here)' % (' with --allow-approximate' if approximate else ''))
            continue
        quote = (lambda n: '`' + n + '`') if dialect == 'mysql' else (lambda n: '"' + n + '"')
        if dialect == 'duckdb':
            query = 'SELECT ' + ', '.join('CAST(%s AS VARCHAR)' % quote(n) for n in header)
        else:
            query = 'SELECT ' + ', '.join(quote(n) for n in header)
        query += ' FROM tamis_clean ORDER BY tamis_line'
        if dialect == 'sqlite':
            got = run_sqlite_shell(work, p.stdout, query)
        elif dialect == 'duckdb':
            got = duckdb_batch([{'statements': statements_of(p.stdout), 'query': query}])[0]
            if got is None:
                continue
        elif dialect in servers:
            got = servers[dialect].run_loading(p.stdout, query)
        else:
            continue
        compare_approximate(where, expected, got, loose)


def duckdb_batch(cases):
    modules = os.path.join(HERE, 'node_modules', '@duckdb', 'node-api')
    if not os.path.isdir(modules):
        fail('DuckDB is missing: run `npm ci` in tests/reference (package-lock.json) first')
        return [None] * len(cases)
    p = subprocess.run(['node', os.path.join(HERE, 'sql_duckdb_runner.js')], input=json.dumps(cases),
                       capture_output=True, text=True, cwd=HERE)
    if p.returncode != 0:
        fail('DuckDB runner failed: ' + p.stderr[-2000:])
        return [None] * len(cases)
    return [r['rows'] if 'rows' in r else 'error: ' + r['error'] for r in json.loads(p.stdout)]


def duckdb_case(rows, script, query):
    create, _ = raw_table_sql('duckdb', rows)
    inserts = ['INSERT INTO tamis_raw VALUES ' + ', '.join(
        '(' + ', '.join(sql_text(v) for v in r) + ', ' + str(i + 2) + ')' for i, r in enumerate(rows))]
    return {'statements': [create] + (inserts if rows else []) + statements_of(script), 'query': query}


# ---------------------------------------------------------------- comparing
def canonical_value(v):
    # The canonical texts of design §3: integers as str(), decimals in plain
    # notation at their scale (Decimal's str() would write 0E-8), booleans
    # true/false, dates in ISO 8601.
    if v is None or isinstance(v, str):
        return v
    if isinstance(v, bool):
        return 'true' if v else 'false'
    if isinstance(v, decimal.Decimal):
        return format(v, 'f')
    if isinstance(v, datetime.date):
        return v.isoformat()
    return str(v)


def canonical(row):
    return [canonical_value(v) for v in row]


def compare(label, expected, got):
    header, want = expected
    if not isinstance(got, str):
        got = [canonical(r) for r in got]
    if header in ('require failed', 'stopped'):
        if not (isinstance(got, str) and got.startswith('error')):
            fail(label + ': tamis run stopped (%s), the script did not fail' % header)
        return
    if isinstance(got, str):
        fail(label + ': the script failed: ' + got[:400])
        return
    if len(got) != len(want):
        fail('%s: %d rows, tamis run gave %d' % (label, len(got), len(want)))
        return
    for i, (g, w) in enumerate(zip(got, want)):
        if g != w:
            fail('%s: row %d differs: engine %r, tamis run %r' % (label, i + 1, g, w))
            return


def main():
    rng = random.Random(20261202)
    work = tempfile.mkdtemp(prefix='tamis-sql-')
    os.chmod(work, 0o755)
    servers = {}
    counts = {d: {'compared': 0, 'refused': 0, 'loaded': 0} for d in DIALECTS}
    timings = {}
    try:
        t = time.monotonic()
        try:
            servers['postgres'] = Postgres(work)
        except Exception as e:  # reported, and fails the test below
            fail('PostgreSQL 15 could not start: %r' % (e,))
        try:
            servers['mysql'] = MariaDB(work)
        except Exception as e:
            fail('MariaDB could not start: %r' % (e,))
        timings['server start'] = time.monotonic() - t

        cases = []  # (label, recipe, rows)
        for name, step in step_cases(rng, COLUMNS, PIECES[:20]):
            cases.append(('step ' + name, recipe_of([dict(step, note="checks '" + name + "'")]),
                          messy_table(rng, 40), name))
        for name, steps, rows in line_break_ends(rng, COLUMNS) + number_forms(rng, COLUMNS):
            cases.append(('steps %s %s' % (name, json.dumps(steps[0], ensure_ascii=False)), recipe_of(steps), rows, name))
        for name, steps in number_readers(COLUMNS):
            cases.append(('steps ' + name, recipe_of(steps), messy_table(rng, 40), name))
        for n in range(RANDOM_RECIPES):
            catalogue = step_cases(rng, COLUMNS, PIECES[:20])
            row_steps = [c for c in catalogue if c[0] not in COLUMN_STEPS]
            picked = [rng.choice(row_steps)[1] for _ in range(rng.randint(1, 5))]
            if rng.random() < 0.2:
                picked.append(rng.choice([c for c in catalogue if c[0] in COLUMN_STEPS])[1])
            cases.append(('random recipe %d' % n, recipe_of(picked), messy_table(rng, rng.randint(0, 60)), None))

        duck_cases, duck_labels = [], []
        t = time.monotonic()
        for label, recipe, rows, must_name in cases:
            recipe_path = os.path.join(work, 'recipe.json')
            csv_path = os.path.join(work, 'in.csv')
            with open(recipe_path, 'w', encoding='utf-8') as f:
                json.dump(recipe, f, ensure_ascii=False)
            write_csv(csv_path, COLUMNS, rows)
            expected = tamis_run(work, recipe_path, csv_path)
            if expected[0] == 'invalid':
                continue
            if expected[0] == 'error':
                fail(label + ': tamis run failed: ' + expected[1])
                continue
            for dialect in DIALECTS:
                rc, script, err = tamis_sql(recipe_path, dialect)
                where = '%s on %s' % (label, dialect)
                if rc == 2:
                    m = REFUSAL.search(err)
                    if not m or dialect not in (m.group(4), m.group(5)):
                        fail(where + ': exit 2 without the documented refusal: ' + err.strip())
                    elif must_name and dialect in MUST_EXPORT.get(must_name, []):
                        fail(where + ': refused, though the step is exact there: ' + err.strip())
                    counts[dialect]['refused'] += 1
                    continue
                if rc == 0 and must_name and dialect in MUST_REFUSE.get(must_name, []):
                    fail(where + ': exported, though the step is only approximate there')
                    continue
                if rc != 0:
                    fail(where + ': tamis sql exit %d: %s' % (rc, err.strip()))
                    continue
                header = expected[0] if expected[0] not in ('require failed', 'stopped') else None
                names = header or [c['name'] for c in recipe['input']['columns']]
                quote = (lambda n: '`' + n.replace('`', '``') + '`') if dialect == 'mysql' else \
                        (lambda n: '"' + n.replace('"', '""') + '"')
                query = 'SELECT ' + ', '.join(quote(n) for n in names) + ' FROM tamis_clean ORDER BY tamis_line'
                if header is None:
                    query = 'SELECT 1'
                elif dialect == 'duckdb':  # every value as DuckDB's own text of it
                    query = 'SELECT ' + ', '.join('CAST(%s AS VARCHAR)' % quote(n) for n in names) + \
                            ' FROM tamis_clean ORDER BY tamis_line'
                counts[dialect]['compared'] += 1
                if dialect == 'sqlite':
                    compare(where, expected, run_sqlite(rows, script, query))
                elif dialect == 'duckdb':
                    duck_cases.append(duckdb_case(rows, script, query))
                    duck_labels.append((where, expected))
                elif dialect in servers:
                    compare(where, expected, servers[dialect].run(rows, script, query))
        for (where, expected), got in zip(duck_labels, duckdb_batch(duck_cases)):
            if got is not None:
                compare(where, expected, got)
        timings['differential (%d recipes x 4 engines)' % len(cases)] = time.monotonic() - t

        t = time.monotonic()
        check_load_scripts(work, servers, rng, counts)
        check_helper_names(work, servers, rng, counts)
        timings['load scripts'] = time.monotonic() - t

        t = time.monotonic()
        check_demo(work, servers)
        timings['demo recipe'] = time.monotonic() - t
    finally:
        t = time.monotonic()
        for server in servers.values():
            server.stop()
        timings['server stop'] = time.monotonic() - t
        shutil.rmtree(work, ignore_errors=True)

    for d in DIALECTS:
        print('%-8s compared %4d recipes, refused %4d, %d load scripts' %
              (d, counts[d]['compared'], counts[d]['refused'], counts[d]['loaded']))
        if RANDOM_RECIPES >= 200 and counts[d]['compared'] < 50:
            fail('%s: only %d recipes compared' % (d, counts[d]['compared']))
    for k, v in timings.items():
        print('time, %s: %.1f s' % (k, v))  # informative only, never asserted
    if failures:
        print('%d failures' % len(failures))
        sys.exit(1)
    print('ok')


if __name__ == '__main__':
    main()
