"""Shared writer of the tables refgen computes once from a slow lowest-order QED integration
(tools/make_triplet_table.py, tools/make_ee_bremsstrahlung_table.py)."""
from __future__ import annotations

import sys

SOURCE = "lowest-order QED (8 graphs) integrated by refgen"


def write_table(comment: str, header: str, xs, value, nodes) -> None:
    """Write the comment line, the CSV header and one row "x,value(x, nodes),source" per x (6 significant
    digits) to standard output, flushing each row: every row takes seconds to minutes."""
    sys.stdout.write(f"# {comment}\n{header}\n")
    for x in xs:
        sys.stdout.write(f"{x:g},{value(x, nodes):.6g},{SOURCE}\n")
        sys.stdout.flush()
