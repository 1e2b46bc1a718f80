"""A report asked for in the window, written by a process of its own so the window stays free.

The window pickles an :class:`ExportRequest` (the model on screen and the
settings it is judged with) to a private file and runs
``python -m app.report.window_export REQUEST``. This process prints one line
per stage (``progress FRACTION TEXT``) and exits 0 once the report is written,
or 2 after one ``error TEXT`` line naming the file and the cause. Stopping it
(SIGTERM) leaves no file behind: nothing exists before the write, and during
the write the atomic writer removes its temporary file before the process ends.
"""

from __future__ import annotations

import pickle
import re
import sys
from dataclasses import dataclass, replace
from pathlib import Path

from app.review import ReviewSettings
from app.state.settings import SectionSettings, StripeSettings
from geometry.model import Model

EXIT_WRITTEN, EXIT_FAILED = 0, 2
# share of the work done when each stage starts (for the progress bar)
STAGES = {"check": 0.02, "pictures": 0.55, "writing": 0.9}
SEAMS_DONE = re.compile(r"seams (\d+) of (\d+)")  # the check's progress line (DEVELOPERS.md, Seams)


@dataclass(frozen=True)
class ExportRequest:
    """Everything a report of the model on screen needs, safe to pickle.

    Attributes
    ----------
    path : str
        The report to write (``.pdf`` or ``.html``).
    model : Model
    settings : ReviewSettings
        The profile, sections and pull the window judges with.
    review_file : app.review.review_file.ReviewFile or None
        The reviewers' decisions, when a review file is in use.
    comparison : app.review.comparison.Comparison or None
        The comparison with an earlier revision, when one was made.
    stripes, section :
        The window's stripe and section settings (the pictures use them).
    """

    path: str
    model: Model
    settings: ReviewSettings
    review_file: object | None
    comparison: object | None
    stripes: StripeSettings
    section: SectionSettings

    @property
    def inputs(self) -> list[str]:
        """Files the report must never replace (the model's own)."""
        return [self.model.source] if self.model.source else []


def request_for(session, path: str) -> ExportRequest:
    """The request for a report of ``session``'s model (an :class:`app.state.Session`) at ``path``."""
    review = session.review
    return ExportRequest(
        path=str(path),
        model=session.model,
        settings=session.review_settings,
        review_file=review.file if review.path is not None else None,
        comparison=review.comparison,
        stripes=session.display.stripes,
        section=session.section,
    )


def check_fraction(line: str) -> float:
    """Share of the export done at a progress line of the check: the seams, measured in batches, take most of it."""
    found = SEAMS_DONE.search(line)
    if found is None or int(found[2]) == 0:
        return STAGES["check"]
    return STAGES["check"] + (STAGES["pictures"] - STAGES["check"]) * int(found[1]) / int(found[2])


def _quiet(_fraction: float, _text: str) -> None:
    pass


def write_requested(request: ExportRequest, progress=_quiet) -> Path:
    """Check the model as ``batten check`` would, draw the pictures and write the report.

    Parameters
    ----------
    request : ExportRequest
    progress : callable(fraction, text), optional

    Raises
    ------
    BattenError
        The report cannot be written (the message names the file).
    """
    from app.review import review_model
    from app.review.dispositions import apply_review

    from . import render_figures, write_report

    reached = [0.0]

    def say(fraction: float, text: str) -> None:  # the bar never runs backwards
        reached[0] = max(reached[0], fraction)
        progress(reached[0], text)

    say(STAGES["check"], "checking the model")
    review = review_model(request.model, request.settings, lambda line: say(check_fraction(line), line))
    if request.review_file is not None:
        review = apply_review(review, request.review_file)
    comparison = request.comparison
    if comparison is not None:
        comparison = replace(comparison, new=review)
    say(STAGES["pictures"], "drawing the pictures")
    figures = render_figures(request.model, review, request.stripes, request.section)
    say(STAGES["writing"], f"writing {request.path}")
    return write_report(request.path, [review], [figures], comparison=comparison, inputs=request.inputs)


def _say(kind: str, *words) -> None:
    print(kind, *(" ".join(str(w).split()) for w in words), flush=True)


def main(argv: list[str]) -> int:
    """Run the request pickled in ``argv[0]``; see the module's docstring."""
    from geometry.errors import BattenError

    try:
        with open(argv[0], "rb") as fh:
            request = pickle.load(fh)
        write_requested(request, lambda fraction, text: _say("progress", f"{fraction:.3f}", text))
    except BattenError as exc:
        _say("error", exc)
        return EXIT_FAILED
    except Exception as exc:  # a bug of ours: say what happened, the window shows it
        _say("error", f"internal error while writing the report ({type(exc).__name__}: {exc})")
        return EXIT_FAILED
    return EXIT_WRITTEN


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
