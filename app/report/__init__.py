"""The review report: PDF and self-contained HTML, pictures rendered off-screen.

``write_report(path, reviews, figures)`` is the one entry point; the command
line (``batten check --report``) and the window's "Export report" both use it.
Nothing heavy (Qt, pyvista) is imported until a report is written.
"""

from __future__ import annotations


def write_report(path, reviews, figures=None, created=None, comparison=None, inputs=()):
    """See :func:`app.report.writers.write_report`."""
    from .writers import write_report as _write

    return _write(path, reviews, figures, created, comparison=comparison, inputs=inputs)


def render_figures(model, review, stripes=None, section=None):
    """See :func:`app.report.figures.render_figures`."""
    from .figures import render_figures as _render

    return _render(model, review, stripes, section)


__all__ = ["render_figures", "write_report"]
