"""The steps the STEP and IGES readers share: parse, transfer, convert, name.

Both go through an OCP ``XSControl_Reader`` (``STEPControl_Reader``,
``IGESControl_Reader``); only the unit, face count and entity names differ,
and those come in as small functions.
"""

from __future__ import annotations

from collections.abc import Callable

from ..errors import ReadError
from .occt_model import read_shape
from .occt_quiet import quiet_kernel
from .shape import KernelShape


def _entity_namer(reader, entity_name: Callable[[object], str]) -> Callable[[object], str]:
    transfer = reader.WS().TransferReader()

    def name_of(shape) -> str:
        try:
            entity = transfer.EntityFromShapeResult(shape, 1)
            return "" if entity is None else entity_name(entity)
        except Exception:  # a name is a nicety: no name rather than no model
            return ""

    return name_of


def read_with_kernel(
    path: str,
    fmt: str,
    make_reader: Callable[[], object],
    file_units: Callable[[object], str],
    listed_faces: Callable[[object], int],
    entity_name: Callable[[object], str],
    sew: bool = False,
) -> tuple[KernelShape, str]:
    """Parse and transfer a file with an OCP reader, then read its faces.

    Parameters
    ----------
    path : str
    fmt : str
        ``"STEP"`` or ``"IGES"``, for messages.
    make_reader : callable
        Builds the OCP reader.
    file_units, listed_faces, entity_name : callable
        The file's declared length unit, how many faces it lists, and the name
        of a file entity (``""`` when it has none).
    sew : bool
        Recover shared edges of loose faces (see :func:`read_shape`).

    Returns
    -------
    contents : KernelShape
    source_units : str

    Raises
    ------
    ReadError
        When the kernel cannot parse the file or builds no shape from it.
    """
    from OCP.IFSelect import IFSelect_RetDone
    from OCP.Interface import Interface_Static

    with quiet_kernel():
        reader = make_reader()
        # The session unit the kernel converts lengths to: say mm, whatever
        # another caller in this process may have set.
        Interface_Static.SetCVal_s("xstep.cascade.unit", "MM")
        if reader.ReadFile(path) != IFSelect_RetDone:
            raise ReadError(path, f"not a readable {fmt} file (the {fmt} parser rejected it)")
        units = file_units(reader)
        if reader.TransferRoots() == 0 or reader.NbShapes() == 0:
            raise ReadError(path, f"the {fmt} file holds no surface or shape the kernel can build")
        contents = read_shape(reader.OneShape(), _entity_namer(reader, entity_name), sew=sew)
        contents.compare_with_file(listed_faces(reader))
    return contents, units
