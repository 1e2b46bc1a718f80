"""Rebuild Batten's bundled sample products: STEP, IGES, manifest.json.

Run from the repository root::

    .venv/bin/python sample_surfaces/build_samples.py

Every file is rewritten deterministically (fixed header dates, fixed order).
The products, their faces and their deliberate defects are listed in
``sample_surfaces/README.md`` and, machine-readably, in ``manifest.json``.
"""

from __future__ import annotations

import json
import os
import sys
from pathlib import Path

HERE = Path(__file__).resolve().parent
if str(HERE.parent) not in sys.path:  # run as a script: make the repository importable
    sys.path.insert(0, str(HERE.parent))

from sample_surfaces import large_product  # noqa: E402
from sample_surfaces.export import SEW_TOLERANCE, write_sample  # noqa: E402
from sample_surfaces.products import ALL, Sample  # noqa: E402

MANIFEST_VERSION = 1


def build(sample: Sample, out: Path) -> dict:
    """Write one sample's files and return its manifest entry."""
    written = write_sample(sample.faces, sample.product, out / sample.stem, sample.sew)
    designed = [f.name for f in sample.faces]
    if list(written.face_names) != designed:
        raise RuntimeError(f"{sample.stem}: the kernel reordered faces: {written.face_names}")
    expected_free = sample.expect["unshared_edges_step"]
    if sample.sew and len(sample.faces) > 1 and written.free_edges != expected_free:
        raise RuntimeError(f"{sample.stem}: sewing left {written.free_edges} unshared edges, expected {expected_free}")
    entry = {
        "name": sample.stem,
        "product": sample.product,
        "description": sample.description,
        "files": written.files,
        "face_count": len(sample.faces),
        "sewn": bool(sample.sew and len(sample.faces) > 1),
        "shared_edges_step": written.shared_edges,
    }
    entry.update(sample.expect)
    return entry


def build_large(out: Path) -> dict:
    """Write the large sample (:mod:`sample_surfaces.large_product`) and return its manifest entry.

    Its designed seam counts by class are checked against the kernel's sewing:
    every G2, G1 and crease seam is one shared edge.
    """
    faces, expect = large_product.oven_front()
    written = write_sample(faces, large_product.PRODUCT, out / large_product.STEM, True)
    classes = expect["seam_classes"]
    designed = classes["G2"] + classes["G1"] + classes["G0_crease"]
    if written.shared_edges != designed:
        raise RuntimeError(f"{large_product.STEM}: sewing shared {written.shared_edges} edges, designed {designed}")
    return {
        "name": large_product.STEM,
        "product": large_product.PRODUCT,
        "description": large_product.DESCRIPTION,
        "files": written.files,
        "face_count": len(faces),
        "sewn": True,
        "shared_edges_step": written.shared_edges,
        "unshared_edges_step": written.free_edges,
        **expect,
    }


def manifest_header() -> dict:
    return {
        "version": MANIFEST_VERSION,
        "about": "Deliberate facts of Batten's sample products (invented scenario). See README.md.",
        "units": {"length": "mm", "angle": "deg", "curvature": "1/mm"},
        "conventions": {
            "normal": "Su x Sv normalised (no face is reversed)",
            "cross_curvature": "normal curvature across the seam on each side, positive when the face bends "
            "towards its normal",
            "curvature_jump": "absolute difference of the cross-seam normal curvatures",
            "faces": "STEP and IGES list the faces in the order given here; names are STEP ADVANCED_FACE "
            "names and IGES 406 form 15 names (on each 144 and its 128)",
            "iges_topology": "IGES is written as 144/128 trimmed surfaces without shared edges",
            "sew_tolerance_mm": SEW_TOLERANCE,
            "free_edges": "boundary edges the seam analysis leaves unmatched; a small gap (up to 0.5 mm) "
            "is matched as a failing seam, so its two edges are not free; unshared_edges_step counts the "
            "STEP file's edges used by one face only",
            "default_sections": "the planes a default batten check cuts (x:5;y:5: at sixths of the model's "
            "bounding box), listed only for samples whose sections inflect, with exact inflections",
        },
    }


def build_all(out: Path = HERE, large: bool = True) -> dict:
    """Write every sample's STEP and IGES and ``manifest.json`` into ``out``; return the manifest.

    ``large=False`` leaves out the large sample (``large_samples``), which takes
    most of the time.
    """
    out.mkdir(parents=True, exist_ok=True)
    manifest = manifest_header()
    manifest["samples"] = [build(make(), out) for make in ALL]
    if large:
        manifest["large_samples"] = [build_large(out)]
    tmp = out / ".manifest.json.tmp"
    tmp.write_text(json.dumps(manifest, indent=1) + "\n", encoding="utf-8")
    os.replace(tmp, out / "manifest.json")
    return manifest


def main() -> int:
    manifest = build_all(HERE)
    for entry in manifest["samples"] + manifest.get("large_samples", []):
        sizes = ", ".join(f"{(HERE / name).stat().st_size / 1024:.0f} kB" for name in entry["files"].values())
        print(f"{entry['name']}: {entry['face_count']} faces ({sizes})")
    return 0


if __name__ == "__main__":
    sys.exit(main())
