"""Batten's bundled sample products: the builder script, its constructions, the files.

See README.md; rebuild with ``.venv/bin/python sample_surfaces/build_samples.py``.
"""
