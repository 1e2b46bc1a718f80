"""IGES 5.3 through OCP's IGES reader.

Entities 128 (rational B-spline surface) and 144 (trimmed surface) with their
142/126/102 curves, 124 transforms and 308/408 instances all go through the
kernel; lengths come back in millimetres. Names are the entities' labels
(name property or directory-entry label) where the file has them. IGES files
of loose trimmed surfaces (entity 144, the usual kind) carry no shared edges;
those are found by sewing a copy (see :func:`geometry.kernel.occt_model.read_shape`).
"""

from __future__ import annotations

from .read import read_with_kernel
from .shape import KernelShape

# IGES global-section unit flag -> short unit name (IGES 5.3, sec. 2.2.4.3, parameter 14).
_UNIT_FLAGS = {1: "in", 2: "mm", 4: "ft", 5: "mi", 6: "m", 7: "km", 8: "mil", 9: "um", 10: "cm", 11: "uin"}
# Entities that become faces: trimmed (144) and bounded (143) surfaces, BRep faces
# (510), and surfaces (108 plane, 114, 118, 120, 122, 128, 190-198) standing alone.
_FACE_TYPES = {143, 144, 510}
_SURFACE_TYPES = {108, 114, 118, 120, 122, 128, 190, 192, 194, 196, 198}


def _file_unit(reader) -> str:
    flag = reader.IGESModel().GlobalSection().UnitFlag()
    return _UNIT_FLAGS.get(flag, f"unit flag {flag}")


def _listed_faces(reader) -> int:
    model = reader.IGESModel()
    count = 0
    for i in range(1, model.NbEntities() + 1):
        entity = model.Entity(i)
        kind = entity.TypeNumber()
        count += kind in _FACE_TYPES or (kind in _SURFACE_TYPES and entity.SubordinateStatus() == 0)
    return count


def _entity_name(entity) -> str:
    if entity.HasName():
        return entity.NameValue().ToCString()
    return entity.ShortLabel().ToCString().strip() if entity.HasShortLabel() else ""


def read_iges(path: str) -> tuple[KernelShape, str]:
    """Faces, edges and the declared unit of an IGES file.

    Parameters
    ----------
    path : str

    Returns
    -------
    contents : KernelShape
    source_units : str
        From the global section's unit flag (``"in"``, ``"mm"``, ...).

    Raises
    ------
    ReadError
        When the kernel cannot parse the file or finds no shape in it.
    """
    from OCP.IGESControl import IGESControl_Reader

    return read_with_kernel(path, "IGES", IGESControl_Reader, _file_unit, _listed_faces, _entity_name, sew=True)
