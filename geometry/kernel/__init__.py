"""The CAD kernel (OCP) reading STEP and IGES, in a helper process of its own.

Everything here imports numpy, the standard library and, inside functions, OCP:
not the compiled kernels nor the rest of ``geometry``, so the helper process
(:mod:`.worker`) starts with the CAD kernel's libraries alone, and a command
can start it (:func:`.isolation.start_helper`) before its own imports.
What comes back (:mod:`.shape`) is arrays; :mod:`geometry.io` builds the model.
"""
