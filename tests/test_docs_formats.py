"""docs/formats.md names every input key and every JSON output key.

Each command runs in-process with ``--json`` on the invented examples in data/examples/ (and the
built-in demo); every key of the JSON it prints must appear in docs/formats.md as `key`
(backticked). Levels keyed by user names (result names under ``results``, material names under
``stresses``) are walked through without asking for their names. The keys the readers accept
(``[search]``, ``[limits]``, ``[beam]``, loads, supports, section parts, shape dimensions, user
CSV columns, material fields) and every command-line option must be documented the same way.
"""

from __future__ import annotations

import json
import re
from pathlib import Path

import pytest

from leanspan.cli import main

ROOT = Path(__file__).resolve().parents[1]
DOC = ROOT / "docs" / "formats.md"
EXAMPLES = ROOT / "data" / "examples"

# dicts whose keys are names chosen by the user (or the data), not format keys
USER_NAMED = {"results", "stresses"}


def doc_text() -> str:
    return DOC.read_text(encoding="utf-8")


def documented(key: str, text: str) -> bool:
    """`key`, or a TOML table name written `[key]` or `[[key]]`."""
    return any(f"`{form}`" in text for form in (key, f"[{key}]", f"[[{key}]]"))


def json_keys(obj, parent: str | None = None, out: set | None = None) -> set:
    """Every dict key in ``obj``, recursively; the children of USER_NAMED dicts are skipped
    (their values are still walked)."""
    out = set() if out is None else out
    if isinstance(obj, dict):
        for key, value in obj.items():
            if parent not in USER_NAMED:
                out.add(key)
            json_keys(value, key, out)
    elif isinstance(obj, list):
        for item in obj:
            json_keys(item, parent, out)
    return out


def run_json(argv, capsys):
    status = main(argv)
    captured = capsys.readouterr()
    assert status in (0, 1), f"leanspan {' '.join(argv)} exited {status}: {captured.err}"
    return json.loads(captured.out)


def _examples(pattern):
    files = sorted(EXAMPLES.glob(pattern))
    assert files, f"no examples {pattern} in {EXAMPLES}"
    return [str(f) for f in files]


RUNS = (
    [["section", f, "--json"] for f in _examples("section-*.toml")]
    + [["section", f, "--json", "--torsion", "--moment", "12 kN*m"] for f in _examples("section-*.toml")]
    + [["beam", f, "--json"] for f in _examples("beam-*.toml")]
    + [["catalog", "--json"], ["catalog", "--json", "--file", str(EXAMPLES / "supplier-list.csv")],
       ["materials", "--json"]]
    + [["select", f, "--json"] for f in _examples("select-*.toml")]
    + [["demo", "--json"]]
    + [["schedule", f, "--json", "--pareto", "mass,carbon"] for f in _examples("schedule-*.toml")]
)


@pytest.mark.parametrize("argv", RUNS, ids=[" ".join([a[0], Path(a[1]).name if len(a) > 1 and
                                                       a[1] != "--json" else ""] + a[2:]).strip()
                                             for a in RUNS])
def test_every_json_key_is_documented(argv, capsys):
    doc = run_json(argv, capsys)
    keys = json_keys(doc)
    assert keys, "no keys collected"
    if isinstance(doc, dict) and isinstance(doc.get("results"), dict):
        # result names are the user's case and combination names, except the envelopes
        keys |= {name for name in doc["results"] if name.startswith("envelope")}
    text = doc_text()
    missing = sorted(k for k in keys if not documented(k, text))
    assert not missing, f"docs/formats.md does not document (as `key`) the JSON keys {missing} of leanspan {' '.join(argv)}"


def test_user_named_levels_are_skipped():
    doc = {"units": "SI", "results": {"my case": {"kind": "case"}}, "stresses": {"C24": {"top": 1}}}
    assert json_keys(doc) == {"units", "results", "kind", "stresses", "top"}


def _missing(keys):
    text = doc_text()
    return sorted(k for k in keys if not documented(k, text))


def test_selection_job_keys_are_documented():
    from leanspan.select import job
    from leanspan.select.checks import limit_keys

    assert not _missing(job._SEARCH_KEYS), "[search] keys"
    assert not _missing(job._LIMIT_KEYS | set(limit_keys())), "[limits] keys"
    from leanspan.project import PROJECT_KEYS

    assert not _missing(set(PROJECT_KEYS) | {"project"}), "[project] keys"


def test_schedule_file_keys_are_documented():
    from leanspan.schedule import objectives, parse

    assert not _missing(parse.SCHEDULE_KEYS | parse.MEMBER_KEYS | parse.DEFAULT_KEYS), "schedule keys"
    assert not _missing(parse.CSV_COLUMNS | {f"{p}.CASE" for p in ("area", "line", "point")}
                        | {"search.KEY", "limits.KEY"}), "members CSV columns"
    assert not _missing(objectives._PRICE_KEYS | set(objectives.OBJECTIVES)), "[[price]] keys and objectives"


def test_beam_job_keys_are_documented():
    from leanspan.beam import parse
    from leanspan.beam.model import SUPPORT_TYPES

    assert not _missing(parse._BEAM_KEYS), "[beam] keys"
    load_keys = set(parse._LOAD_KEYS) | {k for keys in parse._LOAD_KEYS.values() for k in keys}
    assert not _missing(load_keys), "[[load]] types and keys"
    assert not _missing(set(SUPPORT_TYPES) | {"k", "kr"}), "[[support]] types and keys"
    assert not _missing({"name", "factors", "check", "limit", "pattern"}), "[[combination]] keys"


def test_section_file_keys_are_documented():
    from leanspan.sections import io
    from leanspan.sections.families import FAMILIES

    assert not _missing(set(io._SECTION_KEYS) | set(io._PLACEMENT) | {"points", "holes"}), "section keys"
    for name, family in FAMILIES.items():
        assert not _missing({name, *family.all_keys}), f"shape {name}"


def test_catalogue_and_material_columns_are_documented():
    from leanspan.catalog import materials, user

    assert not _missing(set(user.TABULATED) | {"family", "name", "material"}), "user CSV columns"
    assert not _missing(set(materials._QUANTITIES) | set(materials._TEXT) | set(materials.KINDS)), \
        "material fields"


def test_command_line_options_are_documented():
    from leanspan.cli import _modules, _parser

    parser = _parser(_modules())
    sub = next(a for a in parser._actions if a.dest == "command")
    text = doc_text()
    missing = []
    for command, p in sub.choices.items():
        if not re.search(rf"`{command}[ `]", text):
            missing.append(command)
        for action in p._actions:
            for opt in action.option_strings:
                if opt.startswith("--") and opt != "--help" and not re.search(rf"`{re.escape(opt)}[ `]", text):
                    missing.append(f"{command} {opt}")
    assert not missing, f"docs/formats.md does not document {missing}"
