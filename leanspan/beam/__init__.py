"""Exact beam solver: continuous spans, overhangs, springs, hinges, load cases and combinations.

Public API
----------
parse_beam(data, base_dir, field_prefix="") -> BeamModel
    A job-file dict (the whole TOML) to a validated model.
solve(model, stations=48) -> BeamSolution
    Results per load case, per combination and the envelope (``.to_json()`` is the contract).
respond(model, EI=None, unit_self_weight=True) -> Response
    Exact piecewise-polynomial fields of every unit case, optionally for K candidate EIs.
poly.extremes / poly.global_extremes
    Exact per-element and global maxima/minima of those polynomials.

Examples
--------
>>> from pathlib import Path
>>> data = {"beam": {"spans": ["4 m", "4 m"], "EI": "5000 kN*m^2"},
...         "load": [{"case": "dead", "type": "udl", "w": "2 kN/m"}]}
>>> sol = solve(parse_beam(data, Path(".")))
>>> [round(r["force"] / 1e3, 9) for r in sol.results["dead"].reactions]   # 3/8, 10/8, 3/8 of wL
[3.0, 10.0, 3.0]
"""

from . import poly
from .model import (G, BeamModel, Combination, Couple, DeflectionLimit, DistributedLoad, PointLoad,
                    Stiffness, Support)
from .parse import parse_beam, parse_limit
from .results import BeamSolution, Extreme, ResultSet, solve
from .solver import ConcreteCombo, Response, check_mechanism, respond

__all__ = [
    "parse_beam", "parse_limit", "solve", "respond", "check_mechanism", "poly",
    "BeamModel", "Support", "Stiffness", "PointLoad", "Couple", "DistributedLoad",
    "DeflectionLimit", "Combination", "G",
    "BeamSolution", "ResultSet", "Extreme", "Response", "ConcreteCombo",
]
