"""Time to render the HTML and PDF reports for 20, 200 and 2,000 points.

Prints the median of a few repeats per size and the ratio to the smallest
size.  Each report draws its own figures, as a lone ``render_html`` or
``render_pdf`` call does; the figures column is that drawing alone (matplotlib
to SVG), so the rest of each report's time is Jinja2 (HTML) or WeasyPrint (PDF).  Targets (plain 2-core CPU): < 0.5 s for the HTML and < 3 s for the PDF
at 200 points.  No assertions: this is a measurement, not a test.

Run:  python benchmarks/report_speed.py [--repeats 3]
"""

from __future__ import annotations

import argparse
import statistics
import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

from tests.report.conftest import build_result  # noqa: E402

SIZES = (20, 200, 2000)


def _median_time(fn, repeats: int) -> float:
    times = []
    for _ in range(repeats):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return statistics.median(times)


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--repeats", type=int, default=3)
    args = ap.parse_args(argv)

    from audit.report.html import render_html
    from audit.report.pdf import render_pdf
    from audit.report.plots import render_all

    # warm-up: imports of matplotlib, jinja2 and WeasyPrint are not per-report costs
    warm = build_result(n_liquid=16, n_solid=8)
    render_pdf(warm, b"x")

    rows = []
    for n in SIZES:
        n_liquid = int(n * 2 / 3)
        result = build_result(n_liquid=n_liquid, n_solid=n - n_liquid)
        figures_s = _median_time(lambda: render_all(result), args.repeats)
        html_s = _median_time(lambda: render_html(result), args.repeats)
        pdf_s = _median_time(lambda: render_pdf(result, b"x"), args.repeats)
        rows.append((n, figures_s, html_s, pdf_s))

    _, base_fig, base_html, base_pdf = rows[0]
    print(f"{'points':>7} {'figures / s':>12} {'× (20)':>7} {'HTML / s':>9} {'× (20)':>7} "
          f"{'PDF / s':>8} {'× (20)':>7}")
    for n, f, h, p in rows:
        print(f"{n:>7d} {f:>12.3f} {f / base_fig:>7.2f} {h:>9.3f} {h / base_html:>7.2f} "
              f"{p:>8.3f} {p / base_pdf:>7.2f}")
    print("targets at 200 points: HTML < 0.5 s, PDF < 3 s (2 cores)")
    return 0


if __name__ == "__main__":
    sys.exit(main())
