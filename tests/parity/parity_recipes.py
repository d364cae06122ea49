"""Generated recipes over the demo file (assets/demo/tree_survey.csv) for the
WebAssembly/native parity check: deterministic (fixed seed), valid (every
recipe compiles against the demo's columns), and together covering every
step of recipe v1 and the functions and operators of SQL expressions.

A recipe is: text steps from the shared catalogue (tests/reference/
random_steps.py, its four roles played by site, district, status and
contractor), then the demo's own typed columns read as dates and numbers,
then steps over those types (expressions, range rules, casts), and sometimes
a column step at the end.

Usage: parity_recipes.py OUT_DIR [COUNT]   writes OUT_DIR/generated_NNN.recipe.json
"""
import json
import os
import random
import sys

sys.path.insert(0, os.path.join(os.path.dirname(os.path.dirname(os.path.abspath(__file__))), 'reference'))
from random_steps import COLUMN_STEPS, NUMBER_FORMS, step_cases  # noqa: E402

SEED = 20261202
DEMO_COLUMNS = ['site', 'district', 'species', 'planted_on', 'planted_count', 'survival_pct', 'crew', 'contractor',
                'funding_k', 'status']
ROLES = ['site', 'district', 'status', 'contractor']
IN_SET = ['Established', 'Watering', 'Replaced', 'Lost', 'Pending', 'Fenmoor', 'Saltpan', 'Northwick']
# Catalogue steps that change a role column's type or add fixed column names:
# the first are left to the typed part, the others appear once per recipe.
TYPE_CHANGING = ('parse_date', 'parse_number', 'parse_number reject', 'cast', 'cast typed', 'cast decimal')
ONCE = ('split_column', 'derive_column', 'derive_column integer')
DATE_FORMATS = ['%Y-%m-%d', '%m/%d/%Y', '%m/%d/%y', '%d.%m.%Y', '%d/%m/%Y']

# Every function and operator expressions know (core/engine/expr/expr.hpp);
# the check counts which ones the generated recipes use.
EXPRESSION_WORDS = ['COALESCE', 'NULLIF', 'UPPER', 'LOWER', 'CHAR_LENGTH', 'CHARACTER_LENGTH', 'SUBSTRING', 'TRIM',
                    'ABS', 'ROUND', 'CAST', 'CASE', 'BETWEEN', 'IN', 'LIKE', 'ESCAPE', 'IS', 'NOT', 'AND', 'OR', 'DATE',
                    '||', '+', '-', '*', '/', '<>', '!=', '<=', '>=']


def parse_steps(rng):
    """(typed column or None, step): the demo's dates and numbers read with
    random valid options; None when the column stays text (on_error keep)."""
    on_error = lambda: rng.choice(['null', 'null', 'reject', 'keep'])
    date_error = on_error()
    steps = [('planted_on' if date_error != 'keep' else None,
              {'op': 'parse_date', 'column': 'planted_on', 'on_error': date_error,
               'formats': rng.sample(DATE_FORMATS, rng.randint(1, 5))})]
    for column, forms in [('planted_count', [{'group_mark': ','}, {'group_mark': ',', 'decimal_mark': '.'}, {}]),
                          ('survival_pct', [{'strip': '%'}, {'percent': True}, {'strip': '% '}]),
                          ('funding_k', NUMBER_FORMS)]:
        error = on_error()
        step = dict({'op': 'parse_number', 'column': column, 'on_error': error}, **rng.choice(forms))
        if rng.random() < 0.8:
            step['scale'] = rng.choice([0, 1, 2, 4])
        steps.append((column if error != 'keep' else None, step))
    return steps


def typed_cases(rng):
    """(columns that must be typed, step) over the demo's typed columns."""
    low = rng.randint(0, 300)
    return [
        ({'planted_count'}, {'op': 'keep_rows', 'where': rng.choice([
            'planted_count BETWEEN %d AND %d' % (low, low + rng.randint(0, 400)), 'planted_count NOT IN (0, 368, 451)',
            'planted_count * 2 - 10 >= %d OR planted_count IS NULL' % low])}),
        ({'survival_pct'}, {'op': 'drop_rows', 'where': rng.choice([
            'survival_pct < %d.5 AND survival_pct <> 50' % rng.randint(0, 90), 'ABS(survival_pct - 50) <= 10', 'survival_pct IS NULL',
            'ROUND(survival_pct, -1) = 40'])}),
        ({'planted_on'}, {'op': 'keep_rows', 'where': rng.choice([
            "planted_on >= DATE '2022-01-01'", "planted_on < '2021-06-30' OR planted_on IS NULL",
            "planted_on BETWEEN DATE '2021-03-01' AND DATE '2023-02-28'", "planted_on <> DATE '2021-12-06'"])}),
        ({'planted_count', 'survival_pct'}, {'op': 'derive_column', 'name': 'survivors', 'expr': rng.choice([
            'planted_count * survival_pct / 100', 'ROUND(planted_count * survival_pct / 100)',
            'CASE WHEN survival_pct >= 50 THEN planted_count ELSE -planted_count END',
            'COALESCE(planted_count, 0) + COALESCE(survival_pct, 0.0)'])}),
        ({'funding_k', 'planted_count'}, {'op': 'derive_column', 'name': 'funding_per_tree', 'expr': rng.choice([
            'ROUND(funding_k * 1000 / NULLIF(planted_count, 0), 2)', 'funding_k / NULLIF(planted_count, 0)',
            'CAST(funding_k AS INTEGER) + planted_count'])}),
        ({'planted_on'}, {'op': 'derive_column', 'name': 'planted_text', 'expr': rng.choice([
            "CAST(planted_on AS TEXT) || ' by ' || COALESCE(crew, '?')", "SUBSTRING(CAST(planted_on AS TEXT), 1, 4)",
            "CASE WHEN planted_on IS NULL THEN 'undated' ELSE 'dated' END"])}),
        (set(), {'op': 'derive_column', 'name': 'species_key', 'expr': rng.choice([
            "LOWER(TRIM(species))", "UPPER(SUBSTRING(species FROM 1 FOR 3)) || '-' || CAST(CHARACTER_LENGTH(crew) AS TEXT)",
            "CAST(CHAR_LENGTH(species) AS DECIMAL(6, 2)) / 3", "NOT (species LIKE '%, %') IS TRUE",
            "CASE WHEN crew != 'Ravi Shah' THEN CAST('true' AS BOOLEAN) END"])}),
        ({'planted_count'}, {'op': 'require', 'rule': 'range', 'columns': ['planted_count'], 'min': 0,
                             'max': rng.randint(300, 2000), 'on_fail': rng.choice(['warn', 'reject'])}),
        ({'planted_on'}, {'op': 'require', 'rule': 'range', 'columns': ['planted_on'], 'min': '2021-01-01',
                          'on_fail': rng.choice(['warn', 'reject'])}),
        ({'survival_pct'}, {'op': 'cast', 'column': 'survival_pct', 'to': rng.choice(['integer', 'text']),
                            'on_error': 'null'}),
        ({'planted_count'}, {'op': 'cast', 'column': 'planted_count', 'to': 'decimal', 'scale': rng.randint(0, 3),
                             'on_error': rng.choice(['null', 'reject'])}),
        (set(), {'op': 'cast', 'column': 'crew', 'to': rng.choice(['boolean', 'integer', 'date']), 'on_error': 'keep'}),
        ({'planted_on'}, {'op': 'carry_forward', 'column': 'planted_on', 'group_by': rng.sample(['site', 'crew'], 1)}),
        ({'survival_pct'}, {'op': 'fill_from_group', 'column': 'survival_pct', 'keys': ['site', 'species']}),
        (set(), {'op': 'split_column', 'column': 'species', 'separator': rng.choice([', ', ' ', '×']),
                 'into': ['genus', 'kind']}),
        (set(), {'op': 'change_case', 'columns': rng.sample(['species', 'crew', 'contractor'], 2),
                 'to': rng.choice(['lower', 'upper', 'title'])}),
        (set(), {'op': 'normalize_unicode', 'columns': ['district', 'species'], 'form': rng.choice(['NFC', 'NFKC']),
                 'strip_accents': True}),
        (set(), {'op': 'replace_text', 'columns': ['crew'], 'find': r'(\w+) (\w+)', 'replace': '$2, $1',
                 'match': 'regex'}),
        (set(), {'op': 'require', 'rule': 'pattern', 'columns': ['crew'], 'pattern': r'[A-Z][a-z]+ [A-Z][a-z]+',
                 'on_fail': rng.choice(['warn', 'reject'])}),
        (set(), {'op': 'deduplicate', 'columns': ['site', 'crew'], 'compare': rng.choice(['exact', 'trimmed', 'casefold']),
                 'keep': rng.choice(['first', 'last'])}),
    ]


def on_fail_for(step, rng):
    """Catalogue require steps stop by default; most generated ones warn or
    reject instead, so the run goes on and the output can be compared."""
    if step['op'] == 'require' and 'on_fail' not in step:
        choices = ['warn', 'stop'] if step['rule'] == 'row_count' else ['warn', 'reject', 'reject', 'stop']
        step = dict(step, on_fail=rng.choice(choices))
    return step


def generated_recipe(rng, number):
    catalogue = step_cases(rng, ROLES, IN_SET)
    text = [c for c in catalogue if c[0] not in COLUMN_STEPS and c[0] not in TYPE_CHANGING]
    steps, used_once = [], set()
    for _ in range(rng.randint(1, 4)):
        name, step = rng.choice(text)
        if name in ONCE and name in used_once:
            continue
        used_once.add(name)
        steps.append(on_fail_for(step, rng))
    typed = set()
    for column, step in parse_steps(rng):
        if rng.random() < 0.8:
            steps.append(step)
            if column:
                typed.add(column)
    usable = [step for needs, step in typed_cases(rng) if needs <= typed]
    names = set()
    for step in rng.sample(usable, min(len(usable), rng.randint(1, 4))):
        if step.get('name') in names or step['op'] == 'split_column' and 'split_column' in used_once:
            continue
        names.add(step.get('name'))
        steps.append(step)
    if rng.random() < 0.25:
        steps.append(rng.choice([c for c in catalogue if c[0] in COLUMN_STEPS])[1])
    return {'tamis_recipe': 1, 'title': 'parity recipe %d' % number,
            'input': {'format': 'csv', 'delimiter': ',', 'header': True, 'encoding': 'utf-8',
                      'columns': [{'name': c, 'type': 'text'} for c in DEMO_COLUMNS],
                      # every rejected row is compared, so none stops the run
                      'max_rejects': '100%'},
            'steps': steps,
            'output': {'format': rng.choice(['csv', 'csv', 'tsv']), 'null': rng.choice(['', 'NULL', '\u2400']),
                       'date_format': rng.choice(['%Y-%m-%d', '%d.%m.%Y', '%m/%d/%y'])}}


def write_recipes(out_dir, count):
    """Writes the recipes and returns their paths."""
    rng = random.Random(SEED)
    os.makedirs(out_dir, exist_ok=True)
    paths = []
    for n in range(count):
        path = os.path.join(out_dir, 'generated_%03d.recipe.json' % n)
        with open(path, 'w', encoding='utf-8') as f:
            json.dump(generated_recipe(rng, n), f, ensure_ascii=False, indent=1)
            f.write('\n')
        paths.append(path)
    return paths


if __name__ == '__main__':
    for p in write_recipes(sys.argv[1], int(sys.argv[2]) if len(sys.argv) > 2 else 100):
        print(p)
