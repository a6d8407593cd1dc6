"""Time scikit-rf reading Touchstone files: prints "skrf FILE BYTES CPU-SECONDS-PER-READ".

CPU time of the process (time.process_time), not wall time: the machine
may be shared, and the Go side is timed the same way.

Run with the Debian python that has scikit-rf 0.15.4: /usr/bin/python3.
"""
import contextlib
import io
import os
import sys
import time

with contextlib.redirect_stdout(io.StringIO()):
    import skrf as rf

# Batches per file: SKRF_BENCH_BATCHES, 5 unless set.
batches = int(os.environ.get("SKRF_BENCH_BATCHES", "5"))

for path in sys.argv[1:]:
    # The best of the batches of at least 0.6 s each, as on the Go side:
    # other load on the machine only ever adds time.
    per = float("inf")
    for batch in range(batches):
        reads = 0
        start, wall = time.process_time(), time.perf_counter()
        while reads < 2 or time.perf_counter() - wall < 0.6:
            with contextlib.redirect_stdout(io.StringIO()):
                n = rf.Network(path)
            assert n.s.shape == (10000, 2, 2), n.s.shape
            reads += 1
        per = min(per, (time.process_time() - start) / reads)
    print("skrf %s %d %.6g" % (os.path.basename(path), os.path.getsize(path), per))
