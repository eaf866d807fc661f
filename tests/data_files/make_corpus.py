#!/usr/bin/env python3
"""Write the hostile and awkward data files that tests/data_files.rs reads.

    /path/to/venv/bin/python tests/data_files/make_corpus.py

Text files are written byte for byte from the literals below. The
spreadsheets come from openpyxl (.xlsx) and odfpy (.ods); the versions used
are written to tests/data_files/VERSIONS.txt. Every scenario is invented (a
fictional clinic, "Harbour Street Clinic"; a fictional company, "Tarn
Bakery"). Re-running rewrites every file with the same bytes, except the
spreadsheets' embedded timestamps.
"""
import importlib.metadata
import io
import os
import sys
import zipfile

HERE = os.path.dirname(os.path.abspath(__file__))


def w(name, data):
    if isinstance(data, str):
        data = data.encode("utf-8")
    with open(os.path.join(HERE, name), "wb") as f:
        f.write(data)


# ---- text files -----------------------------------------------------------
w("empty.csv", b"")
w("whitespace_only.csv", "\n\n   \n\n")
w("header_only.csv", "weight_kg,ward\n")
w("one_row.csv", "weight_kg,ward\n71.5,North\n")
w("one_value.csv", "42")
w("bom.csv", "\ufeffscore\n3\n5\n4\n")
w("crlf.csv", "visit,systolic\r\n1,128\r\n2,131\r\n\r\n3,125\r\n")
w("cr_only.csv", "visit,systolic\r1,128\r2,131\r3,125\r")
w("no_trailing_newline.csv", "minutes\n12\n15\n11")
w("blank_lines.csv", "minutes\n\n12\n\n\n15\n11\n\n")
w("semicolon_decimal_comma.csv", "Gewicht;Station\n71,5;Nord\n68,25;Süd\n80,0;Nord\n")
w("single_column_decimal_comma.csv", "Gewicht\n71,5\n68,25\n80\n")
w("pasted_column.txt", "12.5\n14\n11.25\n")
w("tab.tsv", "ward\tminutes\nNorth\t12.5\nSouth\t14\nNorth\t9.75\n")
w("pipe.txt", "ward|minutes\nNorth|12.5\nSouth|14\nNorth|9.75\n")
w("quoted_newlines.csv", 'id,comment,minutes\n1,"waited\nin the hall",12\n2,"fine",15\n3,"two\nline\nbreaks",11\n4,ok,9\n')
w("quoted_delimiters.csv", 'name,remark,score\n"Ng, A.","said ""fine""",7\n"Lee, B.","a;b|c",8\n')
w("thousands_point_decimal.csv", 'salary\n"1,234.50"\n"12,000.00"\n"950.25"\n"1,000,000.75"\n')
w("thousands_comma_decimal.csv", "Gehalt;Abteilung\n1.234,50;A\n12.000,00;B\n950,25;A\n1.000.000,75;B\n")
w("thousands_space.csv", "salaire\n1 234,50\n12 000,00\n950,25\n")
w("na_variants.csv", "value\n1.5\nNA\nN/A\nNaN\n.\n-\n\nna\n NA \n2.5\n")
w("custom_missing.csv", "score\n4\n-99\n6\n-99\n5\n")
w("unicode_headers.csv", "Größe (cm),体重 kg,Ölçüm ü,émoji 🙂\n170,65.5,1,a\n182,80.25,2,b\n")
w("html_in_cells.csv",
  '<img src=x onerror=alert(1)>,<script>alert("x")</script>,score\n'
  '<b>bold</b>,"<a href=""javascript:alert(1)"">x</a>",3\n'
  '&amp; &lt;,</td></tr>,4\n')
w("binary_renamed.csv", b"\x89PNG\r\n\x1a\n\x00\x00\x00\rIHDR\x00\x00\x00\x01\x00\x00\x00\x01\x08\x06\x00\x00\x00\x1f\x15\xc4\x89")
w("latin1.csv", "Größe;Maß\n170;1,5\n182;2,5\n".encode("latin-1"))
w("utf16.csv", "score\n1\n2\n".encode("utf-16"))
w("ragged_short.csv", "a,b,c\n1,2,3\n4,5\n6,7,8\n")
w("ragged_long.csv", "a,b\n1,2\n3,4,99\n5,6\n")
w("trailing_delimiter.csv", "a,b,\n1,2,\n3,4,\n")
w("unmatched_quote.csv", 'a,b\n1,2\n"3,4\n5,6\n7,8\n')
w("mixed_delimiters.csv", "a,b\n1,2\n3;4\n5,6\n7,8\n")
w("one_group.csv", "score,arm\n5.1,treated\n4.8,treated\n5.5,treated\n")
w("sd_zero.csv", "score,arm\n5,A\n5,A\n5,A\n5,A\n5,B\n6,B\n7,B\n")
w("no_header_numbers.csv", "1,2\n3,4\n5,6\n")
w("all_text_no_header.csv", "North,yes\nSouth,no\nNorth,yes\n")
w("all_text_header.csv", "ward,cured\nNorth,yes\nSouth,no\nNorth,yes\n")
w("scientific.csv", "x\n1e-3\n2.5E+2\n-3.1e1\n")
w("signs.csv", "x\n-1.5\n+2\n\u22123\n")
w("spaces_around.csv", "x , y\n 1.5 , 2 \n3 ,  4\n")
w("quoted_numbers.csv", 'x,y\n"1.5","2"\n"3","4.25"\n')
w("long_field.csv", "note,x\n\"" + "long text " * 10000 + "\",1\nshort,2\n")
w("empty_column.csv", "x,unused\n1,NA\n2,\n3,NA\n")
w("duplicate_headers.csv", "x,x\n1,2\n3,4\n")
w("numeric_header.csv", "2019,2020\n1,2\n3,4\n")
w("infinite_values.csv", "x\n1\ninf\nInfinity\n2\n3\n")
w("bad_cells.csv", "patient,weight_kg\n1,71.5\n2,seventy\n3,68\n4,80.2kg\n5,77\n")
w("binary_outcome.csv", "arm,cured\ntreated,yes\ntreated,yes\ntreated,no\ncontrol,no\ncontrol,yes\ncontrol,no\ncontrol,NA\n")
w("paired.csv", "patient,before,after\n1,140,132\n2,151,NA\n3,138,135\n4,NA,128\n5,145,139\n6,160,150\n")
w("legacy.xls", b"\xd0\xcf\x11\xe0\xa1\xb1\x1a\xe1" + b"\x00" * 504)
w("not_really.xlsx", "weight\n1\n2\n")
w("two_groups.csv",
  "arm;minutes\nA;12,5\nA;14,0\nA;11,25\nA;13,5\nB;15,0\nB;16,25\nB;14,75\nB;17,5\n")

# ---- spreadsheets ---------------------------------------------------------
import openpyxl  # noqa: E402
import odf  # noqa: E402
from odf.opendocument import OpenDocumentSpreadsheet  # noqa: E402
from odf.table import Table, TableRow, TableCell  # noqa: E402
from odf.text import P  # noqa: E402

SHEET1 = [["arm", "minutes", "note"],
          ["A", 12.5, "first"],
          ["A", 14, None],
          ["B", 15.25, "<b>x</b>"],
          ["B", "16,5", "typed as text"],
          ["B", "n/a", "missing"]]
SHEET2 = [["dose", "response"], [1, 0.5], [2, 0.9], [3, 1.4]]

wb = openpyxl.Workbook()
ws = wb.active
ws.title = "Waiting times"
for r in SHEET1:
    ws.append(r)
ws2 = wb.create_sheet("Dose")
for r in SHEET2:
    ws2.append(r)
buf = io.BytesIO()
wb.save(buf)
xlsx = buf.getvalue()
w("valid.xlsx", xlsx)
# Cut short: the archive's central directory is lost.
w("truncated.xlsx", xlsx[: len(xlsx) // 2])

# A sheet whose data start at C3, with an error cell and a formula result.
wb = openpyxl.Workbook()
ws = wb.active
ws.title = "Offset"
ws["C3"] = "score"
ws["C4"] = 3
ws["C5"] = 4.5
ws["C6"] = "=1/0"
ws["C7"] = 6
buf = io.BytesIO()
wb.save(buf)
w("offset.xlsx", buf.getvalue())


def ods_cell(v):
    if v is None:
        return TableCell()
    if isinstance(v, (int, float)):
        c = TableCell(valuetype="float", value=v)
        c.addElement(P(text=str(v)))
        return c
    c = TableCell(valuetype="string")
    c.addElement(P(text=v))
    return c


doc = OpenDocumentSpreadsheet()
for title, rows in (("Waiting times", SHEET1), ("Dose", SHEET2)):
    t = Table(name=title)
    for r in rows:
        tr = TableRow()
        for v in r:
            tr.addElement(ods_cell(v))
        t.addElement(tr)
    doc.spreadsheet.addElement(t)
buf = io.BytesIO()
doc.write(buf)
w("valid.ods", buf.getvalue())

with open(os.path.join(HERE, "VERSIONS.txt"), "w") as f:
    f.write(f"python {sys.version.split()[0]}\nopenpyxl {openpyxl.__version__}\n"
            f"odfpy {importlib.metadata.version('odfpy')}\n")
print("wrote", len([n for n in os.listdir(HERE) if n not in ("make_corpus.py", "VERSIONS.txt")]), "files")
