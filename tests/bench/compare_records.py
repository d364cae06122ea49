#!/usr/bin/python3
"""Compare CSV files record by record, as parsed by Python's csv module.

Writers quote differently (one quotes an empty string, another does not), so
bytes prove nothing; equal parsed records do.  Python's csv module is the
reference RFC 4180 reader here, and blank lines (which it returns as empty
lists) are not records, as in the tamis CLI contract.

Usage:  compare_records.py LABEL=FILE LABEL=FILE [LABEL=FILE ...]
Compares every later file with the first one in a single pass.  Prints one
line per comparison and exits 1 if any differs.
"""
import csv
import itertools
import sys

csv.field_size_limit(1 << 30)


def records(path):
    """(line where the record starts, record) for every non-blank record."""
    with open(path, newline="", encoding="utf-8") as f:
        reader = csv.reader(f)
        start = 1
        for record in reader:
            if record:
                yield start, record
            start = reader.line_num + 1


def compare(reference, others):
    """(records in the reference, {label: first difference or None})."""
    streams = [records(reference[1])] + [records(path) for _, path in others]
    first_difference = {label: None for label, _ in others}
    count = 0
    for number, items in enumerate(itertools.zip_longest(*streams), 1):
        ref = items[0]
        count += ref is not None
        for (label, _), item in zip(others, items[1:]):
            if first_difference[label] is None and record_of(item) != record_of(ref):
                first_difference[label] = (number, ref, item)
        if all(d is not None for d in first_difference.values()):
            break
    return count, first_difference


def record_of(item):
    return None if item is None else item[1]


def describe(ref_label, label, count, difference):
    if difference is None:
        return "same records: %s and %s (%d records incl. header)" % (label, ref_label, count)
    index, ref, item = difference

    def where(x):
        return "missing" if x is None else "line %d %r" % (x[0], x[1])

    return "DIFFERENT: %s vs %s at record %d: %s has %s, %s has %s" % (
        label, ref_label, index, ref_label, where(ref), label, where(item))


def main(argv):
    pairs = [a.split("=", 1) for a in argv[1:]]
    if len(pairs) < 2 or any(len(p) != 2 for p in pairs):
        sys.exit(__doc__)
    reference, others = tuple(pairs[0]), [tuple(p) for p in pairs[1:]]
    count, differences = compare(reference, others)
    for label, _ in others:
        print(describe(reference[0], label, count, differences[label]))
    return 1 if any(d is not None for d in differences.values()) else 0


if __name__ == "__main__":
    sys.exit(main(sys.argv))
