"""Selection: the member, the check registry, vectorised screening and ranking.

Modules: :mod:`.member` (section + material -> EI, EA, GJ, mass and properties),
:mod:`.checks` (the check registry: bending, shear, deflection ...), :mod:`.job`
(``[search]`` and ``[limits]`` -> a :class:`Job`), :mod:`.screen` (action effects of every
candidate under every combination, then the checks), :mod:`.search` (catalogue ->
ranked :class:`Selection`), :mod:`.chosen` (the chosen member, solved).

>>> from pathlib import Path
>>> job = parse_job({"beam": {"spans": ["3 m"]},
...                  "load": [{"case": "imposed", "type": "udl", "w": "2 kN/m"}],
...                  "search": {"families": ["sawn_metric"], "materials": ["C24"]},
...                  "limits": {"stress_factor": 0.6}}, Path("."))
>>> sel = run_selection(job)
>>> sel.success, list(sel.to_frame().columns[-5:])
(True, ['bending', 'shear', 'deflection', 'governing', 'passes'])
"""

from .checks import Check, CheckRow, Effects, not_checked, register, registered, registered_check, unregister
from .chosen import ChosenMember, chosen_member
from .job import Job, Limits, SearchSpec, parse_job
from .member import (Member, beam_with_member, member_arrays, member_from_row, member_from_section,
                     section_stiffness)
from .screen import Candidates, Screen, evaluate, screen, screen_loop
from .search import Selection, candidate_table, run_selection

__all__ = ["Check", "CheckRow", "Effects", "register", "unregister", "registered", "registered_check",
           "not_checked", "ChosenMember", "chosen_member", "Job", "Limits", "SearchSpec", "parse_job",
           "Member", "member_from_section", "member_from_row", "member_arrays", "section_stiffness",
           "beam_with_member", "Candidates", "Screen", "screen", "screen_loop", "evaluate",
           "Selection", "run_selection", "candidate_table"]
