#!/usr/bin/python3
"""pandas side of the benchmark.  argv: IN.csv [OUT.csv]
Reads every column as text with no NA inference (what a cleaning tool must
see); with OUT also writes the frame back out, for a read-and-write figure."""
import sys

import pandas as pd

frame = pd.read_csv(sys.argv[1], dtype=str, na_filter=False)
if len(sys.argv) > 2:
    frame.to_csv(sys.argv[2], index=False)
