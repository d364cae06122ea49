"""A catalogue of recipe steps with random valid parameters, shared by the
generated-recipe tests: the SQL export differential (sql_export.py) and the
WebAssembly/native parity check (tests/parity/parity_recipes.py).

step_cases(rng, columns, in_set_values) returns (name, step) pairs, one per
kind of step and option the recipe format has. `columns` names four text
columns by role: two keys (site, district), a code (cast, dropped) and a note
(filled from groups, carried forward). Expressions name them unquoted, so
they must be plain SQL identifiers.
"""

NUMBER_FORMS = [{}, {'group_mark': ','}, {'decimal_mark': ',', 'group_mark': '.'}, {'decimal_mark': ',', 'group_mark': ' '},
                {'group_mark': "'"}, {'strip': '%'}, {'percent': True}, {'strip': '\u00a0 ', 'percent': True}]

# Column steps change names, so generated recipes put them last only.
COLUMN_STEPS = ('drop_columns', 'rename_columns', 'reorder_columns')


def step_cases(rng, cols, in_set_values):
    """(name, step) pairs; every step kind the recipe format has."""
    site, district, code, note = cols
    some = lambda: rng.sample(cols, rng.randint(1, 3))
    return [
        ('trim both', {'op': 'trim', 'columns': '*'}),
        ('trim leading', {'op': 'trim', 'columns': some(), 'side': 'leading'}),
        ('trim trailing chars', {'op': 'trim', 'columns': some(), 'side': 'trailing', 'chars': '.\u00a0\''}),
        ('collapse_spaces', {'op': 'collapse_spaces', 'columns': some()}),
        ('change_case upper', {'op': 'change_case', 'columns': some(), 'to': 'upper'}),
        ('change_case title', {'op': 'change_case', 'columns': some(), 'to': 'title'}),
        ('normalize_unicode NFC', {'op': 'normalize_unicode', 'columns': some(), 'form': 'NFC'}),
        ('normalize_unicode NFKC', {'op': 'normalize_unicode', 'columns': some(), 'form': 'NFKC'}),
        ('replace_text literal', {'op': 'replace_text', 'columns': some(), 'find': rng.choice(['a', ',', "'", '\\', 'Oak']),
                                  'replace': rng.choice(['', '.', "''", 'Ö'])}),
        ('replace_text entire', {'op': 'replace_text', 'columns': some(), 'find': rng.choice(['Oak', '', 'N/A']),
                                 'replace': 'Eiche', 'match': 'entire'}),
        ('replace_text regex', {'op': 'replace_text', 'columns': some(), 'find': 'a+', 'replace': 'b', 'match': 'regex'}),
        ('map_values', {'op': 'map_values', 'column': rng.choice(cols),
                        'map': {'oak': 'Oak', 'OAK': 'Oak', 'Rivie\u0300re': 'Rivière', 'Oak ': 'Oak', 'a': 'A'}}),
        ('map_values ignore_case', {'op': 'map_values', 'column': rng.choice(cols), 'ignore_case': True,
                                    'map': rng.choice([{'oak': 'Oak'}, {'Straße': 'Street', 'kale': 'Kale', 'SITE': 'site'},
                                                       {'σίσυφος': 'Sisyphus', 'rivière': 'Rivière', 'élan': 'Elan'}])}),
        ('to_null', {'op': 'to_null', 'columns': some(), 'values': rng.sample(['N/A', '-', 'Oak', "it's"], 2),
                     'blank': rng.random() < 0.7}),
        ('deduplicate exact', {'op': 'deduplicate', 'columns': rng.choice(['*', some()]), 'keep': rng.choice(['first', 'last'])}),
        ('deduplicate trimmed', {'op': 'deduplicate', 'columns': some(), 'keep': rng.choice(['first', 'last']),
                                 'compare': 'trimmed'}),
        ('deduplicate casefold', {'op': 'deduplicate', 'columns': some(), 'compare': 'casefold'}),
        ('fill_from_group', {'op': 'fill_from_group', 'column': note, 'keys': rng.sample(cols[:3], rng.randint(1, 2))}),
        ('carry_forward', {'op': 'carry_forward', 'column': note, 'group_by': rng.sample(cols[:3], rng.randint(0, 1))}),
        ('require not_null', {'op': 'require', 'rule': 'not_null', 'columns': some()}),
        ('require unique', {'op': 'require', 'rule': 'unique', 'columns': some()}),
        ('require in_set', {'op': 'require', 'rule': 'in_set', 'columns': [rng.choice(cols)], 'values': in_set_values}),
        ('require row_count', {'op': 'require', 'rule': 'row_count', 'min': rng.randint(1, 50)}),
        ('require pattern', {'op': 'require', 'rule': 'pattern', 'columns': some(), 'pattern': '.*'}),
        ('keep_rows', {'op': 'keep_rows', 'where': rng.choice([
            f'{site} IS NOT NULL', f"{site} < {district} OR {note} IN ('a', 'Z', 'Oak ')", f"NOT ({code} BETWEEN 'A' AND 'a')",
            f"{site} <> 'Oak' AND ({note} IS NULL OR {note} > 'N')",
            # LIKE (% and _ over code points, case-sensitive, ESCAPE), CHAR_LENGTH, IS [NOT] TRUE
            f"{site} LIKE 'O%'", f"{site} NOT LIKE '%a_'", f"{note} LIKE '%!%%' ESCAPE '!'", f"{district} LIKE '_'",
            f"{code} LIKE '%[*?]%' OR {site} LIKE '% %'", f"CHAR_LENGTH({site}) > 3", f"({site} = 'Oak') IS NOT TRUE",
            f"({note} < 'b') IS FALSE"])}),
        ('drop_rows', {'op': 'drop_rows', 'where': rng.choice([
            f"{site} = 'Oak'", f"{district} NOT IN ('Oak', 'it''s')", f"NULLIF({site}, 'Oak') IS NULL",
            f"CASE {site} WHEN 'Oak' THEN TRUE WHEN 'A' THEN NULL ELSE FALSE END"])}),
        ('derive_column', {'op': 'derive_column', 'name': 'both', 'expr': rng.choice([
            f"{site} || {district}", f"CASE WHEN {site} = 'Oak' THEN 'tree' ELSE COALESCE({note}, 'none') END",
            f"NULLIF({site}, '') || '|' || COALESCE({code}, '')",
            # SUBSTRING from a literal start of at least 1, TRIM with literal character sets
            f"SUBSTRING({site} FROM 2 FOR 3)", f"SUBSTRING({district}, 1, 2) || '|' || SUBSTRING({note} FROM 3)",
            f"TRIM({site})", f"TRIM(BOTH '.' FROM {site})", f"TRIM(LEADING 'aO ' FROM {district})", f"TRIM(TRAILING '' FROM {note})"])}),
        ('derive_column integer', {'op': 'derive_column', 'name': 'n', 'expr': rng.choice([
            '2 * 3 - 10', f'ABS(CHAR_LENGTH({site}) - 5)', f'ROUND(CHAR_LENGTH({note}), 2) * 2'])}),
        ('cast text', {'op': 'cast', 'column': code, 'to': 'text'}),
        ('split_column', {'op': 'split_column', 'column': rng.choice(cols), 'separator': rng.choice([' ', ',', 'a', 'Ash ', '\u2003']),
                          'into': ['first', 'second', 'rest'][:rng.randint(2, 3)]}),
        ('parse_date', {'op': 'parse_date', 'column': rng.choice(cols), 'on_error': rng.choice(['null', 'keep']),
                        'formats': rng.sample(['%Y-%m-%d', '%m/%d/%Y', '%m/%d/%y', '%d.%m.%Y', '%d/%m/%Y'],
                                              rng.randint(1, 4))}),
        ('parse_number', dict({'op': 'parse_number', 'column': rng.choice(cols), 'scale': rng.choice([0, 1, 2, 18]),
                               'on_error': rng.choice(['null', 'keep'])}, **rng.choice(NUMBER_FORMS))),
        ('parse_number reject', {'op': 'parse_number', 'column': rng.choice(cols), 'scale': 1, 'on_error': 'reject'}),
        ('cast', {'op': 'cast', 'column': code, 'to': 'integer', 'on_error': 'null'}),
        ('cast typed', {'op': 'cast', 'column': rng.choice(cols), 'on_error': rng.choice(['null', 'keep']),
                        'to': rng.choice(['integer', 'date', 'boolean'])}),
        ('cast date', {'op': 'cast', 'column': rng.choice(cols), 'to': 'date', 'on_error': rng.choice(['null', 'keep'])}),
        ('cast decimal', {'op': 'cast', 'column': rng.choice(cols), 'to': 'decimal', 'scale': rng.choice([0, 2]),
                          'on_error': 'null'}),
        ('drop_columns', {'op': 'drop_columns', 'columns': [code]}),
        ('rename_columns', {'op': 'rename_columns', 'map': {site: 'Site name', note: 'it\'s "quoted"'}}),
        ('reorder_columns', {'op': 'reorder_columns', 'columns': [note, site]}),
    ]
