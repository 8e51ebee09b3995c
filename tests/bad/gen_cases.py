#!/usr/bin/python3
"""gen_cases.py - writes the malformed campaigns of tests/bad/ and their expected lines.

Each case is one edit of a good campaign (BASE) or a whole text.  The edit
carries the marker @@ exactly where the error must be reported; the marker is
removed and its line:column (1-based, column in bytes) goes into NAME.expect
together with the field path and the start of the message.  NAME.expect holds
a Python regex for the stderr line `haloledger: FILE:LINE:COL: FIELD: message`.
Cases in NEEDS_MODELS are refused by the chemistry (SMILES, formula, reagent
fit), not by the reader; their messages belong to those modules, so only the
position and field are pinned.  Run: /usr/bin/python3 tests/bad/gen_cases.py
"""
import datetime
import os
import re
import sys

HERE = os.path.dirname(os.path.abspath(__file__))

BASE = '''{
  "format": "haloledger-campaign/1",
  "title": "Line 2, March chlorinations",
  "site": "Eastfield works",
  "issued": "2027-02-20",
  "model": {"overhalogenation_factor": 1.0},
  "scrubbers": [
    {"id": "VS-1", "liquor": "naoh", "naoh_wt_pct": 18, "liquor_kg": 6000,
     "min_naoh_wt_pct": 2, "rated_acid_kmol_h": 2.0}
  ],
  "stock": [
    {"reagent": "Cl2", "on_hand_kg": 450, "safety_kg": 300, "lead_days": 10}
  ],
  "containers": [
    {"reagent": "Cl2", "name": "ton container", "net_kg": 907, "heel_kg": 9}
  ],
  "runs": [
    {"id": "C-101", "start": "2027-03-02T06:00", "reactor": "R-3", "scrubber": "VS-1",
     "substrate": {"name": "2-methylpropane", "smiles": "CC(C)C"},
     "substrate_kg": 800, "reagent": "Cl2", "reagent_eq": 0.6,
     "halogen_conversion": 0.97, "temp_c": 40, "feed_h": 5, "reactor_mode": "batch",
     "repeat": {"count": 4, "every_days": 2}},
    {"id": "B-7", "start": "2027-03-20", "reactor": "R-4", "scrubber": "VS-1",
     "substrate": {"name": "toluene", "smiles": "Cc1ccccc1"},
     "substrate_kg": 300, "reagent": "Br2", "reagent_kg": 250, "temp_c": 80}
  ]
}
'''

# One run, for the chemistry cases: runs[0] starts on line 4.
SMALL = '''{
  "format": "haloledger-campaign/1",
  "runs": [
    {"id": "X-1", "start": "2027-03-02", "reagent": "Cl2", "reagent_eq": 1,
     "substrate": {"smiles": "CCC"}, "substrate_kg": 100}
  ]
}
'''

RUN0 = '{"id": "C-101"'
RUN1 = '{"id": "B-7"'
STOCK_BLOCK = '''"stock": [
    {"reagent": "Cl2", "on_hand_kg": 450, "safety_kg": 300, "lead_days": 10}
  ],'''
RUNS_BLOCK = BASE[BASE.index('"runs": ['):BASE.rindex(']') + 1]
RUN1_BLOCK = BASE[BASE.index(RUN1):BASE.index('"temp_c": 80}') + len('"temp_c": 80}')]

# Cases kept as files in tests/bad/ and written by hand, not by this script.
HAND_WRITTEN = {'report_min_fraction_one'}
CASES = []      # (name, bytes with @@, field (or re:regex), message start (literal) or re:regex)
NEEDS_MODELS = []


def edit(name, old, new, field, msg, base=BASE):
    assert base.count(old) == 1, (name, old)
    CASES.append((name, base.replace(old, new).encode(), field, msg))


def whole(name, text, field, msg):
    CASES.append((name, text if isinstance(text, bytes) else text.encode(), field, msg))


def bedit(name, old, new, field, msg):
    """Edit in bytes (invalid UTF-8 cases)."""
    b = BASE.encode()
    assert b.count(old) == 1, name
    CASES.append((name, b.replace(old, new), field, msg))


# --- syntax ---
edit('syntax_missing_comma', '"site": "Eastfield works",\n  "issued"', '"site": "Eastfield works"\n  @@"issued"',
     'site', "expected ',' or '}', found '\"'")
edit('syntax_missing_colon', '"title": "Line', '"title" @@"Line', 'title', "expected ':' after the key")
edit('syntax_trailing_comma_object', '"rated_acid_kmol_h": 2.0}', '"rated_acid_kmol_h": 2.0,@@}',
     'scrubbers[0].rated_acid_kmol_h', "trailing comma before '}'")
edit('syntax_trailing_comma_array', '"heel_kg": 9}\n  ],', '"heel_kg": 9},\n  @@],', 'containers[1]',
     "trailing comma before ']'")
edit('syntax_single_quotes', '"site": "Eastfield works"', "\"site\": @@'Eastfield works'", 'site',
     'expected a value, found')
edit('syntax_unquoted_string', '{"reagent": "Cl2", "on_hand_kg"', '{"reagent": @@Cl2, "on_hand_kg"',
     'stock[0].reagent', 'unexpected word (strings need double quotes)')
edit('syntax_unquoted_key', '{"reagent": "Cl2", "on_hand_kg"', '{@@reagent: "Cl2", "on_hand_kg"', 'stock[0]',
     "expected a key in double quotes, found 'r'")
edit('syntax_bad_literal', '"feed_h": 5', '"feed_h": @@nul', 'runs[0].feed_h', 'unexpected word')
edit('syntax_python_true', '"reagent_eq": 0.6', '"reagent_eq": @@True', 'runs[0].reagent_eq', 'unexpected word')
edit('syntax_leading_zero', '"feed_h": 5', '"feed_h": @@05', 'runs[0].feed_h', 'invalid number')
edit('syntax_plus_sign', '"feed_h": 5', '"feed_h": @@+5', 'runs[0].feed_h', "expected a value, found '+'")
edit('syntax_bare_dot', '"feed_h": 5', '"feed_h": @@5.', 'runs[0].feed_h', 'invalid number')
edit('syntax_hex_number', '"net_kg": 907', '"net_kg": @@0x38B', 'containers[0].net_kg', 'invalid number')
edit('syntax_decimal_comma', '"reagent_eq": 0.6', '"reagent_eq": 0,@@6', 'runs[0].reagent_eq',
     "expected a key in double quotes, found '6'")
edit('syntax_bad_escape', '"Line 2, March', '"Line 2@@\\q March', 'title', "invalid escape '\\q' in a string")
edit('syntax_bad_unicode_escape', '"Line 2, March', '"Line 2@@\\u12G4 March', 'title', 'invalid \\u escape')
edit('syntax_lone_surrogate', '"Eastfield works"', '"Eastfield @@\\uD83D works"', 'site',
     'unpaired surrogate \\uD83D')
edit('syntax_lone_low_surrogate', '"Eastfield works"', '"Eastfield @@\\uDC00 works"', 'site',
     'unpaired surrogate \\uDC00')
edit('syntax_nul_escape', '"Eastfield works"', '"Eastfield@@\\u0000works"', 'site',
     '\\u0000 (NUL) is not allowed in a string')
edit('syntax_newline_in_string', '"Line 2, March chlorinations"', '"Line 2, March@@\nchlorinations"', 'title',
     'string not closed before the end of the line')
edit('syntax_raw_tab_in_string', '"Line 2, March chlorinations"', '"Line 2,@@\tMarch chlorinations"', 'title',
     'unescaped control character 0x09 in a string')
edit('syntax_comment', '{\n  "format"', '{\n  @@// planner copy\n  "format"', '$',
     "expected a key in double quotes, found '/'")
edit('syntax_nan', '"temp_c": 40', '"temp_c": @@NaN', 'runs[0].temp_c', 'unexpected word')
edit('syntax_infinity', '"temp_c": 40', '"temp_c": @@-Infinity', 'runs[0].temp_c', 'invalid number')
whole('syntax_empty_file', '@@', '$', 'unexpected end of file (the campaign is empty)')
whole('syntax_whitespace_only', '\n\n  @@', '$', 'unexpected end of file (the campaign is empty)')
edit('syntax_long_number', '"substrate_kg": 800', '"substrate_kg": @@800.' + '0' * 70, 'runs[0].substrate_kg',
     'number too long')
whole('syntax_top_array', '@@[{"format": "haloledger-campaign/1"}]\n', '$', 'must be an object (got an array)')
whole('syntax_top_string', '@@"haloledger-campaign/1"\n', '$', 'must be an object (got a string)')
edit('syntax_nul_byte', '"site": "Eastfield works",', '"site": "Eastfield works"@@\0,', 'site',
     "expected ',' or '}', found byte 0x00")
edit('syntax_missing_bracket', '"heel_kg": 9}\n  ],', '"heel_kg": 9}\n  @@},', 'containers[0]',
     "expected ',' or ']', found '}'")

# --- truncation ---
t = BASE[:BASE.index('chlorinations')]
whole('trunc_in_string', t + '@@', 'title', 'unexpected end of file inside a string (opened at 3:12)')
t = BASE[:BASE.index('"runs": [') + len('"runs":')]
whole('trunc_after_key', t + '@@', 'runs', 'unexpected end of file (a value is missing)')
t = BASE[:BASE.index('"substrate_kg": 800,') + len('"substrate_kg": 800,')]
whole('trunc_in_run', t + '@@', 'runs[0].substrate_kg',
      'unexpected end of file (the object opened at 18:5 is not closed)')
t = BASE[:BASE.rindex('}')]
whole('trunc_last_brace', t + '@@', 'runs', 'unexpected end of file (the object opened at 1:1 is not closed)')
t = BASE[:BASE.index('"substrate_kg": 800') + len('"substrate_kg": 8')]
whole('trunc_in_number', t + '@@', 'runs[0].substrate_kg', 'unexpected end of file (the object opened at 18:5')
t = BASE[:BASE.index('"Line 2') + len('"Line 2\\u00')]
whole('trunc_in_escape', BASE[:BASE.index('"Line 2') + len('"Line 2')] + '@@\\u00', 'title', 'invalid \\u escape')

# --- trailing garbage ---
edit('trailing_text', '  ]\n}\n', '  ]\n}\n@@x\n', '$', 'trailing characters after the campaign')
edit('trailing_second_object', '  ]\n}\n', '  ]\n}@@{}\n', '$', 'trailing characters after the campaign')
edit('trailing_comma', '  ]\n}\n', '  ]\n}@@,\n', '$', 'trailing characters after the campaign')

# --- duplicate keys ---
edit('dup_key_title', '  "site": "Eastfield works",', '  @@"title": "again",\n  "site": "Eastfield works",', 'title',
     'duplicate key (first given at 3:3)')
edit('dup_key_run_temp', '"temp_c": 40, "feed_h": 5', '"temp_c": 40, @@"temp_c": 45, "feed_h": 5', 'runs[0].temp_c',
     'duplicate key (first given at 21:34)')
edit('dup_key_smiles', '"smiles": "CC(C)C"}', '"smiles": "CC(C)C", @@"smiles": "CCCC"}', 'runs[0].substrate.smiles',
     'duplicate key (first given at 19:47)')
edit('dup_key_runs', '  "runs": [', '  "runs": [],\n  @@"runs": [', 'runs', 'duplicate key (first given at 17:3)')

# --- wrong types ---
edit('type_title_number', '"title": "Line 2, March chlorinations"', '"title": @@42', 'title',
     'must be a string (got a number)')
edit('type_stock_string', STOCK_BLOCK, '"stock": @@"none",', 'stock', 'must be an array (got a string)')
edit('type_run_string', RUN1_BLOCK, '@@"B-7"', 'runs[1]', 'must be an object (got a string)')
edit('type_substrate_kg_string', '"substrate_kg": 800', '"substrate_kg": @@"800"', 'runs[0].substrate_kg',
     'must be a number (got a string)')
edit('type_reagent_eq_bool', '"reagent_eq": 0.6', '"reagent_eq": @@true', 'runs[0].reagent_eq',
     'must be a number (got a boolean)')
edit('type_temp_null', '"temp_c": 40', '"temp_c": @@null', 'runs[0].temp_c', 'must be a number (got null)')
edit('type_substrate_string', '"substrate": {"name": "toluene", "smiles": "Cc1ccccc1"}', '"substrate": @@"Cc1ccccc1"',
     'runs[1].substrate', 'must be an object (got a string)')
edit('type_repeat_array', '"repeat": {"count": 4, "every_days": 2}', '"repeat": @@[4, 2]', 'runs[0].repeat',
     'must be an object (got an array)')
edit('type_model_number', '"model": {"overhalogenation_factor": 1.0}', '"model": @@1', 'model',
     'must be an object (got a number)')
edit('type_rate_ratios_number', '"model": {"overhalogenation_factor": 1.0}',
     '"model": {"rate_ratios": @@4.7}', 'model.rate_ratios', 'must be an array (got a number)')
edit('type_rate_ratio_string', '"model": {"overhalogenation_factor": 1.0}',
     '"model": {"rate_ratios": [1, @@"4.7"]}', 'model.rate_ratios[1]', 'must be a number (got a string)')
edit('type_count_string', '"count": 4', '"count": @@"4"', 'runs[0].repeat.count', 'must be a number (got a string)')
edit('type_liquor_number', '"liquor": "naoh"', '"liquor": @@1', 'scrubbers[0].liquor', 'must be a string (got a number)')
edit('type_id_number', '{"id": "B-7"', '{"id": @@7', 'runs[1].id', 'must be a string (got a number)')
edit('type_relative_reactivity_array', '"model": {"overhalogenation_factor": 1.0}',
     '"model": {"relative_reactivity": @@[1, 3.8, 5]}', 'model.relative_reactivity', 'must be an object (got an array)')

# --- non-finite numbers ---
edit('nonfinite_substrate_kg', '"substrate_kg": 800', '"substrate_kg": @@1e400', 'runs[0].substrate_kg',
     'must be a finite number (got 1e400)')
edit('nonfinite_temp', '"temp_c": 80', '"temp_c": @@-1e999', 'runs[1].temp_c', 'must be a finite number (got -1e999)')
edit('nonfinite_rate_ratio', '"model": {"overhalogenation_factor": 1.0}',
     '"model": {"rate_ratios": [1, @@1e309]}', 'model.rate_ratios[1]', 'must be a finite number (got 1e309)')
edit('nonfinite_liquor_kg', '"liquor_kg": 6000', '"liquor_kg": @@6E+999', 'scrubbers[0].liquor_kg',
     'must be a finite number (got 6E+999)')

# --- out of range ---
R = [
    ('range_substrate_kg_negative', '"substrate_kg": 800', '-1', 'runs[0].substrate_kg', 'must be >= 0.001 (got -1)'),
    ('range_substrate_kg_zero', '"substrate_kg": 800', '0', 'runs[0].substrate_kg', 'must be >= 0.001 (got 0)'),
    ('range_substrate_kg_huge', '"substrate_kg": 800', '2e9', 'runs[0].substrate_kg',
     'must be < 1000000000 (got 2000000000)'),
    ('range_reagent_eq_zero', '"reagent_eq": 0.6', '0', 'runs[0].reagent_eq', 'must be >= 1e-06 (got 0)'),
    ('range_reagent_eq_negative', '"reagent_eq": 0.6', '-1', 'runs[0].reagent_eq', 'must be >= 1e-06 (got -1)'),
    ('range_reagent_kg_negative', '"reagent_kg": 250', '-250', 'runs[1].reagent_kg', 'must be >= 0.001 (got -250)'),
    ('range_conversion_over_1', '"halogen_conversion": 0.97', '1.2', 'runs[0].halogen_conversion',
     'must be <= 1 (got 1.2)'),
    ('range_conversion_zero', '"halogen_conversion": 0.97', '0', 'runs[0].halogen_conversion', 'must be >= 1e-06 (got 0)'),
    ('range_temp_low', '"temp_c": 40', '-100', 'runs[0].temp_c', 'must be >= -80 (got -100)'),
    ('range_temp_high', '"temp_c": 80', '450', 'runs[1].temp_c', 'must be <= 400 (got 450)'),
    ('range_feed_zero', '"feed_h": 5', '0', 'runs[0].feed_h', 'must be >= 1/60 (one minute) (got 0)'),
    ('range_naoh_wt_pct_high', '"naoh_wt_pct": 18', '65', 'scrubbers[0].naoh_wt_pct', 'must be <= 50 (got 65)'),
    ('range_min_naoh_above', '"min_naoh_wt_pct": 2', '20', 'scrubbers[0].min_naoh_wt_pct',
     'must be < naoh_wt_pct (18)'),
    ('range_liquor_kg_negative', '"liquor_kg": 6000', '-6000', 'scrubbers[0].liquor_kg', 'must be >= 1 (got -6000)'),
    ('range_rated_zero', '"rated_acid_kmol_h": 2.0', '0', 'scrubbers[0].rated_acid_kmol_h', 'must be >= 0.001 (got 0)'),
    ('range_heel_ge_net', '"heel_kg": 9', '907', 'containers[0].heel_kg', 'must be < net_kg (907) by at least 0.1 kg'),
    ('range_net_zero', '"net_kg": 907', '0', 'containers[0].net_kg', 'must be >= 0.1 (got 0)'),
    ('range_on_hand_negative', '"on_hand_kg": 450', '-1', 'stock[0].on_hand_kg', 'must be >= 0 (got -1)'),
    ('range_lead_days_high', '"lead_days": 10', '5000', 'stock[0].lead_days', 'must be <= 3650 (got 5000)'),
    ('range_repeat_count_zero', '"count": 4', '0', 'runs[0].repeat.count', 'must be >= 1 (got 0)'),
    ('range_repeat_count_fraction', '"count": 4', '2.5', 'runs[0].repeat.count', 'must be a whole number (got 2.5)'),
    ('range_repeat_count_big', '"count": 4', '20000', 'runs[0].repeat.count', 'must be <= 10000 (got 20000)'),
    ('range_every_days_zero', '"every_days": 2', '0', 'runs[0].repeat.every_days',
     'must be >= 1/1440 (one minute) (got 0)'),
    ('range_overhal_zero', '"overhalogenation_factor": 1.0', '0', 'model.overhalogenation_factor',
     'must be >= 0.001 (got 0)'),
    # issue 16.2: tiny in-range numbers met a physical floor, not the models' underflow
    ('floor_reagent_eq', '"reagent_eq": 0.6', '1e-300', 'runs[0].reagent_eq',
     'must be >= 1e-06 (got 1e-300): below a millionth of an equivalent nothing is charged'),
    ('floor_conversion', '"halogen_conversion": 0.97', '1e-300', 'runs[0].halogen_conversion',
     'must be >= 1e-06 (got 1e-300): below a millionth nothing measurable reacts'),
    ('floor_feed_h', '"feed_h": 5', '1e-308', 'runs[0].feed_h',
     'must be >= 1/60 (one minute) (got 1e-308): start times are kept to the minute'),
    ('floor_feed_h_59_s', '"feed_h": 5', '0.0166', 'runs[0].feed_h', 'must be >= 1/60 (one minute) (got 0.0166)'),
    ('floor_substrate_kg', '"substrate_kg": 800', '1e-300', 'runs[0].substrate_kg',
     'must be >= 0.001 (got 1e-300): a charge below a gram'),
    ('floor_reagent_kg', '"reagent_kg": 250', '1e-300', 'runs[1].reagent_kg',
     'must be >= 0.001 (got 1e-300): a charge below a gram'),
    ('floor_liquor_kg', '"liquor_kg": 6000', '1e-300', 'scrubbers[0].liquor_kg',
     'must be >= 1 (got 1e-300): a liquor charge below 1 kg is no scrubber'),
    ('floor_naoh_wt_pct', '"naoh_wt_pct": 18', '1e-300', 'scrubbers[0].naoh_wt_pct', 'must be >= 0.1 (got 1e-300)'),
    ('floor_rated', '"rated_acid_kmol_h": 2.0', '1e-308', 'scrubbers[0].rated_acid_kmol_h',
     'must be >= 0.001 (got 1e-308)'),
    ('floor_net_kg', '"net_kg": 907', '1e-300', 'containers[0].net_kg',
     'must be >= 0.1 (got 1e-300): no container holds less than 100 g'),
    ('floor_every_days', '"every_days": 2', '1e-300', 'runs[0].repeat.every_days',
     'must be >= 1/1440 (one minute) (got 1e-300)'),
    ('floor_overhal', '"overhalogenation_factor": 1.0', '1e-300', 'model.overhalogenation_factor',
     'must be >= 0.001 (got 1e-300)'),
]
for name, old, val, field, msg in R:
    key = old.split(':')[0]
    edit(name, old, key + ': @@' + val, field, msg)
edit('range_peak_below_1', '"temp_c": 80}', '"temp_c": 80, "peak_factor": @@0.5}', 'runs[1].peak_factor',
     'must be >= 1 (got 0.5)')
edit('range_vent_retained_1', '"temp_c": 80}', '"temp_c": 80, "vent_retained_fraction": @@1}',
     'runs[1].vent_retained_fraction', 'must be < 1 (got 1)')
edit('range_reactivity_negative', '"model": {"overhalogenation_factor": 1.0}',
     '"model": {"relative_reactivity": {"tertiary": @@-5}}', 'model.relative_reactivity.tertiary',
     'must be >= 1e-06 (got -5)')
edit('range_ref_temp_low', '"temp_c": 80}', '"temp_c": 80,\n     "model": {"relative_reactivity": {"ref_temp_c": @@-300}}}',
     'runs[1].model.relative_reactivity.ref_temp_c', 'must be >= -80 (got -300)')
edit('range_rate_ratio_first', '"model": {"overhalogenation_factor": 1.0}', '"model": {"rate_ratios": [@@2, 4]}',
     'model.rate_ratios[0]', 'must be 1: the ratios are relative to step 0 (got 2)')
edit('range_rate_ratio_negative', '"model": {"overhalogenation_factor": 1.0}', '"model": {"rate_ratios": [1, @@-4]}',
     'model.rate_ratios[1]', 'must be >= 1e-06 and <= 1e6 (got -4)')
edit('floor_rate_ratio', '"model": {"overhalogenation_factor": 1.0}', '"model": {"rate_ratios": [1, @@1e-300]}',
     'model.rate_ratios[1]', 'must be >= 1e-06 and <= 1e6 (got 1e-300)')
edit('floor_reactivity', '"model": {"overhalogenation_factor": 1.0}',
     '"model": {"relative_reactivity": {"primary": @@1e-300}}', 'model.relative_reactivity.primary',
     'must be >= 1e-06 (got 1e-300): relative rates span at most 1e12')
edit('floor_water_max_acid', '"liquor": "naoh", "naoh_wt_pct": 18, "liquor_kg": 6000,\n     "min_naoh_wt_pct": 2,',
     '"liquor": "water", "liquor_kg": 6000, "max_acid_wt_pct": @@1e-300,', 'scrubbers[0].max_acid_wt_pct',
     'must be >= 0.1 (got 1e-300)')
COLUMN = ('"column": {"packing_factor_1_m": 200, "htu_m": 0.5, "removal_fraction": 0.999, '
          '"flood_fraction": 0.7, "carrier_kmol_h": 5, "liquor_kg_h": 20000}')
for cname, ckey, cval, cmsg in [
        ('floor_packing_factor', 'packing_factor_1_m', '1e-308', 'must be >= 1 (got 1e-308): no packing'),
        ('floor_htu', 'htu_m', '1e-308', 'must be >= 0.01 (got 1e-308)'),
        ('floor_removal', 'removal_fraction', '1e-300', 'must be >= 0.01 (got 1e-300)'),
        ('floor_flood_fraction', 'flood_fraction', '1e-308', 'must be >= 0.1 (got 1e-308)'),
        ('floor_carrier', 'carrier_kmol_h', '1e-308', 'must be >= 0.001 (got 1e-308)'),
        ('floor_column_liquor', 'liquor_kg_h', '1e-300', 'must be >= 1 (got 1e-300)')]:
    col = re.sub('"%s": [0-9.]+' % ckey, '"%s": @@%s' % (ckey, cval), COLUMN)
    edit(cname, '"rated_acid_kmol_h": 2.0}', '"rated_acid_kmol_h": 2.0, %s}' % col,
         'scrubbers[0].column.' + ckey, cmsg)
edit('range_rate_ratios_empty', '"model": {"overhalogenation_factor": 1.0}', '"model": {"rate_ratios": @@[]}',
     'model.rate_ratios', 'must not be empty')
edit('range_rate_ratios_too_many', '"model": {"overhalogenation_factor": 1.0}',
     '"model": {"rate_ratios": [1' + ', 2' * 63 + ', @@2]}', 'model.rate_ratios[64]', 'too many rate ratios (at most 64)')
edit('range_makeup_weaker', '"rated_acid_kmol_h": 2.0}', '"rated_acid_kmol_h": 2.0, "makeup_naoh_wt_pct": @@10}',
     'scrubbers[0].makeup_naoh_wt_pct', 'the make-up caustic (10 wt%) must be at least as strong as the liquor')

# --- unknown keys ---
edit('unknown_key_reagent_q', '"reagent_eq": 0.6', '@@"reagent_q": 0.6', 'runs[0].reagent_q',
     "unknown key (did you mean 'reagent_eq'?)")
edit('unknown_key_title_case', '"title": "Line', '@@"Title": "Line', 'Title', "unknown key (did you mean 'title'?)")
edit('unknown_key_naoh_pct', '"naoh_wt_pct": 18', '@@"naoh_wt_pc": 18', 'scrubbers[0].naoh_wt_pc',
     "unknown key (did you mean 'naoh_wt_pct'?)")
edit('unknown_key_far', '"temp_c": 80}', '"temp_c": 80, @@"colour": "red"}', 'runs[1].colour',
     'unknown key (known keys here: id, start, reactor')
edit('unknown_key_cut_off', '"overhalogenation_factor"', '@@"overhalogenation"', 'model.overhalogenation',
     "unknown key (did you mean 'overhalogenation_factor'?)")
edit('unknown_key_smile', '"smiles": "Cc1ccccc1"', '@@"smile": "Cc1ccccc1"', 'runs[1].substrate.smile',
     "unknown key (did you mean 'smiles'?)")
edit('unknown_key_tertiery', '"model": {"overhalogenation_factor": 1.0}',
     '"model": {"relative_reactivity": {@@"tertiery": 5}}', 'model.relative_reactivity.tertiery',
     "unknown key (did you mean 'tertiary'?)")
edit('unknown_key_every_day', '"every_days": 2', '@@"every_day": 2', 'runs[0].repeat.every_day',
     "unknown key (did you mean 'every_days'?)")
edit('unknown_key_top_run', '  "runs": [', '  @@"run": [],\n  "runs": [', 'run', "unknown key (did you mean 'runs'?)")

# --- unknown reagents and scrubbers ---
edit('reagent_lower_case', '"reagent": "Br2"', '"reagent": @@"br2"', 'runs[1].reagent',
     'unknown reagent "br2" (did you mean "Br2"?)')
edit('reagent_name_spelled_out', '"reagent": "Cl2", "reagent_eq"', '"reagent": @@"chlorine", "reagent_eq"',
     'runs[0].reagent', 'unknown reagent "chlorine" (known: Cl2, Br2, SO2Cl2, NBS, HBr')
edit('reagent_naoh_in_run', '"reagent": "Br2"', '"reagent": @@"NaOH"', 'runs[1].reagent',
     '"NaOH" cannot be charged to a reactor')
edit('reagent_stock_unknown', '{"reagent": "Cl2", "on_hand_kg"', '{"reagent": @@"Cl", "on_hand_kg"',
     'stock[0].reagent', 'unknown reagent "Cl" (did you mean "Cl2"?)')
edit('reagent_container_unknown', '{"reagent": "Cl2", "name"', '{"reagent": @@"SOCl2", "name"',
     'containers[0].reagent', 'unknown reagent "SOCl2" (did you mean "SO2Cl2"?)')
edit('scrubber_unknown', '"reactor": "R-4", "scrubber": "VS-1"', '"reactor": "R-4", "scrubber": @@"VS-2"',
     'runs[1].scrubber', 'unknown scrubber "VS-2" (did you mean "VS-1"?)')
edit('scrubber_unknown_far', '"reactor": "R-3", "scrubber": "VS-1"', '"reactor": "R-3", "scrubber": @@"vent north"',
     'runs[0].scrubber', 'unknown scrubber "vent north"')
edit('scrubber_duplicate_id', '"rated_acid_kmol_h": 2.0}', '"rated_acid_kmol_h": 2.0},\n'
     '    {"id": @@"VS-1", "naoh_wt_pct": 10, "liquor_kg": 100, "rated_acid_kmol_h": 1}',
     'scrubbers[1].id', 'duplicate scrubber id (first at 8:5)')
edit('stock_duplicate_reagent', '"lead_days": 10}', '"lead_days": 10},\n    {"reagent": @@"Cl2", "on_hand_kg": 5}',
     'stock[1].reagent', 'a second stock entry for Cl2 (first at 12:5)')

# --- dates ---
edit('date_feb_30', '"start": "2027-03-20"', '"start": @@"2027-02-30"', 'runs[1].start',
     '"2027-02-30" is not a valid ISO 8601 date')
edit('date_slashes', '"start": "2027-03-20"', '"start": @@"2027/03/20"', 'runs[1].start',
     '"2027/03/20" is not a valid ISO 8601 date')
edit('date_hour_24', '"start": "2027-03-02T06:00"', '"start": @@"2027-03-02T24:00"', 'runs[0].start',
     '"2027-03-02T24:00" is not a valid ISO 8601 date')
edit('date_issued_dmy', '"issued": "2027-02-20"', '"issued": @@"20-02-2027"', 'issued',
     '"20-02-2027" is not a valid ISO 8601 date')
edit('date_number', '"start": "2027-03-20"', '"start": @@20270320', 'runs[1].start', 'must be a string (got a number)')
edit('date_with_zone', '"start": "2027-03-02T06:00"', '"start": @@"2027-03-02T06:00Z"', 'runs[0].start',
     '"2027-03-02T06:00Z" is not a valid ISO 8601 date')
edit('date_month_13', '"issued": "2027-02-20"', '"issued": @@"2027-13-01"', 'issued',
     '"2027-13-01" is not a valid ISO 8601 date')
edit('date_empty', '"start": "2027-03-20"', '"start": @@""', 'runs[1].start', '"" is not a valid ISO 8601 date')

# --- computed dates stay in 0001-9999 (issue 16.5), the campaign spans at most 7320 days (16.8) ---
edit('date_year_0000', '"start": "2027-03-20"', '"start": @@"0000-03-20"', 'runs[1].start',
     '"0000-03-20" is not a valid ISO 8601 date (YYYY-MM-DD or YYYY-MM-DDTHH:MM); wrong at character 1')
edit('date_repeat_past_9999', '"start": "2027-03-02T06:00"', '"start": "9999-12-20T06:00"', 'runs[0].repeat.every_days',
     'repeat 4 (run "C-101-4") would start after 9999-12-31, the last date a ledger can show')
CASES[-1] = (CASES[-1][0], CASES[-1][1].replace(b'"every_days": 2}', b'"every_days": @@5}'), *CASES[-1][2:])
edit('date_order_by_before_0001', '"start": "2027-03-02T06:00"', '"start": "0001-01-05T06:00"', 'stock[0].lead_days',
     '10 days before run "C-101-1" (runs[0], 0001-01-05T06:00) falls before 0001-01-01')
CASES[-1] = (CASES[-1][0], CASES[-1][1].replace(b'"lead_days": 10}', b'"lead_days": @@10}'), *CASES[-1][2:])
edit('date_feed_past_9999', '"start": "2027-03-02T06:00"', '"start": "9999-12-31T20:00"', 'runs[0].feed_h',
     'the feed of run starting 9999-12-31T20:00 would end after 9999-12-31')
CASES[-1] = (CASES[-1][0], CASES[-1][1].replace(b'"feed_h": 5', b'"feed_h": @@5'), *CASES[-1][2:])
edit('span_run_start', '"start": "2027-03-20"', '"start": @@"2047-03-20"', 'runs[1].start',
     'run "B-7" starting 2047-03-20T00:00 would make the campaign span more than 7320 days (20 years): '
     'run "C-101-1" (runs[0]) starts 2027-03-02T06:00')
edit('span_repeat', '"every_days": 2}', '"every_days": @@3000}', 'runs[0].repeat.every_days',
     'repeat 4 (run "C-101-4") starting %s would make the campaign span more than 7320 days'
     % (datetime.datetime(2027, 3, 2, 6) + datetime.timedelta(days=3 * 3000)).strftime('%Y-%m-%dT%H:%M'))

# --- invalid UTF-8 and control characters ---
bedit('utf8_bad_byte', b'"Eastfield works"', b'@@"Eastfield \xff works"', 'site',
      'invalid UTF-8 in a string (byte 0xFF at byte 11 of it)')
bedit('utf8_overlong', b'"Eastfield works"', b'@@"Eastfield \xc0\xaf works"', 'site',
      'invalid UTF-8 in a string (byte 0xC0')
bedit('utf8_encoded_surrogate', b'"reactor": "R-3"', b'"reactor": @@"R-\xed\xa0\x803"', 'runs[0].reactor',
      'invalid UTF-8 in a string (byte 0xED')
bedit('utf8_latin1_name', b'"name": "toluene"', b'"name": @@"tolu\xe8ne"', 'runs[1].substrate.name',
      'invalid UTF-8 in a string (byte 0xE8')
bedit('utf8_in_key', b'"site": "Eastfield', b'@@"s\xe9te": "Eastfield', '$', 'invalid UTF-8 in a key')
bedit('utf8_cut_sequence', b'"ton container"', b'@@"ton container \xe2\x82"', 'containers[0].name',
      'invalid UTF-8 in a string (byte 0xE2')
bedit('utf8_above_u10ffff', b'"R-4"', b'@@"R-\xf4\x90\x80\x804"', 'runs[1].reactor', 'invalid UTF-8 in a string')
edit('ctrl_escaped_newline', '"Line 2, March chlorinations"', '@@"Line 2\\nMarch chlorinations"', 'title',
     'contains the control character U+000A at byte 7')
edit('ctrl_escaped_tab_in_id', '"id": "C-101"', '"id": @@"C-101\\t"', 'runs[0].id',
     'contains the control character U+0009 at byte 6')
edit('ctrl_escaped_bell_reactor', '"reactor": "R-4"', '"reactor": @@"R\\u0007-4"', 'runs[1].reactor',
     'contains the control character U+0007 at byte 2')
edit('ctrl_c1_in_name', '"ton container"', '@@"ton\\u0085container"', 'containers[0].name',
     'contains the control character U+0085 at byte 4')
# XML 1.0 section 2.2 leaves U+FFFE and U+FFFF out of Char: a workbook holding them is not well-formed
edit('nonchar_fffe_escaped_title', '"Line 2, March chlorinations"', '@@"Line 2\\uFFFE March"', 'title',
     'contains the noncharacter U+FFFE at byte 7 (XML 1.0 forbids it')
bedit('nonchar_ffff_raw_site', b'"Eastfield works"', b'@@"Eastfield \xef\xbf\xbf works"', 'site',
      'contains the noncharacter U+FFFF at byte 11 (XML 1.0 forbids it')
bedit('nonchar_ffff_raw_container', b'"ton container"', b'@@"ton \xef\xbf\xbf"', 'containers[0].name',
      'contains the noncharacter U+FFFF at byte 5')
edit('long_title', '"Line 2, March chlorinations"', '@@"' + 'L' * 40000 + '"', 'title',
     'too long (40000 bytes; at most 32767)')
edit('long_run_id', '"id": "B-7"', '"id": @@"' + 'B' * 150 + '"', 'runs[1].id', 'too long (150 bytes; at most 100)')
edit('empty_run_id', '"id": "B-7"', '"id": @@""', 'runs[1].id', 'must not be empty')

# --- deep nesting ---
edit('deep_nesting_model', '"model": {"overhalogenation_factor": 1.0}',
     '"model": {"relative_reactivity": ' + '[' * 62 + '@@' + '[' * 8 + ']' * 70 + '}',
     're:model\\.relative_reactivity[][0]*', 'nesting deeper than 64 levels')
whole('deep_nesting_top', '[' * 64 + '@@' + '[' * 36 + ']' * 100 + '\n', 're:\\$[][0]*',
      'nesting deeper than 64 levels')

# --- amount, substrate: both or neither ---
edit('amount_both', '"reagent_eq": 0.6,', '"reagent_eq": 0.6, @@"reagent_kg": 500,', 'runs[0].reagent_kg',
     'give reagent_eq or reagent_kg, not both')
edit('amount_neither', '"reagent": "Cl2", "reagent_eq": 0.6,', '"reagent": "Cl2",', 'runs[0].reagent_eq',
     'missing: give reagent_eq')
CASES[-1] = (CASES[-1][0], CASES[-1][1].replace(b'    {"id": "C-101"', b'    @@{"id": "C-101"'), *CASES[-1][2:])
edit('substrate_both', '"smiles": "Cc1ccccc1"}', '"smiles": "Cc1ccccc1", @@"formula": "C7H8"}',
     'runs[1].substrate.formula', 'give smiles or formula, not both')
edit('substrate_neither', '"substrate": {"name": "toluene", "smiles": "Cc1ccccc1"}',
     '"substrate": @@{"name": "toluene"}', 'runs[1].substrate.smiles', 'missing: give the substrate')
edit('substrate_empty_smiles', '"smiles": "Cc1ccccc1"', '"smiles": @@""', 'runs[1].substrate.smiles',
     'must not be empty')

# --- duplicate run ids, also made by repeat ---
edit('dup_id_made_by_repeat', '"id": "B-7"', '"id": @@"C-101-3"', 'runs[1].id',
     'run id "C-101-3" is already used by runs[0], made by its repeat (id at 18:12)')
edit('dup_id_repeat_makes', '"temp_c": 80}', '"temp_c": 80,\n     "repeat": {"count": 2, "every_days": 1}}',
     'runs[1].id', 'repeat makes run id "C-101-1", already used by runs[0] (id at 18:12)')
CASES[-1] = (CASES[-1][0], CASES[-1][1].replace(b'{"id": "B-7"', b'{"id": @@"C-101"'), *CASES[-1][2:])
edit('dup_id_plain', '"temp_c": 80}', '"temp_c": 80}', 'runs[1].id',
     'run id "C-101" is already used by runs[0] (id at 18:12)')
CASES[-1] = (CASES[-1][0], CASES[-1][1].replace(b'{"id": "B-7"', b'{"id": @@"C-101"').replace(
    b',\n     "repeat": {"count": 4, "every_days": 2}}', b'}'), *CASES[-1][2:])

# --- empty or missing parts ---
edit('runs_empty', RUNS_BLOCK, '"runs": @@[]', 'runs', 'must not be empty')
edit('runs_missing', ',\n  ' + RUNS_BLOCK, '', 'runs', 'missing (required)')
CASES[-1] = (CASES[-1][0], b'@@' + CASES[-1][1], *CASES[-1][2:])
edit('missing_start', '"start": "2027-03-20", ', '', 'runs[1].start', 'missing (required)')
CASES[-1] = (CASES[-1][0], CASES[-1][1].replace(b'    {"id": "B-7"', b'    @@{"id": "B-7"'), *CASES[-1][2:])
edit('missing_substrate_kg', '"substrate_kg": 300, ', '', 'runs[1].substrate_kg', 'missing (required)')
CASES[-1] = (CASES[-1][0], CASES[-1][1].replace(b'    {"id": "B-7"', b'    @@{"id": "B-7"'), *CASES[-1][2:])
edit('missing_naoh_wt_pct', '"naoh_wt_pct": 18, ', '', 'scrubbers[0].naoh_wt_pct',
     'missing: a caustic scrubber needs its fresh liquor strength')
CASES[-1] = (CASES[-1][0], CASES[-1][1].replace(b'    {"id": "VS-1"', b'    @@{"id": "VS-1"'), *CASES[-1][2:])
edit('missing_container_name', '"name": "ton container", ', '', 'containers[0].name', 'missing (required)')
CASES[-1] = (CASES[-1][0], CASES[-1][1].replace(b'    {"reagent": "Cl2", "net_kg"', b'    @@{"reagent": "Cl2", "net_kg"'),
             *CASES[-1][2:])
edit('missing_repeat_every', '"repeat": {"count": 4, "every_days": 2}', '"repeat": @@{"count": 4}',
     'runs[0].repeat.every_days', 'missing (required)')

# --- format and enums ---
edit('format_version_2', '"format": "haloledger-campaign/1"', '"format": @@"haloledger-campaign/2"', 'format',
     'must be "haloledger-campaign/1" (got "haloledger-campaign/2")')
edit('format_missing', '  "format": "haloledger-campaign/1",\n', '', 'format', 'missing (required)')
CASES[-1] = (CASES[-1][0], b'@@' + CASES[-1][1], *CASES[-1][2:])
edit('format_number', '"format": "haloledger-campaign/1"', '"format": @@1', 'format', 'must be a string (got a number)')
edit('format_catalog', '"format": "haloledger-campaign/1"', '"format": @@"haloledger-catalog/1"', 'format',
     'must be "haloledger-campaign/1" (got "haloledger-catalog/1")')
edit('mode_plug', '"reactor_mode": "batch"', '"reactor_mode": @@"plug"', 'runs[0].reactor_mode',
     'must be "batch" or "cstr" (got "plug")')
edit('liquor_caustic', '"liquor": "naoh"', '"liquor": @@"caustic"', 'scrubbers[0].liquor',
     'must be "naoh", "water" or "soda_ash" (got "caustic")')
edit('water_with_naoh_pct', '"liquor": "naoh", "naoh_wt_pct": 18', '"liquor": "water", @@"naoh_wt_pct": 18',
     'scrubbers[0].naoh_wt_pct', 'applies to a "naoh" liquor only')
# soda ash reads the base-neutral spellings: the NaOH-named keys do not apply, nor the other way
edit('soda_ash_with_naoh_pct', '"liquor": "naoh", "naoh_wt_pct": 18', '"liquor": "soda_ash", @@"naoh_wt_pct": 18',
     'scrubbers[0].naoh_wt_pct', 'applies to a "naoh" liquor only')
edit('naoh_with_base_pct', '"rated_acid_kmol_h": 2.0}', '"rated_acid_kmol_h": 2.0, @@"min_base_wt_pct": 2}',
     'scrubbers[0].min_base_wt_pct', 'applies to a "soda_ash" liquor only')
edit('soda_ash_missing_base_pct', '{"id": "VS-1", "liquor": "naoh", "naoh_wt_pct": 18, "liquor_kg": 6000,\n     "min_naoh_wt_pct": 2,',
     '@@{"id": "VS-1", "liquor": "soda_ash", "liquor_kg": 6000,', 'scrubbers[0].base_wt_pct',
     'missing: a soda-ash scrubber needs its fresh liquor strength')
edit('soda_ash_above_solubility', '"liquor": "naoh", "naoh_wt_pct": 18, "liquor_kg": 6000,\n     "min_naoh_wt_pct": 2,',
     '"liquor": "soda_ash", "base_wt_pct": @@18, "liquor_kg": 6000,', 'scrubbers[0].base_wt_pct',
     'must be <= 14 (got 18): under the solubility of Na2CO3 near 20 C')
edit('naoh_with_max_acid', '"rated_acid_kmol_h": 2.0}', '"rated_acid_kmol_h": 2.0, @@"max_acid_wt_pct": 20}',
     'scrubbers[0].max_acid_wt_pct', 'applies to a "water" liquor only')

# --- refused by the chemistry (NEEDS_MODELS): position inside the string value ---
# Column of SMILES character k (1-based) = column of the opening quote + k.
FORMULA_LINE = 5


def chem(name, new_substrate, k, field, reagent=None):
    text = SMALL.replace('{"smiles": "CCC"}', new_substrate)
    if reagent:
        text = text.replace('"reagent": "Cl2"', '"reagent": "%s"' % reagent)
    line = text.split('\n')[4]
    start = line.index('": "', line.index('substrate')) + 3  # 0-based index of the opening quote
    col = start + 1 + k
    NEEDS_MODELS.append(name)
    CASES.append((name, text.encode(), field, None, (FORMULA_LINE, col)))


chem('smiles_unclosed_branch', '{"smiles": "CC("}', 3, 'runs[0].substrate.smiles')
chem('smiles_unclosed_ring', '{"smiles": "C1CCC"}', 2, 'runs[0].substrate.smiles')
chem('smiles_pentavalent_carbon', '{"smiles": "CC(C)(C)(C)(C)C"}', 2, 'runs[0].substrate.smiles')
chem('smiles_bad_atom', '{"smiles": "CCQ"}', 3, 'runs[0].substrate.smiles')
# no Kekule structure (RDKit refuses them too, tests/e2e/rdkit_kekule.py): blamed on the first ring atom
chem('smiles_kekule_five_ring', '{"smiles": "Cc1cccc1"}', 2, 'runs[0].substrate.smiles')
chem('smiles_kekule_pyrrole_without_h', '{"smiles": "CCc1ccnc1"}', 3, 'runs[0].substrate.smiles')
# at most 1000 atoms in a SMILES (campaign.h CAMP_MAX_SMILES_ATOMS): refused at atom 1001
edit('smiles_too_many_atoms', '{"smiles": "CCC"}', '{"smiles": "' + 'C' * 1000 + '@@Cl"}', 'runs[0].substrate.smiles',
     'more than 1000 atoms (this one is atom 1001)', base=SMALL)
edit('product_smiles_too_many_atoms', '{"smiles": "CCC"}',
     '{"smiles": "CCC"}, "product_smiles": "Cl' + 'C' * 999 + '@@C"',
     'runs[0].product_smiles', 'more than 1000 atoms (this one is atom 1001)', base=SMALL)
chem('formula_impossible_c4h', '{"formula": "C4H"}', 1, 'runs[0].substrate.formula')
chem('formula_unknown_element', '{"formula": "Xx2"}', 1, 'runs[0].substrate.formula')
chem('chem_hbr_no_alkene', '{"smiles": "CCC"}', 0, 'runs[0].substrate.smiles', reagent='HBr')
chem('chem_nbs_no_allylic', '{"smiles": "C(C)(C)(C)C"}', 0, 'runs[0].substrate.smiles', reagent='NBS')


# Escapes inside the string take more file bytes than the characters they stand for:
# here the @@ marker sits on the faulty character in the raw text, so the expected
# column counts the raw bytes (an escaped backslash is 2, \u0043 is 6).
def chem_at(name, new_substrate, field):
    assert new_substrate.count('@@') == 1, name
    NEEDS_MODELS.append(name)
    CASES.append((name, SMALL.replace('{"smiles": "CCC"}', new_substrate).encode(), field, None))


chem_at('smiles_escaped_backslash', r'{"smiles": "F/C=C\\F@@("}', 'runs[0].substrate.smiles')
chem_at('smiles_unicode_escape', r'{"smiles": "C\u0043@@Q"}', 'runs[0].substrate.smiles')
chem_at('smiles_escape_after_fault', r'{"smiles": "CC@@Q\u0043"}', 'runs[0].substrate.smiles')
# a fault on a byte of a character written as an escape points at its backslash
chem_at('smiles_fault_in_escape', r'{"smiles": "C@@\u00e9C"}', 'runs[0].substrate.smiles')
chem_at('product_smiles_escaped_slash', r'{"smiles": "CCC"}, "product_smiles": "ClC\/C@@("',
        'runs[0].product_smiles')
chem_at('product_smiles_unicode_escape', r'{"smiles": "CCC"}, "product_smiles": "Cl\u0043C@@("',
        'runs[0].product_smiles')
chem_at('formula_unicode_escape', r'{"formula": "CH\u0032@@Xx"}', 'runs[0].substrate.formula')

# Rate constants out of the kinetics range (above 1e200: phi^61 with reactivities
# raised by the low temperature): a run without a model block of its own is blamed on
# the campaign's model block, one with its own block on the run.
MODEL_SUB = '{"smiles": "%s"}' % ('C' * 30)
MODEL_BLOCK = ('{"overhalogenation_factor": 1000, "relative_reactivity": '
               '{"primary": 1000000, "secondary": 1000000, "ref_temp_c": 400}}')
NEEDS_MODELS.append('model_campaign_level')
CASES.append(('model_campaign_level', SMALL.replace('"runs": [', '"model": @@%s,\n  "runs": [' % MODEL_BLOCK)
              .replace('{"smiles": "CCC"}', MODEL_SUB).replace('"reagent_eq": 1,', '"reagent_eq": 1, "temp_c": -80,')
              .encode(), 'model', 'rate constants are not usable'))
NEEDS_MODELS.append('model_run_level')
CASES.append(('model_run_level', SMALL.replace('{"id": "X-1"', '@@{"id": "X-1"')
              .replace('{"smiles": "CCC"}', MODEL_SUB)
              .replace('"reagent_eq": 1,', '"reagent_eq": 1, "temp_c": -80,\n     "model": %s,' % MODEL_BLOCK)
              .encode(), 'runs[0].model', 'rate constants are not usable'))


def main():
    for f in os.listdir(HERE):  # drop files of cases that no longer exist (not the hand-written ones)
        if (f.endswith('.json') or f.endswith('.expect')) and f.rsplit('.', 1)[0] not in HAND_WRITTEN:
            os.remove(os.path.join(HERE, f))
    names = set()
    for c in CASES:
        name, data, field, msg = c[:4]
        assert name not in names, name
        names.add(name)
        if len(c) == 5:
            line, col = c[4]
        else:
            assert data.count(b'@@') == 1, name
            i = data.index(b'@@')
            line = data.count(b'\n', 0, i) + 1
            col = i - (data.rfind(b'\n', 0, i) + 1) + 1
            data = data.replace(b'@@', b'')
        fpat = field[3:] if field.startswith('re:') else re.escape(field)
        mpat = '.+' if msg is None else (msg[3:] if msg.startswith('re:') else re.escape(msg) + '.*')
        pat = '^haloledger: (?:.*/)?%s\\.json:%d:%d: %s: %s$' % (re.escape(name), line, col, fpat, mpat)
        with open(os.path.join(HERE, name + '.json'), 'wb') as f:
            f.write(data)
        with open(os.path.join(HERE, name + '.expect'), 'w') as f:
            f.write(pat + '\n')
    with open(os.path.join(HERE, 'NEEDS_MODELS'), 'w') as f:
        f.write('# cases refused by the chemistry modules (SMILES, formula, reagent fit), not the reader\n')
        for n in NEEDS_MODELS:
            f.write(n + '\n')
    print('%d cases (%d need the models)' % (len(CASES), len(NEEDS_MODELS)), file=sys.stderr)


if __name__ == '__main__':
    main()
