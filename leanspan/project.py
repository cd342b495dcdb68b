"""The ``[project]`` table of a job file: the title-block fields a calculation sheet carries.

Keys (all optional text): ``name`` (the project), ``reference`` (job or drawing number),
``revision``, ``prepared_by``, ``checked_by``. The sheet prints the given ones in its header
and leaves a blank line to sign for a missing ``checked_by``.

>>> parse_project({"name": "Invented boathouse", "revision": "B"}).rows()
[('Project', 'Invented boathouse'), ('Revision', 'B'), ('Prepared by', ''), ('Checked by', '')]
>>> parse_project({"revison": "B"}, "job.toml: ")
Traceback (most recent call last):
...
leanspan.errors.InputError: job.toml: project.revison: unknown key; expected checked_by, name, prepared_by, reference, revision
"""

from __future__ import annotations

from dataclasses import dataclass

from .errors import InputError, brief

__all__ = ["Project", "parse_project", "PROJECT_KEYS"]

PROJECT_KEYS = {"name": "Project", "reference": "Reference", "revision": "Revision",
                "prepared_by": "Prepared by", "checked_by": "Checked by"}


@dataclass(frozen=True)
class Project:
    """Title-block fields (empty text where not given)."""

    name: str = ""
    reference: str = ""
    revision: str = ""
    prepared_by: str = ""
    checked_by: str = ""

    def rows(self) -> list:
        """``(label, text)`` for the sheet header: the given fields, and always the two
        signature fields (blank when not given, to be filled in by hand)."""
        return [(label, getattr(self, key)) for key, label in PROJECT_KEYS.items()
                if getattr(self, key) or key in ("prepared_by", "checked_by")]


def parse_project(table, where: str = "") -> Project:
    """A :class:`Project` from the job's ``[project]`` table (None: no table)."""
    if table is None:
        return Project()
    if not isinstance(table, dict):
        raise InputError(f"{where}project: expected a table of text fields, got {brief(table)}")
    values = {}
    for key, value in table.items():
        if key not in PROJECT_KEYS:
            raise InputError(f"{where}project.{key}: unknown key; expected {', '.join(sorted(PROJECT_KEYS))}")
        if not isinstance(value, (str, int)) or isinstance(value, bool):
            raise InputError(f"{where}project.{key}: expected text, got {brief(value)}")
        values[key] = str(value).strip()
    return Project(**values)
