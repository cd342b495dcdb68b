"""The checks a candidate member must pass, one module each, gathered in a registry.

Importing this package registers the built-in checks in order: bending, shear,
deflection, lateral-torsional buckling and vibration (active only when the job's ``[limits]`` ask
for them), local buckling (section class; always), final deflection with creep (only with
``[design]``) and bearing (always: the required length). See
:mod:`.registry` for how to add one.
"""

from .registry import (NOT_CHECKED, Check, CheckRow, Effects, TextRule, active_checks, get_check, limit_keys, not_checked,
                       register, registered, registered_check, unregister)
from . import bending, shear, deflection, lateral_torsional, vibration, local_buckling, deflection_final, bearing  # noqa: E402,F401,E501  (each registers itself)

__all__ = ["Check", "CheckRow", "TextRule", "Effects", "NOT_CHECKED", "register", "unregister", "registered", "active_checks",
           "registered_check", "get_check", "not_checked", "limit_keys"]
