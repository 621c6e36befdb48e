#!/usr/bin/env python3
"""Writes the good import fixtures of isochore-data and, beside each, the values the importer
must produce (<file>.expected.json).

The expected values are computed here, independently of the Rust code, from the definitions:
  T/K = t/°C + 273.15 and T/K = (t/°F + 459.67) × 5/9        (SI Brochure, 9th ed.; NIST SP 811)
  pK = −lg K, so ln K = −pK · ln 10; log K: ln K = lg K · ln 10 (IUPAC Green Book, 3rd ed.)
  ΔG° = −RT ln K, R = 8.314462618 J mol⁻¹ K⁻¹                  (CODATA 2018, exact in the 2019 SI)
  1 cal (thermochemical) = 4.184 J                            (NIST SP 811, exact)
  K = c°/K_d with c° = 1 mol/L (association sense)            (IUPAC Green Book, standard state)
  σ(ln K) by first-order propagation: σ/value for K and K_d, σ·ln 10 for lg K and pK,
  σ/(RT) for ΔG°                                              (GUM, JCGM 100:2008, eq. 10)
All data are invented. Run from this folder: python3 make_fixtures.py
"""
import json, math, os

R = 8.314462618
LN10 = math.log(10)
CONC = {"M": 1.0, "mM": 1e-3, "µM": 1e-6, "uM": 1e-6, "nM": 1e-9, "pM": 1e-12}
ENERGY = {"kJ/mol": 1e3, "kcal/mol": 4184.0, "J/mol": 1.0}
HERE = os.path.dirname(os.path.abspath(__file__))


def to_k(t, unit):
    return {"C": t + 273.15, "K": t, "F": (t + 459.67) * 5.0 / 9.0}[unit]


def ln_k(kind, v, T):
    k, u = kind
    if k == "K":
        return math.log(v)
    if k == "lnK":
        return v
    if k == "log":
        return v * LN10
    if k == "pK":
        return -v * LN10
    if k == "Kd":
        return -math.log(v * CONC[u])
    if k == "dG":
        return -v * ENERGY[u] / (R * T)
    raise ValueError(k)


def sigma_ln_k(kind, v, s, T, s_unit=None, relative=False):
    k, u = kind
    if relative:
        s = abs(v) * s / 100.0
    elif s_unit is not None:  # uncertainty in another unit of the same family
        s = s * (CONC.get(s_unit) or ENERGY[s_unit]) / (CONC.get(u) or ENERGY[u])
    if k in ("K", "Kd"):
        return s / v
    if k == "lnK":
        return s
    if k in ("log", "pK"):
        return s * LN10
    if k == "dG":
        return s * ENERGY[u] / (R * T)
    raise ValueError(k)


def write(name, text, expected, encoding="utf-8", bom=False):
    data = text.encode(encoding)
    if bom and encoding == "utf-8":
        data = b"\xef\xbb\xbf" + data
    if encoding == "utf-16-le":
        data = b"\xff\xfe" + data
    with open(os.path.join(HERE, name), "wb") as f:
        f.write(data)
    with open(os.path.join(HERE, name + ".expected.json"), "w", encoding="utf-8") as f:
        json.dump(expected, f, indent=1, ensure_ascii=False)
        f.write("\n")


def rows_of(series_rows):
    return [{"line": l, "t_k": t, "ln_k": lk, "sigma_ln_k": s, "note": n} for (l, t, lk, s, n) in series_rows]


# 1. comma, °C in parentheses, K_d in nM with sd in µM, quoted note with a comma, CRLF.
lines = ["T (°C),Kd (nM),sd_Kd (µM),note"]
data = [(10.0, 64.96, 0.00325, ""), (17.5, 92.91, 0.0065, "\"fresh buffer, new lot\""), (25.0, 131.2, 0.0089, ""), (32.5, 180.4, 0.0121, "ok")]
rows = []
for i, (t, kd, sd, note) in enumerate(data):
    lines.append(f"{t},{kd},{sd},{note}")
    T = to_k(t, "C")
    rows.append((i + 2, T, ln_k(("Kd", "nM"), kd, T), sigma_ln_k(("Kd", "nM"), kd, sd, T, s_unit="µM"), note.strip('"') or None))
write("comma_celsius_kd_crlf.csv", "\r\n".join(lines) + "\r\n", {
    "delimiter": "comma", "decimal_comma": False, "headers": ["T (°C)", "Kd (nM)", "sd_Kd (µM)", "note"],
    "temperature": {"column": 0, "unit": "celsius", "assumed": False},
    "quantity": {"column": 1, "label": "K_d (nM)"}, "uncertainty": {"column": 2, "relative": False},
    "series": [{"name": "comma_celsius_kd_crlf", "rows": rows_of(rows)}], "rejected": []})

# 2. semicolon, decimal comma, UTF-8 byte-order mark, pKa with u(pKa), a comment line.
lines = ["# invented acid, titration at five temperatures", "T (°C);pKa;u(pKa)"]
data = [(5, "7,6194", "0,008"), (15, "7,4470", "0,012"), (25, "7,2836", "0,010"), (35, "7,1290", "0,015"), (45, "6,9821", "0,020")]
rows = []
for i, (t, pka, u) in enumerate(data):
    lines.append(f"{t};{pka};{u}")
    T = to_k(t, "C")
    v, s = float(pka.replace(",", ".")), float(u.replace(",", "."))
    rows.append((i + 3, T, ln_k(("pK", None), v, T), sigma_ln_k(("pK", None), v, s, T), None))
write("semicolon_decimal_comma_bom.csv", "\n".join(lines) + "\n", {
    "delimiter": "semicolon", "decimal_comma": True, "headers": ["T (°C)", "pKa", "u(pKa)"],
    "temperature": {"column": 0, "unit": "celsius", "assumed": False},
    "quantity": {"column": 1, "label": "pK"}, "uncertainty": {"column": 2, "relative": False},
    "series": [{"name": "semicolon_decimal_comma_bom", "rows": rows_of(rows)}], "rejected": []}, bom=True)

# 3. tab (pasted from a spreadsheet), kelvin in brackets, log K with σ(log K).
lines = ["Temperature [K]\tlog K\tσ(log K)"]
data = [(278.15, 5.012, 0.02), (288.15, 4.871, 0.02), (298.15, 4.742, 0.03), (308.15, 4.623, 0.03)]
rows = []
for i, (T, lk, s) in enumerate(data):
    lines.append(f"{T}\t{lk}\t{s}")
    rows.append((i + 2, T, ln_k(("log", None), lk, T), sigma_ln_k(("log", None), lk, s, T), None))
write("tab_kelvin_logk.tsv", "\n".join(lines) + "\n", {
    "delimiter": "tab", "decimal_comma": False, "headers": ["Temperature [K]", "log K", "σ(log K)"],
    "temperature": {"column": 0, "unit": "kelvin", "assumed": False},
    "quantity": {"column": 1, "label": "log₁₀ K"}, "uncertainty": {"column": 2, "relative": False},
    "series": [{"name": "tab_kelvin_logk", "rows": rows_of(rows)}], "rejected": []})

# 4. whitespace-aligned instrument output, T/K and ln K, comments and a blank line.
lines = ["# exported by an invented instrument", "T/K      ln K      sigma_lnK", "", "283.15   9.210     0.05", "# lamp changed", "293.15   8.902     0.05", "303.15   8.613     0.06", "313.15   8.341     0.06"]
pts = [(4, 283.15, 9.210, 0.05), (6, 293.15, 8.902, 0.05), (7, 303.15, 8.613, 0.06), (8, 313.15, 8.341, 0.06)]
rows = [(l, T, v, s, None) for (l, T, v, s) in pts]
write("whitespace_instrument.txt", "\n".join(lines) + "\n", {
    "delimiter": "whitespace", "decimal_comma": False, "headers": ["T/K", "ln K", "sigma_lnK"],
    "temperature": {"column": 0, "unit": "kelvin", "assumed": False},
    "quantity": {"column": 1, "label": "ln K"}, "uncertainty": {"column": 2, "relative": False},
    "series": [{"name": "whitespace_instrument", "rows": rows_of(rows)}], "rejected": []})

# 5. latin-1 bytes: degree and micro signs not valid UTF-8.
lines = ["T (°C),Kd (µM)"]
data = [(4.0, 12.5), (12.0, 15.1), (20.0, 19.8), (28.0, 26.0)]
rows = []
for i, (t, kd) in enumerate(data):
    lines.append(f"{t},{kd}")
    T = to_k(t, "C")
    rows.append((i + 2, T, ln_k(("Kd", "µM"), kd, T), None, None))
write("latin1_degree_micro.csv", "\n".join(lines) + "\n", {
    "delimiter": "comma", "decimal_comma": False, "headers": ["T (°C)", "Kd (µM)"],
    "temperature": {"column": 0, "unit": "celsius", "assumed": False},
    "quantity": {"column": 1, "label": "K_d (µM)"}, "uncertainty": None,
    "series": [{"name": "latin1_degree_micro", "rows": rows_of(rows)}], "rejected": []}, encoding="latin-1")

# 6. UTF-16 little endian with byte-order mark (a spreadsheet's "Unicode text"), tabs.
lines = ["T/K\tKeq"]
data = [(290.0, 3.2e-5), (300.0, 4.1e-5), (310.0, 5.3e-5)]
rows = []
for i, (T, k) in enumerate(data):
    lines.append(f"{T}\t{k}")
    rows.append((i + 2, T, ln_k(("K", None), k, T), None, None))
write("utf16le_tab.txt", "\r\n".join(lines) + "\r\n", {
    "delimiter": "tab", "decimal_comma": False, "headers": ["T/K", "Keq"],
    "temperature": {"column": 0, "unit": "kelvin", "assumed": False},
    "quantity": {"column": 1, "label": "K"}, "uncertainty": None,
    "series": [{"name": "utf16le_tab", "rows": rows_of(rows)}], "rejected": []}, encoding="utf-16-le")

# 7. ΔG after a slash in kJ mol-1, ± column in kJ/mol.
lines = ["T/K,ΔG/kJ mol-1,± (kJ/mol)"]
data = [(288.15, -32.10, 0.20), (298.15, -32.85, 0.20), (308.15, -33.52, 0.25), (318.15, -34.11, 0.25)]
rows = []
for i, (T, g, s) in enumerate(data):
    lines.append(f"{T},{g},{s}")
    rows.append((i + 2, T, ln_k(("dG", "kJ/mol"), g, T), sigma_ln_k(("dG", "kJ/mol"), g, s, T), None))
write("slash_units_dg_kj.csv", "\n".join(lines) + "\n", {
    "delimiter": "comma", "decimal_comma": False, "headers": ["T/K", "ΔG/kJ mol-1", "± (kJ/mol)"],
    "temperature": {"column": 0, "unit": "kelvin", "assumed": False},
    "quantity": {"column": 1, "label": "ΔG° (kJ/mol)"}, "uncertainty": {"column": 2, "relative": False},
    "series": [{"name": "slash_units_dg_kj", "rows": rows_of(rows)}], "rejected": []})

# 8. Underscore units: temp_C, dG_kcal... written as dG (kcal/mol) and err_dG; Unicode minus.
lines = ["temp_C,dG (kcal/mol),err_dG"]
data = [(15.0, "−7.62", 0.05), (25.0, "−7.80", 0.05), (35.0, "−7.95", 0.06)]
rows = []
for i, (t, g, s) in enumerate(data):
    lines.append(f"{t},{g},{s}")
    T = to_k(t, "C")
    gv = float(g.replace("−", "-"))
    rows.append((i + 2, T, ln_k(("dG", "kcal/mol"), gv, T), sigma_ln_k(("dG", "kcal/mol"), gv, s, T), None))
write("underscore_celsius_dg_kcal.csv", "\n".join(lines) + "\n", {
    "delimiter": "comma", "decimal_comma": False, "headers": ["temp_C", "dG (kcal/mol)", "err_dG"],
    "temperature": {"column": 0, "unit": "celsius", "assumed": False},
    "quantity": {"column": 1, "label": "ΔG° (kcal/mol)"}, "uncertainty": {"column": 2, "relative": False},
    "series": [{"name": "underscore_celsius_dg_kcal", "rows": rows_of(rows)}], "rejected": []})

# 9. Underscore units everywhere: temp_K, Kd_pM, sigma_Kd_pM.
lines = ["temp_K,Kd_pM,sigma_Kd_pM"]
data = [(277.15, 850.0, 40.0), (287.15, 1200.0, 50.0), (297.15, 1710.0, 80.0), (307.15, 2400.0, 120.0)]
rows = []
for i, (T, kd, s) in enumerate(data):
    lines.append(f"{T},{kd},{s}")
    rows.append((i + 2, T, ln_k(("Kd", "pM"), kd, T), sigma_ln_k(("Kd", "pM"), kd, s, T), None))
write("underscore_kelvin_kd_pm.csv", "\n".join(lines) + "\n", {
    "delimiter": "comma", "decimal_comma": False, "headers": ["temp_K", "Kd_pM", "sigma_Kd_pM"],
    "temperature": {"column": 0, "unit": "kelvin", "assumed": False},
    "quantity": {"column": 1, "label": "K_d (pM)"}, "uncertainty": {"column": 2, "relative": False},
    "series": [{"name": "underscore_kelvin_kd_pm", "rows": rows_of(rows)}], "rejected": []})

# 10. Two data sets in one file, replicates, relative σ in %.
lines = ["sample,T (°C),K,sd (%)"]
data = [("wild type", 10, 2.10e4, 5), ("wild type", 10, 2.30e4, 5), ("wild type", 20, 1.50e4, 4), ("mutant A", 10, 8.0e3, 6),
        ("wild type", 30, 1.05e4, 4), ("mutant A", 20, 6.1e3, 6), ("mutant A", 30, 4.9e3, 6), ("mutant A", 30, 5.1e3, 6)]
series = {}
for i, (name, t, k, p) in enumerate(data):
    lines.append(f"{name},{t},{k},{p}")
    T = to_k(t, "C")
    series.setdefault(name, []).append((i + 2, T, ln_k(("K", None), k, T), sigma_ln_k(("K", None), k, p, T, relative=True), None))
# Averaged replicates: inverse-variance weighted mean of ln K, σ = 1/sqrt(Σw) (GUM-consistent
# weighted mean of independent estimates); mean temperature.
averaged = {}
for name, rs in series.items():
    groups = []
    for r in sorted(rs, key=lambda r: r[1]):
        if groups and abs(r[1] - groups[-1][0][1]) <= 0.05:
            groups[-1].append(r)
        else:
            groups.append([r])
    out = []
    for g in sorted(groups, key=lambda g: min(r[0] for r in g)):
        w = [1 / r[3] ** 2 for r in g]
        m = sum(wi * r[2] for wi, r in zip(w, g)) / sum(w)
        out.append({"t_k": sum(r[1] for r in g) / len(g), "ln_k": m, "sigma_ln_k": 1 / math.sqrt(sum(w)), "rows": len(g)})
    averaged[name] = out
write("series_replicates_relative.csv", "\n".join(lines) + "\n", {
    "delimiter": "comma", "decimal_comma": False, "headers": ["sample", "T (°C)", "K", "sd (%)"],
    "temperature": {"column": 1, "unit": "celsius", "assumed": False},
    "quantity": {"column": 2, "label": "K"}, "uncertainty": {"column": 3, "relative": True}, "series_column": 0,
    "series": [{"name": n, "rows": rows_of(rs)} for n, rs in series.items()], "rejected": [],
    "averaged": averaged})

# 11. A quoted note that runs over two lines, so later line numbers shift.
lines = ["T (°C),pKw,note", "10,14.535,", "20,14.167,\"remeasured:", "electrode drift\"", "30,13.833,", "40,13.535,last"]
pts = [(2, 10, 14.535, None), (3, 20, 14.167, "remeasured:\nelectrode drift"), (5, 30, 13.833, None), (6, 40, 13.535, "last")]
rows = [(l, to_k(t, "C"), ln_k(("pK", None), v, 0), None, n) for (l, t, v, n) in pts]
write("quoted_multiline_note.csv", "\n".join(lines) + "\n", {
    "delimiter": "comma", "decimal_comma": False, "headers": ["T (°C)", "pKw", "note"],
    "temperature": {"column": 0, "unit": "celsius", "assumed": False},
    "quantity": {"column": 1, "label": "pK"}, "uncertainty": None,
    "series": [{"name": "quoted_multiline_note", "rows": rows_of(rows)}], "rejected": []})

# 12. No temperature unit, values below 150: read as °C (rule in the crate README).
lines = ["T,lgK", "5,3.10", "15,2.95", "25,2.81", "35,2.69"]
rows = [(i + 2, to_k(t, "C"), ln_k(("log", None), v, 0), None, None) for i, (t, v) in enumerate([(5, 3.10), (15, 2.95), (25, 2.81), (35, 2.69)])]
write("no_unit_celsius.csv", "\n".join(lines) + "\n", {
    "delimiter": "comma", "decimal_comma": False, "headers": ["T", "lgK"],
    "temperature": {"column": 0, "unit": "celsius", "assumed": True},
    "quantity": {"column": 1, "label": "log₁₀ K"}, "uncertainty": None,
    "series": [{"name": "no_unit_celsius", "rows": rows_of(rows)}], "rejected": []})

# 13. No temperature unit, values of 200 and more: read as K.
lines = ["temperature,pKa2", "283.15,10.49", "298.15,10.33", "313.15,10.17"]
rows = [(i + 2, T, ln_k(("pK", None), v, 0), None, None) for i, (T, v) in enumerate([(283.15, 10.49), (298.15, 10.33), (313.15, 10.17)])]
write("no_unit_kelvin.csv", "\n".join(lines) + "\n", {
    "delimiter": "comma", "decimal_comma": False, "headers": ["temperature", "pKa2"],
    "temperature": {"column": 0, "unit": "kelvin", "assumed": True},
    "quantity": {"column": 1, "label": "pK"}, "uncertainty": None,
    "series": [{"name": "no_unit_kelvin", "rows": rows_of(rows)}], "rejected": []})

# 14. Fahrenheit and a pipe delimiter.
lines = ["T (°F)|Ka (M-1)", "50|1.2e5", "68|9.1e4", "86|7.0e4", "104|5.5e4"]
rows = [(i + 2, to_k(t, "F"), ln_k(("K", None), v, 0), None, None) for i, (t, v) in enumerate([(50, 1.2e5), (68, 9.1e4), (86, 7.0e4), (104, 5.5e4)])]
write("pipe_fahrenheit_ka.txt", "\n".join(lines) + "\n", {
    "delimiter": "pipe", "decimal_comma": False, "headers": ["T (°F)", "Ka (M-1)"],
    "temperature": {"column": 0, "unit": "fahrenheit", "assumed": False},
    "quantity": {"column": 1, "label": "K"}, "uncertainty": None,
    "series": [{"name": "pipe_fahrenheit_ka", "rows": rows_of(rows)}], "rejected": []})

# 15. Good rows kept, bad rows listed: text, NaN, K = 0, a ragged row, a blank row of commas.
lines = ["T (°C),K,note", "10,250,", "15,abc,typo", "20,198,", ",,", "25,NaN,", "30,160,", "35,0,", "40,131,", "45,120,extra,cells"]
good = [(2, 10, 250), (4, 20, 198), (7, 30, 160), (9, 40, 131)]
rows = [(l, to_k(t, "C"), ln_k(("K", None), k, 0), None, None) for (l, t, k) in good]
write("mixed_good_and_bad_rows.csv", "\n".join(lines) + "\n", {
    "delimiter": "comma", "decimal_comma": False, "headers": ["T (°C)", "K", "note"],
    "temperature": {"column": 0, "unit": "celsius", "assumed": False},
    "quantity": {"column": 1, "label": "K"}, "uncertainty": None,
    "series": [{"name": "mixed_good_and_bad_rows", "rows": rows_of(rows)}],
    "rejected": [{"line": 3, "column": 2}, {"line": 6, "column": 2}, {"line": 8, "column": 2}, {"line": 10, "column": None}]})

# 16. K_d in µM written as uM and "Kd / µM" spacing with sd in nM; trailing delimiters.
lines = ["Kd / µM,T/K,sd_Kd (nM),", "3.2,280,150,", "4.4,290,210,", "6.1,300,300,", "8.3,310,420,"]
rows = []
for i, (kd, T, s) in enumerate([(3.2, 280, 150), (4.4, 290, 210), (6.1, 300, 300), (8.3, 310, 420)]):
    rows.append((i + 2, float(T), ln_k(("Kd", "µM"), kd, T), sigma_ln_k(("Kd", "µM"), kd, s, T, s_unit="nM"), None))
write("trailing_delimiter_kd_first.csv", "\n".join(lines) + "\n", {
    "delimiter": "comma", "decimal_comma": False, "headers": ["Kd / µM", "T/K", "sd_Kd (nM)", ""],
    "temperature": {"column": 1, "unit": "kelvin", "assumed": False},
    "quantity": {"column": 0, "label": "K_d (µM)"}, "uncertainty": {"column": 2, "relative": False},
    "series": [{"name": "trailing_delimiter_kd_first", "rows": rows_of(rows)}], "rejected": []})

# 17. A first line "sep=;" naming the delimiter (written by some spreadsheet programs).
lines = ["sep=;", "T (°C);K (M-1)", "10;1,5e4", "20;1,1e4", "30;8,2e3"]
rows = [(i + 3, to_k(t, "C"), ln_k(("K", None), k, 0), None, None) for i, (t, k) in enumerate([(10, 1.5e4), (20, 1.1e4), (30, 8.2e3)])]
write("excel_sep_line.csv", "\r\n".join(lines) + "\r\n", {
    "delimiter": "semicolon", "decimal_comma": True, "headers": ["T (°C)", "K (M-1)"],
    "temperature": {"column": 0, "unit": "celsius", "assumed": False},
    "quantity": {"column": 1, "label": "K"}, "uncertainty": None,
    "series": [{"name": "excel_sep_line", "rows": rows_of(rows)}], "rejected": []})
