"""Model readers: STEP, IGES and geomdl JSON behind one :func:`read_model`.

Every reader returns faces in mm; :func:`read_model` checks the file, picks the
reader from the content (extension only as a tie-breaker), hashes the bytes and
turns every failure into :class:`geometry.errors.ReadError` naming the file and
the cause. Faces that cannot be read are skipped and listed in
:attr:`geometry.model.Model.warnings`; a file with no usable face is an error.
"""

from __future__ import annotations

import hashlib
import os

import numpy as np

from ..errors import BattenError, ReadError
from ..kernel.budget import ReadBudget
from ..kernel.isolation import read_isolated
from ..kernel.numbers import check_numbers
from ..model.topology import Model
from .carry import ShapeContents, on_nurbs
from .files import read_regular

# Larger files are refused before the kernel is asked (a design model is tens of MB).
MAX_FILE_BYTES = 2_000_000_000

_EXTENSIONS = {
    ".step": "step",
    ".stp": "step",
    ".p21": "step",
    ".iges": "iges",
    ".igs": "iges",
    ".json": "geomdl-json",
}


_NOT_SIGNED = {
    "iges": "not an IGES file (its first line is not an 80-column IGES start or global record)",
    "step": "not a STEP file (it does not open with the ISO-10303-21 header)",
}


def detect_format(path: str, head: bytes) -> str | None:
    """The format of a file from its first bytes, else from its extension.

    Parameters
    ----------
    path : str
    head : bytes
        The first few kilobytes of the file.

    Returns
    -------
    str or None
        ``"step"``, ``"iges"``, ``"geomdl-json"``, or ``None`` when unknown.

    Notes
    -----
    STEP files open with ``ISO-10303-21;`` (ISO 10303-21, sec. 5). IGES files are
    80-column records whose column 73 holds the section letter, the first
    record being ``S`` (start) or ``G`` (global) (IGES 5.3, sec. 2.1).
    """
    signed = content_format(head)
    if signed is not None:
        return signed
    if b"\x00" in head[:1024] or head[:8] == b"\x89PNG\r\n\x1a\n":
        return None  # binary content: no extension makes it a model
    return _EXTENSIONS.get(os.path.splitext(path)[1].lower())


def content_format(head: bytes) -> str | None:
    """The format the first bytes announce (see :func:`detect_format`), or ``None``."""
    text = head.lstrip(b"\xef\xbb\xbf").lstrip()
    if text[:12].upper() == b"ISO-10303-21":
        return "step"
    first = head.split(b"\n", 1)[0].rstrip(b"\r")
    if len(first) >= 73 and first[72:73] in (b"S", b"G"):
        return "iges"
    if text[:1] == b"{":
        return "geomdl-json"
    return None


def _read_bytes(path: str) -> bytes:
    data = read_regular(path, MAX_FILE_BYTES, "model")
    if not data.strip():
        raise ReadError(path, "file is empty")
    return data


def _contents(path: str, fmt: str, data: bytes, budget: ReadBudget | None) -> tuple[ShapeContents, str]:
    if fmt == "geomdl-json":
        from .geomdl_json import read_geomdl_json

        return read_geomdl_json(path, data), "mm"
    from ..nurbs.compiled_warm import warm_up_in_background
    from ..tooling.draft import warm_up_draft

    warm_up_in_background(warm_up_draft)  # load the compiled kernels while the helper process reads
    check_numbers(path, fmt, data)
    shape, units = read_isolated(fmt, path, budget)
    return on_nurbs(shape), units


def _finite_edges(contents: ShapeContents) -> ShapeContents:
    """Leave out edges whose polyline or p-curves hold NaN (a damaged or cut-short file), with a warning."""
    keep, dropped = [], 0
    for edge in contents.edges:
        if np.isfinite(edge.points).all() and all(np.isfinite(use.uv).all() for use in edge.uses):
            keep.append(edge)
        else:
            dropped += 1
    if not dropped:
        return contents
    note = f"{dropped} edge(s) with undefined points left out of the seam checks (damaged edge geometry)"
    return ShapeContents(contents.faces, keep, [*contents.warnings, note], contents.n_input_faces)


def read_model(path, budget: ReadBudget | None = None) -> Model:
    """Read a STEP, IGES or geomdl JSON file as a :class:`Model` in mm.

    Parameters
    ----------
    path : str or os.PathLike
    budget : ReadBudget, optional
        Time and memory limits of the CAD kernel's read (STEP, IGES); default
        scaled to the file's size.

    Returns
    -------
    Model
        With ``source``, ``sha256`` of the file's bytes, ``units="mm"``,
        ``source_units`` as declared, and one warning per skipped face.

    Raises
    ------
    ReadError
        Missing, empty, unreadable, unknown or malformed file, or a file
        without one usable face; the message names the file and the cause.
    """
    path = os.fspath(path)
    data = _read_bytes(path)
    fmt = detect_format(path, data[:4096])
    if fmt is None:
        raise ReadError(path, "not a STEP, IGES or JSON surface file (content not recognised)")
    if fmt in _NOT_SIGNED and content_format(data[:4096]) is None:
        # Named .igs or .stp but without the format's opening records: say so, not "holds no surface".
        raise ReadError(path, _NOT_SIGNED[fmt])
    try:
        contents, units = _contents(path, fmt, data, budget)
    except ReadError:
        raise
    except BattenError as exc:
        raise ReadError(path, str(exc)) from exc
    except Exception as exc:  # the kernel's own exceptions: report, never a traceback
        raise ReadError(path, f"the {fmt.upper()} reader failed ({type(exc).__name__}: {exc})") from exc
    if not contents.faces:
        why = "; ".join(contents.warnings[:5])
        found = f"{contents.n_input_faces} face(s), none usable" if contents.n_input_faces else "no surfaces"
        raise ReadError(path, f"{found}{': ' + why if why else ''}")
    contents = _finite_edges(contents)
    return Model(
        faces=tuple(contents.faces),
        edges=tuple(contents.edges),
        source=os.path.abspath(path),
        sha256=hashlib.sha256(data).hexdigest(),
        units="mm",
        source_units=units,
        warnings=tuple(contents.warnings),
        skipped=tuple(contents.skipped),
    )


__all__ = ["ReadBudget", "ReadError", "detect_format", "read_model"]
