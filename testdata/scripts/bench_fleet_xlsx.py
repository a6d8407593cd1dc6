"""Times openpyxl on a fleet workbook: a full load (every cell parsed), and
read-only mode reading every row (which trusts each sheet's dimension).
Used by bench-fleet.sh.

    /usr/bin/python3 bench_fleet_xlsx.py SITE/fleet.xlsx
"""
import resource
import sys
import time

import openpyxl

path = sys.argv[1]
t = time.time()
wb = openpyxl.load_workbook(path)
full = time.time() - t
cells = sum(ws.max_row * ws.max_column for ws in wb.worksheets)
wb.close()
t = time.time()
ro = openpyxl.load_workbook(path, read_only=True)
rows = {ws.title: sum(1 for _ in ws.iter_rows(values_only=True)) for ws in ro.worksheets}
ro.close()
readonly = time.time() - t
peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024
print("fleet.xlsx openpyxl load   %8.2f s    (target < 3 s; %d cells in the used ranges)" % (full, cells))
print("fleet.xlsx read-only rows  %8.2f s    (every row of every sheet; peak RSS of both %.0f MB)" % (readonly, peak))
print("rows per sheet, read-only mode:", ", ".join("%s %d" % kv for kv in rows.items()))
