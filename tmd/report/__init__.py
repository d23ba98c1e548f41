"""Report and figures: what the engineer hands on.

:func:`render_report` turns a job's results into a self-contained HTML report,
its figures as PNG and its key tables as CSV (a dict of file name -> bytes for
:func:`tmd.outputs.write_all`); :func:`progress_bar` shows progress on a
terminal and stays quiet otherwise.
"""

from tmd.report.assemble import render_report
from tmd.report.progress import progress_bar

__all__ = ["progress_bar", "render_report"]
