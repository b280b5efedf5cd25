"""Parse vs scan in executed instructions (callgrind), a measure the machine's speed drift cannot blur.

    python benchmarks/bench_instructions.py [--blocks 300]

Runs valgrind's callgrind over four child processes: the generated document parsed, the
grammar's own terminals scanned with one ``finditer`` (as in ``bench_parse.py``), and each
again without the measured step, so start-up and imports cancel out.  Prints instructions per
block and their ratio.  CPU time (``bench_parse.py``) remains the measure the targets are stated
in; a parse allocates its model and runs at fewer instructions per cycle than a regular-expression
scan, so the time ratio is larger than this one.  Needs ``valgrind`` (Debian package).
"""

from __future__ import annotations

import argparse
import os
import re
import shutil
import subprocess
import sys
from pathlib import Path

HERE = Path(__file__).resolve().parent

CHILD = r"""
import os, sys
sys.path.insert(0, {here!r})
from generate import document
text = document({blocks})
if {what!r} == "parse":
    from peakproof.parsing import parse
    parse(text[:30000])  # build the fast parser, compile its patterns
    if os.environ.get("PEAKPROOF_MEASURE"):
        parse(text)
else:
    import bench_parse
    scan = bench_parse._grammar_token_scan()
    sum(1 for _ in scan.finditer(text[:30000]))
    if os.environ.get("PEAKPROOF_MEASURE"):
        sum(1 for _ in scan.finditer(text))
"""


def instructions(what: str, blocks: int, measure: bool) -> int:
    env = dict(os.environ)
    env.pop("PEAKPROOF_MEASURE", None)
    if measure:
        env["PEAKPROOF_MEASURE"] = "1"
    code = CHILD.format(here=str(HERE), blocks=blocks, what=what)
    run = subprocess.run(
        ["valgrind", "--tool=callgrind", "--callgrind-out-file=/dev/null", sys.executable, "-c", code],
        capture_output=True, text=True, env=env, check=True,
    )
    found = re.search(r"Collected : (\d+)", run.stderr)
    if not found:
        raise SystemExit(f"callgrind printed no instruction count:\n{run.stderr[-2000:]}")
    return int(found.group(1))


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--blocks", type=int, default=300)
    args = ap.parse_args()
    if not shutil.which("valgrind"):
        raise SystemExit("valgrind is not installed (Debian: apt-get install valgrind)")
    per_block = {}
    for what in ("parse", "scan"):
        step = instructions(what, args.blocks, True) - instructions(what, args.blocks, False)
        per_block[what] = step / args.blocks
        print(f"{what}: {per_block[what] / 1000:,.0f} k instructions per block")
    print(f"ratio parse/scan in instructions: {per_block['parse'] / per_block['scan']:.2f}x "
          "(CPU time, in bench_parse.py, is the measure the targets use)")


if __name__ == "__main__":
    main()
