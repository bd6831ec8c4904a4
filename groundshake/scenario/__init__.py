"""The scenario file (TOML): schema, validation, defaults.

``load_scenario(path)`` reads and validates a scenario; attribute names of the
result equal the TOML keys (``scenario.mesh.element_size``,
``scenario.parts[0].origin``, ``scenario.motion.x.file``...). Units are SI;
damping is in percent, as in the file. Errors are one-line
:class:`~groundshake.ScenarioError` messages
``FILE:LINE: key.path: given VALUE; allowed WHAT``.
"""
from ._geometry import MAX_ESTIMATED_DOFS, estimated_dofs
from ._load import errors_at_key, load_scenario, located_at, parse_scenario_text
from ._validate import box_rotary_inertia
from ._schema import schema_rows
from . import _types
from ._types import *  # noqa: F401,F403 - the schema's dataclasses (_types.__all__)

__all__ = [
    "load_scenario",
    "errors_at_key",
    "located_at",
    "parse_scenario_text",
    *_types.__all__,
    "MAX_ESTIMATED_DOFS",
    "estimated_dofs",
    "box_rotary_inertia",
    "schema_rows",
]
