"""Fuzz suite: malformed and edge-case inputs never crash, hang or print nan/inf as a success.

A seeded generator mutates the invented examples in ``data/examples/`` (jobs, sections, the
supplier CSV) and two small materials files: wrong types, missing and unknown keys, huge, tiny,
negative and non-finite values, unknown units, garbage text, truncated or non-UTF-8 files. Each
input runs through :func:`leanspan.cli.main` in-process and must

- exit with status 0, 1 or 2, with no exception escaping;
- write nothing on stderr but the tool's own ``leanspan COMMAND: error|warning: ...`` lines
  (one error line at most; ``schedule`` has one per bad member and a last one listing them);
- print JSON without NaN or infinities when it succeeds (``null`` only where documented).

The default run builds ``N_DEFAULT`` inputs (seeded, the same every run); ``pytest --fuzz-long``
builds ten times more with other seeds. A failure prints the command and the input file.
"""

from __future__ import annotations

import contextlib
import copy
import io
import json
import math
import random
import re
import shutil
import tomllib
import warnings
from pathlib import Path

import pytest

from leanspan.cli import main

EXAMPLES = Path(__file__).resolve().parents[1] / "data" / "examples"
N_DEFAULT = 800
BATCHES = 8  # the inputs are split into this many test items

MATERIALS_TOML = """\
[[material]]
name = "Larch-S"
kind = "timber"
E = "10.5 GPa"
G = "650 MPa"
density = "520 kg/m^3"
strength_bending = "26 MPa"
strength_shear = "3.8 MPa"
basis = "characteristic"

[[material]]
name = "C24"
E = 10500
"""

MATERIALS_CSV = """\
name,kind,E [GPa],G [MPa],density [kg/m^3],strength_bending [MPa],strength_shear [MPa],source
Larch-S,timber,10.5,650,520,26,3.8,invented
C24,,11,,,,,
"""

# values put where a field is due: wrong types, extremes, non-finite numbers, odd units
BAD_VALUES = [
    [], {}, [[]], [1, 2, 3], ["a"], [[0, 0], [1, 0]], {"a": 1}, {"dead": "x"}, "", "x", " ",
    True, False, -1, 0, 1, 3, 2**62, -2**62, 1e308, -1e308, 1e-308, 5e-324, math.nan, math.inf,
    -math.inf, 1e6, 1e12, 1e15, "1e308 m", "-1e308 m", "1e-300 m", "nan m", "inf m", "-inf mm",
    "0 m", "-5 mm", "5 furlong", "5 kN", "5 kN/m", "5", "5 mm mm", "5 ** mm", "mm", "1e30 kN",
    "1e30 kN*m", "1e30 kN/m", "1e-30 kN/m", "1e30 N*mm^2", "1e-30 N*mm^2", "1e20 MPa", "1e20 kg/m",
    "span/0", "span/-1", "span/1e308", "L/nan", "span/x", "polygon", "rectangle", "ibeam", "spring",
    "pin", "fixed", "guided", "dead", "deflection", "strength", "envelope", "none", "mass", "depth",
    "gen_chs", "user", "C24", "S355", "x" * 300, "ø\u00e9\u2028", "[1, 2]", "{a = 1}",
]
CELL_VALUES = ["", "x", "nan", "inf", "-inf", "-5", "0", "1e308", "1e-308", "1e12", "1e-12", "5e-324",
               "ibeam", "polygon", "rectangle", "C24", "S999", '"', "1,5", "12 mm", "  ", "#", "1e6"]
UNITS = ["furlong", "kg", "in", "m", "mm^2", "", "kN", "??", "MPa", "1e300 m", "ft"]


def _toml_value(v) -> str:
    if isinstance(v, bool):
        return "true" if v else "false"
    if isinstance(v, int):
        return str(v)
    if isinstance(v, float):
        return "nan" if math.isnan(v) else ("inf" if v > 0 else "-inf") if math.isinf(v) else repr(v)
    if isinstance(v, str):
        return json.dumps(v, ensure_ascii=False).replace("\x7f", "\\u007f")
    if isinstance(v, dict):
        return "{" + ", ".join(f"{json.dumps(k)} = {_toml_value(x)}" for k, x in v.items()) + "}"
    return "[" + ", ".join(_toml_value(x) for x in v) + "]"


def to_toml(data: dict) -> str:
    """Every top-level key as ``key = value`` with inline tables and arrays (valid TOML)."""
    return "".join(f"{json.dumps(k)} = {_toml_value(v)}\n" for k, v in data.items())


def _paths(obj, path=()):
    yield path
    if isinstance(obj, dict):
        for k, v in obj.items():
            yield from _paths(v, path + (k,))
    elif isinstance(obj, list):
        for i, v in enumerate(obj):
            yield from _paths(v, path + (i,))


def _scale_text(rng, v: str) -> str:
    """``"5 kN/m"`` -> the same unit with an extreme number, or the number with an odd unit."""
    m = re.match(r"\s*(-?[0-9.eE+-]+)\s*(.*)", v)
    if not m:
        return _bad(rng) if rng.random() < 0.5 else v + " furlong"
    if rng.random() < 0.7:
        return f"{rng.choice(['1e308', '-1e308', '1e-300', '0', '-1', 'nan', 'inf', '1e15', '1e-15'])} {m.group(2)}"
    return f"{m.group(1)} {rng.choice(UNITS)}"


def _bad(rng):
    return copy.deepcopy(rng.choice(BAD_VALUES))  # a fresh copy: later edits never reach the pool


def mutate_tree(rng, data):
    """One to three random edits of a parsed TOML document."""
    for _ in range(rng.randint(1, 3)):
        paths = [p for p in _paths(data) if p]
        if not paths:
            break
        path = rng.choice(paths)
        parent = data
        for k in path[:-1]:
            parent = parent[k]
        key, value = path[-1], parent[path[-1]]
        op = rng.random()
        if op < 0.12 and isinstance(parent, dict):
            del parent[key]
        elif op < 0.2 and isinstance(parent, dict):
            parent[rng.choice(["W", "extra", "atx", "type2"])] = _bad(rng)
        elif op < 0.45 and isinstance(value, str):
            parent[key] = _scale_text(rng, value)
        elif op < 0.6 and isinstance(value, (int, float)) and not isinstance(value, bool):
            parent[key] = value * rng.choice([1e300, 1e-300, -1.0, 0.0, 1e12, 1e-12, 1e6])
        elif op < 0.67 and isinstance(value, list):
            parent[key] = copy.deepcopy(value * rng.choice([0, 50, 3000])) if value else value
        else:
            parent[key] = _bad(rng)
    return data


def mutate_text(rng, text: str) -> bytes:
    """Damage a file's text: truncate, insert garbage, drop lines or break the encoding."""
    op = rng.random()
    raw = text.encode("utf-8")
    if op < 0.35:
        return raw[: rng.randint(0, len(raw))]
    if op < 0.55:
        i = rng.randint(0, len(text))
        return (text[:i] + rng.choice(["[[", "]", "=", '"', "\x00", "{", "\n[beam]\n", ",,,", "\ufeff"]) +
                text[i:]).encode("utf-8")
    if op < 0.75:
        lines = text.splitlines(keepends=True)
        keep = [ln for ln in lines if rng.random() > 0.3]
        return "".join(keep).encode("utf-8")
    if op < 0.85:
        return raw.replace(b"e", b"\xff\xfe", 1)
    return bytes(rng.randrange(256) for _ in range(rng.randint(0, 200)))


def mutate_csv(rng, text: str) -> str:
    """Random cell, header and row edits of a CSV file."""
    lines = text.splitlines()
    for _ in range(rng.randint(1, 3)):
        data = [i for i, ln in enumerate(lines) if ln and not ln.startswith("#")]
        if not data:
            break
        i = rng.choice(data)
        cells = lines[i].split(",")
        op = rng.random()
        j = rng.randrange(len(cells))
        if op < 0.5:
            cells[j] = rng.choice(CELL_VALUES)
        elif op < 0.6:
            del cells[j]
        elif op < 0.7:
            cells.append(rng.choice(CELL_VALUES))
        elif op < 0.85:  # a header unit
            head = [k for k, ln in enumerate(lines) if ln and not ln.startswith("#")][0]
            hc = lines[head].split(",")
            k = rng.randrange(len(hc))
            hc[k] = hc[k].split("[")[0].strip() + f" [{rng.choice(UNITS)}]"
            lines[head] = ",".join(hc)
            continue
        elif op < 0.93:
            lines.insert(i, lines[i])  # a repeated row (or header)
            continue
        else:
            lines = lines * rng.choice([2, 40])
            continue
        lines[i] = ",".join(cells)
    return "\n".join(lines) + "\n"


def _examples():
    out = {}
    for p in sorted(EXAMPLES.glob("*.toml")):
        out[p.name] = p.read_text(encoding="utf-8")
    return out


def build_cases(seed: int, n: int, folder: Path):
    """``n`` (argv, description) pairs; the input files are written into ``folder``."""
    rng = random.Random(seed)
    examples = _examples()
    csv_text = (EXAMPLES / "supplier-list.csv").read_text(encoding="utf-8")
    names = sorted(examples)
    cases = []
    for i in range(n):
        d = folder / f"c{i}"
        d.mkdir()
        kind = rng.random()
        if kind < 0.7:  # a job or section file
            name = rng.choice(names)
            text = examples[name]
            if rng.random() < 0.8:
                data = mutate_tree(rng, tomllib.loads(text))
                raw = to_toml(data).encode("utf-8")
            else:
                raw = mutate_text(rng, text)
            path = d / name
            path.write_bytes(raw)
            shutil.copy(EXAMPLES / "supplier-list.csv", d / "supplier-list.csv")
            for other in names:  # sections a job may name
                if other.startswith("section") and other != name:
                    (d / other).write_text(examples[other], encoding="utf-8")
            if name.startswith("schedule"):  # its members CSV, sometimes mutated too
                members = (EXAMPLES / name).with_suffix(".csv").read_text(encoding="utf-8")
                (d / (EXAMPLES / name).with_suffix(".csv").name).write_text(
                    mutate_csv(rng, members) if rng.random() < 0.4 else members, encoding="utf-8")
            command = name.split("-")[0]
            argv = [command, str(path)]
            if command == "section" and rng.random() < 0.3:
                argv += ["--torsion"]
            if command == "section" and rng.random() < 0.3:
                argv += ["--moment", rng.choice(["5 kN*m", "1e308 kN*m", "nan kN*m", "5", "-1e30 N*m"])]
        elif kind < 0.85:  # the supplier CSV, listed or searched
            path = d / "supplier-list.csv"
            path.write_bytes(mutate_csv(rng, csv_text).encode("utf-8") if rng.random() < 0.8
                             else mutate_text(rng, csv_text))
            if rng.random() < 0.5:
                argv = ["catalog", "--file", str(path)]
            else:
                (d / "job.toml").write_text(examples["select-supplier.toml"], encoding="utf-8")
                argv = ["select", str(d / "job.toml")]
        else:  # a materials file
            if rng.random() < 0.5:
                path = d / "mine.toml"
                raw = (to_toml(mutate_tree(rng, tomllib.loads(MATERIALS_TOML))).encode("utf-8")
                       if rng.random() < 0.8 else mutate_text(rng, MATERIALS_TOML))
            else:
                path = d / "mine.csv"
                raw = (mutate_csv(rng, MATERIALS_CSV).encode("utf-8") if rng.random() < 0.8
                       else mutate_text(rng, MATERIALS_CSV))
            path.write_bytes(raw)
            argv = ["materials", "--file", str(path)] if rng.random() < 0.6 else \
                ["catalog", "--family", "glulam", "--materials-file", str(path)]
        if rng.random() < 0.6:
            argv.append("--json")
        if rng.random() < 0.2:
            argv += ["--units", "us"]
        cases.append((argv, path))
    return cases


_LINE = re.compile(r"^leanspan [a-z]+: (error|warning): \S")


def _no_non_finite(text):
    def refuse(const):
        raise ValueError(f"{const} in the JSON output")
    json.loads(text, parse_constant=refuse)


def check_case(argv, path):
    """Run one input; return a failure description, or None."""
    out, err = io.StringIO(), io.StringIO()
    try:
        with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err), \
                warnings.catch_warnings(record=True) as caught:
            warnings.simplefilter("always")
            status = main(argv)
    except BaseException as exc:  # noqa: BLE001 - any escape is the failure we look for
        return f"{type(exc).__name__}: {str(exc)[:300]}"
    if caught:
        return f"a Python warning reached the user: {caught[0].category.__name__}: {caught[0].message}"
    if status not in (0, 1, 2):
        return f"exit status {status}"
    lines = err.getvalue().splitlines()
    bad = [ln for ln in lines if not _LINE.match(ln)]
    if bad:
        return f"stray stderr line {bad[0][:300]!r}"
    if sum(": error: " in ln for ln in lines) > 1 and argv[0] != "schedule":
        return "more than one error line"  # (a schedule names each bad member on its own line)
    if status == 2 and not any(": error: " in ln for ln in lines):
        return "exit 2 without an error line"
    if status in (0, 1) and "--json" in argv:
        try:
            _no_non_finite(out.getvalue())
        except ValueError as exc:
            return str(exc)
    return None


def _run_batch(tmp_path, seed, n):
    failures = []
    for argv, path in build_cases(seed, n, tmp_path):
        why = check_case(argv, path)
        if why:
            failures.append(f"leanspan {' '.join(argv)}\n    {why}")
    assert not failures, f"{len(failures)} of {n} inputs failed:\n" + "\n".join(failures[:20])


@pytest.mark.parametrize("batch", range(BATCHES))
def test_fuzz(tmp_path, batch, request):
    scale = 10 if request.config.getoption("--fuzz-long") else 1
    _run_batch(tmp_path, seed=1000 * scale + batch, n=N_DEFAULT * scale // BATCHES)
