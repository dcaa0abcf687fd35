"""What the two interop scripts share: the list of failures, the expected
values our side wrote, and the command dispatcher. Plain Python only: it is
imported both by checks.py (the venv's Python) and by kicad_checks.py
(KiCad's Python with pcbnew)."""

import json
import os
import sys

FAILS = []


def fail(source, msg):
    FAILS.append(f"FAIL [{source}] {msg}")


def expect(d):
    """The expectations our side wrote into the case folder."""
    with open(os.path.join(d, "expect.json")) as f:
        return json.load(f)


def run(commands):
    """`script COMMAND DIR [ARG]`: runs commands[COMMAND](DIR, [ARG]),
    prints every failure and exits 1 if there was one."""
    if len(sys.argv) < 3 or sys.argv[1] not in commands:
        raise SystemExit(f"usage: {sys.argv[0]} {'|'.join(commands)} DIR [ARG]")
    commands[sys.argv[1]](*sys.argv[2:])
    for f in FAILS:
        print(f)
    sys.exit(1 if FAILS else 0)
