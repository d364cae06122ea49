#!/usr/bin/python3
"""Writes the table "which step exports exactly, approximately or not at all
to which SQL dialect" from the code itself: it asks `tamis sql` to export one
recipe per step variant to every dialect and records what it answers (the
script, the refusal "only approximately", or the refusal "cannot be
exported" with its reason). Nothing here restates a step's support by hand.

Usage: docs/sql_capabilities.py TAMIS_BINARY > docs/sql_capabilities.md
"""
import json
import os
import re
import subprocess
import sys
import tempfile

TAMIS = sys.argv[1]
DIALECTS = ['postgres', 'mysql', 'sqlite', 'duckdb', 'spark']
COLUMNS = ['site', 'note']

# One recipe step per variant whose support can differ (the parameters that
# change a step's SQL); every op of the recipe format appears at least once.
# A list of steps is a recipe whose last step is the variant (it reads a
# column an earlier step typed).
VARIANTS = [
    ('trim', {'op': 'trim', 'columns': '*'}),
    ('trim with chars', {'op': 'trim', 'columns': ['site'], 'chars': '.', 'side': 'trailing'}),
    ('collapse_spaces', {'op': 'collapse_spaces', 'columns': ['site']}),
    ('change_case upper/lower/title', {'op': 'change_case', 'columns': ['site'], 'to': 'upper'}),
    ('normalize_unicode NFC', {'op': 'normalize_unicode', 'columns': ['site'], 'form': 'NFC'}),
    ('normalize_unicode NFKC', {'op': 'normalize_unicode', 'columns': ['site'], 'form': 'NFKC'}),
    ('normalize_unicode strip_accents', {'op': 'normalize_unicode', 'columns': ['site'], 'strip_accents': True}),
    ('replace_text literal', {'op': 'replace_text', 'columns': ['site'], 'find': 'a', 'replace': 'b'}),
    ('replace_text entire', {'op': 'replace_text', 'columns': ['site'], 'find': 'a', 'replace': 'b', 'match': 'entire'}),
    ('replace_text regex', {'op': 'replace_text', 'columns': ['site'], 'find': 'a+', 'replace': 'b', 'match': 'regex'}),
    ('map_values', {'op': 'map_values', 'column': 'site', 'map': {'a': 'b'}}),
    ('map_values ignore_case', {'op': 'map_values', 'column': 'site', 'map': {'Straße': 'b'}, 'ignore_case': True}),
    ('to_null', {'op': 'to_null', 'columns': ['site'], 'values': ['-'], 'blank': True}),
    ('parse_date (on_error null/keep)', {'op': 'parse_date', 'column': 'site', 'formats': ['%Y-%m-%d', '%m/%d/%y']}),
    ('parse_date on_error reject', {'op': 'parse_date', 'column': 'site', 'formats': ['%d.%m.%Y'], 'on_error': 'reject'}),
    ('parse_number with scale', {'op': 'parse_number', 'column': 'site', 'scale': 2, 'group_mark': ',', 'percent': True}),
    ('parse_number without scale', {'op': 'parse_number', 'column': 'site'}),
    ('cast to text', {'op': 'cast', 'column': 'site', 'to': 'text'}),
    ('cast text to integer', {'op': 'cast', 'column': 'site', 'to': 'integer'}),
    ('cast text to decimal', {'op': 'cast', 'column': 'site', 'to': 'decimal', 'scale': 2}),
    ('cast text to date', {'op': 'cast', 'column': 'site', 'to': 'date'}),
    ('cast text to boolean', {'op': 'cast', 'column': 'site', 'to': 'boolean'}),
    ('fill_from_group', {'op': 'fill_from_group', 'column': 'note', 'keys': ['site']}),
    ('carry_forward', {'op': 'carry_forward', 'column': 'note', 'group_by': ['site']}),
    ('deduplicate exact/trimmed', {'op': 'deduplicate', 'columns': '*', 'compare': 'trimmed'}),
    ('deduplicate casefold', {'op': 'deduplicate', 'columns': '*', 'compare': 'casefold'}),
    ('keep_rows / drop_rows (comparisons, IN, CASE, COALESCE)',
     {'op': 'keep_rows', 'where': "site IN ('a', 'b') AND COALESCE(note, '') <> 'x'"}),
    ('derive_column text', {'op': 'derive_column', 'name': 'n', 'expr': "site || '-' || note"}),
    ('derive_column integer arithmetic', {'op': 'derive_column', 'name': 'n', 'expr': '2 * 3 - 1'}),
    ('derive_column decimal division', {'op': 'derive_column', 'name': 'n', 'expr': '7 / 2'}),
    ('derive_column UPPER/LOWER', {'op': 'derive_column', 'name': 'n', 'expr': 'UPPER(site)'}),
    ('keep_rows comparing decimals (after parse_number)',
     [{'op': 'parse_number', 'column': 'site', 'scale': 2}, {'op': 'keep_rows', 'where': 'site > 3 OR site IS NULL'}]),
    ('keep_rows LIKE', {'op': 'keep_rows', 'where': "site LIKE 'a%' OR note NOT LIKE '_!%' ESCAPE '!'"}),
    ('keep_rows IS [NOT] TRUE / FALSE', {'op': 'keep_rows', 'where': "(site = 'a') IS NOT TRUE"}),
    ('derive_column SUBSTRING', {'op': 'derive_column', 'name': 'n', 'expr': 'SUBSTRING(site FROM 2 FOR 3)'}),
    ('derive_column TRIM', {'op': 'derive_column', 'name': 'n', 'expr': "TRIM(BOTH '.' FROM site)"}),
    ('derive_column CHAR_LENGTH', {'op': 'derive_column', 'name': 'n', 'expr': 'CHAR_LENGTH(site)'}),
    ('derive_column CAST', {'op': 'derive_column', 'name': 'n', 'expr': 'CAST(site AS INTEGER)'}),
    ('derive_column ABS / ROUND of integers', {'op': 'derive_column', 'name': 'n',
                                               'expr': 'ROUND(ABS(CHAR_LENGTH(site) - 5), 1)'}),
    ('derive_column ABS / ROUND of decimals', {'op': 'derive_column', 'name': 'n', 'expr': 'ROUND(ABS(-2.55), 1)'}),
    ('split_column', {'op': 'split_column', 'column': 'site', 'separator': ' ', 'into': ['a', 'b']}),
    ('require not_null/unique/in_set/row_count stop', {'op': 'require', 'rule': 'not_null', 'columns': ['site']}),
    ('require on_fail warn', {'op': 'require', 'rule': 'not_null', 'columns': ['site'], 'on_fail': 'warn'}),
    ('require pattern', {'op': 'require', 'rule': 'pattern', 'columns': ['site'], 'pattern': '[a-z]+'}),
    ('drop_columns / rename_columns / reorder_columns', {'op': 'drop_columns', 'columns': ['note']}),
]

CANNOT = re.compile(r'cannot be exported to \w+: (.*)')


def answer(work, step, dialect):
    recipe = {'tamis_recipe': 1, 'input': {'columns': [{'name': c, 'type': 'text'} for c in COLUMNS]},
              'steps': step if isinstance(step, list) else [step]}
    path = os.path.join(work, 'recipe.json')
    with open(path, 'w', encoding='utf-8') as f:
        json.dump(recipe, f, ensure_ascii=False)
    p = subprocess.run([TAMIS, 'sql', path, '--dialect', dialect], capture_output=True, text=True)
    if p.returncode == 0:
        return 'exact'
    if 'only approximately' in p.stderr:
        return 'approximate'
    m = CANNOT.search(p.stderr)
    if p.returncode == 2 and m:
        reason = m.group(1).strip()
        return 'no' if reason.startswith('no %s SQL gives' % dialect) else 'no (%s)' % reason
    raise SystemExit('unexpected answer for %r on %s: exit %d: %s' % (step, dialect, p.returncode, p.stderr))


def main():
    work = tempfile.mkdtemp(prefix='tamis-capabilities-')
    print('# SQL export: what each dialect gets\n')
    print('Generated by `docs/sql_capabilities.py` from `tamis sql` itself; do not edit by hand.')
    print('exact: the script gives `tamis run`\'s table cell for cell; approximate: only with '
          '`--allow-approximate`, under a WARNING comment; no: refused with a message naming the step.\n')
    print('| step | ' + ' | '.join(DIALECTS) + ' |')
    print('|---|' + '---|' * len(DIALECTS))
    for name, step in VARIANTS:
        print('| %s | %s |' % (name, ' | '.join(answer(work, step, d) for d in DIALECTS)))
    os.remove(os.path.join(work, 'recipe.json'))
    os.rmdir(work)


if __name__ == '__main__':
    main()
