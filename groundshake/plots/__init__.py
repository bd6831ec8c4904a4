"""Figures of every stage, drawn with matplotlib on an Agg canvas (no pyplot state).

Each function takes data (arrays in the unit it names, or the stages' own objects) and
returns a ``matplotlib.figure.Figure``; nothing is written except by :func:`save_figure`
(a file, atomically) and :func:`to_data_uri` (PNG data for the report's HTML).
matplotlib is imported when a figure is drawn, never when this package is imported.

Families: time series (:func:`strip_figure`, :func:`record_figure`,
:func:`correction_figure`), spectra (:func:`spectra_figure`,
:func:`spectra_overview_figure`, :func:`match_figure`), the block in 3-D
(:func:`model_figure`, :func:`mode_shapes_figure`, :func:`block_model_figure`,
:func:`block_mode_figure`), the response (:func:`stress_figure`) and the suite
(:func:`suite_spectra_figure`).
"""
from __future__ import annotations

from ._base import (DPI, LINESTYLES, PALETTE, mpl_text, plain_log_axis, save_figure,
                    shape_map, stress_map, to_data_uri)
from ._mesh import (VoxelGrid, block_mode_figure, block_model_figure, exterior_faces,
                    mode_shapes_figure, model_figure)
from ._records import correction_figure, record_figure, strip_figure
from ._response import stress_figure
from ._spectra import CURVE_KINDS, match_figure, spectra_figure, spectra_overview_figure
from ._suite import suite_spectra_figure

__all__ = ["DPI", "LINESTYLES", "PALETTE", "mpl_text", "plain_log_axis", "save_figure",
           "shape_map", "stress_map", "to_data_uri",
           "VoxelGrid", "block_mode_figure", "block_model_figure", "exterior_faces",
           "mode_shapes_figure", "model_figure",
           "correction_figure", "record_figure", "strip_figure",
           "stress_figure",
           "CURVE_KINDS", "match_figure", "spectra_figure", "spectra_overview_figure",
           "suite_spectra_figure"]
