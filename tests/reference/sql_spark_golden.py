#!/usr/bin/python3
"""`tamis sql --dialect spark`: the script for every step that Spark SQL can
express, compared byte for byte with golden files in tests/golden/spark/.

No Spark engine is available on this machine (none is packaged in Debian or
npm), so these golden files were reviewed by hand against the Spark SQL
reference (TRIM(BOTH chars FROM x) removes a set of characters, regexp_replace
and regexp_extract use Java regular expressions with \\x{h..h} escapes,
ROW_NUMBER/COUNT/MIN/MAX windows, <=>, raise_error, \\uXXXX and \\\\ escapes in
literals, backquoted identifiers). A change to the export shows up here as a
diff to review again; `--update` rewrites the files after such a review.
Steps Spark cannot express exactly must be refused with the documented message.

Usage: sql_spark_golden.py TAMIS_BINARY [--update]
"""
import json
import os
import re
import subprocess
import sys
import tempfile

TAMIS = sys.argv[1]
UPDATE = '--update' in sys.argv[2:]
HERE = os.path.dirname(os.path.abspath(__file__))
GOLDEN = os.path.join(os.path.dirname(HERE), 'golden', 'spark')
COLUMNS = ['site', 'district', 'note']

EXPORTED = {
    'trim': {'op': 'trim', 'columns': '*', 'note': 'white space at both ends'},
    'trim_chars': {'op': 'trim', 'columns': ['district'], 'side': 'trailing', 'chars': ".'\\\u00a0"},
    'collapse_spaces': {'op': 'collapse_spaces', 'columns': ['site']},
    'replace_text': {'op': 'replace_text', 'columns': ['note'], 'find': "it's", 'replace': 'it is'},
    'replace_text_entire': {'op': 'replace_text', 'columns': ['note'], 'find': 'n/a', 'replace': '', 'match': 'entire'},
    'map_values': {'op': 'map_values', 'column': 'district', 'map': {'Rivie\u0300re': 'Rivière', 'Fenmore': 'Fenmoor'}},
    'to_null': {'op': 'to_null', 'columns': '*', 'values': ['N/A', '-'], 'blank': True},
    'deduplicate': {'op': 'deduplicate', 'columns': ['site', 'district'], 'keep': 'last', 'compare': 'trimmed'},
    'fill_from_group': {'op': 'fill_from_group', 'column': 'district', 'keys': ['site']},
    'carry_forward': {'op': 'carry_forward', 'column': 'note', 'group_by': ['site']},
    'require': {'op': 'require', 'rule': 'in_set', 'columns': ['district'], 'values': ['Fenmoor', 'Rivière']},
    'require_unique': {'op': 'require', 'rule': 'unique', 'columns': ['site', 'note']},
    'keep_rows': {'op': 'keep_rows', 'where': "site IS NOT NULL AND district IN ('Fenmoor', 'it''s')"},
    'drop_rows': {'op': 'drop_rows', 'where': "note = 'void'"},
    'derive_column': {'op': 'derive_column', 'name': 'label', 'expr': "CASE WHEN note IS NULL THEN site ELSE site || ': ' || note END"},
    'cast': {'op': 'cast', 'column': 'note', 'to': 'text'},
    'drop_columns': {'op': 'drop_columns', 'columns': ['note']},
    'rename_columns': {'op': 'rename_columns', 'map': {'site': 'site `name`'}},
    'reorder_columns': {'op': 'reorder_columns', 'columns': ['note']},
    'map_values_ignore_case': {'op': 'map_values', 'column': 'district', 'ignore_case': True,
                               'map': {'Straße': 'Street', 'fenmore': 'Fenmoor'}},
    'parse_date': {'op': 'parse_date', 'column': 'note', 'formats': ['%Y-%m-%d', '%d.%m.%y']},
    'parse_date_keep': {'op': 'parse_date', 'column': 'note', 'formats': ['%m/%d/%Y'], 'on_error': 'keep'},
    'parse_number': {'op': 'parse_number', 'column': 'note', 'scale': 1, 'decimal_mark': ',', 'group_mark': '.',
                     'strip': '\u00a0', 'percent': True},
    'parse_number_reject': {'op': 'parse_number', 'column': 'note', 'scale': 0, 'on_error': 'reject'},
    'split_column': {'op': 'split_column', 'column': 'site', 'separator': ' ', 'into': ['a', 'b', 'c']},
    'cast_integer': {'op': 'cast', 'column': 'note', 'to': 'integer', 'on_error': 'keep'},
    'cast_boolean': {'op': 'cast', 'column': 'note', 'to': 'boolean', 'on_error': 'reject'},
    'cast_date': {'op': 'cast', 'column': 'note', 'to': 'date'},
}
REFUSED = {
    'normalize_unicode': {'op': 'normalize_unicode', 'columns': ['site'], 'form': 'NFC'},
    'parse_number_data_scale': {'op': 'parse_number', 'column': 'note'},
    'replace_text_regex': {'op': 'replace_text', 'columns': ['site'], 'find': 'a+', 'replace': 'b', 'match': 'regex'},
    'change_case': {'op': 'change_case', 'columns': ['site'], 'to': 'upper'},
}


def export(step, work):
    recipe = {'tamis_recipe': 1, 'title': 'Spark golden: ' + step['op'],
              'input': {'columns': [{'name': c, 'type': 'text'} for c in COLUMNS]}, 'steps': [step]}
    path = os.path.join(work, 'recipe.json')
    with open(path, 'w', encoding='utf-8') as f:
        json.dump(recipe, f, ensure_ascii=False)
    return subprocess.run([TAMIS, 'sql', path, '--dialect', 'spark'], capture_output=True, text=True)


def main():
    failures = []
    work = tempfile.mkdtemp(prefix='tamis-spark-')
    for name, step in EXPORTED.items():
        p = export(step, work)
        golden = os.path.join(GOLDEN, name + '.sql')
        if p.returncode != 0:
            failures.append('%s: exit %d: %s' % (name, p.returncode, p.stderr.strip()))
            continue
        if UPDATE:
            with open(golden, 'w', encoding='utf-8', newline='') as f:
                f.write(p.stdout)
            continue
        if not os.path.exists(golden):
            failures.append('%s: no golden file %s' % (name, golden))
            continue
        with open(golden, encoding='utf-8', newline='') as f:
            if f.read() != p.stdout:
                failures.append('%s: the script differs from %s (review it, then --update)' % (name, golden))
    for name, step in REFUSED.items():
        p = export(step, work)
        if p.returncode != 2 or not re.search(
                r'step 1: error: \(%s\) (cannot be exported to spark: |can be exported to spark only approximately)'
                % step['op'], p.stderr):
            failures.append('%s: expected the documented refusal, got exit %d: %s' % (name, p.returncode, p.stderr))
    for f in failures:
        print('FAIL: ' + f)
    if failures:
        sys.exit(1)
    print('ok: %d golden scripts, %d refusals' % (len(EXPORTED), len(REFUSED)))


if __name__ == '__main__':
    main()
