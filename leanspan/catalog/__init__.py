"""Materials and section series -> property tables; user catalogue and materials files.

Modules: :mod:`~leanspan.catalog.materials` (the materials table),
:mod:`~leanspan.catalog.series` (rules generating the built-in series),
:mod:`~leanspan.catalog.user` (user catalogue CSV), :mod:`~leanspan.catalog.table`
(the property DataFrame, filters, cache), :mod:`~leanspan.catalog.csvfile` (CSV with
unit headers). Names below are imported on first use, so ``import leanspan.catalog``
stays light (no pandas).

>>> from leanspan.catalog import get_material
>>> get_material("GL28h").kind
'glulam'
"""

__all__ = ["Material", "materials_table", "get_material", "load_user_materials", "material_lookup",
           "SERIES", "catalog_table", "dims_of", "row_dims"]

_WHERE = {"Material": "materials", "materials_table": "materials", "get_material": "materials",
          "load_user_materials": "materials", "material_lookup": "materials", "SERIES": "series", "catalog_table": "table",
          "dims_of": "table", "row_dims": "table"}


def __getattr__(name):
    if name in _WHERE:
        import importlib

        return getattr(importlib.import_module(f"{__name__}.{_WHERE[name]}"), name)
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")
