"""The report's figures: the names the report parts (and, for now, the suite page) call.

The figures themselves live in :mod:`groundshake.plots`; this module only re-exports them
under the names the report has always used. ``data_uri`` is :func:`plots.to_data_uri`.
"""
from __future__ import annotations

from ..plots import (LINESTYLES, PALETTE, VoxelGrid, exterior_faces, mode_shapes_figure,
                     model_figure, mpl_text, plain_log_axis, record_figure, spectra_figure,
                     strip_figure, stress_figure)
from ..plots import to_data_uri as data_uri

__all__ = ["PALETTE", "LINESTYLES", "plain_log_axis", "STRESS_MAP", "SHAPE_MAP", "VoxelGrid",
           "data_uri",
           "mpl_text", "strip_figure", "record_figure", "spectra_figure", "model_figure",
           "stress_figure", "mode_shapes_figure", "exterior_faces"]


def __getattr__(name: str):
    # the colour maps are made on first use, so that importing the report loads no matplotlib
    from .. import plots

    if name == "STRESS_MAP":
        return plots.stress_map()
    if name == "SHAPE_MAP":
        return plots.shape_map()
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")
