#!/usr/bin/env python3
"""Writes the bad import fixtures of isochore-data, one fault each, and expected.json: for
every file, the fragments its error message must contain (file, line, column and what would
be accepted). Messages are the importer's own wording (issue 3 asks for file, line, column).
All data are invented. Run from this folder: python3 make_bad.py
"""
import json, os

HERE = os.path.dirname(os.path.abspath(__file__))
GOOD = "10,250\n20,198\n30,160\n40,131\n"
cases = {}


def bad(name, content, *fragments):
    data = content if isinstance(content, bytes) else content.encode("utf-8")
    with open(os.path.join(HERE, name), "wb") as f:
        f.write(data)
    cases[name] = [name + ":"] + list(fragments)


bad("empty.csv", b"", "the file is empty")
bad("only_comments.csv", "# nothing measured yet\n\n# really nothing\n", "the file is empty")
bad("header_only.csv", "T (°C),K\n", "line 1 is a header but no data rows follow")
bad("one_row.csv", "T (°C),K\n25,100\n", "data set 'one_row' has 1 usable point; at least 3 are needed")
bad("text_in_number.csv", "T (°C),K\n10,250\n20,abc\n30,160\n40,131\n",
    "line 3, column 2 ('K'): 'abc' is not a number")
bad("k_zero.csv", "T (°C),K\n10,250\n20,198\n30,0\n40,131\n",
    "line 4, column 2 ('K'): '0' is zero or negative")
bad("k_negative.csv", "T (°C),K\n10,250\n20,-198\n30,160\n40,131\n",
    "line 3, column 2 ('K'): '-198' is zero or negative")
bad("kd_negative.csv", "T (°C),Kd (nM)\n10,25\n20,30\n30,-1\n40,45\n",
    "line 4, column 2 ('Kd (nM)'): '-1' is zero or negative")
bad("minus_300_celsius.csv", "T (°C),K\n10,250\n-300,198\n30,160\n40,131\n",
    "line 3, column 1 ('T (°C)'): '-300' is -26.85 K, at or below absolute zero")
bad("negative_kelvin.csv", "T/K,pKa\n280,7.5\n290,7.4\n-5,7.3\n310,7.2\n",
    "line 4, column 1 ('T/K'): '-5' is -5.00 K, at or below absolute zero")
bad("nan.csv", "T (°C),K\n10,250\n20,NaN\n30,160\n40,131\n",
    "line 3, column 2 ('K'): 'NaN' is not a finite number")
bad("inf.csv", "T (°C),log K\n10,2.4\n20,inf\n30,2.2\n40,2.1\n",
    "line 3, column 2 ('log K'): 'inf' is not a finite number")
bad("ragged.csv", "T (°C),K,note\n10,250,\n20,198,a,b\n30,160,\n40,131,\n",
    "line 3: the row has 4 cells but the header has 3")
bad("one_temperature.csv", "T (°C),K\n25,250\n25,198\n25,160\n",
    "every point is at one temperature (298.15 K)")
bad("duplicate_header.csv", "T (°C),K,K\n10,250,1\n20,198,1\n30,160,1\n",
    "line 1, column 3 ('K'): the same header as column 2")
bad("sigma_zero.csv", "T (°C),pKa,u(pKa)\n10,7.5,0.01\n20,7.4,0\n30,7.3,0.01\n40,7.2,0.01\n",
    "line 3, column 3 ('u(pKa)'): '0' is zero or negative; an uncertainty must be greater than 0")
bad("sigma_negative.csv", "T (°C),pKa,u(pKa)\n10,7.5,0.01\n20,7.4,0.01\n30,7.3,-0.01\n40,7.2,0.01\n",
    "line 4, column 3 ('u(pKa)'): '-0.01' is zero or negative")
bad("nul_bytes.csv", b"T (\xc2\xb0C),K\n10,2\x0050\n20,198\n30,160\n",
    "line 2, character 5: a NUL byte")
bad("binary_image.png", b"\x89PNG\r\n\x1a\n\x00\x00\x00\rIHDR\x00\x00\x00\x10", "a NUL byte", "save it as CSV text")
bad("ten_thousand_columns.csv", ",".join(f"c{i}" for i in range(10000)) + "\n" + GOOD,
    "line 1 has at least 257 columns, more than the limit of 256")
bad("very_long_line.csv", "T (°C),K,note\n10,250,\n20,198," + "x" * 70000 + "\n30,160,\n",
    "line 3 is 70007 bytes long, more than the limit of 65536")
bad("unknown_temperature_unit.csv", "T (°R),K\n" + GOOD,
    "line 1, column 1 ('T (°R)'): unknown unit '°R'", "K, °C")
bad("unknown_concentration_unit.csv", "T (°C),Kd (mg/mL)\n" + GOOD,
    "line 1, column 2 ('Kd (mg/mL)'): unknown unit 'mg/mL'", "µM")
bad("kd_without_unit.csv", "T (°C),Kd\n" + GOOD,
    "line 1, column 2 ('Kd'): a dissociation constant needs its concentration unit")
bad("dg_without_unit.csv", "T (°C),dG\n10,-20\n20,-21\n30,-22\n",
    "line 1, column 2 ('dG'): a Gibbs energy needs its unit")
bad("no_temperature_column.csv", "pKa,u(pKa)\n7.5,0.01\n7.4,0.01\n7.3,0.01\n",
    "line 1: no temperature column among the headers 'pKa', 'u(pKa)'")
bad("two_quantity_columns.csv", "T (°C),pKa1,pKa2\n10,4.8,9.9\n20,4.7,9.8\n30,4.6,9.7\n",
    "line 1: more than one measured quantity column: column 2 ('pKa1'), column 3 ('pKa2')")
bad("temperature_unit_unclear.csv", "T,K\n100,250\n180,198\n250,160\n",
    "line 1, column 1 ('T'): the temperature has no unit and its values (100 to 250) do not tell °C from K")
bad("uncertainty_of_other_quantity.csv", "T/K,pKa,sd_Kd (nM)\n280,7.5,1\n290,7.4,1\n300,7.3,1\n",
    "line 1, column 3 ('sd_Kd (nM)'): this uncertainty is of K_d (nM) but the measured column holds pK")
bad("header_without_line_break.csv", "T (°C),K", "line 1 is a header but no data rows follow")
bad("comment_then_header_only.csv", "# run 4\n\nT (°C);pKa\n",
    "line 3 is a header but no data rows follow")

with open(os.path.join(HERE, "expected.json"), "w", encoding="utf-8") as f:
    json.dump(cases, f, indent=1, ensure_ascii=False)
    f.write("\n")
print(len(cases), "bad files")
