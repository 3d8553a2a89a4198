#!/usr/bin/env python3
"""Writes the hostile study files NN-what.toml beside this script: a valid base study
(base-valid.txt, which the test's control case also runs) broken in one way per file.
Each file ends with a "# want: ..." comment, the text its error message must contain
(the empty files, which cannot carry one, are listed in the test). Plain Python 3, no
packages: python3 gen_hostile.py
"""
import re, os, glob
base = open(os.path.join(os.path.dirname(os.path.abspath(__file__)), 'base-valid.txt')).read()
out = os.path.dirname(os.path.abspath(__file__))
def sect(src, table):
    # returns (start, end) of the table body
    if table == '':
        m = re.search(r'^\[', src, re.M); return 0, m.start()
    m = re.search(r'^\[\[?' + re.escape(table) + r'\]\]?\n', src, re.M)
    s = m.end(); n = re.search(r'^\[', src[s:], re.M)
    return s, (s + n.start() if n else len(src))
def setk(src, table, key, val):
    s, e = sect(src, table); body = src[s:e]
    if val is None:
        nb, k = re.subn(r'^' + re.escape(key) + r' = .*\n', '', body, flags=re.M)
    else:
        nb, k = re.subn(r'^' + re.escape(key) + r' = .*$', key + ' = ' + val, body, flags=re.M)
        if k == 0:
            nb = body.rstrip('\n') + '\n' + key + ' = ' + val + '\n' + ('\n' if e < len(src) else '')
            k = 1
    assert k == 1, (table, key)
    return src[:s] + nb + src[e:]
def rmtable(src, table):
    m = re.search(r'^\[\[?' + re.escape(table) + r'\]\]?\n', src, re.M)
    s, e = sect(src, table); return src[:m.start()] + src[e:]
files = []
def add(name, what, want, src):
    files.append((name, what, want, src))
B = base
add('wrong-type-string', 'a length given as a string', 'line.length_km: must be a number', setk(B,'line','length_km','"320"'))
add('wrong-type-bool', 'a voltage given as a boolean', 'voltage_kv:', setk(B,'','voltage_kv','true'))
add('wrong-type-array', 'a frequency given as an array', 'frequency_hz:', setk(B,'','frequency_hz','[50]'))
add('wrong-type-shunt-mvar', 'a shunt rating given as a string', 'shunt[0].mvar:', setk(B,'shunt','mvar','"150 Mvar"'))
add('wrong-type-points-float', 'a point count that is not an integer', 'scan.points:', setk(B,'scan','points','500.5'))
add('wrong-type-pole-sigma', 'a pole scatter given as a string', 'switching.pole_sigma_ms: must be a number, got the string "1 ms"', setk(B,'switching','pole_sigma_ms','"1 ms"'))
add('wrong-type-method', 'a method given as a number', 'energise.method:', setk(B,'energise','method','3'))
add('wrong-type-shots', 'a shot count given as a string', 'switching.shots: must be an integer, got the string "many"', setk(B,'switching','shots','"many"'))
add('wrong-type-table', 'a table given as a number', 'source', setk(rmtable(B,'source'),'','source','5'))
add('nan-resistance', 'NaN literal for the series resistance', 'line.r_ohm_per_km:', setk(B,'line','r_ohm_per_km','nan'))
add('inf-frequency', 'Inf literal for the system frequency', 'frequency_hz:', setk(B,'','frequency_hz','inf'))
add('neg-inf-short-circuit', '-Inf literal for the source level', 'source.short_circuit_mva:', setk(B,'source','short_circuit_mva','-inf'))
add('nan-in-array', 'NaN inside the trapped-charge array', 'switching.trapped_pu', setk(B,'switching','trapped_pu','[0, nan, 0]'))
add('nan-load', 'NaN literal for the receiving load', 'receiving.load_mw:', setk(B,'receiving','load_mw','+nan'))
add('inf-lever', 'Inf inside a lever range', 'levers.reactor_mvar_receiving', setk(B,'levers','reactor_mvar_receiving','[0, inf]'))
add('negative-length', 'a negative line length', 'line.length_km: must be > 0, got -3', setk(B,'line','length_km','-3'))
add('zero-frequency', 'a zero system frequency', 'frequency_hz: must be > 0', setk(B,'','frequency_hz','0'))
add('zero-x-over-r', 'a zero X/R of the source', 'source.x_over_r:', setk(B,'source','x_over_r','0'))
add('negative-q-factor', 'a negative reactor quality factor', 'shunt[0].q_factor:', setk(B,'shunt','q_factor','-1'))
add('zero-mvar', 'a shunt of 0 Mvar', 'shunt[0].mvar:', setk(B,'shunt','mvar','0'))
add('negative-duration', 'a negative energisation duration', 'energise.duration_ms:', setk(B,'energise','duration_ms','-1'))
add('negative-pole-sigma', 'a negative pole scatter', 'switching.pole_sigma_ms:', setk(B,'switching','pole_sigma_ms','-1'))
add('zero-shots', 'zero switching shots', 'switching.shots:', setk(B,'switching','shots','0'))
add('huge-integer', 'a point count beyond int64', 'line 33: syntax error', setk(B,'scan','points','99999999999999999999'))
add('shunt-at-far', 'a shunt at an end that does not exist', 'shunt[0].at:', setk(B,'shunt','at','"far"'))
add('bad-waveform', 'an unknown waveform name', 'energise.waveform:', setk(B,'energise','waveform','"square"'))
add('trapped-two-phases', 'trapped charge for two phases only', 'switching.trapped_pu', setk(B,'switching','trapped_pu','[0, 0]'))
add('negative-target', 'a negative open-end target', 'targets.max_open_end_pu:', setk(B,'targets','max_open_end_pu','-1'))
add('reversed-lever', 'a lever range given max first', 'levers.reactor_mvar_receiving', setk(B,'levers','reactor_mvar_receiving','[300, 0]'))
add('section-zero-length', 'a section of zero length', 'line.sections[1].length_km:',
    B.replace('[line]\nlength_km = 320\nr_ohm_per_km = 0.025\nl_mh_per_km = 0.95\nc_nf_per_km = 12.0\nr0_ohm_per_km = 0.25\nl0_mh_per_km = 3.0\nc0_nf_per_km = 7.5\n',
     '[[line.sections]]\nlength_km = 300\nr_ohm_per_km = 0.025\nl_mh_per_km = 0.95\nc_nf_per_km = 12.0\n\n[[line.sections]]\nlength_km = 0\nr_ohm_per_km = 0.02\nl_mh_per_km = 0.4\nc_nf_per_km = 210\n'))
add('geometry-negative-resistivity', 'a negative earth resistivity', 'line.geometry.earth_resistivity_ohm_m:',
    B.replace('[line]\nlength_km = 320\nr_ohm_per_km = 0.025\nl_mh_per_km = 0.95\nc_nf_per_km = 12.0\nr0_ohm_per_km = 0.25\nl0_mh_per_km = 3.0\nc0_nf_per_km = 7.5\n',
     '[conductors.main]\nouter_diameter_mm = 30.0\ncore_diameter_mm = 0\ndc_ohm_per_km = 0.05\n\n[line]\nlength_km = 320\n\n[line.geometry]\nearth_resistivity_ohm_m = -100\nphases = [\n  { x_m = -10, height_m = 20, conductor = "main" },\n  { x_m = 0, height_m = 20, conductor = "main" },\n  { x_m = 10, height_m = 20, conductor = "main" },\n]\n'))
add('both-l-and-x', 'inductance and reactance both given', 'line.x_ohm_per_km:', setk(B,'line','x_ohm_per_km','0.3'))
add('both-c-and-b', 'capacitance and susceptance both given', 'line.b_us_per_km:', setk(B,'line','b_us_per_km','3.8'))
add('source-two-ways', 'source given by level and by impedance', 'source.r_ohm:', setk(setk(B,'source','r_ohm','0.9'),'source','l_mh','34'))
add('sections-and-constants', 'sections and per-length constants in [line]', 'line.',
    B.replace('[source]', '[[line.sections]]\nlength_km = 10\nr_ohm_per_km = 0.02\nl_mh_per_km = 0.4\nc_nf_per_km = 210\n\n[source]', 1))
add('geometry-and-constants', 'a geometry and per-length constants both given', 'line.',
    B.replace('[source]', '[line.geometry]\nearth_resistivity_ohm_m = 100\nphases = [\n  { x_m = -10, height_m = 20, conductor = "main" },\n  { x_m = 0, height_m = 20, conductor = "main" },\n  { x_m = 10, height_m = 20, conductor = "main" },\n]\n\n[conductors.main]\nouter_diameter_mm = 30.0\ndc_ohm_per_km = 0.05\n\n[source]', 1))
add('missing-voltage', 'no voltage_kv', 'voltage_kv: missing', setk(B,'','voltage_kv',None))
add('missing-line', 'no [line] table', 'line', rmtable(B,'line'))
add('missing-capacitance', 'no line capacitance', 'line.c_nf_per_km: missing', setk(B,'line','c_nf_per_km',None))
add('missing-shunt-mvar', 'a shunt without its rating', 'shunt[0].mvar: missing', setk(B,'shunt','mvar',None))
add('missing-zero-sequence-c', 'zero sequence without c0', 'line.c0_nf_per_km: missing', setk(B,'line','c0_nf_per_km',None))
add('unknown-key-typo', 'a misspelt key', 'line.lenght_km: unknown key (did you mean "length_km"?)', B.replace('length_km = 320','lenght_km = 320'))
add('unknown-root-typo', 'a misspelt top-level key', 'frequncy_hz: unknown key (did you mean "frequency_hz"?)', B.replace('frequency_hz = 50','frequncy_hz = 50'))
add('unknown-switching-key', 'a misspelt switching key', 'switching.shot: unknown key (did you mean "shots"?)', B.replace('shots = 20','shot = 20'))
add('unknown-table', 'an unknown table', 'transients: unknown key', B + '\n[transients]\nduration_ms = 5\n')
add('syntax-two-values', 'two values on one line', 'line 7: syntax error', B.replace('length_km = 320','length_km = 3 20'))
add('syntax-unclosed-string', 'an unclosed string', 'line 1: syntax error', B.replace('title = "Hostile','title = "Hostile unclosed').replace('320 km line"','320 km line'))
add('syntax-duplicate-key', 'a key given twice', 'line 10: syntax error', B.replace('l_mh_per_km = 0.95\n','l_mh_per_km = 0.95\nr_ohm_per_km = 0.03\n'))
add('syntax-duplicate-table', 'a table given twice', 'line 52: syntax error', B + '\n[line]\nlength_km = 3\n')
add('syntax-bad-utf8', 'a title with invalid UTF-8', 'line 1: syntax error', B.replace('Hostile battery', 'Hostile \udcff battery'))
add('empty', 'a file of zero bytes', 'the study file is empty', '')
add('comments-only', 'a file of comments only', 'the study file is empty', '# a study file with nothing in it\n# not even frequency_hz\n')
add('whitespace-only', 'a file of blank lines', 'the study file is empty', '\n\n   \n\t\n')
add('scan-points-cap', 'scan points beyond 1,000,000', 'scan.points:', setk(B,'scan','points','1000001'))
add('energise-samples-cap', 'energisation samples beyond 10,000,000', 'energise.time_step_us:', setk(setk(B,'energise','duration_ms','1000'),'energise','time_step_us','0.01'))
add('switching-samples-cap', 'switching samples beyond 10,000,000', 'switching.time_step_us:', setk(setk(B,'switching','duration_ms','1000'),'switching','time_step_us','0.01'))
add('switching-shots-cap', 'shots beyond 100,000', 'switching.shots:', setk(B,'switching','shots','100001'))
add('scan-points-one', 'a scan of one point', 'scan.points:', setk(B,'scan','points','1'))
add('us-below-nominal', 'a highest voltage below the nominal', 'us_kv:', setk(B,'','us_kv','300'))
add('scan-range-reversed', 'f_min_hz above f_max_hz', 'scan.f_', setk(B,'scan','f_min_hz','3000'))
# issue 15: values that passed "> 0" but broke the numerics, and impossible constants
add('subnormal-resistance', 'a subnormal series resistance', 'line.r_ohm_per_km: must be 0 or between 1e-06 and 1000, got 1e-320', setk(B,'line','r_ohm_per_km','1e-320'))
add('subnormal-inductance', 'a subnormal inductance', 'line.l_mh_per_km: must be between 0.0001 and 100, got 1e-320', setk(B,'line','l_mh_per_km','1e-320'))
add('subnormal-capacitance', 'a subnormal capacitance', 'line.c_nf_per_km: must be between 0.001 and 10000, got 1e-320', setk(B,'line','c_nf_per_km','1e-320'))
add('subnormal-frequency', 'a subnormal system frequency', 'frequency_hz: must be between 1 and 10000, got 1e-320', setk(B,'','frequency_hz','1e-320'))
add('subnormal-scan-f-min', 'a subnormal scan start', 'scan.f_min_hz: must be between 0.001 and 1e+07, got 1e-320', setk(B,'scan','f_min_hz','1e-320'))
add('faster-than-light', 'a capacitance in uF/km in the nF/km key', 'line.c_nf_per_km: the positive-sequence wave velocity 1/sqrt(LC) = 1.088e+07 km/s = 36.28 c', setk(B,'line','c_nf_per_km','0.0089'))
for old in glob.glob(os.path.join(out, '[0-9][0-9]-*.toml')):
    os.remove(old)
for i, (name, what, want, src) in enumerate(files, 1):
    fn = os.path.join(out, '%02d-%s.toml' % (i, name))
    if src.strip() == '':
        data = src  # the header would make it a non-empty file
    else:
        hdr = '# want: %s\n' % want  # the test reads this line
        data = src
        # keep syntax-error line numbers stable: the header goes last as a comment
        data = data.rstrip('\n') + '\n' + hdr
    with open(fn, 'wb') as f:
        f.write(data.encode('utf-8', 'surrogateescape'))
