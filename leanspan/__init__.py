"""leanspan: section properties, exact beams and lightest-section selection.

The import package is organised as in ``DEVELOPERS.md``: ``sections`` (geometry to
properties), ``catalog`` (materials and section families), ``beam`` (exact beam
solver), ``select`` (screening and ranking), ``report`` (tables, JSON, plots, sheet)
and ``cli`` (the ``leanspan`` command).
"""

__version__ = "0.1.0"

CAUTION = (
    "CAUTION: leanspan is a sizing aid, not a code-compliance check. Results rest on the "
    "limits you gave and only the checks listed; lateral-torsional and local buckling, "
    "bearing, connections, vibration, fire and durability are not checked unless a check "
    "says so. Verify the design against your local building code and have it reviewed by "
    "a licensed or otherwise qualified engineer before anything is built."
)
