"""Selection: the member, the check registry, vectorised screening and ranking.

Modules: :mod:`.member` (section + material -> EI, EA, GJ, mass and properties),
:mod:`.checks` (the check registry: bending, shear, deflection ...), :mod:`.job`
(``[search]`` and ``[limits]`` -> a :class:`Job`), :mod:`.design` (the optional ``[design]``
basis: design strengths from characteristic values, creep), :mod:`.screen` (action effects of every
candidate under every combination, then the checks), :mod:`.search` (catalogue ->
ranked :class:`Selection`), :mod:`.chosen` (the chosen member, solved).

>>> from pathlib import Path
>>> from leanspan.select import parse_job, run_selection
>>> job = parse_job({"beam": {"spans": ["3 m"]},
...                  "load": [{"case": "imposed", "type": "udl", "w": "2 kN/m"}],
...                  "search": {"families": ["sawn_metric"], "materials": ["C24"]},
...                  "limits": {"stress_factor": 0.6}}, Path("."))
>>> sel = run_selection(job)
>>> sel.success, list(sel.to_frame().columns[-7:])
(True, ['bending', 'shear', 'deflection', 'local_buckling', 'bearing', 'governing', 'passes'])
"""

__all__ = ["Check", "CheckRow", "Effects", "register", "unregister", "registered", "registered_check",
           "not_checked", "ChosenMember", "chosen_member", "Job", "Limits", "SearchSpec", "parse_job",
           "Member", "member_from_section", "member_from_row", "member_arrays", "section_stiffness",
           "beam_with_member", "Candidates", "Screen", "screen", "screen_loop", "evaluate",
           "Selection", "run_selection", "candidate_table", "SectionAnalysis", "analyse_section",
           "DesignBasis", "parse_design", "allowable_stress"]

# where each public name lives; imported on first use, so that a command needing one module
# (``leanspan section`` needs section_analysis only) does not load the beam solver and pandas
_WHERE = {**{n: "checks" for n in ("Check", "CheckRow", "Effects", "register", "unregister", "registered",
                                   "registered_check", "not_checked")},
          "ChosenMember": "chosen", "chosen_member": "chosen",
          **{n: "job" for n in ("Job", "Limits", "SearchSpec", "parse_job")},
          **{n: "member" for n in ("Member", "member_from_section", "member_from_row", "member_arrays",
                                   "section_stiffness", "beam_with_member")},
          **{n: "screen" for n in ("Candidates", "Screen", "screen", "screen_loop", "evaluate")},
          **{n: "search" for n in ("Selection", "run_selection", "candidate_table")},
          "SectionAnalysis": "section_analysis", "analyse_section": "section_analysis",
          **{n: "design" for n in ("DesignBasis", "parse_design", "allowable_stress")}}


def __getattr__(name):
    if name in _WHERE:
        import importlib

        return getattr(importlib.import_module(f"{__name__}.{_WHERE[name]}"), name)
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")
