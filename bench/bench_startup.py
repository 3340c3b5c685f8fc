"""Cold start of the command line: ``gradeline --help`` against a bare interpreter.

Each figure is the median of several fresh processes. The baseline, measured in
the same run, is ``python -c pass`` (the interpreter's own start-up); the
target (issues 13 and 16) is under 100 ms for ``gradeline --help`` on the development
machine, possible because every command imports numpy, lxml, ezdxf and
reportlab only when it runs, and ``--help`` builds no command's own parser
(only the one argv names is built). Run: ``python bench/bench_startup.py``.
"""

from __future__ import annotations

import statistics
import subprocess
import sys
import time


def _median_ms(argv: list[str], runs: int = 15) -> float:
    times = []
    for _ in range(runs):
        t0 = time.perf_counter()
        subprocess.run(argv, check=True, capture_output=True)
        times.append(time.perf_counter() - t0)
    return 1000.0 * statistics.median(times)


def main() -> None:
    bare = _median_ms([sys.executable, "-c", "pass"])
    helped = _median_ms([sys.executable, "-m", "gradeline", "--help"])
    command = _median_ms([sys.executable, "-m", "gradeline", "sheets", "--help"])
    table = _median_ms([sys.executable, "-c", "import numpy, lxml.etree"])
    print(f"python -c pass (baseline):         {bare:6.1f} ms")
    print(
        f"gradeline --help:                  {helped:6.1f} ms  ({helped / bare:.1f}x the bare "
        f"interpreter; target < 100 ms)"
    )
    print(f"gradeline sheets --help:           {command:6.1f} ms  ({command / bare:.1f}x)")
    print(f"import numpy, lxml (for scale):    {table:6.1f} ms")


if __name__ == "__main__":
    main()
