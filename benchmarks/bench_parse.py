"""Parse throughput, memory and start-up, each as a ratio measured in this one run.

    python benchmarks/bench_parse.py [--blocks 10000] [--repeat 5]

Times are CPU times (this process, or the child for start-up), so other work on the machine
does not blur the ratios.  Prints blocks/s, MB/s and peak memory for parsing a generated
document, and the ratio of the reader's time to one compiled regular-expression ``finditer`` scan of the same text extracting
the same tokens (targets: ≤ 6×, never above 10×).  Then the start-up of a fresh
``python -m peakproof parse`` on a one-paragraph file against ``python -c "import lark"``
(target ≤ 1.5×).  Medians of the repetitions.
"""

from __future__ import annotations

import argparse
import os
import re
import resource
import statistics
import subprocess
import sys
import tempfile
import time
import tracemalloc
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))
from generate import document  # noqa: E402

# The tokens the reader extracts, as one compiled alternation (what a hand-written scanner
# would need to find): headers, numbers, multiplicities, J labels, counts, brackets, separators.
TOKEN_SCAN = re.compile(
    r"\d{1,3}[A-Z][a-z]?(?:\{[^}]*\})? NMR|HRMS|\[M[^\]]*\]\+|calcd for|found|m/z|\([A-Z]+\)"
    r"|[-−]?\d+(?:[.,]\d+)?(?: ?MHz| ?Hz)?|\d+H\b|br s|\b(?:[dtqm]+|s)\b|J ?=|CDCl3|δ|[(),;.]"
)


def _grammar_token_scan() -> re.Pattern:
    """One compiled alternation of the grammar's terminals, in the lexer's order."""
    from peakproof.parsing import _builder_and_parser

    _, parser = _builder_and_parser()
    terms = sorted(parser.terminals,
                   key=lambda t: (-t.priority, -t.pattern.max_width, -len(t.pattern.value), t.name))
    return re.compile("|".join(f"(?:{t.pattern.to_regexp()})" for t in terms if t.name != "WS"))


def median_time(fn, repeat: int) -> float:
    """Median CPU time of this process (other work on the machine does not count)."""
    times = []
    for _ in range(repeat):
        t0 = time.process_time()
        result = fn()
        times.append(time.process_time() - t0)
        del result  # freeing the previous model is not part of reading the next one
    return statistics.median(times)


# Children run with bytecode caching on, as for an installed package (pip byte-compiles on
# install, and lark's own modules in site-packages are compiled already); a development shell
# with PYTHONDONTWRITEBYTECODE=1 would otherwise recompile peakproof at every start.
_CHILD_ENV = {k: v for k, v in os.environ.items() if k != "PYTHONDONTWRITEBYTECODE"}


def child_cpu(cmd) -> float:
    """CPU time (user + system) one run of ``cmd`` takes, read from the children's usage."""
    before = resource.getrusage(resource.RUSAGE_CHILDREN)
    subprocess.run(cmd, capture_output=True, check=True, env=_CHILD_ENV)
    after = resource.getrusage(resource.RUSAGE_CHILDREN)
    return (after.ru_utime - before.ru_utime) + (after.ru_stime - before.ru_stime)


def startup(repeat: int) -> tuple[float, float]:
    with tempfile.NamedTemporaryFile("w", suffix=".txt", delete=False) as f:
        f.write("1H NMR (400 MHz, CDCl3) δ 7.26 (d, J = 8.4 Hz, 2H), 3.80 (s, 3H).\n")
        path = f.name
    ours = [sys.executable, "-m", "peakproof", "parse", path]
    lark_only = [sys.executable, "-c", "import lark"]
    subprocess.run(ours, capture_output=True, check=True, env=_CHILD_ENV)  # grammar cache, bytecode

    a, b = [], []
    for _ in range(repeat):  # interleaved, so load on the machine hits both alike
        a.append(child_cpu(ours))
        b.append(child_cpu(lark_only))
    os.unlink(path)
    return statistics.median(a), statistics.median(b)


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--blocks", type=int, default=10_000)
    ap.add_argument("--repeat", type=int, default=5)
    args = ap.parse_args()

    import peakproof

    text = document(args.blocks)
    mb = len(text.encode()) / 1e6
    peakproof.parse(text[:2000])  # build the parser once

    grammar_scan = _grammar_token_scan()
    # Interleaved: each repetition times the two scans and the parse back to back, and the ratio
    # is taken per repetition (the machine's speed drifts between repetitions, not within one).
    ratios_g, ratios_f, parses, scans_g, scans_f = [], [], [], [], []
    for _ in range(args.repeat):
        t_g = median_time(lambda: sum(1 for _ in grammar_scan.finditer(text)), 1)
        t_f = median_time(lambda: sum(1 for _ in TOKEN_SCAN.finditer(text)), 1)
        t_p = median_time(lambda: peakproof.parse(text), 1)
        parses.append(t_p)
        scans_g.append(t_g)
        scans_f.append(t_f)
        ratios_g.append(t_p / t_g)
        ratios_f.append(t_p / t_f)
    t_parse, t_gscan, t_scan = (statistics.median(x) for x in (parses, scans_g, scans_f))
    ratio_g, ratio_f = statistics.median(ratios_g), statistics.median(ratios_f)
    n_fine = sum(1 for _ in TOKEN_SCAN.finditer(text))
    n_grammar = sum(1 for _ in grammar_scan.finditer(text))
    doc = peakproof.parse(text)
    assert len(doc.blocks) == args.blocks, (len(doc.blocks), args.blocks)

    from peakproof.parsing import iter_blocks

    def streamed_peak(doc_text: str) -> int:
        """Peak traced memory while reading block by block and keeping nothing (the text itself
        is allocated before tracing starts)."""
        tracemalloc.start()
        tracemalloc.reset_peak()
        base = tracemalloc.get_traced_memory()[0]
        for _block, _diags in iter_blocks(doc_text):
            pass
        peak = tracemalloc.get_traced_memory()[1] - base
        tracemalloc.stop()
        return peak

    small = document(args.blocks // 10)
    stream_small, stream_full = streamed_peak(small), streamed_peak(text)
    tracemalloc.start()
    tracemalloc.reset_peak()
    peakproof.parse(small)
    peak_small = tracemalloc.get_traced_memory()[1]
    tracemalloc.reset_peak()
    peakproof.parse(text)
    peak_full = tracemalloc.get_traced_memory()[1]
    tracemalloc.stop()

    t_ours, t_lark = startup(args.repeat + 4)
    print(f"document: {args.blocks} blocks, {mb:.2f} MB")
    print(f"parse: {t_parse:.3f} s  ({args.blocks / t_parse:,.0f} blocks/s, {mb / t_parse:.2f} MB/s)")
    print(f"finditer scan, the grammar's own terminals as one alternation ({n_grammar:,} tokens, "
          f"the tokens the reader's lexer makes): {t_gscan:.3f} s -> ratio parse/scan {ratio_g:.2f}x "
          "(target <= 6x, limit 10x)")
    print(f"finditer scan, fine-grained lexical items ({n_fine:,} tokens: numbers, letters, "
          f"brackets…; independent of our grammar): {t_scan:.3f} s -> ratio {ratio_f:.2f}x "
          f"(per-repetition ratios {min(ratios_g):.1f}–{max(ratios_g):.1f}x and "
          f"{min(ratios_f):.1f}–{max(ratios_f):.1f}x)")
    print(f"streaming (iter_blocks, nothing kept): peak {stream_small / 1e6:.2f} MB for "
          f"{args.blocks // 10} blocks, {stream_full / 1e6:.2f} MB for {args.blocks} blocks, "
          f"ratio {stream_full / max(stream_small, 1):.2f} (flat is 1; the line index of the text "
          "grows with it)")
    print(f"whole model kept (parse): {peak_small / 1e6:.1f} MB for {args.blocks // 10} blocks, "
          f"{peak_full / 1e6:.1f} MB for {args.blocks} blocks "
          f"(per block {peak_small / (args.blocks // 10) / 1e3:.1f} kB vs {peak_full / args.blocks / 1e3:.1f} kB; "
          "the model is kept, so memory grows with the document)")
    print(f"start-up: peakproof parse {t_ours * 1000:.0f} ms, import lark {t_lark * 1000:.0f} ms, "
          f"ratio {t_ours / t_lark:.2f}x (target <= 1.5x)")


if __name__ == "__main__":
    main()
