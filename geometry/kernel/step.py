"""STEP (ISO 10303-21: AP203, AP214, AP242) through OCP's STEP reader.

The kernel parses the file and converts lengths to millimetres (its default
session unit); names come from the STEP entities the faces and solids were made
from (``ADVANCED_FACE('name', ...)``, ``MANIFOLD_SOLID_BREP('name', ...)``).
"""

from __future__ import annotations

import re

from .read import read_with_kernel
from .shape import KernelShape

# Face entities of ISO 10303-42 as they appear in a part 21 file.
_FACE_ENTITY = re.compile(rb"=\s*(?:ADVANCED_FACE|FACE_SURFACE)\s*\(", re.IGNORECASE)
# ISO 10303-41 unit names -> short names.
_UNIT_WORDS = {"millimetre": "mm", "metre": "m", "inch": "in", "foot": "ft", "centimetre": "cm"}


def _file_length_unit(reader) -> str:
    from OCP.collections import Sequence_TCollection_AsciiString

    lengths = Sequence_TCollection_AsciiString()
    reader.FileUnits(lengths, Sequence_TCollection_AsciiString(), Sequence_TCollection_AsciiString())
    names = sorted({lengths.Value(i).ToCString().lower() for i in range(1, lengths.Length() + 1)})
    return ",".join(_UNIT_WORDS.get(n, n) for n in names) or "mm"


def _entity_name(entity) -> str:
    name = entity.Name() if hasattr(entity, "Name") else None
    text = name.ToCString() if name is not None else ""
    return "" if text in ("NONE", "$") else text


def read_step(path: str) -> tuple[KernelShape, str]:
    """Faces, edges and the declared length unit of a STEP file.

    Parameters
    ----------
    path : str

    Returns
    -------
    contents : KernelShape
    source_units : str
        The file's length unit (``"mm"``, ``"in"``, ...; several joined by commas).

    Raises
    ------
    ReadError
        When the kernel cannot parse the file or finds no shape in it.
    """
    from OCP.STEPControl import STEPControl_Reader

    def listed_faces(_reader) -> int:
        with open(path, "rb") as handle:
            return len(_FACE_ENTITY.findall(handle.read()))

    return read_with_kernel(path, "STEP", STEPControl_Reader, _file_length_unit, listed_faces, _entity_name)
